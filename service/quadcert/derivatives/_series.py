"""Taylor-mode automatic differentiation over intervals (Moore's recurrences).

A series ``s`` over an interval X is a list of enclosures with
``s[k] ⊇ {f⁽ᵏ⁾(t)/k! : t ∈ X}``.  Its length is the number of orders known:
where f is not smooth enough on X (``abs`` at a zero of its argument, a
kink of ``min``/``max``, ``sqrt`` at zero) the series is cut short, which
means "no information above this order" and never a wrong number.

A series of length L certifies that f⁽ᴸ⁻²⁾ is Lipschitz on X and that its
derivative f⁽ᴸ⁻¹⁾, which exists almost everywhere, lies in (L−1)!·s[L−1].
That is exactly what the Peano-kernel error bounds of the quadrature need.
"""

from __future__ import annotations

from collections.abc import Callable
from fractions import Fraction
from typing import TypeVar

from ..arithmetic import Arithmetic

E = TypeVar("E")  # the enclosure type of the arithmetic in use
Series = list[E]  # enclosures of f^(k)(X)/k!, k = 0, 1, ...

# small exact constants of the recurrences, built once (these loops are the engine's hot path)
#: the longest series the engine asks for: f and 20 derivatives, for 10-point Gauss–Legendre panels
MAX_TERMS = 21
_WHOLE = tuple(Fraction(n) for n in range(MAX_TERMS))
_INVERSE = (Fraction(0),) + tuple(Fraction(1, n) for n in range(1, MAX_TERMS))


def variable(ar: Arithmetic[E], x: E, order: int) -> Series[E]:
    return [x, ar.one, *([ar.zero] * (order - 1))][: order + 1]


def add(ar: Arithmetic[E], a: Series[E], b: Series[E]) -> Series[E]:
    return [ar.add(x, y) for x, y in zip(a, b)]


def sub(ar: Arithmetic[E], a: Series[E], b: Series[E]) -> Series[E]:
    return [ar.sub(x, y) for x, y in zip(a, b)]


def neg(ar: Arithmetic[E], a: Series[E]) -> Series[E]:
    return [ar.neg(x) for x in a]


def add_constant(ar: Arithmetic[E], a: Series[E], c: E) -> Series[E]:
    return [ar.add(a[0], c), *a[1:]]


def mul_constant(ar: Arithmetic[E], a: Series[E], c: E) -> Series[E]:
    return [ar.mul(x, c) for x in a]


def _dot(ar: Arithmetic[E], a: Series[E], b: Series[E], k: int, start: int = 0) -> E:
    """Σ_{j=start..k} a_j·b_{k−j}."""
    total = ar.mul(a[start], b[k - start])
    for j in range(start + 1, k + 1):
        total = ar.add(total, ar.mul(a[j], b[k - j]))
    return total


def mul(ar: Arithmetic[E], a: Series[E], b: Series[E]) -> Series[E]:
    n = min(len(a), len(b))
    return [_dot(ar, a, b, k) for k in range(n)]


def square(ar: Arithmetic[E], a: Series[E]) -> Series[E]:
    out = [ar.sqr(a[0])]
    for k in range(1, len(a)):
        total = ar.mul(a[0], a[k])
        for j in range(1, (k + 1) // 2):
            total = ar.add(total, ar.mul(a[j], a[k - j]))
        total = ar.scale(total, _WHOLE[2])
        if k % 2 == 0:
            total = ar.add(total, ar.sqr(a[k // 2]))
        out.append(total)
    return out


def div(ar: Arithmetic[E], a: Series[E], b: Series[E]) -> Series[E]:
    """a/b; raises when b's value reaches zero (the quotient itself is then unbounded)."""
    n = min(len(a), len(b))
    out = [ar.div(a[0], b[0])]
    for k in range(1, n):
        acc = a[k]
        for j in range(1, k + 1):
            acc = ar.sub(acc, ar.mul(b[j], out[k - j]))
        out.append(ar.div(acc, b[0]))
    return out


def reciprocal_constant(ar: Arithmetic[E], c: E, b: Series[E]) -> Series[E]:
    return div(ar, [c, *([ar.zero] * (len(b) - 1))], b)


def derivative(ar: Arithmetic[E], a: Series[E]) -> Series[E]:
    return [ar.scale(a[k], _WHOLE[k]) for k in range(1, len(a))]


def integrate(ar: Arithmetic[E], value: E, d: Series[E], length: int) -> Series[E]:
    """The series whose value is ``value`` and whose derivative series is ``d``."""
    out = [value]
    for k in range(1, length):
        out.append(ar.scale(d[k - 1], _INVERSE[k]))
    return out


def _driven(ar: Arithmetic[E], u: Series[E], value: E, slope_of: Callable[[Series[E], int], E]) -> Series[E]:
    """f(u) where f' = g(f): f_k = (1/k) Σ_{j=1..k} j·u_j·g_{k−j}, g built on the fly."""
    out = [value]
    g: Series[E] = []
    for k in range(1, len(u)):
        g.append(slope_of(out, k - 1))
        acc = ar.mul(u[1], g[k - 1])
        for j in range(2, k + 1):
            acc = ar.add(acc, ar.scale(ar.mul(u[j], g[k - j]), _WHOLE[j]))
        out.append(ar.scale(acc, _INVERSE[k]))
    return out


def exp(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    return _driven(ar, u, ar.function("exp", u[0]), lambda f, m: f[m])


def _one_plus_square(ar: Arithmetic[E], f: Series[E], m: int, sign: int) -> E:
    """Coefficient m of 1 ± f² (sign +1 or −1)."""
    sq = _dot(ar, f, f, m)
    if m == 0:
        return ar.add(ar.one, sq) if sign > 0 else ar.sub(ar.one, sq)
    return sq if sign > 0 else ar.neg(sq)


def tan(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    return _driven(ar, u, ar.function("tan", u[0]), lambda f, m: _one_plus_square(ar, f, m, +1))


def tanh(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    return _driven(ar, u, ar.function("tanh", u[0]), lambda f, m: _one_plus_square(ar, f, m, -1))


def _pair(ar: Arithmetic[E], u: Series[E], s0: E, c0: E, sign: int) -> tuple[Series[E], Series[E]]:
    """sin/cos (sign −1) or sinh/cosh (sign +1) together: s' = c·u', c' = ±s·u'."""
    s, c = [s0], [c0]
    for k in range(1, len(u)):
        acc_s, acc_c = ar.mul(u[1], c[k - 1]), ar.mul(u[1], s[k - 1])
        for j in range(2, k + 1):
            acc_s = ar.add(acc_s, ar.scale(ar.mul(u[j], c[k - j]), _WHOLE[j]))
            acc_c = ar.add(acc_c, ar.scale(ar.mul(u[j], s[k - j]), _WHOLE[j]))
        s.append(ar.scale(acc_s, _INVERSE[k]))
        c.append(ar.scale(acc_c if sign > 0 else ar.neg(acc_c), _INVERSE[k]))
    return s, c


def sin(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    return _pair(ar, u, ar.function("sin", u[0]), ar.function("cos", u[0]), -1)[0]


def cos(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    return _pair(ar, u, ar.function("sin", u[0]), ar.function("cos", u[0]), -1)[1]


def sinh(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    return _pair(ar, u, ar.function("sinh", u[0]), ar.function("cosh", u[0]), +1)[0]


def cosh(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    return _pair(ar, u, ar.function("sinh", u[0]), ar.function("cosh", u[0]), +1)[1]


def log(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    value = ar.function("log", u[0])
    if len(u) == 1:
        return [value]
    return integrate(ar, value, div(ar, derivative(ar, u), u[:-1]), len(u))


def log10(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    value = ar.function("log10", u[0])
    if len(u) == 1:
        return [value]
    ln10 = ar.function("log", ar.exact(Fraction(10)))
    slope = div(ar, derivative(ar, u), mul_constant(ar, u[:-1], ln10))
    return integrate(ar, value, slope, len(u))


def sqrt(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    s0 = ar.function("sqrt", u[0])
    if len(u) == 1 or ar.sign(s0) <= 0:  # at zero the slope is unbounded: value only
        return [s0]
    twice = ar.scale(s0, _WHOLE[2])
    out = [s0]
    for k in range(1, len(u)):
        acc = u[k]
        for j in range(1, k):
            acc = ar.sub(acc, ar.mul(out[j], out[k - j]))
        out.append(ar.div(acc, twice))
    return out


def atan(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    value = ar.function("atan", u[0])
    if len(u) == 1:
        return [value]
    denominator = add_constant(ar, square(ar, u[:-1]), ar.one)
    return integrate(ar, value, div(ar, derivative(ar, u), denominator), len(u))


def asin(ar: Arithmetic[E], u: Series[E], sign: int = 1) -> Series[E]:
    value = ar.function("asin" if sign > 0 else "acos", u[0])
    if len(u) == 1:
        return [value]
    root = sqrt(ar, add_constant(ar, neg(ar, square(ar, u[:-1])), ar.one))
    if len(root) < len(u) - 1:  # |u| reaches 1: slope unbounded
        return [value]
    slope = div(ar, derivative(ar, u), root)
    return integrate(ar, value, slope if sign > 0 else neg(ar, slope), len(u))


def acos(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    return asin(ar, u, sign=-1)


def erf(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    value = ar.function("erf", u[0])
    if len(u) == 1:
        return [value]
    return integrate(ar, value, erf_slope(ar, u), len(u))


def erf_slope(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    """The series of erf(u)′ = (2/√π)·e^(−u²)·u′ (erfc's is its negative)."""
    two_over_root_pi = ar.div(ar.exact(Fraction(2)), ar.function("sqrt", ar.constant("pi")))
    gauss = exp(ar, neg(ar, square(ar, u[:-1])))
    return mul_constant(ar, mul(ar, gauss, derivative(ar, u)), two_over_root_pi)


def _lipschitz_cut(ar: Arithmetic[E], value: E, slopes: list[E], length: int) -> Series[E]:
    """Value plus an a.e. slope enclosure: for kinks of abs, min and max."""
    if length == 1:
        return [value]
    slope = slopes[0]
    for other in slopes[1:]:
        slope = ar.hull(slope, other)
    return [value, slope]


def abs_(ar: Arithmetic[E], u: Series[E]) -> Series[E]:
    side = ar.sign(u[0])
    if side > 0:
        return u
    if side < 0:
        return neg(ar, u)
    slopes = [u[1], ar.neg(u[1])] if len(u) > 1 else []
    return _lipschitz_cut(ar, ar.function("abs", u[0]), slopes, min(len(u), 2))


def extremum(ar: Arithmetic[E], args: list[Series[E]], largest: bool) -> Series[E]:
    """min or max of several series; smooth where one argument is strictly the extremum."""
    best = args[0]
    for other in args[1:]:
        gap = ar.sign(ar.sub(other[0], best[0]))
        if gap != 0 and (gap > 0) == largest:
            best = other
        elif gap == 0:
            length = min(len(best), len(other), 2)
            combine = ar.maximum if largest else ar.minimum
            best = _lipschitz_cut(ar, combine(best[0], other[0]), [best[1], other[1]] if length > 1 else [], length)
    return best


def pow_int(ar: Arithmetic[E], u: Series[E], n: int) -> Series[E]:
    """u^n for a constant integer n, by squaring; the value is kept tight."""
    if n < 0:
        return reciprocal_constant(ar, ar.one, pow_int(ar, u, -n))
    if n == 0:
        return [ar.one, *([ar.zero] * (len(u) - 1))]
    result: Series[E] | None = None
    base = u
    m = n
    while m:
        if m & 1:
            result = base if result is None else mul(ar, result, base)
        m >>= 1
        if m:
            base = square(ar, base)
    assert result is not None
    return [ar.intersect(result[0], ar.pow_int(u[0], n)), *result[1:]]


def pow_real(ar: Arithmetic[E], u: Series[E], v: Series[E]) -> Series[E]:
    """u^v = exp(v·log u) for u > 0; with u reaching 0 only the value is known."""
    if ar.sign(u[0]) > 0:
        return exp(ar, mul(ar, v, log(ar, u)))
    return [ar.pow_real(u[0], v[0])]
