"""quadcert against python-flint's ``acb.integral``, held to the same absolute tolerance.

Fourteen integrands of the kinds practitioners bring (densities, oscillations, logistic and softplus curves,
a Bessel-type integral, a kink), none of them from our own suite. For each tolerance, flint gets
``abs_tol = tolerance`` and ``rel_tol = 2^-prec`` with a working precision of 64 bits or more, and the
``analytic`` flag wherever its integrand has a branch cut or a kink; the table says where flint's own error
bound misses the tolerance. Times are the best of three, in one process, engine time only (no HTTP).

    python -m benchmarks.versus_flint [--tolerances 1e-6 1e-10 1e-12] [--rules simpson gauss-legendre auto]

Per row: our time and flint's, the ratio, our node count, whether the compiled engine answered alone
("compiled", precision_bits 53) or the arbitrary-precision engine took over, and both error bounds. Per
tolerance: the median and geometric mean of the ratios, the three worst rows, and the share answered without
the arbitrary-precision engine.
"""

from __future__ import annotations

import argparse
import math
import statistics
from collections.abc import Callable
from dataclasses import dataclass
from functools import partial
from typing import Any

import flint
from flint import acb, arb

from benchmarks.suite import _timed
from quadcert import integrate
from quadcert.arithmetic import claim_flint_context

#: calls timed per row and integrator; the best counts (our first call also parses and compiles the formula)
REPEAT = 3


@dataclass(frozen=True)
class Row:
    name: str
    formula: str
    a: str
    b: str
    flint_f: Callable[[Any, bool], Any]
    note: str = ""


def _softplus(z: Any, analytic: bool) -> Any:
    return (1 + z.exp()).log(analytic=analytic)


def _lognormal(z: Any, analytic: bool) -> Any:
    lz = z.log(analytic=analytic)
    return (-(lz * lz) / 2).exp() / (z * (2 * arb.pi()).sqrt())


def _kink(z: Any, analytic: bool) -> Any:
    if analytic and z.real.contains(0.5):  # |x - 1/2| is not analytic at 1/2
        return acb("nan")
    w = z - acb(0.5)
    return w if w.real > 0 else -w


ROWS = [
    Row("gauss", "exp(-x^2)", "0", "3", lambda z, _: (-z * z).exp()),
    Row("odd gauss", "x*exp(-x^2)", "-5", "5", lambda z, _: z * (-z * z).exp(), "symmetric; exactly 0"),
    Row("logistic", "1/(1+exp(-x))", "-20", "20", lambda z, _: 1 / (1 + (-z).exp())),
    Row("softplus", "log(1+exp(x))", "-10", "10", _softplus),
    Row("lognormal", "exp(-log(x)^2/2)/(x*sqrt(2*pi))", "0.01", "10", _lognormal),
    Row("cos(10 sin x)", "cos(10*sin(x))", "0", "pi", lambda z, _: (10 * z.sin()).cos(), "π·J0(10)"),
    Row("damped sine", "sin(200*x)*exp(-x)", "0", "5", lambda z, _: (200 * z).sin() * (-z).exp()),
    Row("runge", "1/(1+25*x^2)", "-1", "1", lambda z, _: 1 / (1 + 25 * z * z)),
    Row("sech^2", "1/cosh(10*(x-0.2))^2", "-1", "1", lambda z, _: 1 / (10 * (z - acb(0.2))).cosh() ** 2),
    Row("rational", "x^3/(1+x^4)", "0", "4", lambda z, _: z**3 / (1 + z**4)),
    Row("atan bump", "atan(50*(x-0.3))", "0", "1", lambda z, _: (50 * (z - acb(0.3))).atan()),
    Row("sin^2", "sin(30*x)^2", "0", "2", lambda z, _: (30 * z).sin() ** 2),
    Row("planck", "x^3/(exp(x)-1)", "0.001", "20", lambda z, _: z**3 / (z.exp() - 1)),
    Row("kink", "abs(x-0.5)*exp(x)", "0", "1", lambda z, a: _kink(z, a) * z.exp(), "not analytic at 1/2"),
]


def _flint(row: Row, tolerance: float) -> tuple[float, float]:
    prec = max(64, math.ceil(-math.log2(tolerance)) + 16)
    old = flint.ctx.prec
    flint.ctx.prec = prec
    try:
        lower, upper = (acb(arb(_value(t))) for t in (row.a, row.b))
        seconds, value = _timed(
            lambda: acb.integral(row.flint_f, lower, upper, abs_tol=tolerance, rel_tol=2.0**-prec), REPEAT
        )
        return seconds, float(value.real.rad()) if value.real.is_finite() else math.inf
    finally:
        flint.ctx.prec = old


def _value(text: str) -> Any:
    return arb.pi() if text == "pi" else arb(text)


def run(tolerances: list[float], rules: tuple[str, ...] = ("simpson",)) -> list[dict[str, Any]]:
    claim_flint_context()  # this process computes on one thread: flint's context is the engine's to use
    for rule in rules:  # one-time costs (the compiled engine's self-test, the rule's enclosed nodes) go first
        integrate("x", 0, 1, 1e-6, rule=rule)
    rows = []
    for tolerance in tolerances:
        for row in ROWS:
            flint_seconds, flint_radius = _flint(row, tolerance)
            for rule in rules:
                rows.append(_ours(row, tolerance, rule, flint_seconds, flint_radius))
    return rows


def _ours(row: Row, tolerance: float, rule: str, flint_seconds: float, flint_radius: float) -> dict[str, Any]:
    ours_seconds, result = _timed(partial(integrate, row.formula, row.a, row.b, tolerance, rule=rule), REPEAT)
    return {
        "rule": rule,
        "tolerance": tolerance,
        "name": row.name,
        "ours": ours_seconds,
        "flint": flint_seconds,
        "ratio": ours_seconds / flint_seconds,
        "nodes": result.nodes,
        "met": result.tolerance_met,
        "compiled": result.precision_bits == 53,
        "bound": result.error_bound,
        "flint_bound": flint_radius,
        "note": row.note,
    }


def table(rows: list[dict[str, Any]]) -> str:
    lines = [
        "| rule | tol | integrand | ours ms | flint ms | ours/flint | nodes | engine | our bound | flint bound |",
        "| --- | --- | --- | ---: | ---: | ---: | ---: | --- | ---: | ---: |",
    ]
    for r in rows:
        flint_bound = f"{r['flint_bound']:.2g}" + (" (misses)" if r["flint_bound"] > r["tolerance"] else "")
        lines.append(
            f"| {r['rule']} | {r['tolerance']:g} | {r['name']} | {r['ours'] * 1e3:.2f} | {r['flint'] * 1e3:.2f} | "
            f"{r['ratio']:.2f} | {r['nodes']} | {'compiled' if r['compiled'] else 'precise'}"
            f"{'' if r['met'] else ' (not met)'} | {r['bound']:.2g} | {flint_bound} |"
        )
    lines += [
        "",
        "| rule | tol | median ours/flint | geometric mean | worst three | compiled alone | nodes |",
        "| --- | --- | ---: | ---: | --- | ---: | ---: |",
    ]
    for rule, tolerance in sorted({(r["rule"], r["tolerance"]) for r in rows}, key=lambda k: (k[0], -k[1])):
        group = [r for r in rows if r["tolerance"] == tolerance and r["rule"] == rule]
        ratios = [r["ratio"] for r in group]
        worst = ", ".join(f"{r['name']} {r['ratio']:.1f}×" for r in sorted(group, key=lambda r: -r["ratio"])[:3])
        compiled = sum(r["compiled"] for r in group)
        lines.append(
            f"| {rule} | {tolerance:g} | {statistics.median(ratios):.2f} | {statistics.geometric_mean(ratios):.2f} | "
            f"{worst} | {compiled}/{len(group)} | {sum(r['nodes'] for r in group)} |"
        )
    return "\n".join(lines)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--tolerances", type=float, nargs="+", default=[1e-6, 1e-10, 1e-12])
    parser.add_argument("--rules", nargs="+", default=["simpson"], choices=["simpson", "gauss-legendre", "auto"])
    args = parser.parse_args()
    print(table(run(args.tolerances, tuple(args.rules))))


if __name__ == "__main__":
    main()
