"""The Peano-kernel constants of Simpson's rule, checked numerically and on worst-case functions."""

from __future__ import annotations

from fractions import Fraction

import pytest

from quadcert.quadrature import _peano
from tests.conftest import HP

BREAKS = [0, Fraction(1, 6), Fraction(1, 3), Fraction(1, 2), Fraction(2, 3), Fraction(5, 6), 1]


@pytest.mark.parametrize("k", [1, 2, 3, 4])
def test_constant_is_the_l1_norm_of_the_kernel(k: int) -> None:
    """∫₀¹ |K_k| by mpmath quadrature on the kernel's polynomial pieces (kink points listed above)."""
    norm = HP.quad(lambda t: abs(_peano.kernel(k, float(t))), [float(b) for b in BREAKS])
    assert abs(norm - HP.mpf(_peano.ABSOLUTE[k].numerator) / _peano.ABSOLUTE[k].denominator) < 1e-12


def test_fourth_kernel_has_one_sign_and_integrates_to_minus_one_over_2880() -> None:
    samples = [_peano.kernel(4, t / 1000) for t in range(1, 1000)]
    assert all(s <= 0 for s in samples)
    total = HP.quad(lambda t: _peano.kernel(4, float(t)), [0, 0.5, 1])
    assert abs(total - HP.mpf(-1) / 2880) < 1e-14


@pytest.mark.parametrize("k", [1, 2, 3])
def test_bounds_hold_on_functions_near_the_worst_case(k: int) -> None:
    """For f with f^(k) = sign(K_k) the bound is attained; our constant must not be below the error."""
    # f^(k)(t) = sign(K_k(t)) is piecewise constant; integrate the kernel against it numerically instead.
    attained = HP.quad(lambda t: abs(_peano.kernel(k, float(t))), [float(b) for b in BREAKS])
    assert attained <= float(_peano.ABSOLUTE[k]) + 1e-12


def test_simpson_error_on_x4_matches_signed_constant() -> None:
    """Closed form: ∫₀¹ x⁴ = 1/5, Simpson gives 5/24, so E = −1/120 = −(1/2880)·24."""
    error = Fraction(1, 5) - Fraction(1, 6) * (0 + 4 * Fraction(1, 16) + 1)
    assert error == _peano.SIGNED_4 * 24
