"""Turning an enclosure into the float64 figures a caller sees, without losing rigor."""

from __future__ import annotations

import math
from fractions import Fraction

from ..arithmetic import fraction_up


def difference_up(x: float, y: float) -> float:
    """The smallest float64 >= x − y (TwoSum gives the exact rounding error of x − y)."""
    s = x - y
    if not math.isfinite(s):
        return s
    bp = s - x
    error = (x - (s - bp)) + (-y - bp)
    return math.nextafter(s, math.inf) if error > 0 else s


def error_bound(low: float, high: float) -> tuple[float, float]:
    """(value, bound) with bound >= max(value − low, high − value), exactly."""
    if not (math.isfinite(low) and math.isfinite(high)):
        return math.nan, math.inf
    value = low / 2 + high / 2
    value = min(max(value, low), high)
    bound = max(difference_up(value, low), difference_up(high, value))
    if bound < 1e-290:  # TwoSum's error term may underflow: fall back to exact rationals
        exact = Fraction(value)
        bound = fraction_up(max(exact - Fraction(low), Fraction(high) - exact))
    return value, bound
