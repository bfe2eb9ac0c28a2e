"""Parameters known within bounds: the enclosure holds for every value in the box, the sensitivity encloses
∂I/∂p, and the width is split into the parameters' spread and the discretisation part.

References, named beside each check:
* 60-digit mpmath quadrature (``REF``) at the box's corners and at random interior points;
* python-flint's ``acb.integral`` at the corners (an independent rigorous ball);
* closed forms (elementary calculus) where the integral has one;
* high-precision central differences of the 60-digit integral for ∂I/∂p (step 1e-20, error far below the
  enclosures' widths).
"""

from __future__ import annotations

import itertools
import math
import random
from fractions import Fraction

import flint
import mpmath
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from quadcert import InvalidInput, NotCertifiable, Within, check, integrate
from quadcert.quadrature._inputs import parameter_value

REF = mpmath.MPContext()
REF.dps = 60


def _mp(value: Fraction):
    return REF.mpf(value.numerator) / value.denominator


def _contains(enclosure: tuple[float, float], value: object) -> bool:
    return REF.mpf(enclosure[0]) <= value <= REF.mpf(enclosure[1])


# -- families of integrands, each with its formula, a 60-digit evaluator and a flint one ----------------------
FAMILIES = {
    "damped": (
        "exp(-k*x)*cos(w*x)",
        lambda x, k, w: REF.exp(-k * x) * REF.cos(w * x),
        lambda x, k, w: (-k * x).exp() * (w * x).cos(),
    ),
    "rational": ("k/(w + x^2)", lambda x, k, w: k / (w + x**2), lambda x, k, w: k / (w + x * x)),
    "gaussian": (
        "exp(-k*(x - w)^2)",
        lambda x, k, w: REF.exp(-k * (x - w) ** 2),
        lambda x, k, w: (-k * (x - w) ** 2).exp(),
    ),
    "oscillator": ("sin(k*x + w)*x", lambda x, k, w: REF.sin(k * x + w) * x, lambda x, k, w: (k * x + w).sin() * x),
}


@st.composite
def boxes(draw):
    name = draw(st.sampled_from(sorted(FAMILIES)))
    k_low = Fraction(draw(st.integers(1, 40)), 10)
    w_low = Fraction(draw(st.integers(1, 40)), 10)
    k_width = Fraction(draw(st.integers(1, 100)), 1000)
    w_width = Fraction(draw(st.integers(0, 100)), 1000)
    a = Fraction(draw(st.integers(-20, 10)), 10)
    b = a + Fraction(draw(st.integers(1, 30)), 10)
    return name, (k_low, k_low + k_width), (w_low, w_low + w_width), a, b


def _reference(name: str, k, w, a: Fraction, b: Fraction):
    _text, hp, _fl = FAMILIES[name]
    return REF.quad(lambda x: hp(x, k, w), [_mp(a), _mp(b)])


def _params(k: tuple[Fraction, Fraction], w: tuple[Fraction, Fraction]) -> dict[str, str]:
    def text(bounds):
        return f"{bounds[0]}..{bounds[1]}" if bounds[0] != bounds[1] else str(bounds[0])

    return {"k": text(k), "w": text(w)}


@settings(max_examples=max(25, settings().max_examples // 4), deadline=None)
@given(boxes(), st.sampled_from([1e-6, 1e-9]), st.randoms(use_true_random=False))
def test_the_enclosure_holds_at_corners_and_inside(case, tolerance, rng) -> None:
    name, k, w, a, b = case
    result = integrate(FAMILIES[name][0], f"{a}", f"{b}", tolerance, parameters=_params(k, w))
    assert result.parameter_spread is not None and result.discretisation_bound is not None
    if result.tolerance_met:
        assert result.discretisation_bound <= tolerance
    width = result.enclosure[1] - result.enclosure[0]
    assert width <= result.parameter_spread + 2 * result.discretisation_bound + 4 * math.ulp(abs(result.value) + width)
    points = [(_mp(kk), _mp(ww)) for kk, ww in itertools.product(k, w)]
    for _ in range(3):  # random interior points, drawn by hypothesis's seeded random
        points.append(
            (_mp(k[0]) + (_mp(k[1]) - _mp(k[0])) * rng.random(), _mp(w[0]) + (_mp(w[1]) - _mp(w[0])) * rng.random())
        )
    for kk, ww in points:
        assert _contains(result.enclosure, _reference(name, kk, ww, a, b)), (name, k, w, a, b, kk, ww)


@settings(max_examples=max(10, settings().max_examples // 8), deadline=None)
@given(boxes())
def test_the_enclosure_meets_flint_at_every_corner(case) -> None:
    name, k, w, a, b = case
    result = integrate(FAMILIES[name][0], f"{a}", f"{b}", 1e-8, parameters=_params(k, w))
    flint.ctx.prec = 128  # single-threaded test; the engine never touches flint's context here
    fl = FAMILIES[name][2]
    for kk, ww in itertools.product(k, w):
        kq, wq = (
            flint.acb(flint.fmpq(kk.numerator, kk.denominator)),
            flint.acb(flint.fmpq(ww.numerator, ww.denominator)),
        )
        ball = flint.acb.integral(
            lambda x, _analytic, kq=kq, wq=wq: fl(x, kq, wq),
            flint.acb(flint.fmpq(a.numerator, a.denominator)),
            flint.acb(flint.fmpq(b.numerator, b.denominator)),
        ).real
        assert float(ball.lower()) - 1e-12 <= result.enclosure[1] and result.enclosure[0] <= float(ball.upper()) + 1e-12
        assert result.enclosure[0] <= float(ball.mid()) <= result.enclosure[1] or ball.rad() > 1e-10


@settings(max_examples=max(15, settings().max_examples // 6), deadline=None)
@given(boxes(), st.randoms(use_true_random=False))
def test_sensitivities_contain_a_high_precision_difference_quotient(case, rng) -> None:
    name, k, w, a, b = case
    result = integrate(FAMILIES[name][0], f"{a}", f"{b}", 1e-9, parameters=_params(k, w), sensitivities=True)
    assert result.sensitivities is not None and set(result.sensitivities) == {"k", "w"}
    kk = _mp(k[0]) + (_mp(k[1]) - _mp(k[0])) * rng.random()
    ww = _mp(w[0]) + (_mp(w[1]) - _mp(w[0])) * rng.random()
    h = REF.mpf("1e-20")
    dk = (_reference(name, kk + h, ww, a, b) - _reference(name, kk - h, ww, a, b)) / (2 * h)
    dw = (_reference(name, kk, ww + h, a, b) - _reference(name, kk, ww - h, a, b)) / (2 * h)
    assert _contains(result.sensitivities["k"], dk), (name, k, w, a, b, result.sensitivities, dk)
    assert _contains(result.sensitivities["w"], dw), (name, k, w, a, b, result.sensitivities, dw)
    # with sensitivities the enclosure is also narrowed by the mean-value form: still every value in the box
    for kc, wc in [*((_mp(x), _mp(y)) for x, y in itertools.product(k, w)), (kk, ww)]:
        assert _contains(result.enclosure, _reference(name, kc, wc, a, b)), (name, k, w, a, b, kc, wc)


def test_the_mean_value_form_narrows_an_oscillating_family() -> None:
    # ∫₀¹⁰ sin(kx) dx = (1 − cos 10k)/k (closed form); k within ±0.5 %
    direct = integrate("sin(k*x)", 0, 10, 1e-10, parameters={"k": "1.99..2.01"})
    narrowed = integrate("sin(k*x)", 0, 10, 1e-10, parameters={"k": "1.99..2.01"}, sensitivities=True)
    assert direct.enclosure[0] <= narrowed.enclosure[0] and narrowed.enclosure[1] <= direct.enclosure[1]
    assert narrowed.enclosure[1] - narrowed.enclosure[0] < 0.3 * (direct.enclosure[1] - direct.enclosure[0])
    for k in ("1.99", "2", "2.01", "1.995"):
        kk = REF.mpf(k)
        assert _contains(narrowed.enclosure, (1 - REF.cos(10 * kk)) / kk)


# -- closed forms -----------------------------------------------------------------------------------------
def test_a_beam_moment_with_load_and_span_known_within_bounds() -> None:
    # ∫₀ᴸ P·x·(L − x) dx = P·L³/6 (closed form); both the load and the span (also the upper limit) are spread
    result = integrate("P*x*(L - x)", 0, "L", 1e-9, parameters={"P": "1.9..2.1", "L": "10±0.05"}, sensitivities=True)
    assert result.tolerance_met and result.bounds_used.get("limit_edge") == 1
    for p, span in itertools.product((Fraction("1.9"), Fraction("2.1")), (Fraction("9.95"), Fraction("10.05"))):
        assert _contains(result.enclosure, _mp(p * span**3 / 6))
        assert _contains(result.sensitivities["P"], _mp(span**3 / 6))  # ∂/∂P = L³/6
        assert _contains(result.sensitivities["L"], _mp(p * span**2 / 2))  # ∂/∂L = P·L²/2
    # the spread is the box's doing: at most the true range plus a modest overestimate
    true_range = float(Fraction("2.1") * Fraction("10.05") ** 3 / 6 - Fraction("1.9") * Fraction("9.95") ** 3 / 6)
    assert true_range <= result.parameter_spread <= 1.1 * true_range


def test_an_exponential_decay_rate_within_bounds_to_infinity() -> None:
    # ∫₀^∞ e^(−kx) dx = 1/k, ∂/∂k = −1/k² (closed forms)
    result = integrate("exp(-k*x)", 0, "inf", 1e-8, parameters={"k": {"low": "0.5", "high": "2"}}, sensitivities=True)
    assert result.tolerance_met
    for k in (Fraction(1, 2), Fraction(2), Fraction(7, 5)):
        assert _contains(result.enclosure, _mp(1 / k))
        assert _contains(result.sensitivities["k"], -_mp(1 / k**2))


def test_a_step_whose_place_is_uncertain_is_spread_not_discretisation() -> None:
    # ∫₀² step(x − c) dx = 2 − c (closed form); the step's place is known to ±0.01
    result = integrate("step(x - c)", 0, 2, 1e-10, parameters={"c": "0.99..1.01"})
    assert result.tolerance_met and result.discretisation_bound <= 1e-10
    assert _contains(result.enclosure, REF.mpf("0.99")) and _contains(result.enclosure, REF.mpf("1.01"))
    assert result.parameter_spread >= 0.02 - 1e-9


def test_a_point_box_is_the_ordinary_answer() -> None:
    same = integrate("exp(-k*x)", 0, 1, 1e-10, parameters={"k": "2..2"})
    plain = integrate("exp(-k*x)", 0, 1, 1e-10, parameters={"k": 2})
    assert same.enclosure == plain.enclosure and same.parameter_spread is None


# -- extremes ---------------------------------------------------------------------------------------------
@pytest.mark.parametrize(
    ("formula", "lower", "upper", "box", "exact"),
    [
        # subnormal-sized rates: ∫₀¹ e^(−kx) dx = (1 − e^(−k))/k ≈ 1 − k/2 (closed form, via expm1)
        ("exp(-k*x)", 0, 1, ("1e-310", "3e-310"), lambda k: -REF.expm1(-k) / k),
        # a huge rate: ∫₀¹ e^(−kx) dx = (1 − e^(−k))/k (closed form)
        ("exp(-k*x)", 0, 1, ("1e200", "2e200"), lambda k: -REF.expm1(-k) / k),
        # a pole just beyond the upper limit: ∫₀¹ 1/(c − x) dx = log(c/(c − 1)) (closed form)
        ("1/(c - x)", 0, 1, ("1.000001", "1.000002"), lambda c: REF.log(c / (c - 1))),
        # an integrable singularity at the lower limit, scaled: ∫₀¹ k/√x dx = 2k (closed form)
        ("k/sqrt(x)", 0, 1, ("1e-300", "1e300"), lambda k: 2 * k),
    ],
)
def test_extreme_boxes_are_enclosed(formula, lower, upper, box, exact) -> None:
    name = "k" if "k" in formula else "c"
    result = integrate(formula, lower, upper, 1e-6, parameters={name: f"{box[0]}..{box[1]}"})
    for end in box:
        assert _contains(result.enclosure, exact(REF.mpf(end)))


# -- refusals and inputs ----------------------------------------------------------------------------------
def test_sensitivity_is_refused_where_a_jump_moves_with_the_parameter() -> None:
    with pytest.raises(NotCertifiable) as refused:
        integrate("{1 if x < c; 0 otherwise}", 0, 2, 1e-8, parameters={"c": "0.9..1.1"}, sensitivities=True)
    assert refused.value.code == "sensitivity_unavailable" and "c" in refused.value.message
    # without sensitivities the same integral is enclosed: ∫ = c (closed form)
    result = integrate("{1 if x < c; 0 otherwise}", 0, 2, 1e-8, parameters={"c": "0.9..1.1"})
    assert _contains(result.enclosure, REF.mpf("0.9")) and _contains(result.enclosure, REF.mpf("1.1"))


@pytest.mark.parametrize(
    ("value", "expected"),
    [
        ("1.99..2.01", Within(Fraction("1.99"), Fraction("2.01"))),
        ("2±0.01", Within(Fraction("1.99"), Fraction("2.01"))),
        ("2 +- 0.01", Within(Fraction("1.99"), Fraction("2.01"))),
        ({"low": "1/3", "high": 1}, Within(Fraction(1, 3), Fraction(1))),
        ("-2..-1", Within(Fraction(-2), Fraction(-1))),
        ("0.1..0.1", Fraction(1, 10)),
    ],
)
def test_bounds_are_read_exactly(value, expected) -> None:
    assert parameter_value(value, "parameters.k") == expected


@pytest.mark.parametrize("value", ["2..1", "1..x", {"low": 1}, {"low": 1, "high": 2, "mid": 1.5}, "2±-1", "..2"])
def test_bad_bounds_are_refused_with_the_field(value) -> None:
    with pytest.raises(InvalidInput) as refused:
        integrate("k*x", 0, 1, 1e-8, parameters={"k": value})
    assert refused.value.code == "invalid_parameter" and refused.value.field.startswith("parameters.k")


def test_a_claim_that_fits_only_part_of_the_box_is_undecided() -> None:
    # ∫₀¹ k dx = k for k in [1, 2]: 1.5 is right for one value only
    verdict = check("k", 0, 1, claimed_value=1.5, tolerance=1e-6, parameters={"k": "1..2"})
    assert verdict.verdict == "undecided"
    assert check("k", 0, 1, claimed_value=5, tolerance=1e-6, parameters={"k": "1..2"}).verdict == "fail"
    assert check("k", 0, 1, claimed_value=1.5, tolerance=0.6, parameters={"k": "1..2"}).verdict == "pass"


def test_random_interior_points_of_a_two_parameter_box_use_the_reference_engine_seeded() -> None:
    rng = random.Random(20261202)  # seeded: the same points on every run
    result = integrate("exp(-k*x)*sin(w*x)", 0, 3, 1e-9, parameters={"k": "0.5..0.6", "w": "3..3.2"})
    for _ in range(10):
        k, w = REF.mpf("0.5") + REF.mpf("0.1") * rng.random(), 3 + REF.mpf("0.2") * rng.random()
        assert _contains(result.enclosure, REF.quad(lambda x, k=k, w=w: REF.exp(-k * x) * REF.sin(w * x), [0, 3]))


def test_an_infinite_stretch_next_to_a_moving_limit_is_refused_not_crashed() -> None:
    """Found by the parameters red-team run (seed 1): an enclosure past the float range, plus the edge piece
    of a limit that moves, raised OverflowError instead of the coded refusal."""
    from quadcert.quadrature._spread import Edge, widened

    assert widened(-math.inf, 1.0, [Edge(Fraction(0), Fraction(1))]) == (-math.inf, 1.0)
    with pytest.raises(NotCertifiable) as refused:
        integrate("1e308*x", 0, "2 + d", 1e-4, parameters={"d": "0..1/10"})  # ∫ = 1e308·(2 + d)²/2
    assert refused.value.code == "result_out_of_range"


@pytest.mark.parametrize("which", ["gauss-legendre", "auto"])
def test_bounds_with_the_other_panel_rules(which) -> None:
    # ∫₀³ e^(−kx)·sin(10x) dx at the corners of k in [1.99, 2.01] (60-digit mpmath)
    result = integrate("exp(-k*x)*sin(10*x)", 0, 3, 1e-10, parameters={"k": "1.99..2.01"}, rule=which)
    assert result.tolerance_met and result.discretisation_bound <= 1e-10
    for k in ("1.99", "2.01", "2"):
        kk = REF.mpf(k)
        assert _contains(result.enclosure, REF.quad(lambda x, kk=kk: REF.exp(-kk * x) * REF.sin(10 * x), [0, 3]))
