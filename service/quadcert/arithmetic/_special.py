"""Outward-rounded kernels for the language's further functions, on the reference backend.

Every value comes from :func:`_kernels._guarded` (libmp at extra precision, widened by a guard), and ranges
come from monotonicity on stated intervals: the reasons are in docs/functions.md, one paragraph per function.
Precision is an argument, as everywhere in the kernels: nothing here touches a global context.
"""

from __future__ import annotations

import threading
from collections.abc import Callable
from fractions import Fraction

import mpmath
from mpmath import libmp

from ..errors import DomainViolation, MagnitudeExceeded, Unbounded
from . import _kernels as k
from ._interval import ONE, ZERO, Interval, Raw

_MINUS_ONE = libmp.from_int(-1)
_TWO = libmp.from_int(2)
_HALF = libmp.from_rational(1, 2, 53, libmp.round_nearest)
_ERFC_FAR = libmp.from_int(100)  # erfc(100) < 1e-4346: past it, [0, erfc(100)] is the value
_BESSEL_LIMIT = libmp.from_int(100000)
_BESSEL_SERIES_LIMIT = libmp.from_int(500)
_PRIVATE = threading.local()
_GAMMA_LIMIT = libmp.from_int(5000)  # Γ(5000) < 2^54000, inside the magnitude cap

#: Gamma's minimum on (0, ∞) is at x₀ = 1.46163214496836… with Γ(x₀) = 0.88560319441088…; the bracket
#: and the lower bounds below are checked against 60-digit mpmath in tests/arithmetic/test_special.py
GAMMA_ARGMIN_LOW = Fraction(146163, 100000)
GAMMA_ARGMIN_HIGH = Fraction(146164, 100000)
GAMMA_MIN_LOW = Fraction(885603194410, 10**12)
LGAMMA_MIN_LOW = Fraction(-121486290536, 10**12)


def _raw(value: Fraction, prec: int, up: bool) -> tuple[int, int, int, int]:
    raw: tuple[int, int, int, int] = libmp.from_rational(
        value.numerator, value.denominator, prec, k.CEILING if up else k.FLOOR
    )
    return raw


PointEnclosure = Callable[[Raw, int], Interval]


def _odd(positive: PointEnclosure) -> PointEnclosure:
    """An odd function's enclosure at any point from the one at positive points: f(−x) = −f(x), f(0) = 0."""

    def at(x: Raw, prec: int) -> Interval:
        if x == ZERO:
            return Interval(ZERO, ZERO)
        if x[0]:
            return k.neg(positive(k._neg(x), prec))
        return positive(x, prec)

    return at


def _rising(at: PointEnclosure, a: Interval, prec: int) -> Interval:
    """An increasing function over an interval, from enclosures at its two ends."""
    low = at(a.lo, prec)
    return low if a.is_point else Interval(low.lo, at(a.hi, prec).hi)


def _asinh_positive(x: tuple[int, int, int, int], prec: int) -> Interval:
    """asinh at one point from log and sqrt by interval arithmetic (libmp's own asinh and acosh lose digits
    to cancellation next to 0 and 1): asinh x = log x + log(1 + sqrt(1 + 1/x²)) with nothing cancelling from
    1/2 on; below, log(x + sqrt(x² + 1)) with as many extra bits as x has leading zeros, intersected with the
    alternating series' x − x³/6 ≤ asinh x ≤ x (x ≥ 0), which alone is tight once x is tiny."""
    point = Interval(x, x)
    one = k.from_int(1)
    if k._lt(x, _HALF):
        wp = prec + 16 + min(_leading_zeros(x), 2 * prec)
        cube = k.mul_fraction(k.pow_int(point, 3, wp), Fraction(1, 6), wp)
        series = Interval(libmp.mpf_sub(x, cube.hi, wp, k.FLOOR), x)
        logarithm = k.log(k.add(point, k.sqrt(k.add(one, k.sqr(point, wp), wp), wp), wp), wp)
        return _rounded(k.intersect(series, logarithm), prec)
    wp = prec + 16
    inverse = k.div(one, point, wp)
    root = k.sqrt(k.add(one, k.sqr(inverse, wp), wp), wp)
    return _rounded(k.add(k.log(point, wp), k.log(k.add(one, root, wp), wp), wp), prec)


_asinh_point = _odd(_asinh_positive)


def _leading_zeros(x: tuple[int, int, int, int]) -> int:
    """How far below 1 the magnitude of x is, in bits (0 from 1/2 on)."""
    return max(0, -(x[2] + x[3]))


def _rounded(a: Interval, prec: int) -> Interval:
    return Interval(libmp.mpf_pos(a.lo, prec, k.FLOOR), libmp.mpf_pos(a.hi, prec, k.CEILING))


def asinh(a: Interval, prec: int) -> Interval:
    return _rising(_asinh_point, a, prec)


def _acosh_point(x: tuple[int, int, int, int], prec: int) -> Interval:
    """acosh x = asinh(sqrt((x − 1)(x + 1))) for x ≥ 1: x − 1 is exact, so nothing cancels next to 1."""
    wp = prec + 16
    point = Interval(x, x)
    product = k.mul(k.sub(point, k.from_int(1), wp), k.add(point, k.from_int(1), wp), wp)
    root = k.sqrt(Interval(k._max(product.lo, ZERO), product.hi), wp)
    return Interval(_asinh_point(root.lo, prec).lo, _asinh_point(root.hi, prec).hi)


def acosh(a: Interval, prec: int) -> Interval:
    if k._lt(a.hi, ONE):
        raise DomainViolation(f"acosh is undefined on {k._text(a)}", certain=True)
    if k._lt(a.lo, ONE):
        raise DomainViolation(f"acosh may be undefined: its argument reaches {k._text(a)}", certain=False)
    low = _acosh_point(a.lo, prec)
    high = low if a.is_point else _acosh_point(a.hi, prec)
    return Interval(k._max(low.lo, ZERO), high.hi)


def _atanh_positive(x: tuple[int, int, int, int], prec: int) -> Interval:
    """atanh x = log((1 + x)/(1 − x))/2, where 1 − x is exact; below 1/2 with as many extra bits as x has
    leading zeros, intersected with the series' bounds x + x³/3 ≤ atanh x ≤ x + x³/(3(1 − x²)) (x ≥ 0)."""
    point = Interval(x, x)
    one = k.from_int(1)
    wp = prec + 16 + (min(_leading_zeros(x), 2 * prec) if k._lt(x, _HALF) else 0)
    ratio = k.div(k.add(one, point, wp), k.sub(one, point, wp), wp)
    value = k.mul_fraction(k.log(ratio, wp), Fraction(1, 2), wp)
    if k._lt(x, _HALF):
        third_cube = k.mul_fraction(k.pow_int(point, 3, wp), Fraction(1, 3), wp)
        top = k.div(third_cube, k.sub(one, k.sqr(point, wp), wp), wp)
        series = Interval(libmp.mpf_add(x, third_cube.lo, wp, k.FLOOR), libmp.mpf_add(x, top.hi, wp, k.CEILING))
        value = k.intersect(series, value)
    return _rounded(value, prec)


_atanh_point = _odd(_atanh_positive)


def atanh(a: Interval, prec: int) -> Interval:
    if k._lt(a.hi, _MINUS_ONE) or k._gt(a.lo, ONE):
        raise DomainViolation(f"atanh is undefined on {k._text(a)}", certain=True)
    if a.is_point and (a.lo == ONE or a.lo == _MINUS_ONE):
        raise Unbounded(f"atanh has a pole at {k._text(a)}", certain=True)
    if k._le(a.lo, _MINUS_ONE) or k._ge(a.hi, ONE):
        raise Unbounded(f"atanh has a pole at ±1, and its argument reaches {k._text(a)}", certain=False)
    return _rising(_atanh_point, a, prec)


def _cbrt_positive(x: tuple[int, int, int, int], prec: int) -> Interval:
    """The cube root certified by cubing: libmp's root is only a candidate, and lo³ ≤ x ≤ hi³ is checked
    exactly (products without rounding), widening until it holds."""
    guess = libmp.mpf_cbrt(x, prec + 8, k.NEAREST)
    slack = libmp.mpf_shift(guess, -prec)
    while True:
        lo = libmp.mpf_sub(guess, slack, prec, k.FLOOR)
        hi = libmp.mpf_add(guess, slack, prec, k.CEILING)
        if k._le(_cube(lo), x) and k._ge(_cube(hi), x):
            return Interval(lo, hi)
        slack = libmp.mpf_shift(slack, 4)


_cbrt_point = _odd(_cbrt_positive)


def _cube(y: tuple[int, int, int, int]) -> tuple[int, int, int, int]:
    cube: tuple[int, int, int, int] = k._mul(k._mul(y, y), y)  # no precision given: exact
    return cube


def cbrt(a: Interval, prec: int) -> Interval:
    return _rising(_cbrt_point, a, prec)


def erfc(a: Interval, prec: int) -> Interval:
    """Decreasing from 2 to 0; far out the value is clamped to [0, erfc(100)] or [2 − erfc(100), 2]."""

    def at(x: tuple[int, int, int, int]) -> Interval:
        if k._gt(x, _ERFC_FAR):
            return Interval(ZERO, k._guarded(libmp.mpf_erfc, _ERFC_FAR, prec).hi)
        if k._lt(x, k._neg(_ERFC_FAR)):
            return Interval(k._guarded(libmp.mpf_erfc, k._neg(_ERFC_FAR), prec).lo, _TWO)
        return k._guarded(libmp.mpf_erfc, x, prec)

    low, high = at(a.hi), at(a.lo)
    return Interval(k._max(low.lo, ZERO), k._min(high.hi, _TWO))


def sign(a: Interval) -> Interval:
    """−1, 0 or 1; an interval reaching 0 gets the hull of the signs it holds."""
    low = _MINUS_ONE if k._lt(a.lo, ZERO) else (ZERO if a.lo == ZERO else ONE)
    high = ONE if k._gt(a.hi, ZERO) else (ZERO if a.hi == ZERO else _MINUS_ONE)
    return Interval(low, high)


def step(a: Interval) -> Interval:
    """The unit step, 1 from 0 on (step(0) = 1) and 0 below."""
    low = ONE if k._ge(a.lo, ZERO) else ZERO
    high = ONE if k._ge(a.hi, ZERO) else ZERO
    return Interval(low, high)


def gamma(a: Interval, prec: int) -> Interval:
    """Γ on (0, ∞) from its one minimum; below 0, between poles, by reflection Γ(a) = π/(sin(πa)·Γ(1 − a))."""
    if k._gt(a.lo, ZERO):
        return _gamma_positive(a, prec, libmp.mpf_gamma, GAMMA_MIN_LOW)
    if k._lt(a.hi, ZERO):
        whole = libmp.mpf_floor(a.hi)
        if k._le(a.lo, whole) or a.hi == whole:
            raise Unbounded(f"gamma has a pole in {k._text(a)}", certain=a.is_point)
        wp = prec + 16
        pi = k.pi(wp)
        sine = k.sin(k.mul(a, pi, wp), wp)
        reflected = gamma(k.sub(k.from_int(1), a, wp), wp)
        return k.div(pi, k.mul(sine, reflected, wp), prec)
    raise Unbounded(f"gamma has a pole at 0, and its argument reaches {k._text(a)}", certain=a.is_point)


def lgamma(a: Interval, prec: int) -> Interval:
    """log Γ on (0, ∞), the one domain where it is the logarithm of Γ itself."""
    if not k._gt(a.lo, ZERO):
        certain = not k._gt(a.hi, ZERO)
        raise DomainViolation(f"lgamma needs a positive argument, got {k._text(a)}", certain=certain)
    return _gamma_positive(a, prec, libmp.mpf_loggamma, LGAMMA_MIN_LOW)


def _gamma_positive(a: Interval, prec: int, fn: k.PointFunction, floor: Fraction) -> Interval:
    """Γ and log Γ fall on (0, x₀] and rise on [x₀, ∞); x₀ lies in the bracket, where the minimum is ≥ floor."""
    if fn is libmp.mpf_gamma and k._gt(a.hi, _GAMMA_LIMIT):
        raise MagnitudeExceeded(f"gamma of {k._text(a)} is too large to compute with")
    if k._le(a.hi, _raw(GAMMA_ARGMIN_LOW, 64, up=False)):
        return _falling(fn, a, prec)
    if k._ge(a.lo, _raw(GAMMA_ARGMIN_HIGH, 64, up=True)):
        return k._increasing(fn, a, prec)
    top = k._max(k._guarded(fn, a.lo, prec).hi, k._guarded(fn, a.hi, prec).hi)
    return Interval(_raw(floor, prec, up=False), top)


def _falling(fn: k.PointFunction, a: Interval, prec: int) -> Interval:
    high = k._guarded(fn, a.lo, prec)
    low = high if a.is_point else k._guarded(fn, a.hi, prec)
    return Interval(low.lo, high.hi)


def polygamma(order: int, a: Interval, prec: int) -> Interval:
    """ψ⁽ᵐ⁾ on (0, ∞): ψ rises, and each ψ⁽ᵐ⁾ with m ≥ 1 is monotone (its derivative keeps one sign)."""
    if not k._gt(a.lo, ZERO):
        raise DomainViolation(f"the polygamma function needs a positive argument, got {k._text(a)}", certain=False)

    def fn(x: tuple[int, int, int, int], wp: int, rnd: str) -> tuple[int, int, int, int]:
        value: tuple[int, int, int, int] = libmp.mpf_psi(order, x, wp, rnd)
        return value

    first = k._guarded(fn, a.lo, prec)
    if a.is_point:
        return first
    return k.hull(first, k._guarded(fn, a.hi, prec))


def _private_context() -> mpmath.MPContext:
    """An mpmath context of this thread's own: its precision is set per call, and no other code sees it."""
    ctx: mpmath.MPContext | None = getattr(_PRIVATE, "context", None)
    if ctx is None:
        ctx = _PRIVATE.context = mpmath.MPContext()
    return ctx


def bessel_j(order: int, a: Interval, prec: int) -> Interval:
    """J_n over a from its value at the midpoint and the slope bound |J_n′| ≤ 1 on the real line (A&S 9.1.60
    gives |J_n| ≤ 1, and J_n′ = (J_{n−1} − J_{n+1})/2), clamped to [−1, 1]."""
    if k._gt(k.magnitude(a), _BESSEL_LIMIT):
        raise MagnitudeExceeded(f"j0 and j1 take arguments up to 100000 in size, got {k._text(a)}")
    wp = prec + 8
    middle = libmp.mpf_shift(libmp.mpf_add(a.lo, a.hi, wp, k.NEAREST), -1)
    radius = k._max(libmp.mpf_sub(a.hi, middle, 53, k.CEILING), libmp.mpf_sub(middle, a.lo, 53, k.CEILING))

    def fn(x: tuple[int, int, int, int], wp: int, rnd: str) -> tuple[int, int, int, int]:
        if k._gt(k._abs(x), _BESSEL_SERIES_LIMIT):  # libmp's power series slows down with the size of x
            ctx = _private_context()
            ctx.prec = wp
            far: tuple[int, int, int, int] = ctx.besselj(order, ctx.make_mpf(x))._mpf_
            return far
        value: tuple[int, int, int, int] = libmp.mpf_besseljn(order, x, wp, rnd)
        return value

    centre = k._guarded(fn, middle, prec)
    lo, hi = libmp.mpf_sub(centre.lo, radius, prec, k.FLOOR), libmp.mpf_add(centre.hi, radius, prec, k.CEILING)
    return Interval(k._max(lo, _MINUS_ONE), k._min(hi, ONE))
