"""Certified enclosures against closed forms and handbook tables.

Each case names its source. Handbook digits are checked as published (to
the digits given) and the closed form is evaluated with mpmath at 110 digits.
"""

from __future__ import annotations

import pytest

from quadcert import integrate
from tests.conftest import HP, encloses

CASES = [
    # integrand, a, b, tolerance, exact value (closed form), source
    ("exp(x)", 0, 2, 1e-10, HP.e**2 - 1, "closed form e^2 - 1"),
    ("1/x", 1, 2, 1e-12, HP.log(2), "closed form ln 2"),
    ("4/(1+x^2)", 0, 1, 1e-12, HP.pi, "closed form pi"),
    ("exp(-x^2)", 0, 1, 1e-12, HP.sqrt(HP.pi) / 2 * HP.erf(1), "(sqrt(pi)/2)*erf(1); erf(1) in A&S table 7.1"),
    (
        "1/sqrt(1 - 0.5*sin(x)^2)",
        0,
        "pi/2",
        1e-12,
        HP.ellipk(HP.mpf(1) / 2),
        "K(m=1/2), complete elliptic integral, A&S 17.3.1 and table 17.1",
    ),
    ("cos(sin(x))", 0, "pi", 1e-12, HP.pi * HP.besselj(0, 1), "Bessel's integral pi*J0(1), A&S 9.1.18 and table 9.1"),
    ("sin(x)", 0, "pi", 1e-10, HP.mpf(2), "closed form 2"),
    ("x^2", "0.1", "0.3", 1e-14, (HP.mpf("0.3") ** 3 - HP.mpf("0.1") ** 3) / 3, "closed form (b^3-a^3)/3"),
    ("1/(1+25*x^2)", -1, 1, 1e-10, 2 * HP.atan(5) / 5, "closed form 2*atan(5)/5"),
    ("x*log(x)", 1, "e", 1e-10, (HP.e**2 + 1) / 4, "closed form (e^2+1)/4"),
]

# published digits, checked against our enclosures to the number of digits the table gives
HANDBOOK = [
    ("exp(-x^2)", 0, 1, 1e-12, "0.746824132812427", 15, "A&S table 7.1: erf(1) = 0.84270 07929 49715"),
    ("1/sqrt(1 - 0.5*sin(x)^2)", 0, "pi/2", 1e-12, "1.854074677301372", 15, "A&S table 17.1: K(0.5)"),
    ("cos(sin(x))/pi", 0, "pi", 1e-12, "0.765197686557967", 15, "A&S table 9.1: J0(1)"),
]


@pytest.mark.parametrize("integrand, a, b, tol, exact, source", CASES, ids=[c[5] for c in CASES])
def test_enclosure_contains_closed_form(integrand, a, b, tol, exact, source) -> None:
    result = integrate(integrand, a, b, tol)
    assert result.tolerance_met, source
    assert encloses(result.enclosure, exact), (source, result.enclosure, exact)
    assert abs(HP.mpf(result.value) - exact) <= result.error_bound <= tol


@pytest.mark.parametrize("integrand, a, b, tol, digits, places, source", HANDBOOK, ids=[c[6] for c in HANDBOOK])
def test_matches_published_digits(integrand, a, b, tol, digits, places, source) -> None:
    result = integrate(integrand, a, b, tol)
    published = HP.mpf(digits)
    assert abs(HP.mpf(result.value) - published) <= HP.mpf(10) ** -places + result.error_bound, source


def test_reversed_and_equal_limits() -> None:
    forward = integrate("exp(x)", 0, 2, 1e-9)
    backward = integrate("exp(x)", 2, 0, 1e-9)
    assert backward.enclosure == (-forward.enclosure[1], -forward.enclosure[0])
    assert encloses(backward.enclosure, -(HP.e**2 - 1))  # closed form
    empty = integrate("exp(x)", "pi", "pi", 1e-9)
    assert empty.enclosure == (0.0, 0.0) and empty.nodes == 0 and empty.tolerance_met


def test_decimal_limit_is_exactly_one_tenth() -> None:
    # ∫ 1 dx over [0, 0.1] is exactly 1/10; the float 0.1 is 0.1000000000000000055...
    result = integrate("1", 0, "0.1", 1e-15)
    assert encloses(result.enclosure, HP.mpf(1) / 10)
    assert result.lower_limit == "0" and result.upper_limit == "0.1"


def test_float_limit_is_read_as_its_decimal() -> None:
    assert encloses(integrate("1", 0, 0.1, 1e-15).enclosure, HP.mpf(1) / 10)


def test_limits_too_close_to_order_still_enclose() -> None:
    result = integrate("exp(x)", "pi/2", "1.5707963267948966", 1e-12)
    exact = HP.exp(HP.mpf("1.5707963267948966")) - HP.exp(HP.pi / 2)  # closed form e^b - e^a
    assert encloses(result.enclosure, exact)


def test_parameters_and_other_variable() -> None:
    result = integrate("k*exp(-k*t)", 0, 1, 1e-10, variable="t", parameters={"k": 2.5})
    assert encloses(result.enclosure, 1 - HP.exp(-HP.mpf("2.5")))  # closed form 1 - e^-k


def test_relative_tolerance() -> None:
    result = integrate("1e6*exp(x)", 0, 1, 1e-30, relative_tolerance=1e-9)
    assert result.tolerance_met and result.error_bound <= 1e-9 * 1e6 * 1.72
    assert encloses(result.enclosure, 10**6 * (HP.e - 1))  # closed form


def test_mesh_reports_every_panel() -> None:
    result = integrate("sqrt(x)", 0, 1, 1e-6, include_mesh=True)
    assert result.mesh is not None and len(result.mesh) == result.panels
    assert result.mesh[0].lower == 0.0 and result.mesh[-1].upper == 1.0
    assert {p.bound for p in result.mesh} >= {"range", "simpson-f4-signed"}
    assert sum(p.contribution[0] for p in result.mesh) <= result.enclosure[1]
