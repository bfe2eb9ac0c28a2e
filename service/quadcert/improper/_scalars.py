"""Outward-rounded scalar helpers shared by the envelope rules.

Every constant of an envelope is an enclosure (an :class:`Interval` of the reference backend at a fixed,
explicit precision), never a float: a rule that needs "an upper bound of k" takes the enclosure's upper end,
one that needs a lower bound takes the lower end, so no rounding direction is ever guessed.
"""

from __future__ import annotations

import math
from fractions import Fraction

from ..arithmetic import Interval, fraction_down, fraction_up, reference

PRECISION = 128
#: the ε of L ≤ t^(−ε)/(e·ε) (near a point) and log y ≤ y^ε/(e·ε) (in a tail): small, so that a
#: logarithm costs little of the exponent's margin
EPSILON = Fraction(1, 16)


class Unsupported(Exception):
    """No envelope rule applies to this subexpression; the message says which and why."""


class Scalars:
    """Enclosure arithmetic on envelope constants, at one explicit precision (no global state)."""

    def __init__(self, prec: int = PRECISION) -> None:
        self.ar = reference(prec)

    def num(self, value: Fraction | int) -> Interval:
        return self.ar.exact(Fraction(value))

    def power(self, base: Interval, exponent: Fraction) -> Interval:
        """base^exponent for a positive base (an exact integer exponent keeps a zero base allowed)."""
        if exponent.denominator == 1:
            return self.ar.pow_int(base, int(exponent))
        return self.ar.pow_real(base, self.num(exponent))

    def magnitude(self, value: Interval) -> Interval:
        return self.ar.function("abs", value)

    def positive(self, value: Interval) -> bool:
        return self.ar.sign(value) == 1

    def low(self, value: Interval) -> Fraction:
        return self.ar.bounds_exact(value)[0]

    def high(self, value: Interval) -> Fraction:
        return self.ar.bounds_exact(value)[1]

    def exp(self, value: Interval) -> Interval:
        return self.ar.function("exp", value)

    def log(self, value: Interval) -> Interval:
        return self.ar.function("log", value)

    def ceiling_fraction(self, value: Interval, denominator: int = 1 << 20) -> Fraction:
        """A simple rational ≥ every point of value (keeps exponents short)."""
        high = self.high(value)
        return Fraction(-((-high.numerator * denominator) // high.denominator), denominator)

    def floor_fraction(self, value: Interval, denominator: int = 1 << 20) -> Fraction:
        """A simple rational ≤ every point of value."""
        low = self.low(value)
        return Fraction((low.numerator * denominator) // low.denominator, denominator)


#: the values of functions that are exact rationals at rational points (the points where they are rational at all)
_SPECIAL_VALUES: dict[tuple[str, Fraction | int], Fraction] = {
    ("exp", 0): Fraction(1),
    ("log", 1): Fraction(0),
    ("sin", 0): Fraction(0),
    ("cos", 0): Fraction(1),
    ("tan", 0): Fraction(0),
    ("sinh", 0): Fraction(0),
    ("cosh", 0): Fraction(1),
    ("tanh", 0): Fraction(0),
    ("atan", 0): Fraction(0),
    ("asin", 0): Fraction(0),
    ("acos", 1): Fraction(0),
    ("erf", 0): Fraction(0),
    ("log10", 1): Fraction(0),
    ("asinh", 0): Fraction(0),
    ("acosh", 1): Fraction(0),
    ("atanh", 0): Fraction(0),
    ("cbrt", 0): Fraction(0),
    ("erfc", 0): Fraction(1),
    ("lgamma", 1): Fraction(0),
    ("lgamma", 2): Fraction(0),
}


class ExactArithmetic:
    """Rational arithmetic with the :class:`Arithmetic` interface, for proving that a coefficient is zero.

    Only field operations and integer powers are exact; anything transcendental raises
    :class:`Unsupported`, which the caller reads as "no proof".

    >>> from quadcert.formula import parse
    >>> from quadcert.derivatives import Program
    >>> Program(parse("(x - 0.3)^2"), ExactArithmetic()).taylor(Fraction(3, 10), 2)
    [Fraction(0, 1), Fraction(0, 1), Fraction(1, 1)]
    """

    prec = 0
    zero = Fraction(0)
    one = Fraction(1)

    def exact(self, value: Fraction) -> Fraction:
        return Fraction(value)

    def constant(self, name: str) -> Fraction:
        raise Unsupported(f"{name} is not rational")

    def add(self, a: Fraction, b: Fraction) -> Fraction:
        return a + b

    def sub(self, a: Fraction, b: Fraction) -> Fraction:
        return a - b

    def mul(self, a: Fraction, b: Fraction) -> Fraction:
        return a * b

    def div(self, a: Fraction, b: Fraction) -> Fraction:
        if b == 0:
            raise Unsupported("division by zero")
        return a / b

    def neg(self, a: Fraction) -> Fraction:
        return -a

    def sqr(self, a: Fraction) -> Fraction:
        return a * a

    def scale(self, a: Fraction, factor: Fraction) -> Fraction:
        return a * factor

    def pow_int(self, a: Fraction, n: int) -> Fraction:
        if a == 0 and n < 0:
            raise Unsupported("division by zero")
        return a**n

    def pow_real(self, a: Fraction, b: Fraction) -> Fraction:
        raise Unsupported("a power with a non-integer exponent is not rational")

    def function(self, name: str, a: Fraction) -> Fraction:
        if name == "abs":
            return abs(a)
        if name == "sqrt" and a >= 0:
            root_n, root_d = math.isqrt(a.numerator), math.isqrt(a.denominator)
            if root_n * root_n == a.numerator and root_d * root_d == a.denominator:
                return Fraction(root_n, root_d)
        if name == "sign":
            return Fraction((a > 0) - (a < 0))
        if name == "step":
            return Fraction(int(a >= 0))
        if name == "gamma" and a.denominator == 1 and 0 < a <= 1000:
            return Fraction(math.factorial(a.numerator - 1))
        known = _SPECIAL_VALUES.get((name, a))
        if known is not None:
            return known
        raise Unsupported(f"{name}({a}) is not known to be rational")

    def polygamma(self, order: int, a: Fraction) -> Fraction:
        raise Unsupported("the polygamma function is not rational")

    def bessel_j(self, order: int, a: Fraction) -> Fraction:
        raise Unsupported("Bessel functions are not rational")

    def minimum(self, a: Fraction, b: Fraction) -> Fraction:
        return min(a, b)

    def maximum(self, a: Fraction, b: Fraction) -> Fraction:
        return max(a, b)

    def hull(self, a: Fraction, b: Fraction) -> Fraction:
        if a != b:
            raise Unsupported("not a point")
        return a

    def intersect(self, a: Fraction, b: Fraction) -> Fraction:
        return a

    def sign(self, a: Fraction) -> int:
        return (a > 0) - (a < 0)

    def is_exact_integer(self, a: Fraction) -> int | None:
        return a.numerator if a.denominator == 1 else None

    def bounds(self, a: Fraction) -> tuple[float, float]:
        return fraction_down(a), fraction_up(a)

    def bounds_exact(self, a: Fraction) -> tuple[Fraction, Fraction]:
        return a, a

    def from_bounds(self, low: Fraction, high: Fraction) -> Fraction:
        if low != high:
            raise Unsupported("not a point")
        return low

    def width(self, a: Fraction) -> float:
        return 0.0
