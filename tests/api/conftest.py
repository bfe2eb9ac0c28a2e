"""An in-process app (ASGI transport) shared by the API tests, with two real worker processes."""

from __future__ import annotations

from collections.abc import Iterator

import pytest
from fastapi.testclient import TestClient

from quadcert.api import Settings, create_app


@pytest.fixture(scope="package")
def app_settings() -> Settings:
    return Settings(
        workers=2,
        queue_limit=16,
        request_deadline_seconds=5.0,
        log_level="WARNING",
        max_body_bytes=200_000,
        max_batch_items=50,
    )


@pytest.fixture(scope="package")
def client(app_settings: Settings) -> Iterator[TestClient]:
    app = create_app(app_settings)
    with TestClient(app, raise_server_exceptions=False) as test_client:
        yield test_client
