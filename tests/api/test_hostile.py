"""Hostile formulas and values: each gets a coded 4xx problem in time, and the service keeps answering."""

from __future__ import annotations

import json
import time

import pytest
from fastapi.testclient import TestClient

BASE = {"lower_limit": 0, "upper_limit": 1, "tolerance": 1e-6}

FORMULAS = [
    ("__import__('os').system('id')", "unexpected_character"),
    ("__import__", "unknown_name"),
    ("x.__class__", "unexpected_character"),
    ("lambda: x", "unexpected_character"),
    ("__builtins__(x)", "unknown_function"),
    ("eval(x)", "unknown_function"),
    ("9^9^9^9", "magnitude_exceeded"),
    ("((((((((((9^9)^9)^9)^9)^9)^9)^9)^9)^9)^9)^9", "magnitude_exceeded"),
    ("(" * 10000 + "x" + ")" * 10000, "formula_too_long"),
    ("(" * 60 + "x" + ")" * 60 + "+" + "(" * 65 + "x" + ")" * 65, "nesting_too_deep"),
    ("1e100000000", "literal_out_of_range"),
    ("9" * 5000, "formula_too_long"),
    ("9" * 4000, "literal_too_long"),
    ("sin(1e100000)", "literal_out_of_range"),
    ("exp(exp(exp(x + 10)))", "magnitude_exceeded"),
    ("x^1e9", "power_too_large"),
    ("\u0445 + 1", "unexpected_character"),  # Cyrillic small ha, looks like x
    ("s\u0456n(x)", "unexpected_character"),  # Cyrillic i inside sin
    ("x\u200b+1", "unexpected_character"),  # zero-width space
    ("\uff58", "unexpected_character"),  # fullwidth x
]


@pytest.mark.parametrize("formula, code", FORMULAS, ids=[c for _, c in FORMULAS])
def test_hostile_formulas_get_coded_problems(client: TestClient, formula: str, code: str) -> None:
    started = time.monotonic()
    response = client.post("/v1/integrals", json={"integrand": formula, **BASE})
    assert 400 <= response.status_code < 500
    assert response.json()["code"] == code
    assert time.monotonic() - started < 10  # well inside the request deadline; not a speed target
    assert client.get("/healthz").status_code == 200


VALUES = [
    ({"upper_limit": 1e308, "integrand": "exp(x)"}, ("limit_out_of_range",)),
    ({"upper_limit": 1e300, "integrand": "exp(x)"}, ("magnitude_exceeded", "unbounded_near")),
    ({"upper_limit": "1e1000", "integrand": "1"}, ("limit_out_of_range",)),
    ({"upper_limit": "1e300", "integrand": "1e10"}, ("result_out_of_range",)),
    ({"upper_limit": "inf"}, ("divergent_integral",)),  # x on [0, inf)
    ({"lower_limit": "-Infinity"}, ("divergent_integral",)),  # x on (-inf, 1]
    ({"tolerance": 1e-300}, ("tolerance_out_of_range",)),
    ({"tolerance": -1}, ("invalid_tolerance",)),
    ({"tolerance": 0}, ("invalid_tolerance",)),
    ({"tolerance": 1e308 * 10}, ("invalid_tolerance",)),
    ({"max_nodes": 10**12}, ("budget_out_of_range",)),
    ({"max_nodes": -5}, ("budget_out_of_range",)),
    ({"relative_tolerance": 2}, ("tolerance_out_of_range",)),
    ({"upper_limit": "9" * 400}, ("literal_too_long",)),
    ({"upper_limit": "9" * 600}, ("invalid_request",)),
    ({"upper_limit": "1" + "0" * 200}, ("literal_too_long",)),
    ({"parameters": {"a": "nan"}, "integrand": "a*x"}, ("invalid_parameter",)),
    ({"parameters": {"sin": 1}}, ("reserved_name",)),
    ({"parameters": {"a": 1e308 * 10}, "integrand": "a*x"}, ("invalid_parameter",)),
    ({"variable": "__class__", "integrand": "__class__"}, None),
    ({"extra_field": 1}, ("invalid_request",)),
    ({"integrand": ["x"]}, ("invalid_request",)),
    ({"lower_limit": None}, ("invalid_request",)),
    ({"tolerance": "1e-6"}, ("invalid_request",)),
    ({"include_mesh": "yes"}, ("invalid_request",)),
]


@pytest.mark.parametrize("change, codes", VALUES)
def test_hostile_values_get_coded_problems(client: TestClient, change: dict, codes) -> None:
    body = {"integrand": "x", **BASE, **change}
    response = client.post("/v1/integrals", content=json.dumps(body), headers={"content-type": "application/json"})
    if codes is None:  # harmless: a dunder-looking variable is just a name in our language
        assert response.status_code == 200
        return
    assert 400 <= response.status_code < 500, response.text
    assert response.json()["code"] in codes, response.json()
    assert client.get("/healthz").status_code == 200


def test_json_non_finite_tokens_and_bytes(client: TestClient) -> None:
    raws = [
        b'{"integrand":"x","lower_limit":NaN,"upper_limit":1}',
        b'{"integrand":"x","lower_limit":0,"upper_limit":1,"tolerance":-Infinity}',
        b'{"integrand":"\xc3\x28","lower_limit":0,"upper_limit":1}',
        b"\x00\x01\x02",
        b'{"integrand": "x", "lower_limit": 0, "upper_limit": 1',
        b"[" * 100000 + b"]" * 100000,
    ]
    for raw in raws:
        response = client.post("/v1/integrals", content=raw, headers={"content-type": "application/json"})
        assert 400 <= response.status_code < 500, raw[:40]
        assert response.headers["content-type"] == "application/problem+json"
    assert client.get("/healthz").status_code == 200


def test_one_megabyte_formula_and_body(client: TestClient) -> None:
    formula = "x+" * 500_000 + "x"
    response = client.post("/v1/integrals", json={"integrand": formula, **BASE})
    assert response.status_code == 413 and response.json()["code"] == "body_too_large"
    chunked = client.post(
        "/v1/integrals", content=iter([b"{" + b" " * 100_000] * 3), headers={"content-type": "application/json"}
    )
    assert chunked.status_code == 413


def test_hostile_get_queries(client: TestClient) -> None:
    for params in [
        {"integrand": "9^9^9^9", "lower_limit": "0", "upper_limit": "1"},
        {"integrand": "x", "lower_limit": "0", "upper_limit": "nan"},
        {"integrand": "x", "lower_limit": "0", "upper_limit": "1", "tolerance": "nan"},
        {"integrand": "x", "lower_limit": "0", "upper_limit": "1", "parameter": "oops"},
    ]:
        response = client.get("/v1/integral", params=params)
        assert 400 <= response.status_code < 500 and response.text.startswith("error "), params
