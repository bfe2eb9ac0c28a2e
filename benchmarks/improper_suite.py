"""The improper section of the benchmark suite: singular and infinite integrals side by side.

    python -m benchmarks.suite --improper                      # tolerances 1e-6 1e-8 1e-10
    python -m benchmarks.suite --improper --tolerances 1e-8

For each case: our time, nodes and certified status (certified and containing the reference); scipy's quad
(time, claimed error, actual error); mpmath.quad's time; python-flint's acb.integral where it answers (it
takes finite limits and integrands analytic on them, so singular ends and tails get no number). The
references are 60-digit values of closed forms or handbook functions, as in tests/improper/test_catalogue.py.
"""

from __future__ import annotations

import math
import statistics
import time
from collections.abc import Callable
from functools import partial
from typing import Any

import flint
import mpmath
import numpy as np
import scipy.integrate
import scipy.special

from quadcert import integrate

MP = mpmath.MPContext()
MP.dps = 60
INF = math.inf

# name, formula, a, b, numpy f, mpmath f, exact value (closed form or handbook, see the catalogue test)
CASES: list[tuple[str, str, str, str, Callable[[Any], Any], Callable[[Any], Any], Any]] = [
    ("inverse sqrt", "1/sqrt(x)", "0", "1", lambda x: 1 / np.sqrt(x), lambda x: 1 / MP.sqrt(x), MP.mpf(2)),
    ("log", "log(x)", "0", "1", np.log, MP.log, MP.mpf(-1)),
    (
        "x^x",
        "x^x",
        "0",
        "1",
        lambda x: x**x,
        lambda x: x**x,
        MP.nsum(lambda n: (-1) ** (n + 1) * n ** (-n), [1, MP.inf]),
    ),
    (
        "x^-0.3 cos",
        "x^(-0.3)*cos(x)",
        "0",
        "1",
        lambda x: x**-0.3 * np.cos(x),
        lambda x: x ** MP.mpf("-0.3") * MP.cos(x),
        MP.quad(lambda x: x ** MP.mpf("-0.3") * MP.cos(x), [0, 1]),
    ),
    ("sinc", "sin(x)/x", "0", "1", lambda x: np.sinc(x / np.pi), lambda x: MP.sin(x) / x, MP.si(1)),
    (
        "1-cos over x^2",
        "(1 - cos(x))/x^2",
        "0",
        "1",
        lambda x: (1 - np.cos(x)) / x**2,
        lambda x: (1 - MP.cos(x)) / x**2,
        MP.si(1) - 1 + MP.cos(1),
    ),
    (
        "arcsine end",
        "1/sqrt(1 - x^2)",
        "0",
        "1",
        lambda x: 1 / np.sqrt(1 - x**2),
        lambda x: 1 / MP.sqrt(1 - x**2),
        MP.pi / 2,
    ),
    (
        "inside 0.3",
        "1/sqrt(abs(x - 0.3))",
        "0",
        "1",
        lambda x: 1 / np.sqrt(abs(x - 0.3)),
        lambda x: 1 / MP.sqrt(abs(x - MP.mpf("0.3"))),
        2 * MP.sqrt(MP.mpf("0.3")) + 2 * MP.sqrt(MP.mpf("0.7")),
    ),
    (
        "elliptic K(1/2)",
        "1/sqrt((1 - x^2)*(1 - 0.5*x^2))",
        "0",
        "1",
        lambda x: 1 / np.sqrt((1 - x**2) * (1 - 0.5 * x**2)),
        lambda x: 1 / MP.sqrt((1 - x**2) * (1 - x**2 / 2)),
        MP.ellipk(MP.mpf("0.5")),
    ),
    ("gauss line", "exp(-x^2)", "-inf", "inf", lambda x: np.exp(-(x**2)), lambda x: MP.exp(-(x**2)), MP.sqrt(MP.pi)),
    ("cauchy half", "1/(1 + x^2)", "0", "inf", lambda x: 1 / (1 + x**2), lambda x: 1 / (1 + x**2), MP.pi / 2),
    (
        "normal moment",
        "x^2*exp(-x^2/4.5)/(1.5*sqrt(2*pi))",
        "-inf",
        "inf",
        lambda x: x**2 * np.exp(-(x**2) / 4.5) / (1.5 * np.sqrt(2 * np.pi)),
        lambda x: x**2 * MP.exp(-(x**2) / MP.mpf("4.5")) / (MP.mpf("1.5") * MP.sqrt(2 * MP.pi)),
        MP.mpf("2.25"),
    ),
    (
        "normal tail",
        "exp(-x^2/2)/sqrt(2*pi)",
        "1.96",
        "inf",
        lambda x: np.exp(-(x**2) / 2) / np.sqrt(2 * np.pi),
        lambda x: MP.exp(-(x**2) / 2) / MP.sqrt(2 * MP.pi),
        MP.erfc(MP.mpf("1.96") / MP.sqrt(2)) / 2,
    ),
    (
        "gamma 1/2",
        "x^(-0.5)*exp(-x)",
        "0",
        "inf",
        lambda x: x**-0.5 * np.exp(-x),
        lambda x: x ** MP.mpf(-0.5) * MP.exp(-x),
        MP.sqrt(MP.pi),
    ),
    ("log over x^2", "log(x)/x^2", "1", "inf", lambda x: np.log(x) / x**2, lambda x: MP.log(x) / x**2, MP.mpf(1)),
    ("sech line", "1/cosh(x)", "-inf", "inf", lambda x: 1 / np.cosh(x), lambda x: MP.sech(x), MP.pi),
    ("exp -sqrt", "exp(-sqrt(x))", "0", "inf", lambda x: np.exp(-np.sqrt(x)), lambda x: MP.exp(-MP.sqrt(x)), MP.mpf(2)),
    ("bose", "x/(exp(x) - 1)", "0", "inf", lambda x: x / np.expm1(x), lambda x: x / MP.expm1(x), MP.pi**2 / 6),
    (
        "euler gamma",
        "exp(-x)*log(x)",
        "0",
        "inf",
        lambda x: np.exp(-x) * np.log(x),
        lambda x: MP.exp(-x) * MP.log(x),
        -MP.euler,
    ),
]


def _best(function: Callable[[], Any]) -> tuple[float, Any]:
    """Best of three runs, for every integrator alike (caches warm: nodes, compiled formulas)."""
    from .suite import _timed

    return _timed(function, 3)


def _limit(text: str) -> float:
    return {"inf": INF, "-inf": -INF}.get(text, float(text))


def _flint(formula: str, a: str, b: str, tolerance: float) -> tuple[float, float] | None:
    """flint's acb.integral where it takes the integral: finite limits only. Its integrand here is built from
    the same tree, non-analytic points flagged, so singular ends come back as an unbounded ball."""
    if "inf" in (a, b):
        return None
    from quadcert import parse
    from quadcert.formula import Binary, Call, Constant, Negate, Number, Variable

    root = parse(formula).root

    def value(node: Any, x: Any, analytic: bool) -> Any:
        if isinstance(node, Number):
            return flint.acb(flint.fmpq(node.value.numerator, node.value.denominator))
        if isinstance(node, Variable):
            return x
        if isinstance(node, Constant):
            return flint.acb.pi() if node.name == "pi" else flint.acb(1).exp()
        if isinstance(node, Negate):
            return -value(node.operand, x, analytic)
        if isinstance(node, Binary):
            left, right = value(node.left, x, analytic), value(node.right, x, analytic)
            if node.op == "^":
                return left.pow(right, analytic=analytic)
            return (
                {"+": left + right, "-": left - right, "*": left * right}.get(node.op)
                if node.op != "/"
                else left / right
            )
        assert isinstance(node, Call)
        arg = value(node.args[0], x, analytic)
        if node.function in ("sqrt", "log"):
            return getattr(arg, node.function)(analytic=analytic)
        if node.function == "abs":
            return arg.real_abs(analytic=analytic)
        return getattr(arg, node.function)()

    prec = max(24, math.ceil(-math.log2(tolerance)) + 4)
    with flint.ctx.workprec(prec):
        started = time.perf_counter()
        try:
            ball = flint.acb.integral(
                lambda x, analytic: value(root, x, analytic),
                flint.acb(flint.fmpq(*_ratio(a))),
                flint.acb(flint.fmpq(*_ratio(b))),
            ).real
        except Exception:  # noqa: BLE001 - no answer from flint is a result of the comparison
            return None
        seconds = time.perf_counter() - started
    width = float(2 * ball.rad()) if ball.is_finite() else math.inf
    return seconds, width


def _ratio(text: str) -> tuple[int, int]:
    from fractions import Fraction

    value = Fraction(text)
    return value.numerator, value.denominator


def _quad_pair(f: Any, a: float, b: float, tolerance: float) -> tuple[float, float]:
    """scipy's value and its own error estimate."""
    value, claimed = scipy.integrate.quad(f, a, b, epsabs=tolerance, epsrel=0, limit=2000)[:2]
    return value, claimed


def run(tolerances: list[float]) -> tuple[list[dict[str, Any]], dict[str, Any]]:
    rows = []
    for name, formula, a, b, numpy_f, mp_f, exact in CASES:
        for tolerance in tolerances:
            seconds, ours = _best(partial(integrate, formula, a, b, tolerance, deadline_seconds=60))
            contains = MP.mpf(ours.enclosure[0]) <= exact <= MP.mpf(ours.enclosure[1])
            with np.errstate(all="ignore"):
                quad_seconds, (value, claimed) = _best(partial(_quad_pair, numpy_f, _limit(a), _limit(b), tolerance))
            with MP.workdps(max(15, int(-math.log10(tolerance)) + 5)):
                mp_seconds, _ = _best(partial(MP.quad, mp_f, [MP.mpf(_limit(a)), MP.mpf(_limit(b))]))
            flint_answer = _flint(formula, a, b, tolerance)
            rows.append(
                {
                    "name": name,
                    "tolerance": tolerance,
                    "ours_seconds": seconds,
                    "ours_nodes": ours.nodes,
                    "certified": ours.tolerance_met and contains,
                    "contains": contains,
                    "quad_seconds": quad_seconds,
                    "quad_claimed": float(claimed),
                    "quad_actual": float(abs(MP.mpf(value) - exact)),
                    "mpmath_seconds": mp_seconds,
                    "flint": flint_answer,
                }
            )
    summary = {}
    for tolerance in tolerances:
        subset = [r for r in rows if r["tolerance"] == tolerance]
        summary[f"{tolerance:g}"] = {
            "cases": len(subset),
            "certified": sum(r["certified"] for r in subset),
            "false_certificates": sum(not r["contains"] for r in subset),
            "median_ours_seconds": statistics.median(r["ours_seconds"] for r in subset),
            "median_mpmath_seconds": statistics.median(r["mpmath_seconds"] for r in subset),
            "slowest_ours_seconds": max(r["ours_seconds"] for r in subset),
            "quad_wrong_beyond_tolerance": sum(r["quad_actual"] > tolerance for r in subset),
            "flint_answers": sum(1 for r in subset if r["flint"] and math.isfinite(r["flint"][1])),
        }
    return rows, summary


def markdown(rows: list[dict[str, Any]]) -> str:
    lines = [
        "| integrand | tol | ours s | nodes | certified | quad s | quad claimed | quad actual | mpmath s | flint |",
        "| --- | --- | ---: | ---: | --- | ---: | ---: | ---: | ---: | --- |",
    ]
    for r in rows:
        flint_text = (
            "–"
            if r["flint"] is None
            else (f"{r['flint'][0]:.3g} s, width {r['flint'][1]:.2g}" if math.isfinite(r["flint"][1]) else "no bound")
        )
        lines.append(
            f"| {r['name']} | {r['tolerance']:g} | {r['ours_seconds']:.3g} | {r['ours_nodes']} | "
            f"{'yes' if r['certified'] else 'NO'} | {r['quad_seconds']:.3g} | {r['quad_claimed']:.2g} | "
            f"{r['quad_actual']:.2g} | {r['mpmath_seconds']:.3g} | {flint_text} |"
        )
    return "\n".join(lines)
