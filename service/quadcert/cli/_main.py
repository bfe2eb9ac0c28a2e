"""Argument parsing and the five commands."""

from __future__ import annotations

import argparse
import contextlib
import re
import signal
import sys
import threading
import time
from collections.abc import Iterator, Sequence
from dataclasses import replace
from decimal import Decimal
from pathlib import Path
from typing import TYPE_CHECKING, Any

import simplejson

from .. import __version__
from ..errors import InvalidInput, ProblemError, QuadcertError
from ..quadrature import (
    CheckResult,
    IntegralResult,
    Plan,
    Request,
    bound_text,
    certified_digits,
    check,
    integrate,
    plan,
    shown,
)
from ..results import RULES, check_body, integral_body, integral_from, plan_body
from . import _junit, _table

if TYPE_CHECKING:
    from ..client import Client

EXIT_OK, EXIT_FAIL, EXIT_UNDECIDED = 0, 1, 2

EXIT_CODES = """exit codes:
  0  success (check: pass, certified |claimed - exact| <= tolerance)
  1  certified fail (check and checks only: certified |claimed - exact| > tolerance)
  2  anything else: not certified within the budget or --timeout, a refused formula, a bad file, an
     unreachable server"""


def _epilog(example: str) -> str:
    return f"{EXIT_CODES}\n\nexample:\n  {example}"


def _parameters(pairs: list[str]) -> dict[str, str]:
    values = {}
    for pair in pairs:
        name, sep, value = pair.partition("=")
        if not sep or not name.strip():
            raise InvalidInput(f"--param takes NAME=VALUE, got {pair!r}", code="invalid_parameter", field="param")
        values[name.strip()] = value.strip()
    return values


def _common(parser: argparse.ArgumentParser, tolerance_required: bool = False) -> None:
    parser.add_argument("formula", help="integrand, e.g. 'exp(-x^2)'")
    parser.add_argument("lower", help="lower limit: a number or a constant expression such as pi/2")
    parser.add_argument("upper", help="upper limit")
    parser.add_argument(
        "--tol",
        default=None if tolerance_required else "1e-8",
        required=tolerance_required,
        help="absolute tolerance, read as the exact decimal typed" + ("" if tolerance_required else " (default 1e-8)"),
    )
    parser.add_argument("--var", default="x", help="name of the integration variable (default x)")
    parser.add_argument(
        "--param",
        action="append",
        default=[],
        metavar="NAME=VALUE",
        help="a named parameter: a number, or bounds it is known within (k=1.99..2.01 or k=2±0.01)",
    )
    parser.add_argument("--url", help="use the service at this URL (http://host:port) instead of computing in-process")
    _timeout(parser)


def _timeout(parser: argparse.ArgumentParser) -> None:
    parser.add_argument(
        "--timeout",
        type=float,
        metavar="SECONDS",
        help="give up after this long: the answer so far (not certified: exit 2), or an error",
    )


def _engine_options(args: argparse.Namespace) -> dict[str, Any]:
    options: dict[str, Any] = {"variable": args.var}
    left = _time_left(args)
    if left is not None and not args.url:
        options["deadline_seconds"] = max(left * 0.9, 1e-3)  # the engine returns what it has by then
    if args.param:
        options["parameters"] = _parameters(args.param)
    for name in ("relative_tolerance", "max_nodes"):
        if getattr(args, name, None) is not None:
            options[name] = getattr(args, name)
    if getattr(args, "rule", "simpson") != "simpson":
        options["rule"] = args.rule
    return options


def _time_left(args: argparse.Namespace) -> float | None:
    until = getattr(args, "until", None)
    return None if until is None else max(until - time.monotonic(), 1e-3)


def _client(url: str, args: argparse.Namespace | None = None) -> Client:
    from ..client import Client

    left = None if args is None else _time_left(args)
    return Client(url, timeout=60.0 if left is None else left)


def _print_problem(error: QuadcertError) -> None:
    column = getattr(error, "column", None)
    where = f" [column {column}]" if column and "(at column" not in error.message else ""
    print(f"quadcert: {error.code}: {error.message}{where}", file=sys.stderr)


# -- commands ---------------------------------------------------------------------------------


def _integrate(args: argparse.Namespace) -> int:
    options = _engine_options(args)
    if args.mesh:
        options["include_mesh"] = True
    if args.sensitivities:
        options["sensitivities"] = True
    if args.plot:
        result = _plot(args, options)
    elif args.url:
        with _client(args.url, args) as client:
            result = client.integrate(args.formula, args.lower, args.upper, args.tol, **options)
    else:
        with _working("certifying"):
            result = integrate(args.formula, args.lower, args.upper, args.tol, **options)
    if args.json:  # the same body the HTTP service answers
        print(_json(integral_body(result, {"variable": args.var, "tolerance": _typed(args.tol)})))
    else:
        print(_describe(result))
    return EXIT_OK if result.tolerance_met else EXIT_UNDECIDED


def _plot(args: argparse.Namespace, options: dict[str, Any]) -> IntegralResult:
    """Certify with the mesh, draw the picture to ``--plot`` (SVG), and return the result (mesh kept for --mesh)."""
    from .._version import ENGINE_VERSION
    from ..picture import Box, boxes, render_svg

    if args.url:
        with _client(args.url, args) as client:
            answer = client.picture(args.formula, args.lower, args.upper, args.tol, **options)
        result = integral_from(answer["integral"])
        drawn = [
            Box(float(b[0]), float(b[1]), None if b[2] is None else (float(b[2]), float(b[3])), float(b[4]), str(b[5]))
            for b in answer["boxes"]
        ]
    else:
        deadline = options.pop("deadline_seconds", None)
        options.pop("include_mesh", None)
        request = Request.build(args.formula, args.lower, args.upper, args.tol, **options)
        with _working("certifying"):
            result = request.integrate(deadline_seconds=deadline, include_mesh=True)
        drawn = boxes(request.formula, request.values, result.mesh or ())
    path = Path(args.plot)
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(render_svg(result, drawn, args.var, ENGINE_VERSION), encoding="utf-8")
    print(f"picture: {path} ({len(drawn)} panels)", file=sys.stderr)
    return result if args.mesh else replace(result, mesh=None)


def _describe(result: IntegralResult) -> str:
    status = "certified" if result.tolerance_met else f"NOT within tolerance ({result.stop_reason})"
    digits = certified_digits(*result.enclosure)
    value = (
        f"{digits}  (the digits the enclosure certifies; --json has all of them)"
        if digits
        else f"{result.value!r} ± {shown(result.error_bound, 2, 'up')}  (the enclosure straddles a digit boundary)"
    )
    applied = result.applied_tolerance if result.applied_tolerance is not None else result.tolerance
    target = shown(applied, 6, "near") + (
        ""
        if applied == result.tolerance
        else f" (the relative tolerance; the absolute one is {shown(result.tolerance, 6, 'near')})"
    )
    lines = [
        f"integral of {result.integrand} from {result.lower_limit} to {result.upper_limit}",
        f"value        {value}",
        f"enclosure    [{bound_text(result.enclosure[0], up=False)}, {bound_text(result.enclosure[1], up=True)}]",
        f"error bound  {shown(result.error_bound, 6, 'up')}  (tolerance {target}: {status})",
        f"nodes        {result.nodes}  panels {result.panels}",
    ]
    if result.parameter_spread is not None and result.discretisation_bound is not None:
        lines[3] = f"error bound  {shown(result.error_bound, 6, 'up')}  (for every parameter value in the box)"
        lines.insert(
            4,
            f"of which     parameter spread {shown(result.parameter_spread, 6, 'up')} wide, discretisation "
            f"{shown(result.discretisation_bound, 6, 'up')}  (tolerance {target}: {status})",
        )
    for name, (low, high) in (result.sensitivities or {}).items():
        lines.append(f"d/d{name:<9} [{bound_text(low, up=False)}, {bound_text(high, up=True)}]")
    if result.mesh:
        lines.append("mesh:")
        lines.extend(
            f"  [{bound_text(p.lower, up=False)}, {bound_text(p.upper, up=True)}]  "
            f"{bound_text(p.contribution[0], up=False)} .. {bound_text(p.contribution[1], up=True)}  {p.bound}"
            for p in result.mesh
        )
    return "\n".join(lines)


def _check(args: argparse.Namespace) -> int:
    name = args.name or f"{args.formula} on [{args.lower}, {args.upper}]"
    item = {
        "integrand": args.formula,
        "lower_limit": args.lower,
        "upper_limit": args.upper,
        "claimed_value": args.claimed,
        "tolerance": args.tol,
        **_engine_options(args),
    }
    case, outcome = _one_check(args, name, item)
    if args.json and outcome is not None:
        print(
            _json(
                check_body(
                    outcome,
                    {"variable": args.var, "tolerance": _typed(args.tol), "claimed_value": _typed(args.claimed)},
                )
            )
        )
    elif outcome is not None:
        print(case.message)
    if args.junit:
        _junit.write_report(args.junit, [case])
    return _exit_for([case])


def _one_check(
    args: argparse.Namespace, name: str, item: dict[str, Any]
) -> tuple[_junit.CaseOutcome, CheckResult | None]:
    """One verdict as a JUnit case; any failure to decide is an ``error`` case, never a ``fail``."""
    started = time.perf_counter()
    item = dict(item)
    item.pop("name", None)
    try:
        if args.url:
            with _client(args.url, args) as client:
                outcome = client.check(**item)
        else:
            left = _time_left(args)
            if left is not None:
                item.setdefault("deadline_seconds", max(left * 0.9, 1e-3))
            with _working(f"checking {name}"):
                outcome = check(**item)
    except QuadcertError as error:
        _print_problem(error)
        return _junit.CaseOutcome(name, "error", f"{error.code}: {error.message}", time.perf_counter() - started), None
    return _junit.CaseOutcome(name, outcome.verdict, _verdict_text(outcome), time.perf_counter() - started), outcome


def _exit_for(cases: list[_junit.CaseOutcome]) -> int:
    """1 if any check is a certified fail; else 2 if any is undecided or an error; else 0."""
    verdicts = {case.verdict for case in cases}
    if "fail" in verdicts:
        return EXIT_FAIL
    return EXIT_UNDECIDED if verdicts - {"pass"} else EXIT_OK


def _checks(args: argparse.Namespace) -> int:
    from ._checks import read_checks

    items = read_checks(args.file)
    cases = []
    for item in _progress(items, "checks"):
        left = _time_left(args)
        if left is not None and left <= 1e-3:
            cases.append(_junit.CaseOutcome(item["name"], "error", "timeout: not started before --timeout", 0.0))
            continue
        case, _ = _one_check(args, item["name"], item)
        cases.append(case)
        if not args.quiet:
            print(f"{case.verdict:9s} {case.name}: {case.message}")
    if args.junit:
        _junit.write_report(args.junit, cases)
    counts = {v: sum(c.verdict == v for c in cases) for v in ("pass", "fail", "undecided", "error")}
    print(f"{len(cases)} checks: " + ", ".join(f"{n} {v}" for v, n in counts.items() if n), file=sys.stderr)
    return _exit_for(cases)


@contextlib.contextmanager
def _working(what: str) -> Iterator[None]:
    """While one long computation runs, a ticking line on stderr when it is a terminal (tqdm), so a run of
    minutes is never silent; nothing when stderr is a file or a pipe."""
    if not sys.stderr.isatty():
        yield
        return
    from tqdm import tqdm

    done = threading.Event()
    bar = tqdm(total=None, desc=what, bar_format="{desc}: {elapsed}", file=sys.stderr, leave=False, delay=1.0)

    def tick() -> None:
        while not done.wait(0.5):
            bar.refresh()

    ticker = threading.Thread(target=tick, daemon=True)
    ticker.start()
    try:
        yield
    finally:
        done.set()
        ticker.join()
        bar.close()


def _progress(items: list[Any], unit: str) -> Any:
    """A progress bar on stderr when it is a terminal (tqdm); the plain list otherwise."""
    if not sys.stderr.isatty() or len(items) < 2:
        return items
    from tqdm import tqdm

    return tqdm(items, unit=unit[:-1], file=sys.stderr, leave=False)


def _verdict_text(outcome: CheckResult) -> str:
    low, high = outcome.integral.enclosure
    near, far = outcome.distance
    return (
        f"{outcome.verdict}: claimed {outcome.claimed_value}, exact integral in "
        f"[{bound_text(low, up=False)}, {bound_text(high, up=True)}], "
        f"|claimed - exact| in [{shown(near, 6, 'down')}, {shown(far, 6, 'up')}], "
        f"tolerance {shown(outcome.tolerance, 6, 'near')}"
    )


def _typed(text: Any) -> Any:
    """A number typed on the command line, echoed as the decimal it spells."""
    try:
        return Decimal(str(text).strip())
    except ArithmeticError:
        return text


def _json(content: Any) -> str:
    text: str = simplejson.dumps(content, use_decimal=True, allow_nan=False)
    return text


def _known(value: float | None) -> float:
    """A figure an available rule always has (its derivative and error bounds)."""
    assert value is not None
    return value


def _batch(args: argparse.Namespace) -> int:
    with open(args.input, newline="", encoding="utf-8-sig") as stream:  # -sig: spreadsheets write a BOM
        header, rows, requests, dialect = _table.read_rows(stream, args.tol)
    outcomes: list[dict[str, Any]] = []
    if args.url:
        with _client(args.url, args) as client:
            for start in range(0, len(requests), 200):
                for item in client.batch(requests[start : start + 200]):
                    outcomes.append(
                        _table.outcome_of(problem=item.problem)
                        if isinstance(item, ProblemError)
                        else _table.outcome_of(item)
                    )
    else:
        for request in _progress(requests, "rows"):
            left = _time_left(args)
            if left is not None:
                request = {**request, "deadline_seconds": max(left * 0.9, 1e-3)}
            try:
                outcomes.append(_table.outcome_of(integrate(**request)))
            except QuadcertError as error:
                outcomes.append(_table.outcome_of(problem={"code": error.code, "detail": error.message}))
    with (
        open(args.output, "w", newline="", encoding="utf-8")
        if args.output
        else contextlib.nullcontext(sys.stdout) as output
    ):
        _table.write_rows(output, header, rows, outcomes, dialect)
    bad = sum(o["status"] != "certified" for o in outcomes)
    print(f"{len(outcomes) - bad} of {len(outcomes)} rows certified", file=sys.stderr)
    return EXIT_OK if bad == 0 else EXIT_UNDECIDED


def _plan(args: argparse.Namespace) -> int:
    options = _engine_options(args)
    if args.url:
        with _client(args.url, args) as client:
            result = client.plan(args.formula, args.lower, args.upper, args.tol, **options)
    else:
        result = plan(args.formula, args.lower, args.upper, args.tol, **options)
    print(_json(plan_body(result)) if args.json else _describe_plan(result))
    return EXIT_OK


def _describe_plan(result: Plan) -> str:
    lines = [
        (
            f"uniform meshes for {result.integrand} on [{result.lower_limit}, {result.upper_limit}], "
            f"tolerance {shown(result.tolerance, 6, 'near')}"
        )
    ]
    for rule in (result.simpson, result.trapezoid):
        if rule.available:
            lines.append(
                f"{rule.rule:10s} {rule.intervals} intervals, {rule.nodes} nodes, "
                f"h = {shown(rule.spacing, 6, 'down')}, "
                f"max|f^({rule.derivative_order})| <= {shown(_known(rule.derivative_bound), 6, 'up')}, "
                f"bound {shown(_known(rule.error_bound), 3, 'up')}"
            )
        else:
            lines.append(f"{rule.rule:10s} not available: {rule.reason}")
    return "\n".join(lines)


def _serve(args: argparse.Namespace) -> int:
    try:
        from ._serve import serve
    except ModuleNotFoundError as error:
        raise InvalidInput(
            f"the service needs the server extra ({error.name} is missing): pip install 'quadcert[server]'",
            code="invalid_input",
        ) from None

    return serve(args.host, args.port, args.workers)


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="quadcert",
        description="Certified definite integrals.",
        epilog=EXIT_CODES,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument("--version", action="version", version=f"quadcert {__version__}")
    commands = parser.add_subparsers(dest="command", required=True)

    def command(name: str, help: str, example: str) -> argparse.ArgumentParser:
        return commands.add_parser(
            name,
            help=help,
            description=help,
            epilog=_epilog(example),
            formatter_class=argparse.RawDescriptionHelpFormatter,
        )

    serve = commands.add_parser(
        "serve",
        help="run the HTTP service (keeps running until stopped)",
        description="Run the HTTP service. It keeps running until SIGTERM or Ctrl-C.",
        epilog="exit codes:\n  0  stopped by SIGTERM or Ctrl-C after draining\n  2  could "
        "not start (a port in use or out of range, a bad setting)\n\n"
        "example:\n  quadcert serve --port 8000 &",
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    serve.add_argument("--host", default=None, help="address to bind (default 127.0.0.1)")
    serve.add_argument("--port", type=int, default=None, help="port (default 8000)")
    serve.add_argument("--workers", type=int, default=None, help="engine worker processes (default: CPU count)")
    serve.set_defaults(run=_serve)

    one = command("integrate", "certify one integral", "quadcert integrate 'exp(-x^2)' 0 1 --tol 1e-10")
    _common(one)
    one.add_argument(
        "--rel-tol", dest="relative_tolerance", help="also accept an error bound <= this times |integral| (below 1)"
    )
    one.add_argument(
        "--max-nodes",
        dest="max_nodes",
        type=int,
        help="evaluation budget (default 200001); past it the enclosure is returned, not certified",
    )
    one.add_argument("--mesh", action="store_true", help="also print every panel")
    one.add_argument(
        "--rule",
        choices=RULES,
        default="simpson",
        help="panel rule: simpson (default), gauss-legendre (5-point panels, fewer nodes on smooth integrands), "
        "or auto (the narrower on each panel)",
    )
    one.add_argument(
        "--sensitivities",
        action="store_true",
        help="also enclose the integral's derivative in every parameter, over the parameters' bounds",
    )
    one.add_argument(
        "--plot", metavar="FILE.svg", help="also draw how the certificate was earned, as an SVG picture for reports"
    )
    one.add_argument("--json", action="store_true", help="print the result as JSON")
    one.set_defaults(run=_integrate)

    verdict = command(
        "check",
        "pass/fail verdict on one claimed value",
        "quadcert check 'x^2*exp(-x)' 0 5 --claimed 1.75 --tol 1e-9 --junit reports/q.xml",
    )
    _common(verdict, tolerance_required=True)
    verdict.add_argument(
        "--claimed",
        required=True,
        help="the value under test, read as the exact decimal typed (not rounded to float64)",
    )
    verdict.add_argument("--max-nodes", dest="max_nodes", type=int, help="evaluation budget (default 200001)")
    verdict.add_argument("--junit", metavar="FILE", help="write a JUnit XML report (folders are created)")
    verdict.add_argument("--name", help="test case name in the report")
    verdict.add_argument("--json", action="store_true", help="print the verdict as JSON")
    verdict.set_defaults(run=_check)

    many = command(
        "checks",
        "verdicts on a file of claimed values (CSV or TOML), one JUnit report",
        "quadcert checks ci/integrals.toml --junit reports/quadcert.xml",
    )
    many.add_argument("file", help="checks: .toml with [[check]] tables, or CSV with a header (see the README)")
    many.add_argument("--junit", metavar="FILE", help="write one JUnit XML report with a test case per check")
    many.add_argument("--url", help="use the service at this URL instead of computing in-process")
    many.add_argument("--quiet", action="store_true", help="print only the summary line")
    _timeout(many)
    many.set_defaults(run=_checks)

    table = command("batch", "certify one integral per CSV row", "quadcert batch integrals.csv -o certified.csv")
    table.add_argument("input", help="CSV with integrand, lower_limit, upper_limit[, tolerance, variable, ...]")
    table.add_argument("-o", "--output", help="output CSV (default: standard output)")
    table.add_argument("--tol", default="1e-8", help="tolerance for rows without one (default 1e-8)")
    table.add_argument("--url", help="use the service at this URL instead of computing in-process")
    _timeout(table)
    table.set_defaults(run=_batch)

    planner = command("plan", "a priori uniform node counts", "quadcert plan 'exp(x)' 0 2 --tol 0.5e-4")
    _common(planner)
    planner.add_argument("--json", action="store_true", help="print the plan as JSON")
    planner.set_defaults(run=_plan)
    return parser


class _TimedOut(Exception):
    pass


def _alarm(signum: int, frame: Any) -> None:
    raise _TimedOut()


_OPTION_LIKE = re.compile(r"-(?:-|h$|o$)")


def _negative_limits(argv: list[str]) -> list[str]:
    """Let a negative limit be typed as itself: ``-inf``, ``-pi/2``, ``-1`` are values, not options.

    argparse reads any token that starts with '-' and is not a number as an option; such a token is given a
    leading space, which the engine ignores (``--tol`` and the other options keep their meaning).

    >>> _negative_limits(["integrate", "exp(x)", "-inf", "0", "--tol", "1e-9"])
    ['integrate', 'exp(x)', ' -inf', '0', '--tol', '1e-9']
    """
    return [f" {a}" if a.startswith("-") and len(a) > 1 and not _OPTION_LIKE.match(a) else a for a in argv]


def main(argv: Sequence[str] | None = None) -> int:
    """Run one command. Exit codes are a contract for CI (see EXIT_CODES): every path that cannot give a
    verdict, a traceback included, ends with one line on stderr and exit 2, never 1."""
    args = build_parser().parse_args(_negative_limits(sys.argv[1:] if argv is None else list(argv)))
    timeout = getattr(args, "timeout", None)
    if timeout is not None:
        if not timeout > 0:
            print("quadcert: --timeout must be a positive number of seconds", file=sys.stderr)
            return EXIT_UNDECIDED
        args.until = time.monotonic() + timeout
        if hasattr(signal, "setitimer"):  # a hard stop just after the soft deadlines the engine keeps itself
            signal.signal(signal.SIGALRM, _alarm)
            signal.setitimer(signal.ITIMER_REAL, timeout + 1.0)
    if args.command != "serve":
        from ..arithmetic import claim_flint_context

        claim_flint_context()  # the CLI computes on its main thread only, so it may own flint's context
    try:
        code: int = args.run(args)
        return code
    except QuadcertError as error:
        _print_problem(error)
        return EXIT_UNDECIDED
    except _TimedOut:
        print(f"quadcert: timed_out: no answer within --timeout {timeout:g} s", file=sys.stderr)
        return EXIT_UNDECIDED
    except OSError as error:
        print(f"quadcert: {error.strerror or error}: {error.filename or ''}".rstrip(": "), file=sys.stderr)
        return EXIT_UNDECIDED
    except Exception as error:  # noqa: BLE001 - the exit code is a contract: an error is never a verdict
        print(f"quadcert: internal_error: {type(error).__name__}: {error}", file=sys.stderr)
        return EXIT_UNDECIDED
    finally:
        if timeout is not None and hasattr(signal, "setitimer"):
            signal.setitimer(signal.ITIMER_REAL, 0)
