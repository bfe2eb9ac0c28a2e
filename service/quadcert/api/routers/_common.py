"""Helpers shared by routers: where the computation lives and how answers become responses."""

from __future__ import annotations

from typing import Any

from fastapi import Request
from fastapi.responses import JSONResponse

from .._computation import Computation
from .._exact_json import ExactJSONResponse
from .._problems import problem_response

PROBLEM_RESPONSES: dict[int | str, dict[str, Any]] = {
    status: {
        "description": description,
        "content": {"application/problem+json": {"schema": {"$ref": "#/components/schemas/Problem"}}},
    }
    for status, description in [
        (400, "Body is not JSON text (malformed_body)"),
        (413, "Body too large"),
        (422, "Bad formula or value, or not certifiable"),
        (503, "At capacity or shutting down (see Retry-After)"),
        (504, "Deadline passed"),
    ]
}


def computation(request: Request) -> Computation:
    engine: Computation = request.app.state.computation
    return engine


def context(request: Request) -> dict[str, Any]:
    return {"instance": request.url.path, "request_id": getattr(request.state, "request_id", None)}


def respond(request: Request, status: int, body: dict[str, Any]) -> JSONResponse:
    if status == 200:
        return ExactJSONResponse(body)
    return problem_response(body, retry_after=request.app.state.settings.retry_after_seconds)
