"""The envelope rules that read the same next to a point and in a tail, over either kind of envelope form.

A subclass supplies the form's own algebra: products, powers, sums of upper envelopes, the ratio that a
dominance argument needs, and the two bounds the function rules ask for (a bound on |g| when g is bounded,
and the least |g| on the piece when g is large). See docs/improper-integrals.md, sections 3 and 4.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, replace
from fractions import Fraction
from typing import Any, Generic, TypeVar

from ..arithmetic import Arithmetic, Interval, ParameterValue
from ..derivatives import Program
from ..errors import ArithmeticFault
from ..formula import Binary, Call, Formula, Negate, Node, Number, Variable
from ..formula._catalogue import spelled_out
from ._scalars import ExactArithmetic, Scalars, Unsupported

Form = TypeVar("Form")

ODD_BOUNDED = ("sin", "atan", "tanh", "erf")
BOUNDED_BY_ONE = ("j0", "j1", "sign", "step")
_ONE, _TWO = Number(Fraction(1)), Number(Fraction(2))


def _identity(node: Call) -> Node | None:
    """A call the envelope rules read through an identity: the spelled-out functions (sec is 1/cos), and
    atanh and acosh, whose singular points are those of the logarithms they are made of."""
    written = spelled_out(node.function, node.args)
    if written is not None:
        return written
    (u,) = node.args if len(node.args) == 1 else (None,)
    if u is None:
        return None
    if node.function == "atanh":  # (log(1 + u) − log(1 − u))/2
        logs = Binary("-", Call("log", (Binary("+", _ONE, u),)), Call("log", (Binary("-", _ONE, u),)))
        return Binary("/", logs, _TWO)
    if node.function == "acosh":  # log(u + sqrt(u² − 1)), u ≥ 1
        return Call("log", (Binary("+", u, Call("sqrt", (Binary("-", Binary("^", u, _TWO), _ONE),))),))
    return None


def _gauss(u: Node) -> Node:
    return Call("exp", (Negate(Binary("^", u, _TWO)),))


@dataclass(frozen=True)
class Envelope(Generic[Form]):
    """Upper and lower envelopes of |g| and its sign: +1 when g ≥ 0 on the whole piece, −1 when g ≤ 0, 0 when
    unknown. Strictly positive needs the sign and a lower envelope (which proves g ≠ 0 there)."""

    upper: Form | None
    lower: Form | None
    sign: int


class Rules(Generic[Form]):
    """Sums, products, quotients, powers and the function rules common to both kinds of piece."""

    s: Scalars
    formula: Formula
    values: dict[str, ParameterValue]

    # -- supplied by the kind of piece -----------------------------------------------------------------
    def envelope(self, node: Node) -> Envelope[Form]:
        raise NotImplementedError

    def times(self, a: Form, b: Form) -> Form:
        raise NotImplementedError

    def raised(self, a: Form, r: Fraction, upper: bool) -> Form:
        raise NotImplementedError

    def plus(self, a: Form, b: Form) -> Form:
        raise NotImplementedError

    def scaled(self, a: Form, factor: Interval) -> Form:
        raise NotImplementedError

    def constant(self, k: Interval) -> Form:
        raise NotImplementedError

    def ratio(self, small: Form, big: Form) -> Interval:
        """A bound on the shape of small divided by the shape of big over the piece (raises if unbounded)."""
        raise NotImplementedError

    def strongest(self, lowers: list[Form]) -> Form:
        raise NotImplementedError

    def small_bound(self, upper: Form | None) -> Interval | None:
        """B with |g| ≤ B on the piece, when the upper envelope is bounded there."""
        raise NotImplementedError

    def least(self, lower: Form | None) -> Interval | None:
        """inf |g| over the piece, when the lower envelope gives a useful one."""
        raise NotImplementedError

    def call(self, node: Call) -> Envelope[Form]:
        raise NotImplementedError

    # -- shared rules -------------------------------------------------------------------------------------
    def rule(self, node: Node) -> Envelope[Form]:
        if isinstance(node, Negate):
            inner = self.envelope(node.operand)
            return replace(inner, sign=-inner.sign)
        if isinstance(node, Binary):
            if node.op in "+-":
                return self.sum_rule(node)
            if node.op == "*":
                return self.product_rule(self.envelope(node.left), self.envelope(node.right))
            if node.op == "/":
                return self.quotient_rule(self.envelope(node.left), self.envelope(node.right))
            return self.power_rule(node)
        if isinstance(node, Call) and node.function == "cases":
            return self.envelope(self.settled_case(node))
        if isinstance(node, Call):
            identity = _identity(node)
            return self.envelope(identity) if identity is not None else self.call(node)
        raise Unsupported(f"no rule for {type(node).__name__}")

    # -- piecewise definitions: the case that holds on the whole piece ----------------------------------
    def span(self) -> tuple[Fraction | None, Fraction | None]:
        """The piece's x range (None for an infinite end); both ends count as open, since a singular point
        itself and a tail's start are measure zero for the envelope."""
        raise NotImplementedError

    def settled_case(self, node: Call) -> Node:
        """The branch of a piecewise definition that holds on the whole piece, found from conditions that
        compare the variable with a constant; any other condition leaves the piece unsupported."""
        args = node.args
        for i in range(0, len(args), 2):
            if i + 1 == len(args):
                return args[i]  # otherwise
            verdict = self.decide(args[i + 1])
            if verdict is True:
                return args[i]
            if verdict is None:
                raise Unsupported("a condition of a piecewise definition does not settle on this piece")
        raise Unsupported("no case of a piecewise definition holds on this piece")

    def decide(self, condition: Node) -> bool | None:
        assert isinstance(condition, Call)
        if condition.function in ("and", "or"):
            verdicts = [self.decide(part) for part in condition.args]
            if condition.function == "and":
                return False if False in verdicts else (True if all(verdicts) else None)
            return True if True in verdicts else (False if all(v is False for v in verdicts) else None)
        left, right = condition.args  # < and <= settle alike on an open range
        low, high = self.span()
        for variable_side, other in ((left, right), (right, left)):
            if not isinstance(variable_side, Variable) or _has_variable(other):
                continue
            try:
                value = Program(Formula(other, self.formula.variable, self.formula.parameters), self.s.ar, self.values)
                c_low, c_high = self.s.ar.bounds_exact(value.value(self.s.ar.zero))
            except ArithmeticFault:
                return None
            if variable_side is left:  # x < c (or <=) on the open range (low, high)
                if high is not None and high <= c_low:
                    return True
                if low is not None and low >= c_high:
                    return False
            else:  # c < x (or <=)
                if low is not None and low >= c_high:
                    return True
                if high is not None and high <= c_low:
                    return False
            return None
        return None

    def sum_rule(self, node: Binary) -> Envelope[Form]:
        left, right = self.envelope(node.left), self.envelope(node.right)
        sign_right = right.sign if node.op == "+" else -right.sign
        if left.upper is None or right.upper is None:
            raise Unsupported("a term of a sum has no bound")
        upper = self.plus(left.upper, right.upper)
        if left.sign and left.sign == sign_right:  # same sign: |f + g| ≥ |f|
            lowers = [e for e in (left.lower, right.lower) if e is not None]
            return Envelope(upper, self.strongest(lowers) if lowers else None, left.sign)
        for big, small, sign in ((left, right, left.sign), (right, left, sign_right)):
            if big.lower is None or not sign or small.upper is None:
                continue
            try:  # |f + g| ≥ |f| − |g| where g is of smaller order
                ratio = self.ratio(small.upper, big.lower)
            except Unsupported:
                continue
            k = self.s.ar.sub(big.lower.k, self.s.ar.mul(small.upper.k, ratio))  # type: ignore[attr-defined]
            if self.s.positive(k):
                return Envelope(upper, replace(big.lower, k=k), sign)  # type: ignore[type-var]
        return Envelope(upper, None, 0)

    def product_rule(self, a: Envelope[Form], b: Envelope[Form]) -> Envelope[Form]:
        if a.upper is None or b.upper is None:
            raise Unsupported("a factor has no bound")
        lower = self.times(a.lower, b.lower) if a.lower is not None and b.lower is not None else None
        return Envelope(self.times(a.upper, b.upper), lower, a.sign * b.sign)

    def quotient_rule(self, a: Envelope[Form], b: Envelope[Form]) -> Envelope[Form]:
        if b.lower is None:
            raise Unsupported("a denominator is not bounded away from zero")
        if a.upper is None:
            raise Unsupported("a numerator has no bound")
        upper = self.times(a.upper, self.raised(b.lower, Fraction(-1), upper=True))
        lower = None
        if a.lower is not None and b.upper is not None:
            lower = self.times(a.lower, self.raised(b.upper, Fraction(-1), upper=False))
        return Envelope(upper, lower, a.sign * b.sign)

    def power_rule(self, node: Binary) -> Envelope[Form]:
        if _has_variable(node.right):  # g^h = exp(h·log g), defined for g > 0 only
            return self.envelope(Call("exp", (Binary("*", node.right, Call("log", (node.left,))),)))
        return self.raise_to(self.envelope(node.left), _rational(node.right, self.values))

    def raise_to(self, base: Envelope[Form], r: Fraction) -> Envelope[Form]:
        if r.denominator != 1 and (base.sign != 1 or (r < 0 and base.lower is None)):
            raise Unsupported("a non-integer power of a base not proved positive")
        if r == 0:
            one = self.constant(self.s.ar.one)
            return Envelope(one, one, 1)
        up, down = (base.upper, base.lower) if r > 0 else (base.lower, base.upper)
        if up is None:
            raise Unsupported("the base of a negative power is not bounded away from zero")
        lower = self.raised(down, r, upper=False) if down is not None else None
        sign = 1 if r.denominator != 1 or r.numerator % 2 == 0 else base.sign
        return Envelope(self.raised(up, r, upper=True), lower, sign)

    def common_call(self, name: str, g: Envelope[Form], argument: Node) -> Envelope[Form] | None:
        """The function rules that read the same for both kinds of piece; None leaves the call to the caller."""
        s, ar = self.s, self.s.ar
        bound = self.small_bound(g.upper)
        if name == "sqrt":
            return self.raise_to(g, Fraction(1, 2))
        if name == "abs":
            return Envelope(g.upper, g.lower, 1)
        if name in ODD_BOUNDED:
            if bound is not None:
                factors = _small_factors(ar, name, bound)
                if factors is not None:
                    low, high = factors
                    lower = self.scaled(g.lower, low) if g.lower is not None and s.positive(low) else None
                    return Envelope(self.scaled(g.upper, high), lower, g.sign)  # type: ignore[arg-type]
            least = None if name == "sin" else self.least(g.lower)
            lower = None
            if least is not None:
                value = ar.function(name, least)
                lower = self.constant(value) if s.positive(value) else None
            return Envelope(self.constant(_cap(ar, name)), lower, 0 if name == "sin" else g.sign)
        if name == "cos":
            if bound is not None:
                least = ar.sub(ar.one, ar.scale(ar.sqr(bound), Fraction(1, 2)))
                if s.positive(least):
                    return Envelope(self.constant(ar.one), self.constant(least), 1)
            return Envelope(self.constant(ar.one), None, 0)
        if name in BOUNDED_BY_ONE:  # |J₀|, |J₁| ≤ 1 on the real line (A&S 9.1.60); sign and step by definition
            return Envelope(self.constant(ar.one), None, 1 if name == "step" else 0)
        if name == "erfc" and g.sign == 1:  # 0 < erfc(y) ≤ e^(−y²) for y ≥ 0 (from A&S 7.1.13)
            return Envelope(self.envelope(_gauss(argument)).upper, None, 1)
        if name in ("sinh", "cosh") and bound is not None:
            grow = ar.function("cosh", bound)
            if name == "cosh":  # cosh y ∈ [1, cosh B]
                return Envelope(self.constant(grow), self.constant(ar.one), 1)
            return Envelope(self.scaled(g.upper, grow), g.lower, g.sign)  # type: ignore[arg-type]  # |y| ≤ |sinh y| ≤ |y|·cosh B
        return None

    def log10_of(self, envelope: Envelope[Form]) -> Envelope[Form]:
        inverse = self.s.ar.div(self.s.ar.one, self.s.log(self.s.num(10)))
        return Envelope(
            self.scaled(envelope.upper, inverse),  # type: ignore[arg-type]
            self.scaled(envelope.lower, inverse) if envelope.lower is not None else None,
            envelope.sign,
        )


def _cap(ar: Arithmetic[Interval], name: str) -> Interval:
    """sup |f| for the bounded functions: π/2 for atan, 1 for the others."""
    return ar.scale(ar.constant("pi"), Fraction(1, 2)) if name == "atan" else ar.one


def _small_factors(ar: Any, name: str, bound: Interval) -> tuple[Interval, Interval] | None:
    """For |y| ≤ B: c_low·|y| ≤ |f(y)| ≤ c_high·|y| (f odd, increasing on [0, B]), or None if no c_low > 0.

    sin y ≥ y − y³/6, tanh y ≥ y − y³/3, atan y ≥ y/(1 + y²), erf y ≥ (2/√π)(y − y³/3) for y ≥ 0.
    """
    square = ar.sqr(bound)
    one = ar.one
    if name == "sin":
        if ar.sign(ar.sub(ar.exact(Fraction(3)), bound)) != 1:
            return None  # past π the sign of sin is no longer that of its argument
        return ar.sub(one, ar.scale(square, Fraction(1, 6))), one
    if name == "tanh":
        return ar.sub(one, ar.scale(square, Fraction(1, 3))), one
    if name == "atan":
        return ar.div(one, ar.add(one, square)), one
    scale = ar.div(ar.exact(Fraction(2)), ar.function("sqrt", ar.constant("pi")))
    return ar.mul(scale, ar.sub(one, ar.scale(square, Fraction(1, 3)))), scale


def _has_variable(node: Node) -> bool:
    if isinstance(node, Variable):
        return True
    if isinstance(node, Negate):
        return _has_variable(node.operand)
    if isinstance(node, Binary):
        return _has_variable(node.left) or _has_variable(node.right)
    if isinstance(node, Call):
        return any(_has_variable(a) for a in node.args)
    return False


def _rational(node: Node, values: Mapping[str, ParameterValue]) -> Fraction:
    """The exact value of a constant exponent (a rational is needed for the power algebra)."""
    try:
        exact: Program[Fraction] = Program(Formula(node, "_", tuple(values)), ExactArithmetic(), values)
        value = exact.value(Fraction(0))
    except (Unsupported, ArithmeticFault, ZeroDivisionError):
        raise Unsupported("an exponent that is not a rational number") from None
    if abs(value.numerator) > 10**6 or value.denominator > 10**6:
        raise Unsupported("an exponent with too many digits")
    return Fraction(value)
