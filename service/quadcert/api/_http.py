"""The HTTP/1.1 connection layer under the app: read deadlines, a connection cap, problem documents.

uvicorn closes a keep-alive connection that idles between requests, but not one that never finishes sending
its request: a client that opens a connection and sends nothing, or one byte every ten seconds, held it (and a
file descriptor) for ever, and 1,100 such connections made the whole service unreachable. Here:

* every request must arrive whole, headers and body, within ``read_timeout`` seconds of its first byte (or of
  the connection opening); otherwise the connection gets 408 and is closed;
* above ``max_connections`` open connections, the connection that has spent longest receiving its request
  (silent, or trickling its body) is closed with 408 to make room, so probes and real clients get through a
  flood of slow ones; when every connection is waiting for its answer, the new one gets 503 and is closed;
* malformed HTTP, and request lines beyond the parser's limits, get an RFC 9457 problem document instead of
  uvicorn's plain text.
"""

from __future__ import annotations

import asyncio
import json
import resource
from typing import Any

from uvicorn.protocols.http.httptools_impl import HttpToolsProtocol

from ._problems import PROBLEM_MEDIA_TYPE, problem_body

_REASONS = {400: b"Bad Request", 408: b"Request Timeout", 503: b"Service Unavailable"}


def default_max_connections() -> int:
    """What the process's open-file limit allows, keeping room for workers, pipes and logs."""
    soft, _ = resource.getrlimit(resource.RLIMIT_NOFILE)
    if soft == resource.RLIM_INFINITY:
        return 10_000
    return max(16, min(10_000, soft - 128))


def _problem_bytes(status: int, code: str, detail: str, retry_after: int | None = None) -> bytes:
    body = problem_body(code, detail)
    body["status"] = status
    payload = json.dumps(body).encode()
    head = [
        b"HTTP/1.1 %d %s" % (status, _REASONS[status]),
        b"content-type: " + PROBLEM_MEDIA_TYPE.encode(),
        b"content-length: %d" % len(payload),
        b"connection: close",
    ]
    if retry_after is not None:
        head.append(b"retry-after: %d" % retry_after)
    return b"\r\n".join(head) + b"\r\n\r\n" + payload


def guarded_protocol(read_timeout: float, max_connections: int = 0) -> type[HttpToolsProtocol]:
    """uvicorn's httptools protocol with the guards above (pass it as ``uvicorn.Config(http=...)``).
    ``max_connections`` 0 follows the open-file limit as it is when each connection arrives."""

    class GuardedProtocol(HttpToolsProtocol):
        def connection_made(self, transport: asyncio.Transport) -> None:  # type: ignore[override]
            super().connection_made(transport)
            self._opened = self.loop.time()
            self._read_timer: asyncio.TimerHandle | None = None
            self._arm()
            limit = max_connections or default_max_connections()
            if len(self.connections) > limit and not self._evict_one():
                self._refuse(
                    503, "too_many_connections", f"the server holds {limit} connections; retry shortly", retry_after=1
                )

        def _evict_one(self) -> bool:
            waiting = [
                c
                for c in self.connections  # still receiving a request: silent, or a slow body
                if c is not self and isinstance(c, GuardedProtocol) and c._read_timer is not None
            ]
            if not waiting:
                return False
            oldest = min(waiting, key=lambda c: c._opened)
            oldest._refuse(
                408, "request_timeout", "the request did not arrive in time; the connection was closed to make room"
            )
            return True

        def _arm(self) -> None:
            if self._read_timer is None:
                self._read_timer = self.loop.call_later(read_timeout, self._read_timed_out)

        def _disarm(self) -> None:
            if self._read_timer is not None:
                self._read_timer.cancel()
                self._read_timer = None

        def _read_timed_out(self) -> None:
            self._read_timer = None
            if self.transport.is_closing():
                return
            if self.cycle is not None and self.cycle.response_started:
                self.transport.close()
                return
            self._refuse(408, "request_timeout", f"the request did not arrive whole within {read_timeout:g} s")

        def _refuse(self, status: int, code: str, detail: str, retry_after: int | None = None) -> None:
            self._disarm()
            if not self.transport.is_closing():
                self.transport.write(_problem_bytes(status, code, detail, retry_after))
                self.transport.close()

        def on_message_begin(self) -> None:
            super().on_message_begin()
            self._opened = self.loop.time()
            self._arm()

        def on_message_complete(self) -> None:
            self._disarm()
            super().on_message_complete()

        def connection_lost(self, exc: Exception | None) -> None:
            self._disarm()
            super().connection_lost(exc)

        def send_400_response(self, msg: str) -> None:
            self._refuse(
                400,
                "malformed_request",
                f"{msg.rstrip('.')}: the bytes are not an HTTP/1.1 request "
                "this server can read (a request line or headers beyond "
                "the parser's limits also end here)",
            )

    return GuardedProtocol


def protocol_options(settings: Any) -> dict[str, Any]:
    """uvicorn.Config options for the guarded protocol under the given settings."""
    return {"http": guarded_protocol(settings.read_timeout_seconds, settings.max_connections)}
