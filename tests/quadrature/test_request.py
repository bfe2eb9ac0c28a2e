"""The engine's public request: parsed and validated once, then run by integrate, check and plan alike."""

from __future__ import annotations

import pickle
from fractions import Fraction

import pytest

from quadcert import InvalidInput, Request, check, integrate, plan
from quadcert.errors import FormulaError
from tests.conftest import HP, encloses


def test_build_reads_every_input_exactly_once() -> None:
    request = Request.build("k*exp(-x^2)", "0", "pi/4", "1e-10", parameters={"k": "0.1"})
    assert request.formula.text == "k*exp(-x^2)" and request.upper.text == "pi/4"
    assert request.values == {"k": Fraction(1, 10)} and request.tolerance <= 1e-10
    assert request.canonical()["parameters"] == {"k": "1/10"}


@pytest.mark.parametrize(
    ("arguments", "code", "field"),
    [
        ({"integrand": "sinn(x)"}, "unknown_function", None),
        ({"tolerance": 0}, "invalid_tolerance", "tolerance"),
        ({"relative_tolerance": 2}, "tolerance_out_of_range", "relative_tolerance"),
        ({"max_nodes": 2}, "budget_out_of_range", "max_nodes"),
        ({"lower_limit": "1/0"}, "invalid_limit", "lower_limit"),
        ({"upper_limit": "1e400"}, "limit_out_of_range", "upper_limit"),
        ({"upper_limit": "abc"}, "unknown_name", "upper_limit"),
    ],
)
def test_build_refuses_with_a_code_and_a_field(arguments: dict[str, object], code: str | None, field: str) -> None:
    full = {"integrand": "x", "lower_limit": 0, "upper_limit": 1, **arguments}
    with pytest.raises((FormulaError, InvalidInput)) as info:
        Request.build(**full)  # type: ignore[arg-type]
    assert code is None or info.value.code == code
    assert field is None or getattr(info.value, "field", None) == field


def test_the_request_runs_as_the_functions_do() -> None:
    """One request, three uses; each agrees with the function that builds its own (closed form 1/3)."""
    request = Request.build("x^2", 0, 1, 1e-9)
    direct = integrate("x^2", 0, 1, 1e-9)
    assert request.integrate().enclosure == direct.enclosure and encloses(direct.enclosure, HP.mpf(1) / 3)
    assert request.check("0.3333333333").verdict == check("x^2", 0, 1, "0.3333333333", 1e-9).verdict == "pass"
    assert request.plan().simpson.intervals == plan("x^2", 0, 1, 1e-9).simpson.intervals


def test_a_request_pickles_whole() -> None:
    """The service sends the parsed request to a worker process."""
    request = Request.build("exp(-a*x)/(1+x)", "1e-3", "inf", "1e-6", parameters={"a": 2})
    copy = pickle.loads(pickle.dumps(request))
    assert copy == request and copy.integrate().enclosure == request.integrate().enclosure
