"""CSV batches: one integral per row in, the same rows with certified columns out."""

from __future__ import annotations

import csv
from typing import Any, Iterable, TextIO

from ..errors import InvalidInput
from ..quadrature import bound_text

REQUIRED = ("integrand", "lower_limit", "upper_limit")
OPTIONAL = ("tolerance", "variable", "relative_tolerance", "max_nodes")
RESULT_COLUMNS = ("status", "value", "low", "high", "error_bound", "nodes", "tolerance_met", "code", "detail")


def read_rows(stream: TextIO, default_tolerance: float) -> tuple[list[str], list[dict[str, str]], list[dict[str, Any]]]:
    """Rows as read, and the request each one becomes."""
    reader = csv.DictReader(stream)
    header = list(reader.fieldnames or [])
    missing = [c for c in REQUIRED if c not in header]
    if missing:
        raise InvalidInput(f"the CSV header lacks {', '.join(missing)}; it needs integrand, lower_limit, "
                           f"upper_limit and may have {', '.join(OPTIONAL)}", code="invalid_csv")
    rows, requests = [], []
    for row in reader:
        rows.append(row)
        request: dict[str, Any] = {"integrand": row["integrand"], "lower_limit": row["lower_limit"],
                                   "upper_limit": row["upper_limit"], "tolerance": default_tolerance}
        for column in OPTIONAL:
            text = (row.get(column) or "").strip()
            if not text:
                continue
            if column == "variable":
                request[column] = text
            elif column == "max_nodes":
                request[column] = int(text) if text.isdigit() else text
            else:
                request[column] = text  # read as the exact decimal it spells by the engine
        requests.append(request)
    return header, rows, requests


def write_rows(stream: TextIO, header: list[str], rows: Iterable[dict[str, str]],
               outcomes: Iterable[dict[str, Any]]) -> None:
    writer = csv.DictWriter(stream, fieldnames=[*header, *[c for c in RESULT_COLUMNS if c not in header]],
                            lineterminator="\n")
    writer.writeheader()
    for row, outcome in zip(rows, outcomes):
        writer.writerow({**row, **outcome})


def outcome_of(result: Any = None, problem: dict[str, Any] | None = None) -> dict[str, Any]:
    if problem is not None:
        return {"status": "error", "code": problem.get("code", ""), "detail": problem.get("detail", "")}
    return {"status": "certified" if result.tolerance_met else "not_met", "value": repr(result.value),
            "low": bound_text(result.enclosure[0], up=False), "high": bound_text(result.enclosure[1], up=True),
            "error_bound": bound_text(result.error_bound, up=True), "nodes": result.nodes,
            "tolerance_met": str(result.tolerance_met).lower(), "code": "", "detail": result.stop_reason}
