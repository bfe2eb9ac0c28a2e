"""Regressions from an attack run, in-process: number text that could freeze the loop, huge integers, mesh
limits, HTTP semantics (405 Allow, HEAD probes, 400 for non-JSON, ETags, repeated query keys)."""

from __future__ import annotations

import time

import pytest
from fastapi.testclient import TestClient

from quadcert.api import Settings, create_app

RAW = {"content-type": "application/json"}


@pytest.mark.parametrize("text", ["1e-4400", "1e-5000000", "1e-999999999", "1e+999999999", "9" * 70])
def test_parameter_text_is_checked_before_any_number_is_built(client: TestClient, text: str) -> None:
    started = time.monotonic()
    response = client.post(
        "/v1/integrals", json={"integrand": "a*x", "lower_limit": 0, "upper_limit": 1, "parameters": {"a": text}}
    )
    assert response.status_code == 422 and response.json()["code"] == "invalid_parameter"
    assert response.json()["field"] == "parameters.a"
    assert time.monotonic() - started < 5  # a coded answer, not hours of Fraction(): not a speed target
    get = client.get(
        "/v1/integral", params={"integrand": "a*x", "lower_limit": "0", "upper_limit": "1", "parameter": f"a:{text}"}
    )
    assert get.status_code == 422 and get.headers["content-type"].startswith("text/plain")
    assert get.text.startswith("error 422 invalid_parameter")


@pytest.mark.parametrize(
    "path, field, code",
    [
        ("/v1/integrals", "tolerance", "tolerance_out_of_range"),
        ("/v1/integrals", "relative_tolerance", "tolerance_out_of_range"),
        ("/v1/checks", "claimed_value", "invalid_claim"),
        ("/v1/plans", "tolerance", "tolerance_out_of_range"),
    ],
)
def test_huge_json_integers_are_refused_with_their_field(client: TestClient, path: str, field: str, code: str) -> None:
    body = '{{"integrand": "x", "lower_limit": 0, "upper_limit": 1, "{}": {}{}}}'.format(
        field,
        "9" * 1400,
        ', "claimed_value": 0.5' if path == "/v1/checks" and field != "claimed_value" else "",
    )
    response = client.post(path, content=body, headers=RAW)
    assert response.status_code == 422, response.text[:200]
    assert response.json()["code"] == code and "OverflowError" not in response.text


def test_a_mesh_over_the_limit_is_refused_cleanly() -> None:
    app = create_app(Settings(workers=1, max_mesh_panels=10, log_level="WARNING"))
    with TestClient(app) as client:
        response = client.post(
            "/v1/integrals",
            json={
                "integrand": "sin(30*x)",
                "lower_limit": 0,
                "upper_limit": 3,
                "tolerance": 1e-8,
                "include_mesh": True,
            },
        )
        assert response.status_code == 422 and response.json()["code"] == "mesh_too_large"
        assert (
            client.post(
                "/v1/integrals", json={"integrand": "sin(30*x)", "lower_limit": 0, "upper_limit": 3, "tolerance": 1e-8}
            ).status_code
            == 200
        )


def test_http_semantics(client: TestClient) -> None:
    wrong = client.delete("/v1/integrals")
    assert wrong.status_code == 405 and wrong.headers["allow"] == "POST"
    assert wrong.headers["content-type"] == "application/problem+json"
    assert client.head("/healthz").status_code == 200
    broken = client.post("/v1/integrals", content=b'{"integrand": "x", "lower_', headers=RAW)
    assert broken.status_code == 400 and broken.json()["code"] == "malformed_body"
    assert "character" in broken.json()["detail"]


def test_etags_are_weak_for_json_and_if_none_match_compares_weakly(client: TestClient) -> None:
    params = {"integrand": "x^3", "lower_limit": "0", "upper_limit": "2"}
    text = client.get("/v1/integral", params=params)
    body = client.get("/v1/integral", params={**params, "format": "json"})
    assert not text.headers["etag"].startswith("W/") and body.headers["etag"].startswith("W/")
    for offered in ("*", text.headers["etag"], "W/" + text.headers["etag"], f'"other", {text.headers["etag"]}'):
        again = client.get("/v1/integral", params=params, headers={"if-none-match": offered})
        assert again.status_code == 304, offered
    assert client.get("/v1/integral", params=params, headers={"if-none-match": '"other"'}).status_code == 200
    assert (
        client.get(
            "/v1/integral",
            params={**params, "format": "json"},
            headers={"if-none-match": body.headers["etag"].removeprefix("W/")},
        ).status_code
        == 304
    )


def test_repeated_query_keys_are_refused(client: TestClient) -> None:
    response = client.get("/v1/integral?integrand=x&lower_limit=0&upper_limit=1&upper_limit=2")
    assert response.status_code == 422 and "upper_limit" in response.text and "more than once" in response.text
    both = client.get("/v1/integral?integrand=a*b*x&lower_limit=0&upper_limit=1&parameter=a:2&parameter=b:3")
    assert both.status_code == 200 and float(both.text) == pytest.approx(3.0)  # closed form 6/2
