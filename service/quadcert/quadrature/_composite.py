"""An integral in pieces: envelope pieces at singular ends and infinite limits, panels in between.

Used when a limit is infinite, or when the panels meet a point where the integrand cannot be evaluated (at an
end, or inside the interval: the point is then located exactly, as the simplest rational inside the reported
enclosure, and proved singular by the envelope rules or the request is refused). The envelope pieces share a
quarter of the tolerance; the panel stretches share what is left.
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Callable, Mapping
from dataclasses import replace
from fractions import Fraction
from typing import Any

from ..arithmetic import ParameterValue, fraction_down, fraction_up, reference
from ..derivatives import Program
from ..errors import ArithmeticFault, NotCertifiable
from ..formula import Formula
from ..improper import Piece, end_piece, shifted, tail_piece
from ._endpoints import exact_limit, infinite_side
from ._result import PanelReport

INTERIOR_CODES = frozenset({"undefined_at_point", "unbounded_near"})
MAX_BREAKPOINTS = 8
_PIECE_SHARE = Fraction(1, 4)  # of the tolerance, for all envelope pieces together (widths)
_PANEL_SHARE = Fraction(95, 100)  # of what is left, for the panel stretches (bounds); the rest absorbs rounding

_GROWTH = Fraction(2**10)

End = Any  # Fraction (exact), Formula (enclosed), or the int ±1 (an infinite limit)


def needs_pieces(lower: Formula, upper: Formula) -> bool:
    """Only infinite limits go to pieces at once; singular points are found by the panels' refusal."""
    return bool(infinite_side(lower) or infinite_side(upper))


def simplest_between(low: Fraction, high: Fraction) -> Fraction:
    """The rational with the smallest denominator in [low, high] (a Stern–Brocot descent).

    >>> simplest_between(Fraction(0.3), Fraction(0.30000000000000004))
    Fraction(3, 10)
    """
    if low > high:
        low, high = high, low
    if low <= 0 <= high:
        return Fraction(0)
    if high < 0:
        return -simplest_between(-high, -low)
    whole = math.floor(low)
    if whole == low or whole + 1 <= high:
        return Fraction(whole if whole == low else whole + 1)
    # low < x < high inside (whole, whole + 1): recurse on the reciprocals of the fractional parts
    return whole + 1 / simplest_between(1 / (high - whole), 1 / (low - whole))


class _Ends:
    """Order, exactness and singularity of the points that bound the stretches."""

    def __init__(self, formula: Formula, values: Mapping[str, ParameterValue]) -> None:
        self.formula, self.values = formula, values
        self.ar = reference(128)
        self.program = Program(formula, self.ar, values)
        self.rough_ar = reference(53)  # sizes that only steer the work
        self.rough = Program(formula, self.rough_ar, values)
        self._numeric: dict[Formula, tuple[Fraction, Fraction]] = {}

    def numeric(self, end: End) -> tuple[Fraction, Fraction] | None:
        """Exact bounds of a finite end; None for an infinite one."""
        if isinstance(end, int):
            return None
        if isinstance(end, Fraction):
            return end, end
        if end not in self._numeric:
            from ._endpoints import enclose_limit

            self._numeric[end] = self.ar.bounds_exact(enclose_limit(end, self.ar, dict(self.values), "limit"))
        return self._numeric[end]

    def exact(self, end: End) -> Fraction | None:
        if isinstance(end, Fraction):
            return end
        if isinstance(end, Formula):
            return exact_limit(end)
        return None

    def singular(self, end: End) -> bool:
        point = self.exact(end)
        if point is None:
            return False
        try:
            self.program.value(self.ar.exact(point))
        except ArithmeticFault:
            return True
        return False


def integrate_pieces(
    formula: Formula,
    values: Mapping[str, ParameterValue],
    lower: Formula,
    upper: Formula,
    tolerance: float,
    settings: Any,
    segment: Callable[..., Any],
    refusal: NotCertifiable | None = None,
) -> Any:
    """The composite integral as one Segment (see ``_integrate.segment``), in the caller's orientation."""
    ends = _Ends(formula, values)
    a: End = infinite_side(lower) or lower
    b: End = infinite_side(upper) or upper
    sign = 1
    if _after(ends, a, b):
        a, b, sign = b, a, -1
    points: list[Fraction] = []
    if (
        refusal is not None
        and not _add_point(ends, a, b, points, refusal)
        and not (ends.singular(a) or ends.singular(b))
    ):
        raise refusal
    while True:
        try:
            result = _assemble(formula, values, ends, [a, *points, b], tolerance, settings, segment)
        except NotCertifiable as again:
            if again.code in INTERIOR_CODES and len(points) < MAX_BREAKPOINTS and _add_point(ends, a, b, points, again):
                continue
            if refusal is not None and again.code == "singularity_not_bounded":
                # not an isolated singularity the rules can bound (log(x) on [−1, 1] is undefined on a whole
                # stretch): the panels' own refusal says more
                raise refusal from None
            raise
        return _oriented(result, sign)


def _after(ends: _Ends, a: End, b: End) -> bool:
    """True when a lies after b, so the integral runs backwards (a and b are never the same limit here)."""
    if isinstance(a, int) or isinstance(b, int):
        return bool(a == 1 or b == -1)
    a_ends, b_ends = ends.numeric(a), ends.numeric(b)
    assert a_ends is not None and b_ends is not None  # finite ends: the infinite ones were decided above
    (a_lo, a_hi), (b_lo, b_hi) = a_ends, b_ends
    if a_hi < b_lo:
        return False
    if b_hi < a_lo:
        return True
    raise NotCertifiable("the limits are too close to order", code="unbounded_near")


def _add_point(ends: _Ends, a: End, b: End, points: list[Fraction], refusal: NotCertifiable) -> bool:
    """Add the singular point the refusal located; False when it is no new point strictly inside."""
    if refusal.location is None or not all(math.isfinite(v) for v in refusal.location):
        return False
    point = simplest_between(Fraction(refusal.location[0]), Fraction(refusal.location[1]))
    a_hi = None if isinstance(a, int) else ends.numeric(a)[1]  # type: ignore[index]
    b_lo = None if isinstance(b, int) else ends.numeric(b)[0]  # type: ignore[index]
    inside = (a_hi is None or point > a_hi) and (b_lo is None or point < b_lo)
    if not inside or point in points or not ends.singular(point):
        return False
    points.append(point)
    points.sort()
    return True


def _assemble(
    formula: Formula,
    values: Mapping[str, ParameterValue],
    ends: _Ends,
    chain: list[End],
    tolerance: float,
    settings: Any,
    segment: Callable[..., Any],
) -> Any:
    stretches = list(itertools.pairwise(chain))
    plans = []
    for u, v in stretches:
        plans.append((isinstance(u, int) or ends.singular(u), isinstance(v, int) or ends.singular(v)))
    count = sum(left + right for left, right in plans)
    budget = Fraction(tolerance) * _PIECE_SHARE / max(count, 1)
    pieces: list[Piece] = []
    cuts: list[tuple[Any, Any]] = []
    origins: list[Fraction | None] = []
    for (u, v), (left, right) in zip(stretches, plans):
        start, stop = u, v
        if left:
            piece = _piece(formula, values, ends, u, v, +1, budget)
            pieces.append(piece)
            start = piece.cut
        if right:
            piece = _piece(formula, values, ends, v, start, -1, budget)
            pieces.append(piece)
            stop = piece.cut
        parts = _graded(ends, start, stop, u, v, left, right)
        cuts.extend(parts)
        origins.extend(_origin(ends, part, u if left else None, v if right else None) for part in parts)
    used = sum((p.enclosure[1] - p.enclosure[0] for p in pieces), Fraction(0)) / 2
    shares = _shares(ends, cuts, (Fraction(tolerance) - used) * _PANEL_SHARE)
    # the node budget is shared too, so that max_nodes still bounds the work of the whole request
    settings = replace(settings, max_nodes=max(settings.max_nodes // len(cuts), 3))
    low, high = Fraction(0), Fraction(0)
    nodes = panels = 0
    stops: list[str] = []
    mesh: list[PanelReport] = []
    bounds_used: dict[str, int] = {}
    precision = 53
    spread = Fraction(0)
    for (start, stop), share, origin in zip(cuts, shares, origins):
        if origin is None:
            part = segment(
                formula,
                dict(values),
                start,
                stop,
                lambda _lo, _hi, share=share: share,
                share,
                settings,
                precision_floor=_bits_to_resolve(ends, start, stop),
            )
        else:  # next to a singular point c: ∫ f(c + t) dt over [start − c, stop − c]
            part = segment(
                shifted(formula, origin),
                dict(values),
                start - origin,
                stop - origin,
                lambda _lo, _hi, share=share: share,
                share,
                settings,
                precision_floor=_bits_to_resolve(ends, start - origin, stop - origin),
            )
            part = _moved(part, origin)
        if not (math.isfinite(part.low) and math.isfinite(part.high)):
            raise NotCertifiable("the integral is beyond the float64 range", code="result_out_of_range")
        low += Fraction(part.low)
        high += Fraction(part.high)
        nodes, panels = nodes + part.nodes, panels + part.panels
        stops.append(part.stop)
        mesh.extend(part.mesh)
        precision = max(precision, part.precision_bits)
        spread += part.spread
        for name, n in part.bounds_used.items():
            bounds_used[name] = bounds_used.get(name, 0) + n
    for piece in pieces:
        low += piece.enclosure[0]
        high += piece.enclosure[1]
        bounds_used[piece.kind] = bounds_used.get(piece.kind, 0) + 1
        mesh.append(_report(piece))
    stop = next((s for s in stops if s != "tolerance_met"), "tolerance_met")
    mesh.sort(key=lambda r: (r.lower, r.upper))
    from ._integrate import Segment

    return Segment(
        fraction_down(low),
        fraction_up(high),
        stop,
        nodes,
        panels + len(pieces),
        tuple(mesh) if settings.include_mesh else (),
        bounds_used,
        precision,
        spread,
    )


def _origin(ends: _Ends, part: tuple[Any, Any], left: End | None, right: End | None) -> Fraction | None:
    """The singular point a part of a stretch is integrated from, when that point is not 0 and the part is
    near it (within a thousandth of the point's size), else None."""
    start, stop = part
    for end, other in ((left, stop), (right, start)):
        point = None if end is None or isinstance(end, int) else ends.exact(end)
        if point is None or point == 0 or not isinstance(other, Fraction):
            continue
        if abs(other - point) <= abs(point) / 1024:
            return point
    return None


def _moved(part: Any, origin: Fraction) -> Any:
    """A part integrated in t = x − c, with its mesh moved back to x (ends rounded outward)."""
    mesh = tuple(
        PanelReport(
            fraction_down(Fraction(r.lower) + origin), fraction_up(Fraction(r.upper) + origin), r.contribution, r.bound
        )
        for r in part.mesh
    )
    return replace(part, mesh=mesh)


def _bits_to_resolve(ends: _Ends, start: Any, stop: Any) -> int:
    """Bits that resolve the stretch's own width next to the size of its ends, with 64 to spare (a stretch
    [1e-40, 2e-40] needs no more than [1, 2]; one [1/3, 1/3 + 1e-40] needs about 133 more)."""
    low, high = ends.numeric(start), ends.numeric(stop)
    if low is None or high is None or high[0] <= low[1]:
        return 0
    scale = max(abs(low[0]), abs(high[1]))
    return 64 + (scale / (high[0] - low[1])).__ceil__().bit_length()


def _shares(ends: _Ends, cuts: list[tuple[Any, Any]], total: Fraction) -> list[float]:
    """The panel stretches' shares of the tolerance: half split evenly, half in proportion to a rough size of
    ∫|f| on each (|f| at the midpoint times the length). float64's floor on a stretch is proportional to that
    size, so a stretch holding most of the integral also gets most of the tolerance. Steering only: every
    stretch still certifies its own share."""
    sizes = []
    for start, stop in cuts:
        low, high = ends.numeric(start), ends.numeric(stop)
        size = 0.0
        if low is not None and high is not None:
            a, b = low[1], high[0]
            try:
                value = ends.rough.value(ends.rough_ar.exact((a + b) / 2))
                size = max(abs(v) for v in ends.rough_ar.bounds(value)) * float(b - a)
            except (ArithmeticFault, OverflowError):
                pass
        sizes.append(size if math.isfinite(size) else 0.0)
    whole = sum(sizes)
    n = len(cuts)
    return [
        fraction_down(
            total * (Fraction(1, 2 * n) + (Fraction(size) / Fraction(whole) / 2 if whole else Fraction(1, 2 * n)))
        )
        for size in sizes
    ]


def _graded(ends: _Ends, start: Any, stop: Any, u: End, v: End, left: bool, right: bool) -> list[tuple[Any, Any]]:
    """The stretch between two envelope pieces, cut into parts over which the panels can start coarse.

    Next to a singular point the panels must shrink to the piece's size δ, and in front of a tail they must
    span up to T; one stretch for all of it would need a bisection depth, and a first coarse panel, that the
    compiled engine refuses. The parts grow geometrically, by a factor 2^10, away from the point or in from
    the tail, and meet in the middle.
    """
    low = ends.numeric(start)
    high = ends.numeric(stop)
    if low is None or high is None:
        return [(start, stop)]
    middle = (low[1] + high[0]) / 2
    if right and isinstance(v, int) and not isinstance(u, int):
        middle = min(middle, low[1] + 1)  # a singular point before a tail: its parts stop one unit away
    if left and isinstance(u, int) and not isinstance(v, int):
        middle = max(middle, high[0] - 1)
    marks: set[Fraction] = set()
    if left and isinstance(u, int):  # from −T in towards the stretch
        mark = Fraction(start) / _GROWTH
        while mark < min(middle, Fraction(-1), 2 * high[0]):
            marks.add(mark)
            mark /= _GROWTH
    elif left:
        origin = ends.exact(u)
        assert origin is not None  # a finite end of a stretch next to a singular point is exact
        step = (low[0] - origin) * _GROWTH
        while origin + step < middle:
            marks.add(origin + step)
            step *= _GROWTH
    if right and isinstance(v, int):  # from T in towards the stretch
        mark = Fraction(stop) / _GROWTH
        while mark > max(middle, Fraction(1), 2 * low[1]):
            marks.add(mark)
            mark /= _GROWTH
    elif right:
        origin = ends.exact(v)
        assert origin is not None
        step = (origin - high[1]) * _GROWTH
        while origin - step > middle:
            marks.add(origin - step)
            step *= _GROWTH
    points = [start, *sorted(m for m in marks if low[1] < m < high[0]), stop]
    return list(itertools.pairwise(points))


def _piece(
    formula: Formula,
    values: Mapping[str, ParameterValue],
    ends: _Ends,
    end: End,
    other: End,
    side: int,
    budget: Fraction,
) -> Piece:
    if isinstance(end, int):  # a tail: it must start beyond the other end of its stretch
        other_bounds = ends.numeric(other) if not isinstance(other, int) else (Fraction(0), Fraction(0))
        reach = max(abs(other_bounds[0]), abs(other_bounds[1])) + 1  # type: ignore[index]
        return tail_piece(formula, values, end, reach, budget)
    point = ends.exact(end)
    assert point is not None
    if isinstance(other, int):
        room = Fraction(1)
    else:
        lo, hi = ends.numeric(other)  # type: ignore[misc]
        room = (lo - point) if side > 0 else (point - hi)
    return end_piece(formula, values, point, side, budget, room)


def _report(piece: Piece) -> PanelReport:
    if piece.near is None:
        lower, upper = (float(piece.cut), math.inf) if piece.cut > 0 else (-math.inf, float(piece.cut))
    else:
        lower, upper = sorted((float(piece.near), float(piece.cut)))
    return PanelReport(lower, upper, (fraction_down(piece.enclosure[0]), fraction_up(piece.enclosure[1])), piece.kind)


def _oriented(result: Any, sign: int) -> Any:
    if sign > 0:
        return result
    mesh = tuple(PanelReport(r.lower, r.upper, (-r.contribution[1], -r.contribution[0]), r.bound) for r in result.mesh)
    return replace(result, low=-result.high, high=-result.low, mesh=mesh)
