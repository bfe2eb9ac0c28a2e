"""Assembles the app: settings, pool, cache, metrics, routers, and the handlers that turn framework errors
(schema validation, 404, 405) into problem documents. Requests are answered in the routers."""

from __future__ import annotations

import logging
import re
from collections.abc import AsyncIterator
from contextlib import asynccontextmanager
from typing import Any

from fastapi import FastAPI, Request
from fastapi.exceptions import RequestValidationError
from fastapi.openapi.utils import get_openapi
from fastapi.responses import Response
from starlette.exceptions import HTTPException as StarletteHTTPException

from .. import __version__
from ._cache import ResultCache
from ._computation import Computation
from ._logging import configure
from ._metrics import Metrics
from ._middleware import BodyLimit, RequestContext
from ._pool import WorkerPool
from ._problems import problem_body, problem_response
from ._schemas import Problem
from ._settings import Settings
from .routers import checks, health, integrals, operations, page, pictures, plans, reference

log = logging.getLogger("quadcert.app")

DESCRIPTION = """Definite integrals of one-variable formulas with a **guaranteed** error bound.

Every `enclosure` provably contains the exact integral of the formula as written. A certificate is
about that formula only; engineering decisions stay with licensed practice and local codes."""


def create_app(settings: Settings | None = None) -> FastAPI:
    settings = settings or Settings()
    configure(settings.log_level)
    pool = WorkerPool(settings.workers, settings.queue_limit, settings.backend)
    cache = ResultCache(settings.cache_entries, settings.cache_bytes)
    metrics = Metrics(pool, cache)

    @asynccontextmanager
    async def lifespan(app: FastAPI) -> AsyncIterator[None]:
        await pool.start()
        log.info("started", extra={"workers": settings.workers, "queue_limit": settings.queue_limit})
        yield
        app.state.draining = True
        await pool.close()
        log.info("stopped")

    # the reference page at /docs is our own, self-contained (routers/reference.py): the stock one loads its
    # script from a CDN and shows a blank page offline
    app = FastAPI(
        title="quadcert", version=__version__, description=DESCRIPTION, lifespan=lifespan, docs_url=None, redoc_url=None
    )
    app.state.settings = settings
    app.state.pool = pool
    app.state.metrics = metrics
    app.state.draining = False
    app.state.computation = Computation(settings, pool, cache, metrics)
    for module in (health, integrals, checks, plans, pictures, operations, reference, page):
        app.include_router(module.router)
    _install_error_handlers(app)
    app.add_middleware(BodyLimit, limit=settings.max_body_bytes)
    app.add_middleware(RequestContext, state=app.state)
    app.openapi = lambda: _openapi(app)  # type: ignore[method-assign]
    return app


def _context(request: Request) -> dict[str, Any]:
    return {"instance": request.url.path, "request_id": getattr(request.state, "request_id", None)}


_TYPE_TAGS = re.compile(r"^(str|int|float|bool|decimal|function-plain\[.*\]|constrained-str|list\[.*\])$")


def _field_path(location: list[str]) -> str:
    """body.tolerance.float -> tolerance: the validator's own union branches are not the caller's business."""
    return ".".join(p for p in location if p not in ("body", "query") and not _TYPE_TAGS.match(p))


def _plain_message(message: str) -> str:
    return message.removeprefix("Value error, ")


def _install_error_handlers(app: FastAPI) -> None:
    @app.exception_handler(RequestValidationError)
    async def invalid(request: Request, error: RequestValidationError) -> Response:
        errors: list[dict[str, Any]] = [
            {"location": [str(p) for p in e.get("loc", ())], "message": e.get("msg", ""), "type": e.get("type", "")}
            for e in error.errors()
        ]
        first: dict[str, Any] = errors[0] if errors else {"location": [], "message": "invalid request"}
        if first.get("type") == "json_invalid":  # not JSON text at all: 400, with where the text went wrong
            raw: dict[str, Any] = dict(next(iter(error.errors()), {}))
            reason = (raw.get("ctx") or {}).get("error", "")
            at = [p for p in raw.get("loc", ()) if isinstance(p, int)]
            where = f" at character {at[0]}" if at else ""
            return problem_response(
                problem_body("malformed_body", f"the body is not JSON text{where}: {reason}", **_context(request))
            )
        where = _field_path(first["location"])
        if first.get("type") == "string_too_long" and where.endswith("integrand"):
            body = problem_body(
                "formula_too_long",
                f"{where}: the formula is longer than 4096 characters",
                field=where,
                **_context(request),
            )
        else:
            body = problem_body(
                "invalid_request",
                f"{where or 'request'}: {_plain_message(first['message'])}",
                field=where or None,
                errors=errors,
                **_context(request),
            )
        if request.url.path == "/v1/integral" and request.query_params.get("format", "text") != "json":
            from .routers.integrals import _plain_problem

            return _plain_problem(body, request.query_params.get("format", "text"), request)
        return problem_response(body)

    @app.exception_handler(StarletteHTTPException)
    async def http_error(request: Request, error: StarletteHTTPException) -> Response:
        code = {400: "malformed_body", 404: "not_found", 405: "method_not_allowed", 413: "body_too_large"}.get(
            error.status_code, "invalid_request"
        )
        body = problem_body(code, str(error.detail), status=error.status_code, **_context(request))
        response = problem_response(body)
        response.headers.update(error.headers or {})  # 405 carries Allow
        return response

    # anything else is answered 500 by RequestContext (_middleware.py), which keeps the connection usable


def _openapi(app: FastAPI) -> dict[str, Any]:
    if app.openapi_schema:
        return app.openapi_schema
    schema = get_openapi(title=app.title, version=app.version, description=app.description, routes=app.routes)
    schema.setdefault("components", {}).setdefault("schemas", {})["Problem"] = Problem.model_json_schema(
        ref_template="#/components/schemas/{model}"
    )
    app.openapi_schema = schema
    return schema
