"""Gauss–Legendre panels: nodes, weights and the remainder constant against 60-digit mpmath and exact
integrals, and whole integrals with rule gauss-legendre and auto against 60-digit mpmath and flint.

References, named beside each check: ∫₋₁¹ tᵏ dt = 2/(k+1) for even k and 0 for odd k (exact); the Legendre
polynomials and the weight formula wᵢ = 2/((1 − tᵢ²)·P_n'(tᵢ)²) at 60 digits (mpmath); the midpoint rule's
error H³/24·f″ and the two-point rule's H⁵/4320·f⁗ (Abramowitz & Stegun 25.4.29 gives the general constant);
closed forms; python-flint's acb.integral.
"""

from __future__ import annotations

from fractions import Fraction

import flint
import mpmath
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from quadcert import InvalidInput, integrate
from quadcert.quadrature._gauss import remainder_constant, rule
from tests.conftest import HP
from tests.quadrature.test_flint_oracle import smooth_integrand

REF = mpmath.MPContext()
REF.dps = 60


def _mp(value: Fraction):
    return REF.mpf(value.numerator) / value.denominator


@pytest.mark.parametrize("n", [1, 2, 3, 5, 8, 10, 12])
def test_nodes_and_weights_integrate_every_power_below_two_n_exactly(n) -> None:
    nodes = rule(n, 120)
    for k in range(2 * n):
        low = high = Fraction(0)
        for (t_low, t_high), (w_low, w_high) in nodes:
            products = [w * t**k for w in (w_low, w_high) for t in (t_low, t_high)]
            if t_low < 0 < t_high and k:
                products.append(Fraction(0))
            low, high = low + min(products), high + max(products)
        exact = Fraction(2, k + 1) if k % 2 == 0 else Fraction(0)  # ∫₋₁¹ tᵏ dt
        assert low <= exact <= high and high - low < Fraction(1, 10**30)


@pytest.mark.parametrize("n", [2, 5, 9, 10])
def test_nodes_and_weights_match_sixty_digit_legendre_polynomials(n) -> None:
    for (t_low, t_high), (w_low, w_high) in rule(n, 180):
        assert t_high - t_low <= Fraction(1, 2**180)
        t = (_mp(t_low) + _mp(t_high)) / 2
        assert abs(REF.legendre(n, t)) < REF.mpf(10) ** -50  # a root, at 60 digits
        weight = 2 / ((1 - t**2) * REF.diff(lambda s: REF.legendre(n, s), t) ** 2)
        assert _mp(w_low) - REF.mpf(10) ** -45 <= weight <= _mp(w_high) + REF.mpf(10) ** -45


def test_the_remainder_constant_is_the_handbook_one() -> None:
    assert remainder_constant(1) == Fraction(1, 24)  # the midpoint rule: H³/24·f″
    assert remainder_constant(2) == Fraction(1, 4320)  # two points: H⁵/4320·f⁗
    for n in range(1, 11):
        # ∫₀¹ x^(2n) dx minus the n-point sum is c_n·(2n)! exactly, f^(2n) being the constant (2n)!
        nodes = rule(n, 200)
        total = (
            sum(
                (_mp(w_low) + _mp(w_high)) / 2 * ((1 + (_mp(t_low) + _mp(t_high)) / 2) / 2) ** (2 * n)
                for (t_low, t_high), (w_low, w_high) in nodes
            )
            / 2
        )
        error = REF.mpf(1) / (2 * n + 1) - total
        expected = _mp(remainder_constant(n)) * REF.factorial(2 * n)
        assert abs(error - expected) < REF.mpf(10) ** -40 * expected


# -- whole integrals ------------------------------------------------------------------------------------------
@settings(max_examples=max(30, settings().max_examples // 4), deadline=None)
@given(smooth_integrand(), st.sampled_from([1e-6, 1e-10, 1e-13]), st.sampled_from(["gauss-legendre", "auto"]))
def test_either_rule_contains_the_reference_and_meets_flint(case, tolerance, which) -> None:
    text, a, b, flint_f, hp_f = case
    ours = integrate(text, f"{a}", f"{b}", tolerance, rule=which)
    assert ours.tolerance_met
    reference = HP.quad(hp_f, [HP.mpf(a.numerator) / a.denominator, HP.mpf(b.numerator) / b.denominator])
    reference = REF.mpf(reference)  # 110-digit mpmath (the flint oracle's own integrands and reference)
    assert REF.mpf(ours.enclosure[0]) <= reference <= REF.mpf(ours.enclosure[1]), (text, a, b)
    flint.ctx.prec = 128  # single-threaded test; the engine itself never uses flint's context here
    ball = flint.acb.integral(
        flint_f, flint.acb(flint.fmpq(a.numerator, a.denominator)), flint.acb(flint.fmpq(b.numerator, b.denominator))
    ).real
    assert float(ball.lower()) - 1e-15 <= ours.enclosure[1] and ours.enclosure[0] <= float(ball.upper()) + 1e-15


@pytest.mark.parametrize(
    ("formula", "lower", "upper", "exact"),
    [
        ("x^10", 0, 1, lambda: REF.mpf(1) / 11),  # one degree past what 5 points integrate exactly
        ("1e-310*exp(-x^2)", 0, 1, lambda: REF.mpf("1e-310") * REF.sqrt(REF.pi) / 2 * REF.erf(1)),  # subnormal
        ("1e300*cosh(x)", 0, 5, lambda: REF.mpf("1e300") * REF.sinh(5)),  # near overflow
        ("1/(x + 1e-6)", 0, 1, lambda: REF.log((1 + REF.mpf("1e-6")) / REF.mpf("1e-6"))),  # next to a pole
        ("abs(x - 1/3)*exp(x)", 0, 1, None),  # a kink: Simpson's bounds take that panel
        ("sqrt(x)", 0, 1, lambda: REF.mpf(2) / 3),  # an end where f is not smooth
        ("sin(200*x)*exp(-x)", 0, 5, None),  # the oscillatory case the rule is for
    ],
)
@pytest.mark.parametrize("which", ["gauss-legendre", "auto"])
def test_extremes_and_rough_spots(formula, lower, upper, exact, which) -> None:
    result = integrate(formula, lower, upper, 1e-10, rule=which, include_mesh=True)
    if exact is None:
        f = {
            "abs(x - 1/3)*exp(x)": lambda x: abs(x - REF.mpf(1) / 3) * REF.exp(x),
            "sin(200*x)*exp(-x)": lambda x: REF.sin(200 * x) * REF.exp(-x),
        }[formula]
        points = [lower, REF.mpf(1) / 3, upper] if "abs" in formula else REF.linspace(lower, upper, 400)
        value = REF.quad(f, points)  # 60-digit mpmath, split at the kink or between oscillations
    else:
        value = exact()
    assert REF.mpf(result.enclosure[0]) <= value <= REF.mpf(result.enclosure[1]), (formula, result.enclosure)
    assert result.tolerance_met or result.stop_reason == "resolution_limit"  # 1e301 at 1e-10: float64's floor
    assert {p.bound for p in result.mesh} <= {
        "gauss-legendre-10",  # ten points per panel at 1e-10
        "simpson-f4-signed",
        "simpson-f3",
        "simpson-f2",
        "simpson-f1",
        "range",
    }
    assert sum(result.bounds_used.values()) == len(result.mesh)


def test_the_rule_saves_nodes_on_an_oscillatory_integrand() -> None:
    simpson = integrate("sin(200*x)*exp(-x)", 0, 5, 1e-10, precision_bits=96)  # the same engine, Simpson panels
    gauss = integrate("sin(200*x)*exp(-x)", 0, 5, 1e-10, rule="gauss-legendre")
    assert gauss.tolerance_met and simpson.tolerance_met
    assert gauss.nodes < simpson.nodes / 2
    assert gauss.bounds_used == {"gauss-legendre-10": gauss.panels}


def test_an_unknown_rule_is_refused_with_its_field() -> None:
    with pytest.raises(InvalidInput) as refused:
        integrate("x", 0, 1, rule="gauss")
    assert refused.value.code == "invalid_rule" and refused.value.field == "rule"


@pytest.mark.parametrize(
    ("formula", "lower", "upper", "exact"),
    [
        ("exp(x)", 0, 2, lambda: REF.e**2 - 1),
        ("cos(10*sin(x))", 0, "pi", lambda: REF.pi * REF.besselj(0, 10)),  # A&S 9.1.18 at x = 10
        ("1/(1 + 25*x^2)", -1, 1, lambda: 2 * REF.atan(5) / 5),
        ("abs(x - 0.5)*exp(x)", 0, 1, None),  # a kink: 60-digit mpmath split there, below
    ],
)
@pytest.mark.parametrize("which", ["gauss-legendre", "auto"])
def test_the_compiled_engine_runs_the_rule(formula, lower, upper, exact, which) -> None:
    # 1e-10: within float64's reach for all four (at 1e-12 cos(10 sin x) meets the C library's widening)
    result = integrate(formula, lower, upper, 1e-10, rule=which)
    precise = integrate(formula, lower, upper, 1e-10, rule=which, precision_bits=96)
    assert result.precision_bits == 53 and result.tolerance_met  # answered by the compiled engine
    assert result.enclosure[0] <= precise.enclosure[1] and precise.enclosure[0] <= result.enclosure[1]
    if "abs" in formula:
        half = REF.mpf(1) / 2
        value = REF.quad(lambda x: abs(x - half) * REF.exp(x), [0, half, 1])  # 60-digit mpmath, split at the kink
    else:
        value = exact()
    assert REF.mpf(result.enclosure[0]) <= value <= REF.mpf(result.enclosure[1]), (formula, result.enclosure)
