"""Pure ASGI middleware: request ids, JSON access logs, metrics, draining, and the body-size cap."""

from __future__ import annotations

import json
import logging
import re
import time
import uuid
from collections.abc import Awaitable, Callable
from typing import Any

from ._problems import PROBLEM_MEDIA_TYPE, problem_body, problem_headers

Scope = dict[str, Any]
Receive = Callable[[], Awaitable[dict[str, Any]]]
Send = Callable[[dict[str, Any]], Awaitable[None]]
ASGIApp = Callable[[Scope, Receive, Send], Awaitable[None]]

log = logging.getLogger("quadcert.access")
_SAFE_ID = re.compile(r"^[A-Za-z0-9._-]{1,64}$")
_ALWAYS_OPEN = ("/healthz", "/readyz", "/metrics")


async def _send_problem(send: Send, body: dict[str, Any], retry_after: int | None = None) -> None:
    payload = json.dumps(body).encode()
    headers = [
        (b"content-type", PROBLEM_MEDIA_TYPE.encode()),
        (b"content-length", str(len(payload)).encode()),
        *((k.lower().encode(), v.encode()) for k, v in problem_headers(body, retry_after).items()),
    ]
    await send({"type": "http.response.start", "status": body["status"], "headers": headers})
    await send({"type": "http.response.body", "body": payload})


class BodyLimit:
    """Refuse bodies over ``limit`` bytes with 413, by header or by counting the stream."""

    def __init__(self, app: ASGIApp, limit: int) -> None:
        self.app, self.limit = app, limit

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            return await self.app(scope, receive, send)
        declared = dict(scope.get("headers") or []).get(b"content-length")
        too_large = problem_body(
            "body_too_large", f"the request body exceeds {self.limit} bytes", instance=scope.get("path")
        )
        if declared is not None and declared.isdigit() and int(declared) > self.limit:
            return await _send_problem(send, too_large)
        seen = 0
        exceeded = False

        async def limited_receive() -> dict[str, Any]:
            nonlocal seen, exceeded
            message = await receive()
            if message["type"] == "http.request":
                seen += len(message.get("body", b""))
                if seen > self.limit:
                    exceeded = True  # the app sees a disconnect; whatever it answers is replaced by 413
                    return {"type": "http.disconnect"}
            return message

        async def guarded_send(message: dict[str, Any]) -> None:
            if not exceeded:
                await send(message)

        try:
            await self.app(scope, limited_receive, guarded_send)
        except Exception:
            if not exceeded:
                raise
        if exceeded:
            await _send_problem(send, too_large)


class RequestContext:
    """Assigns X-Request-ID, logs one JSON line per request, counts metrics, refuses work while draining."""

    def __init__(self, app: ASGIApp, state: Any) -> None:
        self.app, self.state = app, state

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            return await self.app(scope, receive, send)
        headers = dict(scope.get("headers") or [])
        offered = headers.get(b"x-request-id", b"").decode("latin-1")
        request_id = offered if _SAFE_ID.match(offered) else uuid.uuid4().hex
        scope.setdefault("state", {})["request_id"] = request_id
        path = scope.get("path", "")
        started = time.perf_counter()
        status_holder = {"status": 500}
        started_response = {"sent": False}

        async def send_with_id(message: dict[str, Any]) -> None:
            if message["type"] == "http.response.start":
                started_response["sent"] = True
                status_holder["status"] = message["status"]
                message.setdefault("headers", [])
                message["headers"] = [*message["headers"], (b"x-request-id", request_id.encode())]
            await send(message)

        if getattr(self.state, "draining", False) and path not in _ALWAYS_OPEN:
            body = problem_body(
                "shutting_down",
                "the service is shutting down; send new work elsewhere",
                instance=path,
                request_id=request_id,
            )
            await _send_problem(send_with_id, body, retry_after=self.state.settings.retry_after_seconds)
        else:
            try:
                await self.app(scope, receive, send_with_id)
            except Exception:
                log.exception("unhandled error", extra={"request_id": request_id, "path": path})
                if started_response["sent"]:
                    raise  # half a response is out: only closing the connection is honest
                body = problem_body(
                    "internal_error",
                    "an internal error occurred; it has been logged",
                    instance=path,
                    request_id=request_id,
                )
                await _send_problem(send_with_id, body)
        elapsed = time.perf_counter() - started
        route = scope.get("route")
        route_path = getattr(route, "path", None) or ("unmatched" if status_holder["status"] == 404 else path)
        metrics = getattr(self.state, "metrics", None)
        if metrics is not None:
            metrics.requests.labels(route_path, str(status_holder["status"])).inc()
            metrics.latency.labels(route_path).observe(elapsed)
        log.info(
            "request",
            extra={
                "request_id": request_id,
                "method": scope.get("method"),
                "path": path,
                "status": status_holder["status"],
                "seconds": round(elapsed, 6),
            },
        )
