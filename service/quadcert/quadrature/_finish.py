"""Turning an enclosure into the float64 figures a caller sees, without losing rigor."""

from __future__ import annotations

import math
from decimal import ROUND_FLOOR, Decimal
from fractions import Fraction

from ..arithmetic import fraction_up


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


def discretisation_bound(low: float, high: float, spread: Fraction) -> float:
    """Half of the enclosure's width left once the parameters' spread is taken out, rounded up: the part
    that finer panels can still remove (the accounting of docs/parameters.md).

    >>> discretisation_bound(1.0, 1.5, Fraction(1, 4))
    0.125
    """
    if not (math.isfinite(low) and math.isfinite(high)):
        return math.inf
    return max(fraction_up((Fraction(high) - Fraction(low) - spread) / 2), 0.0)


def certified_digits(low: float, high: float) -> str | None:
    """The digits every number in [low, high] shares, as a person would read them, or None when the
    enclosure straddles a power of ten or zero (then no leading digit is certain).

    >>> certified_digits(0.7468241327241334, 0.7468241329064328)
    '0.746824132'
    >>> certified_digits(-2.0000000001, -1.9999999999) is None, certified_digits(1234.5678, 1234.5699)
    (True, '1234.56')
    """
    if low == high == 0:
        return "0"
    if not (math.isfinite(low) and math.isfinite(high)) or low > high or (low <= 0 <= high):
        return None
    sign = "-" if high < 0 else ""
    a, b = sorted((abs(low), abs(high)))
    ea, eb = Decimal(a).adjusted(), Decimal(b).adjusted()
    if ea != eb:
        return None
    # both ends written with the same exponent: truncated digits, not rounded, so a shared prefix is certain
    shift = Decimal(10) ** (ea - 17)
    da = format((Decimal(a) / shift).to_integral_value(rounding=ROUND_FLOOR), "f")
    db = format((Decimal(b) / shift).to_integral_value(rounding=ROUND_FLOOR), "f")
    common = 0
    while common < min(len(da), len(db)) and da[common] == db[common]:
        common += 1
    if common == 0:
        return None
    digits = da[:common]
    if low == high:  # one exact value: zeros after its last digit say nothing more
        digits = digits.rstrip("0") or "0"
    point = ea + 1  # digits before the decimal point
    if ea < -6 or ea > 15 or point > len(digits):
        text = f"{digits[0]}.{digits[1:]}e{ea}" if len(digits) > 1 else f"{digits}e{ea}"
    elif point <= 0:
        text = "0." + "0" * (-point) + digits
    elif point == len(digits):
        text = digits
    else:
        text = digits[:point] + "." + digits[point:]
    return sign + text
