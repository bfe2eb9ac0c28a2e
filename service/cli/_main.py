"""Argument parsing and the five commands."""

from __future__ import annotations

import argparse
import dataclasses
import json
import sys
import time
from decimal import Decimal
from typing import Any, Sequence

import simplejson

from .. import __version__
from ..errors import ProblemError, QuadcertError
from ..quadrature import CheckResult, IntegralResult, Plan, bound_decimal, bound_text, check, integrate, plan, shown
from . import _junit, _table

EXIT_OK, EXIT_FAIL, EXIT_UNDECIDED = 0, 1, 2


def _parameters(pairs: list[str]) -> dict[str, str]:
    values = {}
    for pair in pairs:
        name, sep, value = pair.partition("=")
        if not sep:
            raise SystemExit(f"quadcert: --param takes NAME=VALUE, got {pair!r}")
        values[name.strip()] = value.strip()
    return values


def _common(parser: argparse.ArgumentParser, tolerance_required: bool = False) -> None:
    parser.add_argument("formula", help="integrand, e.g. 'exp(-x^2)'")
    parser.add_argument("lower", help="lower limit: a number or a constant expression such as pi/2")
    parser.add_argument("upper", help="upper limit")
    parser.add_argument("--tol", default=None if tolerance_required else "1e-8", required=tolerance_required,
                        help="absolute tolerance, read as the exact decimal typed"
                             + ("" if tolerance_required else " (default 1e-8)"))
    parser.add_argument("--var", default="x", help="name of the integration variable (default x)")
    parser.add_argument("--param", action="append", default=[], metavar="NAME=VALUE", help="a named parameter")
    parser.add_argument("--url", help="use the service at this URL instead of computing in-process")


def _engine_options(args: argparse.Namespace) -> dict[str, Any]:
    options: dict[str, Any] = {"variable": args.var}
    if args.param:
        options["parameters"] = _parameters(args.param)
    for name in ("relative_tolerance", "max_nodes"):
        if getattr(args, name, None) is not None:
            options[name] = getattr(args, name)
    return options


def _client(url: str):  # noqa: ANN202 - imported lazily so offline use never needs a network stack
    from ..client import Client

    return Client(url)


def _print_problem(error: QuadcertError) -> None:
    column = getattr(error, "column", None)
    where = f" [column {column}]" if column and "(at column" not in error.message else ""
    print(f"quadcert: {error.code}: {error.message}{where}", file=sys.stderr)


# -- commands ---------------------------------------------------------------------------------

def _integrate(args: argparse.Namespace) -> int:
    options = _engine_options(args)
    if args.mesh:
        options["include_mesh"] = True
    if args.url:
        with _client(args.url) as client:
            result = client.integrate(args.formula, args.lower, args.upper, args.tol, **options)
    else:
        result = integrate(args.formula, args.lower, args.upper, args.tol, **options)
    if args.json:
        print(_json(_outward(dataclasses.asdict(result))))
    else:
        print(_describe(result))
    return EXIT_OK if result.tolerance_met else EXIT_UNDECIDED


def _describe(result: IntegralResult) -> str:
    status = "certified" if result.tolerance_met else f"NOT within tolerance ({result.stop_reason})"
    lines = [f"integral of {result.integrand} from {result.lower_limit} to {result.upper_limit}",
             f"value        {result.value!r}",
             f"enclosure    [{bound_text(result.enclosure[0], up=False)}, {bound_text(result.enclosure[1], up=True)}]",
             f"error bound  {shown(result.error_bound, 6, 'up')}  (tolerance {shown(result.tolerance, 6, 'near')}: "
             f"{status})",
             f"nodes        {result.nodes}  panels {result.panels}"]
    if result.mesh:
        lines.append("mesh:")
        lines.extend(f"  [{bound_text(p.lower, up=False)}, {bound_text(p.upper, up=True)}]  "
                     f"{bound_text(p.contribution[0], up=False)} .. {bound_text(p.contribution[1], up=True)}  {p.bound}"
                     for p in result.mesh)
    return "\n".join(lines)


def _check(args: argparse.Namespace) -> int:
    name = args.name or f"{args.formula} on [{args.lower}, {args.upper}]"
    started = time.perf_counter()
    try:
        if args.url:
            with _client(args.url) as client:
                outcome = client.check(args.formula, args.lower, args.upper, args.claimed, args.tol,
                                       **_engine_options(args))
        else:
            outcome = check(args.formula, args.lower, args.upper, args.claimed, args.tol, **_engine_options(args))
    except QuadcertError as error:
        _print_problem(error)
        if args.junit:
            _junit.write_report(args.junit, [_junit.CaseOutcome(name, "error", f"{error.code}: {error.message}",
                                                                time.perf_counter() - started)])
        return EXIT_UNDECIDED
    message = _verdict_text(outcome)
    print(_json(_verdict_json(outcome)) if args.json else message)
    if args.junit:
        _junit.write_report(args.junit, [_junit.CaseOutcome(name, outcome.verdict, message,
                                                            time.perf_counter() - started)])
    return {"pass": EXIT_OK, "fail": EXIT_FAIL}.get(outcome.verdict, EXIT_UNDECIDED)


def _verdict_text(outcome: CheckResult) -> str:
    low, high = outcome.integral.enclosure
    near, far = outcome.distance
    return (f"{outcome.verdict}: claimed {outcome.claimed_value}, exact integral in "
            f"[{bound_text(low, up=False)}, {bound_text(high, up=True)}], "
            f"|claimed - exact| in [{shown(near, 6, 'down')}, {shown(far, 6, 'up')}], "
            f"tolerance {shown(outcome.tolerance, 6, 'near')}")


def _verdict_json(outcome: CheckResult) -> dict[str, Any]:
    claimed = outcome.claimed_value
    return {"verdict": outcome.verdict, "claimed_value": Decimal(claimed) if isinstance(claimed, str) else claimed,
            "tolerance": outcome.tolerance,
            "distance": [bound_decimal(outcome.distance[0], up=False), bound_decimal(outcome.distance[1], up=True)],
            "enclosure": [bound_decimal(outcome.integral.enclosure[0], up=False),
                          bound_decimal(outcome.integral.enclosure[1], up=True)],
            "nodes": outcome.integral.nodes}


def _outward(result: dict[str, Any]) -> dict[str, Any]:
    """A result dict with its bounds as outward decimals (low down, high and error bound up)."""
    low, high = result["enclosure"]
    return {**result, "enclosure": [bound_decimal(low, up=False), bound_decimal(high, up=True)],
            "error_bound": bound_decimal(result["error_bound"], up=True)}


def _json(content: Any) -> str:
    return simplejson.dumps(content, use_decimal=True, allow_nan=False)


def _batch(args: argparse.Namespace) -> int:
    with open(args.input, newline="", encoding="utf-8") as stream:
        header, rows, requests = _table.read_rows(stream, args.tol)
    outcomes: list[dict[str, Any]] = []
    if args.url:
        with _client(args.url) as client:
            for start in range(0, len(requests), 200):
                for item in client.batch(requests[start:start + 200]):
                    outcomes.append(_table.outcome_of(problem=item.problem) if isinstance(item, ProblemError)
                                    else _table.outcome_of(item))
    else:
        for request in requests:
            try:
                outcomes.append(_table.outcome_of(integrate(**request)))
            except QuadcertError as error:
                outcomes.append(_table.outcome_of(problem={"code": error.code, "detail": error.message}))
    output = open(args.output, "w", newline="", encoding="utf-8") if args.output else sys.stdout
    try:
        _table.write_rows(output, header, rows, outcomes)
    finally:
        if args.output:
            output.close()
    bad = sum(o["status"] != "certified" for o in outcomes)
    print(f"{len(outcomes) - bad} of {len(outcomes)} rows certified", file=sys.stderr)
    return EXIT_OK if bad == 0 else EXIT_UNDECIDED


def _plan(args: argparse.Namespace) -> int:
    options = _engine_options(args)
    if args.url:
        with _client(args.url) as client:
            result = client.plan(args.formula, args.lower, args.upper, args.tol, **options)
    else:
        result = plan(args.formula, args.lower, args.upper, args.tol, **options)
    print(_json(_plan_json(result)) if args.json else _describe_plan(result))
    return EXIT_OK


def _plan_json(result: Plan) -> dict[str, Any]:
    """The plan with its spacing rounded down and its bounds rounded up as decimals."""
    content = dataclasses.asdict(result)
    for name in ("simpson", "trapezoid"):
        rule = content[name]
        rule["spacing"] = bound_decimal(rule["spacing"], up=False)
        for key in ("derivative_bound", "error_bound"):
            if rule[key] is not None:
                rule[key] = bound_decimal(rule[key], up=True)
    return content


def _describe_plan(result: Plan) -> str:
    lines = [f"uniform meshes for {result.integrand} on [{result.lower_limit}, {result.upper_limit}], "
             f"tolerance {shown(result.tolerance, 6, 'near')}"]
    for rule in (result.simpson, result.trapezoid):
        if rule.available:
            lines.append(f"{rule.rule:10s} {rule.intervals} intervals, {rule.nodes} nodes, "
                         f"h = {shown(rule.spacing, 6, 'down')}, "
                         f"max|f^({rule.derivative_order})| <= {shown(rule.derivative_bound, 6, 'up')}, "
                         f"bound {shown(rule.error_bound, 3, 'up')}")
        else:
            lines.append(f"{rule.rule:10s} not available: {rule.reason}")
    return "\n".join(lines)


def _serve(args: argparse.Namespace) -> int:
    from ._serve import serve

    return serve(args.host, args.port, args.workers)


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="quadcert", description="Certified definite integrals.")
    parser.add_argument("--version", action="version", version=f"quadcert {__version__}")
    commands = parser.add_subparsers(dest="command", required=True)

    serve = commands.add_parser("serve", help="run the HTTP service")
    serve.add_argument("--host", default=None, help="address to bind (default 127.0.0.1)")
    serve.add_argument("--port", type=int, default=None, help="port (default 8000)")
    serve.add_argument("--workers", type=int, default=None, help="engine worker processes (default: CPU count)")
    serve.set_defaults(run=_serve)

    one = commands.add_parser("integrate", help="certify one integral")
    _common(one)
    one.add_argument("--rel-tol", dest="relative_tolerance",
                     help="also accept an error bound <= this times |integral| (below 1)")
    one.add_argument("--max-nodes", dest="max_nodes", type=int)
    one.add_argument("--mesh", action="store_true", help="also print every panel")
    one.add_argument("--json", action="store_true", help="machine-readable output")
    one.set_defaults(run=_integrate)

    verdict = commands.add_parser("check", help="pass/fail verdict on a claimed value (exit 0/1/2)")
    _common(verdict, tolerance_required=True)
    verdict.add_argument("--claimed", required=True,
                         help="the value under test, read as the exact decimal typed (not rounded to float64)")
    verdict.add_argument("--max-nodes", dest="max_nodes", type=int)
    verdict.add_argument("--junit", metavar="FILE", help="write a JUnit XML report")
    verdict.add_argument("--name", help="test case name in the report")
    verdict.add_argument("--json", action="store_true")
    verdict.set_defaults(run=_check)

    table = commands.add_parser("batch", help="certify one integral per CSV row")
    table.add_argument("input", help="CSV with integrand, lower_limit, upper_limit[, tolerance, variable, ...]")
    table.add_argument("-o", "--output", help="output CSV (default: standard output)")
    table.add_argument("--tol", default="1e-8", help="tolerance for rows without one (default 1e-8)")
    table.add_argument("--url")
    table.set_defaults(run=_batch)

    planner = commands.add_parser("plan", help="a priori uniform node counts")
    _common(planner)
    planner.add_argument("--json", action="store_true")
    planner.set_defaults(run=_plan)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    args = build_parser().parse_args(argv)
    if args.command != "serve":
        from ..arithmetic import claim_flint_context

        claim_flint_context()  # the CLI computes on its main thread only, so it may own flint's context
    try:
        return args.run(args)
    except QuadcertError as error:
        _print_problem(error)
        return EXIT_UNDECIDED
    except OSError as error:
        print(f"quadcert: {error}", file=sys.stderr)
        return EXIT_UNDECIDED
