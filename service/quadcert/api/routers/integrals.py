"""Integrals: POST for services, a batch form, and a plain GET for spreadsheet cells."""

from __future__ import annotations

import asyncio
import hashlib
import re
from decimal import Decimal
from typing import Annotated, Any, Literal

from fastapi import APIRouter, Query, Request
from fastapi.responses import JSONResponse, Response

from ...errors import InvalidInput, QuadcertError
from ...quadrature import bound_text, shown
from ...results import Rule
from .._cache import cache_key
from .._cell_hints import hint, refuse_unknown_keys
from .._exact_json import ExactJSONResponse, ExactRoute
from .._formats import MEDIA_TYPES, render, render_problem
from .._problems import problem_body, problem_for, problem_headers, problem_response
from .._schemas import BatchRequest, BatchResponse, IntegralRequest, IntegralResponse
from ._common import PROBLEM_RESPONSES, computation, context, respond

_DECIMAL = re.compile(r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d{1,9})?")

router = APIRouter(tags=["integrals"], route_class=ExactRoute)

#: GET failures come in the requested format: one line of text (text, csv), XML, or problem JSON (json)
PLAIN_PROBLEM_RESPONSES: dict[int | str, dict[str, Any]] = {
    status: {
        "description": f"{meaning}; a one-line reason in the requested format",
        "content": {
            "text/plain": {"schema": {"type": "string"}},
            "application/xml": {"schema": {"type": "string"}},
            "application/problem+json": {"schema": {"$ref": "#/components/schemas/Problem"}},
        },
    }
    for status, meaning in [
        (422, "Bad formula or value, not certifiable, or tolerance not met"),
        (503, "At capacity or shutting down (see Retry-After)"),
        (504, "Deadline passed"),
    ]
}


@router.post(
    "/v1/integrals",
    operation_id="createIntegral",
    response_model=IntegralResponse,
    responses=PROBLEM_RESPONSES,
    summary="Certify one definite integral",
)
async def create_integral(body: IntegralRequest, request: Request) -> JSONResponse:
    (status, answer), _ = await computation(request).integral(body.model_dump(), context(request))
    return respond(request, status, answer)


@router.post(
    "/v1/integrals/batch",
    operation_id="createIntegralBatch",
    response_model=BatchResponse,
    responses=PROBLEM_RESPONSES,
    summary="Certify many integrals; one result or one problem per item, in order",
)
async def create_batch(body: BatchRequest, request: Request) -> JSONResponse:
    settings = request.app.state.settings
    if len(body.items) > settings.max_batch_items:
        return respond(
            request,
            413,
            problem_body(
                "batch_too_large",
                f"{len(body.items)} items; the limit is {settings.max_batch_items}",
                **context(request),
            ),
        )
    engine = computation(request)
    base = context(request)
    group = f"batch-{base['request_id'] or id(body)}"  # the batch shares the pool as one party
    loop = asyncio.get_running_loop()
    until = loop.time() + settings.batch_deadline_seconds

    async def one(index: int, item: IntegralRequest) -> dict[str, Any]:
        item_context = {**base, "instance": f"{base['instance']}#/items/{index}"}
        left = max(until - loop.time(), 1e-3)
        (_, answer), _ = await engine.integral(
            item.model_dump(),
            item_context,
            wait=left,
            deadline=left,
            group=group,
            compute=settings.request_deadline_seconds,
        )
        return answer

    results = await asyncio.gather(*(one(i, item) for i, item in enumerate(body.items)))
    return ExactJSONResponse({"results": list(results)})


@router.get(
    "/v1/integral",
    operation_id="readIntegralValue",
    summary="One number for a spreadsheet cell",
    responses={
        200: {
            "content": {
                "text/plain": {"schema": {"type": "string"}},
                "text/csv": {"schema": {"type": "string"}},
                "application/xml": {"schema": {"type": "string"}},
                "image/svg+xml": {"schema": {"type": "string"}},
            }
        },
        304: {"description": "Not modified (ETag matched)"},
        **PLAIN_PROBLEM_RESPONSES,
    },
)
async def read_integral(
    request: Request,
    integrand: Annotated[
        str, Query(max_length=4096, description="the formula, e.g. exp(-x^2); in a URL write + as %2B")
    ],
    lower_limit: Annotated[
        str, Query(max_length=512, description="a number, a constant expression (e.g. pi/2), or inf/-inf")
    ],
    upper_limit: Annotated[str, Query(max_length=512, description="a number, a constant expression, or inf/-inf")],
    tolerance: Annotated[
        str, Query(max_length=80, description="Absolute tolerance, read as the exact decimal it spells")
    ] = "1e-8",
    variable: Annotated[str, Query(max_length=64, description="the integration variable (default x)")] = "x",
    relative_tolerance: Annotated[
        str | None, Query(max_length=80, description="also accept an error bound <= this times |integral| (below 1)")
    ] = None,
    parameter: Annotated[list[str] | None, Query(description="name:value, one parameter= per parameter")] = None,
    format: Annotated[
        Literal["text", "csv", "xml", "json", "svg"],
        Query(description="the answer's shape; svg: the picture of how the certificate was earned, for reports"),
    ] = "text",
    field: Annotated[
        Literal["value", "error_bound", "low", "high", "nodes"] | None,
        Query(description="the one number to answer (text, csv, xml); default value"),
    ] = None,
    max_nodes: Annotated[int | None, Query(ge=3, description="evaluation budget; the server default if absent")] = None,
    rule: Annotated[
        Rule,
        Query(description="the panel rule: simpson (default), gauss-legendre, or auto (the narrower per panel)"),
    ] = "simpson",
) -> Response:
    body: dict[str, Any] = {
        "integrand": integrand,
        "lower_limit": lower_limit,
        "upper_limit": upper_limit,
        "tolerance": _query_number(tolerance),
        "variable": variable,
        "relative_tolerance": None if relative_tolerance is None else _query_number(relative_tolerance),
        "max_nodes": max_nodes,
        "rule": rule,
    }
    engine = computation(request)
    try:
        refuse_unknown_keys(list(request.query_params.keys()), GET_KEYS)
        _refuse_repeated_keys(request)
        body["parameters"] = _parameters(parameter or [])
        prepared = engine.prepare(body)
        tag = _etag(prepared.canonical, format, field)
    except QuadcertError as error:
        return _plain_problem(_with_hint(problem_for(error, **context(request)), request), format, request)
    headers = {"ETag": tag, "Cache-Control": "public, max-age=86400"}
    if _matches(request.headers.get("if-none-match"), tag):
        return Response(status_code=304, headers=headers)
    if format == "svg":
        status, picture = await engine.picture(body, context(request), "svg", prepared)
        if status != 200:
            return _plain_problem(_with_hint(picture, request), format, request)
        return Response(picture["svg"], media_type=MEDIA_TYPES["svg"], headers=headers)
    (status, answer), _ = await engine.integral(body, context(request), prepared=prepared)
    if status != 200:
        return _plain_problem(_with_hint(answer, request), format, request)
    if not answer["tolerance_met"]:
        code = "deadline_exceeded" if answer["stop_reason"] == "deadline" else "tolerance_not_met"
        low, high = answer["enclosure"]
        detail = (
            f"certified only to ±{shown(float(answer['error_bound']), 3, 'up')} (enclosure "
            f"[{bound_text(float(low), up=False)}, {bound_text(float(high), up=True)}], "
            f"{answer['stop_reason']}), not the tolerance {tolerance.strip()}"
        )
        return _plain_problem(problem_body(code, detail, **context(request)), format, request)
    if format == "json":
        return ExactJSONResponse(answer, headers=headers)
    return Response(render(answer, format, field), media_type=MEDIA_TYPES[format], headers=headers)


GET_KEYS = (
    "integrand",
    "lower_limit",
    "upper_limit",
    "tolerance",
    "variable",
    "relative_tolerance",
    "parameter",
    "format",
    "field",
    "max_nodes",
    "rule",
)


def _query_number(text: str) -> Decimal | str:
    """A number typed in a URL as the exact decimal it spells; anything else is left for the engine to refuse."""
    text = text.strip()
    return Decimal(text) if _DECIMAL.fullmatch(text) else text


def _parameters(pairs: list[str]) -> dict[str, str]:
    values: dict[str, str] = {}
    for pair in pairs:
        name, sep, value = pair.partition(":")
        if not sep or not name:
            raise InvalidInput(
                f"parameter {pair[:40]!r} must be written name:value", code="invalid_parameter", field="parameter"
            )
        values[name.strip()] = value.strip()
    return values


def _with_hint(problem: dict[str, Any], request: Request) -> dict[str, Any]:
    """The problem with a sentence on how the URL was probably mistyped, when its raw text shows it."""
    extra = hint(request.scope.get("query_string", b""), problem.get("field"))
    return {**problem, "detail": problem["detail"] + extra} if extra else problem


def _refuse_repeated_keys(request: Request) -> None:
    """A key given twice is a mistake in a cell formula, not a choice of the last value (``parameter`` repeats)."""
    seen: set[str] = set()
    for key, _ in request.query_params.multi_items():
        if key in seen and key != "parameter":
            raise InvalidInput(
                f"query key {key!r} is given more than once; give it once (only parameter= repeats)",
                code="repeated_query_key",
                field=key,
            )
        seen.add(key)


def _etag(canonical: dict[str, Any], fmt: str, field: str | None) -> str:
    """Strong for text, csv and xml (the same bytes every time); weak for json, whose body also says whether
    it came from the cache and how long the engine took."""
    digest = hashlib.sha256(f"{cache_key('integral-get', canonical)}|{fmt}|{field}".encode()).hexdigest()
    return f'W/"{digest[:32]}"' if fmt == "json" else f'"{digest[:32]}"'


def _matches(if_none_match: str | None, tag: str) -> bool:
    """If-None-Match by weak comparison (RFC 9110, 13.1.2): ``*`` matches; W/ is ignored on both sides."""
    if not if_none_match:
        return False
    offered = [t.strip() for t in if_none_match.split(",")]
    return "*" in offered or tag.removeprefix("W/") in [t.removeprefix("W/") for t in offered]


def _plain_problem(body: dict[str, Any], fmt: str, request: Request) -> Response:
    retry_after = request.app.state.settings.retry_after_seconds
    if fmt == "json":
        return problem_response(body, retry_after)
    headers = problem_headers(body, retry_after)
    media = MEDIA_TYPES["xml"] if fmt == "xml" else "text/plain; charset=utf-8"
    return Response(render_problem(body, fmt), status_code=body["status"], media_type=media, headers=headers)
