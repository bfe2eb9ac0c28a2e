"""Turning an enclosure into the float64 figures a caller sees, without losing rigor."""

from __future__ import annotations

import math
from fractions import Fraction

from ..arithmetic import fraction_up


def error_bound(low: float, high: float) -> tuple[float, float]:
    """(value, bound) with bound >= max(value − low, high − value), exactly."""
    if not (math.isfinite(low) and math.isfinite(high)):
        return math.nan, math.inf
    value = low / 2 + high / 2
    value = min(max(value, low), high)
    exact = Fraction(value)
    return value, fraction_up(max(exact - Fraction(low), Fraction(high) - exact))
