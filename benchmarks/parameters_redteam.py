"""Red-team run for parameters known within bounds: random formulas and boxes, every corner and random
interior points checked against flint at 200 bits.

    python -m benchmarks.parameters_redteam --minutes 20 --seed 1     # the documented long run
    python -m benchmarks.parameters_redteam --cases 4 --seed 3        # a short smoke run (the tests run one)

Each case takes a random integrand g from the general red-team generator (``benchmarks.redteam``) and builds
k·g(x) + exp(−w·x²) with k and w known within random bounds. Half the cases also move the upper limit by a
parameter d within bounds, and half ask for sensitivities, so that the mean-value form narrows the enclosure.
The reference is python-flint's ``acb.integral`` at 200 bits, at the box's corners and at two random interior
points. A **miss** is an enclosure disjoint from one of those balls. The run prints a table and exits 1 on any
miss or crash.
"""

from __future__ import annotations

import argparse
import itertools
import math
import random
import time
from fractions import Fraction
from typing import Any

import flint

from benchmarks.redteam import REFERENCE_BITS, random_case, verdict

A = flint.acb


def _q(value: Fraction) -> Any:
    return A(flint.fmpq(value.numerator, value.denominator))


def _ball(case: Any, k: Fraction, w: Fraction, d: Fraction) -> Any:
    old = flint.ctx.prec
    flint.ctx.prec = REFERENCE_BITS
    try:
        kq, wq = _q(k), _q(w)

        def f(x: Any, analytic: bool) -> Any:
            return kq * case.reference(x, analytic) + (-wq * x * x).exp()

        a, b = _q(Fraction(case.lower)), _q(Fraction(case.upper) + d)
        return A.integral(f, a, b).real
    finally:
        flint.ctx.prec = old


def _text(bounds: tuple[Fraction, Fraction]) -> str:
    return f"{bounds[0].numerator}/{bounds[0].denominator}..{bounds[1].numerator}/{bounds[1].denominator}"


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--minutes", type=float, default=None, help="run for this long")
    parser.add_argument("--cases", type=int, default=50, help="number of cases when --minutes is not given")
    parser.add_argument("--seed", type=int, default=1)
    parser.add_argument("--deadline", type=float, default=5.0, help="engine seconds per case")
    args = parser.parse_args(argv)

    from quadcert import integrate
    from quadcert.errors import QuadcertError

    rng = random.Random(args.seed)
    counts = {"cases": 0, "certified": 0, "not met": 0, "refused": 0, "points": 0, "misses": 0, "crashes": 0}
    codes: dict[str, int] = {}
    findings: list[str] = []
    stop_at = time.monotonic() + args.minutes * 60 if args.minutes else math.inf
    started = time.perf_counter()
    while counts["cases"] < args.cases if args.minutes is None else time.monotonic() < stop_at:
        case = random_case(rng)
        if Fraction(case.lower) >= 600:  # the underflow shapes: their scale leaves nothing for the box to move
            continue
        k0 = Fraction(rng.randrange(1, 50), 10)
        k = (k0, k0 + Fraction(rng.choice([1, 10, 100]), 1000))
        w0 = Fraction(rng.randrange(1, 30), 10)
        w = (w0, w0 + Fraction(rng.choice([1, 10, 100]), 1000))
        d = (Fraction(0), Fraction(rng.choice([1, 10, 100]), 1000)) if rng.random() < 0.5 else None
        parameters = {"k": _text(k), "w": _text(w)}
        upper = case.upper
        if d is not None:
            parameters["d"] = _text(d)
            upper = f"{case.upper} + d"
        sensitivities = rng.random() < 0.5
        counts["cases"] += 1
        label = f"k*({case.text}) + exp(-w*x^2) on [{case.lower}, {upper}] {parameters} tol {case.tolerance}"
        try:
            result = integrate(
                f"k*({case.text}) + exp(-w*x^2)",
                case.lower,
                upper,
                case.tolerance,
                parameters=parameters,
                deadline_seconds=args.deadline,
                sensitivities=sensitivities,
            )
        except QuadcertError as error:
            counts["refused"] += 1
            codes[error.code] = codes.get(error.code, 0) + 1
            continue
        except Exception as error:  # noqa: BLE001 - a crash is a finding; the run goes on
            counts["crashes"] += 1
            findings.append(f"CRASH {type(error).__name__}: {error} on {label}")
            continue
        counts["certified" if result.tolerance_met else "not met"] += 1
        spans = [k, w, d or (Fraction(0), Fraction(0))]
        points = list(itertools.product(*spans))
        for _ in range(2):
            points.append(tuple(lo + (hi - lo) * Fraction(rng.randrange(1001), 1000) for lo, hi in spans))
        for kk, ww, dd in points:
            ball = _ball(case, kk, ww, dd)
            counts["points"] += 1
            if verdict(result.enclosure, ball) == "miss":
                counts["misses"] += 1
                findings.append(f"MISS at k={kk}, w={ww}, d={dd}: {result.enclosure} vs {ball} on {label}")
    seconds = time.perf_counter() - started
    print(f"parameters red-team run: seed {args.seed}, reference flint acb.integral at {REFERENCE_BITS} bits")
    print("| " + " | ".join(counts) + " | seconds |")
    print("| " + " | ".join("---:" for _ in counts) + " | ---: |")
    print("| " + " | ".join(str(v) for v in counts.values()) + f" | {seconds:.0f} |")
    if codes:
        print("refusals: " + ", ".join(f"{k} {v}" for k, v in sorted(codes.items())))
    for line in findings[:20]:
        print(line)
    return 1 if counts["misses"] or counts["crashes"] else 0


if __name__ == "__main__":
    raise SystemExit(main())
