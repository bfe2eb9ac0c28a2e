"""Every output that carries a bound prints it outward: low down, high and error bound up, at any digits.

Reference: exact decimal arithmetic (Python's Decimal and Fraction, which read a printed number exactly)
against the float64 bounds the engine certified. Results are drawn over the whole float range, subnormal and
near-overflow magnitudes included, and sent through every renderer a caller can see: the HTTP JSON body, the
spreadsheet GET in text, csv and xml for each field, the batch CSV, the CLI text and JSON, the check verdict
text and JSON, and the JUnit report built from that text.
"""

from __future__ import annotations

import csv
import io
import json
import math
import re
import xml.etree.ElementTree as ET
from decimal import Decimal
from fractions import Fraction

from hypothesis import example, given
from hypothesis import strategies as st

from quadcert.api._exact_json import dumps
from quadcert.api._formats import FIELDS, render
from quadcert.cli import _main, _table
from quadcert.quadrature import CheckResult, IntegralResult
from quadcert.quadrature._finish import error_bound
from quadcert.results import check_body, integral_body

NUMBER = re.compile(r"-?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?|-?inf")
BOUNDS = st.floats(allow_nan=False, allow_infinity=False, width=64)


def exact(text: str) -> Fraction:
    return Fraction(Decimal(text))


def result_of(a: float, b: float) -> IntegralResult:
    low, high = sorted((a, b))
    value, bound = error_bound(low, high)
    return IntegralResult(
        value=value,
        enclosure=(low, high),
        error_bound=bound,
        tolerance=1e-8,
        tolerance_met=True,
        stop_reason="tolerance_met",
        nodes=5,
        panels=2,
        integrand="x",
        lower_limit="0",
        upper_limit="1",
        precision_bits=53,
        compute_seconds=0.0,
    )


def assert_outward(low_text: str, high_text: str, bound_text: str | None, result: IntegralResult) -> None:
    low, high = result.enclosure
    assert exact(low_text) <= Fraction(low), (low_text, low)
    assert exact(high_text) >= Fraction(high), (high_text, high)
    if bound_text is not None:
        assert exact(bound_text) >= Fraction(result.error_bound), (bound_text, result.error_bound)


@given(BOUNDS, BOUNDS)
@example(0.0, 1.0014290072822818e-237)  # 17 digits rounded up read back as the next float: 18 are needed
@example(0.1, 0.30000000000000004)
@example(5e-324, 1.7976931348623157e308)
def test_every_renderer_rounds_outward(a: float, b: float) -> None:
    result = result_of(a, b)
    if not math.isfinite(result.error_bound):
        return  # an enclosure past the float range is refused before any output (result_out_of_range)
    http = integral_body(result, {"variable": "x"})

    # HTTP JSON body, read as exact decimals
    body = json.loads(dumps(http), parse_float=Decimal)
    assert_outward(str(body["enclosure"][0]), str(body["enclosure"][1]), str(body["error_bound"]), result)
    # ... and a float64 reader gets back exactly the certified floats
    floats = json.loads(dumps(http))
    assert tuple(floats["enclosure"]) == result.enclosure and floats["error_bound"] == result.error_bound

    # spreadsheet GET, each field in each format
    for fmt in ("text", "csv"):
        shown = {f: render(http, fmt, f) for f in ("low", "high", "error_bound")}
        assert_outward(shown["low"], shown["high"], shown["error_bound"], result)
    row = dict(zip(FIELDS, render(http, "csv", None).split("\r\n")[1].split(",")))
    assert_outward(row["low"], row["high"], row["error_bound"], result)
    xml = ET.fromstring(render(http, "xml", None))
    assert_outward(xml.findtext("low"), xml.findtext("high"), xml.findtext("error_bound"), result)

    # batch CSV
    out = io.StringIO()
    _table.write_rows(out, ["integrand"], [{"integrand": "x"}], [_table.outcome_of(result)])
    row = next(csv.DictReader(io.StringIO(out.getvalue())))
    assert_outward(row["low"], row["high"], row["error_bound"], result)

    # CLI text and JSON
    lines = _main._describe(result).splitlines()
    low_text, high_text = NUMBER.findall(lines[2])
    assert_outward(low_text, high_text, NUMBER.findall(lines[3])[0], result)
    cli = json.loads(_main._json(integral_body(result, {})), parse_float=Decimal)
    assert_outward(str(cli["enclosure"][0]), str(cli["enclosure"][1]), str(cli["error_bound"]), result)


@given(BOUNDS, BOUNDS, BOUNDS)
def test_check_distances_round_outward(a: float, b: float, claimed: float) -> None:
    """The verdict's |claimed − exact| bounds: near rounded down, far up, in text (and so JUnit) and JSON."""
    from quadcert.quadrature._check import distance_bounds

    result = result_of(a, b)
    near, far = distance_bounds(Fraction(claimed), *result.enclosure)
    if not math.isfinite(far):
        return
    outcome = CheckResult("undecided", repr(claimed), 1e-8, (near, far), result)
    text = _main._verdict_text(outcome)
    distance = re.search(r"in \[(\S+), (\S+)\], tolerance", text)
    assert distance and exact(distance.group(1)) <= Fraction(near) and exact(distance.group(2)) >= Fraction(far)
    enclosure = re.search(r"integral in \[(\S+), (\S+)\]", text)
    assert_outward(enclosure.group(1), enclosure.group(2), None, result)
    body = json.loads(_main._json(check_body(outcome, {})), parse_float=Decimal)
    assert Fraction(body["distance"][0]) <= Fraction(near) and Fraction(body["distance"][1]) >= Fraction(far)
    assert Fraction(body["claimed_value"]) == Fraction(Decimal(repr(claimed)))


def test_zero_prints_as_zero() -> None:
    """[0.0, -0.0] and similar print as [0, 0]: a zero bound has no sign worth showing."""
    result = result_of(-0.0, 0.0)
    lines = _main._describe(result).splitlines()
    assert "[0, 0]" in lines[2]
    http = integral_body(result, {"variable": "x"})
    assert render(http, "text", "low") == "0" and render(http, "text", "high") == "0"


def test_mesh_and_plan_answers_round_outward() -> None:
    """The service's mesh panels and plan figures, as the worker sends them, against the engine's floats."""
    from quadcert.api._jobs import Job, run_integral, run_plan
    from quadcert.quadrature import Request, integrate, plan

    request = {
        "integrand": "sin(3*x)*exp(x/3)",
        "lower_limit": "0.1",
        "upper_limit": 2,
        "tolerance": 1e-6,
        "include_mesh": True,
    }
    job = Job(Request.build("sin(3*x)*exp(x/3)", "0.1", 2, 1e-6), echo=request, include_mesh=True)
    sent = json.loads(dumps(run_integral(job, None)), parse_float=Decimal)
    engine = integrate(**request)
    assert len(sent["mesh"]) == len(engine.mesh)
    for shown, panel in zip(sent["mesh"], engine.mesh):
        assert Fraction(shown["lower"]) <= Fraction(panel.lower) and Fraction(shown["upper"]) >= Fraction(panel.upper)
        assert Fraction(shown["contribution"][0]) <= Fraction(panel.contribution[0])
        assert Fraction(shown["contribution"][1]) >= Fraction(panel.contribution[1])
    arguments = {"integrand": "exp(x)", "lower_limit": 0, "upper_limit": 2, "tolerance": 0.5e-4}
    sent_plan = json.loads(dumps(run_plan(Job(Request.build(**arguments), echo=arguments), None)), parse_float=Decimal)
    exact_plan = plan(**arguments)
    for name in ("simpson", "trapezoid"):
        shown, rule = sent_plan[name], getattr(exact_plan, name)
        assert Fraction(shown["spacing"]) <= Fraction(rule.spacing)
        assert Fraction(shown["error_bound"]) >= Fraction(rule.error_bound)
        assert Fraction(shown["derivative_bound"]) >= Fraction(rule.derivative_bound)
