"""The compiled float64 engine (quadrature/_native.c through _fast.py): its guarded layer, its
arithmetic, its Taylor recurrences and its certificates.

References named beside each check: python-flint's arb balls at 300 bits (rigorous), mpmath at
110 digits (tests.conftest.HP), exact rationals (Fraction), closed forms, and the reference
backend of this project only where the check is agreement between the two engines.
"""

from __future__ import annotations

import math
from fractions import Fraction

import flint
import pytest
from hypothesis import assume, given
from hypothesis import strategies as st

from quadcert.arithmetic import MpmathArithmetic
from quadcert.derivatives import Program
from quadcert.errors import NotCertifiable
from quadcert.formula import parse
from quadcert.quadrature import _fast, integrate
from tests.conftest import HP, encloses
from tests.quadrature import native_probe

pytestmark = pytest.mark.skipif(not _fast.AVAILABLE, reason="the C engine was not built")

DOMAINS = {  # float arguments drawn for each function
    "exp": (-700.0, 700.0),
    "log": (1e-300, 1e300),
    "log10": (1e-300, 1e300),
    "sqrt": (0.0, 1e300),
    "sin": (-1e6, 1e6),
    "cos": (-1e6, 1e6),
    "tan": (-1.5, 1.5),
    "atan": (-1e10, 1e10),
    "asin": (-1.0, 1.0),
    "acos": (-1.0, 1.0),
    "sinh": (-700.0, 700.0),
    "cosh": (-700.0, 700.0),
    "tanh": (-30.0, 30.0),
    "erf": (-8.0, 8.0),
    "abs": (-1e300, 1e300),
}
HP_FUNCTIONS = {
    "exp": HP.exp,
    "log": HP.log,
    "log10": HP.log10,
    "sqrt": HP.sqrt,
    "sin": HP.sin,
    "cos": HP.cos,
    "tan": HP.tan,
    "atan": HP.atan,
    "asin": HP.asin,
    "acos": HP.acos,
    "sinh": HP.sinh,
    "cosh": HP.cosh,
    "tanh": HP.tanh,
    "erf": HP.erf,
    "abs": abs,
}
FLINT_FUNCTIONS = {"exp", "log", "sqrt", "sin", "cos", "tan", "atan", "asin", "acos", "sinh", "cosh", "tanh", "erf"}


def _arb_fraction(value) -> Fraction:
    man, exp = (int(v) for v in value.man_exp())
    return Fraction(man) * Fraction(2) ** exp


def _flint_ball(name: str, x: float) -> tuple[Fraction, Fraction]:
    flint.ctx.prec = 300  # tests run in one thread; the engines never read flint's context here
    ball = getattr(flint.arb(x), name)()
    return _arb_fraction(ball.lower()), _arb_fraction(ball.upper())


def _meets(enclosure: tuple[float, float], ball: tuple[Fraction, Fraction]) -> bool:
    """The 300-bit ball holds the true value and is ~1e-90 wide, so a true enclosure must meet it
    (it may not contain all of it: cos's ball at a tiny argument pokes above 1, where ours stops)."""
    assert ball[1] - ball[0] < Fraction(1, 10**80) * max(1, abs(ball[0]))
    return Fraction(enclosure[0]) <= ball[1] and ball[0] <= Fraction(enclosure[1])


def _points_to_check(name: str, low: float, high: float) -> list:
    """Exact points of [low, high] whose values the range must contain: ends, middle, and for sin and
    cos every multiple of pi/2 inside (where the extrema are)."""
    points = [HP.mpf(low), HP.mpf(high), (HP.mpf(low) + HP.mpf(high)) / 2]
    if name in ("sin", "cos"):
        first = int(HP.ceil(HP.mpf(low) / (HP.pi / 2)))
        for k in range(first, first + 5):
            if k * HP.pi / 2 <= high:
                points.append(k * HP.pi / 2)
    return points


@st.composite
def argument_interval(draw, name: str):
    low, high = DOMAINS[name]
    values = st.floats(low, high, allow_nan=False, allow_infinity=False)
    a, b = sorted((draw(values), draw(values)))
    if draw(st.booleans()):  # short intervals, where rounding matters most
        b = min(high, a + abs(a) * 1e-9 + 1e-300)
    if draw(st.booleans()):
        b = a
    return a, b


@pytest.mark.parametrize("name", sorted(DOMAINS))
@given(data=st.data())
def test_guarded_functions_contain_110_digit_values(name: str, data) -> None:
    """Reference: mpmath at 110 digits at exact points of the interval."""
    a, b = data.draw(argument_interval(name))
    enclosure = native_probe.enclose_function(name, a, b)
    assume(enclosure is not None)  # tan near a pole, log of a subnormal rounded to 0 ...
    low, high = (HP.mpf(v) for v in enclosure)
    for point in _points_to_check(name, a, b):
        assert low <= HP_FUNCTIONS[name](point) <= high, (name, a, b, enclosure)


@pytest.mark.parametrize("name", sorted(FLINT_FUNCTIONS))
@given(data=st.data())
def test_guarded_functions_contain_flint_balls(name: str, data) -> None:
    """Reference: python-flint arb at 300 bits; its ball at each end must meet our range."""
    a, b = data.draw(argument_interval(name))
    enclosure = native_probe.enclose_function(name, a, b)
    assume(enclosure is not None)
    for x in (a, b):
        assert _meets(enclosure, _flint_ball(name, x)), (name, a, b, x, enclosure)


# inputs where a library exp or a quarter-turn count is easiest to get wrong: the exp inputs that
# mpmath's point exp misrounds (the report behind the project's guard), and the floats nearest to
# multiples of pi/2, with their neighbours
_HARD_EXP = [
    3893924827815215 / 1125899906842624,
    1381846513289487 / 70368744177664,
    -1 / 2**53,
    -172.0,
    690.0,
    -745.1,
    1e-300,
]
_NEAR_QUARTERS = [
    math.nextafter(float(k * HP.pi / 2), d)
    for k in (1, 2, 3, 4, 7, 1000, 123456, 10**6)
    for d in (-math.inf, 0.0, math.inf)
]


@pytest.mark.parametrize("x", _HARD_EXP)
def test_exp_at_known_hard_inputs(x: float) -> None:
    """Reference: python-flint arb at 300 bits."""
    enclosure = native_probe.enclose_function("exp", x, x)
    assert enclosure is not None and _meets(enclosure, _flint_ball("exp", x))


@pytest.mark.parametrize("name", ["sin", "cos", "tan"])
@pytest.mark.parametrize("x", _NEAR_QUARTERS)
def test_trigonometry_next_to_multiples_of_half_pi(name: str, x: float) -> None:
    """Reference: python-flint arb at 300 bits, for the point and a one-ulp interval around it."""
    for a, b in ((x, x), (math.nextafter(x, -math.inf), math.nextafter(x, math.inf))):
        enclosure = native_probe.enclose_function(name, a, b)
        if enclosure is None:
            assert name == "tan"  # a pole may lie inside: refusing is right
            continue
        for point in (a, b):
            assert _meets(enclosure, _flint_ball(name, point)), (name, a, b, enclosure)


def test_ranges_reach_interior_extrema() -> None:
    """From memory: sin peaks at pi/2 in [1, 2], cos bottoms out at pi in [3, 4], |sin| <= 1 always."""
    assert native_probe.enclose_function("sin", 1.0, 2.0)[1] == 1.0
    assert native_probe.enclose_function("cos", 3.0, 4.0)[0] == -1.0
    assert native_probe.enclose_function("sin", 1e300, 1e300) == (-1.0, 1.0)
    assert native_probe.enclose_function("tan", 1.0, 2.0) is None  # pi/2 inside
    assert native_probe.enclose_function("log", -1.0, 1.0) is None
    assert native_probe.enclose_function("sqrt", -1e-300, 1.0) is None


FINITE = st.floats(-1e150, 1e150, allow_nan=False, allow_infinity=False) | st.floats(-1e-300, 1e-300)


@given(st.sampled_from(["+", "-", "*", "/"]), FINITE, FINITE, FINITE, FINITE)
def test_arithmetic_contains_the_exact_rational_result(op: str, a1: float, a2: float, b1: float, b2: float) -> None:
    """Reference: exact rational arithmetic on the four corner values."""
    a, b = tuple(sorted((a1, a2))), tuple(sorted((b1, b2)))
    result = native_probe.operate(op, a, b)
    if op == "/" and b[0] <= 0 <= b[1]:
        assert result is None
        return
    assert result is not None
    exact = {"+": lambda x, y: x + y, "-": lambda x, y: x - y, "*": lambda x, y: x * y, "/": lambda x, y: x / y}[op]
    for x in a:
        for y in b:
            value = exact(Fraction(x), Fraction(y))
            assert result[0] == -math.inf or Fraction(result[0]) <= value, (op, a, b, result)
            assert result[1] == math.inf or value <= Fraction(result[1]), (op, a, b, result)


@given(FINITE, FINITE, st.integers(1, 40))
def test_powers_and_squares_contain_exact_values(a1: float, a2: float, n: int) -> None:
    """Reference: exact rational powers at the ends and, for an interval around 0, at 0."""
    a = tuple(sorted((a1, a2)))
    for op, power in (("sqr", 2), ("pow", n)):
        result = native_probe.operate(op, a, n=power if op == "pow" else 0)
        assert result is not None
        for x in (*a, *((0.0,) if a[0] <= 0 <= a[1] else ())):
            value = Fraction(x) ** power
            assert result[0] == -math.inf or Fraction(result[0]) <= value, (op, power, a, result)
            assert result[1] == math.inf or value <= Fraction(result[1]), (op, power, a, result)


def test_sums_that_are_exact_stay_points() -> None:
    """From memory: 1 + 2 = 3 and 0.5 + 0.25 = 0.75 exactly in float64, 0.1 + 0.2 is not."""
    assert native_probe.operate("+", (1.0, 1.0), (2.0, 2.0)) == (3.0, 3.0)
    assert native_probe.operate("+", (0.5, 0.5), (0.25, 0.25)) == (0.75, 0.75)
    low, high = native_probe.operate("+", (0.1, 0.1), (0.2, 0.2))
    assert low < high and Fraction(low) <= Fraction(0.1) + Fraction(0.2) <= Fraction(high)


# every instruction of the compiled language at least once
COVERAGE = [
    "sqrt(1 + x^2)",
    "exp(-x^2/2)",
    "log(2 + x)",
    "log10(3 + x)",
    "sin(3*x) + cos(x/2)",
    "tan(x/2)",
    "asin(x/2) - acos(x/3)",
    "atan(4*x)",
    "sinh(x) * cosh(x)",
    "tanh(2*x - 1)",
    "erf(x)",
    "abs(x - 0.3)",
    "min(x, 1 - x)",
    "max(sin(5*x), cos(5*x))",
    "(1 + x)^1.5",
    "x^-2 + x^7",
    "(2 + x)^(x/3)",
    "1/(1 + 25*x^2)",
    "-(x*x)",
    "2^x",
    "pi/2 + e*x",
]


def _program_taylor(formula: str, point: Fraction, order: int = 4) -> list[tuple[Fraction, Fraction]]:
    ar = MpmathArithmetic(200)
    series = Program(parse(formula), ar).taylor(ar.exact(point), order)
    return [ar.bounds_exact(c) for c in series]


@pytest.mark.parametrize("formula", COVERAGE)
@given(st.floats(0.2, 0.9), st.floats(0, 0.05), st.integers(0, 100), st.sampled_from([4, 10, 20]))
def test_taylor_enclosures_contain_the_precise_engines_point_values(
    formula: str, start: float, width: float, where: int, order: int
) -> None:
    """Reference: the reference backend's 200-bit Taylor coefficients at an exact point of the interval
    (a far tighter enclosure of the same true coefficients: the two must meet). Orders 10 and 20 are what
    the 5- and 10-point Gauss–Legendre panels read; their convolutions run in midpoint-radius form."""
    low, high = start, start + width
    compiled = _fast.compile_formula(parse(formula), {})
    assert compiled is not None
    ours = native_probe.taylor(compiled, low, high, order)
    assume(ours is not None)
    point = Fraction(low) + (Fraction(high) - Fraction(low)) * Fraction(where, 100)
    reference = _program_taylor(formula, point, order)
    for k in range(min(len(ours), len(reference))):
        lo, hi = Fraction(ours[k][0]), Fraction(ours[k][1])
        assert lo <= reference[k][1] and reference[k][0] <= hi, (formula, k, ours[k], reference[k])


EXTREME_SERIES = [  # coefficients near underflow, near overflow, and with exact zeros among them
    "1e-305*exp(3*x)",
    "1e-300*x^7*sin(x)",
    "1e250*sin(x)^3",
    "exp(-700*x)",
    "x^3",
    "1/(1e-3 + x^2)",
]


@pytest.mark.parametrize("formula", EXTREME_SERIES)
@given(st.floats(0.2, 0.9), st.floats(0, 0.01), st.integers(0, 100))
def test_order_20_series_at_the_extremes(formula: str, start: float, width: float, where: int) -> None:
    """Reference: the reference backend's 200-bit coefficients at an exact point, as above, at order 20."""
    low, high = start, start + width
    compiled = _fast.compile_formula(parse(formula), {})
    assert compiled is not None
    ours = native_probe.taylor(compiled, low, high, 20)
    assume(ours is not None)
    point = Fraction(low) + (Fraction(high) - Fraction(low)) * Fraction(where, 100)
    reference = _program_taylor(formula, point, 20)
    for k in range(min(len(ours), len(reference))):
        lo, hi = Fraction(ours[k][0]), Fraction(ours[k][1])
        assert lo <= reference[k][1] and reference[k][0] <= hi, (formula, k, ours[k], reference[k])


CLOSED_FORMS = [  # (formula, a, b, exact value at 110 digits), all from memory of elementary calculus
    ("exp(x)", "0", "1", HP.e - 1),
    ("4/(1 + x^2)", "0", "1", +HP.pi),
    ("1/x", "1", "2", HP.log(2)),
    ("sin(x)", "0", "pi", HP.mpf(2)),
    ("sqrt(x)", "0", "1", HP.mpf(2) / 3),
    ("abs(x - 0.3)", "-1", "1", HP.mpf("1.09")),
    ("x^1.5", "0", "1", HP.mpf("0.4")),
    ("cos(x)^2", "0", "pi/2", HP.pi / 4),
    ("1/(1 + 25*x^2)", "-1", "1", 2 * HP.atan(5) / 5),
    ("x*log(x + 1)", "0", "1", HP.mpf(1) / 4),
    ("exp(-x^2)", "0", "0.1", HP.sqrt(HP.pi) / 2 * HP.erf(HP.mpf("0.1"))),
]


@pytest.mark.parametrize("formula, a, b, exact", CLOSED_FORMS)
@pytest.mark.parametrize("tolerance", [1e-4, 1e-8, 1e-11])
def test_float64_engine_certificates_contain_closed_forms(formula: str, a: str, b: str, exact, tolerance) -> None:
    """Reference: the closed form beside each case, at 110 digits."""
    result = integrate(formula, a, b, tolerance)
    assert result.tolerance_met
    assert HP.mpf(result.enclosure[0]) <= exact <= HP.mpf(result.enclosure[1]), (formula, result.enclosure)
    reversed_result = integrate(formula, b, a, tolerance)
    assert HP.mpf(reversed_result.enclosure[0]) <= -exact <= HP.mpf(reversed_result.enclosure[1])


def test_the_float64_engine_is_the_one_that_answered() -> None:
    """Ordinary requests are answered in float64 (53 bits); these numbers are the engine's own."""
    result = integrate("exp(-x^2)", 0, 1, 1e-10, include_mesh=True)
    assert result.precision_bits == 53
    assert result.nodes == 2 * result.panels + 1
    assert len(result.mesh) == result.panels and sum(result.bounds_used.values()) == result.panels
    assert result.mesh[0].lower == 0 and result.mesh[-1].upper == 1
    # the pieces tile [0, 1] and their contributions add up inside the total (exact rationals)
    assert all(p.upper == q.lower for p, q in zip(result.mesh, result.mesh[1:]))
    assert sum(Fraction(p.contribution[0]) for p in result.mesh) >= Fraction(result.enclosure[0]) - Fraction(1, 10**12)


@pytest.mark.parametrize(
    "formula, a, b, tolerance",
    [
        ("sin(x)", "0", "pi", 1e-16),  # below float64's resolution (the value is 2)
        ("1/cosh(10*(x - 0.2))^2 + 1/cosh(1000*(x - 0.6))^6", "0", "1", 1e-6),  # beyond float64's range
        ("exp(x)", "0", "1", 1e-15),  # below float64's resolution
    ],
)
def test_hand_over_to_the_precise_engine(formula: str, a: str, b: str, tolerance: float) -> None:
    """Where float64 cannot certify, the arbitrary-precision engine answers; references are
    mpmath at 110 digits (quadrature with its own error estimate, far below the tolerances)."""
    result = integrate(formula, a, b, tolerance)
    assert result.precision_bits > 53
    f = {"sin(x)": HP.sin, "exp(x)": HP.exp}.get(formula) or (
        lambda x: HP.sech(10 * (x - HP.mpf("0.2"))) ** 2 + HP.sech(1000 * (x - HP.mpf("0.6"))) ** 6
    )
    cuts = (
        [HP.mpf(0), HP.mpf("0.2"), HP.mpf("0.6"), HP.mpf(1)]
        if "cosh" in formula
        else [HP.mpf(a), HP.pi if b == "pi" else HP.mpf(b)]
    )
    exact = HP.quad(f, cuts)
    assert HP.mpf(result.enclosure[0]) <= exact <= HP.mpf(result.enclosure[1])


def test_the_mesh_is_handed_over_where_float64_resolution_stops() -> None:
    """Where the compiled engine declines for float64's resolution, the precise engine starts from its mesh and
    ends on the same panels as from scratch (both bisect at the same exact midpoints of binary fractions).
    Reference for the value: ∫₀¹ eˣ dx = e − 1 (closed form, from memory), at 110 digits."""
    from fractions import Fraction

    from quadcert.arithmetic import MpmathArithmetic as Reference
    from quadcert.quadrature._simpson import Refiner

    compiled = _fast.compile_formula(parse("exp(x)"), {})
    assert compiled is not None
    zero, one = (Fraction(0),) * 2, (Fraction(1),) * 2
    declined = _fast.run(compiled, zero, one, 1e-15, None, 10**6, None, False, "simpson", 5)
    assert isinstance(declined, _fast.Declined) and declined.reason in ("resolution", "stalled")
    assert len(declined.cuts) > 10
    points = [x for x, _ in declined.cuts]
    assert points == sorted(points) and 0 < points[0] and points[-1] < 1 and len(set(points)) == len(points)
    ar = Reference(120)
    outcomes = []
    for cuts in ((), declined.cuts):
        refiner = Refiner(Program(parse("exp(x)"), ar), ar, max_nodes=10**6, deadline=None, points=5)
        outcomes.append(refiner.run(ar.exact(Fraction(0)), ar.exact(Fraction(1)), lambda lo, hi: 1e-15, cuts))
    scratch, handed = outcomes
    assert handed.stop_reason == scratch.stop_reason == "tolerance_met"
    assert len(handed.panels) == len(scratch.panels) and handed.nodes == scratch.nodes
    exact = HP.e - 1
    for outcome in outcomes:
        low, high = ar.bounds(outcome.enclosure)
        assert HP.mpf(low) <= exact <= HP.mpf(high)
    result = integrate("exp(x)", 0, 1, 1e-15)
    assert result.precision_bits > 53 and result.tolerance_met
    assert HP.mpf(result.enclosure[0]) <= exact <= HP.mpf(result.enclosure[1])


def test_handed_cuts_outside_the_limits_are_ignored() -> None:
    """A cut on or beyond a limit's enclosure never makes a panel: the run is the one from scratch. Reference:
    ∫₀¹ x² eˣ dx = e − 2 (integration by parts, from memory)."""
    from fractions import Fraction

    from quadcert.arithmetic import MpmathArithmetic as Reference
    from quadcert.quadrature._simpson import Refiner

    ar = Reference(80)
    outcomes = []
    for cuts in ((), ((Fraction(-1), 3), (Fraction(0), 3), (Fraction(1), 3), (Fraction(2), 3))):
        refiner = Refiner(Program(parse("x^2 * exp(x)"), ar), ar, max_nodes=10**5, deadline=None, points=5)
        outcomes.append(refiner.run(ar.exact(Fraction(0)), ar.exact(Fraction(1)), lambda lo, hi: 1e-10, cuts))
    assert outcomes[0].nodes == outcomes[1].nodes
    exact = HP.e - 2
    low, high = ar.bounds(outcomes[1].enclosure)
    assert HP.mpf(low) <= exact <= HP.mpf(high)


def test_a_handed_mesh_yields_to_the_node_budget_and_the_deadline() -> None:
    """The precise engine certifies handed panels only while the budget and the deadline allow; the rest of the
    interval is one panel, so the enclosure still covers it. Reference: ∫₀¹ eˣ dx = e − 1 (closed form)."""
    import time
    from fractions import Fraction

    from quadcert.arithmetic import MpmathArithmetic as Reference
    from quadcert.quadrature._simpson import Refiner

    ar = Reference(120)
    cuts = tuple((Fraction(i, 1000), 10) for i in range(1, 1000))
    exact = HP.e - 1
    for max_nodes, deadline in ((101, None), (10**6, time.monotonic() - 1)):
        refiner = Refiner(Program(parse("exp(x)"), ar), ar, max_nodes=max_nodes, deadline=deadline, points=5)
        outcome = refiner.run(ar.exact(Fraction(0)), ar.exact(Fraction(1)), lambda lo, hi: 1e-15, cuts)
        assert outcome.stop_reason in ("node_budget", "deadline")
        assert outcome.nodes <= max(max_nodes, 5) and len(outcome.panels) < 60
        low, high = ar.bounds(outcome.enclosure)
        assert HP.mpf(low) <= exact <= HP.mpf(high)


@pytest.mark.parametrize(
    "formula, a, b",
    [
        ("1/x", "-1", "1"),
        ("log(x)", "-1", "1"),
        ("sqrt(x - 2)", "0", "1"),
        ("1/(x - 0.3)^2", "0", "1"),
        ("1/(x - 0.5)^2", "0", "1"),
        ("tan(x)", "0", "2"),
        ("log(sin(10*x))", "0.1", "1"),
        ("sqrt(-x)", "0", "1"),
    ],
)
def test_refusals_are_the_precise_engines_own(formula: str, a: str, b: str) -> None:
    """The float64 engine never refuses: the refusal, code and location are those of the precise engine
    run alone (the project's reference behaviour)."""
    with pytest.raises(NotCertifiable) as direct:
        integrate(formula, a, b, 1e-8, max_nodes=2001, arithmetic=MpmathArithmetic)
    with pytest.raises(NotCertifiable) as info:
        integrate(formula, a, b, 1e-8, max_nodes=2001)
    assert info.value.code == direct.value.code
    assert info.value.location == direct.value.location


def test_node_budget_is_honoured_with_a_rigorous_partial_enclosure() -> None:
    """Reference: closed form of the integral of sin(50x)^2 over [0, 3]: 3/2 − sin(300)/200 (from memory)."""
    result = integrate("sin(50*x)^2", 0, 3, 1e-12, max_nodes=101)
    assert result.stop_reason == "node_budget" and not result.tolerance_met and result.nodes <= 101
    exact = HP.mpf(3) / 2 - HP.sin(300) / 200
    assert HP.mpf(result.enclosure[0]) <= exact <= HP.mpf(result.enclosure[1])


def test_malformed_programs_are_rejected_not_run() -> None:
    from quadcert.quadrature import _native

    bad = [b"", (3).to_bytes(4, "little") * 2, (99).to_bytes(4, "little") + bytes(4)]
    for code in bad:
        with pytest.raises(ValueError):
            _native.integrate(code, [], 4, 0.0, 0.0, 1.0, 1.0, 1e-8, 0.0, 0.0, 1001, False, 0, ())
    with pytest.raises(ValueError):  # a constant index out of range
        _native.integrate(
            (1).to_bytes(4, "little") + (5).to_bytes(4, "little"),
            [],
            4,
            0.0,
            0.0,
            1.0,
            1.0,
            1e-8,
            0.0,
            0.0,
            1001,
            False,
            0,
            (),
        )
    with pytest.raises(ValueError):  # an unknown rule, and a Gauss–Legendre table of the wrong size
        _native.integrate(b"\x00" * 8, [], 4, 0.0, 0.0, 1.0, 1.0, 1e-8, 0.0, 0.0, 1001, False, 7, ())
    with pytest.raises(ValueError):
        _native.integrate(b"\x00" * 8, [], 4, 0.0, 0.0, 1.0, 1.0, 1e-8, 0.0, 0.0, 1001, False, 1, ((0.0, 0.0),))


def test_this_machines_c_library_passes_the_self_test() -> None:
    """Reference: mpmath at 100 bits at the self-test's arguments (service/quadcert/quadrature/_fast.py)."""
    _fast.trusted.cache_clear()
    assert _fast.trusted()


def test_a_library_that_fails_the_self_test_is_not_used(monkeypatch) -> None:
    """A C library that misrounds sends every request to the arbitrary-precision engine."""
    real = _fast._native

    class Misrounding:
        def __getattr__(self, name):
            return getattr(real, name)

        @staticmethod
        def enclose(op, low, high):
            lo, hi = real.enclose(op, low, high)
            return (hi, hi + 1.0) if op == _fast.FUNCTION_CODES["exp"] else (lo, hi)  # exp rounded up wrongly

    monkeypatch.setattr(_fast, "_native", Misrounding())
    monkeypatch.setenv("QUADCERT_CACHE_DIR", "")  # the same build's remembered verdict would say trusted
    _fast.trusted.cache_clear()
    try:
        assert not _fast.trusted()
        assert integrate("exp(x)", 0, 1, 1e-8).precision_bits > 53
    finally:
        monkeypatch.undo()
        _fast.trusted.cache_clear()
    assert integrate("exp(x)", 0, 1, 1e-8).precision_bits == 53


def test_deadline_returns_the_rigorous_enclosure_so_far() -> None:
    """Reference: ∫₀³⁰ sin(50x)² dx = 15 − sin(3000)/200 (from memory of sin² = (1 − cos 2x)/2)."""
    result = integrate("sin(50*x)^2", 0, 30, 1e-11, max_nodes=2_000_001, deadline_seconds=0.02)
    assert result.stop_reason == "deadline" and not result.tolerance_met
    exact = 15 - HP.sin(3000) / 200
    assert HP.mpf(result.enclosure[0]) <= exact <= HP.mpf(result.enclosure[1])


def test_long_oscillating_mesh_stays_in_float64() -> None:
    """~280,000 nodes: an outward rounding per addition would cost more than the tolerance, and the
    early, flat phase of refinement is not a stall. Reference: 15 − sin(3000)/200 (from memory)."""
    result = integrate("sin(50*x)^2", 0, 30, 1e-11, max_nodes=2_000_001)
    assert result.precision_bits == 53 and result.tolerance_met
    exact = 15 - HP.sin(3000) / 200
    assert HP.mpf(result.enclosure[0]) <= exact <= HP.mpf(result.enclosure[1])


@pytest.mark.parametrize(
    "formula, a, b, exact",
    [
        ("x*exp(-x^2)", -5, 5, HP.mpf(0)),  # odd integrand: 0 (closed form)
        ("1/(1 + exp(-x))", -20, 20, HP.mpf(20)),  # σ(x) + σ(−x) = 1: half the length (closed form)
        ("exp(-x^2)", -5, 5, HP.sqrt(HP.pi) * HP.erf(5)),  # A&S 7.1.1, mpmath at 110 digits
    ],
)
def test_symmetric_intervals_certify_at_1e_12_in_the_compiled_engine(formula, a, b, exact) -> None:
    """Cut points are floats inside the midpoint's enclosure and an exact 0 stays exact, so panel widths carry
    no uncertainty from their ends and float64 reaches 1e-12 here without the precise engine."""
    result = integrate(formula, a, b, 1e-12)
    assert result.precision_bits == 53 and result.tolerance_met
    assert encloses(result.enclosure, exact)
