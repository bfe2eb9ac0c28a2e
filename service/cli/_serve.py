"""Running the service under uvicorn, with a drain on SIGTERM: in-flight work finishes, new work gets 503.

The drain is bounded: when ``grace_seconds`` have passed, every job still queued or running is answered 503
``shutting_down`` (a batch keeps the items it finished), the workers are stopped, and the process exits.
uvicorn's own graceful timeout is set a few seconds later, as a backstop only.
"""

from __future__ import annotations

import asyncio
import contextlib
import logging
import math
from typing import Any, Iterator

import uvicorn

from ..api import Settings, create_app
from ..api._http import protocol_options

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


def serve(host: str | None, port: int | None, workers: int | None) -> int:
    overrides = {k: v for k, v in {"host": host, "port": port, "workers": workers}.items() if v is not None}
    settings = Settings(**overrides)
    app = create_app(settings)
    backstop = math.ceil(settings.grace_seconds) + BACKSTOP_SECONDS  # never None: None would wait forever
    config = uvicorn.Config(app, host=settings.host, port=settings.port, log_config=None, access_log=False,
                            timeout_graceful_shutdown=backstop, lifespan="on", **protocol_options(settings))
    server = _DrainingServer(config, app)
    server.run()
    return 0
