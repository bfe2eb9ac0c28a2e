"""Limits of integration, read exactly: 0.1 is one tenth and pi/2 is an enclosure of π/2."""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Mapping
from decimal import Decimal
from fractions import Fraction
from functools import lru_cache
from typing import Any

from ..arithmetic import Arithmetic, ParameterValue
from ..derivatives import Program
from ..errors import FormulaError, InvalidInput, QuadcertError
from ..formula import Constant, Formula, Negate, Number, parse
from ..formula._parser import CONSTANT_ONLY

_PLAIN = re.compile(r"-?[0-9]{1,15}(\.[0-9]{1,15})?")
_INFINITE = {"inf", "+inf", "-inf", "infinity", "+infinity", "-infinity", "oo", "-oo"}
LimitValue = str | int | float | Fraction | Decimal


def limit_text(value: LimitValue, field: str) -> str:
    """The decimal text a limit spells: a JSON number (Decimal) exactly as typed, a Python float as its
    shortest round-trip decimal."""
    if isinstance(value, bool):
        raise InvalidInput(f"{field} must be a number or text", code="invalid_limit", field=field)
    if isinstance(value, float):
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        if math.isnan(value):
            raise InvalidInput(f"{field} is not a number", code="invalid_limit", field=field)
        return repr(value)
    if isinstance(value, Decimal):  # a JSON number: exactly the decimal it spells
        if value.is_infinite():
            return limit_text(float(value), field)
        if value.is_nan():
            raise InvalidInput(f"{field} is not a number", code="invalid_limit", field=field)
        return str(value).lower().replace("e+", "e")
    if isinstance(value, Fraction):
        return f"{value.numerator}/{value.denominator}" if value.denominator != 1 else str(value.numerator)
    if isinstance(value, int):
        return str(value)
    if isinstance(value, str):
        if value.strip().lower() in _INFINITE:
            return "-inf" if value.strip().startswith("-") else "inf"
        return value
    raise InvalidInput(f"{field} must be a number or text", code="invalid_limit", field=field)


def parse_limit(value: LimitValue, field: str, parameters: tuple[str, ...] = ()) -> Formula:
    return _parse_limit_text(limit_text(value, field), field, tuple(parameters))


#: an infinite limit, as a formula that only this module and the improper pieces look inside
POSITIVE_INFINITY = Formula(Constant("inf"), CONSTANT_ONLY)
NEGATIVE_INFINITY = Formula(Negate(Constant("inf")), CONSTANT_ONLY)


def infinite_side(limit: Formula) -> int:
    """+1 for +∞, −1 for −∞, 0 for a finite limit.

    >>> infinite_side(parse_limit("-Infinity", "lower_limit")), infinite_side(parse_limit("2", "upper_limit"))
    (-1, 0)
    """
    if not isinstance(limit.root, (Constant, Negate)):  # cheap first: a number, the common limit
        return 0
    if limit == POSITIVE_INFINITY:
        return 1
    if limit == NEGATIVE_INFINITY:
        return -1
    return 0


@lru_cache(maxsize=256)  # limits repeat even more than formulas do (0, 1, pi/2 ...)
def _parse_limit_text(text: str, field: str, parameters: tuple[str, ...]) -> Formula:
    if text == "inf":
        return POSITIVE_INFINITY
    if text == "-inf":
        return NEGATIVE_INFINITY
    if _PLAIN.fullmatch(text):  # the common case, read without the parser into the tree it would build
        number = Number(Fraction(text.lstrip("-")))
        return Formula(Negate(number) if text.startswith("-") else number, CONSTANT_ONLY)
    try:
        formula = parse(text, variable=CONSTANT_ONLY, parameters=parameters)
    except FormulaError as error:
        raise InvalidInput(f"{field}: {error.message}", code=error.code, field=field, column=error.column) from None
    return formula


def exact_limit(formula: Formula) -> Fraction | None:
    """The limit's exact value when it is a plain numeral (no enclosure needed)."""
    root = formula.root
    if isinstance(root, Number):
        return root.value
    if isinstance(root, Negate) and isinstance(root.operand, Number):
        return -root.operand.value
    return None


#: the largest |limit| the engine takes (the float 1e300, exactly)
_LIMIT_RANGE = Fraction(1e300)


def check_limit(
    formula: Formula, parameters: dict[str, ParameterValue], field: str, arithmetic: Callable[[], Arithmetic[Any]]
) -> None:
    """Refuse a finite limit that does not evaluate, or lies beyond ±1e300, before any work is done. A plain
    numeral is checked by its exact value; anything else is enclosed once with ``arithmetic()``."""
    value = exact_limit(formula)
    if value is None:
        enclose_limit(formula, arithmetic(), parameters, field)
    elif abs(value) > _LIMIT_RANGE:
        raise _out_of_range(field)


def _out_of_range(field: str) -> InvalidInput:
    return InvalidInput(
        f"{field} is beyond ±1e300; such limits are not supported", code="limit_out_of_range", field=field
    )


def enclose_limit(formula: Formula, ar: Arithmetic[Any], parameters: Mapping[str, ParameterValue], field: str) -> Any:
    if infinite_side(formula):
        raise InvalidInput(
            f"{field} is infinite; this operation needs finite limits", code="infinite_limit", field=field
        )
    try:
        program = Program(formula, ar, parameters)
        if not program.is_constant:
            raise InvalidInput(f"{field} must be a constant", code="invalid_limit", field=field)
        value = program.value(ar.zero)
    except QuadcertError as error:
        if isinstance(error, InvalidInput):
            raise
        raise InvalidInput(f"{field} cannot be evaluated: {error.message}", code="invalid_limit", field=field) from None
    low, high = ar.bounds(value)
    if not (math.isfinite(low) and math.isfinite(high)) or max(abs(low), abs(high)) > 1e300:
        raise _out_of_range(field)
    return value
