"""/docs: the API reference as one self-contained HTML page, rendered from the OpenAPI document.

Nothing is fetched from elsewhere (no script, style or font from a CDN), so the page reads the same on a
machine with no internet. /openapi.json is the machine-readable form; openapi-notes/ has worked examples.
"""

from __future__ import annotations

from html import escape
from typing import Any

from fastapi import APIRouter, Request
from fastapi.responses import HTMLResponse

router = APIRouter(tags=["operations"])

_STYLE = """body{font:15px/1.5 system-ui,sans-serif;max-width:60rem;margin:2rem auto;padding:0 1rem;color:#1d2330}
h1{font-size:1.6rem}h2{font-size:1.15rem;margin-top:2rem;border-top:1px solid #ccd;padding-top:1rem}
code{background:#eef0f4;padding:0 .25rem;border-radius:3px}table{border-collapse:collapse;margin:.5rem 0}
td,th{border:1px solid #ccd;padding:.2rem .5rem;text-align:left;vertical-align:top}
.m{font-weight:700;font-family:monospace}
@media (prefers-color-scheme:dark){body{background:#15181e;color:#dfe3ea}code{background:#262b35}
td,th,h2{border-color:#3a4150}}"""


@router.get("/docs", include_in_schema=False, response_class=HTMLResponse)
async def reference(request: Request) -> HTMLResponse:
    return HTMLResponse(render(request.app.openapi()))


def render(document: dict[str, Any]) -> str:
    info = document.get("info", {})
    parts = [
        (
            f"<!doctype html><html lang=en><meta charset=utf-8><title>{escape(info.get('title', ''))} API"
            f"</title><style>{_STYLE}</style><h1>{escape(info.get('title', ''))} {escape(info.get('version', ''))}"
            f'</h1><p>{escape(info.get("description", ""))}</p><p>Machine-readable: <a href="/openapi.json">'
            "/openapi.json</a>. Worked examples: the openapi-notes folder of the source.</p>"
        )
    ]
    for path, operations in document.get("paths", {}).items():
        for method, operation in operations.items():
            parts.append(_operation(method, path, operation))
    return "".join(parts) + "</html>"


def _operation(method: str, path: str, operation: dict[str, Any]) -> str:
    html = [
        (
            f'<h2 id="{escape(operation.get("operationId", ""))}"><span class=m>{method.upper()}</span> '
            f"<code>{escape(path)}</code></h2><p>{escape(operation.get('summary', ''))}</p>"
        )
    ]
    parameters = operation.get("parameters", [])
    if parameters:
        html.append("<table><tr><th>parameter</th><th>in</th><th>meaning</th></tr>")
        for parameter in parameters:
            html.append(
                f"<tr><td><code>{escape(parameter['name'])}</code></td><td>{escape(parameter['in'])}</td>"
                f"<td>{escape(parameter.get('description', ''))}</td></tr>"
            )
        html.append("</table>")
    body = operation.get("requestBody", {}).get("content", {}).get("application/json", {}).get("schema", {})
    if "$ref" in body:
        html.append(f"<p>Body: <code>{escape(body['$ref'].rsplit('/', 1)[-1])}</code> (JSON).</p>")
    responses = ", ".join(
        f"{escape(code)} {escape(r.get('description', ''))}" for code, r in operation.get("responses", {}).items()
    )
    html.append(f"<p>Answers: {responses}</p>")
    return "".join(html)
