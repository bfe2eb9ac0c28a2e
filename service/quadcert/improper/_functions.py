"""The envelope rules for function calls, next to a point and in a tail (see docs/improper-integrals.md)."""

from __future__ import annotations

from fractions import Fraction
from typing import TYPE_CHECKING

from ..arithmetic import Interval
from ..formula import Call
from ._scalars import Unsupported

if TYPE_CHECKING:
    from ._at_infinity import Growth, InTail, TailEnvelope
    from ._near_point import Envelope, NearPoint, Power

_ODD_BOUNDED = ("sin", "atan", "tanh", "erf")
_CAP = {"sin": 1, "tanh": 1, "erf": 1, "atan": None, "cos": 1}  # None: π/2


def _cap(ar: object, name: str) -> Interval:
    if _CAP[name] is None:
        return ar.scale(ar.constant("pi"), Fraction(1, 2))  # type: ignore[attr-defined]
    return ar.one  # type: ignore[attr-defined]


def _small_factors(ar: object, name: str, bound: Interval) -> tuple[Interval, Interval] | None:
    """For |y| ≤ B: c_low·|y| ≤ |f(y)| ≤ c_high·|y| (f odd, increasing on [0, B]), or None if no c_low > 0.

    sin y ≥ y − y³/6, tanh y ≥ y − y³/3, atan y ≥ y/(1 + y²), erf y ≥ (2/√π)(y − y³/3) for y ≥ 0.
    """
    square = ar.sqr(bound)  # type: ignore[attr-defined]
    one = ar.one  # type: ignore[attr-defined]
    if name == "sin":
        if ar.sign(ar.sub(ar.exact(Fraction(3)), bound)) != 1:  # type: ignore[attr-defined]
            return None  # past π the sign of sin is no longer that of its argument
        return ar.sub(one, ar.scale(square, Fraction(1, 6))), one  # type: ignore[attr-defined]
    if name == "tanh":
        return ar.sub(one, ar.scale(square, Fraction(1, 3))), one  # type: ignore[attr-defined]
    if name == "atan":
        return ar.div(one, ar.add(one, square)), one  # type: ignore[attr-defined]
    scale = ar.div(ar.exact(Fraction(2)), ar.function("sqrt", ar.constant("pi")))  # type: ignore[attr-defined]
    return ar.mul(scale, ar.sub(one, ar.scale(square, Fraction(1, 3)))), scale  # type: ignore[attr-defined]


# -- next to a point -------------------------------------------------------------------------------------
def near_call(near: "NearPoint", node: Call) -> "Envelope":
    from ._near_point import Envelope, Power

    name = node.function
    if name in ("min", "max") or len(node.args) != 1:
        raise Unsupported(f"{name} of a subexpression that is unbounded at the point")
    g = near.envelope(node.args[0])
    s, ar = near.s, near.s.ar
    zero = Fraction(0)

    def constant(k: Interval) -> Power:
        return Power(k, zero, 0)

    bound = None
    if g.upper is not None and (g.upper.p > 0 or (g.upper.p == 0 and g.upper.q <= 0)):
        bound = near.bound(g.upper)
    if name == "sqrt":
        return near.raise_to(g, Fraction(1, 2))
    if name == "abs":
        return Envelope(g.upper, g.lower, 1)
    if name == "exp":
        if bound is not None:
            top = ar.one if g.sign == -1 else s.exp(bound)
            bottom = ar.one if g.sign == 1 else s.exp(ar.neg(bound))
            return Envelope(constant(top), constant(bottom), 1)
        if g.sign == -1 and g.lower is not None:
            low = near.lower_fold(g.lower)
            if low.p < 0:  # g ≤ −c·t^p → −∞: e^g ≤ (m/e)^m·(c·t^p)^(−m), m = 4
                m = Fraction(4)
                factor = s.power(ar.div(s.num(m), ar.constant("e")), m)
                return Envelope(Power(ar.mul(factor, s.power(low.k, -m)), -low.p * m, 0), None, 1)
        raise Unsupported("exp of an argument that grows without bound next to the point")
    if name in ("log", "log10"):
        envelope = _log_near(near, g)
        if name == "log10":
            inverse = ar.div(ar.one, s.log(s.num(10)))
            envelope = Envelope(near.scaled(envelope.upper, inverse),
                                near.scaled(envelope.lower, inverse) if envelope.lower else None, envelope.sign)
        return envelope
    if name in _ODD_BOUNDED:
        if bound is not None:
            factors = _small_factors(ar, name, bound)
            if factors is not None:
                low, high = factors
                upper = near.scaled(g.upper, high)
                lower = near.scaled(g.lower, low) if g.lower is not None and s.positive(low) else None
                return Envelope(upper, lower, g.sign)
        lower = None
        if name != "sin" and g.lower is not None:
            folded = near.lower_fold(g.lower)
            if folded.p <= 0:
                least = ar.function(name, near.infimum(folded))
                lower = constant(least) if s.positive(least) else None
        return Envelope(constant(_cap(ar, name)), lower, 0 if name == "sin" else g.sign)
    if name == "cos":
        if bound is not None:
            least = ar.sub(ar.one, ar.scale(ar.sqr(bound), Fraction(1, 2)))
            if s.positive(least):
                return Envelope(constant(ar.one), constant(least), 1)
        return Envelope(constant(ar.one), None, 0)
    if name in ("sinh", "cosh") and bound is not None:
        grow = ar.function("cosh", bound)
        if name == "cosh":
            return Envelope(constant(grow), constant(ar.one), 1)
        return Envelope(near.scaled(g.upper, grow), g.lower, g.sign)
    raise Unsupported(f"{name} of a subexpression that is unbounded at the point")


def _log_near(near: "NearPoint", g: "Envelope") -> "Envelope":
    """|log g| ≤ A + B·L from g's two envelopes; a lower envelope where g → 0 or g → ∞."""
    from ._near_point import Envelope, Power

    s, ar = near.s, near.s.ar
    if g.sign != 1 or g.upper is None or g.lower is None:
        raise Unsupported("log of a subexpression not proved positive next to the point")
    up, low = g.upper, near.lower_fold(g.lower)
    zero = ar.zero
    log_up, log_low = s.log(up.k), s.log(low.k)
    e = ar.constant("e")
    # log g ≤ log K + max(−p, 0)·L + q·L/e  (log L ≤ L/e);  −log g ≤ −log c + max(p', 0)·L
    a = ar.maximum(ar.maximum(log_up, ar.neg(log_low)), zero)
    b = ar.maximum(ar.add(s.num(max(-up.p, Fraction(0))), ar.div(s.num(up.q), e)), s.num(max(low.p, Fraction(0))))
    if s.high(b) == 0:
        upper = Power(a, Fraction(0), 0)
    else:
        upper = Power(ar.add(ar.div(a, near.log_delta), b), Fraction(0), 1)
    lead = near.log_delta
    ratio = ar.div(s.log(lead), lead)  # log L ≤ L·log(L_δ)/L_δ for L ≥ L_δ ≥ e
    if up.p > 0:  # g → 0: −log g ≥ L·(p − q·log(L_δ)/L_δ − max(log K, 0)/L_δ)
        c = ar.sub(ar.sub(s.num(up.p), ar.mul(s.num(up.q), ratio)), ar.div(ar.maximum(log_up, zero), lead))
        if s.positive(c):
            return Envelope(upper, Power(c, Fraction(0), 1), -1)
    if low.p < 0:  # g → ∞: log g ≥ L·(−p' − max(−log c, 0)/L_δ)
        c = ar.sub(s.num(-low.p), ar.div(ar.maximum(ar.neg(log_low), zero), lead))
        if s.positive(c):
            return Envelope(upper, Power(c, Fraction(0), 1), 1)
    if up.p == 0 and up.q == 0 and low.p == 0:  # g within [c, K]: log g within [log c, log K]
        if s.positive(log_low):
            return Envelope(upper, Power(log_low, Fraction(0), 0), 1)
        if s.positive(ar.neg(log_up)):
            return Envelope(upper, Power(ar.neg(log_up), Fraction(0), 0), -1)
    return Envelope(upper, None, 0)
