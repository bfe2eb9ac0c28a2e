"""The reference backend of the one interface through which the rest of quadcert does rigorous arithmetic.

Derivative enclosures and quadrature only call methods of an
:class:`Arithmetic` (``_interface.py``). Two backends implement it: :class:`MpmathArithmetic` here
(the reference) and ``FlintArithmetic`` (python-flint's arb balls, in
``_flint_backend.py``); ``tests/arithmetic/test_backends_agree.py`` holds them
to the same answers.
An instance fixes its precision at construction: there is no global state to
change, so instances are safe to use from concurrent callers. This module loads
mpmath; the package imports it on first use of :class:`MpmathArithmetic`.
"""

from __future__ import annotations

from collections.abc import Callable
from fractions import Fraction

from ..errors import InvalidInput
from . import _kernels as kernels
from . import _special as special
from ._interface import MAX_PRECISION, MIN_PRECISION
from ._interval import ZERO, Interval, to_fraction

_FUNCTIONS: dict[str, Callable[[Interval, int], Interval]] = {
    "sqrt": kernels.sqrt,
    "exp": kernels.exp,
    "log": kernels.log,
    "log10": kernels.log10,
    "sin": kernels.sin,
    "cos": kernels.cos,
    "tan": kernels.tan,
    "asin": kernels.asin,
    "acos": kernels.acos,
    "atan": kernels.atan,
    "sinh": kernels.sinh,
    "cosh": kernels.cosh,
    "tanh": kernels.tanh,
    "erf": kernels.erf,
    "abs": lambda a, _prec: kernels.abs_(a),
    "asinh": special.asinh,
    "acosh": special.acosh,
    "atanh": special.atanh,
    "cbrt": special.cbrt,
    "erfc": special.erfc,
    "sign": lambda a, _prec: special.sign(a),
    "step": lambda a, _prec: special.step(a),
    "gamma": special.gamma,
    "lgamma": special.lgamma,
    "j0": lambda a, prec: special.bessel_j(0, a, prec),
    "j1": lambda a, prec: special.bessel_j(1, a, prec),
}
_CONSTANTS = {"pi": kernels.pi, "e": kernels.e}


class MpmathArithmetic:
    """Reference backend: mpmath's raw floats with guarded elementary functions.

    >>> ar = MpmathArithmetic(80)
    >>> third = ar.exact(Fraction(1, 3))
    >>> lo, hi = ar.bounds(ar.mul(third, ar.exact(Fraction(3))))
    >>> lo <= 1.0 <= hi
    True
    """

    __slots__ = ("_constants", "one", "prec", "zero")

    def __init__(self, prec: int) -> None:
        if not MIN_PRECISION <= prec <= MAX_PRECISION:
            raise InvalidInput(
                f"precision {prec} is outside [{MIN_PRECISION}, {MAX_PRECISION}] bits", code="invalid_precision"
            )
        self.prec = prec
        self.zero = kernels.from_int(0)
        self.one = kernels.from_int(1)
        self._constants: dict[str, Interval] = {}

    def exact(self, value: Fraction) -> Interval:
        return kernels.from_fraction(Fraction(value), self.prec)

    def constant(self, name: str) -> Interval:
        if name not in self._constants:
            self._constants[name] = _CONSTANTS[name](self.prec)
        return self._constants[name]

    def add(self, a: Interval, b: Interval) -> Interval:
        return kernels.add(a, b, self.prec)

    def sub(self, a: Interval, b: Interval) -> Interval:
        return kernels.sub(a, b, self.prec)

    def mul(self, a: Interval, b: Interval) -> Interval:
        return kernels.mul(a, b, self.prec)

    def div(self, a: Interval, b: Interval) -> Interval:
        return kernels.div(a, b, self.prec)

    def neg(self, a: Interval) -> Interval:
        return kernels.neg(a)

    def sqr(self, a: Interval) -> Interval:
        return kernels.sqr(a, self.prec)

    def scale(self, a: Interval, factor: Fraction) -> Interval:
        return kernels.mul_fraction(a, factor, self.prec)

    def pow_int(self, a: Interval, n: int) -> Interval:
        return kernels.pow_int(a, n, self.prec)

    def pow_real(self, a: Interval, b: Interval) -> Interval:
        return kernels.pow_real(a, b, self.prec)

    def function(self, name: str, a: Interval) -> Interval:
        return _FUNCTIONS[name](a, self.prec)

    def polygamma(self, order: int, a: Interval) -> Interval:
        """ψ⁽ᵒʳᵈᵉʳ⁾ over a positive interval (for the Taylor coefficients of Γ and log Γ)."""
        return special.polygamma(order, a, self.prec)

    def bessel_j(self, order: int, a: Interval) -> Interval:
        """J_order over a (for the Taylor coefficients of j0 and j1)."""
        return special.bessel_j(order, a, self.prec)

    def minimum(self, a: Interval, b: Interval) -> Interval:
        return kernels.minimum(a, b)

    def maximum(self, a: Interval, b: Interval) -> Interval:
        return kernels.maximum(a, b)

    def hull(self, a: Interval, b: Interval) -> Interval:
        return kernels.hull(a, b)

    def intersect(self, a: Interval, b: Interval) -> Interval:
        return kernels.intersect(a, b)

    def sign(self, a: Interval) -> int:
        """+1 if a > 0 throughout, -1 if a < 0 throughout, 0 if a reaches zero."""
        if a.lo[0] == 0 and a.lo != ZERO:
            return 1
        if a.hi[0] == 1:
            return -1
        return 0

    def is_exact_integer(self, a: Interval) -> int | None:
        if a.is_point:
            value = to_fraction(a.lo)
            if value.denominator == 1:
                return value.numerator
        return None

    def bounds(self, a: Interval) -> tuple[float, float]:
        return a.floats()

    def bounds_exact(self, a: Interval) -> tuple[Fraction, Fraction]:
        return to_fraction(a.lo), to_fraction(a.hi)

    def from_bounds(self, low: Fraction, high: Fraction) -> Interval:
        """The enclosure [low, high] of exact rationals, rounded outward."""
        return kernels.hull(kernels.from_fraction(low, self.prec), kernels.from_fraction(high, self.prec))

    def width(self, a: Interval) -> float:
        _lo, hi = self.bounds(kernels.sub(Interval.point(a.hi), Interval.point(a.lo), 53))
        return hi
