"""The envelope rules for function calls next to a point that are its own: exp and log (see
docs/improper-integrals.md, section 3; the rules shared with tails are in ``_algebra``)."""

from __future__ import annotations

from fractions import Fraction
from typing import TYPE_CHECKING

from ..formula import Call
from ._algebra import Envelope
from ._near_point import Power
from ._scalars import Unsupported

if TYPE_CHECKING:
    from ._near_point import NearPoint


# -- next to a point -------------------------------------------------------------------------------------
def near_call(near: NearPoint, node: Call) -> Envelope[Power]:

    name = node.function
    if name in ("min", "max") or len(node.args) != 1:
        raise Unsupported(f"{name} of a subexpression that is unbounded at the point")
    g = near.envelope(node.args[0])
    common = near.common_call(name, g, node.args[0])
    if common is not None:
        return common
    s, ar = near.s, near.s.ar
    bound = near.small_bound(g.upper)
    if name == "exp":
        if bound is not None:
            top = ar.one if g.sign == -1 else s.exp(bound)
            bottom = ar.one if g.sign == 1 else s.exp(ar.neg(bound))
            return Envelope(near.constant(top), near.constant(bottom), 1)
        if g.sign == -1 and g.lower is not None:
            low = near.lower_fold(g.lower)
            if low.p < 0:  # g ≤ −c·t^p → −∞: e^g ≤ (m/e)^m·(c·t^p)^(−m), m = 4
                m = Fraction(4)
                factor = s.power(ar.div(s.num(m), ar.constant("e")), m)
                return Envelope(Power(ar.mul(factor, s.power(low.k, -m)), -low.p * m, 0), None, 1)
        raise Unsupported("exp of an argument that grows without bound next to the point")
    if name == "log":
        return _log_near(near, g)
    if name == "log10":
        return near.log10_of(_log_near(near, g))
    raise Unsupported(f"{name} of a subexpression that is unbounded at the point")


def _log_near(near: NearPoint, g: Envelope[Power]) -> Envelope[Power]:
    """|log g| ≤ A + B·L from g's two envelopes; a lower envelope where g → 0 or g → ∞."""

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
