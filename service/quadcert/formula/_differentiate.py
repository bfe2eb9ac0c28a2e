"""The partial derivative of a formula with respect to one of its parameters, as a formula.

The integral's sensitivity ∂I/∂p is the integral of ∂f/∂p (plus the limits' terms), and the engine certifies
that integral like any other. The derivative is built by the usual rules on the tree, with zero and one
folded away so that its text stays readable. Where the rules would be wrong it refuses instead:

* a jump whose place moves with p (sign, step, atan2, or a condition of a piecewise definition that
  mentions p): the integral's derivative then has a term the integrand's derivative does not;
* gamma and lgamma of an argument that moves with p: their derivatives need the digamma function, which the
  language does not have.

>>> from quadcert.formula import parse
>>> def d(text): return canonical_text(derivative(parse(text, parameters=("k",)).root, "k"))
>>> d("exp(-k*x)"), d("sin(k*x)^2"), d("x^k")
('exp(-k*x)*-x', '2*sin(k*x)*(cos(k*x)*x)', 'x^k*log(x)')
>>> d("{k*x if x < 1; x otherwise}")
'{x if x < 1; 0 otherwise}'
"""

from __future__ import annotations

from collections.abc import Callable
from fractions import Fraction

from ._nodes import Binary, Call, Constant, Negate, Node, Number, Parameter, Variable, canonical_text, parameters_used

ZERO, ONE, TWO = Number(Fraction(0)), Number(Fraction(1)), Number(Fraction(2))


class NotDifferentiable(Exception):
    """The formula's derivative in the parameter cannot be written (the message says why)."""


def derivative(node: Node, name: str) -> Node:
    """∂node/∂name as a tree (``0`` when the node does not mention the parameter)."""
    result = _d(node, name)
    return ZERO if result is None else result


# None stands for an exact zero throughout, so that products and sums with it vanish
def _d(node: Node, name: str) -> Node | None:
    if isinstance(node, Parameter):
        return ONE if node.name == name else None
    if isinstance(node, (Number, Constant, Variable)) or name not in parameters_used(node):
        return None
    if isinstance(node, Negate):
        return _neg(_d(node.operand, name))
    if isinstance(node, Binary):
        return _binary(node, name)
    assert isinstance(node, Call)
    return _call(node, name)


def _binary(node: Binary, name: str) -> Node | None:
    u, v = node.left, node.right
    du, dv = _d(u, name), _d(v, name)
    if node.op == "+":
        return _add(du, dv)
    if node.op == "-":
        return _add(du, _neg(dv))
    if node.op == "*":
        return _add(_mul(du, v), _mul(u, dv))
    if node.op == "/":  # (du·v − u·dv)/v², written as du/v − u·dv/v² to keep v's powers low
        return _add(_div(du, v), _neg(_div(_mul(u, dv), Binary("^", v, TWO))))
    assert node.op == "^"
    if dv is None:  # u^c: c·u^(c−1)·du
        lowered = Number(v.value - 1) if isinstance(v, Number) else Binary("-", v, ONE)
        power = u if lowered == ONE else Binary("^", u, lowered)
        return _mul(_mul(v, power), du)
    log_u = Call("log", (u,))
    if du is None:  # c^v: c^v·log(c)·dv
        return _mul(_mul(node, log_u), dv)
    return _mul(node, _add(_mul(dv, log_u), _div(_mul(v, du), u)))


def _call(node: Call, name: str) -> Node | None:
    f, args = node.function, node.args
    if f in ("sign", "step", "atan2"):
        raise NotDifferentiable(f"{f} of an argument that depends on {name} jumps at a place that moves with it")
    if f in ("gamma", "lgamma"):
        raise NotDifferentiable(f"the derivative of {f} needs the digamma function, which the language lacks")
    if f == "cases":
        return _cases(node, name)
    if f in ("min", "max"):
        return _extremum(node, name)
    if f == "hypot":
        a, b = args
        return _div(_add(_mul(a, _d(a, name)), _mul(b, _d(b, name))), node)
    (u,) = args
    du = _d(u, name)
    outer = _OUTER[f](u, node)
    return _mul(outer, du)


def _cases(node: Call, name: str) -> Node | None:
    args = node.args
    conditions = [args[i + 1] for i in range(0, len(args) - 1, 2)]
    if any(name in parameters_used(c) for c in conditions):
        raise NotDifferentiable(f"a condition of the piecewise definition depends on {name}, so a jump moves with it")
    branches = [_d(args[i], name) for i in range(0, len(args), 2)]
    if all(b is None for b in branches):
        return None
    rebuilt: list[Node] = []
    for i, branch in enumerate(branches):
        rebuilt.append(ZERO if branch is None else branch)
        if 2 * i + 1 < len(args):
            rebuilt.append(args[2 * i + 1])
    return Call("cases", tuple(rebuilt))


def _extremum(node: Call, name: str) -> Node | None:
    """min and max are continuous: the derivative of the argument that is the extreme one (any, at a tie)."""
    args = tuple(dict.fromkeys(node.args))
    if len(args) == 1:
        return _d(args[0], name)
    first, rest = args[0], args[1:]
    other = Call(node.function, rest) if len(rest) > 1 else rest[0]
    chosen = Call("<=", (first, other)) if node.function == "min" else Call("<=", (other, first))
    d_first, d_other = _d(first, name), _d(other, name)
    if d_first is None and d_other is None:
        return None
    return Call("cases", (d_first or ZERO, chosen, d_other or ZERO))


def _sqrt(u: Node) -> Node:
    return Call("sqrt", (u,))


def _square(u: Node) -> Node:
    return Binary("^", u, TWO)


# f'(u) for f(u) = node, in terms of u (and of node itself where that is shorter)
_OUTER: dict[str, Callable[[Node, Node], Node]] = {
    "sqrt": lambda u, n: Binary("/", ONE, Binary("*", TWO, n)),
    "cbrt": lambda u, n: Binary("/", ONE, Binary("*", Number(Fraction(3)), _square(n))),
    "exp": lambda u, n: n,
    "log": lambda u, n: Binary("/", ONE, u),
    "log10": lambda u, n: Binary("/", ONE, Binary("*", u, Call("log", (Number(Fraction(10)),)))),
    "log2": lambda u, n: Binary("/", ONE, Binary("*", u, Call("log", (TWO,)))),
    "sin": lambda u, n: Call("cos", (u,)),
    "cos": lambda u, n: Negate(Call("sin", (u,))),
    "tan": lambda u, n: Binary("+", ONE, _square(n)),
    "sec": lambda u, n: Binary("*", n, Call("tan", (u,))),
    "csc": lambda u, n: Negate(Binary("*", n, Call("cot", (u,)))),
    "cot": lambda u, n: Negate(Binary("+", ONE, _square(n))),
    "asin": lambda u, n: Binary("/", ONE, _sqrt(Binary("-", ONE, _square(u)))),
    "acos": lambda u, n: Negate(Binary("/", ONE, _sqrt(Binary("-", ONE, _square(u))))),
    "atan": lambda u, n: Binary("/", ONE, Binary("+", ONE, _square(u))),
    "sinh": lambda u, n: Call("cosh", (u,)),
    "cosh": lambda u, n: Call("sinh", (u,)),
    "tanh": lambda u, n: Binary("-", ONE, _square(n)),
    "asinh": lambda u, n: Binary("/", ONE, _sqrt(Binary("+", _square(u), ONE))),
    "acosh": lambda u, n: Binary("/", ONE, _sqrt(Binary("-", _square(u), ONE))),
    "atanh": lambda u, n: Binary("/", ONE, Binary("-", ONE, _square(u))),
    "erf": lambda u, n: Binary("*", Binary("/", TWO, _sqrt(Constant("pi"))), Call("exp", (Negate(_square(u)),))),
    "erfc": lambda u, n: Negate(
        Binary("*", Binary("/", TWO, _sqrt(Constant("pi"))), Call("exp", (Negate(_square(u)),)))
    ),
    "abs": lambda u, n: Call("sign", (u,)),  # |u| is continuous: its kink moving with p adds nothing
    "j0": lambda u, n: Negate(Call("j1", (u,))),
    "j1": lambda u, n: Binary("-", Call("j0", (u,)), Binary("/", Call("j1", (u,)), u)),
}


def _neg(a: Node | None) -> Node | None:
    if a is None:
        return None
    if isinstance(a, Negate):
        return a.operand
    return Negate(a)


def _add(a: Node | None, b: Node | None) -> Node | None:
    if a is None:
        return b
    if b is None:
        return a
    if isinstance(b, Negate):
        return Binary("-", a, b.operand)
    return Binary("+", a, b)


def _mul(a: Node | None, b: Node | None) -> Node | None:
    if a is None or b is None:
        return None
    if a == ONE:
        return b
    if b == ONE:
        return a
    if a == Negate(ONE):
        return _neg(b)
    if b == Negate(ONE):
        return _neg(a)
    return Binary("*", a, b)


def _div(a: Node | None, b: Node) -> Node | None:
    if a is None:
        return None
    return Binary("/", a, b)


__all__ = ["NotDifferentiable", "canonical_text", "derivative"]
