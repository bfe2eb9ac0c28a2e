"""The parameter derivative of every function the language has, against 60-digit numerical differentiation
(mpmath.diff), and its refusals."""

from __future__ import annotations

from fractions import Fraction

import mpmath
import pytest

from quadcert.arithmetic import MpmathArithmetic
from quadcert.derivatives import Program
from quadcert.formula import Formula, parse
from quadcert.formula._catalogue import CATALOGUE
from quadcert.formula._differentiate import NotDifferentiable, derivative

REF = mpmath.MPContext()
REF.dps = 60
_REFUSED = {"sign", "step", "atan2", "gamma", "lgamma"}
#: an argument inside every function's domain near k = 0.3, x = 0.7
_ARGUMENT = {"acosh": "1.5 + k*x", "log": "k*x + 1", "log10": "k*x + 1", "log2": "k*x + 1", "sqrt": "k*x + 1"}


def _value(text: str, k: Fraction) -> mpmath.mpf:
    ar = MpmathArithmetic(240)
    program = Program(parse(text, parameters=("k",)), ar, {"k": k})
    low, high = ar.bounds_exact(program.value(ar.exact(Fraction(7, 10))))
    return (REF.mpf(low.numerator) / low.denominator + REF.mpf(high.numerator) / high.denominator) / 2


@pytest.mark.parametrize("entry", [f for f in CATALOGUE if f.name not in _REFUSED], ids=lambda f: f.name)
def test_each_function_differentiates_like_a_difference_quotient(entry) -> None:
    argument = _ARGUMENT.get(entry.name, "k*x - 0.1")
    text = f"{entry.name}({', '.join([argument] + ['x + k'] * (entry.arguments[0] - 1))})"
    formula = parse(text, parameters=("k",))
    d = Formula(derivative(formula.root, "k"), "x", ("k",))
    ar = MpmathArithmetic(240)
    k = Fraction(3, 10)
    low, high = ar.bounds(Program(d, ar, {"k": k}).value(ar.exact(Fraction(7, 10))))
    # reference: 60-digit central difference of the formula's own high-precision values
    h = Fraction(1, 10**25)
    reference = (_value(text, k + h) - _value(text, k - h)) / (2 * REF.mpf(h))
    assert abs(REF.mpf((low + high) / 2) - reference) <= 1e-12 * (1 + abs(reference)), (text, low, high, reference)


@pytest.mark.parametrize(
    "text", ["sign(x - k)", "step(k*x)", "atan2(k, x)", "gamma(k + x)", "{x if x < k; 0 otherwise}"]
)
def test_jumps_that_move_and_missing_derivatives_are_refused(text) -> None:
    with pytest.raises(NotDifferentiable):
        derivative(parse(text, parameters=("k",)).root, "k")


def test_a_parameter_only_in_a_fixed_condition_branch_differentiates() -> None:
    root = parse("{k*x if x < 1; sign(x) otherwise}", parameters=("k",)).root
    assert Formula(derivative(root, "k"), "x").text == "{x if x < 1; 0 otherwise}"
