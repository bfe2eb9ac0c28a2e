"""The float64 figures a caller sees: the error bound must cover both ends exactly.

Reference: exact rational arithmetic (Fraction) on the returned floats.
"""

from __future__ import annotations

import math
from fractions import Fraction

from hypothesis import given
from hypothesis import strategies as st

from quadcert.quadrature._finish import difference_up, error_bound

FLOATS = st.floats(allow_nan=False, allow_infinity=False, width=64)


@given(FLOATS, FLOATS)
def test_difference_up_is_the_smallest_float_above(x: float, y: float) -> None:
    d = difference_up(x, y)
    if math.isinf(d):
        return  # beyond the float range
    exact = Fraction(x) - Fraction(y)
    below = math.nextafter(d, -math.inf)
    assert Fraction(d) >= exact and (math.isinf(below) or Fraction(below) < exact)


@given(FLOATS, FLOATS, st.floats(0, 1))
def test_error_bound_covers_both_ends(a: float, b: float, shrink: float) -> None:
    low, high = sorted((a, b))
    if shrink < 0.5:  # narrow enclosures too, where rounding matters most
        high = min(high, math.nextafter(low, math.inf))
    value, bound = error_bound(low, high)
    if math.isinf(bound):
        return
    assert low <= value <= high
    assert Fraction(bound) >= max(Fraction(value) - Fraction(low), Fraction(high) - Fraction(value))


def test_subnormal_enclosures() -> None:
    """From memory: 5e-324 is the smallest positive float64; differences there are exact."""
    value, bound = error_bound(0.0, 5e-324)
    assert value in (0.0, 5e-324) and bound == 5e-324
    assert error_bound(-5e-324, 5e-324) == (0.0, 5e-324)


@given(st.floats(1e-300, 1e300), st.floats(0, 1e-3))
def test_certified_digits_are_shared_by_the_whole_enclosure(low: float, spread: float) -> None:
    """Reference: exact decimals. Every number in [low, high] lies in [d, d + one unit of d's last digit)."""
    from decimal import Decimal

    from quadcert.quadrature import certified_digits

    high = min(low * (1 + spread), 1.7e308)
    text = certified_digits(low, high)
    if text is None:
        return
    value = Decimal(text)
    _, _digits, exponent = value.as_tuple()
    unit = Decimal(1).scaleb(exponent)
    assert value <= Decimal(low) and Decimal(high) < value + unit, (low, high, text)
