"""∂I/∂p for each parameter: the integral of ∂f/∂p, plus the terms of limits that move with p.

For I(p) = ∫ from a(p) to b(p) of f(x, p) dx, Leibniz's rule gives
∂I/∂p = ∫ ∂f/∂p dx + f(b, p)·∂b/∂p − f(a, p)·∂a/∂p. The derivative formula comes from
``formula._differentiate`` (which refuses where a jump moves with p), and its integral is certified by the
same engine, over the whole box: the enclosure holds for every parameter value within the bounds given.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace
from fractions import Fraction
from typing import TYPE_CHECKING, Any

from ..arithmetic import Within, centre_of, fraction_down, fraction_up, reference
from ..derivatives import Program
from ..errors import ArithmeticFault, NotCertifiable
from ..formula import Formula, parameters_used
from ..formula._differentiate import NotDifferentiable, derivative
from ..formula._parser import CONSTANT_ONLY
from ._endpoints import enclose_limit, infinite_side

if TYPE_CHECKING:
    from ._request import Request
    from ._result import IntegralResult

_PRECISION = 128


def sensitivities(request: Request, integrate: Callable[[Request], IntegralResult]) -> dict[str, tuple[float, float]]:
    """Enclosures of ∂I/∂p for every parameter of the request, each certified by ``integrate``."""
    found: dict[str, tuple[float, float]] = {}
    for name in request.values:
        try:
            inner = derivative(request.formula.root, name)
        except NotDifferentiable as reason:
            raise NotCertifiable(f"no sensitivity for {name}: {reason}", code="sensitivity_unavailable") from None
        differentiated = Formula(inner, request.formula.variable, request.formula.parameters)
        result = integrate(replace(request, formula=differentiated))
        low, high = Fraction(result.enclosure[0]), Fraction(result.enclosure[1])
        for limit, sign in ((request.upper, 1), (request.lower, -1)):
            term_low, term_high = _limit_term(request, limit, name)
            if sign < 0:
                term_low, term_high = -term_high, -term_low
            low, high = low + term_low, high + term_high
        found[name] = (fraction_down(low), fraction_up(high))
    return found


def mean_value_form(
    request: Request, found: dict[str, tuple[float, float]], integrate: Callable[[Request], IntegralResult]
) -> tuple[float, float]:
    """I(c) + Σⱼ Dⱼ·[−rⱼ, rⱼ]: the integral at the box's centre c plus the sensitivities over the box times the
    box's half-widths. It encloses I(p) for every p in the box by the mean value theorem along the segment
    from c to p (Lebourg's form where I has kinks), and is far narrower than evaluating the integrand over the
    whole box when the box is small (docs/parameters.md, section 4)."""
    centre = integrate(replace(request, values=centre_of(request.values)))
    low, high = Fraction(centre.enclosure[0]), Fraction(centre.enclosure[1])
    for name, value in request.values.items():
        if isinstance(value, Within):
            size = max(abs(Fraction(found[name][0])), abs(Fraction(found[name][1]))) * value.radius
            low, high = low - size, high + size
    return fraction_down(low), fraction_up(high)


def _limit_term(request: Request, limit: Formula, name: str) -> tuple[Fraction, Fraction]:
    """f(limit)·∂limit/∂p over the box, exactly bounded; zero for a limit that does not move with p."""
    if infinite_side(limit) or name not in parameters_used(limit.root):
        return Fraction(0), Fraction(0)
    ar = reference(_PRECISION)
    values = dict(request.values)
    where: Any = enclose_limit(limit, ar, values, "limit")
    try:
        slope = Program(Formula(derivative(limit.root, name), CONSTANT_ONLY, limit.parameters), ar, values)
        term = ar.mul(Program(request.formula, ar, values).value(where), slope.value(ar.zero))
    except (ArithmeticFault, NotDifferentiable) as fault:
        raise NotCertifiable(
            f"no sensitivity for {name}: the limit {limit.text} moves with it, and the integrand cannot be "
            f"bounded there ({fault})",
            code="sensitivity_unavailable",
            location=ar.bounds(where),
        ) from None
    return ar.bounds_exact(term)
