"""Prometheus metrics and human-readable pages for every problem type."""

from __future__ import annotations

from fastapi import APIRouter, Request
from fastapi.responses import PlainTextResponse, Response
from prometheus_client import CONTENT_TYPE_LATEST, generate_latest

from .._problems import PROBLEM_TYPES

router = APIRouter(tags=["operations"])


@router.get(
    "/metrics", operation_id="readMetrics", summary="Prometheus text exposition", response_class=PlainTextResponse
)
async def metrics(request: Request) -> Response:
    return Response(generate_latest(request.app.state.metrics.registry), media_type=CONTENT_TYPE_LATEST)


@router.get(
    "/problems/{code}",
    operation_id="readProblemType",
    summary="What a problem type means",
    response_class=PlainTextResponse,
    responses={404: {"description": "No such problem type", "content": {"text/plain": {}}}},
)
async def problem_type(code: str) -> PlainTextResponse:
    if code not in PROBLEM_TYPES:
        return PlainTextResponse(f"{code[:64]}: no such problem type", status_code=404)
    status, title, description = PROBLEM_TYPES[code]
    where = f"HTTP {status}" if status else "raised by the client or the CLI, never sent by the service"
    return PlainTextResponse(
        f"{code}: {title} ({where}). {description} The 'detail' member of each problem says what to change."
    )
