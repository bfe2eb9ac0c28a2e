"""An independent rigorous oracle: python-flint's acb.integral on random smooth integrands.

Our enclosure and flint's ball must overlap, and both must contain mpmath's
value at 110 digits. Zero false certificates.
"""

from __future__ import annotations

from fractions import Fraction

import flint
from hypothesis import given
from hypothesis import strategies as st

from quadcert import integrate
from tests.conftest import HP, encloses

small = st.integers(-9, 9)


@st.composite
def smooth_integrand(draw):
    c1, c2, c3, c4, c5 = (draw(small) for _ in range(5))
    c5 = abs(c5) + 1
    a = Fraction(draw(st.integers(-20, 20)), 10)
    b = a + Fraction(draw(st.integers(1, 30)), 10)
    text = f"exp({c1}/10*x)*sin({c2}*x + {c3}) + {c4}/({c5} + x^2)"

    def flint_f(x, _analytic):
        return (flint.acb(c1) / 10 * x).exp() * (c2 * x + c3).sin() + flint.acb(c4) / (c5 + x * x)

    def hp_f(x):
        return HP.exp(HP.mpf(c1) / 10 * x) * HP.sin(c2 * x + c3) + HP.mpf(c4) / (c5 + x * x)

    return text, a, b, flint_f, hp_f


def _hp(fr: Fraction):
    return HP.mpf(fr.numerator) / fr.denominator


@given(smooth_integrand(), st.sampled_from([1e-6, 1e-9, 1e-12]))
def test_overlaps_flint_and_contains_reference(case, tolerance) -> None:
    text, a, b, flint_f, hp_f = case
    ours = integrate(text, str(a.numerator) + "/" + str(a.denominator), f"{b.numerator}/{b.denominator}", tolerance)
    assert ours.tolerance_met
    flint.ctx.prec = 128  # single-threaded test; the engine itself never uses flint's context
    ball = flint.acb.integral(
        flint_f, flint.acb(flint.fmpq(a.numerator, a.denominator)), flint.acb(flint.fmpq(b.numerator, b.denominator))
    ).real
    lower = float(ball.lower()) if ball.is_finite() else -float("inf")
    upper = float(ball.upper()) if ball.is_finite() else float("inf")
    assert ours.enclosure[0] <= upper + 1e-15 and lower - 1e-15 <= ours.enclosure[1]
    reference = HP.quad(hp_f, [_hp(a), _hp(b)])
    assert encloses(ours.enclosure, reference), (text, a, b)
