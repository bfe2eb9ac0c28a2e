"""The compiled engine's Taylor models of f''''/4! (_native_model.h, docs/simpson-models.md), which give
Simpson's fourth-order bound on small panels.

References named beside each check: python-flint's ``arb_series`` at 200 bits (rigorous balls of the Taylor
coefficients at exact points), mpmath at 60 digits (``diff``, a high-precision numerical derivative), and
python-flint's ``acb.integral`` at 200 bits for whole integrals.
"""

from __future__ import annotations

from collections.abc import Callable
from fractions import Fraction
from typing import Any

import flint
import mpmath
import pytest
from hypothesis import assume, given
from hypothesis import strategies as st

from quadcert.formula import parse
from quadcert.quadrature import _fast, integrate
from tests.quadrature import native_probe

pytestmark = pytest.mark.skipif(not _fast.AVAILABLE, reason="the C engine was not built")

#: a private 60-digit context: no test touches mpmath's global precision
MP60 = mpmath.MPContext()
MP60.dps = 60


def _arb_fraction(value: flint.arb) -> Fraction:
    man, exp = (int(v) for v in value.man_exp())
    return Fraction(man) * Fraction(2) ** exp


def _cosh(u: Any) -> Any:
    return (u.exp() + (-u).exp()) / 2


def _tanh(u: Any) -> Any:
    e = (2 * u).exp()
    return (e - 1) / (e + 1)


#: formula -> (the same function on flint's arb_series, on mpmath numbers)
FORMULAS: dict[str, tuple[Callable[[Any], Any], Callable[[Any], Any]]] = {
    "sin(30*x)^2": (lambda u: (30 * u).sin() ** 2, lambda x: MP60.sin(30 * x) ** 2),
    "sin(200*x)*exp(-x)": (lambda u: (200 * u).sin() * (-u).exp(), lambda x: MP60.sin(200 * x) * MP60.exp(-x)),
    "cos(10*sin(x))": (lambda u: (10 * u.sin()).cos(), lambda x: MP60.cos(10 * MP60.sin(x))),
    "exp(-x^2)": (lambda u: (-(u * u)).exp(), lambda x: MP60.exp(-(x**2))),
    "log(1+exp(x))": (lambda u: (1 + u.exp()).log(), lambda x: MP60.log(1 + MP60.exp(x))),
    "x^3/(exp(x)-1)": (lambda u: u**3 / (u.exp() - 1), lambda x: x**3 / (MP60.exp(x) - 1)),
    "1/(1+25*x^2)": (lambda u: 1 / (1 + 25 * u * u), lambda x: 1 / (1 + 25 * x**2)),
    "atan(50*(x-0.3))": (
        lambda u: (50 * (u - flint.arb("0.3"))).atan(),
        lambda x: MP60.atan(50 * (x - MP60.mpf("0.3"))),
    ),
    "1/cosh(10*(x-0.2))^2": (
        lambda u: 1 / _cosh(10 * (u - flint.arb("0.2"))) ** 2,
        lambda x: 1 / MP60.cosh(10 * (x - MP60.mpf("0.2"))) ** 2,
    ),
    "sqrt(1+x^2)": (lambda u: (1 + u * u).sqrt(), lambda x: MP60.sqrt(1 + x**2)),
    "tanh(2*x-1)": (lambda u: _tanh(2 * u - 1), lambda x: MP60.tanh(2 * x - 1)),
    "erf(x)*exp(x/3)": (lambda u: u.erf() * (u / 3).exp(), lambda x: MP60.erf(x) * MP60.exp(x / 3)),
    "(1+x)^1.5": (lambda u: (flint.arb("1.5") * (1 + u).log()).exp(), lambda x: (1 + x) ** MP60.mpf("1.5")),
    "x^3 - 2*x": (lambda u: u**3 - 2 * u, lambda x: x**3 - 2 * x),
}


def _flint_fourth(formula: str, x: float) -> tuple[Fraction, Fraction]:
    """Reference: f''''(x)/4! at the exact float x, as python-flint's 200-bit ball of the series coefficient."""
    return _fourth_coefficient(FORMULAS[formula][0], x)


def _fourth_coefficient(f: Callable[[Any], Any], x: float) -> tuple[Fraction, Fraction]:
    # tests run in one thread, and the engines never read flint's context; 200 bits, and the series are cut
    # after five terms (their length, which is what arb_series calls prec)
    flint.ctx.prec = 200
    coefficients = f(flint.arb_series([flint.arb(x), 1], prec=5)).coeffs()
    ball = coefficients[4] if len(coefficients) > 4 else flint.arb(0)  # flint drops trailing exact zeros
    return _arb_fraction(ball.lower()), _arb_fraction(ball.upper())


def _mpmath_fourth(formula: str, x: float) -> Any:
    """Reference: mpmath's 60-digit numerical fourth derivative at the exact float x, over 4!."""
    return MP60.diff(FORMULAS[formula][1], MP60.mpf(x), 4) / 24


def _inside(enclosure: tuple[float, float], ball: tuple[Fraction, Fraction]) -> bool:
    return Fraction(enclosure[0]) <= ball[0] and ball[1] <= Fraction(enclosure[1])


def _compiled(formula: str) -> _fast.Compiled:
    compiled = _fast.compile_formula(parse(formula), {})
    assert compiled is not None
    return compiled


@st.composite
def stretch_and_panel(draw):
    """A stretch [lo, hi] of width 1e-4..0.2 in [-1, 2], a panel inside it, and points of the panel."""
    lo = draw(st.floats(-1.0, 1.8))
    hi = lo + draw(st.floats(1e-4, 0.2))
    cuts = sorted(draw(st.lists(st.floats(0, 1), min_size=2, max_size=2)))
    plo, phi = (lo + (hi - lo) * c for c in cuts)
    plo, phi = max(lo, min(plo, hi)), max(lo, min(phi, hi))
    points = [plo, phi, 0.5 * plo + 0.5 * phi] + [plo + (phi - plo) * draw(st.floats(0, 1)) for _ in range(3)]
    return lo, hi, plo, phi, [min(max(p, plo), phi) for p in points]


@pytest.mark.parametrize("formula", sorted(FORMULAS))
@given(case=stretch_and_panel())
def test_model_encloses_flint_balls_of_the_fourth_derivative(formula: str, case) -> None:
    """Reference: python-flint arb_series at 200 bits. At every exact point of the panel, flint's ball of
    f''''/4! lies inside the model's enclosure over the panel."""
    lo, hi, plo, phi, points = case
    if formula == "x^3/(exp(x)-1)":
        assume(not lo <= 0 <= hi)  # 0/0 at x = 0 (the engine declines there, and so does flint)
    model = native_probe.model_fourth(_compiled(formula), lo, hi, plo, phi)
    assume(model is not None)
    enclosure = model[:2]
    for x in points:
        ball = _flint_fourth(formula, x)
        assert _inside(enclosure, ball), (formula, lo, hi, plo, phi, x, enclosure, ball)


@pytest.mark.parametrize("formula", ["sin(30*x)^2", "cos(10*sin(x))", "x^3/(exp(x)-1)", "atan(50*(x-0.3))"])
@given(case=stretch_and_panel())
def test_model_encloses_mpmath_60_digit_derivatives(formula: str, case) -> None:
    """Reference: mpmath at 60 digits (numerical differentiation at raised precision). The value lies inside the
    enclosure up to 1e-40 of its size, far below any float step of the enclosure's ends."""
    lo, hi, plo, phi, points = case
    if formula == "x^3/(exp(x)-1)":
        assume(not lo <= 0 <= hi)
    model = native_probe.model_fourth(_compiled(formula), lo, hi, plo, phi)
    assume(model is not None)
    low, high = (MP60.mpf(v) for v in model[:2])
    for x in points:
        value = _mpmath_fourth(formula, x)
        slack = abs(value) * MP60.mpf("1e-40") + MP60.mpf("1e-300")
        assert low - slack <= value <= high + slack, (formula, x, model, value)


def test_model_is_tight_on_small_panels() -> None:
    """Reference: flint's balls at the panel's ends. On a panel 1/1000 of the stretch, the enclosure is at most
    a few times wider than the change of f''''/4! across the panel: the model is what makes Simpson cheaper,
    and a loose one would cost nodes, not rigor."""
    formula = "sin(30*x)^2"
    lo, hi = 0.25, 0.35
    plo, phi = 0.3, 0.3001
    model = native_probe.model_fourth(_compiled(formula), lo, hi, plo, phi)
    assert model is not None
    ends = [_flint_fourth(formula, x) for x in (plo, phi)]
    change = abs(ends[1][0] - ends[0][0])
    assert Fraction(model[1]) - Fraction(model[0]) < 3 * change


EXTREMES = [
    # (formula, stretch low, stretch high): coefficients near underflow and overflow, and points next to
    # singularities (a pole, a logarithm's and a root's branch point, tan's pole)
    ("1e-305*exp(3*x)", 0.2, 0.3),
    ("1e-300*x^7*sin(x)", 0.0, 1e-3),
    ("1e-300*x^7*sin(x)", 1e-80, 2e-80),
    ("1e250*sin(x)^3", 0.5, 0.6),
    ("exp(-700*x)", 0.9, 0.95),
    ("exp(700*x)", 1.0, 1.01),
    ("1/(x - 0.5)", 0.5 - 2e-3, 0.5 - 1e-3),
    ("1/(x - 0.5)", 0.5 - 2e-8, 0.5 - 1e-8),
    ("log(x)", 1e-12, 2e-12),
    ("log(x)", 5e-324, 1e-300),
    ("sqrt(x)", 1e-10, 3e-10),
    ("tan(x)", 1.5707963, 1.57079632),
    ("1/(1e-3 + x^2)", -0.05, 0.05),
]

_FLINT_EXTREMES: dict[str, Callable[[Any], Any]] = {
    "1e-305*exp(3*x)": lambda u: flint.arb("1e-305") * (3 * u).exp(),
    "1e-300*x^7*sin(x)": lambda u: flint.arb("1e-300") * u**7 * u.sin(),
    "1e250*sin(x)^3": lambda u: flint.arb("1e250") * u.sin() ** 3,
    "exp(-700*x)": lambda u: (-700 * u).exp(),
    "exp(700*x)": lambda u: (700 * u).exp(),
    "1/(x - 0.5)": lambda u: 1 / (u - flint.arb("0.5")),
    "log(x)": lambda u: u.log(),
    "sqrt(x)": lambda u: u.sqrt(),
    "tan(x)": lambda u: u.tan(),
    "1/(1e-3 + x^2)": lambda u: 1 / (flint.arb("1e-3") + u * u),
}


@pytest.mark.parametrize("formula, lo, hi", EXTREMES)
@given(cuts=st.lists(st.floats(0, 1), min_size=3, max_size=3))
def test_model_at_the_extremes(formula: str, lo: float, hi: float, cuts: list[float]) -> None:
    """Reference: python-flint arb_series at 200 bits. Either no model is built (the series overflow, or the
    function is not smooth enough there) or it encloses flint's balls at every checked point; a model that
    would need an infinite or NaN bound is never handed out."""
    a, b, c = sorted(cuts)
    plo, phi = lo + (hi - lo) * a, lo + (hi - lo) * c
    plo, phi = max(lo, min(plo, hi)), max(lo, min(phi, hi))
    model = native_probe.model_fourth(_compiled(formula), lo, hi, plo, phi)
    if model is None:
        return
    low, high, remainder = model
    assert low <= high and remainder >= 0 or (low, high) == (float("-inf"), float("inf"))
    for x in (plo, phi, min(max(lo + (hi - lo) * b, plo), phi)):
        ends = _fourth_coefficient(_FLINT_EXTREMES[formula], x)
        assert _inside((low, high), ends), (formula, x, model)


@pytest.mark.parametrize("formula", ["sin(30*x)^2", "cos(10*sin(x))", "x^3/(exp(x)-1)", "1/cosh(10*(x-0.2))^2"])
def test_tight_simpson_runs_build_models(formula: str) -> None:
    """The models are the path the benchmark integrals take at tight tolerances (else the tests above would
    check a path no run uses)."""
    a, b = (0.001, 20.0) if formula.startswith("x^3") else (0.0, 2.0)
    label, models = native_probe.models_built(formula, a, b, 1e-11)
    assert label == "met" and models > 0


INTEGRALS = [  # (formula, a, b, the same integrand for flint's acb.integral)
    ("sin(30*x)^2", "0", "2", lambda z, _: (30 * z).sin() ** 2),
    ("sin(200*x)*exp(-x)", "0", "5", lambda z, _: (200 * z).sin() * (-z).exp()),
    ("cos(10*sin(x))", "0", "3", lambda z, _: (10 * z.sin()).cos()),
    ("x^3/(exp(x)-1)", "0.001", "20", lambda z, _: z**3 / (z.exp() - 1)),
    ("log(1+exp(x))", "-10", "10", lambda z, a: (1 + z.exp()).log(analytic=a)),
    ("1/(1+25*x^2)", "-1", "1", lambda z, _: 1 / (1 + 25 * z * z)),
]


@pytest.mark.parametrize("formula, a, b, flint_f", INTEGRALS)
@pytest.mark.parametrize("tolerance", [1e-8, 1e-12])
def test_simpson_with_models_meets_flint_integrals(formula: str, a: str, b: str, flint_f, tolerance: float) -> None:
    """Reference: python-flint's acb.integral at 200 bits. The certified enclosure contains flint's ball."""
    result = integrate(formula, a, b, tolerance=tolerance)
    flint.ctx.prec = 200
    lo, hi = (Fraction(v) for v in (a, b))
    ball = flint.acb.integral(
        flint_f,
        flint.acb(flint.fmpq(lo.numerator, lo.denominator)),
        flint.acb(flint.fmpq(hi.numerator, hi.denominator)),
        rel_tol=flint.arb(2) ** -180,
    ).real
    ends = _arb_fraction(ball.lower()), _arb_fraction(ball.upper())
    assert ends[1] - ends[0] < Fraction(1, 10**40)
    assert result.tolerance_met
    assert _inside(result.enclosure, ends), (formula, result.enclosure, ends)
