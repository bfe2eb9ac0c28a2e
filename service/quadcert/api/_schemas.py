"""Request and response bodies of the HTTP API, kept apart from the engine's domain types."""

from __future__ import annotations

from decimal import Decimal
from typing import Annotated, Any, Literal

from pydantic import (
    BaseModel,
    ConfigDict,
    Field,
    PlainValidator,
    StrictBool,
    StrictInt,
    StrictStr,
    WithJsonSchema,
)

from ..results import Rule, StopReason, Verdict  # the engine's own state types, not a second copy


def _json_number(value: Any) -> Decimal | int:
    """A JSON number as read by the exact reader (Decimal or int); Python floats as the decimal they print as."""
    if isinstance(value, float):
        value = Decimal(repr(value))
    if isinstance(value, bool) or not isinstance(value, (Decimal, int)):
        raise ValueError("must be a JSON number")  # noqa: TRY004 - pydantic reports a ValueError as the field's error
    return value  # NaN and infinities pass here, so that the engine refuses them with the field's own code


#: a JSON number, kept as the exact decimal it spells
Number = Annotated[Decimal | int, PlainValidator(_json_number), WithJsonSchema({"type": "number"})]
Limit = Annotated[
    Number | Annotated[StrictStr, Field(max_length=512)],
    Field(
        description='A number, or text: an exact decimal such as "0.1" or a constant '
        'expression such as "pi/2". JSON numbers are read as the decimal they spell. '
        '"inf", "-inf", "+inf" or "infinity" (any case) is an infinite '
        "limit: the tail is enclosed by a proved envelope."
    ),
]


#: a closed interval [low, high] as two numbers
Pair = Annotated[list[float], Field(min_length=2, max_length=2)]
#: a stretch of the mesh or a refusal's location: numbers, or "inf"/"-inf" at a tail
Ends = Annotated[list[float | Literal["inf", "-inf"]], Field(min_length=2, max_length=2)]


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid")


class ParameterBounds(_Strict):
    """A parameter known only within [low, high]: the answer holds for every value between."""

    low: Number
    high: Number


#: a parameter's value: a number, text (an exact decimal, "1.99..2.01" or "2±0.01"), or bounds
ParameterValue = Number | Annotated[StrictStr, Field(max_length=80)] | ParameterBounds
Parameters = Annotated[
    dict[Annotated[str, Field(max_length=64)], ParameterValue],
    Field(
        max_length=32,
        description="Values of the formula's other names. A value known only within bounds is "
        '{"low": …, "high": …} or text "1.99..2.01" / "2±0.01"; the enclosure then holds for every value in the box.',
    ),
]


class IntegralRequest(_Strict):
    integrand: Annotated[
        StrictStr,
        Field(max_length=4096, description="Formula in the variable (at most 4096 characters)", examples=["exp(-x^2)"]),
    ]
    variable: Annotated[StrictStr, Field(max_length=64)] = "x"
    lower_limit: Limit
    upper_limit: Limit
    tolerance: Annotated[
        Number,
        Field(
            description="Absolute tolerance on |exact − value|, > 0; read as the exact decimal it spells",
            json_schema_extra={"default": 1e-8},
        ),
    ] = Decimal("1e-8")
    relative_tolerance: Number | None = Field(None, description="Also accept error <= this × |integral|")
    parameters: Parameters = Field(default_factory=dict)
    max_nodes: StrictInt | None = Field(None, description="Evaluation budget; the server default applies if absent")
    include_mesh: StrictBool = False
    rule: Rule = Field(
        "simpson",
        description="The panel rule: composite Simpson (default); gauss-legendre (5-point panels with a rigorous "
        "f^(10) remainder, Simpson's bounds where f is not that smooth); auto (both on every panel, the narrower "
        "kept). The mesh and bounds_used name each panel's rule.",
    )
    sensitivities: StrictBool = Field(
        False,
        description="Also enclose ∂(integral)/∂(parameter) over the box, for every parameter: one more certified "
        "integral each, with the same tolerance and budget",
    )


class CheckRequest(IntegralRequest):
    claimed_value: Number = Field(description="The value under test, e.g. from the code being checked")


class PlanRequest(_Strict):
    integrand: Annotated[StrictStr, Field(max_length=4096)]
    variable: Annotated[StrictStr, Field(max_length=64)] = "x"
    lower_limit: Limit
    upper_limit: Limit
    tolerance: Annotated[Number, Field(json_schema_extra={"default": 1e-8})] = Decimal("1e-8")
    parameters: Parameters = Field(default_factory=dict)


class BatchRequest(_Strict):
    items: list[IntegralRequest] = Field(min_length=1)


class Panel(BaseModel):
    lower: float | Literal["-inf"]
    upper: float | Literal["inf"]
    contribution: Pair
    bound: str


class IntegralResponse(BaseModel):
    value: float
    enclosure: Pair = Field(description="Guaranteed to contain the exact integral")
    error_bound: float = Field(description="Guaranteed >= |exact − value|")
    tolerance: float
    applied_tolerance: float | None = Field(
        None,
        description="The absolute bound the error bound was held to: "
        "the tolerance, or relative_tolerance × |integral| where larger",
    )
    tolerance_met: bool
    stop_reason: StopReason
    nodes: int
    panels: int
    integrand: str = Field(description="The integrand in canonical form")
    variable: str
    lower_limit: str
    upper_limit: str
    precision_bits: int
    compute_seconds: float = Field(description="Engine time for this request (0 when served from cache)")
    cached: bool
    engine_version: str
    bounds_used: dict[str, int]
    parameter_spread: float | None = Field(
        None,
        description="With parameters known within bounds: the part of the enclosure's width that their spread "
        "accounts for (rounded up)",
    )
    discretisation_bound: float | None = Field(
        None,
        description="With parameters known within bounds: half of the rest of the width, which finer panels can "
        "remove; the tolerance applies to this (rounded up)",
    )
    sensitivities: dict[str, Pair] | None = Field(
        None, description="On request: an enclosure of ∂(integral)/∂(parameter) over the whole box, per parameter"
    )
    mesh: list[Panel] | None = None


class Problem(BaseModel):
    """RFC 9457 problem details, with quadcert's machine-readable code."""

    type: str
    title: str
    status: int
    detail: str
    code: str
    instance: str | None = None
    column: int | None = None
    field: str | None = None
    location: Ends | None = None
    request_id: str | None = None
    errors: list[dict[str, Any]] | None = None


class BatchResponse(BaseModel):
    results: list[IntegralResponse | Problem]


class CheckResponse(BaseModel):
    verdict: Verdict
    claimed_value: float
    tolerance: float
    distance: Pair = Field(description="Certified bounds of |claimed − exact|")
    enclosure: Pair = Field(description="Guaranteed to contain the exact integral")
    integral: IntegralResponse
    engine_version: str


class RulePlanResponse(BaseModel):
    rule: str
    intervals: int
    nodes: int
    spacing: float
    derivative_order: int
    derivative_bound: float | None
    error_bound: float | None
    available: bool
    reason: str | None = None


class PlanResponse(BaseModel):
    integrand: str
    lower_limit: str
    upper_limit: str
    tolerance: float
    simpson: RulePlanResponse
    trapezoid: RulePlanResponse
    subintervals_for_bounds: int
    compute_seconds: float
    engine_version: str


class PictureResponse(BaseModel):
    integral: IntegralResponse = Field(description="The certified integral (its mesh is in boxes)")
    digits: str | None = Field(description="The digits every number in the enclosure shares; null if none is certain")
    boxes: list[list[float | str | None]] = Field(
        description="One per panel: [lower, upper, f low, f high, error share, bound]. f is enclosed over the "
        "panel; null where it cannot be bounded (an envelope piece); bounds are printed outward"
    )
    y_range: Pair = Field(
        description="The y axis the picture uses; the tallest boxes over at most 2% of the interval may reach beyond it"
    )
    summary: str = Field(description="The picture in words, for screen readers")


class FormulaCheck(BaseModel):
    integrand: str = Field(description="The formula as the engine reads it")
    variable: str
    engine_version: str


class RequestCheck(BaseModel):
    valid: Literal[True]
    canonical: dict[str, Any] = Field(description="The request as the engine reads it: exact texts")
    engine_version: str
