"""Taylor recurrences for the language's further functions (the reasoning is in docs/functions.md).

Three patterns cover them:

* a derivative that is an algebraic expression of u (asinh, acosh, atanh, erfc, atan2): the series of the
  derivative is built from u's own series and integrated once, as for atan;
* a function whose derivatives we can enclose directly over an interval (Γ through the polygamma
  functions, the Bessel functions through J_n′ = (J_{n−1} − J_{n+1})/2): :func:`compose` feeds those
  enclosures and u's series into the chain rule's coefficient formula;
* a piecewise-constant function (sign, step): constant where the argument keeps one side of its jump, the
  value alone (a range bound) where it may not.
"""

from __future__ import annotations

from fractions import Fraction
from math import comb, factorial

from ..arithmetic import Arithmetic
from ..errors import DomainViolation
from . import _series as s
from ._series import E, Series


def compose(ar: Arithmetic[E], outer: Series[E], u: Series[E]) -> Series[E]:
    """g(u(x)) from g's Taylor coefficients ``outer[m] ⊇ g⁽ᵐ⁾(U)/m!`` over the range U of u.

    Coefficient n of g(u(x + h)) is Σₘ g⁽ᵐ⁾(u(x))/m! · [hⁿ](u(x + h) − u(x))ᵐ, a polynomial in enclosed
    quantities, so evaluating it over enclosures encloses it for every x in the interval.
    """
    n = min(len(outer), len(u))
    out = [outer[0]]
    if n == 1:
        return out
    delta = [ar.zero, *u[1:n]]  # u(x + h) − u(x)
    power = delta
    totals = [ar.zero] * n
    for m in range(1, n):
        for j in range(m, n):  # δᵐ starts at hᵐ
            totals[j] = ar.add(totals[j], ar.mul(outer[m], power[j]))
        if m + 1 < n:
            power = s.mul(ar, power, delta)
    return out + totals[1:]


def asinh(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    value = ar.function("asinh", u[0])
    if len(u) == 1:
        return [value]
    root = s.sqrt(ar, s.add_constant(ar, s.square(ar, u[:-1]), ar.one))
    return s.integrate(ar, value, s.div(ar, s.derivative(ar, u), root), len(u))


def acosh(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    value = ar.function("acosh", u[0])
    if len(u) == 1:
        return [value]
    root = s.sqrt(ar, s.add_constant(ar, s.square(ar, u[:-1]), ar.neg(ar.one)))
    if len(root) < len(u) - 1:  # u reaches 1: slope unbounded
        return [value]
    return s.integrate(ar, value, s.div(ar, s.derivative(ar, u), root), len(u))


def atanh(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    value = ar.function("atanh", u[0])
    if len(u) == 1:
        return [value]
    denominator = s.add_constant(ar, s.neg(ar, s.square(ar, u[:-1])), ar.one)
    return s.integrate(ar, value, s.div(ar, s.derivative(ar, u), denominator), len(u))


def cbrt(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    """u^(1/3) on each side of 0 (odd), the value alone where u reaches 0 (the slope is unbounded there)."""
    value = ar.function("cbrt", u[0])
    side = ar.sign(u[0])
    if len(u) == 1 or side == 0:
        return [value]
    third = [ar.exact(Fraction(1, 3)), *([ar.zero] * (len(u) - 1))]
    grown = s.pow_real(ar, u if side > 0 else s.neg(ar, u), third)
    grown = grown if side > 0 else s.neg(ar, grown)
    return [ar.intersect(value, grown[0]), *grown[1:]]


def erfc(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    value = ar.function("erfc", u[0])
    if len(u) == 1:
        return [value]
    return s.integrate(ar, value, s.neg(ar, s.erf_slope(ar, u)), len(u))


def piecewise_constant(name: str, ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    """sign or step: constant while u keeps to one side of the jump, the value alone across it."""
    value = ar.function(name, u[0])
    low, high = ar.bounds_exact(value)
    if low == high:
        return [value, *([ar.zero] * (len(u) - 1))]
    return [value]


def atan2(ar: Arithmetic[E], y: Series[E], x: Series[E]) -> Series[E]:
    """The angle of (x, y); its slope is (x·y′ − y·x′)/(x² + y²) wherever it does not jump."""
    value, continuous = atan2_value(ar, y[0], x[0])
    n = min(len(x), len(y))
    if n == 1 or not continuous:
        return [value]
    xs, ys = x[: n - 1], y[: n - 1]
    top = s.sub(ar, s.mul(ar, xs, s.derivative(ar, y[:n])), s.mul(ar, ys, s.derivative(ar, x[:n])))
    bottom = s.add(ar, s.square(ar, xs), s.square(ar, ys))
    return s.integrate(ar, value, s.div(ar, top, bottom), n)


def atan2_value(ar: Arithmetic[E], y: E, x: E) -> tuple[E, bool]:
    """atan2(y, x) over a box, and whether the box misses the jump on the negative x axis."""
    half_pi = ar.scale(ar.constant("pi"), Fraction(1, 2))
    if ar.sign(x) > 0:
        return ar.function("atan", ar.div(y, x)), True
    if ar.sign(y) > 0:
        return ar.sub(half_pi, ar.function("atan", ar.div(x, y))), True
    if ar.sign(y) < 0:
        return ar.sub(ar.neg(half_pi), ar.function("atan", ar.div(x, y))), True
    if ar.sign(x) < 0:
        pi = ar.constant("pi")
        y_low, _ = ar.bounds_exact(y)
        if y_low >= 0:  # y in [0, h]: the upper side, where atan2(0, x) = π belongs
            return ar.add(pi, ar.function("atan", ar.div(y, x))), True
        return ar.hull(ar.neg(pi), pi), False
    x_low, x_high = ar.bounds_exact(x)
    y_low, y_high = ar.bounds_exact(y)
    certain = x_low == x_high == 0 and y_low == y_high == 0
    raise DomainViolation("atan2 is undefined at (0, 0), and its arguments reach it", certain=certain)


def lgamma(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    """log Γ(u): its slope is ψ(u)·u′, and ψ∘u comes from the polygamma functions by :func:`compose`."""
    value = ar.function("lgamma", u[0])
    if len(u) == 1:
        return [value]
    n = len(u) - 1
    psi = [ar.scale(ar.polygamma(m, u[0]), Fraction(1, factorial(m))) for m in range(n)]
    slope = s.mul(ar, compose(ar, psi, u[:-1]), s.derivative(ar, u))
    return s.integrate(ar, value, slope, len(u))


def gamma(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    """Γ(u) = exp(log Γ(u)) for u > 0; below 0 by reflection, π/(sin(πu)·Γ(1 − u))."""
    value = ar.function("gamma", u[0])
    if len(u) == 1:
        return [value]
    if ar.sign(u[0]) > 0:
        grown = s.exp(ar, lgamma(ar, u))
    else:
        pi = ar.constant("pi")
        reflected = gamma(ar, s.add_constant(ar, s.neg(ar, u), ar.one))
        grown = s.reciprocal_constant(ar, pi, s.mul(ar, s.sin(ar, s.mul_constant(ar, u, pi)), reflected))
    return [ar.intersect(value, grown[0]), *grown[1:]]


def bessel(order: int, ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    """J₀(u) or J₁(u): J_n⁽ᵏ⁾ = 2⁻ᵏ Σᵢ (−1)ᵏ⁻ⁱ C(k, i) J_{n+k−2i} (from J_n′ = (J_{n−1} − J_{n+1})/2), with
    J_{−m} = (−1)ᵐ J_m."""
    n = len(u)
    values: dict[int, E] = {}

    def j(m: int) -> E:
        if m not in values:
            values[m] = ar.bessel_j(m, u[0])
        return values[m]

    outer: Series[E] = []
    for k in range(n):
        total = ar.zero
        for i in range(k + 1):
            m = order + k - 2 * i
            term = j(abs(m))
            sign = (-1) ** (k - i) * ((-1) ** abs(m) if m < 0 else 1)
            term = ar.scale(term, Fraction(sign * comb(k, i)))
            total = ar.add(total, term)
        outer.append(ar.scale(total, Fraction(1, 2**k * factorial(k))))
    return compose(ar, outer, u)
