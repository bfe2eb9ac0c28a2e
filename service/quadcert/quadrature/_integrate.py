"""The engine proper: read limits exactly, refine (in float64 first, then at higher precision), report."""

from __future__ import annotations

import math
import time
from collections.abc import Callable
from dataclasses import dataclass, replace
from fractions import Fraction
from typing import TYPE_CHECKING, Any

from ..arithmetic import (
    Arithmetic,
    ParameterValue,
    flint_context_claimed,
    fraction_down,
    fraction_up,
    is_reference,
    reference,
)
from ..derivatives import Program
from ..errors import EngineDefect, InvalidInput, NotCertifiable
from ..formula import Formula
from ..results import StopReason
from . import _composite, _fast, _gauss, _sensitivity, _spread
from ._endpoints import enclose_limit, exact_limit
from ._finish import discretisation_bound, error_bound
from ._result import IntegralResult, PanelReport
from ._simpson import Refiner

if TYPE_CHECKING:
    from ._request import Request

DEFAULT_PRECISION = 96
_LIMIT_PRECISION = 128  # exact limits are enclosed at this precision for the float64 engine
ArithmeticFactory = Callable[[int], Arithmetic[Any]]
Limit = Formula | Fraction  # a limit as typed (a formula), or an exact cut chosen by the engine


def default_arithmetic() -> ArithmeticFactory:
    """The fast ball backend where this thread owns flint's context, else the reference backend."""
    if flint_context_claimed():
        from ..arithmetic._flint_backend import FlintArithmetic  # loaded here: the compiled engine never needs it

        return FlintArithmetic
    return reference


def choose_precision(tolerance: float) -> int:
    """Enough bits that rounding stays far below the tolerance for integrals of ordinary size."""
    return max(DEFAULT_PRECISION, min(4096, int(-math.log2(tolerance)) + 48))


def run(
    request: Request,
    *,
    deadline_seconds: float | None = None,
    include_mesh: bool = False,
    precision_bits: int | None = None,
    arithmetic: ArithmeticFactory | None = None,
    sensitivities: bool = False,
) -> IntegralResult:
    """The certified integral of a validated request (see :func:`quadcert.integrate` for the options)."""
    started = time.perf_counter()
    result = _integral(request, deadline_seconds, include_mesh, precision_bits, arithmetic)
    if not sensitivities:
        return result
    deadline = None if deadline_seconds is None else time.monotonic() + deadline_seconds - result.compute_seconds

    def integral(derivative: Request) -> IntegralResult:
        remaining = None if deadline is None else max(1e-3, deadline - time.monotonic())
        return _integral(derivative, remaining, False, precision_bits, arithmetic)

    found = _sensitivity.sensitivities(request, integral)
    if result.parameter_spread is not None:
        result = _narrowed(result, _sensitivity.mean_value_form(request, found, integral))
    return replace(result, sensitivities=found, compute_seconds=time.perf_counter() - started)


def _narrowed(result: IntegralResult, other: tuple[float, float]) -> IntegralResult:
    """The result with its enclosure intersected with another one of the same integral over the same box.

    The discretisation part stays the one refinement reached; the spread is what the narrower width leaves.
    """
    low, high = max(result.enclosure[0], other[0]), min(result.enclosure[1], other[1])
    if low > high:  # two rigorous enclosures of one quantity always meet: this is a defect, not a result
        raise EngineDefect(f"the mean-value form {other} misses the enclosure {result.enclosure}")
    if (low, high) == result.enclosure:
        return result
    value, bound = error_bound(low, high)
    assert result.discretisation_bound is not None
    spread = fraction_up(max(Fraction(high) - Fraction(low) - 2 * Fraction(result.discretisation_bound), Fraction(0)))
    return replace(result, value=value, enclosure=(low, high), error_bound=bound, parameter_spread=spread)


def _integral(
    request: Request,
    deadline_seconds: float | None,
    include_mesh: bool,
    precision_bits: int | None,
    arithmetic: ArithmeticFactory | None,
) -> IntegralResult:
    started = time.perf_counter()
    tolerance, relative = request.tolerance, request.relative_tolerance
    formula, values = request.formula, dict(request.values)
    lower_formula, upper_formula = request.lower, request.upper
    spread_mode = _spread.spread_used(formula, (lower_formula, upper_formula), values)
    edges: list[_spread.Edge] = []
    lower, upper = lower_formula, upper_formula  # the limits integrated to: one number each
    if spread_mode:
        lower, lower_edge = _spread.fixed_limit(formula, lower_formula, values, "lower_limit", -1)
        upper, upper_edge = _spread.fixed_limit(formula, upper_formula, values, "upper_limit", +1)
        edges = [e for e in (lower_edge, upper_edge) if e is not None]
    if deadline_seconds is not None and not (math.isfinite(deadline_seconds) and deadline_seconds > 0):
        raise InvalidInput(
            "deadline_seconds must be a positive number", code="invalid_deadline", field="deadline_seconds"
        )
    deadline = None if deadline_seconds is None else time.monotonic() + deadline_seconds
    settings = Settings(request.max_nodes, deadline, include_mesh, precision_bits, arithmetic, request.rule)

    def target(low: float, high: float) -> float:
        """The absolute bound to meet: the tolerance, or the relative one times the smallest |integral| the
        enclosure allows, rounded down (so a bound that meets it meets the exact product too)."""
        if relative is None or low <= 0 <= high:
            return tolerance
        return max(tolerance, fraction_down(Fraction(relative) * Fraction(min(abs(low), abs(high)))))

    def finish(segment: Segment) -> IntegralResult:
        low, high = _spread.widened(segment.low, segment.high, edges)
        value, bound = error_bound(low, high)
        if not math.isfinite(bound):
            raise NotCertifiable("the integral is beyond the float64 range", code="result_out_of_range")
        spread = discretisation = None
        if spread_mode:  # the tolerance applies to what refinement can remove, not to the parameters' spread
            edge_low, edge_high = _spread.edge_bounds(edges)
            exact_spread = min(segment.spread + (edge_high - edge_low), Fraction(high) - Fraction(low))
            spread, discretisation = fraction_up(exact_spread), discretisation_bound(low, high, exact_spread)
            met = discretisation <= target(low, high)
        else:
            met = bound <= target(low, high)
        stop = _reported(segment.stop, met)
        return IntegralResult(
            value=value,
            enclosure=(low, high),
            error_bound=bound,
            tolerance=tolerance,
            tolerance_met=met,
            applied_tolerance=target(low, high),
            stop_reason=stop,
            nodes=segment.nodes,
            panels=segment.panels,
            integrand=formula.text,
            lower_limit=lower_formula.text,
            upper_limit=upper_formula.text,
            precision_bits=segment.precision_bits,
            compute_seconds=time.perf_counter() - started,
            mesh=segment.mesh if include_mesh else None,
            bounds_used=segment.bounds_used if not edges else {**segment.bounds_used, "limit_edge": len(edges)},
            parameter_spread=spread,
            discretisation_bound=discretisation,
        )

    if lower.text != upper.text and _composite.needs_pieces(lower, upper):
        return finish(_composite.integrate_pieces(formula, values, lower, upper, tolerance, settings, segment))
    try:
        return finish(segment(formula, values, lower, upper, target, tolerance, settings, relative))
    except NotCertifiable as refusal:
        if refusal.code not in _composite.INTERIOR_CODES or refusal.location is None:
            raise
        return finish(
            _composite.integrate_pieces(formula, values, lower, upper, tolerance, settings, segment, refusal=refusal)
        )


@dataclass(frozen=True)
class Settings:
    """The budgets and engine choices of one request, passed unchanged to every segment."""

    max_nodes: int
    deadline: float | None
    include_mesh: bool
    precision_bits: int | None
    arithmetic: ArithmeticFactory | None
    rule: str = "simpson"


@dataclass(frozen=True)
class Segment:
    """The certified integral over one stretch of panels, bounds rounded outward to float64."""

    low: float
    high: float
    stop: str
    nodes: int
    panels: int
    mesh: tuple[PanelReport, ...]
    bounds_used: dict[str, int]
    precision_bits: int
    spread: Fraction = Fraction(0)  # the width that parameters known within bounds account for


def segment(
    formula: Formula,
    values: dict[str, ParameterValue],
    lower: Limit,
    upper: Limit,
    target: Callable[[float, float], float],
    tolerance: float,
    settings: Settings,
    relative: float | None = None,
    precision_floor: int = 0,
) -> Segment:
    """Panels over [lower, upper] (either order), compiled engine first; limits are formulas or exact rationals.

    ``precision_floor``: the fewest bits the precise engine may use (a stretch 1e-40 wide next to 1/3 needs
    its nodes resolved at that scale)."""
    if _same(lower, upper):  # ∫ from a limit to itself, infinite ones included
        return Segment(0.0, 0.0, "tolerance_met", 0, 0, (), {}, settings.precision_bits or 53)
    native = settings.arithmetic is None and settings.precision_bits is None and _fast.AVAILABLE
    points = _gauss.points_for(tolerance)  # the Gauss–Legendre panels' nodes, for the rules that use them
    cuts: tuple[tuple[Fraction, int], ...] = ()
    if native:
        fast = _try_fast(
            formula,
            values,
            lower,
            upper,
            tolerance,
            relative,
            target,
            settings.max_nodes,
            settings.deadline,
            settings.include_mesh,
            settings.rule,
            points,
        )
        if isinstance(fast, tuple):
            compiled, low, high = fast
            return Segment(
                low,
                high,
                compiled.stop_reason,
                compiled.nodes,
                compiled.panels,
                compiled.mesh if settings.include_mesh else (),
                compiled.bounds_used,
                53,
            )
        if fast is not None:  # where float64's resolution stopped it, the precise engine starts from its mesh
            cuts = fast.cuts
    prec = settings.precision_bits or min(max(choose_precision(tolerance), precision_floor), 4096)
    arithmetic = settings.arithmetic or default_arithmetic()
    if settings.arithmetic is None and _spread.spread_used(formula, (), values):
        # a ball's radius is kept to 30 bits: with a parameter's spread in it, that rounding alone would
        # outgrow the discretisation part the stop rule reads; intervals keep both ends at full precision
        arithmetic = reference
    attempts = 0
    while True:
        ar = arithmetic(prec)
        program = Program(formula, ar, values)
        a = _enclosure(lower, ar, values, "lower_limit")
        b = _enclosure(upper, ar, values, "upper_limit")
        outcome = _run(
            program,
            ar,
            a,
            b,
            _same(lower, upper),
            settings.max_nodes,
            settings.deadline,
            target,
            arithmetic,
            values,
            formula,
            settings.rule,
            points,
            cuts,
        )
        attempts += 1
        if outcome[1] != "resolution_limit" or attempts >= 3 or prec * 2 > 4096:
            break
        prec *= 2
    enclosure, stop, nodes, panels, mesh, bounds_used, spread = outcome
    low, high = ar.bounds(enclosure)
    return Segment(low, high, stop, nodes, panels, mesh, bounds_used, prec, spread)


def _reported(stop: str, met: bool) -> StopReason:
    """The stop reason a caller sees: met, or what ended the refinement short of the tolerance."""
    if met:
        return "tolerance_met"
    if stop in ("node_budget", "deadline"):
        return stop  # type: ignore[return-value]
    return "resolution_limit"  # float64's floor (FLOAT_FLOOR), or more bits would not help


def _same(lower: Limit, upper: Limit) -> bool:
    if isinstance(lower, Formula) and isinstance(upper, Formula):
        return lower.text == upper.text
    return isinstance(lower, Fraction) and isinstance(upper, Fraction) and lower == upper


def _enclosure(limit: Limit, ar: Arithmetic[Any], values: dict[str, ParameterValue], field: str) -> object:
    if isinstance(limit, Fraction):
        return ar.exact(limit)
    return enclose_limit(limit, ar, values, field)


def _try_fast(
    formula: Formula,
    values: dict[str, ParameterValue],
    lower: Limit,
    upper: Limit,
    tolerance: float,
    relative: float | None,
    target: Callable[[float, float], float],
    max_nodes: int,
    deadline: float | None,
    include_mesh: bool,
    rule: str,
    points: int,
) -> tuple[_fast.FastOutcome, float, float] | _fast.Declined | None:
    """The compiled float64 engine's answer when it is a usable one; otherwise the precise engine takes over,
    from the mesh the compiled one hands it (Declined) or from scratch (None)."""
    if _same(lower, upper):
        return None
    compiled = _fast.compile_formula(formula, values)
    if compiled is None:
        return None
    a, b = _exact_bounds(lower, values, "lower_limit"), _exact_bounds(upper, values, "upper_limit")
    if a[1] < b[0]:
        sign = 1
    elif b[1] < a[0]:
        sign, a, b = -1, b, a
    else:
        return None
    outcome = _fast.run(compiled, a, b, tolerance, relative, max_nodes, deadline, include_mesh, rule, points)
    if isinstance(outcome, _fast.Declined):
        return outcome
    if sign < 0:
        mesh = tuple(
            PanelReport(r.lower, r.upper, (-r.contribution[1], -r.contribution[0]), r.bound) for r in outcome.mesh
        )
        low, high = outcome.enclosure
        outcome = _fast.FastOutcome(
            (-high, -low), outcome.stop_reason, outcome.nodes, outcome.panels, outcome.bounds_used, mesh
        )
    low, high = outcome.enclosure
    _value, bound = error_bound(low, high)
    if not math.isfinite(bound) or (
        bound > target(low, high) and outcome.stop_reason not in ("deadline", "node_budget")
    ):
        return None  # float64's resolution stopped it: the precise engine may get there, with more bits
    # past the deadline or the node budget, starting over on the slower engine with the same budget could
    # not do better and would run on past what the caller allowed: the compiled answer stands
    return outcome, low, high


def _exact_bounds(limit: Limit, values: dict[str, ParameterValue], field: str) -> tuple[Fraction, Fraction]:
    if isinstance(limit, Fraction):
        return limit, limit
    exact = exact_limit(limit)
    if exact is not None:
        return exact, exact
    ref = reference(_LIMIT_PRECISION)
    return ref.bounds_exact(enclose_limit(limit, ref, values, field))


def _run(
    program: Program[Any],
    ar: Arithmetic[Any],
    a: object,
    b: object,
    same_text: bool,
    max_nodes: int,
    deadline: float | None,
    target: Callable[[float, float], float],
    arithmetic: ArithmeticFactory,
    values: dict[str, ParameterValue],
    formula: Formula,
    rule: str,
    points: int,
    cuts: tuple[tuple[Fraction, int], ...] = (),
) -> tuple[object, str, int, int, tuple[PanelReport, ...], dict[str, int], Fraction]:
    if same_text:
        return ar.zero, "tolerance_met", 0, 0, (), {}, Fraction(0)
    a_lo, a_hi = ar.bounds_exact(a)
    b_lo, b_hi = ar.bounds_exact(b)
    if a_hi < b_lo:
        sign = 1
    elif b_hi < a_lo:
        sign, a, b = -1, b, a
    else:  # the limits are too close to order: enclose (b − a)·f(hull) directly
        enclosure = _spread.range_piece(program, ar, a, b, "between the limits")
        spread = Fraction(ar.width(enclosure)) if program.spread else Fraction(0)
        return enclosure, "tolerance_met", 0, 1, (), {"range": 1}, spread
    fallback = None if is_reference(ar) else Program(formula, reference(ar.prec), values)
    refiner = Refiner(
        program,
        ar,
        max_nodes=max_nodes,
        deadline=deadline,
        retry=lambda p: Program(formula, arithmetic(p), values),
        fallback=fallback,
        rule=rule,
        points=points,
    )
    outcome = refiner.run(a, b, target, cuts)
    enclosure = outcome.enclosure if sign > 0 else ar.neg(outcome.enclosure)
    return (
        enclosure,
        outcome.stop_reason,
        outcome.nodes,
        len(outcome.panels),
        refiner.mesh(outcome.panels, sign),
        refiner.bounds_used,
        outcome.spread,
    )
