"""The interval value type: a pair of raw mpmath floats, lower <= upper.

Kept thin on purpose: all arithmetic lives in the kernels, which take the
precision as an argument, so nothing here depends on global state.
"""

from __future__ import annotations

import math
import sys
from fractions import Fraction
from typing import NamedTuple

from mpmath import libmp

Raw = tuple  # mpmath's raw float: (sign, mantissa, exponent, bitcount)

ZERO: Raw = libmp.fzero
ONE: Raw = libmp.fone


class Interval(NamedTuple):
    """Closed interval [lo, hi] of raw mpmath floats; never NaN, never infinite."""

    lo: Raw
    hi: Raw

    @classmethod
    def point(cls, value: Raw) -> "Interval":
        return cls(value, value)

    @property
    def is_point(self) -> bool:
        return self.lo == self.hi

    def contains(self, value: Raw) -> bool:
        return libmp.mpf_le(self.lo, value) and libmp.mpf_le(value, self.hi)

    def floats(self) -> tuple[float, float]:
        """Endpoints as float64, rounded outward, so the pair still encloses."""
        return libmp.to_float(self.lo, rnd=libmp.round_floor), libmp.to_float(self.hi, rnd=libmp.round_ceiling)

    def __repr__(self) -> str:
        lo, hi = (libmp.to_str(v, 20) for v in self)
        return f"Interval[{lo}, {hi}]"


def to_fraction(value: Raw) -> Fraction:
    return Fraction(*libmp.to_rational(value))


_FLOAT_MAX = Fraction(sys.float_info.max)
_EXACT_INTEGER = 2**53


def fraction_down(value: Fraction) -> float:
    """The largest float64 <= value (-inf below the float range)."""
    if value.denominator == 1 and -_EXACT_INTEGER <= value.numerator <= _EXACT_INTEGER:
        return float(value.numerator)
    if value > _FLOAT_MAX:
        return sys.float_info.max
    if value < -_FLOAT_MAX:
        return -math.inf
    result = float(value)  # correctly rounded to nearest
    return math.nextafter(result, -math.inf) if Fraction(result) > value else result


def fraction_up(value: Fraction) -> float:
    """The smallest float64 >= value (+inf above the float range)."""
    if value.denominator == 1 and -_EXACT_INTEGER <= value.numerator <= _EXACT_INTEGER:
        return float(value.numerator)
    return -fraction_down(-value)
