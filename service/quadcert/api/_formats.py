"""Plain renderings for spreadsheet web queries: a bare number, one CSV row, or a small XML document."""

from __future__ import annotations

from typing import Any
from xml.sax.saxutils import escape

from ..quadrature import bound_text

FIELDS = ("value", "error_bound", "low", "high", "nodes")
MEDIA_TYPES = {
    "text": "text/plain; charset=utf-8",
    "csv": "text/csv; charset=utf-8",
    "xml": "application/xml; charset=utf-8",
    "json": "application/json",
    "svg": "image/svg+xml",
}


def number_text(value: float) -> str:
    """Shortest text that round-trips a float64, dot as decimal separator, no exponent surprises."""
    if isinstance(value, int):
        return str(value)
    return repr(float(value))


def field_values(result: dict[str, Any]) -> dict[str, str]:
    """Bounds printed outward (low down, high and error bound up), each still reading back as its float."""
    low, high = result["enclosure"]
    return {
        "value": number_text(result["value"]),
        "error_bound": bound_text(float(result["error_bound"]), up=True),
        "low": bound_text(float(low), up=False),
        "high": bound_text(float(high), up=True),
        "nodes": str(result["nodes"]),
    }


def render(result: dict[str, Any], fmt: str, field: str | None) -> str:
    values = field_values(result)
    if fmt == "text":
        return values[field or "value"]
    if fmt == "csv":
        if field:
            return values[field]
        return ",".join(FIELDS) + "\r\n" + ",".join(values[name] for name in FIELDS)
    chosen = (field,) if field else FIELDS
    inner = "".join(f"<{name}>{escape(values[name])}</{name}>" for name in chosen)
    return f'<?xml version="1.0" encoding="UTF-8"?><integral>{inner}</integral>'


def render_problem(body: dict[str, Any], fmt: str) -> str:
    line = f"error {body['status']} {body['code']}: {body['detail']}".replace("\r", " ").replace("\n", " ")
    if fmt == "xml":
        return (
            f'<?xml version="1.0" encoding="UTF-8"?><problem><status>{body["status"]}</status>'
            f"<code>{escape(body['code'])}</code><detail>{escape(body['detail'])}</detail></problem>"
        )
    return line
