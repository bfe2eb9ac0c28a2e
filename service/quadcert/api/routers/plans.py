"""The a priori planner endpoint."""

from __future__ import annotations

from fastapi import APIRouter, Request
from fastapi.responses import JSONResponse

from .._exact_json import ExactRoute
from .._schemas import PlanRequest, PlanResponse
from ._common import PROBLEM_RESPONSES, computation, context, respond

router = APIRouter(tags=["plans"], route_class=ExactRoute)


@router.post(
    "/v1/plans",
    operation_id="createPlan",
    response_model=PlanResponse,
    responses=PROBLEM_RESPONSES,
    summary="Uniform Simpson and trapezoid node counts guaranteed by global bounds",
)
async def create_plan(body: PlanRequest, request: Request) -> JSONResponse:
    status, answer = await computation(request).plan(body.model_dump(), context(request))
    return respond(request, status, answer)
