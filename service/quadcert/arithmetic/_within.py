"""A parameter known only within bounds: the closed interval [low, high] of exact rationals.

The engine encloses the integral for every value in the box the parameters span (see docs/parameters.md).

>>> k = Within(Fraction("1.99"), Fraction("2.01"))
>>> k.centre, k.radius
(Fraction(2, 1), Fraction(1, 100))
>>> spread_in({"k": k, "a": Fraction(3)}), centre_of({"k": k, "a": Fraction(3)})
(True, {'k': Fraction(2, 1), 'a': Fraction(3, 1)})
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from fractions import Fraction


@dataclass(frozen=True)
class Within:
    """Every value from ``low`` to ``high`` inclusive (low < high; a single value is a plain Fraction)."""

    low: Fraction
    high: Fraction

    def __post_init__(self) -> None:
        if not self.low < self.high:
            raise ValueError("Within needs low < high")

    @property
    def centre(self) -> Fraction:
        return (self.low + self.high) / 2

    @property
    def radius(self) -> Fraction:
        return (self.high - self.low) / 2

    def text(self) -> str:
        """The exact form used in cache keys and echoes: ``low..high`` as ratios."""
        return f"{_ratio(self.low)}..{_ratio(self.high)}"


#: what the engine takes for a parameter's value
ParameterValue = Fraction | Within


def _ratio(value: Fraction) -> str:
    return f"{value.numerator}/{value.denominator}"


def spread_in(values: Mapping[str, ParameterValue]) -> bool:
    """Whether any parameter is known only within bounds."""
    return any(isinstance(v, Within) for v in values.values())


def centre_of(values: Mapping[str, ParameterValue]) -> dict[str, Fraction]:
    """Every parameter at its box's centre: exact rationals only."""
    return {name: v.centre if isinstance(v, Within) else v for name, v in values.items()}


def value_text(value: ParameterValue) -> str:
    """Exact text of a parameter's value: ``n/d`` or ``n/d..n/d``."""
    return value.text() if isinstance(value, Within) else _ratio(value)
