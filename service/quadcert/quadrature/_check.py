"""The CI verdict: is a claimed value within tolerance of the exact integral, provably?"""

from __future__ import annotations

import time
from fractions import Fraction
from typing import Any

from ..arithmetic import fraction_down, fraction_up
from . import _inputs
from ._integrate import integrate
from ._result import CheckResult


def distance_bounds(claimed: Fraction, low: float, high: float) -> tuple[float, float]:
    c, lo, hi = Fraction(claimed), Fraction(low), Fraction(high)
    far = max(abs(c - lo), abs(c - hi))
    near = Fraction(0) if lo <= c <= hi else min(abs(c - lo), abs(c - hi))
    return max(fraction_down(near), 0.0), fraction_up(far)


def check(
    integrand: str,
    lower_limit: Any,
    upper_limit: Any,
    claimed_value: _inputs.NumberLike,
    tolerance: _inputs.NumberLike,
    *,
    deadline_seconds: float | None = None,
    **options: Any,
) -> CheckResult:
    """Decide a claim, refining the enclosure only as far as the decision needs.

    >>> check("x^2", 0, 3, claimed_value=9.0000001, tolerance=1e-6).verdict
    'pass'
    >>> check("x^2", 0, 3, claimed_value=9.01, tolerance=1e-6).verdict
    'fail'
    >>> check("x^2", 0, 3, claimed_value="9.00000000000000015", tolerance="1e-16").verdict != "pass"  # as typed
    True
    """
    claimed = _inputs.exact_number(claimed_value, "claimed_value", code="invalid_claim")
    tolerance = _inputs.check_tolerance(tolerance)  # type: ignore[assignment]
    started = time.monotonic()
    engine_tolerance = max(tolerance / 4, _inputs.MIN_TOLERANCE)
    while True:
        remaining = None if deadline_seconds is None else max(1e-3, deadline_seconds - (time.monotonic() - started))
        result = integrate(integrand, lower_limit, upper_limit, engine_tolerance, deadline_seconds=remaining, **options)
        near, far = distance_bounds(claimed, *result.enclosure)
        if far <= tolerance:
            return CheckResult("pass", claimed_value, tolerance, (near, far), result)
        if near > tolerance:
            return CheckResult("fail", claimed_value, tolerance, (near, far), result)
        engine_tolerance /= 64
        if result.stop_reason != "tolerance_met" or engine_tolerance < _inputs.MIN_TOLERANCE:
            return CheckResult("undecided", claimed_value, tolerance, (near, far), result)
