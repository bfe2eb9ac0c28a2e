"""JSON numbers are the decimals they spell: limits, parameters, claims and tolerances are read from their
text exactly and echoed as typed.

References: closed forms (∫₀³ x² dx = 9; ∫₀ᵇ dx = b) and exact decimal arithmetic.
"""

from __future__ import annotations

import json
from decimal import Decimal

from fastapi.testclient import TestClient

RAW = {"content-type": "application/json"}


def _post(client: TestClient, path: str, text: str):
    return client.post(path, content=text, headers=RAW)


def test_a_claim_is_not_rounded_to_float64(client: TestClient) -> None:
    """9.00000000000000015 is 1.5e-16 from the exact 9 (closed form), more than the tolerance 1e-16;
    as a float64 it would be 9.0 and pass."""
    response = _post(
        client,
        "/v1/checks",
        '{"integrand": "x^2", "lower_limit": 0, "upper_limit": 3, '
        '"claimed_value": 9.00000000000000015, "tolerance": 1e-16}',
    )
    assert response.status_code == 200, response.text
    assert '"claimed_value":9.00000000000000015' in response.text  # echoed as typed
    body = json.loads(response.text, parse_float=Decimal)
    assert body["verdict"] in ("fail", "undecided") and body["verdict"] != "pass"
    assert body["tolerance"] == Decimal("1e-16")


def test_a_claim_within_tolerance_passes_exactly(client: TestClient) -> None:
    response = _post(
        client,
        "/v1/checks",
        '{"integrand": "x^2", "lower_limit": 0, "upper_limit": 3, '
        '"claimed_value": 9.00000000000000005, "tolerance": 1e-16}',
    )
    body = json.loads(response.text, parse_float=Decimal)
    assert body["verdict"] in ("pass", "undecided"), body  # 5e-17 <= 1e-16: never fail


def test_a_limit_is_read_past_float64(client: TestClient) -> None:
    """∫ 1 dx over [0, 1.0000000000000000001] is exactly 1.0000000000000000001 (closed form); float64 has
    no number between 1 and 1 + 2.2e-16, so the enclosure must not be the point [1, 1]."""
    response = _post(
        client,
        "/v1/integrals",
        '{"integrand": "1", "lower_limit": 0, "upper_limit": 1.0000000000000000001, "tolerance": 1e-12}',
    )
    body = json.loads(response.text, parse_float=Decimal)
    assert body["upper_limit"] == "1.0000000000000000001"
    low, high = body["enclosure"]
    assert low <= Decimal("1.0000000000000000001") <= high and high > 1


def test_a_parameter_is_read_past_float64(client: TestClient) -> None:
    response = _post(
        client,
        "/v1/integrals",
        '{"integrand": "k", "lower_limit": 0, "upper_limit": 1, '
        '"parameters": {"k": 1.0000000000000000001}, "tolerance": 1e-12}',
    )
    body = json.loads(response.text, parse_float=Decimal)
    low, high = body["enclosure"]
    assert low <= Decimal("1.0000000000000000001") <= high and high > 1


def test_numbers_out_of_the_literal_range_are_refused_cheaply(client: TestClient) -> None:
    for field, text in [
        ("tolerance", "1" + "0" * 400),
        ("tolerance", "1e-999999999"),
        ("claimed_value", "1" + "0" * 400 + ".5"),
        ("parameters", '{"k": 1e-5000000}'),
    ]:
        body = {"integrand": "k*x" if field == "parameters" else "x", "lower_limit": 0, "upper_limit": 1}
        raw = json.dumps(body)[:-1] + f', "{field}": {text}' + (', "tolerance": 1e-6' if field != "tolerance" else "")
        raw += "}"
        path = "/v1/checks" if field == "claimed_value" else "/v1/integrals"
        response = _post(client, path, raw)
        assert 400 <= response.status_code < 500 and response.json()["code"] in (
            "tolerance_out_of_range",
            "invalid_tolerance",
            "invalid_claim",
            "invalid_parameter",
        ), response.text


def test_tolerance_range_is_closed_at_both_ends(client: TestClient) -> None:
    for tolerance in ("1e-60", "1e300"):
        response = _post(
            client,
            "/v1/integrals",
            f'{{"integrand": "x", "lower_limit": 0, "upper_limit": 1, "tolerance": {tolerance}}}',
        )
        assert response.status_code == 200, response.text
    response = _post(
        client, "/v1/integrals", '{"integrand": "x", "lower_limit": 0, "upper_limit": 1, "tolerance": 9.9e-61}'
    )
    assert response.json()["code"] == "tolerance_out_of_range"


def test_spreadsheet_tolerance_is_exact_text(client: TestClient) -> None:
    response = client.get(
        "/v1/integral",
        params={"integrand": "x^2", "lower_limit": "0", "upper_limit": "3", "tolerance": "0.000001", "format": "json"},
    )
    assert response.status_code == 200 and '"tolerance":0.000001' in response.text


def test_a_tolerance_below_float64_resolution_stops_early(client: TestClient) -> None:
    """1e-60 is allowed; for ∫₀³ x² = 9 float64 bounds cannot be that close, so the engine says so at once
    (resolution_limit) instead of spending the node budget."""
    response = _post(
        client, "/v1/integrals", '{"integrand": "exp(x)", "lower_limit": 0, "upper_limit": 3, "tolerance": 1e-60}'
    )
    assert response.status_code == 200, response.text
    body = response.json()
    assert body["stop_reason"] in ("resolution_limit", "tolerance_met") and body["nodes"] < 100_000


def test_cli_json_is_the_http_body(client: TestClient, capsys) -> None:
    """One result shape: `quadcert integrate --json` prints what POST /v1/integrals answers (timings and the
    cache flag aside). Both compute on flint's balls, so the figures agree to the last digit."""
    from quadcert.arithmetic import release_flint_context
    from quadcert.cli import main

    try:
        assert main(["integrate", "exp(-t^2)", "0", "1.5", "--var", "t", "--tol", "1e-9", "--json"]) == 0
    finally:
        release_flint_context()
    printed = json.loads(capsys.readouterr().out, parse_float=Decimal)
    served = json.loads(
        _post(
            client,
            "/v1/integrals",
            '{"integrand": "exp(-t^2)", "variable": "t", "lower_limit": 0, "upper_limit": 1.5, "tolerance": 1e-9}',
        ).text,
        parse_float=Decimal,
    )
    for body in (printed, served):
        body.pop("compute_seconds")
        body.pop("cached", None)
    assert printed == served
