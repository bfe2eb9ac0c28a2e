"""POST /v1/integrals and /v1/integrals/batch, in-process."""

from __future__ import annotations

from fastapi.testclient import TestClient

from tests.conftest import HP, encloses

PROBLEM = "application/problem+json"


def _post(client: TestClient, **body):
    return client.post("/v1/integrals", json=body)


def test_certified_integral(client: TestClient) -> None:
    response = _post(client, integrand="4/(1+x^2)", lower_limit=0, upper_limit=1, tolerance=1e-10)
    assert response.status_code == 200
    body = response.json()
    assert encloses(body["enclosure"], HP.pi)  # closed form pi
    assert body["tolerance_met"] and body["error_bound"] <= 1e-10
    assert body["integrand"] == "4/(1 + x^2)" and body["nodes"] > 0 and body["panels"] > 0
    assert body["compute_seconds"] >= 0 and body["engine_version"]
    assert response.headers["x-request-id"]


def test_text_limits_and_parameters(client: TestClient) -> None:
    body = _post(
        client,
        integrand="k*cos(t)",
        variable="t",
        lower_limit="0",
        upper_limit="pi/2",
        parameters={"k": 3},
        tolerance=1e-9,
    ).json()
    assert encloses(body["enclosure"], 3)  # closed form 3*sin(pi/2)
    assert body["upper_limit"] == "pi/2"


def test_cache_serves_the_same_answer(client: TestClient) -> None:
    first = _post(client, integrand="exp(x)", lower_limit=0, upper_limit=1, tolerance=1e-9).json()
    again = _post(client, integrand="exp( x )", lower_limit="0", upper_limit=1.0, tolerance=1e-9).json()
    assert again["cached"] and again["enclosure"] == first["enclosure"]


def test_mesh_on_request(client: TestClient) -> None:
    body = _post(client, integrand="sqrt(x)", lower_limit=0, upper_limit=1, tolerance=1e-6, include_mesh=True).json()
    assert len(body["mesh"]) == body["panels"] and body["mesh"][0]["bound"] == "range"


def test_formula_error_is_a_problem_with_column(client: TestClient) -> None:
    response = _post(client, integrand="2*sinn(x)", lower_limit=0, upper_limit=1)
    assert response.status_code == 422 and response.headers["content-type"] == PROBLEM
    body = response.json()
    assert body["code"] == "unknown_function" and body["column"] == 3
    assert body["type"] == "/problems/unknown_function" and body["title"] and body["status"] == 422
    assert "did you mean 'sin'" in body["detail"]


def test_refusal_carries_location(client: TestClient) -> None:
    body = _post(client, integrand="1/(x-0.3)", lower_limit=0, upper_limit=1, tolerance=1e-6).json()
    assert body["code"] == "divergent_integral" and body["location"][0] <= 0.3 <= body["location"][1]


def test_schema_errors(client: TestClient) -> None:
    cases = [
        {"integrand": "x", "lower_limit": 0, "upper_limit": 1, "unknown": 1},
        {"integrand": "x", "lower_limit": 0},
        {"integrand": 5, "lower_limit": 0, "upper_limit": 1},
        {"integrand": "x", "lower_limit": True, "upper_limit": 1},
        {"integrand": "x", "lower_limit": 0, "upper_limit": 1, "tolerance": "small"},
    ]
    for body in cases:
        response = client.post("/v1/integrals", json=body)
        assert response.status_code == 422, body
        assert response.json()["code"] == "invalid_request" and response.json()["errors"]


def test_non_finite_json_tokens(client: TestClient) -> None:
    for raw in [
        '{"integrand":"x","lower_limit":0,"upper_limit":1,"tolerance":NaN}',
        '{"integrand":"x","lower_limit":0,"upper_limit":Infinity}',
        '{"integrand":"x","lower_limit":-Infinity,"upper_limit":1}',
    ]:
        response = client.post("/v1/integrals", content=raw, headers={"content-type": "application/json"})
        assert response.status_code == 422 and response.json()["code"] in (
            "invalid_tolerance",
            "divergent_integral",
            "invalid_request",
        ), raw


def test_malformed_and_oversized_bodies(client: TestClient) -> None:
    response = client.post("/v1/integrals", content=b"\xff\xfe{", headers={"content-type": "application/json"})
    assert response.status_code in (400, 422)
    assert response.json()["code"] in ("malformed_body", "invalid_request")
    big = client.post("/v1/integrals", content=b"x" * 300_000, headers={"content-type": "application/json"})
    assert big.status_code == 413 and big.json()["code"] == "body_too_large"


def test_batch_answers_every_item_in_order(client: TestClient) -> None:
    items = [
        {"integrand": "x", "lower_limit": 0, "upper_limit": 1},
        {"integrand": "2x", "lower_limit": 0, "upper_limit": 1},
        {"integrand": "1/x", "lower_limit": -1, "upper_limit": 1},
        {"integrand": "exp(x)", "lower_limit": 0, "upper_limit": 2, "tolerance": 1e-9},
        {"integrand": "log(x)", "lower_limit": "-1", "upper_limit": 1},
    ]
    response = client.post("/v1/integrals/batch", json={"items": items})
    assert response.status_code == 200
    results = response.json()["results"]
    assert len(results) == len(items)
    assert encloses(results[0]["enclosure"], HP.mpf(1) / 2)  # closed form 1/2
    assert results[1]["code"] == "implicit_multiplication" and results[1]["column"] == 2
    assert results[2]["code"] == "divergent_integral"
    assert encloses(results[3]["enclosure"], HP.e**2 - 1)  # closed form e^2 - 1
    assert results[4]["status"] == 422
    assert results[1]["instance"].endswith("#/items/1")


def test_batch_limits(client: TestClient) -> None:
    items = [{"integrand": "x", "lower_limit": 0, "upper_limit": 1}] * 51
    assert client.post("/v1/integrals/batch", json={"items": items}).status_code == 413
    assert client.post("/v1/integrals/batch", json={"items": []}).status_code == 422


def test_unknown_route_and_method(client: TestClient) -> None:
    missing = client.get("/v1/nothing")
    assert missing.status_code == 404 and missing.json()["code"] == "not_found"
    wrong = client.delete("/v1/integrals")
    assert wrong.status_code == 405 and wrong.json()["code"] == "method_not_allowed"


def test_a_budget_below_the_minimum_is_refused_not_replaced(client: TestClient) -> None:
    """max_nodes 0 is a mistake to name, not a request for the server's default (which applies when absent)."""
    for budget, code in ((0, "budget_out_of_range"), (2, "budget_out_of_range")):
        body = {"integrand": "x", "lower_limit": 0, "upper_limit": 1, "max_nodes": budget}
        problem = client.post("/v1/integrals", json=body).json()
        assert problem["code"] == code and problem["field"] == "max_nodes"
    assert client.post("/v1/integrals", json={"integrand": "x", "lower_limit": 0, "upper_limit": 1}).status_code == 200
