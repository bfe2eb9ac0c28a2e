"""Running the service under uvicorn, with a drain on SIGTERM: in-flight work finishes, new work gets 503.

The drain is bounded: when ``grace_seconds`` have passed, every job still queued or running is answered 503
``shutting_down`` (a batch keeps the items it finished), the workers are stopped, and the process exits.
uvicorn's own graceful timeout is set a few seconds later, as a backstop only.
"""

from __future__ import annotations

import asyncio
import contextlib
import errno
import logging
import math
import socket
import sys
from collections.abc import Iterator
from typing import Any

import uvicorn
from pydantic import ValidationError

from .. import __version__
from ..api import Settings, create_app
from ..api._http import protocol_options
from ..errors import InvalidInput

log = logging.getLogger("quadcert.serve")
BACKSTOP_SECONDS = 3  # after the grace period, time for the 503 answers to be written


class _DrainingServer(uvicorn.Server):
    def __init__(self, config: uvicorn.Config, app: Any) -> None:
        super().__init__(config)
        self._app = app

    @contextlib.contextmanager
    def capture_signals(self) -> Iterator[None]:
        """As uvicorn's, but a drained shutdown exits with status 0 instead of re-raising the signal."""
        with super().capture_signals():
            try:
                yield
            finally:
                self._captured_signals.clear()

    def handle_exit(self, sig: int, frame: Any) -> None:
        state = self._app.state
        if not state.draining:
            state.draining = True
            grace = state.settings.grace_seconds
            log.info("draining", extra={"signal": sig, "grace_seconds": grace})
            with contextlib.suppress(RuntimeError):  # no running loop: nothing in flight to stop
                loop = asyncio.get_running_loop()
                loop.call_later(grace, lambda: loop.create_task(state.pool.close()))
        super().handle_exit(sig, frame)


def _bind(host: str, port: int) -> socket.socket:
    """The listening socket, bound before anything starts, so a port in use is the first and only message."""
    family = socket.AF_INET6 if ":" in host else socket.AF_INET
    sock = socket.socket(family, socket.SOCK_STREAM)
    sock.setsockopt(socket.SOL_SOCKET, socket.SO_REUSEADDR, 1)
    try:
        sock.bind((host, port))
    except OSError as error:
        sock.close()
        reason = "is in use" if error.errno == errno.EADDRINUSE else f"cannot be bound ({error.strerror})"
        raise InvalidInput(
            f"{host}:{port} {reason}; choose another with --port or QUADCERT_PORT", code="invalid_input", field="port"
        ) from None
    sock.set_inheritable(True)
    return sock


def serve(host: str | None, port: int | None, workers: int | None) -> int:
    overrides = {k: v for k, v in {"host": host, "port": port, "workers": workers}.items() if v is not None}
    try:
        settings = Settings(**overrides)  # type: ignore[arg-type]  # pydantic-settings types its own init options too
    except ValidationError as error:
        first = error.errors()[0]
        raise InvalidInput(
            f"{'.'.join(str(p) for p in first['loc'])}: {first['msg']}",
            code="invalid_input",
            field=str(first["loc"][0]),
        ) from None
    sock = _bind(settings.host, settings.port)
    app = create_app(settings)
    backstop = math.ceil(settings.grace_seconds) + BACKSTOP_SECONDS  # never None: None would wait forever
    config = uvicorn.Config(
        app,
        host=settings.host,
        port=settings.port,
        log_config=None,
        access_log=False,
        timeout_graceful_shutdown=backstop,
        lifespan="on",
        **protocol_options(settings),
    )
    server = _DrainingServer(config, app)
    shown_host = f"[{settings.host}]" if ":" in settings.host else settings.host
    print(
        f"quadcert {__version__}: serving on http://{shown_host}:{sock.getsockname()[1]} with {settings.workers} "
        "engine worker(s); it keeps running until SIGTERM or Ctrl-C",
        file=sys.stderr,
        flush=True,
    )
    server.run(sockets=[sock])
    return 0
