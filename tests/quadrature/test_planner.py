"""The a priori planner against hand calculations of the textbook bounds."""

from __future__ import annotations

import math

import pytest

from quadcert import plan
from quadcert.errors import FormulaError


def test_exp_on_0_2_at_half_ten_to_minus_4() -> None:
    """Hand calculation, max|f''| = max|f''''| = e² ≈ 7.389 on [0, 2], tol = 0.5e-4.

    Trapezoid: (b−a)·h²·M/12 ≤ tol → h ≤ sqrt(12·0.5e-4/(2·7.389)) = 6.372e-3,
      intervals = ceil(2/6.372e-3) = ceil(313.9) = 314, so 315 nodes ("on the order of 300").
    Simpson: (b−a)·h⁴·M/180 ≤ tol → h ≤ (180·0.5e-4/(2·7.389))^(1/4) = 0.1571,
      2n ≥ 2/0.1571 = 12.73 → n = 7 panels (14 subintervals), 15 nodes ("about a dozen").
    """
    result = plan("exp(x)", 0, 2, 0.5e-4)
    assert (result.trapezoid.intervals, result.trapezoid.nodes) == (314, 315)
    assert (result.simpson.intervals, result.simpson.nodes) == (7, 15)
    assert math.isclose(result.simpson.derivative_bound, math.e**2, rel_tol=1e-6)
    assert result.simpson.derivative_bound >= math.e**2
    assert result.simpson.error_bound <= 0.5e-4 and result.trapezoid.error_bound <= 0.5e-4


def test_polynomial_of_degree_three_needs_one_panel() -> None:
    assert plan("x^3 - x", 0, 1, 1e-12).simpson.intervals == 1


def test_counts_are_sufficient_for_the_actual_rule() -> None:
    """Run uniform composite Simpson with the planned n and compare with the closed form ∫₀^π sin = 2."""
    result = plan("sin(x)", 0, "pi", 1e-8)
    n = result.simpson.intervals
    h = math.pi / (2 * n)
    total = sum(math.sin(h * i) * (1 if i in (0, 2 * n) else (4 if i % 2 else 2)) for i in range(2 * n + 1))
    assert abs(total * h / 3 - 2) <= 1e-8


def test_non_smooth_integrand_is_reported_unavailable() -> None:
    result = plan("sqrt(x)", 0, 1, 1e-6)
    assert not result.simpson.available and result.simpson.reason
    assert not result.trapezoid.available


def test_bad_formula_is_a_formula_error() -> None:
    with pytest.raises(FormulaError):
        plan("exp(", 0, 1, 1e-6)
