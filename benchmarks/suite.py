"""Side-by-side benchmark of the engine against reference integrators, over a fixed suite of integrands.

    python -m benchmarks.suite                          # all integrands, tolerances 1e-4 1e-8 1e-12
    python -m benchmarks.suite --tolerances 1e-8 --json benchmarks/out/suite.json --markdown benchmarks/out/suite.md
    python -m benchmarks.suite --quick                  # three integrands at 1e-6, for a smoke run
    python -m benchmarks.suite --backend mpmath         # the reference backend instead of flint's balls
    python -m benchmarks.suite --improper --tolerances 1e-8   # singular and infinite integrals (improper_suite)

For each integrand and tolerance it reports our time, nodes, panels and whether the tolerance was certified;
scipy.integrate.quad's time, evaluations, claimed error and actual error; mpmath.quad's time; python-flint's
acb.integral time and enclosure width; and a lower bound on the nodes any composite-Simpson certification by
the f'''' bound needs (a mesh equidistributing a densely sampled |f''''|). The exact value for the "actual
error" is flint's enclosure at 200 bits (rigorous ball arithmetic).
"""

from __future__ import annotations

import argparse
import json
import math
import statistics
import sys
import time
from collections.abc import Callable
from dataclasses import dataclass
from fractions import Fraction
from pathlib import Path
from typing import Any

import flint
import mpmath
import numpy as np
import scipy.integrate

from quadcert import integrate, parse
from quadcert.arithmetic import MpmathArithmetic
from quadcert.derivatives import Program

A = flint.acb


def _sech(z):  # acb has no sech of its own in every version; 1/cosh is exact enough for a ball
    return 1 / z.cosh()


@dataclass(frozen=True)
class Case:
    name: str
    kind: str
    formula: str
    a: Fraction
    b: Fraction
    numpy_f: Callable[[Any], Any]
    mp_f: Callable[[Any], Any]
    flint_f: Callable[[Any, bool], Any]


def _case(name, kind, formula, a, b, numpy_f, mp_f, flint_f) -> Case:
    return Case(name, kind, formula, Fraction(a), Fraction(b), numpy_f, mp_f, flint_f)


def _abs_flint(z, analytic):
    if analytic and z.real.contains(0):
        return A("nan")
    return z if z.real > 0 else -z


def _sqrt_flint(z, analytic):
    if analytic and z.real.contains(0):
        return A("nan")
    return z.sqrt()


SUITE: list[Case] = [
    _case("exp", "smooth", "exp(x)", 0, 2, np.exp, mpmath.exp, lambda z, _: z.exp()),
    _case(
        "gauss",
        "smooth",
        "exp(-x^2)",
        0,
        1,
        lambda x: np.exp(-x * x),
        lambda x: mpmath.exp(-x * x),
        lambda z, _: (-z * z).exp(),
    ),
    _case(
        "runge",
        "smooth",
        "1/(1+25*x^2)",
        -1,
        1,
        lambda x: 1 / (1 + 25 * x * x),
        lambda x: 1 / (1 + 25 * x * x),
        lambda z, _: 1 / (1 + 25 * z * z),
    ),
    _case(
        "arctan-pi",
        "smooth",
        "4/(1+x^2)",
        0,
        1,
        lambda x: 4 / (1 + x * x),
        lambda x: 4 / (1 + x * x),
        lambda z, _: 4 / (1 + z * z),
    ),
    _case("log1p", "smooth", "log(1+x)", 0, 1, np.log1p, lambda x: mpmath.log(1 + x), lambda z, _: (1 + z).log()),
    _case(
        "poly",
        "smooth",
        "x^7 - 3*x^3 + x",
        -1,
        2,
        lambda x: x**7 - 3 * x**3 + x,
        lambda x: x**7 - 3 * x**3 + x,
        lambda z, _: z**7 - 3 * z**3 + z,
    ),
    _case(
        "elliptic-K",
        "smooth",
        "1/sqrt(1 - 0.5*sin(x)^2)",
        0,
        Fraction(157079632679, 10**11),
        lambda x: 1 / np.sqrt(1 - 0.5 * np.sin(x) ** 2),
        lambda x: 1 / mpmath.sqrt(1 - mpmath.mpf(0.5) * mpmath.sin(x) ** 2),
        lambda z, _: 1 / (1 - A(1) / 2 * z.sin() ** 2).sqrt(),
    ),
    _case(
        "peak-100",
        "peaked",
        "1/(1 + 100*(x-0.3)^2)",
        0,
        1,
        lambda x: 1 / (1 + 100 * (x - 0.3) ** 2),
        lambda x: 1 / (1 + 100 * (x - mpmath.mpf("0.3")) ** 2),
        lambda z, _: 1 / (1 + 100 * (z - A("0.3")) ** 2),
    ),
    _case(
        "peak-1e4",
        "peaked",
        "1/(1e-4 + (x-0.5)^2)",
        0,
        1,
        lambda x: 1 / (1e-4 + (x - 0.5) ** 2),
        lambda x: 1 / (mpmath.mpf("1e-4") + (x - mpmath.mpf("0.5")) ** 2),
        lambda z, _: 1 / (A("1e-4") + (z - A("0.5")) ** 2),
    ),
    _case(
        "gauss-narrow",
        "peaked",
        "exp(-400*(x-0.7)^2)",
        0,
        1,
        lambda x: np.exp(-400 * (x - 0.7) ** 2),
        lambda x: mpmath.exp(-400 * (x - mpmath.mpf("0.7")) ** 2),
        lambda z, _: (-400 * (z - A("0.7")) ** 2).exp(),
    ),
    _case(
        "sech-benchmark",
        "peaked",
        "1/cosh(10*(x-0.2))^2 + 1/cosh(100*(x-0.4))^4 + 1/cosh(1000*(x-0.6))^6",
        0,
        1,
        lambda x: (
            1 / np.cosh(10 * (x - 0.2)) ** 2 + 1 / np.cosh(100 * (x - 0.4)) ** 4 + 1 / np.cosh(1000 * (x - 0.6)) ** 6
        ),
        lambda x: (
            mpmath.sech(10 * (x - mpmath.mpf("0.2"))) ** 2
            + mpmath.sech(100 * (x - mpmath.mpf("0.4"))) ** 4
            + mpmath.sech(1000 * (x - mpmath.mpf("0.6"))) ** 6
        ),
        lambda z, _: (
            _sech(10 * (z - A("0.2"))) ** 2 + _sech(100 * (z - A("0.4"))) ** 4 + _sech(1000 * (z - A("0.6"))) ** 6
        ),
    ),
    _case(
        "sin-10",
        "oscillatory",
        "sin(10*x)",
        0,
        3,
        lambda x: np.sin(10 * x),
        lambda x: mpmath.sin(10 * x),
        lambda z, _: (10 * z).sin(),
    ),
    _case(
        "sin-50-damped",
        "oscillatory",
        "sin(50*x)*exp(-x)",
        0,
        2,
        lambda x: np.sin(50 * x) * np.exp(-x),
        lambda x: mpmath.sin(50 * x) * mpmath.exp(-x),
        lambda z, _: (50 * z).sin() * (-z).exp(),
    ),
    _case(
        "cos-sq-30",
        "oscillatory",
        "cos(30*x)^2",
        0,
        1,
        lambda x: np.cos(30 * x) ** 2,
        lambda x: mpmath.cos(30 * x) ** 2,
        lambda z, _: (30 * z).cos() ** 2,
    ),
    _case(
        "bessel-j0",
        "oscillatory",
        "cos(20*sin(x))",
        0,
        3.141592653589793,
        lambda x: np.cos(20 * np.sin(x)),
        lambda x: mpmath.cos(20 * mpmath.sin(x)),
        lambda z, _: (20 * z.sin()).cos(),
    ),
    _case(
        "abs-kink",
        "kink",
        "abs(x - 0.3)",
        -1,
        1,
        lambda x: np.abs(x - 0.3),
        lambda x: abs(x - mpmath.mpf("0.3")),
        lambda z, an: _abs_flint(z - A("0.3"), an),
    ),
    _case(
        "max-kink",
        "kink",
        "max(sin(x), cos(x))",
        0,
        3,
        lambda x: np.maximum(np.sin(x), np.cos(x)),
        lambda x: max(mpmath.sin(x), mpmath.cos(x)),
        None,
    ),
    _case(
        "abs-sin",
        "kink",
        "abs(sin(5*x))",
        0,
        2,
        lambda x: np.abs(np.sin(5 * x)),
        lambda x: abs(mpmath.sin(5 * x)),
        None,
    ),
    _case("sqrt", "endpoint", "sqrt(x)", 0, 1, np.sqrt, mpmath.sqrt, _sqrt_flint),
    _case(
        "x^1.5",
        "endpoint",
        "x^1.5",
        0,
        1,
        lambda x: x**1.5,
        lambda x: x ** mpmath.mpf(1.5),
        lambda z, an: _sqrt_flint(z, an) * z,
    ),
    _case(
        "half-disc",
        "endpoint",
        "sqrt(1 - x^2)",
        -1,
        1,
        lambda x: np.sqrt(np.maximum(0, 1 - x * x)),
        lambda x: mpmath.sqrt(1 - x * x),
        None,
    ),
    _case(
        "x-log-x",
        "endpoint",
        "x*log(x)",
        1,
        2,
        lambda x: x * np.log(x),
        lambda x: x * mpmath.log(x),
        lambda z, _: z * z.log(),
    ),
]
QUICK = ["gauss", "sech-benchmark", "sqrt"]


def _timed(function: Callable[[], Any], repeat: int = 1) -> tuple[float, Any]:
    best, result = math.inf, None
    for _ in range(repeat):
        started = time.perf_counter()
        result = function()
        best = min(best, time.perf_counter() - started)
    return best, result


def _flint_integral(case: Case, prec: int):
    """flint's certified integral at its default relative goal 2^-prec (benchmark process, single-threaded)."""
    if case.flint_f is None:
        return None
    old = flint.ctx.prec
    flint.ctx.prec = prec
    try:
        return A.integral(
            case.flint_f,
            A(flint.fmpq(case.a.numerator, case.a.denominator)),
            A(flint.fmpq(case.b.numerator, case.b.denominator)),
        ).real
    finally:
        flint.ctx.prec = old


def exact_value(case: Case) -> mpmath.mpf:
    ball = _flint_integral(case, 200)
    if ball is not None and ball.is_finite() and ball.rad() < flint.arb("1e-30"):
        return mpmath.mpf(ball.mid().str(40, radius=False))
    with mpmath.workdps(40):  # benchmark-only reference where flint has no analytic form (kinks)
        cuts = {
            "max-kink": [0, mpmath.pi / 4, 3],
            "abs-sin": [0] + [k * mpmath.pi / 5 for k in range(1, 4)] + [2],
            "half-disc": [-1, 0, 1],
        }
        return mpmath.quad(case.mp_f, cuts.get(case.name, [mpmath.mpf(case.a), mpmath.mpf(case.b)]))


def simpson_lower_bound(case: Case, tolerance: float, samples: int = 4000) -> int | None:
    """Nodes of a mesh that equidistributes H⁵·|f⁗|/2880 (the fewest the absolute f⁗ bound could certify)."""
    ar = MpmathArithmetic(64)
    program = Program(parse(case.formula), ar)
    a, b = float(case.a), float(case.b)
    h = (b - a) / samples
    total = 0.0
    for i in range(samples):
        point = ar.exact(Fraction(a + (i + 0.5) * h))
        series = program.taylor(point, 4)
        if len(series) < 5:
            return None
        lo, hi = ar.bounds(series[4])
        total += (24 * max(abs(lo), abs(hi))) ** 0.2 * h
    panels = total**1.25 / (2880 * tolerance) ** 0.25
    return 2 * max(1, math.ceil(panels)) + 1


def run_case(case: Case, tolerance: float, exact: mpmath.mpf) -> dict[str, Any]:
    row: dict[str, Any] = {"name": case.name, "kind": case.kind, "tolerance": tolerance}
    lower, upper = str(case.a), str(case.b)

    def ours_once():
        return integrate(case.formula, lower, upper, tolerance, max_nodes=2_000_001, deadline_seconds=120)

    cold, ours = _timed(ours_once)
    t = cold
    if t < 1.0:  # best of 3 like the other integrators; no result is cached between calls, the parsed and
        t = min(t, _timed(ours_once, 2)[0])  # compiled formula are (flint's integrand is built before timing)
    row["ours_first_call_seconds"] = cold
    row.update(
        ours_seconds=t,
        ours_nodes=ours.nodes,
        ours_panels=ours.panels,
        ours_certified=ours.tolerance_met,
        ours_contains_exact=ours.enclosure[0] <= exact <= ours.enclosure[1],
        ours_error_bound=ours.error_bound,
    )
    a, b = float(case.a), float(case.b)
    t, (value, claimed, info) = _timed(
        lambda: scipy.integrate.quad(case.numpy_f, a, b, epsabs=tolerance, epsrel=0, limit=2000, full_output=1)[:3], 3
    )
    row.update(quad_seconds=t, quad_evals=info["neval"], quad_claimed=claimed, quad_actual=float(abs(value - exact)))
    with mpmath.workdps(max(15, int(-math.log10(tolerance)) + 5)):
        t, _ = _timed(lambda: mpmath.quad(case.mp_f, [mpmath.mpf(case.a), mpmath.mpf(case.b)]))
    row["mpmath_seconds"] = t
    if case.flint_f is not None:
        prec = max(24, math.ceil(-math.log2(tolerance)) + 4)  # flint's goal is relative: ~ the same digits
        t, ball = _timed(lambda: _flint_integral(case, prec), 3)
        row.update(flint_seconds=t, flint_width=float(2 * ball.rad()) if ball.is_finite() else math.inf)
    else:
        row.update(flint_seconds=None, flint_width=None)
    row["simpson_lower_bound_nodes"] = simpson_lower_bound(case, tolerance)
    return row


def markdown(rows: list[dict[str, Any]]) -> str:
    def f(value: Any, fmt: str = ".3g") -> str:
        if value is None:
            return "–"
        if isinstance(value, bool):
            return "yes" if value else "NO"
        return format(value, fmt) if isinstance(value, float) else str(value)

    lines = [
        (
            "| integrand | kind | tol | ours s | nodes | panels | certified | lower-bound nodes | nodes / bound | "
            "quad s | quad evals | quad claimed | quad actual | mpmath s | flint s | flint width | ours / flint |"
        ),
        (
            "| --- | --- | --- | ---: | ---: | ---: | --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: | "
            "---: | ---: |"
        ),
    ]
    for r in rows:
        bound = r["simpson_lower_bound_nodes"]
        ratio = r["ours_nodes"] / bound if bound else None
        speed = r["ours_seconds"] / r["flint_seconds"] if r.get("flint_seconds") else None
        lines.append(
            f"| {r['name']} | {r['kind']} | {r['tolerance']:g} | {f(r['ours_seconds'])} | {r['ours_nodes']} | "
            f"{r['ours_panels']} | {f(r['ours_certified'] and r['ours_contains_exact'])} | {f(bound)} | "
            f"{f(ratio, '.2f')} | {f(r['quad_seconds'])} | {r['quad_evals']} | {f(r['quad_claimed'])} | "
            f"{f(r['quad_actual'])} | {f(r['mpmath_seconds'])} | {f(r['flint_seconds'])} | "
            f"{f(r['flint_width'])} | {f(speed, '.1f')} |"
        )
    return "\n".join(lines)


def summarize(rows: list[dict[str, Any]]) -> dict[str, Any]:
    by_tol: dict[str, Any] = {}
    for tol in sorted({r["tolerance"] for r in rows}, reverse=True):
        subset = [r for r in rows if r["tolerance"] == tol]
        speed = [r["ours_seconds"] / r["flint_seconds"] for r in subset if r.get("flint_seconds")]
        nodes = [r["ours_nodes"] / r["simpson_lower_bound_nodes"] for r in subset if r["simpson_lower_bound_nodes"]]
        by_tol[f"{tol:g}"] = {
            "cases": len(subset),
            "certified": sum(r["ours_certified"] for r in subset),
            "false_certificates": sum(r["ours_certified"] and not r["ours_contains_exact"] for r in subset),
            "median_ours_seconds": statistics.median(r["ours_seconds"] for r in subset),
            "median_ours_over_flint": statistics.median(speed) if speed else None,
            "median_nodes_over_bound": statistics.median(nodes) if nodes else None,
            "quad_wrong_beyond_tolerance": sum(r["quad_actual"] > tol for r in subset),
        }
    return by_tol


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--tolerances", type=float, nargs="+", default=[1e-4, 1e-8, 1e-12])
    parser.add_argument("--only", nargs="*", help="integrand names")
    parser.add_argument("--quick", action="store_true")
    parser.add_argument(
        "--backend",
        choices=["flint", "mpmath"],
        default="flint",
        help="engine arithmetic: flint (what the service's workers and the CLI use) or mpmath",
    )
    parser.add_argument("--improper", action="store_true", help="the improper section instead of the main suite")
    parser.add_argument("--json", type=Path)
    parser.add_argument("--markdown", type=Path)
    args = parser.parse_args(argv)
    if args.backend == "flint":
        from quadcert.arithmetic import claim_flint_context

        claim_flint_context()  # this benchmark runs on one thread, like an engine worker
    if args.improper:
        from . import improper_suite

        rows_improper, summary_improper = improper_suite.run(
            args.tolerances if args.tolerances != [1e-4, 1e-8, 1e-12] else [1e-6, 1e-8, 1e-10]
        )
        print(improper_suite.markdown(rows_improper))
        print()
        print("summary:", json.dumps(summary_improper, indent=1))
        return 0
    names = QUICK if args.quick else args.only
    cases = [c for c in SUITE if not names or c.name in names]
    tolerances = [1e-6] if args.quick else args.tolerances
    rows = []
    for case in cases:
        exact = exact_value(case)
        for tolerance in tolerances:
            rows.append(run_case(case, tolerance, exact))
            print(
                f"{case.name} {tolerance:g}: {rows[-1]['ours_seconds']:.3f}s {rows[-1]['ours_nodes']} nodes",
                file=sys.stderr,
            )
    table = markdown(rows)
    summary = summarize(rows)
    print(table)
    print()
    print("summary:", json.dumps(summary, indent=1))
    if args.json:
        args.json.parent.mkdir(parents=True, exist_ok=True)
        args.json.write_text(json.dumps({"rows": rows, "summary": summary}, indent=1, default=str))
    if args.markdown:
        args.markdown.parent.mkdir(parents=True, exist_ok=True)
        args.markdown.write_text(table + "\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
