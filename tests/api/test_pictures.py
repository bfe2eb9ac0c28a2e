"""POST /v1/pictures and GET /v1/formula: the picture's data is certified like the integral, and a formula is
read (or refused with its column) without integrating it."""

from __future__ import annotations

import math
from decimal import Decimal

import mpmath
from fastapi.testclient import TestClient


def test_every_box_encloses_f_on_its_panel(client: TestClient) -> None:
    """x·sin(5x) on [0, 3]: each box holds f at 9 points of its panel, evaluated at 60 digits (mpmath)."""
    answer = client.post(
        "/v1/pictures", json={"integrand": "x*sin(5*x)", "lower_limit": 0, "upper_limit": 3, "tolerance": 1e-9}
    ).json()
    assert len(answer["boxes"]) == answer["integral"]["panels"]
    with mpmath.workdps(60):
        for lower, upper, f_low, f_high, error, bound in answer["boxes"]:
            assert f_low is not None and error >= 0 and bound.startswith(("simpson", "range"))
            for k in range(9):
                x = mpmath.mpf(lower) + (mpmath.mpf(upper) - mpmath.mpf(lower)) * k / 8
                assert mpmath.mpf(f_low) <= x * mpmath.sin(5 * x) <= mpmath.mpf(f_high)
    low, high = answer["y_range"]
    # the whole range is shown (closed form: x sin 5x = -7π/10 at x = 7π/10, and 9π/10 at x = 9π/10)
    assert low <= -7 * math.pi / 10 and high >= 9 * math.pi / 10
    assert "panels" in answer["summary"] and answer["digits"]


def test_a_singular_end_and_a_tail_are_drawn_without_a_box(client: TestClient) -> None:
    """1/sqrt(x) on [0, 1] and exp(-x) on [0, inf): the envelope pieces have no f box, and a tail ends at "inf"."""
    near = client.post(
        "/v1/pictures", json={"integrand": "1/sqrt(x)", "lower_limit": 0, "upper_limit": 1, "tolerance": 1e-8}
    ).json()
    envelope = [b for b in near["boxes"] if b[5] == "singular-envelope"]
    assert envelope and all(b[2] is None and b[3] is None for b in envelope)
    assert near["y_range"][1] < 1e6  # the tallest boxes next to 0 are cut, the rest stays readable
    tail = client.post(
        "/v1/pictures", json={"integrand": "exp(-x)", "lower_limit": 0, "upper_limit": "inf", "tolerance": 1e-8}
    ).json()
    assert tail["boxes"][-1][1] == "inf" and tail["boxes"][-1][5] == "tail-envelope"


def test_the_boxes_are_printed_outward(client: TestClient) -> None:
    """The JSON digits of every box end are on the safe side of the float the engine computed."""
    response = client.post(
        "/v1/pictures", json={"integrand": "exp(-x^2)", "lower_limit": 0, "upper_limit": 1, "tolerance": 1e-8}
    )
    for lower, upper, f_low, f_high, _, _ in response.json(parse_float=Decimal)["boxes"]:
        assert Decimal(float(lower)) >= lower and Decimal(float(upper)) <= upper
        assert Decimal(float(f_low)) >= f_low and Decimal(float(f_high)) <= f_high


def test_a_formula_is_read_or_refused_with_its_column(client: TestClient) -> None:
    good = client.get("/v1/formula", params={"integrand": "k*exp(-x^2)", "parameter": "k"})
    assert good.status_code == 200 and good.json()["integrand"] == "k*exp(-x^2)"
    bad = client.get("/v1/formula", params={"integrand": "2*sinn(x)"})
    body = bad.json()
    assert bad.status_code == 422 and body["code"] == "unknown_function" and body["column"] == 3
    assert client.get("/v1/formula", params={"integrand": "k*x"}).json()["code"] == "unknown_name"


def test_the_page_and_its_assets_are_served_and_nothing_else(client: TestClient) -> None:
    assert "quadcert" in client.get("/").text
    assert client.get("/static/page.js").headers["content-type"].startswith("text/javascript")
    assert client.get("/static/../errors.py").status_code == 404
    assert client.get("/static/vendor/uplot/LICENSE").text.startswith("The MIT License")
