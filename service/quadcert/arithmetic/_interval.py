"""The interval value type: a pair of raw mpmath floats, lower <= upper.

Kept thin on purpose: all arithmetic lives in the kernels, which take the
precision as an argument, so nothing here depends on global state. Light to
import: mpmath loads only where a raw float has to be read by it (a request the
compiled engine answers uses the float conversions here and never loads it).
"""

from __future__ import annotations

import math
import sys
from decimal import ROUND_CEILING, ROUND_FLOOR, ROUND_HALF_EVEN, Context, Decimal
from fractions import Fraction
from typing import Any, NamedTuple

Raw = tuple[Any, ...]  # mpmath's raw float: (sign, mantissa, exponent, bitcount)

# libmp's special raw values, spelled out (tests/arithmetic check them against libmp's own)
ZERO: Raw = (0, 0, 0, 0)
ONE: Raw = (0, 1, 0, 1)
_INF: Raw = (0, 0, -456, -2)
_NEG_INF: Raw = (1, 0, -789, -3)


class Interval(NamedTuple):
    """Closed interval [lo, hi] of raw mpmath floats; never NaN, never infinite."""

    lo: Raw
    hi: Raw

    @classmethod
    def point(cls, value: Raw) -> Interval:
        return cls(value, value)

    @property
    def is_point(self) -> bool:
        return self.lo == self.hi

    def contains(self, value: Raw) -> bool:
        from mpmath import libmp

        return bool(libmp.mpf_le(self.lo, value) and libmp.mpf_le(value, self.hi))

    def floats(self) -> tuple[float, float]:
        """Endpoints as float64, rounded outward, so the pair still encloses.

        libmp's own ``to_float`` ignores the rounding direction below the normal range (5e-435 becomes 0.0
        both ways), so the conversion is done here from the exact mantissa and exponent.
        """
        return raw_down(self.lo), raw_up(self.hi)

    def __repr__(self) -> str:
        from mpmath import libmp

        lo, hi = (libmp.to_str(v, 20) for v in self)
        return f"Interval[{lo}, {hi}]"


_MIN_EXPONENT = -1074  # the weight of the last bit of the smallest subnormal float64
_MAX_TOP = 1024  # every finite float64 is below 2**1024


def binary_directed(negative: bool, mantissa: int, exponent: int, up: bool) -> float:
    """The float64 next to ±mantissa·2**exponent in one direction (up: towards +inf), exactly.

    Works in every range: a magnitude below the smallest subnormal goes to 0 or to ±5e-324, one above the
    largest float to ±max or ±inf, and zero comes back as +0.0 (never -0.0, which would print as a bound of
    its own). Only exact integer arithmetic is used; the final ``ldexp`` is exact because the rounded
    significand has at most 53 bits and its last bit weighs at least 2**-1074.

    >>> binary_directed(False, 5, -1450, up=False), binary_directed(False, 5, -1450, up=True)
    (0.0, 5e-324)
    >>> binary_directed(True, 1, 1100, up=True), binary_directed(True, 1, 1100, up=False)
    (-1.7976931348623157e+308, -inf)
    """
    if mantissa == 0:
        return 0.0
    away = up != negative  # does this direction move the magnitude away from zero?
    top = exponent + mantissa.bit_length()
    if top > _MAX_TOP:
        magnitude = math.inf if away else sys.float_info.max
    else:
        last = max(top - 53, _MIN_EXPONENT)  # weight of the last significand bit the result can have
        if exponent >= last:
            significand = mantissa << (exponent - last)
        else:
            shift = last - exponent
            significand = mantissa >> shift
            if away and (significand << shift) != mantissa:
                significand += 1
        try:
            magnitude = math.ldexp(significand, last)
        except OverflowError:  # rounded up to 2**1024
            magnitude = math.inf
    if magnitude == 0.0:
        return 0.0
    return -magnitude if negative else magnitude


def interval_text(low: float, high: float) -> str:
    """[low, high] for a message: 17 significant digits rounded outward, zero as 0 whatever its sign.

    >>> interval_text(-0.0, 0.0), interval_text(0.1, 0.30000000000000004)
    ('[0, 0]', '[0.1, 0.30000000000000005]')
    """
    return f"[{shown(low, 17, 'down')}, {shown(high, 17, 'up')}]"


_DOWN = Context(prec=17, rounding=ROUND_FLOOR)
_UP = Context(prec=17, rounding=ROUND_CEILING)


def shown(value: float, digits: int, direction: str) -> str:
    """``value`` printed with at most ``digits`` significant digits, rounded in ``direction`` ("down", "up" or
    "near"), so that a printed bound never says less than the certified one. Zero prints as ``0`` whatever its
    sign. Uses private decimal contexts: the process-wide one is never touched.

    >>> shown(0.30000000000000004, 6, "down"), shown(0.30000000000000004, 6, "up"), shown(-0.0, 6, "up")
    ('0.3', '0.300001', '0')
    >>> shown(9.11497544109352e-11, 3, "up"), shown(5e-324, 3, "up"), shown(float("inf"), 3, "up")
    ('9.12e-11', '4.95e-324', 'inf')
    """
    if value == 0:
        return "0"
    if not math.isfinite(value):
        return "nan" if math.isnan(value) else ("inf" if value > 0 else "-inf")
    exact = Decimal(value)  # exact: every float is a finite decimal
    if direction == "near":
        rounded = Context(prec=digits, rounding=ROUND_HALF_EVEN).create_decimal(exact)
    else:
        context = (_DOWN if direction == "down" else _UP).copy()
        context.prec = digits
        rounded = context.create_decimal(exact)
    text = f"{rounded.normalize(Context(prec=digits)):g}"
    return text if "e" not in text else text.replace("e+", "e")


def raw_down(value: Raw) -> float:
    """The largest float64 <= an mpmath raw float."""
    return _raw_directed(value, up=False)


def raw_up(value: Raw) -> float:
    """The smallest float64 >= an mpmath raw float."""
    return _raw_directed(value, up=True)


def _raw_directed(value: Raw, up: bool) -> float:
    sign, mantissa, exponent, _ = value
    if mantissa == 0:
        if value == ZERO:
            return 0.0
        if value == _INF:
            return math.inf
        if value == _NEG_INF:
            return -math.inf
        raise ArithmeticError("NaN reached a bound: a kernel is wrong")
    return binary_directed(bool(sign), int(mantissa), int(exponent), up)


def to_fraction(value: Raw) -> Fraction:
    from mpmath import libmp

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
    result = -fraction_down(-value)
    return result if result != 0.0 else 0.0  # never -0.0
