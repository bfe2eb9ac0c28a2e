"""The envelope rules for function calls in a tail that are its own: exp, log, and cosh/sinh of a growing
argument (see docs/improper-integrals.md, section 4; the rules shared with points are in ``_algebra``)."""

from __future__ import annotations

from fractions import Fraction
from math import ceil
from typing import TYPE_CHECKING

from ..arithmetic import Interval
from ..formula import Call
from ._scalars import EPSILON, Unsupported

if TYPE_CHECKING:
    from ._at_infinity import Growth, InTail, TailEnvelope


def tail_call(tail: InTail, node: Call) -> TailEnvelope[Growth]:

    name = node.function
    if name in ("min", "max") or len(node.args) != 1:
        raise Unsupported(f"{name} in a tail")
    g = tail.envelope(node.args[0])
    common = tail.common_call(name, g, node.args[0])
    if common is not None:
        return common
    bound = tail.small_bound(g.upper)
    if name == "exp":
        return _exp(tail, g, bound)
    if name == "log":
        return _log(tail, g)
    if name == "log10":
        return tail.log10_of(_log(tail, g))
    if name in ("sinh", "cosh"):
        return _hyperbolic(tail, g, name)
    raise Unsupported(f"{name} in a tail")


def _exp(tail: InTail, g: TailEnvelope[Growth], bound: Interval | None) -> TailEnvelope[Growth]:
    from ._at_infinity import Growth, TailEnvelope

    s, ar = tail.s, tail.s.ar
    zero = Fraction(0)
    if bound is not None:
        top = ar.one if g.sign == -1 else s.exp(bound)
        bottom = ar.one if g.sign == 1 else s.exp(ar.neg(bound))
        return TailEnvelope(Growth(top, zero, zero), Growth(bottom, zero, zero), 1)
    upper = lower = None
    if g.sign == -1 and g.lower is not None and g.lower.r == 0 and g.lower.p > 0:
        c, k = g.lower.k, g.lower.p
        if k >= 1:  # g ≤ −c·y^k ≤ −c·T^(k−1)·y
            rate = s.floor_fraction(ar.mul(c, s.power(tail.start_iv, k - 1)))
            if rate > 0:
                upper = Growth(ar.one, zero, rate)
        else:  # e^(−u) ≤ (m/e)^m·u^(−m) with u = c·y^k and m·k ≥ 2
            m = Fraction(ceil(2 / k))
            factor = s.power(ar.div(s.num(m), ar.constant("e")), m)
            upper = Growth(ar.mul(factor, s.power(c, -m)), -k * m, zero)
    rate_up = tail.linear_rate(g.upper) if g.upper is not None else None
    if upper is None and g.sign == 1 and rate_up is not None:  # e^g ≤ e^(C·y): growth
        upper = Growth(ar.one, zero, -rate_up)
    if g.sign == 1 and g.lower is not None and g.lower.r == 0 and g.lower.p >= 1:
        rate = s.floor_fraction(ar.mul(g.lower.k, s.power(tail.start_iv, g.lower.p - 1)))
        lower = Growth(ar.one, zero, -rate)
    elif rate_up is not None:  # e^g ≥ e^(−|g|) ≥ e^(−C·y)
        lower = Growth(ar.one, zero, rate_up)
    if upper is None:
        raise Unsupported("exp of an argument that is not bounded above by a rule in the tail")
    return TailEnvelope(upper, lower, 1)


def _log(tail: InTail, g: TailEnvelope[Growth]) -> TailEnvelope[Growth]:
    """|log g| ≤ A + B·log y ≤ (A·T^(−ε) + B/(e·ε))·y^ε, from g's two power envelopes."""
    from ._at_infinity import Growth, TailEnvelope

    s, ar = tail.s, tail.s.ar
    zero = Fraction(0)
    if g.sign != 1 or g.upper is None or g.lower is None or g.upper.r != 0 or g.lower.r != 0:
        raise Unsupported("log of a subexpression not proved positive and of power size in the tail")
    log_up, log_low = s.log(g.upper.k), s.log(g.lower.k)
    a = ar.maximum(ar.maximum(ar.function("abs", log_up), ar.function("abs", log_low)), ar.zero)
    b = max(abs(g.upper.p), abs(g.lower.p))
    if b == 0:
        upper = Growth(a, zero, zero)
    else:
        e_eps = ar.mul(ar.constant("e"), s.num(EPSILON))
        k = ar.add(ar.div(a, s.power(tail.start_iv, EPSILON)), ar.div(s.num(b), e_eps))
        upper = Growth(k, EPSILON, zero)
    log_start = s.log(tail.start_iv)
    least = ar.add(log_low, ar.mul(s.num(g.lower.p), log_start))  # log g ≥ log c + p'·log y ≥ this (p' ≥ 0)
    if g.lower.p >= 0 and s.positive(least):
        return TailEnvelope(upper, Growth(least, zero, zero), 1)
    most = ar.add(log_up, ar.mul(s.num(g.upper.p), log_start))  # log g ≤ log K + p·log y ≤ this (p ≤ 0)
    if g.upper.p <= 0 and s.positive(ar.neg(most)):
        return TailEnvelope(upper, Growth(ar.neg(most), zero, zero), -1)
    return TailEnvelope(upper, None, 0)


def _hyperbolic(tail: InTail, g: TailEnvelope[Growth], name: str) -> TailEnvelope[Growth]:
    """cosh and sinh of an unbounded argument (the bounded one is a shared rule)."""
    from ._at_infinity import Growth, TailEnvelope

    s, ar = tail.s, tail.s.ar
    zero = Fraction(0)
    rate_up = tail.linear_rate(g.upper) if g.upper is not None else None
    if rate_up is None:
        raise Unsupported(f"{name} of an argument growing faster than linearly in the tail")
    upper = Growth(ar.one, zero, -rate_up)  # cosh u, |sinh u| ≤ e^|u| ≤ e^(C·y)
    lower = None
    if g.lower is not None and g.lower.r == 0 and g.lower.p >= 1:
        rate = s.floor_fraction(ar.mul(g.lower.k, s.power(tail.start_iv, g.lower.p - 1)))
        if name == "cosh":  # cosh u ≥ e^|u|/2
            lower = Growth(s.num(Fraction(1, 2)), zero, -rate)
        else:  # |sinh u| ≥ e^|u|·(1 − e^(−2·|u|))/2 ≥ e^(c·y)·(1 − e^(−2·c·T))/2
            least = ar.scale(ar.sub(ar.one, s.exp(s.num(-2 * rate * tail.start))), Fraction(1, 2))
            lower = Growth(least, zero, -rate) if s.positive(least) and rate > 0 else None
    sign = 1 if name == "cosh" else g.sign
    return TailEnvelope(upper, lower, sign)
