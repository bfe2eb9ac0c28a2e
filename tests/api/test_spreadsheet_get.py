"""GET /v1/integral: bare numbers for spreadsheet web-query functions."""

from __future__ import annotations

from urllib.parse import urlencode

import pytest
from fastapi.testclient import TestClient

from tests.conftest import HP, encloses

BASE = {"integrand": "exp(-x^2)", "lower_limit": "0", "upper_limit": "1", "tolerance": "1e-12"}


def test_text_is_the_bare_number(client: TestClient) -> None:
    response = client.get("/v1/integral", params=BASE)
    assert response.status_code == 200
    text = response.text
    assert text == text.strip() and "\n" not in text and "," not in text
    assert float(text) == float(repr(float(text)))  # round-trips a float64
    assert abs(HP.mpf(text) - HP.sqrt(HP.pi) / 2 * HP.erf(1)) <= 1e-12  # A&S table 7.1 closed form
    assert response.headers["content-type"].startswith("text/plain")
    assert response.headers["etag"] and "max-age" in response.headers["cache-control"]


def test_fields_and_formats(client: TestClient) -> None:
    low = float(client.get("/v1/integral", params={**BASE, "field": "low"}).text)
    high = float(client.get("/v1/integral", params={**BASE, "field": "high"}).text)
    assert encloses((low, high), HP.sqrt(HP.pi) / 2 * HP.erf(1))  # closed form, A&S 7.1
    assert int(client.get("/v1/integral", params={**BASE, "field": "nodes"}).text) > 0
    csv = client.get("/v1/integral", params={**BASE, "format": "csv"}).text
    header, row = csv.split("\r\n")
    assert header == "value,error_bound,low,high,nodes" and len(row.split(",")) == 5
    xml = client.get("/v1/integral", params={**BASE, "format": "xml", "field": "value"}).text
    assert xml.startswith("<?xml") and "<value>" in xml
    assert client.get("/v1/integral", params={**BASE, "format": "json"}).json()["tolerance_met"]


def test_etag_revalidation(client: TestClient) -> None:
    first = client.get("/v1/integral", params=BASE)
    again = client.get("/v1/integral", params=BASE, headers={"If-None-Match": first.headers["etag"]})
    assert again.status_code == 304 and again.content == b""


def test_failures_are_one_line_non_2xx(client: TestClient) -> None:
    for params in [
        {**BASE, "integrand": "log(x)", "lower_limit": "-1"},
        {**BASE, "integrand": "sinn(x)"},
        {**BASE, "tolerance": "abc"},
        {**BASE, "integrand": "1/x", "lower_limit": "1", "upper_limit": "inf"},
    ]:
        response = client.get("/v1/integral", params=params)
        assert response.status_code >= 400, params
        assert "\n" not in response.text and response.text.startswith("error ")
        assert response.headers.get("etag") is None


def test_an_infinite_limit_answers_one_number(client: TestClient) -> None:
    """Reference: ∫₀^∞ exp(−x²) dx = √π/2 (closed form, A&S 7.1.1 with erf(∞) = 1)."""
    params = {**BASE, "upper_limit": "inf", "tolerance": "1e-10"}
    response = client.get("/v1/integral", params=params)
    assert response.status_code == 200, response.text
    assert abs(float(response.text) - 0.886226925452758) < 1e-9


def test_tolerance_not_met_is_never_a_number(client: TestClient) -> None:
    params = {**BASE, "integrand": "sin(40*x)^2", "upper_limit": "3", "tolerance": "1e-15"}
    response = client.get("/v1/integral", params=params)
    assert response.status_code in (422, 504)
    assert response.text.startswith("error ") and ("tolerance_not_met" in response.text or "deadline" in response.text)


def test_parameters_in_the_query(client: TestClient) -> None:
    response = client.get(
        "/v1/integral", params={"integrand": "a*x", "lower_limit": "0", "upper_limit": "2", "parameter": "a:1.5"}
    )
    assert abs(float(response.text) - 3.0) <= 1e-8  # closed form a*2^2/2, tolerance 1e-8


def test_typical_url_is_short() -> None:
    url = "http://127.0.0.1:8000/v1/integral?" + urlencode(
        {
            "integrand": "1/sqrt(1 - 0.5*sin(x)^2)",
            "lower_limit": "0",
            "upper_limit": "pi/2",
            "tolerance": "1e-10",
            "field": "value",
        }
    )
    assert len(url) < 2048


def test_urls_as_people_type_them_get_hints(client: TestClient) -> None:
    """A raw + is a space in a URL; comma decimals and comma-joined parameters come from spreadsheets."""
    cases = [
        ("integrand=x^2+1&lower_limit=0&upper_limit=1", "%2B"),
        ("integrand=x&lower_limit=0&upper_limit=1.0E+2", "%2B"),
        ("integrand=x&lower_limit=0&upper_limit=0,5", "dot as the decimal separator"),
        ("integrand=x&lower_limit=0&upper_limit=1&tolerance=0,000001", "dot as the decimal separator"),
        ("integrand=k*x&lower_limit=0&upper_limit=1&parameter=k:0,5", "dot as the decimal separator"),
        ("integrand=k*x0&lower_limit=0&upper_limit=1&parameter=k:2,x0:5", "its own parameter="),
    ]
    for query, expected in cases:
        response = client.get("/v1/integral?" + query)
        assert response.status_code == 422 and expected in response.text, (query, response.text)
    fine = client.get("/v1/integral?integrand=x%5E2%2B1&lower_limit=0&upper_limit=1")
    assert fine.status_code == 200 and float(fine.text) == pytest.approx(4 / 3)  # closed form 1/3 + 1


def test_unknown_query_keys_are_refused_and_max_nodes_is_honoured(client: TestClient) -> None:
    for key, nearest in (("tol", "tolerance"), ("parameters", "parameter")):
        response = client.get(f"/v1/integral?integrand=x&lower_limit=0&upper_limit=1&{key}=1")
        assert response.status_code == 422 and "unknown_query_key" in response.text and nearest in response.text
    budget = client.get("/v1/integral?integrand=sin(50*x)&lower_limit=0&upper_limit=3&max_nodes=5&format=json")
    assert budget.status_code == 422 and budget.json()["code"] == "tolerance_not_met"
