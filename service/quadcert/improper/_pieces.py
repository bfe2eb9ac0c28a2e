"""Certified enclosures of the singular pieces and tails, sized to a share of the tolerance.

A piece's enclosure comes from integrating its upper envelope in closed form, with outward rounding:

- next to a point: ∫₀^δ k·t^p·L^q dt = k·δ^(p+1)·Σ_{j=0..q} q!/j!·L_δ^j/(p+1)^(q+1−j)   (p > −1);
- in a tail:       ∫_T^∞ k·y^p·e^(−r·y) dy ≤ k·T^p·e^(−r·T)/(r − max(p, 0)/T)          (r > max(p, 0)/T),
                   ∫_T^∞ k·y^p dy = k·T^(p+1)/(−p−1)                                       (r = 0, p < −1).

A proved sign halves the enclosure ([0, I] or [−I, 0]). A proved minorant of fixed sign that is not
integrable (t^p with p ≤ −1 next to a point; y^p·e^(−r·y) with r < 0, or r = 0 and p ≥ −1, in a tail)
proves divergence instead.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from fractions import Fraction
from math import factorial

from ..arithmetic import Interval, ParameterValue
from ..arithmetic._interval import raw_down, raw_up
from ..errors import ArithmeticFault, NotCertifiable
from ..formula import Formula
from ..formula._nodes import decimal_text
from ._algebra import Envelope
from ._at_infinity import Growth, InTail, TailEnvelope
from ._near_point import NearPoint, Power
from ._scalars import Unsupported

_MAX_ROUNDS = 12
_SMALLEST_PIECE = Fraction(1, 2**3000)
_FARTHEST_TAIL = Fraction(2**3000)
_RETRY_TAIL_UNTIL = 2**24
_MOVES_PER_ENVELOPE = 4


@dataclass(frozen=True)
class Piece:
    """One piece of the integral enclosed by an envelope rather than by panels."""

    kind: str  # "singular-envelope" or "tail-envelope"
    near: Fraction | None  # the end the piece touches (None: infinity)
    cut: Fraction  # where the panels take over
    enclosure: tuple[Fraction, Fraction]
    envelope: str  # the bound used, for people


def _distance(variable: str, point: Fraction) -> str:
    return f"|{variable} − {_point_text(point)}|" if point else f"|{variable}|"


def _point_text(point: Fraction) -> str:
    """The point exactly: 0.3, 1/3, 1e-40."""
    return decimal_text(point)


def _power_text(power: Power, variable: str, point: Fraction, relation: str = "≤") -> str:
    t = _distance(variable, point)
    logs = f"·log(1/{t})^{power.q}" if power.q else ""
    constant = _high_text(power.k) if relation == "≤" else _low_text(power.k)
    return f"|f| {relation} {constant}·{t}^({power.p}){logs}"


def _growth_text(growth: Growth, variable: str, relation: str = "≤") -> str:
    rate = f"·exp(−{growth.r}·|{variable}|)" if growth.r else ""
    constant = _high_text(growth.k) if relation == "≤" else _low_text(growth.k)
    return f"|f| {relation} {constant}·|{variable}|^({growth.p}){rate}"


def _high_text(k: Interval) -> str:
    return f"{raw_up(k.hi):.6g}"


def _low_text(k: Interval) -> str:
    return f"{raw_down(k.lo):.6g}"


def _signed(size: Fraction, sign: int) -> tuple[Fraction, Fraction]:
    if sign > 0:
        return Fraction(0), size
    if sign < 0:
        return -size, Fraction(0)
    return -size, size


def _near_integral(near: NearPoint, power: Power, delta: Fraction) -> Interval:
    """∫₀^δ k·t^p·L^q dt for δ ≤ the δ the envelope was derived on (it holds pointwise there, so on less too)."""
    s, ar = near.s, near.s.ar
    delta_iv = s.num(delta)
    log_delta = ar.neg(s.log(delta_iv))
    p1 = power.p + 1
    total = ar.zero
    for j in range(power.q + 1):
        term = ar.div(
            ar.mul(s.num(Fraction(factorial(power.q), factorial(j))), s.power(log_delta, Fraction(j))),
            s.power(s.num(p1), Fraction(power.q + 1 - j)),
        )
        total = ar.add(total, term)
    return ar.mul(ar.mul(power.k, s.power(delta_iv, p1)), total)


def end_piece(
    formula: Formula, values: Mapping[str, ParameterValue], point: Fraction, side: int, budget: Fraction, room: Fraction
) -> Piece:
    """The piece (point, point + side·δ] with an enclosure no wider than budget, or a refusal.

    Raises NotCertifiable with code ``divergent_integral`` (a proved minorant that is not integrable),
    ``singularity_not_bounded`` (no rule applies) or ``singularity_undecided`` (an envelope that is not
    integrable without a minorant that proves divergence).
    """
    delta = Fraction(1, 16)
    while delta > room / 4:
        delta /= 2
    location = (float(point), float(point))
    try:  # one envelope, on the largest piece: it holds pointwise there, so on every smaller piece too
        near = NearPoint(formula, values, point, side, delta)
        env = near.envelope(formula.root)
    except (Unsupported, ArithmeticFault, ZeroDivisionError, OverflowError) as why:
        raise NotCertifiable(
            f"the integrand is undefined at {formula.variable} = {_point_text(point)} and cannot be "
            f"bounded next to it: {why}",
            code="singularity_not_bounded",
            location=location,
        ) from None
    _refuse_divergent_near(near, env, point, location, formula.variable)
    assert env.upper is not None
    if env.upper.p <= -1:
        raise NotCertifiable(
            f"cannot decide whether the integral converges next to {formula.variable} = "
            f"{_point_text(point)}: the best bound found, "
            f"{_power_text(env.upper, formula.variable, point)}, is not integrable and no "
            "minorant of fixed sign proves divergence",
            code="singularity_undecided",
            location=location,
        )
    for _ in range(_MAX_ROUNDS):
        try:
            size = near.s.high(_near_integral(near, env.upper, delta))
        except ArithmeticFault as why:
            raise NotCertifiable(
                f"the envelope next to {formula.variable} = {_point_text(point)} cannot be integrated: {why}",
                code="singularity_not_bounded",
                location=location,
            ) from None
        width = size if env.sign else 2 * size
        if width <= budget:
            low, high = _signed(size, env.sign)
            return Piece(
                "singular-envelope",
                point,
                point + side * delta,
                (low, high),
                _power_text(env.upper, formula.variable, point),
            )
        shrink = (budget / width) ** (1 / float(env.upper.p + 1)) / 2 if width else 0.5
        target = delta * Fraction(max(min(shrink, 0.5), 2.0**-900))
        while delta > target and delta > _SMALLEST_PIECE:
            delta /= 2
        if delta <= _SMALLEST_PIECE:
            break
    raise NotCertifiable(
        f"the piece next to {formula.variable} = {_point_text(point)} cannot be made small enough for the tolerance",
        code="singularity_not_bounded",
        location=location,
    )


def _refuse_divergent_near(
    near: NearPoint, env: Envelope[Power], point: Fraction, location: tuple[float, float], variable: str
) -> None:
    if env.sign and env.lower is not None:
        low = near.lower_fold(env.lower)
        if low.p <= -1:
            raise NotCertifiable(
                f"the integral diverges at {variable} = {_point_text(point)}: next to it the integrand keeps the "
                f"sign {'+' if env.sign > 0 else '−'} and {_power_text(low, variable, point, '≥')}, which is not "
                "integrable",
                code="divergent_integral",
                location=location,
            )


def _tail_integral(tail: InTail, growth: Growth, T: Fraction) -> Interval | None:
    """∫_T^∞ k·y^p·e^(−r·y) dy for T ≥ the T the envelope was derived on (it holds there, so further out too)."""
    s, ar = tail.s, tail.s.ar
    start = s.num(T)
    if growth.r > 0:
        denominator = growth.r - max(growth.p, Fraction(0)) / T
        if denominator <= 0:
            return None
        value = ar.mul(growth.k, ar.mul(s.power(start, growth.p), s.exp(s.num(-growth.r * T))))
        return ar.div(value, s.num(denominator))
    if growth.r == 0 and growth.p < -1:
        return ar.div(ar.mul(growth.k, s.power(start, growth.p + 1)), s.num(-growth.p - 1))
    return None


def tail_piece(
    formula: Formula, values: Mapping[str, ParameterValue], side: int, start: Fraction, budget: Fraction
) -> Piece:
    """The tail beyond side·T (T ≥ start) with an enclosure no wider than budget, or a refusal."""
    T = Fraction(1)
    while T < start:
        T *= 2
    location = (float("inf"), float("inf")) if side > 0 else (float("-inf"), float("-inf"))
    for _ in range(4 * _MAX_ROUNDS):
        try:
            tail = InTail(formula, values, side, T)
            env = tail.envelope(formula.root)
        except (Unsupported, ArithmeticFault, ZeroDivisionError, OverflowError) as why:
            if T < _RETRY_TAIL_UNTIL:  # dominance rules may hold only further out (x + 2 ≥ x/2 needs x ≥ 4)
                T *= 4
                continue
            raise NotCertifiable(
                f"the tail towards {'+' if side > 0 else '−'}∞ cannot be bounded: {why}",
                code="tail_not_bounded",
                location=location,
            ) from None
        _refuse_divergent_tail(env, side, location, formula.variable)
        # the envelope holds on [T, ∞), so on every tail further out: move T out with the closed form alone,
        # and derive a new envelope only when an exponential rate would improve with T (e^(−c·y²) → rate c·T)
        for _ in range(_MOVES_PER_ENVELOPE):
            try:
                size = _tail_integral(tail, env.upper, T) if env.upper is not None else None
            except ArithmeticFault as why:
                raise NotCertifiable(
                    f"the envelope of the tail cannot be integrated: {why}", code="tail_not_bounded", location=location
                ) from None
            if size is None:
                if env.upper is None or (env.upper.r == 0 and env.upper.p >= -1):
                    raise NotCertifiable(
                        f"cannot decide whether the integral converges towards {'+' if side > 0 else '−'}∞: the "
                        f"best bound found{', ' + _growth_text(env.upper, formula.variable) if env.upper else ''}, is "
                        "not integrable, and no minorant of fixed sign proves divergence (an integral that converges "
                        "only conditionally, such as sin(x)/x, is refused)",
                        code="tail_undecided",
                        location=location,
                    )
                T *= 2
                continue
            high = tail.s.high(size)
            width = high if env.sign else 2 * high
            assert env.upper is not None  # size was computed from it
            if width <= budget:
                low, top = _signed(high, env.sign)
                return Piece("tail-envelope", None, T * side, (low, top), _growth_text(env.upper, formula.variable))
            if env.upper.r == 0:  # power decay: jump straight to about the T that should do
                factor = (width / budget) ** (1 / float(-env.upper.p - 1))
                grow = max(2, min(int(factor) + 1, 2**200))
                T *= 1 << (grow - 1).bit_length()
            else:
                T *= 2
            if T > _FARTHEST_TAIL:
                break
        if T > _FARTHEST_TAIL:
            break
    raise NotCertifiable(
        f"the tail towards {'+' if side > 0 else '−'}∞ decays too slowly for the tolerance",
        code="tail_not_bounded",
        location=location,
    )


def _refuse_divergent_tail(env: TailEnvelope[Growth], side: int, location: tuple[float, float], variable: str) -> None:
    low = env.lower
    if env.sign and low is not None and (low.r < 0 or (low.r == 0 and low.p >= -1)):
        raise NotCertifiable(
            f"the integral diverges towards {'+' if side > 0 else '−'}∞: there the integrand keeps the sign "
            f"{'+' if env.sign > 0 else '−'} and {_growth_text(low, variable, '≥')}, which is not integrable",
            code="divergent_integral",
            location=location,
        )
