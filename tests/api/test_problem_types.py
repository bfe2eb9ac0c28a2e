"""Every error code the code base can raise is documented once, and /problems/{code} serves it."""

from __future__ import annotations

import math
import re
from pathlib import Path

from fastapi.testclient import TestClient

from quadcert import errors
from quadcert.api._problems import PROBLEM_TYPES, problem_for, status_of

SOURCE = Path(__file__).resolve().parents[2] / "service"
RAISED = re.compile(r"""code\s*=\s*"([a-z_]+)\"""")
#: codes built from variables rather than written as code="...": listed here so the scan misses none
INDIRECT = {
    "undefined_at_point",
    "tolerance_not_met",
    "internal_error",
    "not_found",
    "method_not_allowed",
    "body_too_large",
    "batch_too_large",
    "malformed_body",
    "malformed_request",
    "request_timeout",
    "too_many_connections",
    "service_unreachable",
    "timed_out",
    "invalid_url",
    "unexpected_response",
    "invalid_request",
}


def raised_codes() -> set[str]:
    codes = set(INDIRECT)
    for path in SOURCE.rglob("*.py"):
        codes.update(RAISED.findall(path.read_text()))
    return codes


def test_every_raised_code_is_documented() -> None:
    missing = sorted(raised_codes() - set(PROBLEM_TYPES))
    assert not missing, f"document these in service/quadcert/api/_problems.py PROBLEM_TYPES: {missing}"
    assert len(raised_codes()) > 50


def test_problem_pages(client: TestClient) -> None:
    for code in ("unknown_function", "saturated", "mesh_too_large", "service_unreachable"):
        page = client.get(f"/problems/{code}")
        assert page.status_code == 200 and page.text.startswith(code) and PROBLEM_TYPES[code][2] in page.text
    assert client.get("/problems/xyz").status_code == 404


def test_one_title_per_type(client: TestClient) -> None:
    first = client.post("/v1/integrals", json={"integrand": "sinn(x)", "lower_limit": 0, "upper_limit": 1}).json()
    second = client.post(
        "/v1/integrals", json={"integrand": "cos(x) + sinn(x)", "lower_limit": 0, "upper_limit": 1}
    ).json()
    assert first["code"] == second["code"] == "unknown_function" and first["title"] == second["title"]
    assert first["title"] == PROBLEM_TYPES["unknown_function"][1]


def test_schema_errors_read_as_plain_sentences(client: TestClient) -> None:
    response = client.post(
        "/v1/integrals", json={"integrand": "x", "lower_limit": 0, "upper_limit": 1, "tolerance": "1e-6"}
    )
    body = response.json()
    assert response.status_code == 422 and body["field"] == "tolerance"
    assert "Value error" not in body["detail"] and ".float" not in body["detail"] and "decimal" not in body["detail"]
    too_long = client.post("/v1/integrals", json={"integrand": "x+" * 2100 + "x", "lower_limit": 0, "upper_limit": 1})
    assert too_long.json()["code"] == "formula_too_long"


def test_operations_have_stable_ids_and_counters_end_in_total(client: TestClient) -> None:
    document = client.get("/openapi.json").json()
    ids = {op["operationId"] for path in document["paths"].values() for op in path.values()}
    assert {"createIntegral", "createIntegralBatch", "readIntegralValue", "createCheck", "createPlan"} <= ids
    for parameter in document["paths"]["/v1/integral"]["get"]["parameters"]:
        assert parameter.get("description"), parameter["name"]
    assert document["components"]["schemas"]["IntegralRequest"]["properties"]["integrand"]["maxLength"] == 4096
    metrics = client.get("/metrics").text
    for name in ("quadcert_worker_restarts_total", "quadcert_cache_hits_total", "quadcert_cache_misses_total"):
        assert f"# TYPE {name} counter" in metrics


def _error_classes(cls: type[errors.QuadcertError]) -> list[type[errors.QuadcertError]]:
    found: list[type[errors.QuadcertError]] = []
    for sub in cls.__subclasses__():
        found += [sub, *_error_classes(sub)]
    return found


def test_a_class_status_agrees_with_its_documented_code() -> None:
    """The status an error is answered with comes from its class; the table documents the same number."""
    served = [c for c in [errors.QuadcertError, *_error_classes(errors.QuadcertError)] if c is not errors.ProblemError]
    for cls in served:
        error = cls.__new__(cls)  # the status depends on the class alone
        documented = PROBLEM_TYPES[cls.code][0]
        assert documented in (None, status_of(error)), (cls.__name__, cls.code, documented, status_of(error))
    assert status_of(errors.DeadlineExceeded("late")) == 504 and status_of(errors.WorkerLost("gone")) == 503


def test_one_function_maps_an_error_with_its_fields() -> None:
    tail = errors.NotCertifiable("no bound towards +inf", code="tail_not_bounded", location=(math.inf, math.inf))
    body = problem_for(tail, instance="/v1/integrals")
    assert body["status"] == 422 and body["location"] == ["inf", "inf"] and body["code"] == "tail_not_bounded"
    formula = problem_for(errors.FormulaError("unknown function 'sinn'", code="unknown_function", column=1))
    assert formula["column"] == 1 and formula["title"] == PROBLEM_TYPES["unknown_function"][1]
    assert problem_for(errors.Saturated("busy"))["status"] == 503
    assert problem_for(errors.EngineDefect("KeyError: 'x'"))["status"] == 500
