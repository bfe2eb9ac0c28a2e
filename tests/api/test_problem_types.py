"""Every error code the code base can raise is documented once, and /problems/{code} serves it."""

from __future__ import annotations

import re
from pathlib import Path

from fastapi.testclient import TestClient

from quadcert.api._problems import PROBLEM_TYPES

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
