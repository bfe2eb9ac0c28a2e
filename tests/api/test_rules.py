"""The panel rule through the HTTP interface: JSON rule, GET rule=, per-panel names, and a coded refusal."""

from __future__ import annotations

from fastapi.testclient import TestClient

from tests.conftest import HP, encloses


def test_gauss_legendre_by_post_and_get(client: TestClient) -> None:
    body = {"integrand": "exp(x)", "lower_limit": 0, "upper_limit": 2, "tolerance": 1e-12, "rule": "gauss-legendre"}
    answer = client.post("/v1/integrals", json={**body, "include_mesh": True})
    assert answer.status_code == 200, answer.text
    result = answer.json()
    assert encloses(tuple(result["enclosure"]), HP.e**2 - 1)  # closed form
    assert set(result["bounds_used"]) == {"gauss-legendre-10"}  # ten points per panel at 1e-12
    assert {p["bound"] for p in result["mesh"]} == {"gauss-legendre-10"}
    simpson = client.post("/v1/integrals", json={**body, "rule": "simpson"}).json()
    assert "gauss-legendre-10" not in simpson["bounds_used"]  # a different answer: not served from the same cache
    loose = client.post("/v1/integrals", json={**body, "tolerance": 1e-6}).json()
    assert set(loose["bounds_used"]) == {"gauss-legendre-5"}  # five points per panel above 1e-8
    cell = client.get(
        "/v1/integral",
        params={"integrand": "exp(x)", "lower_limit": 0, "upper_limit": 2, "tolerance": 1e-12, "rule": "auto"},
    )
    assert cell.status_code == 200 and abs(float(cell.text) - float(HP.e**2 - 1)) < 1e-11


def test_an_unknown_rule_is_a_coded_problem(client: TestClient) -> None:
    answer = client.post("/v1/integrals", json={"integrand": "x", "lower_limit": 0, "upper_limit": 1, "rule": "gl"})
    assert answer.status_code == 422
    cell = client.get("/v1/integral", params={"integrand": "x", "lower_limit": 0, "upper_limit": 1, "rule": "gl"})
    assert cell.status_code == 422
