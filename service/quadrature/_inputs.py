"""Checks on the numbers a caller sends, before any work starts."""

from __future__ import annotations

import math
from fractions import Fraction
from typing import Mapping

from ..errors import InvalidInput

MIN_TOLERANCE = 1e-60
MAX_TOLERANCE = 1e300
DEFAULT_MAX_NODES = 200_001
MAX_NODES_LIMIT = 2_000_001
MAX_PARAMETERS = 32


def check_tolerance(value: float, field: str = "tolerance", optional: bool = False) -> float | None:
    if value is None and optional:
        return None
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise InvalidInput(f"{field} must be a number", code="invalid_tolerance", field=field)
    value = float(value)
    if not math.isfinite(value) or value <= 0:
        raise InvalidInput(f"{field} must be a finite number > 0, got {value!r}", code="invalid_tolerance",
                           field=field)
    low = 0.0 if optional else MIN_TOLERANCE
    if not low < value <= MAX_TOLERANCE or (not optional and value < MIN_TOLERANCE):
        raise InvalidInput(f"{field} {value!r} is outside [{MIN_TOLERANCE:g}, {MAX_TOLERANCE:g}]",
                           code="tolerance_out_of_range", field=field)
    if optional and value >= 1:
        raise InvalidInput(f"{field} must be below 1, got {value!r}", code="tolerance_out_of_range", field=field)
    return value


def check_max_nodes(value: int) -> int:
    if isinstance(value, bool) or not isinstance(value, int):
        raise InvalidInput("max_nodes must be a whole number", code="invalid_budget", field="max_nodes")
    if not 3 <= value <= MAX_NODES_LIMIT:
        raise InvalidInput(f"max_nodes must be between 3 and {MAX_NODES_LIMIT}, got {value}",
                           code="budget_out_of_range", field="max_nodes")
    return value


def exact_number(value: object, field: str) -> Fraction:
    """A parameter value as an exact rational: floats are read as the decimal they print as."""
    if isinstance(value, bool):
        raise InvalidInput(f"{field} must be a number", code="invalid_parameter", field=field)
    if isinstance(value, Fraction):
        return value
    if isinstance(value, int):
        return Fraction(value)
    if isinstance(value, float):
        if not math.isfinite(value):
            raise InvalidInput(f"{field} must be finite, got {value!r}", code="invalid_parameter", field=field)
        return Fraction(repr(value))
    if isinstance(value, str) and len(value) <= 80:
        try:
            result = Fraction(value.strip())
        except (ValueError, ZeroDivisionError):
            pass
        else:
            if abs(result) < Fraction(10) ** 1000:
                return result
    raise InvalidInput(f"{field} must be a finite number", code="invalid_parameter", field=field)


def check_parameters(parameters: Mapping[str, object] | None) -> dict[str, Fraction]:
    if not parameters:
        return {}
    if len(parameters) > MAX_PARAMETERS:
        raise InvalidInput(f"at most {MAX_PARAMETERS} parameters", code="too_many_parameters", field="parameters")
    return {str(name): exact_number(value, f"parameters.{name}") for name, value in parameters.items()}
