"""Argument parsing and the five commands."""

from __future__ import annotations

import argparse
import dataclasses
import json
import sys
import time
from typing import Any, Sequence

from .. import __version__
from ..errors import ProblemError, QuadcertError
from ..quadrature import CheckResult, IntegralResult, Plan, check, integrate, plan
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
    parser.add_argument("--tol", type=float, default=None if tolerance_required else 1e-8,
                        required=tolerance_required, help="absolute tolerance (default 1e-8)")
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
        print(json.dumps(dataclasses.asdict(result)))
    else:
        print(_describe(result))
    return EXIT_OK if result.tolerance_met else EXIT_UNDECIDED


def _describe(result: IntegralResult) -> str:
    status = "certified" if result.tolerance_met else f"NOT within tolerance ({result.stop_reason})"
    lines = [f"integral of {result.integrand} from {result.lower_limit} to {result.upper_limit}",
             f"value        {result.value!r}",
             f"enclosure    [{result.enclosure[0]!r}, {result.enclosure[1]!r}]",
             f"error bound  {result.error_bound:.6g}  (tolerance {result.tolerance:g}: {status})",
             f"nodes        {result.nodes}  panels {result.panels}"]
    if result.mesh:
        lines.append("mesh:")
        lines.extend(f"  [{p.lower!r}, {p.upper!r}]  {p.contribution[0]!r} .. {p.contribution[1]!r}  {p.bound}"
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
    print(json.dumps(_verdict_json(outcome)) if args.json else message)
    if args.junit:
        _junit.write_report(args.junit, [_junit.CaseOutcome(name, outcome.verdict, message,
                                                            time.perf_counter() - started)])
    return {"pass": EXIT_OK, "fail": EXIT_FAIL}.get(outcome.verdict, EXIT_UNDECIDED)


def _verdict_text(outcome: CheckResult) -> str:
    low, high = outcome.integral.enclosure
    return (f"{outcome.verdict}: claimed {outcome.claimed_value!r}, exact integral in [{low!r}, {high!r}], "
            f"|claimed - exact| in [{outcome.distance[0]:.6g}, {outcome.distance[1]:.6g}], "
            f"tolerance {outcome.tolerance:g}")


def _verdict_json(outcome: CheckResult) -> dict[str, Any]:
    return {"verdict": outcome.verdict, "claimed_value": outcome.claimed_value, "tolerance": outcome.tolerance,
            "distance": list(outcome.distance), "enclosure": list(outcome.integral.enclosure),
            "nodes": outcome.integral.nodes}


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
    print(json.dumps(dataclasses.asdict(result)) if args.json else _describe_plan(result))
    return EXIT_OK


def _describe_plan(result: Plan) -> str:
    lines = [f"uniform meshes for {result.integrand} on [{result.lower_limit}, {result.upper_limit}], "
             f"tolerance {result.tolerance:g}"]
    for rule in (result.simpson, result.trapezoid):
        if rule.available:
            lines.append(f"{rule.rule:10s} {rule.intervals} intervals, {rule.nodes} nodes, h = {rule.spacing:.6g}, "
                         f"max|f^({rule.derivative_order})| <= {rule.derivative_bound:.6g}, "
                         f"bound {rule.error_bound:.3g}")
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
    one.add_argument("--rel-tol", dest="relative_tolerance", type=float)
    one.add_argument("--max-nodes", dest="max_nodes", type=int)
    one.add_argument("--mesh", action="store_true", help="also print every panel")
    one.add_argument("--json", action="store_true", help="machine-readable output")
    one.set_defaults(run=_integrate)

    verdict = commands.add_parser("check", help="pass/fail verdict on a claimed value (exit 0/1/2)")
    _common(verdict, tolerance_required=True)
    verdict.add_argument("--claimed", type=float, required=True, help="the value under test")
    verdict.add_argument("--max-nodes", dest="max_nodes", type=int)
    verdict.add_argument("--junit", metavar="FILE", help="write a JUnit XML report")
    verdict.add_argument("--name", help="test case name in the report")
    verdict.add_argument("--json", action="store_true")
    verdict.set_defaults(run=_check)

    table = commands.add_parser("batch", help="certify one integral per CSV row")
    table.add_argument("input", help="CSV with integrand, lower_limit, upper_limit[, tolerance, variable, ...]")
    table.add_argument("-o", "--output", help="output CSV (default: standard output)")
    table.add_argument("--tol", type=float, default=1e-8, help="tolerance for rows without one")
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
