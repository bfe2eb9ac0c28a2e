"""The picture's data: for every panel of a certified mesh, an enclosure of f over the panel (a box).

The boxes are certified like everything else: each is f enclosed over the panel's outward-rounded ends, by
the compiled float64 engine where the formula compiles, else by the reference backend at 53 bits. A panel
where f cannot be bounded (a piece next to a singular point, a tail) has no box; the picture marks it.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from fractions import Fraction
from functools import partial

from ..arithmetic import ParameterValue
from ..arithmetic import reference as reference_arithmetic
from ..derivatives import Program
from ..errors import QuadcertError
from ..formula import Formula
from ..quadrature import PanelReport, _fast

#: bounds that mark a panel in the picture: lower-order Peano bounds and range bounds, and the envelope pieces
LOW_ORDER = frozenset({"simpson-f3", "simpson-f2", "simpson-f1", "range"})
ENVELOPES = frozenset({"singular-envelope", "tail-envelope"})

Range = tuple[float, float] | None


@dataclass(frozen=True)
class Box:
    """One panel as drawn: its ends, f's enclosure over it (None: not bounded), and its share of the error."""

    lower: float
    upper: float
    f_range: Range
    error: float  # half the width of the panel's contribution: its share of the error bound
    bound: str


def boxes(formula: Formula, values: Mapping[str, ParameterValue], mesh: Sequence[PanelReport]) -> list[Box]:
    """A box per panel, in the mesh's order."""
    enclose = _enclosure(formula, values)
    result = []
    for panel in mesh:
        f_range = None
        if panel.bound not in ENVELOPES and math.isfinite(panel.lower) and math.isfinite(panel.upper):
            f_range = enclose(panel.lower, panel.upper)
        low, high = panel.contribution
        error = (high - low) / 2 if math.isfinite(high - low) else math.inf
        result.append(Box(panel.lower, panel.upper, f_range, error, panel.bound))
    return result


#: the share of the interval whose tallest boxes may reach beyond the picture's y axis (and are clipped there)
CLIPPED_SHARE = 0.02
#: ... but only when the full range is this many times the rest's: a smooth f is always shown whole
OUTLIER_FACTOR = 4.0


def y_range(drawn: Sequence[Box]) -> tuple[float, float]:
    """The y axis: every box; or, where a few boxes tower over the rest, all but the tallest ones that together
    span at most 2% of the interval (next to a singular point f grows without bound, and one axis for all of it
    would flatten the rest to a line)."""
    finite = [b for b in drawn if b.f_range is not None and math.isfinite(b.upper - b.lower)]
    if not finite:
        return -1.0, 1.0
    span = sum(b.upper - b.lower for b in finite)
    allowance = CLIPPED_SHARE * span

    def edge(values: list[tuple[float, float]]) -> float:
        used = 0.0
        for value, width in values:
            used += width
            if used > allowance:
                return value
        return values[-1][0]

    full_low = min(b.f_range[0] for b in finite if b.f_range)
    full_high = max(b.f_range[1] for b in finite if b.f_range)
    high = edge(sorted(((b.f_range[1], b.upper - b.lower) for b in finite if b.f_range), reverse=True))
    low = -edge(sorted(((-b.f_range[0], b.upper - b.lower) for b in finite if b.f_range), reverse=True))
    if not high > low:
        low, high = low - 1, high + 1
    if full_high - full_low <= OUTLIER_FACTOR * (high - low):  # nothing towers over the rest: show it all
        return full_low, full_high
    return low, high


def _enclosure(formula: Formula, values: Mapping[str, ParameterValue]) -> Callable[[float, float], Range]:
    """f over [a, b] as two floats, or None; the compiled engine when the formula compiles."""
    compiled = _fast.compile_formula(formula, values) if _fast.AVAILABLE and _fast.trusted() else None
    if compiled is not None:
        return partial(_fast.value_range, compiled)
    ar = reference_arithmetic(53)
    try:
        program = Program(formula, ar, values)
    except QuadcertError:
        return lambda a, b: None

    def reference(a: float, b: float) -> Range:
        try:
            low, high = ar.bounds(program.value(ar.from_bounds(Fraction(a), Fraction(b))))
        except QuadcertError:
            return None
        return (low, high) if math.isfinite(low) and math.isfinite(high) else None

    return reference
