"""What the engine returns: plain frozen data, independent of any transport.

Kept free of heavy imports (no mpmath, flint or compiled engine), so the client can build these types
without loading the engine.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any


@dataclass(frozen=True)
class PanelReport:
    lower: float                      # panel start, rounded down
    upper: float                      # panel end, rounded up
    contribution: tuple[float, float]  # enclosure of the integral over the panel
    bound: str                        # which error bound certified it


@dataclass(frozen=True)
class IntegralResult:
    """A certified definite integral.

    ``enclosure`` provably contains the exact integral of the formula as
    written; ``error_bound`` >= |exact − value|.  When ``tolerance_met`` is
    False the enclosure is still rigorous, only wider than asked.
    """

    value: float
    enclosure: tuple[float, float]
    error_bound: float
    tolerance: float
    tolerance_met: bool
    stop_reason: str                  # tolerance_met | node_budget | deadline | resolution_limit
    nodes: int
    panels: int
    integrand: str
    lower_limit: str
    upper_limit: str
    precision_bits: int
    compute_seconds: float
    mesh: tuple[PanelReport, ...] | None = field(default=None, repr=False)
    bounds_used: dict[str, int] = field(default_factory=dict)
    applied_tolerance: float | None = None  # the absolute bound the error bound was held to: the tolerance,
                                            # or relative_tolerance × |integral| where that is larger


@dataclass(frozen=True)
class RulePlan:
    rule: str                  # "simpson" or "trapezoid"
    intervals: int             # panels for Simpson (each with a midpoint), intervals for trapezoid
    nodes: int
    spacing: float             # node spacing h, rounded down
    derivative_order: int      # 4 or 2
    derivative_bound: float | None  # rigorous upper bound of max|f^(k)| on [a, b]
    error_bound: float | None  # the textbook bound achieved with this many intervals
    available: bool
    reason: str | None = None


@dataclass(frozen=True)
class Plan:
    """A priori uniform node counts guaranteed by the global derivative bounds."""

    integrand: str
    lower_limit: str
    upper_limit: str
    tolerance: float
    simpson: RulePlan
    trapezoid: RulePlan
    subintervals_for_bounds: int
    compute_seconds: float


@dataclass(frozen=True)
class CheckResult:
    """``pass``: certified |claimed − exact| <= tolerance; ``fail``: certified > tolerance;
    ``undecided``: the budget or deadline ran out before either could be proven."""

    verdict: str
    claimed_value: Any                # the caller's number, unchanged (a JSON number arrives as its exact Decimal)
    tolerance: float                  # applied: the largest float64 not above the tolerance given
    distance: tuple[float, float]   # certified lower and upper bounds of |claimed − exact|
    integral: IntegralResult
