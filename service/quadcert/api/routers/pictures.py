"""Pictures of how a certificate was earned: the boxes as JSON for the page at ``/``, and the formula check
the page runs as the user types."""

from __future__ import annotations

from typing import Annotated

from fastapi import APIRouter, Query, Request
from fastapi.responses import JSONResponse, Response

from ..._version import ENGINE_VERSION
from ...errors import QuadcertError
from ...formula import parse
from .._exact_json import ExactJSONResponse, ExactRoute
from .._problems import problem_for
from .._schemas import FormulaCheck, IntegralRequest, PictureResponse, RequestCheck
from ._common import PROBLEM_RESPONSES, computation, context, respond

router = APIRouter(tags=["pictures"], route_class=ExactRoute)


@router.post(
    "/v1/pictures",
    operation_id="createPicture",
    response_model=PictureResponse,
    responses=PROBLEM_RESPONSES,
    summary="Certify one integral and return its picture: f enclosed over every panel, and each panel's error",
)
async def create_picture(body: IntegralRequest, request: Request) -> Response:
    status, answer = await computation(request).picture(body.model_dump(), context(request))
    if status != 200:
        return respond(request, status, answer)
    return Response(answer["json"], media_type="application/json")  # encoded by the worker


@router.post(
    "/v1/integrals/validate",
    operation_id="validateIntegral",
    response_model=RequestCheck,
    responses=PROBLEM_RESPONSES,
    summary="Check an integral request without computing it: the problem it would get, with field and column",
)
async def validate_integral(body: IntegralRequest, request: Request) -> JSONResponse:
    status, answer = await computation(request).validate(body.model_dump(), context(request))
    return respond(request, status, answer)


@router.get(
    "/v1/formula",
    operation_id="readFormulaCheck",
    response_model=FormulaCheck,
    responses=PROBLEM_RESPONSES,
    summary="Read a formula without integrating it: its canonical text, or the problem with its column",
)
async def read_formula(
    request: Request,
    integrand: Annotated[str, Query(max_length=4096, description="the formula")],
    variable: Annotated[str, Query(max_length=64)] = "x",
    parameter: Annotated[list[str] | None, Query(description="a parameter name the formula may use")] = None,
) -> JSONResponse:
    try:
        formula = parse(integrand, variable=variable, parameters=tuple(parameter or ()))
    except QuadcertError as error:
        return respond(request, 422, problem_for(error, **context(request)))
    return ExactJSONResponse(
        {"integrand": formula.text, "variable": formula.variable, "engine_version": ENGINE_VERSION}
    )
