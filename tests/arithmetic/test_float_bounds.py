"""Every conversion from an exact value to a float64 bound is directed, in every range.

Reference: exact rational arithmetic (Python's Fraction) on the returned floats; the defining property of a
directed rounding is checked directly: the result is on the right side of the exact value, and the next float
towards it is on the wrong side. Magnitudes run from far below the smallest subnormal (2**-1074) to far above
the largest float (just under 2**1024), with the boundaries of each range drawn on purpose.
"""

from __future__ import annotations

import math
import sys
from fractions import Fraction

import flint
import pytest
from hypothesis import given
from hypothesis import strategies as st
from mpmath import libmp

from quadcert.arithmetic import FlintArithmetic, Interval, MpmathArithmetic, fraction_down, fraction_up
from quadcert.arithmetic._interval import binary_directed, raw_down, raw_up

TINY = Fraction(2) ** -1074  # the smallest subnormal (IEEE 754 binary64, the standard)
SMALLEST_NORMAL = Fraction(2) ** -1022
LARGEST = Fraction(sys.float_info.max)

#: exponents around every boundary: far below zero's neighbour, subnormal, normal, near and beyond overflow
EXPONENTS = st.one_of(
    st.integers(-1300, 1100),
    st.sampled_from(
        [-1180, -1128, -1127, -1126, -1075, -1074, -1073, -1023, -1022, -1021, 969, 970, 971, 972, 1023, 1024, 1025]
    ),
)
MANTISSAS = st.one_of(
    st.integers(1, 2**120),
    st.sampled_from([1, 2, 3, 2**52 - 1, 2**52, 2**52 + 1, 2**53 - 1, 2**53, 2**53 + 1, 2**54 - 1]),
)


def is_floor(result: float, exact: Fraction) -> bool:
    """result is the largest float64 <= exact (-inf below -max)."""
    if result == -math.inf:
        return exact < -LARGEST
    if Fraction(result) > exact:
        return False
    above = math.nextafter(result, math.inf)
    return math.isinf(above) or Fraction(above) > exact


def is_ceiling(result: float, exact: Fraction) -> bool:
    return is_floor(-result, -exact)


def not_negative_zero(value: float) -> bool:
    return value != 0.0 or math.copysign(1.0, value) > 0


@given(st.booleans(), MANTISSAS, EXPONENTS)
def test_binary_directed_is_the_directed_rounding(negative: bool, mantissa: int, exponent: int) -> None:
    exact = Fraction(-mantissa if negative else mantissa) * Fraction(2) ** exponent
    down = binary_directed(negative, mantissa, exponent, up=False)
    up = binary_directed(negative, mantissa, exponent, up=True)
    assert is_floor(down, exact) and is_ceiling(up, exact)
    assert not_negative_zero(down) and not_negative_zero(up)


@given(st.booleans(), MANTISSAS, EXPONENTS)
def test_mpmath_interval_floats_enclose(negative: bool, mantissa: int, exponent: int) -> None:
    raw = libmp.from_man_exp(-mantissa if negative else mantissa, exponent)
    exact = Fraction(*libmp.to_rational(raw))
    low, high = Interval(raw, raw).floats()
    assert is_floor(low, exact) and is_ceiling(high, exact)


@given(st.booleans(), MANTISSAS, EXPONENTS)
def test_flint_bounds_enclose(negative: bool, mantissa: int, exponent: int) -> None:
    point = flint.arb((-mantissa if negative else mantissa, exponent))  # exact: (mantissa, exponent)
    assert point.is_exact()
    exact = Fraction(-mantissa if negative else mantissa) * Fraction(2) ** exponent
    low, high = FlintArithmetic.bounds(None, point)  # type: ignore[arg-type]
    assert is_floor(low, exact) and is_ceiling(high, exact)


@given(st.integers(-(2**200), 2**200).filter(bool), st.integers(1, 2**200), EXPONENTS)
def test_fraction_directed_rounding(numerator: int, denominator: int, exponent: int) -> None:
    exact = Fraction(numerator, denominator) * Fraction(2) ** exponent
    down, up = fraction_down(exact), fraction_up(exact)
    assert is_floor(down, exact) and is_ceiling(up, exact)


@pytest.mark.parametrize(
    "exact",
    [
        Fraction(0),
        TINY,
        TINY / 2,
        TINY / 3,
        TINY * 3 / 2,
        SMALLEST_NORMAL,
        SMALLEST_NORMAL - TINY / 7,
        SMALLEST_NORMAL + TINY / 7,
        LARGEST,
        LARGEST + 1,
        LARGEST * 2,
        Fraction(2) ** 1024,
        Fraction(1, 10) ** 434,
        Fraction(5, 10**311),
        -Fraction(5, 10**311),
        -TINY / 2,
        -LARGEST - 1,
    ],
)
def test_boundaries_of_each_range(exact: Fraction) -> None:
    """Hand-picked boundaries (IEEE 754 binary64 limits), through every conversion."""
    assert is_floor(fraction_down(exact), exact) and is_ceiling(fraction_up(exact), exact)
    backend = MpmathArithmetic(200)  # an enclosure rounded at 200 bits, then to float64: still encloses
    low, high = backend.bounds(backend.from_bounds(exact, exact))
    assert (low == -math.inf or Fraction(low) <= exact) and (high == math.inf or exact <= Fraction(high))
    assert not_negative_zero(fraction_down(exact)) and not_negative_zero(fraction_up(exact))


def test_special_raw_values() -> None:
    assert raw_down(libmp.fzero) == 0.0 and not_negative_zero(raw_up(libmp.fzero))
    assert raw_up(libmp.finf) == math.inf and raw_down(libmp.fninf) == -math.inf
    with pytest.raises(ArithmeticError):
        raw_down(libmp.fnan)


def test_the_spelled_out_raw_values_are_libmps_own() -> None:
    """_interval.py spells out libmp's zero, one and infinities so that it loads without mpmath: they must be
    libmp's own values (reference: mpmath.libmp)."""
    from mpmath import libmp

    from quadcert.arithmetic import _interval

    assert (_interval.ZERO, _interval.ONE) == (libmp.fzero, libmp.fone)
    assert (_interval._INF, _interval._NEG_INF) == (libmp.finf, libmp.fninf)
    assert _interval.raw_up(libmp.finf) == float("inf") and _interval.raw_down(libmp.fninf) == float("-inf")
