"""Prometheus metrics and human-readable pages for every problem type."""

from __future__ import annotations

from fastapi import APIRouter, Request
from fastapi.responses import PlainTextResponse, Response
from prometheus_client import CONTENT_TYPE_LATEST, generate_latest

from .._problems import CODES, status_and_title

router = APIRouter(tags=["operations"])


@router.get("/metrics", summary="Prometheus text exposition", response_class=PlainTextResponse)
async def metrics(request: Request) -> Response:
    return Response(generate_latest(request.app.state.metrics.registry), media_type=CONTENT_TYPE_LATEST)


@router.get("/problems/{code}", summary="What a problem type means", response_class=PlainTextResponse,
            responses={404: {"description": "No such problem type", "content": {"text/plain": {}}}})
async def problem_type(code: str) -> PlainTextResponse:
    status, title = status_and_title(code)
    known = code in CODES or code.replace("_", "").isalpha()
    text = f"{code}: {title} (HTTP {status}). The 'detail' member of each problem says what to change."
    return PlainTextResponse(text if known else "unknown problem type", status_code=200 if known else 404)
