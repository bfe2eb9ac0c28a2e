"""Checks on the numbers a caller sends, before any work starts."""

from __future__ import annotations

import math
import re
from collections.abc import Mapping
from decimal import Decimal
from fractions import Fraction
from functools import lru_cache

from ..arithmetic import ParameterValue, Within, fraction_down
from ..errors import InvalidInput
from ..formula._limits import MAX_LITERAL_DIGITS, MAX_LITERAL_EXPONENT
from ..results import RULES

MIN_TOLERANCE = 1e-60
MAX_TOLERANCE = 1e300
DEFAULT_MAX_NODES = 200_001
MAX_NODES_LIMIT = 2_000_001
MAX_PARAMETERS = 32
_MIN_TOLERANCE_EXACT = Fraction(1, 10**60)
_MAX_TOLERANCE_EXACT = Fraction(10) ** 300
_MAGNITUDE_LIMIT = Fraction(10) ** MAX_LITERAL_EXPONENT
_DECIMAL = re.compile(r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?")
_RATIO = re.compile(r"([+-]?\d{1,80})\s*/\s*(\d{1,80})")

#: what a caller may pass for a number: JSON numbers arrive as Decimal (their exact text), Python floats are
#: read as the shortest decimal that round-trips them, text as the decimal or ratio it spells
NumberLike = int | float | Decimal | Fraction | str


def exact_number(value: object, field: str, code: str = "invalid_parameter", range_code: str | None = None) -> Fraction:
    """The exact rational a caller's number spells, with the formula language's literal limits.

    Magnitudes are checked on the decimal's digits and exponent before any big number is built, so text such
    as ``1e-999999999`` costs nothing.

    >>> exact_number("9.00000000000000015", "claimed_value")
    Fraction(180000000000000003, 20000000000000000)
    >>> exact_number(0.1, "k"), exact_number(Decimal("1E+2"), "k"), exact_number("1/3", "k")
    (Fraction(1, 10), Fraction(100, 1), Fraction(1, 3))
    """
    if isinstance(value, bool):
        raise InvalidInput(f"{field} must be a number", code=code, field=field)
    range_code = range_code or code
    if isinstance(value, Fraction):
        return _in_range(value, field, range_code)
    if isinstance(value, int):
        return _in_range(Fraction(value), field, range_code)
    if isinstance(value, float):
        if not math.isfinite(value):
            raise InvalidInput(f"{field} must be finite, got {value!r}", code=code, field=field)
        value = Decimal(repr(value))
    elif isinstance(value, str):
        text = value.strip()
        ratio = _RATIO.fullmatch(text)
        if len(text) <= 80 and ratio and int(ratio.group(2)) != 0:
            return _in_range(Fraction(int(ratio.group(1)), int(ratio.group(2))), field, range_code)
        if len(text) > 80 or not _DECIMAL.fullmatch(text):
            raise InvalidInput(
                f"{field} must be a finite number such as 0.5 or 1e-3, got {text[:40]!r}", code=code, field=field
            )
        value = Decimal(text)  # cheap whatever the exponent: Decimal keeps it as an integer
    if not isinstance(value, Decimal) or not value.is_finite():
        raise InvalidInput(f"{field} must be a finite number", code=code, field=field)
    _sign, digits, _exponent = value.as_tuple()
    significant = len(digits) - next((i for i, d in enumerate(digits) if d), len(digits))
    if significant > MAX_LITERAL_DIGITS:
        raise InvalidInput(f"{field} has more than {MAX_LITERAL_DIGITS} significant digits", code=code, field=field)
    if significant and abs(value.adjusted()) > MAX_LITERAL_EXPONENT:
        raise InvalidInput(
            f"{field} is beyond the range 1e-{MAX_LITERAL_EXPONENT} to 1e+{MAX_LITERAL_EXPONENT}",
            code=range_code,
            field=field,
        )
    return Fraction(value)


def _in_range(value: Fraction, field: str, code: str) -> Fraction:
    if abs(value) > _MAGNITUDE_LIMIT:
        raise InvalidInput(
            f"{field} is beyond the range 1e-{MAX_LITERAL_EXPONENT} to 1e+{MAX_LITERAL_EXPONENT}",
            code=code,
            field=field,
        )
    return value


def check_tolerance(value: NumberLike, field: str = "tolerance") -> float:
    """The tolerance to apply: the largest float64 not above the exact number given, so that a bound that
    meets it meets the caller's number too. The allowed range [1e-60, 1e300] is closed at both ends."""
    return _tolerance(value, field, optional=False)


def check_relative_tolerance(value: NumberLike | None, field: str = "relative_tolerance") -> float | None:
    """The same for a relative tolerance, which may be absent and must be below 1."""
    return None if value is None else _tolerance(value, field, optional=True)


def _tolerance(value: NumberLike, field: str, optional: bool) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float, Decimal, Fraction, str)):
        raise InvalidInput(f"{field} must be a number", code="invalid_tolerance", field=field)
    try:
        hash(value)
    except TypeError:  # a signalling NaN cannot be a cache key; it is checked (and refused) uncached
        return _checked_tolerance.__wrapped__(value, field, optional)
    return _checked_tolerance(value, field, optional)


@lru_cache(maxsize=512, typed=True)  # a few tolerances recur in nearly every request; refusals are not kept
def _checked_tolerance(value: NumberLike, field: str, optional: bool) -> float:
    exact = exact_number(value, field, code="invalid_tolerance", range_code="tolerance_out_of_range")
    if exact <= 0:
        raise InvalidInput(f"{field} must be a number > 0, got {_shown(value)}", code="invalid_tolerance", field=field)
    if optional:
        if exact >= 1:
            raise InvalidInput(
                f"{field} must be below 1, got {_shown(value)}", code="tolerance_out_of_range", field=field
            )
    elif not _MIN_TOLERANCE_EXACT <= exact <= _MAX_TOLERANCE_EXACT:
        raise InvalidInput(
            f"{field} {_shown(value)} is outside [{MIN_TOLERANCE:g}, {MAX_TOLERANCE:g}]",
            code="tolerance_out_of_range",
            field=field,
        )
    return fraction_down(exact)


def _shown(value: object) -> str:
    return str(value).strip().lower()[:40] if not isinstance(value, float) else repr(value)


def check_max_nodes(value: int) -> int:
    if isinstance(value, bool) or not isinstance(value, int):
        raise InvalidInput("max_nodes must be a whole number", code="invalid_budget", field="max_nodes")
    if not 3 <= value <= MAX_NODES_LIMIT:
        raise InvalidInput(
            f"max_nodes must be between 3 and {MAX_NODES_LIMIT}, got {value}",
            code="budget_out_of_range",
            field="max_nodes",
        )
    return value


def check_parameters(parameters: Mapping[str, object] | None) -> dict[str, ParameterValue]:
    """Each parameter's exact value, or its bounds when it is known only within them (see :func:`parameter_value`)."""
    if not parameters:
        return {}
    if len(parameters) > MAX_PARAMETERS:
        raise InvalidInput(f"at most {MAX_PARAMETERS} parameters", code="too_many_parameters", field="parameters")
    return {str(name): parameter_value(value, f"parameters.{name}") for name, value in parameters.items()}


#: ``1.99..2.01`` (low..high) and ``2±0.01`` or ``2+-0.01`` (centre ± radius), in text fields
_BETWEEN = re.compile(r"(.+?)\.\.(.+)")
_PLUS_MINUS = re.compile(r"(.+?)(?:±|\+-|\+/-)(.+)")


def parameter_value(value: object, field: str) -> ParameterValue:
    """A parameter's value: a number, or bounds it is known within.

    Bounds come as a :class:`Within`, a mapping with exactly the keys ``low`` and ``high``, or text
    ``low..high`` or ``centre±radius`` (``+-`` also reads as ±). Equal bounds are that one number.

    >>> parameter_value("1.99..2.01", "k") == Within(Fraction("1.99"), Fraction("2.01"))
    True
    >>> parameter_value("2 ± 0.01", "k") == parameter_value({"low": "1.99", "high": 2.01}, "k")
    True
    >>> parameter_value("3..3", "k"), parameter_value(0.5, "k")
    (Fraction(3, 1), Fraction(1, 2))
    """
    if isinstance(value, Within):
        return value
    if isinstance(value, Mapping):
        if set(value) != {"low", "high"}:
            raise InvalidInput(
                f"{field} must be a number or an object with exactly the keys low and high",
                code="invalid_parameter",
                field=field,
            )
        return _bounds(exact_number(value["low"], f"{field}.low"), exact_number(value["high"], f"{field}.high"), field)
    if isinstance(value, str) and len(value) <= 200:
        between = _BETWEEN.fullmatch(value.strip())
        if between:
            low = exact_number(between.group(1), f"{field}.low")
            return _bounds(low, exact_number(between.group(2), f"{field}.high"), field)
        plus_minus = _PLUS_MINUS.fullmatch(value.strip())
        if plus_minus:
            centre = exact_number(plus_minus.group(1), field)
            radius = exact_number(plus_minus.group(2), f"{field}.radius")
            if radius < 0:
                raise InvalidInput(f"{field}: the radius after ± must be >= 0", code="invalid_parameter", field=field)
            return _bounds(centre - radius, centre + radius, field)
    return exact_number(value, field)


def _bounds(low: Fraction, high: Fraction, field: str) -> ParameterValue:
    if low > high:
        raise InvalidInput(f"{field}: the low bound is above the high one", code="invalid_parameter", field=field)
    return low if low == high else Within(low, high)


def check_rule(rule: object) -> str:
    if rule not in RULES:
        raise InvalidInput(
            f"rule must be one of {', '.join(RULES)}, got {str(rule)[:40]!r}", code="invalid_rule", field="rule"
        )
    return str(rule)
