"""A priori planning: how many uniform nodes the textbook global bounds guarantee.

Composite Simpson with n panels (node spacing h = (b−a)/(2n)) errs by at most
(b−a)·h⁴·max|f⁗|/180; the composite trapezoid rule with m intervals
(h = (b−a)/m) by (b−a)·h²·max|f″|/12.  The maxima are bounded rigorously
by Taylor enclosures on a uniform subdivision, refined until the bound
settles, and the counts are rounded up from interval enclosures, so the plan
is guaranteed sufficient for the formula as written.
"""

from __future__ import annotations

import math
import time
from fractions import Fraction
from typing import TYPE_CHECKING, Any

from ..arithmetic import Arithmetic, reference
from ..derivatives import Program
from ..errors import ArithmeticFault, InvalidInput, NotCertifiable
from ._endpoints import enclose_limit
from ._integrate import ArithmeticFactory
from ._result import Plan, RulePlan

if TYPE_CHECKING:
    from ._request import Request

MAX_PIECES = 4096
MAX_PLANNED_INTERVALS = 10**12


def _derivative_bound(
    program: Program[Any], ar: Arithmetic[Any], a: Any, b: Any, order: int
) -> tuple[Fraction | None, int, str | None]:
    """Upper bound of max|f^(order)| on [a, b], refining the subdivision until it settles."""
    previous: Fraction | None = None
    pieces = 1
    reason = None
    factorial = math.factorial(order)
    while pieces <= MAX_PIECES:
        best = Fraction(0)
        failed = False
        step = ar.scale(ar.sub(b, a), Fraction(1, pieces))
        for i in range(pieces):
            left = a if i == 0 else ar.add(a, ar.scale(step, Fraction(i)))
            right = b if i == pieces - 1 else ar.add(a, ar.scale(step, Fraction(i + 1)))
            try:
                series = program.taylor(ar.hull(left, right), order)
            except ArithmeticFault as fault:
                failed, reason = True, fault.message
                break
            if len(series) <= order:
                failed, reason = True, f"the integrand has no bounded derivative of order {order} here"
                break
            lo, hi = ar.bounds_exact(series[order])
            best = max(best, abs(lo), abs(hi))
        if not failed:
            bound = best * factorial
            if previous is not None and bound >= previous * Fraction(19, 20):
                return min(bound, previous), pieces, None
            previous = bound if previous is None else min(previous, bound)
        pieces *= 2
    if previous is not None:
        return previous, pieces // 2, None
    return None, pieces // 2, reason


def _count(ar: Arithmetic[Any], span: Any, bound: Fraction, tolerance: float, constant: int, power: int) -> int:
    """Smallest safe n with span·(span/n)^power·bound/constant <= tolerance, from an upper enclosure."""
    if bound == 0:
        return 1
    ratio = ar.div(ar.mul(span, ar.exact(bound)), ar.exact(Fraction(constant) * Fraction(tolerance)))
    root = ar.pow_real(ratio, ar.exact(Fraction(1, power)))
    needed = ar.bounds_exact(ar.mul(span, root))[1]
    if needed > MAX_PLANNED_INTERVALS:
        raise InvalidInput(
            "the plan needs more than 10^12 intervals; loosen the tolerance", code="plan_too_large", field="tolerance"
        )
    return max(1, math.ceil(needed))


def _rule(
    ar: Arithmetic[Any], span: Any, bound: Fraction | None, reason: str | None, tolerance: float, rule: str, order: int
) -> RulePlan:
    if bound is None:
        return RulePlan(rule, 0, 0, 0.0, order, None, None, False, reason)
    if rule == "simpson":  # H = 2h per panel: span·H⁴·M/2880 = span·h⁴·M/180
        n = _count(ar, span, bound, tolerance, 2880, 4)
        nodes, spacing_divisor, power, constant = 2 * n + 1, 2 * n, 4, 180
    else:
        n = _count(ar, span, bound, tolerance, 12, 2)
        nodes, spacing_divisor, power, constant = n + 1, n, 2, 12
    h = ar.scale(span, Fraction(1, spacing_divisor))
    achieved = ar.mul(ar.mul(span, ar.pow_int(h, power)), ar.exact(bound / constant))
    return RulePlan(rule, n, nodes, ar.bounds(h)[0], order, float(bound), ar.bounds(achieved)[1], True)


def plan_for(request: Request, *, arithmetic: ArithmeticFactory = reference, precision_bits: int = 96) -> Plan:
    """Uniform Simpson and trapezoid node counts that the global bounds guarantee for ``request.tolerance``."""
    started = time.perf_counter()
    tolerance, formula, values = request.tolerance, request.formula, dict(request.values)
    lower, upper = request.lower, request.upper
    ar = arithmetic(precision_bits)
    program = Program(formula, ar, values)
    a = enclose_limit(lower, ar, values, "lower_limit")
    b = enclose_limit(upper, ar, values, "upper_limit")
    if ar.bounds_exact(b)[1] < ar.bounds_exact(a)[0]:
        a, b = b, a
    elif not ar.bounds_exact(a)[1] < ar.bounds_exact(b)[0]:
        raise NotCertifiable("the limits are equal or too close to plan a mesh", code="degenerate_interval")
    span = ar.sub(b, a)
    m4, pieces4, why4 = _derivative_bound(program, ar, a, b, 4)
    m2, pieces2, why2 = _derivative_bound(program, ar, a, b, 2)
    return Plan(
        formula.text,
        lower.text,
        upper.text,
        tolerance,
        _rule(ar, span, m4, why4, tolerance, "simpson", 4),
        _rule(ar, span, m2, why2, tolerance, "trapezoid", 2),
        max(pieces4, pieces2),
        time.perf_counter() - started,
    )
