"""Regressions from an attack run against a real ``quadcert serve`` on loopback: shutdown under load, queue
deadlines and fairness, large meshes, slow and silent connections, malformed HTTP.

No assertion here is about speed: the checks are statuses, shapes, orderings and that processes exit.
"""

from __future__ import annotations

import signal
import socket
import subprocess
import sys
import threading
import time
from typing import Any

import httpx

from tests.e2e.conftest import Server, start_server, stop_server

SLOW = {"integrand": "sin(1000*x)", "lower_limit": 0, "upper_limit": 9000, "tolerance": 1e-9, "max_nodes": 2_000_001}
QUICK = {"integrand": "x^2", "lower_limit": 0, "upper_limit": 3, "tolerance": 1e-9}


def _post_in_background(url: str, path: str, body: dict, results: dict, key: Any) -> threading.Thread:
    def post() -> None:
        try:
            response = httpx.post(f"{url}{path}", json=body, timeout=120)
            results[key] = (response.status_code, response.headers.get("content-type", ""), response.json())
        except httpx.HTTPError as error:
            results[key] = ("error", "", repr(error))
        results.setdefault("order", []).append(key)

    thread = threading.Thread(target=post)
    thread.start()
    return thread


def _sigterm_and_wait(server: Server, limit: float = 60) -> int:
    server.process.send_signal(signal.SIGTERM)
    try:
        return server.process.wait(timeout=limit)
    except subprocess.TimeoutExpired:
        server.process.kill()
        server.process.wait()
        raise AssertionError(f"the server did not exit within {limit} s of SIGTERM") from None


def test_sigterm_with_work_in_flight_exits_and_answers_everything() -> None:
    running = start_server(QUADCERT_GRACE_SECONDS="1", QUADCERT_REQUEST_DEADLINE_SECONDS="30")
    results: dict = {}
    threads = [
        _post_in_background(running.url, "/v1/integrals", {**SLOW, "upper_limit": 9000 + i}, results, i)
        for i in range(4)
    ]
    threads.append(
        _post_in_background(running.url, "/v1/integrals/batch", {"items": [QUICK, SLOW, SLOW]}, results, "batch")
    )
    time.sleep(1.5)
    assert _sigterm_and_wait(running) == 0
    for thread in threads:
        thread.join(60)
    for key in range(4):
        status, media, body = results[key]
        assert status in (200, 503, 504), results[key]
        if status != 200:
            assert media.startswith("application/problem+json") and body["code"] in (
                "shutting_down",
                "deadline_exceeded",
            )
    status, _, body = results["batch"]
    assert status == 200 and len(body["results"]) == 3  # every item answered: a result or a problem
    for item in body["results"]:
        assert "enclosure" in item or item["code"] in ("shutting_down", "deadline_exceeded", "saturated")


def test_a_grace_below_one_second_does_not_mean_forever() -> None:
    running = start_server(QUADCERT_GRACE_SECONDS="0.3", QUADCERT_REQUEST_DEADLINE_SECONDS="30")
    results: dict = {}
    thread = _post_in_background(running.url, "/v1/integrals", SLOW, results, "slow")
    time.sleep(1.0)
    assert _sigterm_and_wait(running) == 0
    thread.join(60)
    assert results["slow"][0] in (200, 503)


def test_queue_wait_counts_against_the_deadline_and_singles_are_not_starved() -> None:
    """Two workers and a batch of 12 items that each compute until a 400,001-node budget (most of a second)
    under a 3 s batch deadline. The wait in the queue counts: items that start late get only what is left,
    or deadline_exceeded without running, so the batch's engine time fits in 2 workers × (3 s + 1 s of
    slack), however slow the machine. Single requests sent meanwhile are served before the batch's tail
    (a free worker takes the group served least so far)."""
    running = start_server(QUADCERT_REQUEST_DEADLINE_SECONDS="3", QUADCERT_BATCH_DEADLINE_SECONDS="3")
    item = {**SLOW, "max_nodes": 400_001}
    try:
        results: dict = {}
        batch = _post_in_background(running.url, "/v1/integrals/batch", {"items": [item] * 12}, results, "batch")
        time.sleep(0.5)
        singles = [
            _post_in_background(running.url, "/v1/integrals", {**QUICK, "upper_limit": 3 + i}, results, i)
            for i in range(3)
        ]
        for thread in [batch, *singles]:
            thread.join(120)
        assert all(results[i][0] == 200 for i in range(3)), [results[i] for i in range(3)]
        assert results["order"].index("batch") > max(results["order"].index(i) for i in range(3))
        items = results["batch"][2]["results"]
        assert len(items) == 12
        assert all("enclosure" in answer or answer["code"] == "deadline_exceeded" for answer in items)
        engine_seconds = sum(answer.get("compute_seconds", 0) for answer in items)
        assert engine_seconds <= 2 * (3 + 1), engine_seconds
    finally:
        stop_server(running)


def test_large_mesh_arrives_whole(server: Server) -> None:
    """A mesh of about 3,000 panels is over 400 KB: far more than a pipe buffer."""
    response = httpx.post(
        f"{server.url}/v1/integrals",
        json={"integrand": "sin(1000*x)", "lower_limit": 0, "upper_limit": 1, "tolerance": 1e-6, "include_mesh": True},
        timeout=60,
    )
    assert response.status_code == 200, response.text[:300]
    body = response.json()
    assert len(response.content) > 65536 and len(body["mesh"]) == body["panels"]


def test_silent_and_slow_connections_do_not_lock_out_probes() -> None:
    running = start_server(QUADCERT_MAX_CONNECTIONS="40", QUADCERT_READ_TIMEOUT_SECONDS="2")
    port = int(running.url.rsplit(":", 1)[1])
    sockets = []
    try:
        for i in range(120):
            connection = socket.create_connection(("127.0.0.1", port), timeout=5)
            if i % 2:  # half of them trickle a body that never ends
                connection.sendall(b"POST /v1/integrals HTTP/1.1\r\nhost: t\r\ncontent-length: 999\r\n\r\n{")
            sockets.append(connection)
        probes = [httpx.get(f"{running.url}/healthz", timeout=10).status_code for _ in range(5)]
        assert probes == [200] * 5
        time.sleep(3)  # past the read timeout: every one of them has been answered 408 or closed
        for connection in sockets:
            connection.settimeout(5)
            data = connection.recv(4096)
            assert data == b"" or data.startswith(b"HTTP/1.1 408"), data[:80]
    finally:
        for connection in sockets:
            connection.close()
        stop_server(running)


def test_malformed_http_gets_a_problem_document(server: Server) -> None:
    port = int(server.url.rsplit(":", 1)[1])
    for raw in (b"NOT HTTP AT ALL\r\n\r\n", b"GET /" + b"a" * 70_000 + b" HTTP/1.1\r\nhost: t\r\n\r\n"):
        with socket.create_connection(("127.0.0.1", port), timeout=10) as connection:
            connection.sendall(raw)
            reply = b""
            while chunk := connection.recv(65536):
                reply += chunk
        head, _, body = reply.partition(b"\r\n\r\n")
        assert head.startswith(b"HTTP/1.1 400") and b"application/problem+json" in head
        assert b'"malformed_request"' in body


def test_serve_says_where_it_listens_and_refuses_bad_ports() -> None:
    running = start_server()
    try:
        port = running.url.rsplit(":", 1)[1]
        taken = subprocess.run(
            [sys.executable, "-m", "quadcert.cli", "serve", "--port", port],
            check=False,
            capture_output=True,
            text=True,
            timeout=60,
        )
        assert taken.returncode == 2 and "is in use" in taken.stderr and "started" not in taken.stderr
        wrong = subprocess.run(
            [sys.executable, "-m", "quadcert.cli", "serve", "--port", "99999"],
            check=False,
            capture_output=True,
            text=True,
            timeout=60,
        )
        assert wrong.returncode == 2 and "65535" in wrong.stderr
    finally:
        stop_server(running)
    assert running.process.stderr is not None
    assert f"serving on {running.url}" in running.process.stderr.read().decode()
