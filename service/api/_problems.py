"""Every error code mapped once to an RFC 9457 problem: status, title, and the response."""

from __future__ import annotations

from typing import Any

from fastapi.responses import JSONResponse

from ._exact_json import ExactJSONResponse

from .. import __version__

PROBLEM_MEDIA_TYPE = "application/problem+json"

#: code -> (HTTP status, title); codes not listed fall back by their origin
CODES: dict[str, tuple[int, str]] = {
    "invalid_request": (422, "The request body does not match the schema"),
    "malformed_body": (400, "The request body is not valid JSON text"),
    "malformed_request": (400, "The request is not HTTP this server can read"),
    "request_timeout": (408, "The request did not arrive in time"),
    "too_many_connections": (503, "Too many open connections"),
    "body_too_large": (413, "The request body is too large"),
    "not_found": (404, "No such resource"),
    "method_not_allowed": (405, "Method not allowed on this resource"),
    "not_acceptable": (406, "Unsupported format"),
    "saturated": (503, "The service is at capacity; retry shortly"),
    "shutting_down": (503, "The service is shutting down"),
    "worker_lost": (503, "The computation's worker stopped; retry"),
    "deadline_exceeded": (504, "The computation passed its deadline"),
    "tolerance_not_met": (422, "The tolerance could not be certified within the budget"),
    "batch_too_large": (413, "Too many items in one batch"),
    "internal_error": (500, "Internal error"),
    "not_certifiable": (422, "The integral cannot be certified"),
    "unbounded_near": (422, "The integrand may be unbounded or undefined near a point"),
    "undefined_at_point": (422, "The integrand is undefined at a point of the interval"),
    "undefined_on_interval": (422, "The integrand is undefined on part of the interval"),
    "magnitude_exceeded": (422, "A value in the computation is too large"),
    "result_out_of_range": (422, "The integral is beyond the float64 range"),
    "degenerate_interval": (422, "The limits are too close to plan a mesh"),
    "plan_too_large": (422, "The plan needs too many intervals"),
    "mesh_too_large": (422, "The mesh is too large to send"),
    "repeated_query_key": (422, "A query key is given more than once"),
}
_FORMULA_TITLE = "The formula cannot be read"
_INPUT_TITLE = "A request value is unusable"


def status_and_title(code: str, kind: str | None = None) -> tuple[int, str]:
    if code in CODES:
        return CODES[code]
    if kind == "FormulaError":
        return 422, _FORMULA_TITLE
    if kind == "NotCertifiable":
        return 422, "The integral cannot be certified"
    return 422, _INPUT_TITLE


def problem_body(code: str, detail: str, *, kind: str | None = None, instance: str | None = None,
                 request_id: str | None = None, **extra: Any) -> dict[str, Any]:
    status, title = status_and_title(code, kind)
    body: dict[str, Any] = {"type": f"/problems/{code}", "title": title, "status": status, "detail": detail,
                            "code": code}
    if instance:
        body["instance"] = instance
    if request_id:
        body["request_id"] = request_id
    body.update({k: v for k, v in extra.items() if v is not None})
    return body


def problem_response(body: dict[str, Any], retry_after: int | None = None) -> JSONResponse:
    headers = {"Retry-After": str(retry_after)} if retry_after is not None and body["status"] == 503 else {}
    headers["X-Quadcert-Version"] = __version__
    return ExactJSONResponse(body, status_code=body["status"], media_type=PROBLEM_MEDIA_TYPE, headers=headers)


def from_engine_error(error: dict[str, Any], **context: Any) -> dict[str, Any]:
    """A worker's error dict (see _jobs) as a problem body."""
    return problem_body(error["code"], error["detail"], kind=error.get("kind"), column=error.get("column"),
                        field=error.get("field"),
                        location=tuple(error["location"]) if error.get("location") else None, **context)
