"""Every error code documented once (``PROBLEM_TYPES``: status, title, meaning), and every error turned into
an RFC 9457 problem document here, by one function (:func:`problem_for`); ``/problems/{code}`` serves the
same table.

The HTTP status of an error comes from its class, found by walking the class hierarchy (``STATUS_BY_CLASS``):
a new subclass of ``ServiceError`` is a 503 without anyone listing it. Codes that no exception carries (a
framework's 404, a malformed body) take their status from the table.
"""

from __future__ import annotations

import math
from typing import Any

from fastapi.responses import JSONResponse

from .. import __version__
from ..errors import (
    DeadlineExceeded,
    EngineDefect,
    FormulaError,
    InvalidInput,
    NotCertifiable,
    ProblemError,
    QuadcertError,
    ServiceError,
)
from ._exact_json import ExactJSONResponse

PROBLEM_MEDIA_TYPE = "application/problem+json"

_FORMULA = "The formula cannot be read"
_INPUT = "A request value is unusable"
_CERTIFY = "The integral cannot be certified"
_BUSY = "The service cannot take the work now"

#: the HTTP status of each error class; an error takes the entry of the nearest class in its hierarchy
STATUS_BY_CLASS: dict[type[QuadcertError], int] = {
    QuadcertError: 422,  # the request as sent cannot be answered: fix it, do not retry it
    ServiceError: 503,  # the service cannot run it now: retry after Retry-After
    DeadlineExceeded: 504,
    EngineDefect: 500,
}


def status_of(error: QuadcertError) -> int:
    """The status of the nearest class in ``error``'s hierarchy that has one.

    >>> from quadcert.errors import Saturated, WorkerLost
    >>> status_of(Saturated("full")), status_of(DeadlineExceeded("late")), status_of(InvalidInput("no"))
    (503, 504, 422)
    """
    for cls in type(error).__mro__:
        if cls in STATUS_BY_CLASS:
            return STATUS_BY_CLASS[cls]
    return 422  # not reached: every error is a QuadcertError


#: every problem code, documented once: code -> (HTTP status, title, what it means and what to change).
#: /problems/{code} serves the description; tests/api/test_problem_types.py checks that every code the
#: code base can raise is here.
#: The status column is what the service answers (a raised error's status comes from its class, and a test
#: holds the two to agree); None marks a code the client and CLI raise themselves, with no HTTP answer.
PROBLEM_TYPES: dict[str, tuple[int | None, str, str]] = {
    # the request itself
    "invalid_request": (
        422,
        "The request body does not match the schema",
        "A field is missing, has the wrong type, or is not known; 'errors' lists each one.",
    ),
    "malformed_body": (
        400,
        "The request body is not JSON text",
        "Send a JSON object; 'detail' says where the text stopped being JSON.",
    ),
    "malformed_request": (
        400,
        "The request is not HTTP this server can read",
        "The bytes were not an HTTP/1.1 request, or its request line or headers were too long.",
    ),
    "request_timeout": (
        408,
        "The request did not arrive in time",
        "Headers and body must arrive whole within the server's read timeout.",
    ),
    "body_too_large": (413, "The request body is too large", "Send less than the server's body limit."),
    "batch_too_large": (413, "Too many items in one batch", "Split the batch."),
    "not_found": (404, "No such resource", "See /openapi.json for the resources."),
    "method_not_allowed": (405, "Method not allowed on this resource", "The Allow header lists the methods."),
    "unknown_query_key": (
        422,
        _INPUT,
        "The query has a key this endpoint does not read; the nearest known key is suggested.",
    ),
    "repeated_query_key": (422, _INPUT, "A query key is given twice; only parameter= may repeat."),
    # the formula
    "empty_formula": (422, _FORMULA, "The formula is empty."),
    "formula_syntax": (422, _FORMULA, "The formula does not follow the grammar at the column given."),
    "formula_too_long": (422, _FORMULA, "The formula is longer than 4096 characters."),
    "formula_too_large": (422, _FORMULA, "The formula has more than 1000 nodes or is nested too tall."),
    "nesting_too_deep": (422, _FORMULA, "Parentheses, calls and powers nest deeper than 64."),
    "unexpected_character": (422, _FORMULA, "A character the language does not use (look-alike Unicode too)."),
    "unexpected_token": (422, _FORMULA, "A number, name or operator where the grammar does not allow it."),
    "unexpected_end": (422, _FORMULA, "The formula stops where more was expected."),
    "unbalanced_parenthesis": (422, _FORMULA, "A parenthesis is not closed or not opened."),
    "implicit_multiplication": (422, _FORMULA, "Two factors with no operator between them: write 2*x, not 2x."),
    "unknown_function": (422, _FORMULA, "A name followed by ( is not one of the language's functions."),
    "unknown_name": (422, _FORMULA, "A name is not the variable, a parameter or a constant."),
    "missing_parameter": (422, _FORMULA, "The formula uses a parameter that the request does not give."),
    "wrong_argument_count": (422, _FORMULA, "A function got the wrong number of arguments."),
    "missing_arguments": (422, _FORMULA, "A function was written without its arguments."),
    "unsupported_operator": (422, _FORMULA, "An operator the language does not have."),
    "misplaced_condition": (
        422,
        _FORMULA,
        "A condition, or a word of one (if, otherwise, and, or), outside the cases of a piecewise definition.",
    ),
    "literal_too_long": (422, _FORMULA, "A number has more than 60 significant digits."),
    "literal_out_of_range": (422, _FORMULA, "A number's exponent is beyond ±1000."),
    "power_too_large": (422, _FORMULA, "A literal exponent in x^n is beyond ±1000."),
    "invalid_formula": (422, _FORMULA, "The formula cannot be used as written."),
    "invalid_name": (422, _INPUT, "The variable or a parameter name is not a plain identifier."),
    "reserved_name": (422, _INPUT, "A parameter or variable is named like a function or constant."),
    # the other values
    "invalid_input": (422, _INPUT, "A request value is unusable; 'field' names it."),
    "invalid_limit": (422, _INPUT, "A limit is not a number or a constant expression."),
    "infinite_limit": (
        422,
        _INPUT,
        "This operation (a plan of uniform node counts) needs finite limits; integrals take inf and -inf.",
    ),
    "limit_out_of_range": (422, _INPUT, "A limit is beyond ±1e300."),
    "invalid_tolerance": (422, _INPUT, "A tolerance is not a finite number above zero."),
    "tolerance_out_of_range": (422, _INPUT, "A tolerance is outside [1e-60, 1e300] (a relative one: below 1)."),
    "invalid_parameter": (422, _INPUT, "A parameter value is not a finite number within the literal limits."),
    "too_many_parameters": (422, _INPUT, "More than 32 parameters."),
    "invalid_claim": (422, _INPUT, "The claimed value is not a finite number within the literal limits."),
    "invalid_budget": (422, _INPUT, "max_nodes is not a whole number."),
    "budget_out_of_range": (422, _INPUT, "max_nodes is outside [3, 2000001]."),
    "invalid_deadline": (422, _INPUT, "The deadline is not a positive number of seconds."),
    "invalid_rule": (422, _INPUT, "The panel rule is not simpson, gauss-legendre or auto."),
    "invalid_precision": (422, _INPUT, "The working precision asked for is outside what the engine allows."),
    "backend_unavailable": (422, _INPUT, "The arithmetic backend asked for cannot run in this thread."),
    "invalid_csv": (422, _INPUT, "A CSV file's header lacks a required column."),
    "invalid_checks_file": (422, _INPUT, "A file of checks cannot be read or lacks a required key."),
    "mesh_too_large": (422, "The mesh is too large to send", "Ask without include_mesh, or with a looser tolerance."),
    # certification
    "not_certifiable": (422, _CERTIFY, "The engine cannot certify this integral; 'detail' says why."),
    "sensitivity_unavailable": (
        422,
        "No certified sensitivity for a parameter",
        "A jump moves with the parameter, or its derivative needs a function the language lacks; ask without them.",
    ),
    "unbounded_near": (
        422,
        "The integrand may be unbounded or undefined near a point",
        "'location' is the interval where it could not be bounded.",
    ),
    "undefined_at_point": (
        422,
        "The integrand is undefined at a point of the interval",
        "'location' is the point; the formula as written has no value there.",
    ),
    "undefined_on_interval": (
        422,
        "The integrand is undefined on part of the interval",
        "A function's argument leaves its domain inside the limits.",
    ),
    "outside_domain": (
        422,
        "The integrand is undefined on part of the interval",
        "A function's argument leaves its domain.",
    ),
    "unbounded": (422, "The integrand may be unbounded or undefined near a point", "A division by zero or a pole."),
    "divergent_integral": (
        422,
        "The integral diverges",
        (
            "Proved: next to 'location' (a point, or ±inf) the "
            "integrand keeps one sign and is at least a multiple of a power that is not integrable; "
            "'detail' gives that minorant."
        ),
    ),
    "singularity_not_bounded": (
        422,
        "The integrand cannot be bounded next to a singular point",
        (
            "No envelope rule applies at 'location'; 'detail' names the subexpression. "
            "Rewrite the formula, or split the interval there."
        ),
    ),
    "singularity_undecided": (
        422,
        "Convergence next to a singular point is undecided",
        "The best envelope found at 'location' is not integrable, and no minorant of one sign proves divergence.",
    ),
    "tail_not_bounded": (
        422,
        "The integrand cannot be bounded in a tail",
        "No envelope rule applies towards 'location' (±inf), or it decays too slowly for the tolerance.",
    ),
    "tail_undecided": (
        422,
        "Convergence of a tail is undecided",
        (
            "The best envelope found is not integrable and "
            "no minorant of one sign proves divergence; integrals that converge only conditionally, "
            "such as sin(x)/x on [0, inf), are refused."
        ),
    ),
    "arithmetic_fault": (422, _CERTIFY, "Interval arithmetic could not bound a value."),
    "magnitude_exceeded": (422, "A value in the computation is too large", "A value beyond 2^65536 arose."),
    "result_out_of_range": (422, "The integral is beyond the float64 range", "Scale the formula."),
    "degenerate_interval": (422, "The limits are too close to plan a mesh", "Widen the interval."),
    "plan_too_large": (422, "The plan needs too many intervals", "A uniform mesh would exceed the limit."),
    "tolerance_not_met": (
        422,
        "The tolerance could not be certified within the budget",
        "The enclosure is rigorous but wider than asked; raise max_nodes or the tolerance.",
    ),
    # the service
    "saturated": (503, _BUSY, "All workers are busy and the queue is full; retry after Retry-After."),
    "shutting_down": (503, "The service is shutting down", "Send the work to another replica."),
    "worker_lost": (503, "The computation's worker stopped", "Retry after Retry-After."),
    "too_many_connections": (503, _BUSY, "The server holds as many connections as it may; retry shortly."),
    "service_error": (503, _BUSY, "The computation could not run; retry."),
    "deadline_exceeded": (
        504,
        "The computation passed its deadline",
        "In the queue or computing; raise the tolerance or split the interval.",
    ),
    "internal_error": (500, "Internal error", "A defect in quadcert; it has been logged with the request id."),
    # raised by the client and the CLI only, never sent by the service
    "service_unreachable": (None, "The service could not be reached", "No HTTP answer came; check the URL."),
    "timed_out": (None, "The service did not answer in time", "The client's timeout passed."),
    "invalid_url": (None, "Not a service URL", "Write the URL with http:// or https://."),
    "unexpected_response": (None, "The answer was not a quadcert answer", "Something else answered at that URL."),
    "problem": (None, "A problem answered by the service", "See the problem's own code."),
    "quadcert_error": (None, "A quadcert error", "See the error's own code."),
}


def _title(code: str) -> str:
    return PROBLEM_TYPES[code][1] if code in PROBLEM_TYPES else _INPUT


def problem_body(
    code: str,
    detail: str,
    *,
    status: int | None = None,
    instance: str | None = None,
    request_id: str | None = None,
    **extra: Any,
) -> dict[str, Any]:
    """A problem document for a code raised by no exception (a framework's 404, a malformed body), or, with
    ``status``, for one that is (see :func:`problem_for`)."""
    if status is None:
        documented = PROBLEM_TYPES.get(code, (None, "", ""))[0]
        status = documented if documented is not None else 422
    body: dict[str, Any] = {
        "type": f"/problems/{code}",
        "title": _title(code),
        "status": status,
        "detail": detail,
        "code": code,
    }
    if instance:
        body["instance"] = instance
    if request_id:
        body["request_id"] = request_id
    body.update({k: v for k, v in extra.items() if v is not None})
    return body


def problem_headers(body: dict[str, Any], retry_after: int | None) -> dict[str, str]:
    """The headers every problem answer carries, decided in this one place: Retry-After on a 503."""
    headers = {"X-Quadcert-Version": __version__, "Cache-Control": "no-store"}
    if retry_after is not None and body["status"] == 503:
        headers["Retry-After"] = str(retry_after)
    return headers


def problem_response(body: dict[str, Any], retry_after: int | None = None) -> JSONResponse:
    return ExactJSONResponse(
        body, status_code=body["status"], media_type=PROBLEM_MEDIA_TYPE, headers=problem_headers(body, retry_after)
    )


def problem_for(error: QuadcertError, **context: Any) -> dict[str, Any]:
    """The one mapping from an error to a problem document: status by class, title by code, and the
    error's own fields (the column in the formula, the field of the request, where certification failed)."""
    column = getattr(error, "column", None) if isinstance(error, (FormulaError, InvalidInput, ProblemError)) else None
    location = None
    if isinstance(error, NotCertifiable) and error.location is not None:
        # JSON has no infinity: a tail's location is the text "inf" or "-inf"
        location = [v if math.isfinite(v) else ("inf" if v > 0 else "-inf") for v in error.location]
    return problem_body(
        error.code,
        error.message,
        status=status_of(error),
        column=column,
        field=error.field if isinstance(error, InvalidInput) else None,
        location=location,
        **context,
    )
