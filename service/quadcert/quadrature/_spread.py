"""Limits that depend on a parameter known within bounds: a fixed limit, and an edge piece for the rest.

∫ from a(p) to b(p) is split at exact points cₐ and c_b (the limits at the box's centre, as simple
rationals): ∫ from cₐ to c_b by the panels, plus the edge pieces (b(p) − c_b)·f̄ and (cₐ − a(p))·f̄, where f̄
is the mean of f between the two points. The mean lies in f's range there, which interval evaluation over
the hull of the point and every possible limit encloses for every p in the box at once. The pieces' whole
width counts as the parameters' spread: finer panels cannot narrow it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from ..arithmetic import ParameterValue, Within, centre_of, fraction_down, fraction_up, reference
from ..derivatives import Program
from ..errors import ArithmeticFault, NotCertifiable
from ..formula import Formula, Negate, Number, parameters_used
from ..formula._parser import CONSTANT_ONLY
from ._composite import simplest_between
from ._endpoints import enclose_limit, infinite_side

_PRECISION = 128


@dataclass(frozen=True)
class Edge:
    """The part of the integral between a limit's centre point and its possible values."""

    low: Fraction
    high: Fraction


def spread_used(formula: Formula, limits: tuple[Formula, ...], values: dict[str, ParameterValue]) -> bool:
    """Whether the integrand or a limit uses a parameter known only within bounds."""
    if not any(isinstance(value, Within) for value in values.values()):
        return False  # the common case, answered without walking the formulas
    names = set(parameters_used(formula.root)).union(*(parameters_used(limit.root) for limit in limits))
    return any(isinstance(values.get(name), Within) for name in names)


def fixed_limit(
    formula: Formula, limit: Formula, values: dict[str, ParameterValue], field: str, side: int
) -> tuple[Formula, Edge | None]:
    """The limit to integrate to, and the edge piece to add (None when the limit is one number already).

    ``side`` is +1 for the upper limit and −1 for the lower one (whose edge enters with the opposite sign).
    """
    if infinite_side(limit) or not any(isinstance(values.get(n), Within) for n in parameters_used(limit.root)):
        return limit, None
    ar = reference(_PRECISION)
    centre_low, centre_high = ar.bounds_exact(enclose_limit(limit, ar, centre_of(values), field))
    point = simplest_between(centre_low, centre_high)
    box = enclose_limit(limit, ar, values, field)
    fixed = Formula(Number(point) if point >= 0 else Negate(Number(-point)), CONSTANT_ONLY)
    where = f"over the {field.replace('_', ' ')}'s possible values"
    piece: Any = range_piece(Program(formula, ar, values), ar, ar.exact(point), box, where)
    if side < 0:
        piece = ar.neg(piece)
    low, high = ar.bounds_exact(piece)
    return fixed, Edge(low, high)


def range_piece(program: Program[Any], ar: Any, start: Any, stop: Any, where: str) -> Any:
    """∫ from start to stop of f as (stop − start)·f(hull): the mean of f lies in its range there. Refused with
    ``unbounded_near`` and the stretch as its location when f cannot be bounded on it."""
    stretch = ar.hull(start, stop)
    try:
        values_on = program.value(stretch)
    except ArithmeticFault as fault:
        raise NotCertifiable(
            f"the integrand cannot be bounded {where}: {fault.message}",
            code="unbounded_near",
            location=ar.bounds(stretch),
        ) from None
    return ar.mul(ar.sub(stop, start), values_on)


def edge_bounds(edges: list[Edge]) -> tuple[Fraction, Fraction]:
    """The edges' sum, exactly."""
    return sum((e.low for e in edges), Fraction(0)), sum((e.high for e in edges), Fraction(0))


def widened(low: float, high: float, edges: list[Edge]) -> tuple[float, float]:
    """[low, high] plus the edges, rounded outward to float64."""
    if not edges or not (math.isfinite(low) and math.isfinite(high)):
        return low, high  # an infinite end stays infinite (and the result is refused as out of range)
    add_low, add_high = edge_bounds(edges)
    return fraction_down(Fraction(low) + add_low), fraction_up(Fraction(high) + add_high)
