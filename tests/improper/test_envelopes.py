"""Every envelope really bounds its integrand: random formulas, random points up to the singular point.

For random products of envelope-friendly factors the rules give |f| ≤ upper(t), |f| ≥ lower(t) and a sign on
the piece 0 < t ≤ δ next to a point (or on y ≥ T in a tail). These tests evaluate f at points from δ down to
t = 2^-3000 (far below the float64 range) and in tails out to y = 1e1000, with two references:
mpmath at 60 digits beyond what the point needs, and python-flint balls (a check that fails only when the
ball lies wholly outside the bound, so it is rigorous itself).
"""

from __future__ import annotations

from fractions import Fraction

import flint
import pytest
from hypothesis import given
from hypothesis import strategies as st

from quadcert.arithmetic import to_fraction
from quadcert.formula import parse
from quadcert.improper import InTail, NearPoint, Unsupported
from quadcert.improper._at_infinity import Growth
from quadcert.improper._near_point import Power

from ._reference import MP, arb_value, mp_value

POINTS = [Fraction(0), Fraction(1, 2), Fraction(3, 10), Fraction(-7, 4)]


def _u(a: Fraction) -> str:
    if a == 0:
        return "x"
    return f"(x - {a.numerator}/{a.denominator})" if a > 0 else f"(x + {-a.numerator}/{a.denominator})"


def _near_factors(a: Fraction) -> st.SearchStrategy[str]:
    u = _u(a)
    exponent = st.integers(-9, 20).map(lambda k: f"({k}/10)")
    rate = st.integers(-30, 30).map(lambda k: f"{k}/10")
    return st.one_of(
        exponent.map(lambda p: f"abs({u})^{p}"),
        st.sampled_from(
            [
                f"log(abs({u}))",
                f"log(abs({u}))^2",
                f"sqrt(abs({u}))",
                u,
                f"{u}^2",
                f"sin({u})/{u}",
                f"(1 - cos({u}))/{u}^2",
                f"(exp({u}) - 1)/{u}",
                "1/(1 + x^2)",
                f"atan(1/abs({u}))",
                f"exp(-1/abs({u}))",
                f"tanh({u})",
                f"erf({u})",
                f"cosh({u})",
                f"abs({u})^abs({u})",
                f"sinh({u})/abs({u})^(3/2)",
                f"log10(abs({u}))",
            ]
        ),
        rate.map(lambda r: f"exp({r}*x)"),
        rate.map(lambda r: f"cos({r}*x)"),
    )


@st.composite
def near_cases(draw: st.DrawFn) -> tuple[str, Fraction, int, Fraction]:
    a = draw(st.sampled_from(POINTS))
    factors = draw(st.lists(_near_factors(a), min_size=1, max_size=3))
    text = "*".join(f"({f})" for f in factors)
    if draw(st.booleans()):
        text = f"{text} {draw(st.sampled_from(['+', '-']))} {draw(st.integers(1, 5))}"
    side = draw(st.sampled_from([1, -1]))
    delta = Fraction(1, 2 ** draw(st.integers(4, 60)))
    return text, a, side, delta


def _power_bound(power: Power, t: object, ctx: object, up: bool) -> object:
    k = to_fraction(power.k.hi if up else power.k.lo)
    L = -ctx.log(t)  # type: ignore[attr-defined]
    return ctx.mpf(k.numerator) / k.denominator * t ** ctx.mpf(power.p) * L**power.q  # type: ignore[attr-defined]


def _samples(delta: Fraction) -> list[Fraction]:
    return [
        delta,
        delta * Fraction(3, 4),
        delta / 2,
        delta / 2**10,
        delta / 2**100,
        Fraction(1, 2**1074),
        Fraction(1, 2**3000),
        delta / 3,
    ]


def _check_point(root: object, env: object, x: Fraction, t: Fraction, prec: int, text: str = "") -> None:
    with MP.workprec(prec):
        xm = MP.mpf(x.numerator) / x.denominator
        tm = MP.mpf(t.numerator) / t.denominator
        try:
            value = mp_value(root, xm)
        except (ValueError, ZeroDivisionError):
            pytest.fail(f"the envelope claims the integrand is defined at x = {x}, mpmath finds it is not")
        # the reference's own rounding: x = a + t loses t's relative accuracy by |x|/t
        slack = MP.mpf(2) ** (60 - prec) * (1 + abs(xm) / tm)
        if env.upper is not None:
            assert abs(value) <= _power_bound(env.upper, tm, MP, True) * (1 + slack), (text, float(t), value)
        if env.lower is not None:
            assert abs(value) >= _power_bound(env.lower, tm, MP, False) * (1 - slack), (text, float(t), value)
        if env.sign:
            assert value * env.sign >= -slack * abs(value), (text, float(t), value)
    with flint.ctx.workprec(prec):
        ball = arb_value(root, flint.arb(x.numerator) / x.denominator)
        if env.upper is not None and ball.is_finite():
            k = to_fraction(env.upper.k.hi)
            tb = flint.arb(t.numerator) / t.denominator
            bound = (
                flint.arb(k.numerator)
                / k.denominator
                * tb ** (flint.arb(env.upper.p.numerator) / env.upper.p.denominator)
                * (-tb.log()) ** env.upper.q
            )
            assert not (abs(ball) > bound), (t, ball, bound)


@given(near_cases())
def test_envelopes_next_to_a_point_bound_the_integrand(case) -> None:
    text, a, side, delta = case
    formula = parse(text)
    try:
        near = NearPoint(formula, {}, a, side, delta)
        env = near.envelope(formula.root)
    except Unsupported:
        return  # no rule applies: the engine refuses, which is never wrong
    for t in _samples(delta):
        # enough bits that x − a keeps t, and that 1 − cos(t) (of size t²) keeps its digits too
        prec = 200 + 3 * t.denominator.bit_length() + 4 * a.denominator.bit_length()
        _check_point(formula.root, env, a + side * t, t, prec, f"{text} at {a} side {side} delta {delta}")


def _tail_factors() -> st.SearchStrategy[str]:
    exponent = st.integers(-40, 30).map(lambda k: f"({k}/10)")
    rate = st.integers(1, 30).map(lambda k: f"{k}/10")
    return st.one_of(
        exponent.map(lambda p: f"abs(x)^{p}"),
        rate.map(lambda r: f"exp(-{r}*abs(x))"),
        rate.map(lambda r: f"exp(-{r}*x^2)"),
        rate.map(lambda r: f"cos({r}*x)"),
        st.sampled_from(
            [
                "1/(1 + x^2)",
                "log(abs(x))",
                "log(1 + x^2)",
                "atan(x)",
                "1/cosh(x)",
                "tanh(x)",
                "sin(1/x)",
                "exp(-sqrt(abs(x)))",
                "1/(exp(abs(x)) - 1)",
                "x",
                "x^2 - 3*x",
                "cosh(x)",
                "erf(x)",
                "exp(1/x)",
            ]
        ),
    )


@st.composite
def tail_cases(draw: st.DrawFn) -> tuple[str, int, Fraction]:
    factors = draw(st.lists(_tail_factors(), min_size=1, max_size=3))
    text = "*".join(f"({f})" for f in factors)
    if draw(st.booleans()):
        text = f"{text} + {draw(st.integers(1, 5))}*exp(-x^2)"
    return text, draw(st.sampled_from([1, -1])), Fraction(2 ** draw(st.integers(0, 40)))


def _growth_bound(growth: Growth, y: object, up: bool) -> object:
    k = to_fraction(growth.k.hi if up else growth.k.lo)
    return MP.mpf(k.numerator) / k.denominator * y ** MP.mpf(growth.p) * MP.exp(-MP.mpf(growth.r) * y)


@given(tail_cases())
def test_envelopes_in_a_tail_bound_the_integrand(case) -> None:
    text, side, start = case
    formula = parse(text)
    try:
        tail = InTail(formula, {}, side, start)
        env = tail.envelope(formula.root)
    except Unsupported:
        return
    for y in [start, start * Fraction(3, 2), start * 2, start * 10**6, Fraction(10) ** 300]:
        # e^(−r·y) at y = 1e300 needs the exponent r·y to all its units: bits grow with log2(y)
        with MP.workprec(400 + 2 * y.numerator.bit_length()):
            ym = MP.mpf(y.numerator) / y.denominator
            value = mp_value(formula.root, side * ym)
            slack = MP.mpf(2) ** -300
            if env.upper is not None:
                assert abs(value) <= _growth_bound(env.upper, ym, True) * (1 + slack), (
                    text,
                    side,
                    start,
                    float(y),
                    value,
                )
            if env.lower is not None:
                assert abs(value) >= _growth_bound(env.lower, ym, False) * (1 - slack), (
                    text,
                    side,
                    start,
                    float(y),
                    value,
                )
            if env.sign:
                assert value * env.sign >= -slack * abs(value), (text, side, start, float(y), value)


@pytest.mark.parametrize(
    "text", ["exp(-x^2)*x^3", "1/(1 + x^2)", "log(x)/x^2", "x/(exp(x) - 1)", "exp(-sqrt(x))", "1/cosh(x)*atan(x)"]
)
def test_tail_envelopes_hold_far_beyond_the_float_range(text) -> None:
    """At y = 10^1000 (float64 ends near 1.8e308), checked with mpmath at enough bits for e^(−r·y) there."""
    formula = parse(text)
    env = InTail(formula, {}, 1, Fraction(4)).envelope(formula.root)
    y = Fraction(10) ** 1000
    with MP.workprec(400 + 2 * y.numerator.bit_length()):
        ym = MP.mpf(y.numerator)
        value = mp_value(formula.root, ym)
        assert abs(value) <= _growth_bound(env.upper, ym, True) * (1 + MP.mpf(2) ** -300)
        if env.lower is not None:
            assert abs(value) >= _growth_bound(env.lower, ym, False) * (1 - MP.mpf(2) ** -300)


@pytest.mark.parametrize(
    "text, a, side",
    [
        ("1/sqrt(x)", Fraction(0), 1),
        ("log(x)*x^(-0.3)", Fraction(0), 1),
        ("sin(x)/x", Fraction(0), -1),
        ("1/sqrt(abs(x - 0.3))", Fraction(3, 10), 1),
        ("1/sqrt(1 - x^2)", Fraction(1), -1),
        ("x^x", Fraction(0), 1),
        ("(1 - cos(x))/x^2", Fraction(0), 1),
    ],
)
def test_the_rules_cover_the_classes_of_the_catalogue(text, a, side) -> None:
    """Not a bound check (the properties above are): the cases users bring must get an envelope at all."""
    formula = parse(text)
    env = NearPoint(formula, {}, a, side, Fraction(1, 64)).envelope(formula.root)
    assert env.upper is not None and env.upper.p > -1
