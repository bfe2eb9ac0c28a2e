"""Envelopes of the integrand on a tail [T, ∞) or (−∞, −T].

On x = s·y, y ≥ T ≥ 1 (s = +1 for the right tail, −1 for the left one), every subexpression g gets, where a
rule proves it, an upper envelope |g| ≤ k·y^p·e^(−r·y), a lower envelope |g| ≥ k·y^p·e^(−r·y) (p and r
rational; r < 0 is exponential growth) and a sign (+1 when g ≥ 0 on the whole tail, −1 when g ≤ 0, else 0;
strictly positive needs a lower envelope as well).
The rules are listed, each with its reason, in ``docs/improper-integrals.md``.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from fractions import Fraction

from ..arithmetic import Interval, ParameterValue
from ..derivatives import Program
from ..errors import ArithmeticFault
from ..formula import Call, Formula, Node, Variable
from ._algebra import Envelope, Rules, _has_variable
from ._scalars import Scalars, Unsupported


@dataclass(frozen=True)
class Growth:
    """k·y^p·e^(−r·y) on y ≥ T, with k an enclosure of the constant."""

    k: Interval
    p: Fraction
    r: Fraction


TailEnvelope = Envelope  # the same type; the name says which piece it bounds


class InTail(Rules[Growth]):
    """The envelope rules on one tail; ``envelope(root)`` is the integrand's.

    >>> from quadcert.formula import parse
    >>> tail = InTail(parse("x^2*exp(-x)"), {}, +1, Fraction(8))
    >>> env = tail.envelope(tail.formula.root)
    >>> env.upper.p, env.upper.r, env.sign
    (Fraction(2, 1), Fraction(1, 1), 1)
    """

    def __init__(self, formula: Formula, values: Mapping[str, ParameterValue], side: int, start: Fraction) -> None:
        if start < 1:
            raise ValueError("a tail starts at T ≥ 1")
        self.formula, self.values, self.side, self.start = formula, dict(values), side, start
        self.s = Scalars()
        self.start_iv = self.s.num(start)
        self._memo: dict[Node, TailEnvelope[Growth]] = {}

    # -- the growth algebra ------------------------------------------------------------------------
    def sup(self, d: Fraction, rho: Fraction) -> Interval:
        """A bound on sup over y ≥ T of y^d·e^(−ρ·y) (ρ ≥ 0; d ≤ 0 when ρ = 0)."""
        s, ar = self.s, self.s.ar
        if rho < 0 or (rho == 0 and d > 0):
            raise Unsupported("an envelope that grows faster cannot be compared")
        at_start = ar.mul(s.power(self.start_iv, d), s.exp(s.num(-rho * self.start)))
        if d <= 0 or d / rho <= self.start:
            return at_start  # decreasing on [T, ∞)
        return s.power(ar.div(s.num(d / rho), ar.constant("e")), d)  # the peak at y = d/ρ

    def times(self, a: Growth, b: Growth) -> Growth:
        return Growth(self.s.ar.mul(a.k, b.k), a.p + b.p, a.r + b.r)

    def raised(self, a: Growth, n: Fraction, upper: bool = True) -> Growth:
        return Growth(self.s.power(a.k, n), a.p * n, a.r * n)

    def plus(self, a: Growth, b: Growth) -> Growth:
        ar = self.s.ar
        p, r = max(a.p, b.p), min(a.r, b.r)
        k = ar.add(ar.mul(a.k, self.sup(a.p - p, a.r - r)), ar.mul(b.k, self.sup(b.p - p, b.r - r)))
        return Growth(k, p, r)

    def scaled(self, a: Growth, factor: Interval) -> Growth:
        return Growth(self.s.ar.mul(a.k, factor), a.p, a.r)

    def bound(self, a: Growth) -> Interval:
        return self.s.ar.mul(a.k, self.sup(a.p, a.r))

    def infimum(self, a: Growth) -> Interval:
        """inf over the tail of k·y^p·e^(−r·y) for p ≥ 0 and r ≤ 0 (increasing: the value at T)."""
        if a.p < 0 or a.r > 0:
            raise Unsupported("no useful infimum")
        s, ar = self.s, self.s.ar
        return ar.mul(a.k, ar.mul(s.power(self.start_iv, a.p), s.exp(s.num(-a.r * self.start))))

    def linear_rate(self, a: Growth) -> Fraction | None:
        """A rate c with k·y^p ≤ c·y on the tail (p ≤ 1, r = 0), as a rational rounded up."""
        if a.r != 0 or a.p > 1:
            return None
        s = self.s
        return s.ceiling_fraction(s.ar.mul(a.k, s.power(self.start_iv, a.p - 1)))

    def span(self) -> tuple[Fraction | None, Fraction | None]:
        return (self.start, None) if self.side > 0 else (None, -self.start)

    # -- rules ---------------------------------------------------------------------------------------
    def envelope(self, node: Node) -> TailEnvelope[Growth]:
        cached = self._memo.get(node)
        if cached is None:
            cached = self._rule(node)
            self._memo[node] = cached
        return cached

    def _constant(self, node: Node) -> TailEnvelope[Growth]:
        ar, s = self.s.ar, self.s
        try:
            value = Program(Formula(node, self.formula.variable, self.formula.parameters), ar, self.values).value(
                ar.zero
            )
        except ArithmeticFault:
            raise Unsupported("a constant subexpression cannot be evaluated") from None
        size = s.magnitude(value)
        upper = Growth(size, Fraction(0), Fraction(0))
        if ar.sign(value) == 0:
            return TailEnvelope(upper, None, 0)
        return TailEnvelope(upper, upper, ar.sign(value))

    def _rule(self, node: Node) -> TailEnvelope[Growth]:
        if not _has_variable(node):
            return self._constant(node)
        if isinstance(node, Variable):
            one = Growth(self.s.ar.one, Fraction(1), Fraction(0))
            return TailEnvelope(one, one, self.side)
        return self.rule(node)

    def call(self, node: Call) -> TailEnvelope[Growth]:
        from ._tail_functions import tail_call

        return tail_call(self, node)

    # -- what the shared rules ask of this kind of piece ------------------------------------------------
    def constant(self, k: Interval) -> Growth:
        return Growth(k, Fraction(0), Fraction(0))

    def ratio(self, small: Growth, big: Growth) -> Interval:
        return self.sup(small.p - big.p, small.r - big.r)

    def strongest(self, lowers: list[Growth]) -> Growth:
        return min(lowers, key=lambda e: (e.r, -e.p))  # the slowest decay is the largest far out

    def small_bound(self, upper: Growth | None) -> Interval | None:
        if upper is not None and (upper.r > 0 or (upper.r == 0 and upper.p <= 0)):
            return self.bound(upper)
        return None

    def least(self, lower: Growth | None) -> Interval | None:
        if lower is None or lower.p < 0 or lower.r > 0:
            return None
        return self.infimum(lower)
