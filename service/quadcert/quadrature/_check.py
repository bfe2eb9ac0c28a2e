"""The CI verdict: is a claimed value within tolerance of the exact integral, provably?"""

from __future__ import annotations

import time
from dataclasses import replace
from fractions import Fraction
from typing import TYPE_CHECKING, Any

from ..arithmetic import fraction_down, fraction_up
from . import _inputs
from ._integrate import run
from ._result import CheckResult

if TYPE_CHECKING:
    from ._request import Request


def distance_bounds(claimed: Fraction, low: float, high: float) -> tuple[float, float]:
    c, lo, hi = Fraction(claimed), Fraction(low), Fraction(high)
    far = max(abs(c - lo), abs(c - hi))
    near = Fraction(0) if lo <= c <= hi else min(abs(c - lo), abs(c - hi))
    return max(fraction_down(near), 0.0), fraction_up(far)


def decide(
    request: Request, claimed_value: _inputs.NumberLike, *, deadline_seconds: float | None = None, **options: Any
) -> CheckResult:
    """The verdict on a claim, with ``request.tolerance`` as the distance allowed; the enclosure is refined
    only as far as the decision needs."""
    claimed = _inputs.exact_number(claimed_value, "claimed_value", code="invalid_claim")
    allowed = request.tolerance
    started = time.monotonic()
    engine_tolerance = max(allowed / 4, _inputs.MIN_TOLERANCE)
    while True:
        remaining = None if deadline_seconds is None else max(1e-3, deadline_seconds - (time.monotonic() - started))
        result = run(replace(request, tolerance=engine_tolerance), deadline_seconds=remaining, **options)
        near, far = distance_bounds(claimed, *result.enclosure)
        if far <= allowed:
            return CheckResult("pass", claimed_value, allowed, (near, far), result)
        if near > allowed:
            return CheckResult("fail", claimed_value, allowed, (near, far), result)
        engine_tolerance /= 64
        spread_decides = result.parameter_spread is not None and result.parameter_spread > allowed
        # with parameters known within bounds, finer panels cannot narrow their spread: once it alone is wider
        # than the tolerance the claim fits some values in the box and not others, for good
        if result.stop_reason != "tolerance_met" or engine_tolerance < _inputs.MIN_TOLERANCE or spread_decides:
            return CheckResult("undecided", claimed_value, allowed, (near, far), result)
