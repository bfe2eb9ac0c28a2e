"""Improper and singular integrals with known values, certified at 1e-6 and 1e-10.

Each case names its reference beside it. References are 60-digit mpmath values of closed forms, or of the
handbook function the integral defines (Abramowitz & Stegun chapter given); where the closed form is
quoted from memory it says so, and the 60-digit value it gives is what the test holds the engine to.
"""

from __future__ import annotations

import mpmath
import pytest

from quadcert import integrate
from quadcert.errors import NotCertifiable

mp = mpmath.MPContext()  # private: the global mpmath precision is never touched
mp.dps = 60

CASES = [
    # -- algebraic and logarithmic singularities at an end ------------------------------------------------
    ("1/sqrt(x)", "0", "1", mp.mpf(2), "closed form: [2·√x] from 0 to 1"),
    ("log(x)", "0", "1", mp.mpf(-1), "closed form: [x·log x − x] from 0 to 1"),
    ("x*log(x)", "0", "1", mp.mpf(-1) / 4, "closed form: [x²·log(x)/2 − x²/4] from 0 to 1"),
    ("log(x)^2", "0", "1", mp.mpf(2), "closed form: Γ(3) = 2 after x = e^(−u) (A&S 6.1.1)"),
    ("log(x)/sqrt(x)", "0", "1", mp.mpf(-4), "closed form: [2√x·(log x − 2)] from 0 to 1"),
    (
        "x^(-0.3)*cos(x)",
        "0",
        "1",
        mp.quad(lambda x: x ** mp.mpf("-0.3") * mp.cos(x), [0, 1]),
        "mpmath.quad at 60 digits (tanh-sinh handles the end singularity)",
    ),
    (
        "x^x",
        "0",
        "1",
        mp.nsum(lambda n: (-1) ** (n + 1) * n ** (-n), [1, mp.inf]),
        "series Σ (−1)^(n+1)·n^(−n) (from memory), summed by mpmath.nsum at 60 digits",
    ),
    ("1/sqrt(1 - x^2)", "0", "1", mp.pi / 2, "closed form: asin(1) = π/2 (A&S 4.4.3)"),
    ("1/sqrt(x*(1 - x))", "0", "1", mp.pi, "closed form: B(1/2, 1/2) = Γ(1/2)² = π (A&S 6.2.1, 6.1.8)"),
    (
        "1/sqrt((1 - x^2)*(1 - 0.5*x^2))",
        "0",
        "1",
        mp.ellipk(mp.mpf("0.5")),
        "K(m = 1/2), A&S 17.3.1; Table 17.1 gives 1.85407 46773 01372; mpmath.ellipk at 60 digits",
    ),
    ("log(sin(x))", "0", "pi/2", -mp.pi / 2 * mp.log(2), "closed form −(π/2)·log 2 (from memory)"),
    # -- inside the interval -------------------------------------------------------------------------------
    (
        "1/sqrt(abs(x - 0.3))",
        "0",
        "1",
        2 * mp.sqrt(mp.mpf("0.3")) + 2 * mp.sqrt(mp.mpf("0.7")),
        "closed form: 2√0.3 + 2√0.7",
    ),
    ("sin(x)/x", "-1", "1", 2 * mp.si(1), "2·Si(1), A&S 5.2.1; Table 5.1: Si(1) = 0.94608 30704"),
    # -- removable singularities -----------------------------------------------------------------------------
    ("sin(x)/x", "0", "1", mp.si(1), "Si(1), A&S 5.2.1; Table 5.1: 0.94608 30703 67183"),
    ("(1 - cos(x))/x^2", "0", "1", mp.si(1) - 1 + mp.cos(1), "by parts: Si(1) − (1 − cos 1), A&S 5.2.1"),
    ("(exp(x) - 1)/x", "0", "1", mp.ei(1) - mp.euler, "Ein(1) = Ei(1) − γ, A&S 5.1.2 and 5.1.40"),
    # -- infinite limits -------------------------------------------------------------------------------------
    ("exp(-x^2)", "-inf", "inf", mp.sqrt(mp.pi), "√π, A&S 7.1.1 with erf(∞) = 1"),
    ("1/(1 + x^2)", "0", "inf", mp.pi / 2, "closed form: atan(∞) = π/2 (A&S 4.4.3)"),
    ("1/(1 + x^4)", "-inf", "inf", mp.pi / mp.sqrt(2), "closed form π/√2 (from memory)"),
    (
        "x^2*exp(-x^2/4.5)/(1.5*sqrt(2*pi))",
        "-inf",
        "inf",
        mp.mpf("2.25"),
        "second moment σ² of a normal density with σ = 1.5 (A&S 26.2.1)",
    ),
    (
        "exp(-x^2/2)/sqrt(2*pi)",
        "1.96",
        "inf",
        mp.erfc(mp.mpf("1.96") / mp.sqrt(2)) / 2,
        "upper normal tail Q(1.96), A&S 26.2.3 and Table 26.1 (0.02499 79); mpmath.erfc at 60 digits",
    ),
    ("x^3*exp(-x)", "0", "inf", mp.mpf(6), "Γ(4) = 3! (A&S 6.1.1, 6.1.6)"),
    ("log(x)/x^2", "1", "inf", mp.mpf(1), "closed form: [−(log x + 1)/x] from 1 to ∞"),
    ("1/cosh(x)", "-inf", "inf", mp.pi, "closed form: [2·atan(e^x)] = π (A&S 4.5.? gd(∞) = π/2, from memory)"),
    ("exp(-sqrt(x))", "0", "inf", mp.mpf(2), "closed form: 2·Γ(2) after x = u² (A&S 6.1.1)"),
    # -- a singular end and a tail together ------------------------------------------------------------------
    ("x^(-0.5)*exp(-x)", "0", "inf", mp.sqrt(mp.pi), "Γ(1/2) = √π, A&S 6.1.8"),
    ("exp(-x)*log(x)", "0", "inf", -mp.euler, "−γ, A&S 6.1.3 and 6.3.2 (Γ′(1) = −γ)"),
    ("x/(exp(x) - 1)", "0", "inf", mp.pi**2 / 6, "Γ(2)·ζ(2) = π²/6, A&S 23.2.7"),
    ("x^2*exp(-x^2)", "0", "inf", mp.sqrt(mp.pi) / 4, "Γ(3/2)/2 = √π/4 after x = √u (A&S 6.1.9)"),
]


@pytest.mark.parametrize("tolerance", [1e-6, 1e-10])
@pytest.mark.parametrize("integrand, a, b, exact, source", CASES, ids=[f"{c[0]} on [{c[1]}, {c[2]}]" for c in CASES])
def test_improper_integral_is_certified(integrand, a, b, exact, source, tolerance) -> None:
    result = integrate(integrand, a, b, tolerance)
    low, high = result.enclosure
    assert mp.mpf(low) <= exact <= mp.mpf(high), (source, result.enclosure)
    assert result.tolerance_met and result.error_bound <= tolerance, result
    assert set(result.bounds_used) & {"singular-envelope", "tail-envelope"}


def test_reversed_limits_negate() -> None:
    forward = integrate("exp(-x^2)", "0", "inf", 1e-9)
    backward = integrate("exp(-x^2)", "inf", "0", 1e-9)
    assert backward.enclosure == (-forward.enclosure[1], -forward.enclosure[0])


DIVERGENT = [
    ("1/x", "0", "1", (0.0, 0.0)),
    ("1/(x - 0.5)^2", "0", "1", (0.5, 0.5)),
    ("x^(-1.5)", "0", "1", (0.0, 0.0)),
    ("-1/x^2", "-1", "0", (0.0, 0.0)),
    ("1/x", "1", "inf", (float("inf"), float("inf"))),
    ("1/sqrt(x)", "1", "inf", (float("inf"), float("inf"))),
    ("exp(x)", "0", "inf", (float("inf"), float("inf"))),
    ("-x^2", "-inf", "0", (float("-inf"), float("-inf"))),
]


@pytest.mark.parametrize("integrand, a, b, where", DIVERGENT, ids=[f"{c[0]} on [{c[1]}, {c[2]}]" for c in DIVERGENT])
def test_divergent_integrals_are_refused_with_their_own_code(integrand, a, b, where) -> None:
    """Each of these diverges (closed forms of the antiderivatives); the refusal names where and why."""
    with pytest.raises(NotCertifiable) as info:
        integrate(integrand, a, b, 1e-8)
    assert info.value.code == "divergent_integral"
    assert info.value.location == where
    assert "diverges" in info.value.message


@pytest.mark.parametrize(
    "integrand, a, b, code",
    [
        ("sin(x)/x", "0", "inf", "tail_undecided"),  # converges only conditionally (to π/2): refused
        ("sin(x)", "0", "inf", "tail_undecided"),  # no limit at all
        ("sin(1/x)/x", "0", "1", "singularity_undecided"),  # |f| ≤ 1/x only: no sign to prove divergence
        ("exp(x*sin(x))", "0", "inf", "tail_not_bounded"),
    ],
)
def test_undecided_integrals_are_refused_never_guessed(integrand, a, b, code) -> None:
    with pytest.raises(NotCertifiable) as info:
        integrate(integrand, a, b, 1e-8)
    assert info.value.code == code
