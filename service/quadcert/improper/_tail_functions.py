"""The envelope rules for function calls in a tail (see docs/improper-integrals.md)."""

from __future__ import annotations

from fractions import Fraction
from math import ceil
from typing import TYPE_CHECKING

from ..arithmetic import Interval
from ..formula import Call
from ._functions import _ODD_BOUNDED, _cap, _small_factors
from ._scalars import EPSILON, Unsupported

if TYPE_CHECKING:
    from ._at_infinity import InTail, TailEnvelope


def tail_call(tail: "InTail", node: Call) -> "TailEnvelope":
    from ._at_infinity import Growth, TailEnvelope

    name = node.function
    if name in ("min", "max") or len(node.args) != 1:
        raise Unsupported(f"{name} in a tail")
    g = tail.envelope(node.args[0])
    s, ar = tail.s, tail.s.ar
    zero = Fraction(0)

    def constant(k: Interval) -> Growth:
        return Growth(k, zero, zero)

    bound = None
    if g.upper is not None and (g.upper.r > 0 or (g.upper.r == 0 and g.upper.p <= 0)):
        bound = tail.bound(g.upper)
    if name == "sqrt":
        return tail.raise_to(g, Fraction(1, 2))
    if name == "abs":
        return TailEnvelope(g.upper, g.lower, 1)
    if name == "exp":
        return _exp(tail, g, bound)
    if name in ("log", "log10"):
        envelope = _log(tail, g)
        if name == "log10":
            inverse = ar.div(ar.one, s.log(s.num(10)))
            envelope = TailEnvelope(tail.scaled(envelope.upper, inverse),
                                    tail.scaled(envelope.lower, inverse) if envelope.lower else None, envelope.sign)
        return envelope
    if name in _ODD_BOUNDED:
        if bound is not None:
            factors = _small_factors(ar, name, bound)
            if factors is not None:
                low, high = factors
                lower = tail.scaled(g.lower, low) if g.lower is not None and s.positive(low) else None
                return TailEnvelope(tail.scaled(g.upper, high), lower, g.sign)
        lower = None
        if name != "sin" and g.lower is not None and g.lower.p >= 0 and g.lower.r <= 0:
            least = ar.function(name, tail.infimum(g.lower))
            lower = constant(least) if s.positive(least) else None
        return TailEnvelope(constant(_cap(ar, name)), lower, 0 if name == "sin" else g.sign)
    if name == "cos":
        if bound is not None:
            least = ar.sub(ar.one, ar.scale(ar.sqr(bound), Fraction(1, 2)))
            if s.positive(least):
                return TailEnvelope(constant(ar.one), constant(least), 1)
        return TailEnvelope(constant(ar.one), None, 0)
    if name in ("sinh", "cosh"):
        return _hyperbolic(tail, g, bound, name)
    raise Unsupported(f"{name} in a tail")


def _exp(tail: "InTail", g: "TailEnvelope", bound: Interval | None) -> "TailEnvelope":
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


def _log(tail: "InTail", g: "TailEnvelope") -> "TailEnvelope":
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


def _hyperbolic(tail: "InTail", g: "TailEnvelope", bound: Interval | None, name: str) -> "TailEnvelope":
    from ._at_infinity import Growth, TailEnvelope

    s, ar = tail.s, tail.s.ar
    zero = Fraction(0)
    if bound is not None:
        grow = ar.function("cosh", bound)
        if name == "cosh":
            return TailEnvelope(Growth(grow, zero, zero), Growth(ar.one, zero, zero), 1)
        return TailEnvelope(tail.scaled(g.upper, grow), g.lower, g.sign)
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
