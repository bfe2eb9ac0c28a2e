"""The compiled engine's tight tier (_native_tight.h): elementary functions at float points, enclosed in
midpoint-radius double words, and the run that moves onto it when the guarded tier meets its floor.

References named beside each check: mpmath at 250 bits (75 digits) in a private context; python-flint's arb
balls at 300 bits (rigorous); closed forms (A&S 9.1.18 for the Bessel integral, the dilogarithm for the
softplus integral) evaluated by mpmath; python-flint's ``acb.integral`` for random integrals.
"""

from __future__ import annotations

import math
from fractions import Fraction

import flint
import mpmath
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from quadcert.quadrature import _fast, integrate
from tests.quadrature import native_probe

pytestmark = pytest.mark.skipif(not _fast.AVAILABLE, reason="the C engine was not built")

REF = mpmath.MPContext()
REF.prec = 250

COVERED = {  # the tier's functions and the float arguments drawn for each
    "exp": (-600.0, 600.0),
    "log": (1e-250, 1e250),
    "log10": (1e-250, 1e250),
    "sin": (-1e6, 1e6),
    "cos": (-1e6, 1e6),
    "atan": (-1e250, 1e250),
    "sinh": (-600.0, 600.0),
    "cosh": (-600.0, 600.0),
    "tanh": (-400.0, 400.0),
}


def _exact(name: str, x: float):
    return getattr(REF, name)(REF.mpf(x))


def _ball_holds(name: str, x: float, value) -> bool:
    ball = native_probe.tight_ball(name, x)
    assert ball is not None, (name, x)
    middle = REF.mpf(ball[0]) + REF.mpf(ball[1])
    return bool(abs(value - middle) <= REF.mpf(ball[2]))


def _fraction(value) -> Fraction:
    man, exp = (int(v) for v in value.man_exp())
    return Fraction(man) * Fraction(2) ** exp


def _arguments(name: str):
    low, high = COVERED[name]
    wide = st.floats(low, high, allow_nan=False, allow_infinity=False)
    near_one = st.floats(0.999, 1.001)
    small = st.floats(-1e-3, 1e-3, allow_nan=False).filter(lambda v: abs(v) > 1e-300 or v == 0)
    if name in ("log", "log10"):
        return st.one_of(wide.filter(lambda v: v > 0), near_one, st.floats(1e-250, 1e-200), st.floats(1e200, 1e250))
    return st.one_of(wide, small)


def test_constants_hold_their_values() -> None:
    """ln 2, pi/2, 1/ln 10 and 1/j! for j = 0..30, against mpmath at 250 bits, and each ball tight to 2^-100."""
    values = [REF.log(2), REF.pi / 2, 1 / REF.log(10)] + [1 / REF.factorial(j) for j in range(31)]
    for index, value in enumerate(values):
        high, low, radius = native_probe.tight_constant(index)
        middle = REF.mpf(high) + REF.mpf(low)
        assert abs(value - middle) <= radius, index
        assert radius <= abs(value) * 2.0**-100 + 2.0**-999, index


@pytest.mark.parametrize("name", sorted(COVERED))
@given(data=st.data())
def test_balls_hold_250_bit_values(name: str, data) -> None:
    """Reference: mpmath at 250 bits. Where the tier answers, its ball holds the value; it answers everywhere
    in the drawn domains (the guarded layer keeps only subnormal and overflowing arguments)."""
    x = data.draw(_arguments(name))
    assert _ball_holds(name, x, _exact(name, x)), (name, x)


@pytest.mark.parametrize("name", sorted(COVERED))
@given(data=st.data())
def test_floats_are_tight_and_meet_flint(name: str, data) -> None:
    """Reference: python-flint arb at 300 bits. The outward floats meet flint's ball and are at most two
    float steps apart (the guarded layer's are 64 to 128)."""
    x = data.draw(_arguments(name))
    enclosure = native_probe.enclose_function(name, x, x, tight=True)
    assert enclosure is not None
    flint.ctx.prec = 300  # tests run in one thread; the engines never read flint's context
    arg = flint.arb(x)
    ball = arg.log() / flint.arb(10).log() if name == "log10" else getattr(arg, name)()
    lower, upper = _fraction(ball.lower()), _fraction(ball.upper())
    assert upper - lower <= Fraction(1, 10**80) * max(1, abs(lower))
    assert Fraction(enclosure[0]) <= upper and lower <= Fraction(enclosure[1]), (name, x, enclosure)
    low, high = enclosure
    if abs(low) > 1e-250:  # away from the absolute widening (2^-1000 per operation) that covers underflow
        assert high == low or high <= math.nextafter(math.nextafter(low, math.inf), math.inf), (name, x, enclosure)


EXTREMES = [
    # subnormal and tiny arguments, overflow, and points next to zeros, poles and branch points
    ("exp", 5e-324),
    ("exp", -1e-300),
    ("exp", 600.0),
    ("exp", -600.0),
    ("exp", 709.0),
    ("exp", -745.0),
    ("log", 5e-324),
    ("log", 1e-250),
    ("log", math.nextafter(1.0, 2.0)),
    ("log", math.nextafter(1.0, 0.0)),
    ("log", 1e250),
    ("log", 1e300),
    ("log10", math.nextafter(1.0, 0.0)),
    ("log10", 1e-250),
    ("sin", math.pi),
    ("sin", 2 * math.pi),
    ("sin", 1e5 * math.pi),
    ("sin", 5e-324),
    ("sin", 1e-300),
    ("cos", math.pi / 2),
    ("cos", 355.0),
    ("cos", 1e6),
    ("cos", 2.0**20),
    ("cos", 2.0**21),
    ("atan", 1e-300),
    ("atan", 1e250),
    ("atan", -1e16),
    ("atan", 1e300),
    ("sinh", 1e-300),
    ("sinh", 0.4999999),
    ("sinh", 0.5),
    ("sinh", -600.0),
    ("sinh", 700.0),
    ("cosh", 1e-300),
    ("cosh", 600.0),
    ("cosh", 700.0),
    ("tanh", 1e-300),
    ("tanh", 0.5),
    ("tanh", 300.0),
    ("tanh", 300.5),
    ("tanh", -1e300),
]


@pytest.mark.parametrize("name, x", EXTREMES)
def test_extremes(name: str, x: float) -> None:
    """Reference: mpmath at 250 bits. The tier either declines (the guarded layer then answers) or holds the
    value; the function layer as a whole always encloses it."""
    value = _exact(name, x)
    if native_probe.tight_ball(name, x) is not None:
        assert _ball_holds(name, x, value), (name, x)
    enclosure = native_probe.enclose_function(name, x, x, tight=True)
    if enclosure is not None:
        assert REF.mpf(enclosure[0]) <= value <= REF.mpf(enclosure[1]), (name, x, enclosure)


@pytest.mark.parametrize("name", ["sin", "cos"])
@given(data=st.data())
def test_ranges_over_intervals_hold_the_extrema(name: str, data) -> None:
    """Reference: mpmath at 250 bits at the ends and at every multiple of pi/2 inside."""
    a = data.draw(st.floats(-100.0, 100.0))
    b = a + data.draw(st.floats(0.0, 7.0))
    enclosure = native_probe.enclose_function(name, a, b, tight=True)
    assert enclosure is not None
    low, high = REF.mpf(enclosure[0]), REF.mpf(enclosure[1])
    points = [REF.mpf(a), REF.mpf(b)]
    first = int(REF.ceil(REF.mpf(a) / (REF.pi / 2)))
    points += [k * REF.pi / 2 for k in range(first, first + 6) if k * REF.pi / 2 <= b]
    for point in points:
        assert low <= getattr(REF, name)(point) <= high


# ---- runs: the guarded tier meets its floor, the tight one finishes on the same mesh ----------------


def _pi_j0_10():
    return REF.pi * REF.besselj(0, 10)  # A&S 9.1.18: the integral of cos(10 sin x) over [0, pi]


def _softplus_integral():
    return REF.polylog(2, -REF.exp(-10)) - REF.polylog(2, -REF.exp(10))  # -Li2(-e^x) is an antiderivative


FLOOR_CASES = [  # (formula, a, b, tolerance, rule, exact value): the guarded tier meets its floor in each
    ("cos(10*sin(x))", 0.0, math.pi, 1e-12, "simpson", _pi_j0_10),
    ("cos(10*sin(x))", 0.0, math.pi, 1e-13, "gauss-legendre", _pi_j0_10),  # fewer nodes: a lower floor
    ("log(1+exp(x))", -10.0, 10.0, 1e-12, "simpson", _softplus_integral),
    ("log(1+exp(x))", -10.0, 10.0, 1e-12, "gauss-legendre", _softplus_integral),
]


@pytest.mark.parametrize("formula, a, b, tolerance, rule, exact", FLOOR_CASES)
def test_the_tight_tier_finishes_where_the_guarded_one_declines(formula, a, b, tolerance, rule, exact) -> None:
    """The guarded tier alone declines at its rounding floor; with the tight tier the compiled engine answers
    (53 bits) and holds the closed form."""
    assert native_probe.run_status(formula, a, b, tolerance, rule, may_tighten=False) in ("resolution", "stalled")
    assert native_probe.run_status(formula, a, b, tolerance, rule, may_tighten=True) == "met"
    lower = "pi" if a == math.pi else repr(a)
    result = integrate(formula, lower, "pi" if b == math.pi else repr(b), tolerance, rule=rule)
    assert result.precision_bits == 53 and result.tolerance_met
    assert REF.mpf(result.enclosure[0]) <= exact() <= REF.mpf(result.enclosure[1])


@st.composite
def floor_integrand(draw):
    """Smooth integrands that meet the guarded tier's floor at tight tolerances: compositions with a gain."""
    k = draw(st.integers(2, 12))
    c = draw(st.integers(-3, 3))
    kind = draw(st.sampled_from(["cos_sin", "softplus", "atan", "tanh", "log"]))
    a = Fraction(draw(st.integers(-20, 0)), 4)
    b = a + Fraction(draw(st.integers(1, 16)), 4)
    text, f = {
        "cos_sin": (f"cos({k}*sin(x) + {c})", lambda z: (k * z.sin() + c).cos()),
        "softplus": (f"log(1 + exp({k}*x/4 + {c}))", lambda z: (1 + (k * z / 4 + c).exp()).log()),
        "atan": (f"atan({k}*x + {c})*sin(x)", lambda z: (k * z + c).atan() * z.sin()),
        "tanh": (f"tanh({k}*x + {c})*cosh(x/3)", lambda z: (k * z + c).tanh() * (z / 3).cosh()),
        "log": (f"log10({k} + x^2)*exp(-x/{k})", lambda z: (k + z * z).log() / flint.acb(10).log() * (-z / k).exp()),
    }[kind]
    return text, a, b, f


@settings(max_examples=max(20, settings().max_examples // 3))
@given(floor_integrand(), st.sampled_from(["simpson", "auto"]))
def test_random_integrals_meet_flint(case, rule) -> None:
    """Reference: python-flint's acb.integral at 200 bits. Whichever tier ends the run, the enclosure meets
    flint's ball (which is ~1e-50 wide, so it must contain the true value's neighbourhood)."""
    text, a, b, f = case
    result = integrate(text, f"{a.numerator}/{a.denominator}", f"{b.numerator}/{b.denominator}", 1e-12, rule=rule)
    flint.ctx.prec = 200  # single-threaded test; the engines never read flint's context
    ball = flint.acb.integral(
        lambda z, _: f(z),
        flint.acb(flint.fmpq(a.numerator, a.denominator)),
        flint.acb(flint.fmpq(b.numerator, b.denominator)),
    ).real
    assert ball.rad() < 1e-40
    middle = REF.mpf(ball.mid().str(60, radius=False))
    assert REF.mpf(result.enclosure[0]) <= middle <= REF.mpf(result.enclosure[1]), (text, a, b, rule)
