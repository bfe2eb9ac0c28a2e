"""Taylor coefficient enclosures contain the true derivatives; non-smooth points cut the series."""

from __future__ import annotations

from fractions import Fraction

import pytest
from hypothesis import given
from hypothesis import strategies as st

from quadcert.arithmetic import MpmathArithmetic
from quadcert.derivatives import Program
from quadcert.formula import parse
from tests.conftest import HP

FORMULAS = [
    "exp(x)",
    "sin(3*x) + cos(x)",
    "log(1 + x^2)",
    "sqrt(2 + x)",
    "atan(x)",
    "asin(x/2)",
    "acos(x/3)",
    "erf(x)",
    "tan(x/2)",
    "tanh(x)",
    "sinh(x)*cosh(x)",
    "x^5 - 3*x^2",
    "1/(1 + x^2)",
    "2^x",
    "x^3/(2 + sin(x))",
    "log10(3 + x)",
    "exp(-x^2)*cos(5*x)",
    "(1 + x^2)^0.5",
    "abs(x - 5)",
    "max(x, 3) + min(x, -4)",
]


@pytest.mark.parametrize("text", FORMULAS)
@given(st.integers(-800, 800), st.integers(1, 200), st.integers(0, 100))
def test_coefficients_enclose_derivatives_at_every_point(text: str, left: int, size: int, where: int) -> None:
    """Reference: mpmath's numerical differentiation at 110 digits."""
    ar = MpmathArithmetic(96)
    a, b = Fraction(left, 1000), Fraction(left + size, 1000)
    program = Program(parse(text), ar)
    series = program.taylor(ar.hull(ar.exact(a), ar.exact(b)), 4)
    assert len(series) == 5
    t = a + (b - a) * Fraction(where, 100)
    function = lambda v: _hp_eval(text, v)
    for k, coefficient in enumerate(series):
        exact = HP.diff(function, HP.mpf(t.numerator) / t.denominator, k) / HP.factorial(k)
        lo, hi = HP.make_mpf(coefficient.lo), HP.make_mpf(coefficient.hi)
        slack = HP.mpf(10) ** -60  # numerical differentiation error at 110 digits
        assert lo - slack <= exact <= hi + slack, (text, k, t)


def _hp_eval(text: str, v):
    names = {
        "exp": HP.exp,
        "sin": HP.sin,
        "cos": HP.cos,
        "log": HP.log,
        "sqrt": HP.sqrt,
        "atan": HP.atan,
        "asin": HP.asin,
        "acos": HP.acos,
        "erf": HP.erf,
        "tan": HP.tan,
        "tanh": HP.tanh,
        "sinh": HP.sinh,
        "cosh": HP.cosh,
        "log10": HP.log10,
        "abs": abs,
        "max": max,
        "min": min,
    }
    return _walk(parse(text).root, v, names)


def _walk(node, v, names):
    from quadcert.formula import Call, Constant, Negate, Number, Variable

    if isinstance(node, Number):
        return HP.mpf(node.value.numerator) / node.value.denominator
    if isinstance(node, Variable):
        return v
    if isinstance(node, Constant):
        return HP.pi if node.name == "pi" else HP.e
    if isinstance(node, Negate):
        return -_walk(node.operand, v, names)
    if isinstance(node, Call):
        return names[node.function](*[_walk(a, v, names) for a in node.args])
    left, right = _walk(node.left, v, names), _walk(node.right, v, names)
    return {
        "+": left + right,
        "-": left - right,
        "*": left * right,
        "/": left / right if right else HP.inf,
        "^": left**right,
    }[node.op]


@pytest.mark.parametrize(
    "text, length",
    [
        ("abs(x)", 2),
        ("max(x, 0)", 2),
        ("min(x, 0) + x^2", 2),
        ("sqrt(x)", 1),
        ("x^0.5", 1),
        ("exp(abs(x))", 2),
    ],
)
def test_non_smooth_points_give_no_information_above_an_order(text: str, length: int) -> None:
    ar = MpmathArithmetic(64)
    x = (
        ar.hull(ar.zero, ar.exact(Fraction(1, 2)))
        if "sqrt" in text or "0.5" in text
        else ar.hull(ar.exact(Fraction(-1, 2)), ar.exact(Fraction(1, 2)))
    )
    series = Program(parse(text), ar).taylor(x, 4)
    assert len(series) == length
    if length == 2:  # the a.e. slope of a Lipschitz kink is still enclosed
        lo, hi = ar.bounds(series[1])
        assert lo <= -1 + 1e-12 or lo <= 0 <= hi


def test_constant_formula_has_zero_derivatives() -> None:
    ar = MpmathArithmetic(64)
    series = Program(parse("pi/2 + e"), ar).taylor(ar.one, 4)
    assert [ar.bounds(c) for c in series[1:]] == [(0.0, 0.0)] * 4
