"""Running the service under uvicorn, with a drain on SIGTERM: in-flight work finishes, new work gets 503."""

from __future__ import annotations

import contextlib
import logging
from typing import Any, Iterator

import uvicorn

from ..api import Settings, create_app

log = logging.getLogger("quadcert.serve")


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
        self._app.state.draining = True
        log.info("draining", extra={"signal": sig})
        super().handle_exit(sig, frame)


def serve(host: str | None, port: int | None, workers: int | None) -> int:
    overrides = {k: v for k, v in {"host": host, "port": port, "workers": workers}.items() if v is not None}
    settings = Settings(**overrides)
    app = create_app(settings)
    config = uvicorn.Config(app, host=settings.host, port=settings.port, log_config=None, access_log=False,
                            timeout_graceful_shutdown=int(settings.grace_seconds) or None, lifespan="on")
    server = _DrainingServer(config, app)
    server.run()
    return 0
