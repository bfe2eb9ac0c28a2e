"""After a 500, the next requests on the same keep-alive connection are answered (uvicorn on loopback)."""

from __future__ import annotations

import threading
import time

import httpx
import uvicorn

from quadcert.api import Settings, create_app
from tests.e2e.conftest import free_port


def test_a_500_leaves_the_connection_usable() -> None:
    app = create_app(Settings(workers=1, log_level="CRITICAL"))

    async def broken() -> None:
        raise RuntimeError("a defect in a route")

    app.add_api_route("/broken", broken)  # a route of this test only: the service has no known 500
    port = free_port()
    server = uvicorn.Server(uvicorn.Config(app, host="127.0.0.1", port=port, log_config=None, lifespan="on"))
    thread = threading.Thread(target=server.run, daemon=True)
    thread.start()
    try:
        with httpx.Client(base_url=f"http://127.0.0.1:{port}", timeout=30) as client:
            for _ in range(300):
                try:
                    if client.get("/readyz").status_code == 200:
                        break
                except httpx.HTTPError:
                    time.sleep(0.1)
            failed = client.get("/broken")
            assert failed.status_code == 500
            assert failed.headers["content-type"].startswith("application/problem+json")
            assert failed.json()["code"] == "internal_error" and "a defect" not in failed.text
            answers = [
                client.post("/v1/integrals", json={"integrand": "x", "lower_limit": 0, "upper_limit": i + 1})
                for i in range(20)
            ]
            assert [a.status_code for a in answers] == [200] * 20
    finally:
        server.should_exit = True
        thread.join(30)
