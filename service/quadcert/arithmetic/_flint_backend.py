"""A second rigorous backend: python-flint's arb ball arithmetic (C, guaranteed error bounds).

arb computes every operation with a rigorous error radius, so results enclose the true values whatever the
working precision is; precision only decides how tight they are. The precision lives in flint's process-wide
context, so this backend refuses to run unless the calling thread has claimed that context with
:func:`claim_flint_context`: a single-threaded process (an engine worker, the CLI) claims it once, and no
code that can run concurrently ever changes it.

Same semantics as the reference backend: explicit domains, ``certain`` faults, magnitude caps.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from fractions import Fraction
from typing import Any

import flint

from ..errors import DomainViolation, InvalidInput, MagnitudeExceeded, Unbounded
from ._interval import binary_directed, interval_text
from ._ownership import flint_context_claimed

arb = flint.arb
_EXP_LIMIT = arb(40000)


def _text(x: arb) -> str:
    return interval_text(*_bounds(x))


def _exact_fraction(point: arb) -> Fraction:
    raw_man, raw_exp = point.mid().man_exp()
    man, exp = int(raw_man), int(raw_exp)
    return Fraction(man) * Fraction(2) ** exp


def _point_directed(point: arb, up: bool) -> float:
    """The float next to an exact arb point in one direction, from its exact mantissa and exponent."""
    raw_man, exp = point.mid().man_exp()
    man = int(raw_man)
    return binary_directed(man < 0, abs(man), int(exp), up)


def _bounds(x: arb) -> tuple[float, float]:
    if not x.is_finite():
        return -math.inf, math.inf
    return _point_directed(x.lower(), up=False), _point_directed(x.upper(), up=True)


def _log2_magnitude(x: arb) -> int:
    """An upper bound of log2|x| (for the magnitude cap), from the exact upper endpoint of |x|."""
    man, exp = abs(x).upper().mid().man_exp()
    return int(exp) + int(man).bit_length() if int(man) else -(1 << 30)


def _even_power(a: arb, n: int) -> arb:
    """a^n for even n from the endpoints: a ball's own power loses the fact that the result is >= 0."""
    if a.is_exact():
        return a**n
    low, high = arb(a.lower()), arb(a.upper())
    if a.contains(0):
        return arb(0).union(abs(low).max(abs(high)) ** n)
    return (low**n).union(high**n)


def _monotone(method: str, increasing: bool = True) -> Callable[[arb], arb]:
    """f(a) from f at the two endpoints: tighter than f of a wide ball, and it keeps signs (exp(a) > 0)."""

    def apply(a: arb) -> arb:
        if a.is_exact():
            value: arb = getattr(a, method)()
            return value
        low: arb = getattr(arb(a.lower()), method)()
        high: arb = getattr(arb(a.upper()), method)()
        return low.union(high)

    return apply


_exp_ends, _log_ends, _sqrt_ends = _monotone("exp"), _monotone("log"), _monotone("sqrt")


def _abs(a: arb) -> arb:
    if a > 0:
        return a
    if a < 0:
        return -a
    return arb(0).union(abs(arb(a.lower())).max(abs(arb(a.upper()))))


def _finite(x: arb, what: str) -> arb:
    if not x.is_finite():
        raise Unbounded(f"{what} is not bounded here", certain=False)
    return x


class FlintArithmetic:
    """Ball-arithmetic backend; see the module docstring for the precision rule.

    >>> from quadcert.arithmetic import claim_flint_context
    >>> claim_flint_context()
    >>> ar = FlintArithmetic(80)
    >>> lo, hi = ar.bounds(ar.mul(ar.exact(Fraction(1, 3)), ar.exact(Fraction(3))))
    >>> lo <= 1.0 <= hi
    True
    """

    __slots__ = ("_constants", "one", "prec", "zero")

    def __init__(self, prec: int) -> None:
        if not flint_context_claimed():
            raise InvalidInput(
                "the flint backend needs flint's context claimed by this thread "
                "(claim_flint_context(), in a single-threaded process)",
                code="backend_unavailable",
            )
        self.prec = prec
        flint.ctx.prec = max(prec, 53)  # the owning thread only; see module docstring
        self.zero = arb(0)
        self.one = arb(1)
        self._constants: dict[str, arb] = {}

    def exact(self, value: Fraction) -> arb:
        value = Fraction(value)
        if value.denominator == 1:
            return arb(value.numerator)
        return arb(flint.fmpq(value.numerator, value.denominator))

    def constant(self, name: str) -> arb:
        if name not in self._constants:
            self._constants[name] = arb.pi() if name == "pi" else arb.const_e()
        return self._constants[name]

    def add(self, a: arb, b: arb) -> arb:
        return a + b

    def sub(self, a: arb, b: arb) -> arb:
        return a - b

    def mul(self, a: arb, b: arb) -> arb:
        return a * b

    def div(self, a: arb, b: arb) -> arb:
        if b.contains(0):
            raise Unbounded(f"division by {_text(b)}, which reaches zero", certain=b.is_exact())
        return a / b

    def neg(self, a: arb) -> arb:
        return -a

    def sqr(self, a: arb) -> arb:
        return _even_power(a, 2)

    def scale(self, a: arb, factor: Fraction) -> arb:
        if factor.denominator == 1:
            return a * factor.numerator
        return a * flint.fmpq(factor.numerator, factor.denominator)

    def pow_int(self, a: arb, n: int) -> arb:
        if n < 0:
            return self.div(self.one, self.pow_int(a, -n))
        if n > 2 and _log2_magnitude(a) * n > 65536:
            raise MagnitudeExceeded(f"{_text(a)}^{n} is too large to compute with")
        if n % 2 == 0:
            return _even_power(a, n)
        return arb(a.lower()) ** n if a.is_exact() else (arb(a.lower()) ** n).union(arb(a.upper()) ** n)

    def pow_real(self, a: arb, b: arb) -> arb:
        if a > 0:
            return self.function("exp", b * a.log())
        if a >= 0 and b > 0:
            top = self.function("exp", b * _finite(arb(a.upper()).log(), "log")) if a.upper() > 0 else arb(0)
            return arb(0).union(top)
        certain = a < 0 or (a <= 0 and not a.contains(0))
        raise DomainViolation(
            f"a power with a non-integer exponent needs a positive base, got {_text(a)}", certain=bool(certain)
        )

    def function(self, name: str, a: arb) -> arb:
        result: arb = _FUNCTIONS[name](a)
        if not result.is_finite():  # arb gives up (e.g. an unbounded slope at a domain edge): not a number we use
            raise Unbounded(f"{name} could not be bounded on {_text(a)}", certain=False)
        return result

    def polygamma(self, order: int, a: arb) -> arb:
        """ψ⁽ᵒʳᵈᵉʳ⁾ over a positive ball: digamma, or (−1)^(m+1)·m!·ζ(m + 1, a) for m ≥ 1."""
        _positive("the polygamma function", a, allow_zero=False)
        sign = 1 if order % 2 else -1

        def at(t: arb) -> arb:
            value: arb = t.digamma() if order == 0 else sign * math.factorial(order) * arb(order + 1).zeta(t)
            return _finite(value, "the polygamma function")

        # each ψ⁽ᵐ⁾ is monotone on (0, ∞): its ends bound it, where arb would give up on a wide ball
        return at(a) if a.is_exact() else at(arb(a.lower())).union(at(arb(a.upper())))

    def bessel_j(self, order: int, a: arb) -> arb:
        return _bessel(order, a)

    def minimum(self, a: arb, b: arb) -> arb:
        return a.min(b)

    def maximum(self, a: arb, b: arb) -> arb:
        return a.max(b)

    def hull(self, a: arb, b: arb) -> arb:
        return a.union(b)

    def intersect(self, a: arb, b: arb) -> arb:
        try:
            return a.intersection(b)
        except ValueError:
            raise ArithmeticError(f"disjoint enclosures {_text(a)} and {_text(b)}: a kernel is wrong") from None

    def sign(self, a: arb) -> int:
        if a > 0:
            return 1
        if a < 0:
            return -1
        return 0

    def is_exact_integer(self, a: arb) -> int | None:
        if a.is_exact() and a.is_integer():
            man, exp = a.mid().man_exp()
            whole: int = int(man) * 2 ** int(exp)
            return whole
        return None

    def bounds(self, a: arb) -> tuple[float, float]:
        return _bounds(a)

    def bounds_exact(self, a: arb) -> tuple[Fraction, Fraction]:
        if not a.is_finite():
            raise Unbounded("a value could not be bounded", certain=False)
        return _exact_fraction(a.lower()), _exact_fraction(a.upper())

    def from_bounds(self, low: Fraction, high: Fraction) -> arb:
        return self.exact(low).union(self.exact(high))

    def width(self, a: arb) -> float:
        return float(a.rad()) * 2 * (1 + 2.0**-40) if a.is_finite() else math.inf


def _positive(name: str, a: arb, allow_zero: bool) -> None:
    ok = (a >= 0) if allow_zero else (a > 0)
    if ok:
        return
    certain = (a < 0) if allow_zero else (a <= 0)
    if certain:
        raise DomainViolation(f"{name} is undefined on {_text(a)}", certain=True)
    raise DomainViolation(f"{name} may be undefined: its argument reaches {_text(a)}", certain=False)


def _unit(name: str, a: arb) -> None:
    if abs(a) <= 1:
        return
    if a > 1 or a < -1:
        raise DomainViolation(f"{name} is undefined on {_text(a)}", certain=True)
    raise DomainViolation(f"{name} may be undefined: its argument reaches {_text(a)}", certain=False)


def _exp(a: arb) -> arb:
    if a.upper() > _EXP_LIMIT:
        raise MagnitudeExceeded(f"exp of {_text(a)} is too large to compute with")
    return _exp_ends(a)


def _log(a: arb) -> arb:
    _positive("log", a, allow_zero=False)
    return _log_ends(a)


def _log10(a: arb) -> arb:
    _positive("log10", a, allow_zero=False)
    return _log_ends(a) / arb(10).log()


def _sqrt(a: arb) -> arb:
    _positive("sqrt", a, allow_zero=True)
    return _sqrt_ends(a)


def _cosh(a: arb) -> arb:
    if abs(a) > _EXP_LIMIT:
        raise MagnitudeExceeded(f"hyperbolic function of {_text(a)} is too large to compute with")
    if a > 0:
        return _monotone("cosh")(a)
    if a < 0:
        return _monotone("cosh")(-a)
    return arb(1).union(arb(abs(arb(a.lower())).max(abs(arb(a.upper())))).cosh())


def _tan(a: arb) -> arb:
    result = a.tan()
    if not result.is_finite():
        raise Unbounded(f"tan has a pole in {_text(a)}", certain=False)
    return result


def _asin(a: arb) -> arb:
    _unit("asin", a)
    return _monotone("asin")(a)


def _acos(a: arb) -> arb:
    _unit("acos", a)
    return _monotone("acos")(a)


def _hyperbolic(method: str) -> Callable[[arb], arb]:
    ends = _monotone(method)

    def apply(a: arb) -> arb:
        if abs(a) > _EXP_LIMIT:
            raise MagnitudeExceeded(f"hyperbolic function of {_text(a)} is too large to compute with")
        return ends(a)

    return apply


def _acosh(a: arb) -> arb:
    if a < 1:
        raise DomainViolation(f"acosh is undefined on {_text(a)}", certain=True)
    if not a >= 1:
        raise DomainViolation(f"acosh may be undefined: its argument reaches {_text(a)}", certain=False)
    return _monotone("acosh")(a)


def _atanh(a: arb) -> arb:
    if a < -1 or a > 1:
        raise DomainViolation(f"atanh is undefined on {_text(a)}", certain=True)
    if a.is_exact() and abs(a) == 1:
        raise Unbounded(f"atanh has a pole at {_text(a)}", certain=True)
    if not abs(a) < 1:
        raise Unbounded(f"atanh has a pole at ±1, and its argument reaches {_text(a)}", certain=False)
    return _monotone("atanh")(a)


def _cbrt_point(t: arb) -> arb:
    if t == 0:
        return arb(0)
    root: arb = abs(t).root(3)
    return root if t > 0 else -root


def _cbrt(a: arb) -> arb:
    if a.is_exact():
        return _cbrt_point(a)
    return _cbrt_point(arb(a.lower())).union(_cbrt_point(arb(a.upper())))


def _sign(a: arb) -> arb:
    low = arb(-1) if a.lower() < 0 else (arb(0) if a.lower() == 0 else arb(1))
    high = arb(1) if a.upper() > 0 else (arb(0) if a.upper() == 0 else arb(-1))
    return low.union(high)


def _step(a: arb) -> arb:
    low = arb(1) if a.lower() >= 0 else arb(0)
    high = arb(1) if a.upper() >= 0 else arb(0)
    return low.union(high)


def _gamma(a: arb) -> arb:
    if a.is_exact() and a.is_integer() and a <= 0:
        raise Unbounded(f"gamma has a pole at {_text(a)}", certain=True)
    if a.upper() > 5000:
        raise MagnitudeExceeded(f"gamma of {_text(a)} is too large to compute with")
    return a.gamma()


def _bessel(order: int, a: arb) -> arb:
    if abs(a).upper() > 100000:
        raise MagnitudeExceeded(f"j0 and j1 take arguments up to 100000 in size, got {_text(a)}")
    return _finite(a.bessel_j(order), "the Bessel function")


def _lgamma(a: arb) -> arb:
    _positive("lgamma", a, allow_zero=False)
    return a.lgamma()


_FUNCTIONS: dict[str, Callable[[arb], Any]] = {
    "sqrt": _sqrt,
    "exp": _exp,
    "log": _log,
    "log10": _log10,
    "sin": arb.sin,
    "cos": arb.cos,
    "tan": _tan,
    "asin": _asin,
    "acos": _acos,
    "atan": _monotone("atan"),
    "sinh": _hyperbolic("sinh"),
    "cosh": _cosh,
    "tanh": _monotone("tanh"),
    "erf": _monotone("erf"),
    "abs": _abs,
    "asinh": _monotone("asinh"),
    "acosh": _acosh,
    "atanh": _atanh,
    "cbrt": _cbrt,
    "erfc": _monotone("erfc"),
    "sign": _sign,
    "step": _step,
    "gamma": _gamma,
    "lgamma": _lgamma,
    "j0": lambda a: _bessel(0, a),
    "j1": lambda a: _bessel(1, a),
}
