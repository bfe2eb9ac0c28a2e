"""What the engine returns: plain frozen data, independent of any transport.

Kept free of heavy imports (no mpmath, flint or compiled engine), so the client can build these types
without loading the engine.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping
from dataclasses import MISSING, asdict, dataclass, field, fields
from decimal import ROUND_CEILING, ROUND_FLOOR, Context, Decimal
from typing import Any, Literal, TypeVar, get_args

from ._version import ENGINE_VERSION

#: why refinement stopped; only tolerance_met has tolerance_met true (the enclosure is rigorous in every case)
StopReason = Literal["tolerance_met", "node_budget", "deadline", "resolution_limit"]
#: the panel rules a request may ask for (docs/gauss-legendre.md); Simpson is the default
Rule = Literal["simpson", "gauss-legendre", "auto"]
RULES: tuple[str, ...] = get_args(Rule)
#: a CI verdict: pass (certified |claimed − exact| <= tolerance), fail (certified >), undecided
Verdict = Literal["pass", "fail", "undecided"]

_DOWN = Context(prec=17, rounding=ROUND_FLOOR)
_UP = Context(prec=17, rounding=ROUND_CEILING)


@dataclass(frozen=True)
class PanelReport:
    lower: float  # panel start, rounded down
    upper: float  # panel end, rounded up
    contribution: tuple[float, float]  # enclosure of the integral over the panel
    bound: str  # which error bound certified it


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
    stop_reason: StopReason
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
    #: with parameters known within bounds (else None): the part of the enclosure's width their spread
    #: accounts for, and half of the rest, which the tolerance applies to (docs/parameters.md)
    parameter_spread: float | None = None
    discretisation_bound: float | None = None
    #: on request: parameter name -> an enclosure of ∂(integral)/∂(parameter) over the whole box
    sensitivities: dict[str, tuple[float, float]] | None = None


@dataclass(frozen=True)
class RulePlan:
    rule: str  # "simpson" or "trapezoid"
    intervals: int  # panels for Simpson (each with a midpoint), intervals for trapezoid
    nodes: int
    spacing: float  # node spacing h, rounded down
    derivative_order: int  # 4 or 2
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

    verdict: Verdict
    claimed_value: Any  # the caller's number, unchanged (a JSON number arrives as its exact Decimal)
    tolerance: float  # applied: the largest float64 not above the tolerance given
    distance: tuple[float, float]  # certified lower and upper bounds of |claimed − exact|
    integral: IntegralResult


def bound_decimal(value: float, up: bool) -> Decimal | float:
    """The shortest decimal on the safe side of a float bound that still reads back as that same float.

    A plain ``repr`` may print a decimal on the wrong side (the float nearest 0.1 is above one tenth, yet
    prints as ``0.1``); a reader who takes the printed decimal at its word would then hold a bound the engine
    never certified. This one is on the safe side as a decimal and is the same float to a float64 reader.
    Infinite bounds stay floats.

    >>> bound_decimal(0.1, up=False), bound_decimal(0.1, up=True)
    (Decimal('0.1'), Decimal('0.10000000000000001'))
    >>> bound_decimal(-0.0, up=True), bound_decimal(5e-324, up=False)
    (Decimal('0'), Decimal('4E-324'))
    """
    if value == 0:
        return Decimal(0)
    if not math.isfinite(value):
        return value
    exact = Decimal(value)
    shortest = Decimal(repr(value))  # reads back by definition; often already on the safe side
    if (shortest >= exact) if up else (shortest <= exact):
        return shortest
    context = (_UP if up else _DOWN).copy()
    # 18 digits always suffice: a directed rounding there moves less than 1e-17 relative, below half an ulp
    for digits in range(len(repr(abs(value)).split("e")[0].replace(".", "").strip("0")), 19):
        context.prec = digits
        candidate = context.create_decimal(exact)
        if float(candidate) == value:
            return candidate
    return exact  # not reached; the exact decimal of a float always reads back


def bound_text(value: float, up: bool) -> str:
    """:func:`bound_decimal` as text, with a lower-case exponent.

    >>> bound_text(0.30000000000000004, up=True), bound_text(1e300, up=False), bound_text(-0.0, up=False)
    ('0.30000000000000005', '1e300', '0')
    """
    rounded = bound_decimal(value, up)
    if isinstance(rounded, float):
        return "inf" if rounded > 0 else "-inf"
    text = f"{rounded:g}"
    return text.replace("e+", "e")


# -- the one JSON shape of a result, shared by the HTTP service and the CLI ------------------------------


def integral_body(result: IntegralResult | dict[str, Any], request: dict[str, Any]) -> dict[str, Any]:
    """The JSON body of an integral result: bounds as outward decimals, typed numbers echoed as sent.

    ``request`` supplies what the caller typed (``variable``, ``tolerance``). The HTTP service adds
    ``cached``; everything else is the same in ``quadcert integrate --json``.
    """
    data = _fields(result) if isinstance(result, IntegralResult) else result
    low, high = data["enclosure"]
    mesh = data.get("mesh")
    return {
        "value": data["value"],
        "enclosure": [bound_decimal(low, up=False), bound_decimal(high, up=True)],
        "error_bound": bound_decimal(data["error_bound"], up=True),
        "tolerance": request.get("tolerance", data["tolerance"]),
        "applied_tolerance": data.get("applied_tolerance"),
        "tolerance_met": data["tolerance_met"],
        "stop_reason": data["stop_reason"],
        "nodes": data["nodes"],
        "panels": data["panels"],
        "integrand": data["integrand"],
        "variable": request.get("variable", "x"),
        "lower_limit": data["lower_limit"],
        "upper_limit": data["upper_limit"],
        "precision_bits": data["precision_bits"],
        "compute_seconds": data["compute_seconds"],
        "engine_version": ENGINE_VERSION,
        "bounds_used": data["bounds_used"],
        "parameter_spread": _up(data.get("parameter_spread")),
        "discretisation_bound": _up(data.get("discretisation_bound")),
        "sensitivities": _pairs(data.get("sensitivities")),
        "mesh": [_panel(p) for p in mesh] if mesh else None,
    }


def _up(value: float | None) -> Any:
    return None if value is None else bound_decimal(value, up=True)


def _pairs(pairs: Mapping[str, Any] | None) -> dict[str, list[Any]] | None:
    """Enclosures by name, printed outward."""
    if pairs is None:
        return None
    return {name: [outward(low, up=False), outward(high, up=True)] for name, (low, high) in pairs.items()}


def _fields(result: Any) -> dict[str, Any]:
    """A result's fields as a dict, one level deep: ``asdict`` would copy a 100,000-panel mesh field by field."""
    return {item.name: getattr(result, item.name) for item in fields(result)}


def _panel(panel: PanelReport | dict[str, Any]) -> dict[str, Any]:
    if isinstance(panel, PanelReport):
        panel = vars(panel)
    return {
        "lower": outward(panel["lower"], up=False),
        "upper": outward(panel["upper"], up=True),
        "contribution": [outward(panel["contribution"][0], up=False), outward(panel["contribution"][1], up=True)],
        "bound": panel["bound"],
    }


def outward(value: Any, up: bool) -> Any:
    """A float bound as an outward decimal; an infinite end (a tail's) as the text "inf" or "-inf"."""
    if isinstance(value, float) and math.isinf(value):
        return "inf" if value > 0 else "-inf"
    return bound_decimal(value, up) if isinstance(value, float) else value


def check_body(result: CheckResult | dict[str, Any], request: dict[str, Any]) -> dict[str, Any]:
    """The JSON body of a verdict (the HTTP service and ``quadcert check --json``)."""
    data = _fields(result) if isinstance(result, CheckResult) else result
    integral = integral_body(data["integral"], request)
    near, far = data["distance"]
    return {
        "verdict": data["verdict"],
        "claimed_value": request.get("claimed_value", data["claimed_value"]),
        "tolerance": request.get("tolerance", data["tolerance"]),
        "distance": [outward(near, up=False), outward(far, up=True)],
        "enclosure": integral["enclosure"],
        "integral": integral,
        "engine_version": ENGINE_VERSION,
    }


def plan_body(result: Plan) -> dict[str, Any]:
    """The JSON body of a plan: spacing rounded down, derivative and error bounds rounded up, as decimals."""
    content = asdict(result)
    for name in ("simpson", "trapezoid"):
        rule = content[name]
        rule["spacing"] = bound_decimal(rule["spacing"], up=False)
        for key in ("derivative_bound", "error_bound"):
            if rule[key] is not None:
                rule[key] = bound_decimal(rule[key], up=True)
    return content


# -- and back: a JSON body as the result types (the client) -----------------------------------------------

_Result = TypeVar("_Result")


def _read(cls: type[_Result], body: Mapping[str, Any], convert: Mapping[str, Callable[[Any], Any]]) -> _Result:
    """``cls`` from the body's fields, by the dataclass's own field list (so a new field needs no reader);
    a required field that is missing raises KeyError."""
    values: dict[str, Any] = {}
    for item in fields(cls):  # type: ignore[arg-type]
        if item.name in body and body[item.name] is not None:
            values[item.name] = convert.get(item.name, _same)(body[item.name])
        elif item.default is MISSING and item.default_factory is MISSING:
            values[item.name] = body[item.name]
    return cls(**values)


def _same(value: Any) -> Any:
    return value


def _panel_from(body: Mapping[str, Any]) -> PanelReport:
    # float() reads a tail's "inf"/"-inf" back
    return PanelReport(float(body["lower"]), float(body["upper"]), tuple(body["contribution"]), body["bound"])


def integral_from(body: Mapping[str, Any]) -> IntegralResult:
    """An :class:`IntegralResult` from the JSON body :func:`integral_body` writes."""
    return _read(
        IntegralResult,
        body,
        {
            "enclosure": tuple,
            "bounds_used": dict,
            "mesh": lambda mesh: tuple(_panel_from(p) for p in mesh) or None,
            "parameter_spread": float,
            "discretisation_bound": float,
            "sensitivities": lambda pairs: {k: (float(v[0]), float(v[1])) for k, v in pairs.items()},
        },
    )


def check_from(body: Mapping[str, Any]) -> CheckResult:
    """A :class:`CheckResult` from the JSON body :func:`check_body` writes."""
    return _read(CheckResult, body, {"distance": tuple, "integral": integral_from})


def plan_from(body: Mapping[str, Any]) -> Plan:
    """A :class:`Plan` from the JSON body :func:`plan_body` writes."""
    rule = {"simpson": _rule_from, "trapezoid": _rule_from}
    return _read(Plan, body, rule)


def _rule_from(body: Mapping[str, Any]) -> RulePlan:
    return _read(RulePlan, body, {})
