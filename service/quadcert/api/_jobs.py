"""What a worker process runs: plain dicts in, plain dicts out (picklable, transport-free)."""

from __future__ import annotations

import math
import traceback
from collections.abc import Callable
from typing import Any

from ..errors import FormulaError, InvalidInput, NotCertifiable, QuadcertError
from ..quadrature import check, integrate, plan
from ..results import check_body, integral_body, plan_body


def _error(error: Exception) -> dict[str, Any]:
    if isinstance(error, QuadcertError):
        payload: dict[str, Any] = {"code": error.code, "detail": error.message}
        if isinstance(error, (FormulaError, InvalidInput)) and getattr(error, "column", None) is not None:
            payload["column"] = error.column
        if isinstance(error, InvalidInput) and error.field:
            payload["field"] = error.field
        if isinstance(error, NotCertifiable) and error.location is not None:
            # JSON has no infinity: a tail's location is the text "inf" or "-inf"
            payload["location"] = [v if math.isfinite(v) else ("inf" if v > 0 else "-inf") for v in error.location]
        return payload
    return {
        "code": "internal_error",
        "detail": f"{type(error).__name__}: {error}",
        "trace": traceback.format_exc(limit=8),
    }


def run_integral(request: dict[str, Any]) -> dict[str, Any]:
    request = dict(request)
    limit = request.pop("max_mesh_panels", None)
    result = integrate(**request)
    if limit is not None and result.mesh is not None and len(result.mesh) > limit:
        raise InvalidInput(
            f"the mesh has {len(result.mesh)} panels, more than the {limit} an answer may carry; "
            "ask without include_mesh, or with a looser tolerance",
            code="mesh_too_large",
            field="include_mesh",
        )
    # the answer's final shape, bounds printed outward, built here in the worker, not on the event loop
    return integral_body(result, request)


def run_check(request: dict[str, Any]) -> dict[str, Any]:
    return check_body(check(**request), request)


def run_plan(request: dict[str, Any]) -> dict[str, Any]:
    return plan_body(plan(**request))


def run_sleep(request: dict[str, Any]) -> dict[str, Any]:  # used by fault tests only
    import time

    time.sleep(float(request["seconds"]))
    return {"slept": request["seconds"]}


JOBS: dict[str, Callable[[dict[str, Any]], dict[str, Any]]] = {
    "integral": run_integral,
    "check": run_check,
    "plan": run_plan,
    "sleep": run_sleep,
}


def execute(kind: str, request: dict[str, Any]) -> dict[str, Any]:
    """Never raises: an answer is {"ok": ...} or {"error": ...}."""
    try:
        return {"ok": JOBS[kind](request)}
    except Exception as error:  # noqa: BLE001 - every failure must become an answer
        return {"error": _error(error)}
