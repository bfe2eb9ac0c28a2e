"""The golden requests: a small fixed set whose full certified outputs are stored in outputs.json.

Any change to those outputs must come with a new ``ENGINE_VERSION`` (service/quadcert/_version.py), because caches and
ETags are keyed by it. After bumping it, rewrite the stored outputs with

    python -m tests.golden.cases --write
"""

from __future__ import annotations

import json
import sys
from pathlib import Path
from typing import Any

from quadcert import ENGINE_VERSION, check, integrate, plan
from quadcert.arithmetic import MpmathArithmetic

STORED = Path(__file__).with_name("outputs.json")

#: (name, call, arguments): chosen to cross every path: compiled engine, each backend's precise engine,
#: Peano bounds, range bounds, sub-float-range results, float64's resolution floor, verdicts and plans
CASES: list[tuple[str, str, dict[str, Any]]] = [
    ("gaussian", "integrate", {"integrand": "exp(-x^2)", "lower_limit": 0, "upper_limit": 1, "tolerance": 1e-10}),
    ("pi-quarter", "integrate", {"integrand": "4/(1+x^2)", "lower_limit": 0, "upper_limit": 1, "tolerance": 1e-12}),
    ("sqrt-end", "integrate", {"integrand": "sqrt(x)", "lower_limit": 0, "upper_limit": 1, "tolerance": 1e-8}),
    ("kink", "integrate", {"integrand": "abs(x - 0.3)", "lower_limit": -1, "upper_limit": 1, "tolerance": 1e-8}),
    ("half-disc", "integrate", {"integrand": "sqrt(1 - x^2)", "lower_limit": -1, "upper_limit": 1, "tolerance": 1e-8}),
    ("sine-pi", "integrate", {"integrand": "sin(x)", "lower_limit": 0, "upper_limit": "pi", "tolerance": 1e-9}),
    (
        "parameters",
        "integrate",
        {
            "integrand": "a*exp(-b*x)",
            "lower_limit": 0,
            "upper_limit": "1/3",
            "tolerance": 1e-9,
            "parameters": {"a": "2.5", "b": "0.1"},
        },
    ),
    (
        "relative",
        "integrate",
        {"integrand": "exp(x)", "lower_limit": 0, "upper_limit": 20, "tolerance": 1e-12, "relative_tolerance": 1e-10},
    ),
    (
        "underflow",
        "integrate",
        {"integrand": "exp(x)*exp(-2*x)", "lower_limit": 1000, "upper_limit": 1010, "tolerance": 1e-8},
    ),
    ("subnormal", "integrate", {"integrand": "x*1e-700*1e390", "lower_limit": 0, "upper_limit": 1, "tolerance": 1e-8}),
    ("float-floor", "integrate", {"integrand": "exp(x)", "lower_limit": 0, "upper_limit": 3, "tolerance": "1e-60"}),
    (
        "reference-backend",
        "integrate",
        {"integrand": "cos(x)^2", "lower_limit": 0, "upper_limit": 2, "tolerance": 1e-8, "arithmetic": "mpmath"},
    ),
    (
        "budget",
        "integrate",
        {"integrand": "sin(50*x)^2", "lower_limit": 0, "upper_limit": 3, "tolerance": 1e-14, "max_nodes": 41},
    ),
    (
        "verdict-pass",
        "check",
        {"integrand": "x^2", "lower_limit": 0, "upper_limit": 3, "claimed_value": "9.0000001", "tolerance": 1e-6},
    ),
    (
        "verdict-fail",
        "check",
        {"integrand": "x^2", "lower_limit": 0, "upper_limit": 3, "claimed_value": 9.01, "tolerance": 1e-6},
    ),
    ("plan", "plan", {"integrand": "exp(x)", "lower_limit": 0, "upper_limit": 2, "tolerance": 0.5e-4}),
]

_VOLATILE = {"compute_seconds"}


def run(call: str, arguments: dict[str, Any]) -> dict[str, Any]:
    """The full output of one golden request, as plain JSON data, without timings."""
    arguments = dict(arguments)
    if arguments.pop("arithmetic", None) == "mpmath":
        arguments["arithmetic"] = MpmathArithmetic
    function = {"integrate": integrate, "check": check, "plan": plan}[call]
    result = function(**arguments)
    return json.loads(json.dumps(_plain(result)))


def _plain(value: Any) -> Any:
    if hasattr(value, "__dataclass_fields__"):
        return {k: _plain(getattr(value, k)) for k in value.__dataclass_fields__ if k not in _VOLATILE}
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if isinstance(value, dict):
        return {k: _plain(v) for k, v in value.items()}
    if isinstance(value, float):
        return repr(value)  # stored as text, so a change in the last bit shows
    if isinstance(value, (str, int, bool)) or value is None:
        return value
    return str(value)


def outputs() -> dict[str, Any]:
    return {"engine_version": ENGINE_VERSION, "cases": {name: run(call, args) for name, call, args in CASES}}


if __name__ == "__main__":
    if sys.argv[1:] != ["--write"]:
        sys.exit("usage: python -m tests.golden.cases --write")
    STORED.write_text(json.dumps(outputs(), indent=1, sort_keys=True) + "\n")
    print(f"wrote {STORED} for {ENGINE_VERSION}")
