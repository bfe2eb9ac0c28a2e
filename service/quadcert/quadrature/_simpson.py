"""Certified adaptive composite Simpson quadrature.

Each panel [p, q] gets an enclosure of its exact integral from the best of
several rigorous bounds (see ``_peano``): Simpson's sum plus the signed
f⁗ remainder, Simpson's sum plus an absolute f‴, f″ or f′ bound, or the
plain range H·f([p, q]).  They are intersected, so a less smooth integrand
is still certified, only with more nodes.  The worst panel is bisected until
the summed enclosure meets the tolerance or a budget runs out; nodes are
enclosures too (limits like 0.1 or pi/2 are not binary numbers) and every
function value is computed once.
"""

from __future__ import annotations

import heapq
import math
import time
from collections.abc import Callable
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from ..arithmetic import Arithmetic, interval_text, shown
from ..derivatives import Program
from ..errors import ArithmeticFault, MagnitudeExceeded, NotCertifiable
from . import _gauss, _peano
from ._finish import discretisation_bound, error_bound
from ._result import PanelReport

MAX_DEPTH = 60
GAUSS = -2  # the order key of the Gauss–Legendre bound (the Peano bounds are keyed by their derivative order)
FLOAT_FLOOR = "float_floor"  # internal stop reason, reported as resolution_limit
_FLOOR_ULPS = 4  # once the panels sum to within this many ulps of the total, look whether float64 is the limit
_HALF, _SIXTH = Fraction(1, 2), Fraction(1, 6)


@dataclass
class _Panel:
    p: Any
    m: Any
    q: Any
    fp: Any
    fm: Any
    fq: Any
    depth: int
    enclosure: Any = None  # None: not bounded yet on this panel
    order: int = -1  # the bound that gave the narrowest enclosure
    width: float = math.inf
    centre: float = 0.0  # float midpoint of the enclosure, for the running estimate only
    fault: str = ""
    spread: float = 0.0  # with parameters known within bounds: the width their spread accounts for
    extra: int = 0  # evaluations beyond the shared Simpson nodes (a Gauss–Legendre panel's own nodes)


@dataclass
class Outcome:
    enclosure: Any
    panels: list[_Panel]
    nodes: int
    stop_reason: str
    spread: Fraction = Fraction(0)  # the panels' spreads, summed exactly


def _enclose(
    program: Program[Any], ar: Arithmetic[Any], panel: _Panel, rule: str, points: int
) -> tuple[Any, int, float]:
    """Rigorous enclosure of the panel's integral: every available bound, intersected; with the width of the
    best bound's rule sum itself (what parameters known within bounds, and rounding, put into it).

    With ``rule`` "gauss-legendre" or "auto", a panel on which f is 2n times differentiable also gets the
    Gauss–Legendre bound with ``points`` nodes (``_gauss``); "gauss-legendre" then skips Simpson's f⁗ bound
    there."""
    gauss = rule != "simpson"
    series = program.taylor(ar.hull(panel.p, panel.q), 2 * points if gauss else 4)
    width = ar.sub(panel.q, panel.p)
    simpson = ar.scale(ar.mul(width, ar.add(ar.add(panel.fp, panel.fq), ar.scale(panel.fm, Fraction(4)))), _SIXTH)
    candidates: list[tuple[int, Any]] = [(0, ar.mul(width, series[0]))]
    smooth = len(series) == 2 * points + 1
    gauss_sum = simpson  # the rule's own sum, where it is computed
    if gauss and smooth:
        gauss_sum, panel.extra = _gauss.panel_sum(ar, program.value, panel.p, panel.q, points)
        candidates.append((GAUSS, ar.add(gauss_sum, _gauss.remainder(ar, width, series[-1], points))))
    peano = not (rule == "gauss-legendre" and smooth)  # Simpson's bounds: everywhere but the rule's panels
    if len(series) >= 5 and peano:
        remainder = ar.mul(ar.scale(ar.pow_int(width, 5), _peano.SIGNED_4 * 24), series[4])
        candidates.append((4, ar.add(simpson, remainder)))
    for k in (3, 2, 1):
        if len(series) > k and peano:
            size = ar.function("abs", series[k])
            radius = ar.mul(ar.scale(ar.pow_int(width, k + 1), _peano.ABSOLUTE[k] * _peano.FACTORIAL[k]), size)
            candidates.append((k, ar.add(simpson, ar.hull(ar.neg(radius), radius))))
    best_order, best = min(candidates, key=lambda c: ar.width(c[1]))
    enclosure = best
    for _, other in candidates:
        enclosure = ar.intersect(enclosure, other)
    return enclosure, best_order, ar.width(gauss_sum if best_order == GAUSS else simpson)


class ExactSum:
    """A running sum of floats kept exactly, as an integer count of 2**-1074 (the smallest subnormal), so
    that adding and later removing terms leaves no rounding error behind.

    >>> s = ExactSum(); s.add(1e10); s.add(1e-10); s.remove(1e10); s.value()
    1e-10
    """

    __slots__ = ("infinite", "units")
    _SCALE = 1074

    def __init__(self) -> None:
        self.units = 0
        self.infinite = 0

    def _units(self, term: float) -> int | None:
        if not math.isfinite(term):
            return None
        numerator, denominator = term.as_integer_ratio()
        return numerator * ((1 << self._SCALE) // denominator)

    def add(self, term: float) -> None:
        units = self._units(term)
        if units is None:
            self.infinite += 1
        else:
            self.units += units

    def remove(self, term: float) -> None:
        units = self._units(term)
        if units is None:
            self.infinite -= 1
        else:
            self.units -= units

    def exact(self) -> Fraction:
        """The sum as an exact rational (infinite terms are left out)."""
        return Fraction(self.units, 1 << self._SCALE)

    def value(self) -> float:
        """The sum, correctly rounded (inf while an infinite term is in it, ±inf past the float range).

        >>> s = ExactSum(); s.add(1.7e308); s.add(1.7e308); s.value()
        inf
        """
        if self.infinite:
            return math.inf
        try:
            return self.units / (1 << self._SCALE)
        except OverflowError:
            return math.inf if self.units > 0 else -math.inf


class Refiner:
    """One adaptive run over [a, b] with a < b; not shared between threads."""

    def __init__(
        self,
        program: Program[Any],
        ar: Arithmetic[Any],
        *,
        max_nodes: int,
        deadline: float | None,
        retry: Callable[[int], Program[Any]] | None = None,
        fallback: Program[Any] | None = None,
        rule: str = "simpson",
        points: int,
    ) -> None:
        self.program = program
        self.variable = program.formula.variable
        self.ar = ar
        self.max_nodes = max_nodes
        self.deadline = deadline
        self.retry = retry
        self.fallback = fallback  # a program on the reference backend, whose panels have exact endpoints
        self.values: dict[int, tuple[Any, Any]] = {}  # id(node) -> (node, value); nodes are shared objects
        self.bounds_used: dict[str, int] = {}
        #: parameters known within bounds: refine and stop on the width bisection can remove, not the whole
        self.spread = program.spread
        self.rule = rule
        self.points = points  # Gauss–Legendre nodes per panel (``_gauss.points_for``)
        #: reported for the bound that certified a panel
        self.names = {**_peano.BOUND_NAMES, GAUSS: _gauss.name(points)}
        self.extra_nodes = 0  # Gauss–Legendre nodes, which no other panel shares

    # -- function values at nodes --------------------------------------------------------------
    def value_at(self, node: Any) -> Any:
        known = self.values.get(id(node))
        if known is not None:
            return known[1]
        try:
            value = self.program.value(node)
        except ArithmeticFault as fault:
            value = self._retry_value(node, fault)
        self.values[id(node)] = (node, value)
        return value

    def _retry_value(self, node: Any, fault: ArithmeticFault) -> Any:
        where = self._where(node)
        if not fault.certain and self.retry is not None:
            for factor in (2, 4):
                try:
                    return self.retry(self.ar.prec * factor).value(node)
                except ArithmeticFault as again:
                    fault = again
                    if again.certain:
                        break
        code = "magnitude_exceeded" if isinstance(fault, MagnitudeExceeded) else "undefined_at_point"
        raise NotCertifiable(
            f"the integrand cannot be evaluated at {self.variable} = {where}: {fault.message}",
            code=code,
            location=self.ar.bounds(node),
        ) from None

    def _where(self, node: Any) -> str:
        lo, hi = self.ar.bounds(node)
        return shown(lo, 6, "near") if lo == hi else shown((lo + hi) / 2, 6, "near")

    # -- panels ------------------------------------------------------------------------------
    def panel(self, p: Any, q: Any, fp: Any, fq: Any, depth: int) -> _Panel:
        ar = self.ar
        m = ar.scale(ar.add(p, q), _HALF)
        panel = _Panel(p, m, q, fp, self.value_at(m), fq, depth)
        self._certify(panel)
        return panel

    def _certify(self, panel: _Panel) -> None:
        ar = self.ar
        try:
            try:
                enclosure, order, spread = _enclose(self.program, ar, panel, self.rule, self.points)
            except ArithmeticFault as fault:
                if fault.certain or self.fallback is None or isinstance(fault, MagnitudeExceeded):
                    raise
                enclosure, order, spread = self._enclose_on_fallback(panel)
        except MagnitudeExceeded as fault:
            panel.fault = fault.message
            return
        except ArithmeticFault as fault:
            if fault.certain:
                lo, hi = ar.bounds(ar.hull(panel.p, panel.q))
                raise NotCertifiable(
                    f"the integrand is undefined on {interval_text(lo, hi)}: {fault.message}",
                    code="undefined_on_interval",
                    location=(lo, hi),
                ) from None
            panel.fault = fault.message
            return
        panel.enclosure, panel.order, panel.width = enclosure, order, ar.width(enclosure)
        self.extra_nodes += panel.extra
        if self.spread:  # the heap and the stop rule see only what bisection can still remove
            panel.spread = min(spread, panel.width)
            panel.width -= panel.spread

    def _enclose_on_fallback(self, panel: _Panel) -> tuple[Any, int, float]:
        """The same panel on the reference backend (exact endpoints), converted back exactly."""
        assert self.fallback is not None
        ar, ref = self.ar, self.fallback.ar
        p, m, q, fp, fm, fq = (
            ref.from_bounds(*ar.bounds_exact(v)) for v in (panel.p, panel.m, panel.q, panel.fp, panel.fm, panel.fq)
        )
        moved = _Panel(p, m, q, fp, fm, fq, panel.depth)
        enclosure, order, spread = _enclose(self.fallback, ref, moved, self.rule, self.points)
        panel.extra = moved.extra
        return ar.from_bounds(*ref.bounds_exact(enclosure)), order, spread

    def split(self, panel: _Panel) -> tuple[_Panel, _Panel]:
        return (
            self.panel(panel.p, panel.m, panel.fp, panel.fm, panel.depth + 1),
            self.panel(panel.m, panel.q, panel.fm, panel.fq, panel.depth + 1),
        )

    # -- the loop ----------------------------------------------------------------------------
    def run(
        self, a: Any, b: Any, target: Callable[[float, float], float], cuts: tuple[tuple[Fraction, int], ...] = ()
    ) -> Outcome:
        """Refine until ``error_bound(total) <= target(low, high)`` of the summed enclosure; from one panel, or
        from the panels between ``cuts`` (exact points inside the limits with the depth of the panel each starts:
        a mesh the compiled engine built before float64's resolution stopped it)."""
        heap: list[tuple[float, int, _Panel]] = []
        counter = 0
        unresolved = 0
        # running sums kept exactly: a float sum that loses a dominant first panel (1e10 wide where the
        # rest is 1e-10) would keep its rounding error of about 1e-6 for good, and the loop would refine
        # far past the tolerance before its estimate came down
        width_sum, centre_sum, spread_sum = ExactSum(), ExactSum(), ExactSum()
        next_check = math.inf  # check exactly once the estimate drops below this

        def push(panel: _Panel) -> None:
            nonlocal counter, unresolved
            heapq.heappush(heap, (-panel.width, counter, panel))
            counter += 1
            if panel.enclosure is None:
                unresolved += 1
            else:
                width_sum.add(panel.width)
                spread_sum.add(panel.spread)
                panel.centre = sum(self.ar.bounds(panel.enclosure)) / 2
                centre_sum.add(panel.centre)

        def pop() -> _Panel:
            nonlocal unresolved
            panel = heapq.heappop(heap)[2]
            if panel.enclosure is None:
                unresolved -= 1
            else:
                width_sum.remove(panel.width)
                spread_sum.remove(panel.spread)
                centre_sum.remove(panel.centre)
            return panel

        for panel in self._first_panels(a, b, cuts):
            push(panel)
        stop = "tolerance_met"
        while True:
            if not unresolved:
                widths, centre = width_sum.value(), centre_sum.value()
                half = widths / 2
                near_target = half <= target(centre - half, centre + half) * 1.01
                # with a parameters' spread, float64's floor is never the limit: the stop reads the part
                # bisection can remove, not the whole width
                at_float_floor = not self.spread and widths <= _FLOOR_ULPS * math.ulp(centre)
                if (near_target or at_float_floor) and widths < next_check:
                    low, high = self.ar.bounds(self.total(p for _, _, p in heap))
                    if self.spread:
                        bound = discretisation_bound(low, high, spread_sum.exact())
                    else:
                        bound = error_bound(low, high)[1]
                    if bound <= target(low, high):
                        break
                    if not self.spread and high <= math.nextafter(math.nextafter(low, math.inf), math.inf):
                        # as narrow as float64 can show it: neither more panels nor more bits can lower
                        # the reported bound
                        stop = FLOAT_FLOOR
                        break
                    next_check = widths * 0.95
            if self.nodes() + 2 + (2 * self.points if self.rule != "simpson" else 0) > self.max_nodes:
                stop = "node_budget"
                break
            if self.deadline is not None and time.monotonic() > self.deadline:
                stop = "deadline"
                break
            worst = heap[0][2]
            if worst.depth >= MAX_DEPTH:
                if worst.enclosure is None:
                    raise self._unbounded(worst)
                stop = "resolution_limit"
                break
            pop()
            for child in self.split(worst):
                push(child)
        panels = [p for _, _, p in heap]
        stuck = [p for p in panels if p.enclosure is None]
        if stuck:
            raise self._unbounded(stuck[0], budget=True)
        for panel in panels:
            name = self.names[panel.order]
            self.bounds_used[name] = self.bounds_used.get(name, 0) + 1
        return Outcome(self.total(panels), panels, self.nodes(), stop, spread_sum.exact())

    def _first_panels(self, a: Any, b: Any, cuts: tuple[tuple[Fraction, int], ...]) -> list[_Panel]:
        """[a, b] as one panel, or split at the cuts that lie strictly between the limits' enclosures, as many
        as the node budget and the deadline allow (the rest of [a, b] is then one panel, so the panels always
        cover it: a mesh of thousands of cuts costs as many certificates before the loop's own checks)."""
        a_high, b_low = self.ar.bounds_exact(a)[1], self.ar.bounds_exact(b)[0]
        panels = []
        start, f_start, depth = a, self.value_at(a), 0
        f_end = self.value_at(b)
        for x, next_depth in cuts:
            if not a_high < x < b_low:
                continue
            if self.nodes() + 4 > self.max_nodes or (self.deadline is not None and time.monotonic() > self.deadline):
                break
            end = self.ar.exact(x)
            f_cut = self.value_at(end)
            panels.append(self.panel(start, end, f_start, f_cut, depth))
            start, f_start, depth = end, f_cut, min(next_depth, MAX_DEPTH)
        panels.append(self.panel(start, b, f_start, f_end, depth))
        return panels

    def nodes(self) -> int:
        """Evaluations so far: the shared Simpson nodes and every Gauss–Legendre panel's own."""
        return len(self.values) + self.extra_nodes

    def _unbounded(self, panel: _Panel, budget: bool = False) -> NotCertifiable:
        lo, hi = self.ar.bounds(self.ar.hull(panel.p, panel.q))
        when = " before the budget ran out" if budget else ""
        return NotCertifiable(
            f"cannot bound the integrand near {self.variable} = {shown((lo + hi) / 2, 6, 'near')}"
            f"{when}; it may be "
            f"unbounded or undefined there ({panel.fault})",
            code="unbounded_near",
            location=(lo, hi),
        )

    def total(self, panels: Any) -> Any:
        ar = self.ar
        total = ar.zero
        for panel in panels:
            total = ar.add(total, panel.enclosure)
        return total

    def mesh(self, panels: list[_Panel], sign: int) -> tuple[PanelReport, ...]:
        ar = self.ar
        ordered = sorted(panels, key=lambda p: ar.bounds(p.p)[0])
        reports = []
        for panel in ordered:
            low, high = ar.bounds(panel.enclosure if sign > 0 else ar.neg(panel.enclosure))
            reports.append(
                PanelReport(ar.bounds(panel.p)[0], ar.bounds(panel.q)[1], (low, high), self.names[panel.order])
            )
        return tuple(reports)
