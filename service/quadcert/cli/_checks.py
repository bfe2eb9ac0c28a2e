"""Files of checks for CI: many claimed values in one run, each a test case in one JUnit report.

Two formats, told apart by the file's ending:

* TOML (``.toml``): a ``[defaults]`` table (optional) and one ``[[check]]`` table per check, with keys
  ``name``, ``integrand``, ``lower_limit``, ``upper_limit``, ``claimed_value``, ``tolerance``, ``variable``,
  ``relative_tolerance``, ``max_nodes`` and a ``parameters`` table. Numbers are read as the decimals they
  spell (a TOML float is not rounded to float64 first).
* CSV (anything else): a header with the same names; parameters as columns named ``parameter.NAME``.

Example (TOML)::

    [defaults]
    tolerance = 1e-9

    [[check]]
    name = "pump curve: second moment"
    integrand = "x^2*exp(-x/k)"
    lower_limit = 0
    upper_limit = 5
    claimed_value = 1.2345678901
    parameters = { k = 2 }
"""

from __future__ import annotations

import csv
import tomllib
from decimal import Decimal
from typing import Any

from ..errors import InvalidInput

FIELDS = (
    "name",
    "integrand",
    "lower_limit",
    "upper_limit",
    "claimed_value",
    "tolerance",
    "variable",
    "relative_tolerance",
    "max_nodes",
    "parameters",
)
REQUIRED = ("integrand", "lower_limit", "upper_limit", "claimed_value", "tolerance")
PARAMETER_PREFIX = "parameter."


def read_checks(path: str) -> list[dict[str, Any]]:
    """The checks in a file, each a dict of ``check()`` arguments plus ``name``; refuses what it cannot use."""
    checks = _read_toml(path) if path.lower().endswith(".toml") else _read_csv(path)
    if not checks:
        raise InvalidInput(f"{path} holds no checks", code="invalid_checks_file")
    for number, item in enumerate(checks, start=1):
        unknown = set(item) - set(FIELDS)
        if unknown:
            raise InvalidInput(
                f"check {number}: unknown key(s) {', '.join(sorted(unknown))}; the keys are {', '.join(FIELDS)}",
                code="invalid_checks_file",
            )
        missing = [key for key in REQUIRED if item.get(key) in (None, "")]
        if missing:
            raise InvalidInput(f"check {number}: missing {', '.join(missing)}", code="invalid_checks_file")
        item.setdefault("name", f"{item['integrand']} on [{item['lower_limit']}, {item['upper_limit']}]")
        if isinstance(item.get("max_nodes"), str):
            item["max_nodes"] = int(item["max_nodes"]) if item["max_nodes"].strip().isdigit() else item["max_nodes"]
    return checks


def _read_toml(path: str) -> list[dict[str, Any]]:
    with open(path, "rb") as stream:
        try:
            document = tomllib.load(stream, parse_float=Decimal)
        except tomllib.TOMLDecodeError as error:
            raise InvalidInput(f"{path}: {error}", code="invalid_checks_file") from None
    defaults = document.get("defaults", {})
    checks = document.get("check", [])
    if not isinstance(checks, list) or not isinstance(defaults, dict):
        raise InvalidInput(f"{path}: write each check as a [[check]] table", code="invalid_checks_file")
    return [{**defaults, **check} for check in checks]


def _read_csv(path: str) -> list[dict[str, Any]]:
    with open(path, newline="", encoding="utf-8-sig") as stream:
        rows = list(csv.DictReader(stream))
    checks = []
    for row in rows:
        item: dict[str, Any] = {}
        parameters = {}
        for key, value in row.items():
            if key is None or value is None or not value.strip():
                continue
            if key.startswith(PARAMETER_PREFIX):
                parameters[key[len(PARAMETER_PREFIX) :]] = value.strip()
            else:
                item[key.strip()] = value.strip()
        if parameters:
            item["parameters"] = parameters
        checks.append(item)
    return checks
