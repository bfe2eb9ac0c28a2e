"""The page for people at ``/`` and its assets, served from the package: nothing is fetched from elsewhere, so
it works on a machine with no internet. The plotting library is vendored under ``static/vendor``."""

from __future__ import annotations

from importlib.resources import files

from fastapi import APIRouter
from fastapi.responses import HTMLResponse, Response

router = APIRouter(include_in_schema=False)

_STATIC = files("quadcert.api") / "static"
_TYPES = {
    ".js": "text/javascript; charset=utf-8",
    ".css": "text/css; charset=utf-8",
    ".html": "text/html; charset=utf-8",
}
_ASSETS = {
    "page.js": "page.js",
    "page.css": "page.css",
    "vendor/uplot/uPlot.iife.min.js": "vendor/uplot/uPlot.iife.min.js",
    "vendor/uplot/uPlot.min.css": "vendor/uplot/uPlot.min.css",
    "vendor/uplot/LICENSE": "vendor/uplot/LICENSE",
}


@router.get("/", response_class=HTMLResponse)
async def page() -> HTMLResponse:
    return HTMLResponse((_STATIC / "index.html").read_text(encoding="utf-8"), headers={"Cache-Control": "no-cache"})


@router.get("/static/{path:path}")
async def asset(path: str) -> Response:
    """Only the files listed: no path from the request reaches the file system."""
    name = _ASSETS.get(path)
    if name is None:
        return Response("not found", status_code=404, media_type="text/plain")
    suffix = "." + name.rsplit(".", 1)[-1] if "." in name else ""
    content = (_STATIC / name).read_bytes()
    return Response(
        content, media_type=_TYPES.get(suffix, "text/plain; charset=utf-8"), headers={"Cache-Control": "max-age=3600"}
    )
