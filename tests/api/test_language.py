"""The further functions and piecewise definitions through the HTTP interface: answers, and coded refusals
with a column."""

from __future__ import annotations

from fastapi.testclient import TestClient

from tests.conftest import encloses


def test_a_piecewise_load_is_certified_by_post_and_by_get(client: TestClient) -> None:
    integrand = "{5*x if x < 2; 10 if x < 5; 10*(6 - x) otherwise}"  # closed form: 10 + 30 + 5
    body = {"integrand": integrand, "lower_limit": 0, "upper_limit": 6, "tolerance": 1e-9}
    answer = client.post("/v1/integrals", json=body)
    assert answer.status_code == 200, answer.text
    result = answer.json()
    assert result["tolerance_met"] and encloses(tuple(result["enclosure"]), 45)
    assert result["integrand"] == "{5*x if x < 2; 10 if x < 5; 10*(6 - x) otherwise}"
    cell = client.get(
        "/v1/integral", params={"integrand": integrand, "lower_limit": 0, "upper_limit": 6, "tolerance": 1e-9}
    )
    assert cell.status_code == 200, cell.text
    assert abs(float(cell.text) - 45) < 1e-8


def test_new_functions_answer_through_the_service(client: TestClient) -> None:
    body = {"integrand": "j0(x)*exp(-x) + erfc(x)", "lower_limit": 0, "upper_limit": "inf", "tolerance": 1e-8}
    answer = client.post("/v1/integrals", json=body)
    assert answer.status_code == 200, answer.text
    low, high = answer.json()["enclosure"]
    import mpmath

    # closed forms: ∫ J0(x) e^(−x) = 1/√2 (Laplace transform of J0, from memory), ∫ erfc = 1/√π
    assert encloses((low, high), 1 / mpmath.sqrt(2) + 1 / mpmath.sqrt(mpmath.pi))


def test_conditions_outside_a_definition_are_refused_with_code_and_column(client: TestClient) -> None:
    for integrand, code, column in [
        ("x < 1", "misplaced_condition", 3),
        ("{x if not x < 1}", "misplaced_condition", 7),
        ("{x if x = 1}", "unsupported_operator", 9),
        ("{x if x < 1", "unbalanced_parenthesis", 1),
        ("atan2(x)", "wrong_argument_count", 1),
    ]:
        body = {"integrand": integrand, "lower_limit": 0, "upper_limit": 1}
        answer = client.post("/v1/integrals", json=body)
        assert answer.status_code == 422, (integrand, answer.text)
        problem = answer.json()
        assert problem["code"] == code and problem["column"] == column, (integrand, problem)
        check = client.get("/v1/formula", params={"integrand": integrand})
        assert check.json()["code"] == code, integrand


def test_a_branch_nowhere_applicable_is_refused_with_its_location(client: TestClient) -> None:
    body = {"integrand": "{x if x < 0}", "lower_limit": 1, "upper_limit": 2}
    answer = client.post("/v1/integrals", json=body)
    assert answer.status_code == 422, answer.text
    assert "no case of the piecewise definition holds" in answer.json()["detail"]
