"""Reference evaluation of a formula tree in mpmath and in python-flint, at a precision the caller gives.

Independent of the engine's arithmetic: it walks the parsed tree and calls the libraries' own functions.
The precision is set per call (mpmath's private context, flint's ``workprec``), never changed for good.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any

import flint
import mpmath

from quadcert.formula import Binary, Call, Constant, Negate, Number, Variable

MP = mpmath.MPContext()


def mp_value(node: Any, x: Any, ctx: Any = MP) -> Any:
    """f(x) in the mpmath context ctx (its precision as set by the caller)."""
    if isinstance(node, Number):
        return ctx.mpf(node.value.numerator) / node.value.denominator
    if isinstance(node, Variable):
        return x
    if isinstance(node, Constant):
        return ctx.pi if node.name == "pi" else ctx.e
    if isinstance(node, Negate):
        return -mp_value(node.operand, x, ctx)
    if isinstance(node, Binary):
        left, right = mp_value(node.left, x, ctx), mp_value(node.right, x, ctx)
        if node.op == "+":
            return left + right
        if node.op == "-":
            return left - right
        if node.op == "*":
            return left * right
        if node.op == "/":
            return left / right
        if right == int(right):
            return left ** int(right)
        if left <= 0:
            raise ValueError("non-integer power of a non-positive base")
        return ctx.exp(right * ctx.log(left))
    assert isinstance(node, Call)
    args = [mp_value(a, x, ctx) for a in node.args]
    name = node.function
    if name == "abs":
        return abs(args[0])
    if name in ("min", "max"):
        return min(args) if name == "min" else max(args)
    if name in ("log", "log10", "sqrt") and args[0] <= 0 and not (name == "sqrt" and args[0] == 0):
        raise ValueError(f"{name} outside its domain")
    function = {"log10": lambda v: ctx.log(v, 10)}.get(name) or getattr(ctx, name)
    return function(args[0])


def arb_value(node: Any, x: Any) -> Any:
    """f(x) as a python-flint arb ball (precision from the caller's ``flint.ctx.workprec``)."""
    if isinstance(node, Number):
        return flint.arb(node.value.numerator) / node.value.denominator
    if isinstance(node, Variable):
        return x
    if isinstance(node, Constant):
        return flint.arb.pi() if node.name == "pi" else flint.arb(1).exp()
    if isinstance(node, Negate):
        return -arb_value(node.operand, x)
    if isinstance(node, Binary):
        left, right = arb_value(node.left, x), arb_value(node.right, x)
        if node.op == "+":
            return left + right
        if node.op == "-":
            return left - right
        if node.op == "*":
            return left * right
        if node.op == "/":
            return left / right
        exponent = _exact(node.right)
        if exponent is not None and exponent.denominator == 1:
            return left ** int(exponent)
        return (right * left.log()).exp()
    assert isinstance(node, Call)
    arg = arb_value(node.args[0], x)
    name = node.function
    if name == "abs":
        return abs(arg)
    if name == "log10":
        return arg.log() / flint.arb(10).log()
    return getattr(arg, name)()


def _exact(node: Any) -> Fraction | None:
    if isinstance(node, Number):
        return node.value
    if isinstance(node, Negate) and isinstance(node.operand, Number):
        return -node.operand.value
    return None
