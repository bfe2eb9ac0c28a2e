"""One integral, parsed and validated once: the engine's public request boundary.

The library functions (:func:`integrate`, :func:`check`, :func:`plan`), the CLI and the HTTP service all
build a :class:`Request` and hand it to the engine. The service builds it on the event loop (so a bad formula
is answered without a worker), keys its cache on :meth:`Request.canonical`, and sends the object itself to
the worker, which runs it without reading the text again.

>>> request = Request.build("exp(x)", 0, 2, "1e-8")
>>> request.formula.text, request.tolerance <= 1e-8, request.integrate().tolerance_met
('exp(x)', True, True)
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from functools import cache
from typing import Any

from ..arithmetic import Arithmetic, ParameterValue, reference, value_text
from ..formula import Formula, parse
from . import _inputs
from ._check import decide
from ._endpoints import LimitValue, check_limit, infinite_side, parse_limit
from ._integrate import run
from ._planner import plan_for
from ._result import CheckResult, IntegralResult, Plan

ArithmeticFactory = Callable[[int], Arithmetic[Any]]


@cache
def _limit_checker() -> Arithmetic[Any]:
    """Enough to tell whether a limit evaluates and lies within ±1e300 (the engine encloses it again, tighter);
    made on first use, since a plain numeral never needs it."""
    return reference(64)


@dataclass(frozen=True)
class Request:
    """The question: integrand, limits and parameters as exact formulas, tolerances and budget checked.

    Build it with :meth:`build`; the constructor takes values that are already valid.
    """

    formula: Formula
    lower: Formula
    upper: Formula
    tolerance: float  # the largest float64 not above the tolerance as typed
    relative_tolerance: float | None = None
    max_nodes: int = _inputs.DEFAULT_MAX_NODES
    values: Mapping[str, ParameterValue] = field(default_factory=dict)  # name -> its exact value or bounds
    rule: str = "simpson"  # the panel rule: "simpson", "gauss-legendre" or "auto"

    @classmethod
    def build(
        cls,
        integrand: str | Formula,
        lower_limit: LimitValue,
        upper_limit: LimitValue,
        tolerance: _inputs.NumberLike = 1e-8,
        *,
        variable: str = "x",
        parameters: Mapping[str, object] | None = None,
        relative_tolerance: _inputs.NumberLike | None = None,
        max_nodes: int = _inputs.DEFAULT_MAX_NODES,
        rule: str = "simpson",
    ) -> Request:
        """Parse and validate every input once; raises FormulaError or InvalidInput with a code and a field.

        Numbers given as text or Decimal are read exactly; a float as the shortest decimal that prints it.
        """
        checked_tolerance = _inputs.check_tolerance(tolerance)
        relative = _inputs.check_relative_tolerance(relative_tolerance)
        budget = _inputs.check_max_nodes(max_nodes)
        values = _inputs.check_parameters(parameters)
        names = tuple(values)
        formula = integrand if isinstance(integrand, Formula) else parse(integrand, variable=variable, parameters=names)
        lower = parse_limit(lower_limit, "lower_limit", names)
        upper = parse_limit(upper_limit, "upper_limit", names)
        for limit, field_name in ((lower, "lower_limit"), (upper, "upper_limit")):
            if not infinite_side(limit):  # a finite limit must evaluate, within ±1e300: refused here, not later
                check_limit(limit, values, field_name, _limit_checker)
        return cls(formula, lower, upper, checked_tolerance, relative, budget, values, _inputs.check_rule(rule))

    def canonical(self) -> dict[str, Any]:
        """The request as exact texts, equal for requests that must give the same answer (a cache key)."""
        return {
            "integrand": self.formula.text,
            "variable": self.formula.variable,
            "lower": self.lower.text,
            "upper": self.upper.text,
            "parameters": {k: value_text(v) for k, v in sorted(self.values.items())},
            **({"rule": self.rule} if self.rule != "simpson" else {}),  # Simpson's keys stay as they were
        }

    def integrate(
        self,
        *,
        deadline_seconds: float | None = None,
        include_mesh: bool = False,
        precision_bits: int | None = None,
        arithmetic: ArithmeticFactory | None = None,
        sensitivities: bool = False,
    ) -> IntegralResult:
        """The certified integral; see :func:`integrate` for the options."""
        return run(
            self,
            deadline_seconds=deadline_seconds,
            include_mesh=include_mesh,
            precision_bits=precision_bits,
            arithmetic=arithmetic,
            sensitivities=sensitivities,
        )

    def check(
        self, claimed_value: _inputs.NumberLike, *, deadline_seconds: float | None = None, **options: Any
    ) -> CheckResult:
        """Whether ``claimed_value`` is provably within this request's tolerance of the integral."""
        return decide(self, claimed_value, deadline_seconds=deadline_seconds, **options)

    def plan(self, *, arithmetic: ArithmeticFactory = reference, precision_bits: int = 96) -> Plan:
        """Uniform node counts that the global derivative bounds guarantee for this tolerance."""
        return plan_for(self, arithmetic=arithmetic, precision_bits=precision_bits)


def integrate(
    integrand: str | Formula,
    lower_limit: LimitValue,
    upper_limit: LimitValue,
    tolerance: _inputs.NumberLike = 1e-8,
    *,
    variable: str = "x",
    parameters: Mapping[str, object] | None = None,
    relative_tolerance: _inputs.NumberLike | None = None,
    max_nodes: int = _inputs.DEFAULT_MAX_NODES,
    deadline_seconds: float | None = None,
    include_mesh: bool = False,
    precision_bits: int | None = None,
    arithmetic: ArithmeticFactory | None = None,
    sensitivities: bool = False,
    rule: str = "simpson",
) -> IntegralResult:
    """Certified ∫ integrand d(variable) from lower_limit to upper_limit.

    Parameters:
        integrand: formula text in the language of the README (or a parsed :class:`Formula`).
        lower_limit, upper_limit: a number or text such as ``"pi/2"`` or ``"-inf"``; text and Decimals are
            read exactly, a float as the shortest decimal that prints it. The limits may be in either order.
        tolerance: absolute target for the error bound (in [1e-60, 1e300]; text is read exactly).
        variable: the integration variable's name.
        parameters: name → number (or text) for the formula's other names; a parameter known only within
            bounds is a :class:`Within`, ``{"low": …, "high": …}`` or text ``"1.99..2.01"`` / ``"2±0.01"``.
            The enclosure then holds for every value in the box; the tolerance applies to the
            ``discretisation_bound``, and ``parameter_spread`` gives the width the bounds account for.
        relative_tolerance: also accept a bound ≤ this × |integral| (below 1).
        max_nodes: evaluation budget; past it the rigorous enclosure so far is returned, not met.
        deadline_seconds: wall-clock budget; past it, likewise.
        include_mesh: also return every panel with its contribution and the bound that certified it.
        precision_bits: force this working precision of the arbitrary-precision engine (53 to 4096).
        arithmetic: force a backend class (``MpmathArithmetic`` or ``FlintArithmetic``).
        rule: the panel rule. "simpson" (the default) is composite Simpson with its Peano bounds;
            "gauss-legendre" certifies each smooth panel with 5-point Gauss–Legendre and its f^(10) remainder
            (Simpson's bounds where f is not that smooth); "auto" tries both on every panel and keeps the
            narrower. The mesh and ``bounds_used`` name the rule of each panel.
        sensitivities: also enclose ∂(integral)/∂(parameter) over the box, for every parameter; each is one
            more certified integral (of the formula's derivative), with the same tolerance and budget.

    Returns an :class:`IntegralResult`; raises :class:`FormulaError`, :class:`InvalidInput` or
    :class:`NotCertifiable` (each with a ``code``) when it cannot answer.

    >>> r = integrate("4/(1+x^2)", 0, 1, 1e-10)
    >>> r.enclosure[0] <= 3.141592653589793 <= r.enclosure[1], r.error_bound <= 1e-10
    (True, True)
    """
    request = Request.build(
        integrand,
        lower_limit,
        upper_limit,
        tolerance,
        variable=variable,
        parameters=parameters,
        relative_tolerance=relative_tolerance,
        max_nodes=max_nodes,
        rule=rule,
    )
    return request.integrate(
        deadline_seconds=deadline_seconds,
        include_mesh=include_mesh,
        precision_bits=precision_bits,
        arithmetic=arithmetic,
        sensitivities=sensitivities,
    )


def check(
    integrand: str | Formula,
    lower_limit: LimitValue,
    upper_limit: LimitValue,
    claimed_value: _inputs.NumberLike,
    tolerance: _inputs.NumberLike,
    *,
    variable: str = "x",
    parameters: Mapping[str, object] | None = None,
    relative_tolerance: _inputs.NumberLike | None = None,
    max_nodes: int = _inputs.DEFAULT_MAX_NODES,
    deadline_seconds: float | None = None,
    **options: Any,
) -> CheckResult:
    """Decide a claim, refining the enclosure only as far as the decision needs.

    ``tolerance`` is the distance allowed between the claim and the exact integral; ``options`` go to
    :meth:`Request.integrate` (``precision_bits``, ``arithmetic``).

    >>> check("x^2", 0, 3, claimed_value=9.0000001, tolerance=1e-6).verdict
    'pass'
    >>> check("x^2", 0, 3, claimed_value=9.01, tolerance=1e-6).verdict
    'fail'
    >>> check("x^2", 0, 3, claimed_value="9.00000000000000015", tolerance="1e-16").verdict != "pass"  # as typed
    True
    """
    request = Request.build(
        integrand,
        lower_limit,
        upper_limit,
        tolerance,
        variable=variable,
        parameters=parameters,
        relative_tolerance=relative_tolerance,
        max_nodes=max_nodes,
    )
    return request.check(claimed_value, deadline_seconds=deadline_seconds, **options)


def plan(
    integrand: str | Formula,
    lower_limit: LimitValue,
    upper_limit: LimitValue,
    tolerance: _inputs.NumberLike,
    *,
    variable: str = "x",
    parameters: Mapping[str, object] | None = None,
    arithmetic: ArithmeticFactory = reference,
    precision_bits: int = 96,
) -> Plan:
    """Uniform Simpson and trapezoid node counts that the global bounds guarantee.

    >>> p = plan("exp(x)", 0, 2, 0.5e-4)
    >>> p.simpson.intervals, p.simpson.nodes, p.trapezoid.nodes
    (7, 15, 315)
    """
    request = Request.build(integrand, lower_limit, upper_limit, tolerance, variable=variable, parameters=parameters)
    return request.plan(arithmetic=arithmetic, precision_bits=precision_bits)
