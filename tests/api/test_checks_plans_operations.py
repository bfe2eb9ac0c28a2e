"""POST /v1/checks, POST /v1/plans, probes, metrics, problem pages and the OpenAPI document."""

from __future__ import annotations

import json
from pathlib import Path

from fastapi.testclient import TestClient

NOTES = Path(__file__).resolve().parents[2] / "openapi-notes" / "openapi.json"


def _check(client: TestClient, claimed: float, tolerance: float = 1e-6, **extra):
    body = {
        "integrand": "exp(x)",
        "lower_limit": 0,
        "upper_limit": 2,
        "claimed_value": claimed,
        "tolerance": tolerance,
        **extra,
    }
    return client.post("/v1/checks", json=body)


def test_verdicts(client: TestClient) -> None:
    exact = 6.38905609893065  # e^2 - 1 (closed form), rounded
    passing = _check(client, exact).json()
    assert passing["verdict"] == "pass" and passing["distance"][1] <= 1e-6
    failing = _check(client, exact + 1e-3).json()
    assert failing["verdict"] == "fail" and failing["distance"][0] > 1e-6
    assert failing["integral"]["tolerance_met"] is not None


def test_undecided_when_budget_runs_out(client: TestClient) -> None:
    body = _check(client, 6.38905609893065, tolerance=1e-14, max_nodes=5).json()
    assert body["verdict"] == "undecided"


def test_check_errors(client: TestClient) -> None:
    response = client.post("/v1/checks", json={"integrand": "x", "lower_limit": 0, "upper_limit": 1})
    assert response.status_code == 422 and response.json()["code"] == "invalid_request"


def test_plan(client: TestClient) -> None:
    body = client.post(
        "/v1/plans", json={"integrand": "exp(x)", "lower_limit": 0, "upper_limit": 2, "tolerance": 0.5e-4}
    ).json()
    assert body["simpson"]["nodes"] == 15 and body["trapezoid"]["nodes"] == 315  # hand calculation in planner tests
    bad = client.post("/v1/plans", json={"integrand": "exp(", "lower_limit": 0, "upper_limit": 2})
    assert bad.status_code == 422 and bad.json()["column"] == 5


def test_probes(client: TestClient) -> None:
    assert client.get("/healthz").json() == {"status": "ok"}
    ready = client.get("/readyz")
    assert ready.status_code == 200 and ready.json()["workers"] == 2


def test_metrics_are_prometheus_text(client: TestClient) -> None:
    client.get("/healthz")
    text = client.get("/metrics").text
    assert "# TYPE quadcert_http_requests_total counter" in text
    assert "quadcert_workers_alive 2.0" in text


def test_problem_pages(client: TestClient) -> None:
    assert "HTTP 422" in client.get("/problems/unknown_function").text


def test_exported_openapi_is_in_sync(client: TestClient) -> None:
    served = client.get("/openapi.json").json()
    assert served["openapi"].startswith("3.1")
    exported = json.loads(NOTES.read_text())
    assert served == exported, "run: python -m quadcert.api.export_openapi > openapi-notes/openapi.json"


def test_every_json_operation_documents_malformed_body(client: TestClient) -> None:
    document = client.get("/openapi.json").json()
    for path in ("/v1/integrals", "/v1/integrals/batch", "/v1/checks", "/v1/plans"):
        assert "400" in document["paths"][path]["post"]["responses"], path


def test_docs_page_is_self_contained(client: TestClient) -> None:
    import re

    page = client.get("/docs")
    assert page.status_code == 200 and page.headers["content-type"].startswith("text/html")
    assert "/v1/integrals" in page.text and "readIntegralValue" in page.text
    assert not re.search(r"(src|href)=[\"']?https?://", page.text)  # nothing fetched from elsewhere
    assert client.get("/redoc").status_code == 404
