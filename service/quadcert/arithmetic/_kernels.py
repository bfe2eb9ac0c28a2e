"""Outward-rounded interval kernels on mpmath's raw floats, precision passed explicitly.

Two kinds of operation live here.

* ``+ - * /`` and exact conversions use libmp's directed rounding, which is
  exact integer arithmetic followed by one rounding in the asked direction.
* Every elementary function goes through :func:`_guarded`: it is evaluated at
  ``prec + EXTRA_BITS`` and the result widened by ``2**GUARD_BITS`` units in
  the last place of that working precision before rounding outward to
  ``prec``.  mpmath does not promise correct rounding for these functions
  (its interval exp has been seen to miss the true value by one ulp), so the
  guard absorbs any misrounding of up to 2**GUARD_BITS working ulps while
  costing at most one ulp at ``prec``.

Ranges of non-monotone functions are found from rigorous enclosures of pi
(critical points) and of the argument, erring towards the wider result.
"""

from __future__ import annotations

from collections.abc import Callable
from fractions import Fraction

from mpmath import libmp

from ..errors import DomainViolation, MagnitudeExceeded, Unbounded
from ._interval import ONE, ZERO, Interval, Raw, interval_text

EXTRA_BITS = 24
GUARD_BITS = 8
MAX_MAGNITUDE_BITS = 1 << 16  # |values| stay below 2**65536
EXP_ARGUMENT_LIMIT = 40000  # exp(40000) ~ 2**57708, inside the magnitude cap
FLOOR, CEILING, NEAREST = libmp.round_floor, libmp.round_ceiling, libmp.round_nearest

_lt, _le, _gt, _ge = libmp.mpf_lt, libmp.mpf_le, libmp.mpf_gt, libmp.mpf_ge
_add, _sub, _mul, _div = libmp.mpf_add, libmp.mpf_sub, libmp.mpf_mul, libmp.mpf_div
_neg, _abs, _shift = libmp.mpf_neg, libmp.mpf_abs, libmp.mpf_shift
_EXP_LIMIT = libmp.from_int(EXP_ARGUMENT_LIMIT)
_NEG_EXP_LIMIT = libmp.from_int(-EXP_ARGUMENT_LIMIT)
_MINUS_ONE = libmp.from_int(-1)


def _text(x: Interval) -> str:
    """An enclosure for a message, printed outward; a zero bound prints as 0, never -0."""
    return interval_text(*x.floats())


def _check_magnitude(value: Raw) -> Raw:
    if value[1] and value[2] + value[3] > MAX_MAGNITUDE_BITS:
        raise MagnitudeExceeded(f"a value beyond 2^{MAX_MAGNITUDE_BITS} arose; the formula grows too fast")
    return value


def _min(a: Raw, b: Raw) -> Raw:
    return a if _le(a, b) else b


def _max(a: Raw, b: Raw) -> Raw:
    return a if _ge(a, b) else b


def _least(values: list[Raw]) -> Raw:
    best = values[0]
    for value in values[1:]:
        if _lt(value, best):
            best = value
    return best


def _greatest(values: list[Raw]) -> Raw:
    best = values[0]
    for value in values[1:]:
        if _gt(value, best):
            best = value
    return best


# -- exact conversions and basic arithmetic -----------------------------------------------------


def from_fraction(value: Fraction, prec: int) -> Interval:
    n, d = value.numerator, value.denominator
    return Interval(libmp.from_rational(n, d, prec, FLOOR), libmp.from_rational(n, d, prec, CEILING))


def from_int(value: int) -> Interval:
    raw = libmp.from_int(value)
    return Interval(raw, raw)


def add(a: Interval, b: Interval, prec: int) -> Interval:
    return Interval(_add(a.lo, b.lo, prec, FLOOR), _add(a.hi, b.hi, prec, CEILING))


def sub(a: Interval, b: Interval, prec: int) -> Interval:
    return Interval(_sub(a.lo, b.hi, prec, FLOOR), _sub(a.hi, b.lo, prec, CEILING))


def neg(a: Interval) -> Interval:
    return Interval(_neg(a.hi), _neg(a.lo))


def mul(a: Interval, b: Interval, prec: int) -> Interval:
    alo, ahi, blo, bhi = a.lo, a.hi, b.lo, b.hi
    if alo[0] == 0 and blo[0] == 0:  # both non-negative: the common case
        lo, hi = _mul(alo, blo, prec, FLOOR), _mul(ahi, bhi, prec, CEILING)
    else:
        pairs = ((alo, blo), (alo, bhi), (ahi, blo), (ahi, bhi))
        lo = _least([_mul(x, y, prec, FLOOR) for x, y in pairs])
        hi = _greatest([_mul(x, y, prec, CEILING) for x, y in pairs])
    return Interval(_check_magnitude(lo), _check_magnitude(hi))


def div(a: Interval, b: Interval, prec: int) -> Interval:
    if _le(b.lo, ZERO) and _ge(b.hi, ZERO):
        raise Unbounded(f"division by {_text(b)}, which reaches zero", certain=b.lo == b.hi)
    quotients = ((a.lo, b.lo), (a.lo, b.hi), (a.hi, b.lo), (a.hi, b.hi))
    lo = _least([_div(x, y, prec, FLOOR) for x, y in quotients])
    hi = _greatest([_div(x, y, prec, CEILING) for x, y in quotients])
    return Interval(_check_magnitude(lo), _check_magnitude(hi))


def mul_fraction(a: Interval, value: Fraction, prec: int) -> Interval:
    """Multiply by an exact rational without first rounding it."""
    if value.denominator == 1:
        c = from_int(value.numerator)
        return mul(a, c, prec)
    n, d = libmp.from_int(value.numerator), libmp.from_int(value.denominator)
    lo, hi = (a.lo, a.hi) if value > 0 else (a.hi, a.lo)
    return Interval(_div(_mul(lo, n), d, prec, FLOOR), _div(_mul(hi, n), d, prec, CEILING))


def sqr(a: Interval, prec: int) -> Interval:
    lo2, hi2 = _mul(a.lo, a.lo, prec, FLOOR), _mul(a.hi, a.hi, prec, CEILING)
    if a.lo[0] == 0:  # lo >= 0
        return Interval(_check_magnitude(lo2), _check_magnitude(hi2))
    if _le(a.hi, ZERO):
        return Interval(
            _check_magnitude(_mul(a.hi, a.hi, prec, FLOOR)), _check_magnitude(_mul(a.lo, a.lo, prec, CEILING))
        )
    return Interval(ZERO, _check_magnitude(_max(_mul(a.lo, a.lo, prec, CEILING), hi2)))


def hull(a: Interval, b: Interval) -> Interval:
    return Interval(_min(a.lo, b.lo), _max(a.hi, b.hi))


def intersect(a: Interval, b: Interval) -> Interval:
    lo, hi = _max(a.lo, b.lo), _min(a.hi, b.hi)
    if _gt(lo, hi):
        raise ArithmeticError(f"disjoint enclosures {_text(a)} and {_text(b)}: a kernel is wrong")
    return Interval(lo, hi)


def magnitude(a: Interval) -> Raw:
    return _max(_abs(a.lo), _abs(a.hi))


# -- the guard ---------------------------------------------------------------------------------

PointFunction = Callable[[Raw, int, str], Raw]


def _guarded(fn: PointFunction, x: Raw, prec: int) -> Interval:
    """Enclosure of fn(x) that survives a misrounding of up to 2**GUARD_BITS working ulps."""
    wp = prec + EXTRA_BITS
    y = fn(x, wp, NEAREST)
    if y == ZERO:
        return Interval(ZERO, ZERO)
    if y[1] == 0:  # inf or nan from the library: refuse rather than guess
        raise MagnitudeExceeded("an elementary function returned a non-finite value")
    delta = _shift(_abs(y), GUARD_BITS - wp)
    return Interval(_sub(y, delta, prec, FLOOR), _add(y, delta, prec, CEILING))


def _increasing(fn: PointFunction, a: Interval, prec: int) -> Interval:
    low = _guarded(fn, a.lo, prec)
    if a.is_point:
        return low
    return Interval(low.lo, _guarded(fn, a.hi, prec).hi)


def _constant(fn: Callable[[int, str], Raw], prec: int) -> Interval:
    return _guarded(lambda _x, wp, rnd: fn(wp, rnd), ZERO, prec)


def pi(prec: int) -> Interval:
    return _constant(libmp.mpf_pi, prec)


def e(prec: int) -> Interval:
    return _constant(libmp.mpf_e, prec)


def ln10(prec: int) -> Interval:
    return _constant(libmp.mpf_ln10, prec)


# -- elementary functions ----------------------------------------------------------------------


def exp(a: Interval, prec: int) -> Interval:
    if _gt(a.hi, _EXP_LIMIT):
        raise MagnitudeExceeded(f"exp of {_text(a)} is too large to compute with")
    if _lt(a.hi, _NEG_EXP_LIMIT):
        return Interval(ZERO, _guarded(libmp.mpf_exp, _NEG_EXP_LIMIT, prec).hi)
    lo = ZERO if _lt(a.lo, _NEG_EXP_LIMIT) else _guarded(libmp.mpf_exp, a.lo, prec).lo
    hi = _guarded(libmp.mpf_exp, a.hi, prec).hi
    return Interval(_max(lo, ZERO), hi)


def _require_positive(name: str, a: Interval, allow_zero: bool) -> None:
    bad_upper = _lt(a.hi, ZERO) if allow_zero else _le(a.hi, ZERO)
    bad_lower = _lt(a.lo, ZERO) if allow_zero else _le(a.lo, ZERO)
    if bad_upper:
        raise DomainViolation(f"{name} is undefined on {_text(a)}", certain=True)
    if bad_lower:
        raise DomainViolation(f"{name} may be undefined: its argument reaches {_text(a)}", certain=False)


def log(a: Interval, prec: int) -> Interval:
    _require_positive("log", a, allow_zero=False)
    return _increasing(libmp.mpf_log, a, prec)


def log10(a: Interval, prec: int) -> Interval:
    _require_positive("log10", a, allow_zero=False)
    return div(_increasing(libmp.mpf_log, a, prec + 8), ln10(prec + 8), prec)


def sqrt(a: Interval, prec: int) -> Interval:
    _require_positive("sqrt", a, allow_zero=True)
    return _increasing(libmp.mpf_sqrt, a, prec)


def _quarter_turns(a: Interval, prec: int) -> tuple[int, int] | None:
    """Integers n with n*pi/2 possibly in a, as a range; None when a spans a full turn."""
    scale = div(from_int(2), pi(prec + 16), prec + 16)
    u = mul(a, scale, prec + 16)
    if _gt(_sub(u.hi, u.lo, 53, CEILING), libmp.from_int(4)):
        return None
    return libmp.to_int(libmp.mpf_ceil(u.lo)), libmp.to_int(libmp.mpf_floor(u.hi))


def _periodic(a: Interval, prec: int, fn: PointFunction, phase: int) -> Interval:
    """Range of sin (phase 0) or cos (phase 1) on a: hull of the ends and any extremum inside."""
    turns = _quarter_turns(a, prec)
    if turns is None:
        return Interval(_MINUS_ONE, ONE)
    result = hull(_guarded(fn, a.lo, prec), _guarded(fn, a.hi, prec))
    for n in range(turns[0], turns[1] + 1):
        position = (n + phase) % 4
        if position == 1:
            result = Interval(result.lo, ONE)
        elif position == 3:
            result = Interval(_MINUS_ONE, result.hi)
    return Interval(_max(result.lo, _MINUS_ONE), _min(result.hi, ONE))


def sin(a: Interval, prec: int) -> Interval:
    return _periodic(a, prec, libmp.mpf_sin, 0)


def cos(a: Interval, prec: int) -> Interval:
    return _periodic(a, prec, libmp.mpf_cos, 1)


def tan(a: Interval, prec: int) -> Interval:
    turns = _quarter_turns(a, prec)
    if turns is None or any(n % 2 for n in range(turns[0], turns[1] + 1)):
        raise Unbounded(f"tan has a pole in {_text(a)}", certain=False)
    return _increasing(libmp.mpf_tan, a, prec)


def atan(a: Interval, prec: int) -> Interval:
    return _increasing(libmp.mpf_atan, a, prec)


def _require_unit(name: str, a: Interval) -> None:
    if _lt(a.hi, _MINUS_ONE) or _gt(a.lo, ONE):
        raise DomainViolation(f"{name} is undefined on {_text(a)}", certain=True)
    if _lt(a.lo, _MINUS_ONE) or _gt(a.hi, ONE):
        raise DomainViolation(f"{name} may be undefined: its argument reaches {_text(a)}", certain=False)


def asin(a: Interval, prec: int) -> Interval:
    _require_unit("asin", a)
    return _increasing(libmp.mpf_asin, a, prec)


def acos(a: Interval, prec: int) -> Interval:
    _require_unit("acos", a)
    return neg(_increasing(lambda x, wp, rnd: _neg(libmp.mpf_acos(x, wp, rnd)), a, prec))


def _check_hyperbolic(a: Interval) -> None:
    if _gt(magnitude(a), _EXP_LIMIT):
        raise MagnitudeExceeded(f"hyperbolic function of {_text(a)} is too large to compute with")


def sinh(a: Interval, prec: int) -> Interval:
    _check_hyperbolic(a)
    return _increasing(libmp.mpf_sinh, a, prec)


def cosh(a: Interval, prec: int) -> Interval:
    _check_hyperbolic(a)
    lo = _guarded(libmp.mpf_cosh, a.lo, prec)
    hi = lo if a.is_point else _guarded(libmp.mpf_cosh, a.hi, prec)
    if _le(a.lo, ZERO) and _ge(a.hi, ZERO):
        return Interval(ONE, _max(lo.hi, hi.hi))
    if a.lo[0] == 0:
        return Interval(_max(lo.lo, ONE), hi.hi)
    return Interval(_max(hi.lo, ONE), lo.hi)


def _saturating(fn: PointFunction, limit: Raw) -> PointFunction:
    """An odd function bounded by 1 in magnitude, clamped far out where 1 is within rounding."""

    def clamped(x: Raw, wp: int, rnd: str) -> Raw:
        if _gt(_abs(x), limit):
            x = limit if x[0] == 0 else _neg(limit)
        return fn(x, wp, rnd)

    return clamped


_TANH = _saturating(libmp.mpf_tanh, libmp.from_int(10000))
_ERF = _saturating(libmp.mpf_erf, libmp.from_int(1000))


def _bounded_by_one(fn: PointFunction, a: Interval, prec: int) -> Interval:
    result = _increasing(fn, a, prec)
    return Interval(_max(result.lo, _MINUS_ONE), _min(result.hi, ONE))


def tanh(a: Interval, prec: int) -> Interval:
    return _bounded_by_one(_TANH, a, prec)


def erf(a: Interval, prec: int) -> Interval:
    return _bounded_by_one(_ERF, a, prec)


def abs_(a: Interval) -> Interval:
    if a.lo[0] == 0:
        return a
    if _le(a.hi, ZERO):
        return neg(a)
    return Interval(ZERO, _max(_neg(a.lo), a.hi))


def minimum(a: Interval, b: Interval) -> Interval:
    return Interval(_min(a.lo, b.lo), _min(a.hi, b.hi))


def maximum(a: Interval, b: Interval) -> Interval:
    return Interval(_max(a.lo, b.lo), _max(a.hi, b.hi))


def pow_int(a: Interval, n: int, prec: int) -> Interval:
    """a**n for an integer n, tight for even powers of intervals reaching zero."""
    if n == 0:
        return from_int(1)
    if n < 0:
        return div(from_int(1), pow_int(a, -n, prec), prec)
    if n == 1:
        return a
    if n == 2:
        return sqr(a, prec)
    for end in (a.lo, a.hi):
        if end[1] and (end[2] + end[3]) * n > MAX_MAGNITUDE_BITS:
            raise MagnitudeExceeded(f"{_text(a)}^{n} is too large to compute with")
    power: PointFunction = lambda x, wp, rnd: libmp.mpf_pow_int(x, n, wp, rnd)
    if n % 2 or a.lo[0] == 0:  # odd power, or even power of a non-negative interval: increasing
        return _increasing(power, a, prec)
    if _le(a.hi, ZERO):  # even power of a non-positive interval
        return _increasing(power, neg(a), prec)
    return Interval(ZERO, _max(_guarded(power, a.lo, prec).hi, _guarded(power, a.hi, prec).hi))


def pow_real(a: Interval, b: Interval, prec: int) -> Interval:
    """a**b = exp(b*log(a)) for a > 0; for a reaching 0 and b > 0 the range starts at 0."""
    if a.lo[0] == 0 and a.lo != ZERO:
        return exp(mul(b, log(a, prec), prec), prec)
    if a.lo[0] == 0 and _gt(b.lo, ZERO):  # a = [0, h], b > 0: a^b in [0, max over b of h^b]
        if a.hi == ZERO:
            return Interval(ZERO, ZERO)
        top = exp(mul(b, log(Interval.point(a.hi), prec), prec), prec)
        return Interval(ZERO, top.hi)
    if _lt(a.hi, ZERO) or (a.hi == ZERO and _lt(a.lo, ZERO)):
        raise DomainViolation(
            f"a power with a non-integer exponent needs a positive base, got {_text(a)}", certain=True
        )
    raise DomainViolation(
        f"a power with a non-integer exponent needs a positive base; the base reaches {_text(a)}", certain=False
    )
