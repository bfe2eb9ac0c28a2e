"""Red-team run: random formulas through every path, each certificate checked against flint at 200 bits.

    python -m benchmarks.redteam --minutes 30                  # the documented long run
    python -m benchmarks.redteam --cases 40 --seed 7           # a short smoke run (the tests run one)
    python -m benchmarks.redteam --minutes 20 --rules --no-service   # the panel rules' long run

Formulas are random sums and products of factors (exp, sin, cos, atan, tanh, erf, asinh, erfc, gamma, j0,
atanh, rational and shifted sqrt/log terms, a unit step and a piecewise definition with a jump) with random
rates, offsets and magnitudes, near underflow (1e-300, exp(-x) past 745, e^-1000 scales) and near overflow
(1e300, exp(x) up to 709) included, on random limits. Each case goes through:

* ``default``: ``integrate()`` as a library caller gets it (compiled engine, then the reference backend);
* ``mpmath`` and ``flint``: the arbitrary-precision engine alone on each backend;
* ``service``: POST /v1/integrals on an in-process app with two worker processes (exact JSON intake).

The reference is python-flint's ``acb.integral`` at 200 bits, a rigorous ball. A **miss** is a returned
enclosure disjoint from that ball: a false certificate. A ball too wide to decide is counted as unchecked, and an
exception other than a coded refusal as a crash. The run prints a table of counts per path and exits 1 on any miss
or crash.
"""

from __future__ import annotations

import argparse
import json
import math
import random
import sys
import time
from collections.abc import Callable
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any

import flint

A = flint.acb
REFERENCE_BITS = 200


@dataclass
class Case:
    text: str
    lower: str
    upper: str
    tolerance: str
    reference: Callable[[Any, bool], Any]


@dataclass
class Tally:
    cases: int = 0
    certified: int = 0
    not_met: int = 0
    refused: int = 0
    misses: int = 0
    crashes: int = 0
    unchecked: int = 0
    seconds: float = 0.0
    refusal_codes: dict[str, int] = field(default_factory=dict)
    miss_examples: list[str] = field(default_factory=list)


# -- random formulas, with the same function written for flint ------------------------------------


def _factor(rng: random.Random) -> tuple[str, Callable[[Any, bool], Any]]:
    """A factor as our formula text and as a flint function. Functions with branch cuts (sqrt, log) honour
    flint's ``analytic`` flag, without which acb.integral may integrate across a cut and return a wrong ball."""
    k = rng.choice([1, 2, 3, 5, 10, 50]) * rng.choice([1, -1])
    c = rng.choice([1, 2, 3, 7])
    kind = rng.randrange(18)
    if kind == 0:
        return f"exp({k}/10*x)", lambda x, _a: (A(k) / 10 * x).exp()
    if kind == 1:
        return f"sin({k}*x + {c})", lambda x, _a: (k * x + c).sin()
    if kind == 2:
        return f"cos({k}*x)", lambda x, _a: (k * x).cos()
    if kind == 3:
        return f"1/({c} + x^2)", lambda x, _a: 1 / (c + x * x)
    if kind == 4:
        return f"atan({k}*x)", lambda x, _a: (k * x).atan()
    if kind == 5:
        return f"tanh({k}/10*x)", lambda x, _a: (A(k) / 10 * x).tanh()
    if kind == 6:
        return f"erf({k}/10*x)", lambda x, _a: (A(k) / 10 * x).erf()
    if kind == 7:
        return f"sqrt({c} + x^2)", lambda x, analytic: (c + x * x).sqrt(analytic=analytic)
    if kind == 8:
        return f"log({c} + x^2)", lambda x, analytic: (c + x * x).log(analytic=analytic)
    if kind == 11:
        return f"asinh({k}/10*x)", lambda x, _a: (A(k) / 10 * x).asinh()
    if kind == 12:
        return f"erfc({k}/10*x)", lambda x, _a: (A(k) / 10 * x).erfc()
    if kind == 13:
        return f"gamma(1 + x^2/{50 * c})", lambda x, _a: (1 + x * x / (50 * c)).gamma()
    if kind == 14:
        return f"j0({k}/10*x)", lambda x, _a: (A(k) / 10 * x).bessel_j(0)
    if kind == 15:
        return f"atanh(x/{40 * c})", lambda x, _a: (x / (40 * c)).atanh()
    if kind == 16:  # a jump: flint's analytic flag makes acb.integral split where the step is undecided
        return f"step(x - {c})", lambda x, analytic: (x - c).real_heaviside(analytic=analytic)
    if kind == 17:
        return (
            f"{{1 if x < {c}; 2 + x otherwise}}",
            lambda x, analytic: 1 + (x - c).real_heaviside(analytic=analytic) * (1 + x),
        )
    if kind == 9:
        n = rng.randrange(1, 7)
        return f"x^{n}", lambda x, _a: x**n
    return f"{c}", lambda x, _a: A(c)


def _magnitude(rng: random.Random) -> tuple[str, Any]:
    """A scale factor: ordinary, or near the ends of the float64 range (and past them, as a product)."""
    choice = rng.randrange(8)
    if choice < 4:
        return "", None
    exponent = rng.choice([-320, -310, -300, -200, 200, 300, 306])
    if choice == 7:  # two literals whose product is far outside float64 but the value inside
        return f"1e{exponent - 400}*1e400*", A(10) ** exponent
    return f"1e{exponent}*", A(10) ** exponent


def random_case(rng: random.Random) -> Case:
    terms, parts = [], []
    for _ in range(rng.randrange(1, 3)):
        factors = [_factor(rng) for _ in range(rng.randrange(1, 4))]
        terms.append("*".join(text for text, _ in factors))
        parts.append([f for _, f in factors])
    scale_text, scale = _magnitude(rng)
    shape = rng.randrange(10)
    if shape == 0:  # deep underflow: e^-x far out, or a tiny difference of exponentials
        a = rng.choice([700, 745, 1000])
        lower, upper = str(a), str(a + rng.choice([1, 5, 10]))
        text = rng.choice(["exp(-x)", "exp(x)*exp(-2*x)", "exp(-x)*cos(x)"])
        body = {
            "exp(-x)": lambda x, _a: (-x).exp(),
            "exp(x)*exp(-2*x)": lambda x, _a: x.exp() * (-2 * x).exp(),
            "exp(-x)*cos(x)": lambda x, _a: (-x).exp() * x.cos(),
        }[text]
        return Case(text, lower, upper, _tolerance(rng), body)
    if shape == 1:  # near overflow
        lower, upper = "700", rng.choice(["705", "709", "709.7"])
        return Case("exp(x)", lower, upper, _tolerance(rng), lambda x, _: x.exp())
    a = Fraction(rng.randrange(-30, 30), rng.choice([1, 4, 10]))
    b = a + Fraction(rng.randrange(1, 40), rng.choice([1, 4, 10]))
    text = scale_text + ("(" + " + ".join(terms) + ")" if len(terms) > 1 else terms[0])

    def reference(x: Any, analytic: bool) -> Any:
        total = A(0)
        for factors in parts:
            product = A(1)
            for f in factors:
                product = product * f(x, analytic)
            total = total + product
        return total * scale if scale is not None else total

    return Case(text, _limit(a), _limit(b), _tolerance(rng), reference)


def _limit(value: Fraction) -> str:
    return str(value.numerator) if value.denominator == 1 else f"{value.numerator}/{value.denominator}"


def _tolerance(rng: random.Random) -> str:
    return rng.choice(["1e-4", "1e-6", "1e-8", "1e-8", "1e-10", "1e-12", "1e-14", "1e-60"])


def reference_ball(case: Case) -> Any:
    """flint's rigorous enclosure of the integral at 200 bits (the process is single-threaded here)."""
    old = flint.ctx.prec
    flint.ctx.prec = REFERENCE_BITS
    try:
        a, b = (A(flint.fmpq(*Fraction(t).as_integer_ratio())) for t in (_fraction(case.lower), _fraction(case.upper)))
        return A.integral(case.reference, a, b).real
    finally:
        flint.ctx.prec = old


def _fraction(text: str) -> Fraction:
    return Fraction(text)


def verdict(enclosure: tuple[float, float], ball: Any) -> str:
    """ "ok", "miss" (disjoint from the reference ball) or "unchecked" (ball not finite)."""
    if not ball.is_finite():
        return "unchecked"
    low, high = enclosure
    if flint.arb(high) < ball or flint.arb(low) > ball:
        return "miss"
    return "ok"


# -- the paths -----------------------------------------------------------------------------------


def _library(arithmetic: Any, rule: str = "simpson") -> Callable[[Case, float], Any]:
    from quadcert import integrate

    def run(case: Case, deadline: float) -> Any:
        return integrate(
            case.text,
            case.lower,
            case.upper,
            case.tolerance,
            deadline_seconds=deadline,
            arithmetic=arithmetic,
            rule=rule,
        )

    return run


def _flint_path() -> Callable[[Case, float], Any]:
    from quadcert.arithmetic import FlintArithmetic, claim_flint_context, release_flint_context

    inner = _library(FlintArithmetic)

    def run(case: Case, deadline: float) -> Any:
        claim_flint_context()
        try:
            return inner(case, deadline)
        finally:
            release_flint_context()

    return run


class _Service:
    def __init__(self) -> None:
        from fastapi.testclient import TestClient

        from quadcert.api import Settings, create_app

        settings = Settings(workers=2, queue_limit=64, request_deadline_seconds=4.0, log_level="ERROR")
        self.client = TestClient(create_app(settings), raise_server_exceptions=False)
        self.client.__enter__()

    def __call__(self, case: Case, deadline: float) -> Any:
        raw = (
            f'{{"integrand": {json.dumps(case.text)}, "lower_limit": {json.dumps(case.lower)}, '
            f'"upper_limit": {json.dumps(case.upper)}, "tolerance": {case.tolerance}}}'
        )
        response = self.client.post("/v1/integrals", content=raw, headers={"content-type": "application/json"})
        body = response.json()
        if response.status_code != 200:
            return ("refused", body.get("code", str(response.status_code)))
        return body

    def close(self) -> None:
        self.client.__exit__(None, None, None)


def record(tally: Tally, case: Case, outcome: Any, ball: Any, path: str) -> None:
    tally.cases += 1
    if isinstance(outcome, tuple):
        tally.refused += 1
        tally.refusal_codes[outcome[1]] = tally.refusal_codes.get(outcome[1], 0) + 1
        return
    if isinstance(outcome, dict):
        enclosure, met = (outcome["enclosure"][0], outcome["enclosure"][1]), outcome["tolerance_met"]
    else:
        enclosure, met = outcome.enclosure, outcome.tolerance_met
    tally.certified += met
    tally.not_met += not met
    result = verdict(enclosure, ball)
    if result == "miss":
        tally.misses += 1
        tally.miss_examples.append(
            f"{path}: {case.text} on [{case.lower}, {case.upper}] tol {case.tolerance}: {enclosure} vs {ball}"
        )
    elif result == "unchecked":
        tally.unchecked += 1


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--minutes", type=float, default=None, help="run for this long")
    parser.add_argument("--cases", type=int, default=200, help="number of cases when --minutes is not given")
    parser.add_argument("--seed", type=int, default=1)
    parser.add_argument("--deadline", type=float, default=3.0, help="seconds per case and path")
    parser.add_argument("--no-service", action="store_true", help="skip the HTTP path")
    parser.add_argument(
        "--rules", action="store_true", help="also run the gauss-legendre and auto panel rules (library paths)"
    )
    args = parser.parse_args(argv)

    from quadcert.arithmetic import MpmathArithmetic
    from quadcert.errors import QuadcertError

    rng = random.Random(args.seed)
    paths: dict[str, Callable[[Case, float], Any]] = {
        "default": _library(None),
        "mpmath": _library(MpmathArithmetic),
        "flint": _flint_path(),
    }
    if args.rules:
        paths["gauss-legendre"] = _library(None, "gauss-legendre")
        paths["auto"] = _library(None, "auto")
    service = None if args.no_service else _Service()
    if service is not None:
        paths["service"] = service
    tallies = {name: Tally() for name in paths}
    stop_at = time.monotonic() + args.minutes * 60 if args.minutes else math.inf
    done = 0
    try:
        while done < args.cases if args.minutes is None else time.monotonic() < stop_at:
            case = random_case(rng)
            try:
                ball = reference_ball(case)
            except Exception:  # noqa: BLE001 - a reference that cannot be computed leaves the case unchecked
                ball = flint.arb("+inf")
            for name, run in paths.items():
                started = time.perf_counter()
                try:
                    outcome = run(case, args.deadline)
                except QuadcertError as error:
                    outcome = ("refused", error.code)
                except Exception as error:  # noqa: BLE001 - a crash is a finding; the run goes on
                    tallies[name].crashes += 1
                    tallies[name].miss_examples.append(
                        f"{name}: CRASH {type(error).__name__}: {error} on "
                        f"{case.text} [{case.lower}, {case.upper}] tol {case.tolerance}"
                    )
                    outcome = ("refused", "crash")
                tallies[name].seconds += time.perf_counter() - started
                record(tallies[name], case, outcome, ball, name)
            done += 1
    finally:
        if service is not None:
            service.close()
    print(f"red-team run: seed {args.seed}, {done} formulas, reference flint acb.integral at {REFERENCE_BITS} bits")
    print("| path | cases | certified | not met | refused | misses | crashes | unchecked | seconds |")
    print("| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |")
    for name, t in tallies.items():
        print(
            f"| {name} | {t.cases} | {t.certified} | {t.not_met} | {t.refused} | {t.misses} | {t.crashes} | "
            f"{t.unchecked} | {t.seconds:.0f} |"
        )
    for name, t in tallies.items():
        if t.refusal_codes:
            print(f"{name} refusals: " + ", ".join(f"{k} {v}" for k, v in sorted(t.refusal_codes.items())))
    misses = [m for t in tallies.values() for m in t.miss_examples]
    for line in misses[:20]:
        print("FINDING", line)
    return 1 if misses else 0


if __name__ == "__main__":
    sys.exit(main())
