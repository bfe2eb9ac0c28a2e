"""Parameters known within bounds through the HTTP interface: JSON bounds, the GET form, sensitivities, and
coded refusals."""

from __future__ import annotations

import mpmath
from fastapi.testclient import TestClient

from tests.conftest import encloses


def test_bounds_in_json_enclose_every_value_and_report_the_split(client: TestClient) -> None:
    body = {
        "integrand": "exp(-k*x)",
        "lower_limit": 0,
        "upper_limit": 1,
        "tolerance": 1e-9,
        "parameters": {"k": {"low": 1.99, "high": 2.01}},
        "sensitivities": True,
    }
    answer = client.post("/v1/integrals", json=body)
    assert answer.status_code == 200, answer.text
    result = answer.json()
    # ∫₀¹ e^(−kx) dx = (1 − e^(−k))/k (closed form) at both ends of the box
    for k in ("1.99", "2.01"):
        kk = mpmath.mpf(k)
        assert encloses(tuple(result["enclosure"]), (1 - mpmath.exp(-kk)) / kk)
        # ∂/∂k = (e^(−k)(k + 1) − 1)/k² (closed form)
        assert encloses(tuple(result["sensitivities"]["k"]), (mpmath.exp(-kk) * (kk + 1) - 1) / kk**2)
    assert result["tolerance_met"] and result["discretisation_bound"] <= 1e-9
    # the true spread is I(1.99) − I(2.01) (closed form above): the enclosure's width, spread plus twice the
    # discretisation part, covers it; the spread alone is near it (interval evaluation may widen it a little)
    ends = [(1 - mpmath.exp(-mpmath.mpf(k))) / mpmath.mpf(k) for k in ("1.99", "2.01")]
    true_spread, split = float(ends[0] - ends[1]), result["parameter_spread"] + 2 * result["discretisation_bound"]
    assert true_spread <= split and true_spread - 2e-9 <= result["parameter_spread"] <= true_spread * 1.05
    again = client.post("/v1/integrals", json={**body, "parameters": {"k": "1.99..2.01"}})
    assert again.json()["enclosure"] == result["enclosure"] and again.json()["cached"]


def test_the_spreadsheet_form_takes_bounds_as_low_dot_dot_high(client: TestClient) -> None:
    cell = client.get(
        "/v1/integral",
        params={"integrand": "k*x", "lower_limit": 0, "upper_limit": 2, "parameter": "k:0.9..1.1", "field": "high"},
    )
    assert cell.status_code == 200, cell.text
    assert 2.2 <= float(cell.text) <= 2.2 + 1e-9  # ∫₀² kx dx = 2k (closed form), at k = 1.1


def test_bad_bounds_and_unavailable_sensitivities_are_coded_problems(client: TestClient) -> None:
    base = {"integrand": "k*x", "lower_limit": 0, "upper_limit": 1}
    wrong = client.post("/v1/integrals", json={**base, "parameters": {"k": {"low": 2, "high": 1}}})
    assert wrong.status_code == 422 and wrong.json()["code"] == "invalid_parameter"
    assert wrong.json()["field"] == "parameters.k"
    extra = client.post("/v1/integrals", json={**base, "parameters": {"k": {"low": 1, "high": 2, "mid": 1.5}}})
    assert extra.status_code == 422
    moving = client.post(
        "/v1/integrals",
        json={**base, "integrand": "step(x - k)", "parameters": {"k": "0.4..0.6"}, "sensitivities": True},
    )
    assert moving.status_code == 422 and moving.json()["code"] == "sensitivity_unavailable"
