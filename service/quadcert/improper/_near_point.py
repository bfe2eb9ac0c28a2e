"""Envelopes of the integrand next to a finite point where it cannot be evaluated.

On the one-sided piece x = a + s·t, 0 < t ≤ δ (s = +1 to the right of a, −1 to the left), every
subexpression g gets, where a rule proves it:

- an upper envelope |g| ≤ k·t^p·L^q and a lower envelope |g| ≥ k·t^p·L^q, with L = log(1/t) ≥ log(1/δ) ≥ 2,
  p rational and q a whole number;
- a sign: +1 when g ≥ 0 on the whole piece, −1 when g ≤ 0 (proved, never sampled), else 0. Strictly
  positive needs the sign and a lower envelope (which proves g ≠ 0 on the open piece).

Subexpressions that are defined on the closed piece [a, a + s·δ] get both envelopes from their Taylor
expansion at a with a Lagrange remainder over the piece; a leading coefficient counts as zero only when it is
proved zero (its enclosure is exactly 0, or exact rational evaluation gives 0). The other subexpressions are
built by the rules of ``docs/improper-integrals.md``, each of which also proves that the subexpression is
defined on the open piece. Nothing here samples the integrand.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from fractions import Fraction
from math import ceil, floor
from typing import Any

from ..arithmetic import Interval, ParameterValue
from ..derivatives import Program
from ..errors import ArithmeticFault
from ..formula import Binary, Call, Formula, Negate, Node
from ._algebra import Envelope, Rules, _has_variable
from ._scalars import EPSILON, ExactArithmetic, Scalars, Unsupported

ORDER = 4  # Taylor coefficients used for subexpressions that are regular at the point (zeros up to order 3)


@dataclass(frozen=True)
class Power:
    """k·t^p·L^q on 0 < t ≤ δ, with k an enclosure of the constant."""

    k: Interval
    p: Fraction
    q: int


class NearPoint(Rules[Power]):
    """The envelope rules on one piece; ``envelope(root)`` is the integrand's.

    >>> from quadcert.formula import parse
    >>> near = NearPoint(parse("1/sqrt(x)"), {}, Fraction(0), +1, Fraction(1, 64))
    >>> env = near.envelope(near.formula.root)
    >>> env.upper.p, env.upper.q, env.sign
    (Fraction(-1, 2), 0, 1)
    """

    def __init__(
        self,
        formula: Formula,
        values: Mapping[str, ParameterValue],
        point: Fraction,
        side: int,
        delta: Fraction,
        at_point: dict[Any, list[Any]] | None = None,
    ) -> None:
        if not 0 < delta <= Fraction(1, 16):
            raise ValueError("the piece must be at most 1/16 long, so that log(1/t) ≥ e on it")
        self.formula, self.values, self.point, self.side, self.delta = formula, dict(values), point, side, delta
        self.s = Scalars()
        ar = self.s.ar
        self.delta_iv = self.s.num(delta)
        self.log_delta = ar.neg(self.s.log(self.delta_iv))  # L_δ = log(1/δ) ≥ 2
        self.region = ar.hull(self.s.num(point), self.s.num(point + side * delta))
        self._memo: dict[Node, Envelope[Power]] = {}
        # what does not depend on δ (Taylor coefficients at the point, zero proofs) is shared between the
        # rounds that shrink δ, through a dict the caller keeps
        self._at_point: dict[Any, list[Any]] = {} if at_point is None else at_point

    # -- the power algebra -------------------------------------------------------------------------
    def sup(self, d: Fraction, k: Fraction) -> Interval:
        """An enclosure of a bound on sup over 0 < t ≤ δ of t^d·L^k (d ≥ 0; k ≤ 0 when d = 0)."""
        s, ar = self.s, self.s.ar
        if d < 0 or (d == 0 and k > 0):
            raise Unsupported("an envelope that grows towards the point cannot be compared")
        at_delta = ar.mul(s.power(self.delta_iv, d), s.power(self.log_delta, k))
        if k <= 0:
            return at_delta  # both factors increase with t
        turn = k / d  # t^d·L^k increases while L > k/d and peaks at L = k/d with (k/(d·e))^k
        if s.low(self.log_delta) >= turn:
            return at_delta
        return s.power(ar.div(s.num(turn), ar.constant("e")), k)

    def _normal(self, k: Interval, p: Fraction, q: Fraction, upper: bool) -> Power:
        """The same bound with a whole-number log power (L ≥ L_δ ≥ 1 on the piece)."""
        s, ar = self.s, self.s.ar
        if q == int(q):
            return Power(k, p, int(q))
        if upper:
            if q > 0:
                return Power(k, p, ceil(q))
            return Power(ar.mul(k, s.power(self.log_delta, q)), p, 0)
        if q > 0:
            whole = floor(q)
            return Power(ar.mul(k, s.power(self.log_delta, q - whole)), p, whole)
        return self._absorb(k, p, q)

    def _absorb(self, k: Interval, p: Fraction, q: Fraction) -> Power:
        """L^q ≥ (e·ε)^(−q)·t^(−q·ε) for q < 0, since t^ε·L ≤ 1/(e·ε) on (0, 1)."""
        s, ar = self.s, self.s.ar
        factor = s.power(ar.mul(ar.constant("e"), s.num(EPSILON)), -q)
        return Power(ar.mul(k, factor), p - q * EPSILON, 0)

    def lower_fold(self, power: Power) -> Power:
        """A lower envelope with q ≤ 0 folded or absorbed to q = 0 (only the power of t matters below)."""
        if power.q > 0:
            return Power(self.s.ar.mul(power.k, self.s.power(self.log_delta, Fraction(power.q))), power.p, 0)
        if power.q < 0:
            return self._absorb(power.k, power.p, Fraction(power.q))
        return power

    def times(self, a: Power, b: Power) -> Power:
        return Power(self.s.ar.mul(a.k, b.k), a.p + b.p, a.q + b.q)

    def raised(self, a: Power, r: Fraction, upper: bool) -> Power:
        """(k·t^p·L^q)^r, normalised for use as an upper (or lower) envelope."""
        return self._normal(self.s.power(a.k, r), a.p * r, a.q * r, upper)

    def plus(self, a: Power, b: Power) -> Power:
        """An upper envelope of the sum of two upper envelopes."""
        ar = self.s.ar
        p, q = min(a.p, b.p), max(a.q, b.q)
        k = ar.add(ar.mul(a.k, self.sup(a.p - p, Fraction(a.q - q))), ar.mul(b.k, self.sup(b.p - p, Fraction(b.q - q))))
        return Power(k, p, q)

    def scaled(self, a: Power, factor: Interval) -> Power:
        return Power(self.s.ar.mul(a.k, factor), a.p, a.q)

    def bound(self, a: Power) -> Interval:
        """sup over the piece of k·t^p·L^q (finite only for a bounded envelope)."""
        return self.s.ar.mul(a.k, self.sup(a.p, Fraction(a.q)))

    def infimum(self, a: Power) -> Interval:
        """inf over the piece of k·t^p·L^q for p ≤ 0 and q ≥ 0 (then it decreases in t: the value at δ)."""
        ar, s = self.s.ar, self.s
        if a.p > 0 or a.q < 0:
            raise Unsupported("no useful infimum")
        return ar.mul(a.k, ar.mul(s.power(self.delta_iv, a.p), s.power(self.log_delta, Fraction(a.q))))

    # -- rules ---------------------------------------------------------------------------------------
    def span(self) -> tuple[Fraction | None, Fraction | None]:
        ends = sorted((self.point, self.point + self.side * self.delta))
        return ends[0], ends[1]

    def envelope(self, node: Node) -> Envelope[Power]:
        cached = self._memo.get(node)
        if cached is None:
            cached = self._regular(node)
            if cached is None or (cached.lower is None and isinstance(node, (Binary, Call, Negate))):
                try:  # a root or power regular at the point says little there (sqrt(x) at 0): try the rules
                    ruled = self.rule(node)
                except Unsupported:
                    if cached is None:
                        raise
                else:
                    if cached is None or ruled.lower is not None:
                        cached = ruled
            self._memo[node] = cached
        return cached

    def _program(self, node: Node, ar: object) -> Program[Any]:
        return Program(Formula(node, self.formula.variable, self.formula.parameters), ar, self.values)  # type: ignore[arg-type]

    def _regular(self, node: Node) -> Envelope[Power] | None:
        """Both envelopes from the Taylor expansion at the point, where the subexpression is defined on the
        closed piece; None where it is not (the rules take over)."""
        s, ar = self.s, self.s.ar
        if not _has_variable(node):
            try:
                value = self._program(node, ar).value(ar.zero)
            except ArithmeticFault:
                raise Unsupported("a constant subexpression cannot be evaluated") from None
            return self._from_taylor([], value, 0)
        try:
            program = self._program(node, ar)
            remainder = program.taylor(self.region, ORDER)
        except ArithmeticFault:
            return None
        at_point = self._at_point.get(node)
        if at_point is None:
            try:
                at_point = program.taylor(s.num(self.point), ORDER - 1)
            except ArithmeticFault:
                return None
            self._at_point[node] = at_point
        m = min(len(remainder) - 1, len(at_point))
        return self._from_taylor(at_point[:m], remainder[m], m, node)

    def _proved_zero(self, node: Node | None, j: int, coefficient: Interval) -> bool:
        s = self.s
        if s.low(coefficient) == 0 == s.high(coefficient):
            return True
        if node is None or not (s.low(coefficient) <= 0 <= s.high(coefficient)):
            return False
        key = ("exact", node)
        exact = self._at_point.get(key)
        if exact is None:
            try:
                exact = self._program(node, ExactArithmetic()).taylor(self.point, ORDER - 1)
            except (Unsupported, ArithmeticFault, ZeroDivisionError):
                exact = []
            self._at_point[key] = exact
        return len(exact) > j and exact[j] == 0

    def _from_taylor(
        self, coefficients: list[Interval], remainder: Interval, m: int, node: Node | None = None
    ) -> Envelope[Power]:
        """g(a + s·t) = Σ_{j<m} g_j·(s·t)^j + R·(s·t)^m with R over the piece."""
        s, ar = self.s, self.s.ar
        lead = 0
        while lead < m and self._proved_zero(node, lead, coefficients[lead]):
            lead += 1
        terms = [*coefficients[lead:], remainder]
        leading = terms[0] if lead < m else remainder
        rest = ar.zero
        for offset, term in enumerate(terms[1:], start=1):
            rest = ar.add(rest, ar.mul(s.magnitude(term), s.power(self.delta_iv, Fraction(offset))))
        size = s.magnitude(leading)
        upper = Power(ar.add(size, rest), Fraction(lead), 0)
        low = ar.sub(size, rest)
        if not s.positive(low) or ar.sign(leading) == 0:
            return Envelope(upper, None, 0)
        direction = ar.sign(leading) * (self.side if lead % 2 else 1)
        return Envelope(upper, Power(low, Fraction(lead), 0), direction)

    def call(self, node: Call) -> Envelope[Power]:
        from ._functions import near_call

        return near_call(self, node)

    # -- what the shared rules ask of this kind of piece ------------------------------------------------
    def constant(self, k: Interval) -> Power:
        return Power(k, Fraction(0), 0)

    def ratio(self, small: Power, big: Power) -> Interval:
        return self.sup(small.p - big.p, Fraction(small.q - big.q))

    def strongest(self, lowers: list[Power]) -> Power:
        return min(lowers, key=lambda e: e.p)  # the smallest power of t is the largest next to the point

    def small_bound(self, upper: Power | None) -> Interval | None:
        if upper is not None and (upper.p > 0 or (upper.p == 0 and upper.q <= 0)):
            return self.bound(upper)
        return None

    def least(self, lower: Power | None) -> Interval | None:
        if lower is None:
            return None
        folded = self.lower_fold(lower)
        return self.infimum(folded) if folded.p <= 0 else None
