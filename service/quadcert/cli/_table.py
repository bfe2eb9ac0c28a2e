"""CSV batches: one integral per row in, the same rows with certified columns out."""

from __future__ import annotations

import csv
import io
from collections.abc import Iterable
from typing import Any, TextIO

from ..errors import InvalidInput
from ..quadrature import bound_text

REQUIRED = ("integrand", "lower_limit", "upper_limit")
OPTIONAL = ("tolerance", "variable", "relative_tolerance", "max_nodes")
PARAMETER_PREFIX = "parameter."  # one column per parameter: parameter.k, so one file can sweep k
RESULT_COLUMNS = ("status", "value", "low", "high", "error_bound", "nodes", "tolerance_met", "code", "detail")


def read_rows(
    stream: TextIO, default_tolerance: Any
) -> tuple[list[str], list[dict[str, str]], list[dict[str, Any]], str]:
    """Rows as read, the request each one becomes, and the delimiter (a comma, or a semicolon as spreadsheets
    in comma-decimal locales write)."""
    text = stream.read()
    first = text.split("\n", 1)[0]
    delimiter = ";" if first.count(";") > first.count(",") else ","
    reader = csv.DictReader(io.StringIO(text), delimiter=delimiter)
    header = [name.strip() for name in (reader.fieldnames or [])]
    reader.fieldnames = header
    missing = [c for c in REQUIRED if c not in header]
    if missing:
        raise InvalidInput(
            f"the CSV header lacks {', '.join(missing)}; it needs integrand, lower_limit, "
            f"upper_limit and may have {', '.join(OPTIONAL)} and {PARAMETER_PREFIX}NAME columns "
            f"(the header read: {', '.join(header)[:120]})",
            code="invalid_csv",
        )
    rows, requests = [], []
    for row in reader:
        rows.append(row)
        request: dict[str, Any] = {
            "integrand": row["integrand"],
            "lower_limit": row["lower_limit"],
            "upper_limit": row["upper_limit"],
            "tolerance": default_tolerance,
        }
        for column in OPTIONAL:
            text_value = (row.get(column) or "").strip()
            if not text_value:
                continue
            if column == "max_nodes":
                request[column] = int(text_value) if text_value.isdigit() else text_value
            else:
                request[column] = text_value  # numbers are read by the engine as the exact decimal they spell
        parameters = {
            name[len(PARAMETER_PREFIX) :]: value.strip()
            for name, value in row.items()
            if name and name.startswith(PARAMETER_PREFIX) and value and value.strip()
        }
        if parameters:
            request["parameters"] = parameters
        requests.append(request)
    return header, rows, requests, delimiter


def write_rows(
    stream: TextIO,
    header: list[str],
    rows: Iterable[dict[str, str]],
    outcomes: Iterable[dict[str, Any]],
    delimiter: str = ",",
) -> None:
    writer = csv.DictWriter(
        stream,
        fieldnames=[*header, *[c for c in RESULT_COLUMNS if c not in header]],
        lineterminator="\n",
        delimiter=delimiter,
    )
    writer.writeheader()
    for row, outcome in zip(rows, outcomes):
        writer.writerow({**row, **outcome})


def outcome_of(result: Any = None, problem: dict[str, Any] | None = None) -> dict[str, Any]:
    if problem is not None:
        return {"status": "error", "code": problem.get("code", ""), "detail": problem.get("detail", "")}
    return {
        "status": "certified" if result.tolerance_met else "not_met",
        "value": repr(result.value),
        "low": bound_text(result.enclosure[0], up=False),
        "high": bound_text(result.enclosure[1], up=True),
        "error_bound": bound_text(result.error_bound, up=True),
        "nodes": result.nodes,
        "tolerance_met": str(result.tolerance_met).lower(),
        "code": "",
        "detail": "" if result.tolerance_met else result.stop_reason,
    }
