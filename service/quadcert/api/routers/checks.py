"""The CI verdict endpoint."""

from __future__ import annotations

from fastapi import APIRouter, Request
from fastapi.responses import JSONResponse

from .._exact_json import ExactRoute
from .._schemas import CheckRequest, CheckResponse
from ._common import PROBLEM_RESPONSES, computation, context, respond

router = APIRouter(tags=["checks"], route_class=ExactRoute)


@router.post(
    "/v1/checks",
    operation_id="createCheck",
    response_model=CheckResponse,
    responses=PROBLEM_RESPONSES,
    summary="Verdict on a claimed value: pass, fail or undecided",
)
async def create_check(body: CheckRequest, request: Request) -> JSONResponse:
    status, answer = await computation(request).check(body.model_dump(), context(request))
    return respond(request, status, answer)
