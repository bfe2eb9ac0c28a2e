"""Turning an enclosure into the float64 figures a caller sees, without losing rigor."""

from __future__ import annotations

import math


def difference_up(x: float, y: float) -> float:
    """The smallest float64 >= x − y (TwoSum gives the exact rounding error of x − y)."""
    s = x - y
    if not math.isfinite(s):
        return s
    bp = s - x
    error = (x - (s - bp)) + (-y - bp)  # exact, subnormal results included; NaN only next to overflow
    return s if error <= 0 else math.nextafter(s, math.inf)


def error_bound(low: float, high: float) -> tuple[float, float]:
    """(value, bound) with bound >= max(value − low, high − value), exactly."""
    if not (math.isfinite(low) and math.isfinite(high)):
        return math.nan, math.inf
    value = low / 2 + high / 2
    value = min(max(value, low), high)
    return value, max(difference_up(value, low), difference_up(high, value))
