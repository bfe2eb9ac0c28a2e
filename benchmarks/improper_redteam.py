"""Red-team run for improper integrals: random singular and infinite integrals against 60-digit mpmath.

    python -m benchmarks.improper_redteam --minutes 30          # the documented long run
    python -m benchmarks.improper_redteam --cases 30 --seed 3   # a short run (the tests run one)

Each case is a product of envelope-friendly factors with random exponents, rates and frequencies, in one of
five classes: an algebraic or logarithmic singularity at the lower end, one at the upper end, one inside the
interval (at a decimal or a third), a tail [L, ∞), and both tails (−∞, ∞). The reference is mpmath's
tanh-sinh quadrature at 60 digits, split at the singular point, and checked by a second run at 45 digits
on other split points: their difference (plus 1e-40) is the reference's radius, and a case whose radius
is above 1e-25 is counted as unchecked. A **miss** is an enclosure that excludes the reference interval, a
false certificate; the run exits 1 on any miss or crash.
"""

from __future__ import annotations

import argparse
import itertools
import math
import random
import sys
import time
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

import mpmath

MP = mpmath.MPContext()


@dataclass
class Case:
    kind: str
    text: str
    lower: str
    upper: str
    tolerance: float
    function: Callable[[Any], Any]
    splits: list[Any]  # for the reference: the singular point, the limits (mpmath numbers or ±inf)
    power: float = 0.0  # the exponent α at the singular point (for the reference's substitution)


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
    slowest: float = 0.0
    refusal_codes: dict[str, int] = field(default_factory=dict)
    findings: list[str] = field(default_factory=list)


def _smooth(rng: random.Random) -> tuple[str, Callable[[Any], Any]]:
    """A bounded factor, smooth on the whole line."""
    choice = rng.randrange(5)
    w = rng.randint(1, 40) / 10
    if choice == 0:
        return f"cos({w}*x)", lambda x: MP.cos(MP.mpf(w) * x)
    if choice == 1:
        return f"1/(1 + {w}*x^2)", lambda x: 1 / (1 + MP.mpf(w) * x**2)
    if choice == 2:
        return f"exp(-{w}*x^2)", lambda x: MP.exp(-MP.mpf(w) * x**2)
    if choice == 3:
        return f"atan({w}*x + 1)", lambda x: MP.atan(MP.mpf(w) * x + 1)
    return f"(2 + sin({w}*x))", lambda x: 2 + MP.sin(MP.mpf(w) * x)


def _singular(rng: random.Random, u: str, du: Callable[[Any], Any], alpha: float) -> tuple[str, Callable[[Any], Any]]:
    """|u|^α, possibly times log|u|^m: integrable next to u = 0."""
    m = rng.choice([0, 0, 1, 2])
    text = f"abs({u})^({alpha})"
    logs = f"*log(abs({u}))^{m}" if m else ""

    def f(x: Any) -> Any:
        v = abs(du(x))
        return v ** MP.mpf(alpha) * (MP.log(v) ** m if m else 1)

    return text + logs, f


def random_case(rng: random.Random) -> Case:
    kind = rng.choice(["lower end", "upper end", "inside", "tail", "two tails"])
    tolerance = rng.choice([1e-6, 1e-8, 1e-10])
    smooth, g = _smooth(rng)
    alpha = rng.randint(-9, 15) / 10
    if kind == "lower end":
        top = rng.choice(["1", "2", "0.5"])
        s, f = _singular(rng, "x", lambda x: x, alpha)
        return Case(kind, f"{s}*{smooth}", "0", top, tolerance, lambda x: f(x) * g(x), [0, MP.mpf(top)], alpha)
    if kind == "upper end":
        s, f = _singular(rng, "1 - x", lambda x: 1 - x, alpha)
        return Case(kind, f"{s}*{smooth}", "0", "1", tolerance, lambda x: f(x) * g(x), [0, 1], alpha)
    if kind == "inside":
        c = rng.choice(["0.3", "0.25", "1/3", "0.7"])
        cm = MP.mpf(1) / 3 if c == "1/3" else MP.mpf(c)
        s, f = _singular(rng, f"x - {c}", lambda x: x - cm, alpha)
        return Case(kind, f"{s}*{smooth}", "0", "1", tolerance, lambda x: f(x) * g(x), [0, cm, 1], alpha)
    if kind == "tail":
        start = rng.choice(["0", "1", "2.5"])
        p = rng.randint(0, 30) / 10
        if rng.random() < 0.5:
            r = rng.randint(2, 30) / 10
            text = f"x^({p})*exp(-{r}*x)*{smooth}"
            return Case(
                kind,
                text,
                start,
                "inf",
                tolerance,
                lambda x: x ** MP.mpf(p) * MP.exp(-MP.mpf(r) * x) * g(x),
                [MP.mpf(start), MP.inf],
            )
        k = rng.randint(2, 3)
        text = f"x^({p})/(1 + x^2)^{k}*{smooth}"
        if p - 2 * k >= -1.2:
            text, p = f"1/(1 + x^2)^{k}*{smooth}", 0.0
        return Case(
            kind,
            text,
            start,
            "inf",
            tolerance,
            lambda x: x ** MP.mpf(p) / (1 + x**2) ** k * g(x),
            [MP.mpf(start), MP.inf],
        )
    r = rng.randint(2, 30) / 10
    mu = rng.randint(-20, 20) / 10
    text = f"exp(-{r}*(x - {mu})^2)*{smooth}"
    return Case(
        kind,
        text,
        "-inf",
        "inf",
        tolerance,
        lambda x: MP.exp(-MP.mpf(r) * (x - MP.mpf(mu)) ** 2) * g(x),
        [-MP.inf, MP.mpf(mu), MP.inf],
    )


def _pieces(case: Case, spacing: Any) -> Any:
    """The reference integral: singular points smoothed by u = s^k (k·(α + 1) ≥ 3), tails cut every
    ``spacing`` up to 40 units out (oscillating tails converge slowly for tanh-sinh), then summed."""
    f = case.function
    if case.kind in ("lower end", "upper end", "inside"):
        k = max(1, math.ceil(3 / (case.power + 1)))
        points = case.splits
        total = MP.mpf(0)
        for a, b in itertools.pairwise(points):
            singular_at_a = case.kind == "lower end" or (case.kind == "inside" and a != 0)
            if singular_at_a:
                total += MP.quad(lambda s, a=a: k * s ** (k - 1) * f(a + s**k), [0, (b - a) ** (MP.mpf(1) / k)])
            else:
                total += MP.quad(lambda s, b=b: k * s ** (k - 1) * f(b - s**k), [0, (b - a) ** (MP.mpf(1) / k)])
        return total
    finite = [p for p in case.splits if MP.isfinite(p)]
    start = finite[0] if case.kind == "tail" else finite[0] - 40
    stop = finite[0] + 40
    cuts = [start + spacing * j for j in range(int((stop - start) / spacing) + 1)]
    inner = MP.quad(f, cuts)
    if case.kind == "tail":
        return inner + MP.quad(f, [cuts[-1], MP.inf])
    return MP.quad(f, [-MP.inf, cuts[0]]) + inner + MP.quad(f, [cuts[-1], MP.inf])


def reference(case: Case) -> tuple[Any, Any]:
    """(value, radius) from two independent tanh-sinh runs (other precision, other cut points)."""
    with MP.workdps(60):
        first = _pieces(case, MP.mpf(2))
    with MP.workdps(45):
        second = _pieces(case, MP.mpf("1.3"))
    with MP.workdps(60):
        return first, abs(first - second) + MP.mpf("1e-40")


def _run(arithmetic: Any) -> Callable[[Case, float], Any]:
    from quadcert import integrate

    def run(case: Case, deadline: float) -> Any:
        return integrate(
            case.text, case.lower, case.upper, case.tolerance, deadline_seconds=deadline, arithmetic=arithmetic
        )

    return run


def record(tally: Tally, case: Case, outcome: Any, value: Any, radius: Any, seconds: float) -> None:
    tally.cases += 1
    tally.seconds += seconds
    tally.slowest = max(tally.slowest, seconds)
    if isinstance(outcome, tuple):
        tally.refused += 1
        tally.refusal_codes[outcome[1]] = tally.refusal_codes.get(outcome[1], 0) + 1
        return
    if radius > MP.mpf("1e-25") * max(1, abs(value)):
        tally.unchecked += 1
        return
    low, high = outcome.enclosure
    with MP.workdps(60):
        if MP.mpf(low) > value + radius or MP.mpf(high) < value - radius:
            tally.misses += 1
            tally.findings.append(
                f"MISS {case.text} on [{case.lower}, {case.upper}] tol {case.tolerance}: "
                f"{outcome.enclosure} excludes {MP.nstr(value, 20)}"
            )
            return
    if outcome.tolerance_met:
        tally.certified += 1
    else:
        tally.not_met += 1


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--minutes", type=float, default=None, help="run for this long")
    parser.add_argument("--cases", type=int, default=100, help="number of cases when --minutes is not given")
    parser.add_argument("--seed", type=int, default=1)
    parser.add_argument("--deadline", type=float, default=10.0, help="seconds per case and path")
    parser.add_argument("--paths", default="default,mpmath", help="default, mpmath, flint (comma-separated)")
    args = parser.parse_args(argv)

    from quadcert.arithmetic import FlintArithmetic, MpmathArithmetic, claim_flint_context
    from quadcert.errors import QuadcertError

    known = {"default": _run(None), "mpmath": _run(MpmathArithmetic), "flint": _run(FlintArithmetic)}
    if "flint" in args.paths:
        claim_flint_context()
    paths = {name: known[name] for name in args.paths.split(",")}
    tallies = {name: Tally() for name in paths}
    rng = random.Random(args.seed)
    stop_at = time.monotonic() + args.minutes * 60 if args.minutes else math.inf
    done = 0
    while done < args.cases if args.minutes is None else time.monotonic() < stop_at:
        case = random_case(rng)
        try:
            value, radius = reference(case)
        except Exception:  # noqa: BLE001 - no reference: the case cannot be checked
            value, radius = MP.mpf(0), MP.inf
        for name, run in paths.items():
            started = time.perf_counter()
            try:
                outcome: Any = run(case, args.deadline)
            except QuadcertError as error:
                outcome = ("refused", error.code)
            except Exception as error:  # noqa: BLE001 - a crash is a finding; the run goes on
                tallies[name].crashes += 1
                tallies[name].findings.append(
                    f"CRASH {type(error).__name__}: {error} on {case.text} [{case.lower}, {case.upper}]"
                )
                outcome = ("refused", "crash")
            record(tallies[name], case, outcome, value, radius, time.perf_counter() - started)
        done += 1
    print(f"improper red-team run: seed {args.seed}, {done} integrals, reference mpmath tanh-sinh at 60 digits")
    print("| path | cases | certified | not met | refused | misses | crashes | unchecked | seconds | slowest |")
    print("| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |")
    for name, t in tallies.items():
        print(
            f"| {name} | {t.cases} | {t.certified} | {t.not_met} | {t.refused} | {t.misses} | {t.crashes} | "
            f"{t.unchecked} | {t.seconds:.0f} | {t.slowest:.2f} |"
        )
    for name, t in tallies.items():
        if t.refusal_codes:
            print(f"{name} refusals: " + ", ".join(f"{k} {v}" for k, v in sorted(t.refusal_codes.items())))
    findings = [line for t in tallies.values() for line in t.findings]
    for line in findings[:20]:
        print("FINDING", line)
    return 1 if findings else 0


if __name__ == "__main__":
    sys.exit(main())
