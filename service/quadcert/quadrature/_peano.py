"""Error constants of Simpson's rule on one panel of width H, from its Peano kernels.

For S(f) = H/6·(f(p) + 4f(m) + f(q)) the error E(f) = ∫f − S(f) vanishes on
cubics, so for k = 1..4 and f⁽ᵏ⁻¹⁾ absolutely continuous with f⁽ᵏ⁾ bounded,
E(f) = ∫ K_k(t) f⁽ᵏ⁾(t) dt with the kernel K_k(t) = E_x[(x − t)₊^(k−1)]/(k−1)!.
On the unit panel the kernels are (symmetric about 1/2, shown on [0, 1/2]):

    K_1 = 1/6 − t            ∫|K_1| = 5/36
    K_2 = t(t − 1/3)/2       ∫|K_2| = 1/81
    K_3 = t²(1 − 2t)/12      ∫|K_3| = 1/576
    K_4 = −t³(2 − 3t)/72     ∫ K_4  = −1/2880, one sign throughout

Scaling to width H multiplies by H^(k+1).  So |E| ≤ C_k·H^(k+1)·sup|f⁽ᵏ⁾|,
and, because K_4 never changes sign, E ∈ −H⁵/2880 · f⁗(panel) (the signed
form, much tighter when f⁗ varies little).  tests/quadrature/test_peano.py
checks each constant against a numerical integral of |K_k|.
"""

from __future__ import annotations

from fractions import Fraction

#: C_k with |E| <= C_k * H^(k+1) * sup|f^(k)|
ABSOLUTE = {1: Fraction(5, 36), 2: Fraction(1, 81), 3: Fraction(1, 576), 4: Fraction(1, 2880)}

#: E = SIGNED_4 * H^5 * f''''(xi)
SIGNED_4 = Fraction(-1, 2880)

FACTORIAL = {0: 1, 1: 1, 2: 2, 3: 6, 4: 24}

#: names reported for the bound that certified a panel
BOUND_NAMES = {4: "simpson-f4-signed", 3: "simpson-f3", 2: "simpson-f2", 1: "simpson-f1", 0: "range"}


def kernel(k: int, t: float) -> float:
    """K_k(t) on the unit panel, straight from its definition (for checks, not for certificates)."""
    from math import factorial

    def truncated_power(x: float) -> float:
        if x <= t:
            return 0.0
        return (x - t) ** (k - 1) if k > 1 else 1.0

    integral = (1 - t) ** k / k if t < 1 else 0.0
    simpson = (truncated_power(0.0) + 4 * truncated_power(0.5) + truncated_power(1.0)) / 6
    return (integral - simpson) / factorial(k - 1)
