"""The two backends cross-checked: overlapping enclosures that both contain the 110-digit reference."""

from __future__ import annotations

import threading
from fractions import Fraction

import pytest
from hypothesis import assume, given
from hypothesis import strategies as st

from quadcert import integrate
from quadcert.arithmetic import FlintArithmetic, MpmathArithmetic, claim_flint_context, release_flint_context
from quadcert.errors import ArithmeticFault, InvalidInput
from tests.arithmetic.test_guarded_functions import DOMAINS, REFERENCE, hp_of, interval_and_point
from tests.conftest import HP, encloses


@pytest.fixture(autouse=True)
def _own_flint():
    claim_flint_context()  # pytest runs tests on one thread
    yield
    release_flint_context()  # other tests choose their backend explicitly or get the reference one


@pytest.mark.parametrize("name", sorted(DOMAINS))
@given(data=st.data())
def test_functions_agree_and_contain_reference(name: str, data) -> None:
    claim_flint_context()
    a, b, point, prec = data.draw(interval_and_point(name))
    results = []
    for backend in (MpmathArithmetic(prec), FlintArithmetic(prec)):
        try:
            enclosure = backend.function(name, backend.hull(backend.exact(a), backend.exact(b)))
        except ArithmeticFault:
            assume(False)
            return
        lo, hi = backend.bounds_exact(enclosure)
        results.append((lo, hi))
        reference = REFERENCE[name](hp_of(point))
        assert HP.mpf(lo.numerator) / lo.denominator <= reference <= HP.mpf(hi.numerator) / hi.denominator, (
            type(backend).__name__,
            name,
            a,
            b,
            point,
        )
    (lo1, hi1), (lo2, hi2) = results
    assert lo1 <= hi2 and lo2 <= hi1


CASES = [
    ("exp(x)", 0, 2, HP.e**2 - 1),
    ("sqrt(x)", 0, 1, HP.mpf(2) / 3),
    ("abs(x - 0.3)", -1, 1, HP.mpf("1.09")),
    ("1/sqrt(1 - 0.5*sin(x)^2)", 0, "pi/2", HP.ellipk(HP.mpf(1) / 2)),
    ("sqrt(1 - x^2)", -1, 1, HP.pi / 2),
    ("x^1.5", 0, 1, HP.mpf(2) / 5),
    ("cos(sin(x))", 0, "pi", HP.pi * HP.besselj(0, 1)),
]


@pytest.mark.parametrize("integrand, a, b, exact", CASES)
def test_integrals_agree(integrand, a, b, exact) -> None:
    """References: closed forms; K(1/2) A&S 17.3.1; pi*J0(1) A&S 9.1.18."""
    reference = integrate(integrand, a, b, 1e-10, arithmetic=MpmathArithmetic)
    fast = integrate(integrand, a, b, 1e-10, arithmetic=FlintArithmetic)
    assert reference.tolerance_met and fast.tolerance_met
    assert encloses(reference.enclosure, exact) and encloses(fast.enclosure, exact)
    assert fast.enclosure[0] <= reference.enclosure[1] and reference.enclosure[0] <= fast.enclosure[1]


def test_flint_backend_refuses_an_unclaimed_thread() -> None:
    failures = []
    worker = threading.Thread(target=lambda: failures.append(_try_flint()))
    worker.start()
    worker.join()
    assert failures == ["backend_unavailable"]


def _try_flint() -> str:
    try:
        FlintArithmetic(64)
    except InvalidInput as error:
        return error.code
    return "accepted"


@given(st.integers(-(10**30), 10**30), st.integers(1, 10**25), st.integers(-1100, 1100))
def test_flint_float_bounds_are_the_exact_outward_rounding(numerator, denominator, scale) -> None:
    """The fast float conversion agrees with rounding the exact rational endpoints outward."""
    import math

    import flint

    from quadcert.arithmetic import fraction_down as _down
    from quadcert.arithmetic._flint_backend import _bounds, _exact_fraction

    ball = flint.arb(flint.fmpq(numerator, denominator)) * flint.arb(2) ** scale
    low, high = _bounds(ball)
    exact_low, exact_high = _exact_fraction(ball.lower()), _exact_fraction(ball.upper())
    assert low == _down(exact_low) and high == -_down(-exact_high)
    assert (low == -math.inf or Fraction(low) <= exact_low) and (high == math.inf or Fraction(high) >= exact_high)
