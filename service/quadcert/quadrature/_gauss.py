"""Gauss–Legendre panels with a rigorous remainder (docs/gauss-legendre.md).

On a panel [u, v] of width H, with midpoint m and the n-point rule on [−1, 1] (nodes tᵢ, weights wᵢ),

    ∫ f = H/2 · Σ wᵢ f(m + H/2 · tᵢ) + c_n · H^(2n+1) · f^(2n)(ξ),   c_n = (n!)⁴ / ((2n+1)·((2n)!)³),

for some ξ in the panel, when f is 2n times continuously differentiable there. The nodes are the roots of the
Legendre polynomial P_n. Each is enclosed between two dyadic rationals at which P_n, evaluated exactly in
rational arithmetic, has opposite signs; n disjoint such intervals hold all n roots. The weights
wᵢ = 2 / ((1 − t²)·P_n'(t)²) are enclosed by interval evaluation over the node's enclosure. No float table
enters.

>>> nodes = rule(2, 80)
>>> [round(float(lo), 15) for (lo, _hi), _w in nodes]  # ±1/√3
[-0.577350269189626, 0.577350269189626]
>>> remainder_constant(1), remainder_constant(2)  # the midpoint rule's 1/24; two points: 1/4320
(Fraction(1, 24), Fraction(1, 4320))
"""

from __future__ import annotations

import itertools
import math
from fractions import Fraction
from functools import lru_cache
from typing import Any

from ..arithmetic import Arithmetic, reference

#: the points per panel the service uses: 5 (degree 9, remainder in f^(10)) at looser tolerances, 10
#: (degree 19, remainder in f^(20)) at TIGHT_TOLERANCE and below, where the higher order saves more panels
#: than its longer Taylor series costs (measured: benchmarks/versus_flint.py; speed only, never rigor)
POINT_COUNTS = (5, 10)
TIGHT_TOLERANCE = 1e-8


def points_for(tolerance: float) -> int:
    """The points per panel for a request at this absolute tolerance.

    >>> points_for(1e-6), points_for(1e-8), points_for(1e-12)
    (5, 10, 10)
    """
    return POINT_COUNTS[1] if tolerance <= TIGHT_TOLERANCE else POINT_COUNTS[0]


def name(n: int) -> str:
    """The bound's name in meshes and ``bounds_used``."""
    return f"gauss-legendre-{n}"


Bounds = tuple[Fraction, Fraction]


def remainder_constant(n: int) -> Fraction:
    """c_n = (n!)⁴ / ((2n+1)·((2n)!)³), exactly."""
    return Fraction(math.factorial(n) ** 4, (2 * n + 1) * math.factorial(2 * n) ** 3)


def _legendre(n: int, x: Fraction) -> tuple[Fraction, Fraction]:
    """(P_n(x), P_{n−1}(x)) exactly, by Bonnet's recurrence (k+1)P_{k+1} = (2k+1)x·P_k − k·P_{k−1}."""
    previous, current = Fraction(1), x
    for k in range(1, n):
        previous, current = current, ((2 * k + 1) * x * current - k * previous) / (k + 1)
    return current, previous


def _sign(n: int, x: Fraction) -> int:
    value = _legendre(n, x)[0]
    return (value > 0) - (value < 0)


@lru_cache(maxsize=32)
def rule(n: int, bits: int) -> tuple[tuple[Bounds, Bounds], ...]:
    """The n nodes on [−1, 1], each as exact bounds at most 2^−bits apart, with exact bounds of its weight.

    Raises ArithmeticError if a root cannot be isolated (not expected for n ≤ 64; a proof step, not a guess).
    """
    # first guesses: the roots' classic approximations cos(π(k − 1/4)/(n + 1/2)), k = n..1, in ascending
    # order; Newton below makes them exact to the grid
    guesses = [-math.cos(math.pi * (i + 0.75) / (n + 0.5)) for i in range(n)]
    step = Fraction(1, 1 << (bits + 1))
    found: list[Bounds] = []
    for guess in guesses:
        x = Fraction(guess)
        for _ in range(64):  # Newton in exact rationals, rounded to a dyadic grid finer than the target width
            value, before = _legendre(n, x)
            slope = n * (x * value - before) / (x * x - 1)
            moved = x - value / slope
            moved = Fraction(round(moved / step)) * step
            if moved == x:
                break
            x = moved
        low, high = x - step, x + step
        if _sign(n, low) * _sign(n, high) >= 0:
            raise ArithmeticError(f"root {len(found) + 1} of P_{n} not isolated at {bits} bits")
        found.append((low, high))
    if any(a[1] >= b[0] for a, b in itertools.pairwise(found)) or len(found) != n:
        raise ArithmeticError(f"the roots of P_{n} are not separated at {bits} bits")
    ar = reference(bits + 32)
    weighted = []
    for low, high in found:
        node = ar.from_bounds(low, high)
        p_n, p_before = _interval_legendre(ar, n, node)
        one_minus = ar.sub(ar.one, ar.sqr(node))
        # P_n' = n(P_{n−1} − t·P_n)/(1 − t²)
        p_slope = ar.div(ar.scale(ar.sub(p_before, ar.mul(node, p_n)), Fraction(n)), one_minus)
        weight = ar.div(ar.exact(Fraction(2)), ar.mul(one_minus, ar.sqr(p_slope)))
        weighted.append(((low, high), ar.bounds_exact(weight)))
    return tuple(weighted)


def _interval_legendre(ar: Arithmetic[Any], n: int, t: Any) -> tuple[Any, Any]:
    previous, current = ar.one, t
    for k in range(1, n):
        nxt = ar.scale(
            ar.sub(ar.scale(ar.mul(t, current), Fraction(2 * k + 1)), ar.scale(previous, Fraction(k))),
            Fraction(1, k + 1),
        )
        previous, current = current, nxt
    return current, previous


def panel_sum(ar: Arithmetic[Any], value: Any, u: Any, v: Any, n: int) -> tuple[Any, int]:
    """H/2 · Σ wᵢ f(m + H/2 · tᵢ) over [u, v], enclosed; ``value`` encloses f over an interval. Also the
    number of evaluations it took."""
    half = ar.scale(ar.sub(v, u), Fraction(1, 2))
    middle = ar.scale(ar.add(u, v), Fraction(1, 2))
    total = ar.zero
    for (t_low, t_high), (w_low, w_high) in rule(n, max(ar.prec, 53) + 16):
        node = ar.add(middle, ar.mul(half, ar.from_bounds(t_low, t_high)))
        total = ar.add(total, ar.mul(ar.from_bounds(w_low, w_high), value(node)))
    return ar.mul(half, total), n


def remainder(ar: Arithmetic[Any], width: Any, top_coefficient: Any, n: int) -> Any:
    """c_n · H^(2n+1) · f^(2n)(panel), from the Taylor coefficient f^(2n)/(2n)! enclosed over the panel."""
    factor = remainder_constant(n) * math.factorial(2 * n)
    return ar.mul(ar.scale(ar.pow_int(width, 2 * n + 1), factor), top_coefficient)
