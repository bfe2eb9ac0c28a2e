"""Integrals written with the further functions and with piecewise definitions, against closed forms (named
beside each case) or 60-digit mpmath quadrature, on the default engine and on the ball backend."""

from __future__ import annotations

from fractions import Fraction

import mpmath
import pytest

from quadcert import integrate
from quadcert.arithmetic import FlintArithmetic, claim_flint_context, release_flint_context
from quadcert.errors import NotCertifiable
from tests.conftest import encloses

R = mpmath.MPContext()
R.dps = 60

CLOSED_FORMS = [
    # integrand, lower, upper, exact value, where it comes from
    ("asinh(x)", 0, 1, R.asinh(1) - R.sqrt(2) + 1, "antiderivative x·asinh x − √(x² + 1)"),
    ("acosh(x)", 1, 2, 2 * R.acosh(2) - R.sqrt(3), "antiderivative x·acosh x − √(x² − 1)"),
    ("atanh(x)", 0, "1/2", R.atanh(0.5) / 2 + R.log(R.mpf(3) / 4) / 2, "antiderivative x·atanh x + ln(1 − x²)/2"),
    ("atanh(x)", 0, 1, R.log(2), "the same antiderivative; a logarithmic singularity at 1"),
    ("cbrt(x)", -8, 1, R.mpf(-45) / 4, "antiderivative (3/4)·|x|^(4/3)"),
    ("erfc(x)", 0, 5, 5 * R.erfc(5) - R.exp(-25) / R.sqrt(R.pi) + 1 / R.sqrt(R.pi), "x·erfc x − e^(−x²)/√π"),
    ("erfc(x)", 0, "inf", 1 / R.sqrt(R.pi), "the same antiderivative at infinity"),
    ("x*erfc(x)", 0, "inf", R.mpf(1) / 4, "integration by parts"),
    ("j1(x)", 0, 10, 1 - R.j0(10), "J0′ = −J1 (A&S 9.1.28)"),
    ("j0(x)*exp(-x)", 0, "inf", 1 / R.sqrt(2), "Laplace transform of J0, 1/√(1 + s²) at s = 1 (from memory)"),
    ("lgamma(x)", 1, 2, R.log(2 * R.pi) / 2 - 1, "Raabe's integral ∫ₐ^(a+1) ln Γ = ln(2π)/2 + a·ln a − a"),
    ("sec(x)", 0, 1, R.log(R.sec(1) + R.tan(1)), "antiderivative ln|sec x + tan x|"),
    ("cot(x)", "1/2", 1, R.log(R.sin(1) / R.sin(0.5)), "antiderivative ln|sin x|"),
    ("hypot(x, 1)", 0, 1, (R.sqrt(2) + R.asinh(1)) / 2, "antiderivative (x·√(x² + 1) + asinh x)/2"),
    ("log2(x)", 1, 2, 2 - 1 / R.log(2), "antiderivative (x·ln x − x)/ln 2"),
    ("atan2(sin(x), cos(x))", 0, 3, R.mpf(9) / 2, "atan2(sin x, cos x) = x on (−π, π]"),
    ("sign(x - 0.3)", 0, 1, R.mpf("0.4"), "0.7 − 0.3"),
    # piecewise definitions; the loads and the tariff are invented, their integrals exact
    ("{0 if x < 2; 5 otherwise}", 0, 6, R.mpf(20), "step load: 5 over a length of 4"),
    ("5*step(x - 2)", 0, 6, R.mpf(20), "the same load with the unit step"),
    ("x*{0 if x < 2; 5 otherwise}", 0, 6, R.mpf(80), "its moment about 0: 5·(6² − 2²)/2"),
    ("{5*x if x < 2; 10 if x < 5; 10*(6 - x) otherwise}", 0, 6, R.mpf(45), "trapezoidal load: 10 + 30 + 5"),
    ("x*{5*x if x < 2; 10 if x < 5; 10*(6 - x) otherwise}", 0, 6, R.mpf(145), "its moment: 40/3 + 105 + 80/3"),
    ("{0.10 if x < 100; 0.15 if x < 300; 0.25 otherwise}", 0, 500, R.mpf(90), "tiered tariff: 10 + 30 + 50"),
    ("{sqrt(x) if x >= 0; sqrt(-x) otherwise}", -1, 1, R.mpf(4) / 3, "each branch only where its case holds"),
    ("{1 if sin(x) > 0; -1 otherwise}", 0, 7, 7 - 2 * R.pi, "π − π + (7 − 2π): jumps the engine finds itself"),
    ("{x^2 if x < 1/3; 1 - x otherwise}", 0, 1, R.mpf(1) / 81 + R.mpf(2) / 9, "jump at 1/3, not a float"),
    ("{exp(-x) if x > 1; 1 otherwise}", 0, "inf", 1 + 1 / R.e, "1 + ∫₁^∞ e^(−x); the tail settles on one case"),
    ("{0 if x < 2; 5*exp(2 - x) otherwise}", 0, "inf", R.mpf(5), "a load from x = 2 on, decaying"),
    ("{exp(x) if x < -3; 0 otherwise}", "-inf", 0, R.exp(-3), "the left tail"),
]


@pytest.mark.parametrize("text, lower, upper, exact, source", CLOSED_FORMS)
def test_closed_forms_are_enclosed(text: str, lower, upper, exact, source: str) -> None:
    result = integrate(text, lower, upper, 1e-9)
    assert result.tolerance_met, (text, result.stop_reason)
    assert encloses(result.enclosure, exact), (text, result.enclosure, source)


@pytest.mark.parametrize(
    "text, lower, upper",
    [("gamma(x)", "1/2", 3), ("gamma(x)", "-0.9", "-0.1"), ("j0(3*x)^2", 0, 4), ("atan2(x, 2 - x^2)", -1, 1)],
)
def test_against_60_digit_quadrature(text: str, lower, upper) -> None:
    """Reference: mpmath's tanh-sinh quadrature at 60 digits, split at the jump of atan2 where there is one."""
    names = {"gamma": R.gamma, "j0": R.j0, "atan2": R.atan2, "exp": R.exp}
    from quadcert.formula import parse
    from tests.derivatives.test_taylor import _walk

    root = parse(text).root
    a, b = (R.mpf(Fraction(str(v)).numerator) / Fraction(str(v)).denominator for v in (lower, upper))
    reference = R.quad(lambda t: _walk(root, t, names), [a, b])
    result = integrate(text, lower, upper, 1e-9)
    assert result.tolerance_met and encloses(result.enclosure, reference), (text, result.enclosure, reference)


@pytest.mark.parametrize("text, lower, upper, exact", [case[:4] for case in CLOSED_FORMS[::3]])
def test_the_ball_backend_agrees(text: str, lower, upper, exact) -> None:
    claim_flint_context()
    try:
        result = integrate(text, lower, upper, 1e-9, arithmetic=FlintArithmetic)
    finally:
        release_flint_context()
    assert result.tolerance_met and encloses(result.enclosure, exact), text


@pytest.mark.parametrize(
    "text, lower, upper, words",
    [
        ("acosh(x)", 0, 2, "acosh is undefined"),
        ("gamma(x)", -1, 1, "gamma has a pole"),
        ("{x if x < 0}", -1, 1, "no case of the piecewise definition holds"),
        ("atan2(0, x)", -1, 1, "atan2 is undefined at (0, 0)"),
        ("{exp(-x) if sin(x) > 0; exp(-2*x) otherwise}", 0, "inf", "does not settle"),
    ],
)
def test_refusals_say_why_and_where(text: str, lower, upper, words: str) -> None:
    with pytest.raises(NotCertifiable) as info:
        integrate(text, lower, upper, 1e-8)
    assert words in str(info.value), str(info.value)
