"""A formula compiled for one arithmetic: enclosures of values and Taylor coefficients.

Constant subtrees (numbers, pi, parameters and anything built only from
them) are enclosed once at compile time, so a panel evaluation only does
the work that depends on the variable.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from fractions import Fraction
from typing import Any, Generic

from ..arithmetic import Arithmetic, ParameterValue, Within
from ..errors import InvalidInput
from ..formula import Binary, Call, Constant, Formula, Negate, Node, Number, Parameter, Variable
from ..formula._catalogue import spelled_out
from ..formula._nodes import distinct_arguments, parameters_used
from . import _series as series
from . import _special_series as special
from ._piecewise import compile_cases
from ._series import E, Series

_UNARY: dict[str, Callable[[Arithmetic[Any], Series[Any]], Series[Any]]] = {
    "sqrt": series.sqrt,
    "exp": series.exp,
    "log": series.log,
    "log10": series.log10,
    "sin": series.sin,
    "cos": series.cos,
    "tan": series.tan,
    "asin": series.asin,
    "acos": series.acos,
    "atan": series.atan,
    "sinh": series.sinh,
    "cosh": series.cosh,
    "tanh": series.tanh,
    "erf": series.erf,
    "abs": series.abs_,
    "asinh": special.asinh,
    "acosh": special.acosh,
    "atanh": special.atanh,
    "cbrt": special.cbrt,
    "erfc": special.erfc,
    "sign": lambda ar, u: special.piecewise_constant("sign", ar, u),
    "step": lambda ar, u: special.piecewise_constant("step", ar, u),
    "gamma": special.gamma,
    "lgamma": special.lgamma,
    "j0": lambda ar, u: special.bessel(0, ar, u),
    "j1": lambda ar, u: special.bessel(1, ar, u),
}

# A compiled node is either ("const", enclosure) or ("series", function of (x series) -> series).
Compiled = tuple[str, Any]


class Program(Generic[E]):
    """Evaluates one formula over intervals, for values (order 0) or Taylor coefficients.

    >>> from quadcert.formula import parse
    >>> from quadcert.arithmetic import MpmathArithmetic
    >>> ar = MpmathArithmetic(64)
    >>> program = Program(parse("x^3"), ar)
    >>> [ar.bounds(c) for c in program.taylor(ar.exact(Fraction(2)), 3)]
    [(8.0, 8.0), (12.0, 12.0), (6.0, 6.0), (1.0, 1.0)]
    """

    def __init__(
        self, formula: Formula, ar: Arithmetic[E], parameters: Mapping[str, ParameterValue] | None = None
    ) -> None:
        self.formula = formula
        self.ar = ar
        values = dict(parameters or {})
        missing = [name for name in formula.parameters if name not in values]
        if missing:
            raise InvalidInput(
                f"no value given for parameter {missing[0]!r}", code="missing_parameter", field="parameters"
            )
        # a parameter known within bounds is the interval of all its values: every enclosure then holds for
        # the whole box at once
        used = parameters_used(formula.root)  # only these are enclosed: an exact-only backend takes no bounds
        self._parameters = {
            name: ar.hull(ar.exact(v.low), ar.exact(v.high)) if isinstance(v, Within) else ar.exact(Fraction(v))
            for name, v in values.items()
            if name in used
        }
        self._root = self._compile(formula.root)
        #: whether the formula uses a parameter known only within bounds (its enclosures then carry that spread)
        self.spread = any(isinstance(values.get(name), Within) for name in used)

    @property
    def is_constant(self) -> bool:
        return self._root[0] == "const"

    def value(self, x: E) -> E:
        """Enclosure of f over the interval x."""
        return self.taylor(x, 0)[0]

    def taylor(self, x: E, order: int) -> Series[E]:
        """Enclosures of f⁽ᵏ⁾(X)/k! for k = 0..order, cut short where f is not that smooth."""
        kind, payload = self._root
        if kind == "const":
            return [payload, *([self.ar.zero] * order)]
        grow: Callable[[Series[E]], Series[E]] = payload
        return grow(series.variable(self.ar, x, order))

    # -- compilation -------------------------------------------------------------------------
    def _compile(self, node: Node) -> Compiled:
        ar = self.ar
        if isinstance(node, Number):
            return ("const", ar.exact(node.value))
        if isinstance(node, Constant):
            return ("const", ar.constant(node.name))
        if isinstance(node, Parameter):
            return ("const", self._parameters[node.name])
        if isinstance(node, Variable):
            return ("series", lambda xs: xs)
        if isinstance(node, Negate):
            kind, inner = self._compile(node.operand)
            if kind == "const":
                return ("const", ar.neg(inner))
            return ("series", lambda xs: series.neg(ar, inner(xs)))
        if isinstance(node, Call):
            return self._call(node)
        assert isinstance(node, Binary)
        return self._binary(node)

    def _call(self, node: Call) -> Compiled:
        if node.function == "cases":
            return compile_cases(self, node)
        written_out = spelled_out(node.function, node.args)
        if written_out is not None:
            return self._compile(written_out)
        args = [self._compile(a) for a in (distinct_arguments(node) if node.function in ("min", "max") else node.args)]
        if all(kind == "const" for kind, _ in args):
            values = [[payload] for _, payload in args]
            return ("const", self._apply(node.function, values)[0])
        lifted = [self._lift(a) for a in args]
        function = node.function
        return ("series", lambda xs: self._apply(function, [f(xs) for f in lifted]))

    def _apply(self, function: str, values: list[Series[E]]) -> Series[E]:
        if function in ("min", "max"):
            return series.extremum(self.ar, values, largest=function == "max")
        if function == "atan2":
            return special.atan2(self.ar, values[0], values[1])
        return _UNARY[function](self.ar, values[0])

    def _lift(self, compiled: Compiled) -> Callable[[Series[E]], Series[E]]:
        kind, payload = compiled
        if kind == "series":
            grow: Callable[[Series[E]], Series[E]] = payload
            return grow
        ar = self.ar
        return lambda xs: [payload, *([ar.zero] * (len(xs) - 1))]

    def _binary(self, node: Binary) -> Compiled:
        ar = self.ar
        (lk, left), (rk, right) = self._compile(node.left), self._compile(node.right)
        op = node.op
        if op == "^":
            return self._power(node, (lk, left), (rk, right))
        if lk == "const" and rk == "const":
            scalar = {"+": ar.add, "-": ar.sub, "*": ar.mul, "/": ar.div}[op]
            return ("const", scalar(left, right))
        if op == "+":
            if lk == "const":
                return ("series", lambda xs: series.add_constant(ar, right(xs), left))
            if rk == "const":
                return ("series", lambda xs: series.add_constant(ar, left(xs), right))
            return ("series", lambda xs: series.add(ar, left(xs), right(xs)))
        if op == "-":
            if rk == "const":
                negated = ar.neg(right)
                return ("series", lambda xs: series.add_constant(ar, left(xs), negated))
            if lk == "const":
                return ("series", lambda xs: series.add_constant(ar, series.neg(ar, right(xs)), left))
            return ("series", lambda xs: series.sub(ar, left(xs), right(xs)))
        if op == "*":
            if lk == "const":
                return ("series", lambda xs: series.mul_constant(ar, right(xs), left))
            if rk == "const":
                return ("series", lambda xs: series.mul_constant(ar, left(xs), right))
            if node.left == node.right:
                return ("series", lambda xs: series.square(ar, left(xs)))
            return ("series", lambda xs: series.mul(ar, left(xs), right(xs)))
        # division
        if rk == "const":
            inverse = ar.div(ar.one, right)
            return ("series", lambda xs: series.mul_constant(ar, left(xs), inverse))
        if lk == "const":
            return ("series", lambda xs: series.reciprocal_constant(ar, left, right(xs)))
        return ("series", lambda xs: series.div(ar, left(xs), right(xs)))

    def _power(self, node: Binary, base: Compiled, exponent: Compiled) -> Compiled:
        ar = self.ar
        (bk, b), (ek, e) = base, exponent
        integer = ar.is_exact_integer(e) if ek == "const" else None
        if bk == "const" and ek == "const":
            if integer is not None and abs(integer) <= 1024:
                return ("const", ar.pow_int(b, integer))
            return ("const", ar.pow_real(b, e))
        if integer is not None and abs(integer) <= 1024:
            n = integer
            return ("series", lambda xs: series.pow_int(ar, b(xs), n))
        lifted_base, lifted_exponent = self._lift(base), self._lift(exponent)
        return ("series", lambda xs: series.pow_real(ar, lifted_base(xs), lifted_exponent(xs)))
