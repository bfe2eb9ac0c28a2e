"""Liveness and readiness probes."""

from __future__ import annotations

from fastapi import APIRouter, Request
from fastapi.responses import JSONResponse

from .._problems import problem_body, problem_response

router = APIRouter(tags=["operations"])


@router.head("/healthz", include_in_schema=False)  # probes that only look at the status
@router.get("/healthz", operation_id="readLiveness", summary="Liveness: the process answers")
async def healthz() -> dict[str, str]:
    return {"status": "ok"}


@router.head("/readyz", include_in_schema=False)
@router.get(
    "/readyz",
    operation_id="readReadiness",
    summary="Readiness: workers are up and the queue has room",
    responses={503: {"description": "Not ready"}},
)
async def readyz(request: Request) -> JSONResponse:
    pool = request.app.state.pool
    settings = request.app.state.settings
    wait = pool.oldest_wait()
    # a queue whose oldest job has waited half a deadline means new work would mostly wait, not run
    if getattr(request.app.state, "draining", False) or not pool.ready or wait > settings.request_deadline_seconds / 2:
        body = problem_body(
            "saturated" if not pool.closed else "shutting_down",
            f"not ready: {pool.alive} workers alive, {pool.pending} jobs pending, the oldest queued for {wait:.3g} s",
            instance="/readyz",
        )
        return problem_response(body, retry_after=settings.retry_after_seconds)
    return JSONResponse(
        {"status": "ready", "workers": pool.alive, "pending": pool.pending, "queue_wait_seconds": round(wait, 3)}
    )
