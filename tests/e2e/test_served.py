"""End to end against a real server on loopback: HTTP, the Python client, the CLI, faults and shutdown."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import threading
import time

import httpx
import pytest

from quadcert.client import Client
from quadcert.errors import ProblemError
from tests.conftest import HP, encloses
from tests.e2e.conftest import Server, start_server, stop_server

SLOW = {  # below float64's reach: the compiled engine declines and the arbitrary-precision one works for long
    "integrand": "sin(1/(x + 0.0001))",
    "lower_limit": 0,
    "upper_limit": 1,
    "tolerance": 1e-15,
    "max_nodes": 2_000_001,
}


def test_http_round_trip(server: Server) -> None:
    response = httpx.post(
        f"{server.url}/v1/integrals", json={"integrand": "1/x", "lower_limit": 1, "upper_limit": 2, "tolerance": 1e-12}
    )
    assert response.status_code == 200 and encloses(response.json()["enclosure"], HP.log(2))  # ln 2
    cell = httpx.get(
        f"{server.url}/v1/integral",
        params={"integrand": "1/x", "lower_limit": "1", "upper_limit": "2", "tolerance": "1e-12"},
    )
    assert cell.status_code == 200 and abs(float(cell.text) - float(HP.log(2))) < 1e-12


def test_python_client(server: Server) -> None:
    with Client(server.url) as client:
        result = client.integrate("exp(-x^2)", 0, 1, 1e-12)
        assert encloses(result.enclosure, HP.sqrt(HP.pi) / 2 * HP.erf(1))  # A&S 7.1 closed form
        assert client.check("x^2", 0, 3, 9.0, 1e-9).verdict == "pass"  # closed form 3^3/3 = 9
        assert client.plan("exp(x)", 0, 2, 0.5e-4).simpson.nodes == 15  # hand calculation in test_planner.py
        items = client.batch(
            [
                {"integrand": "x", "lower_limit": 0, "upper_limit": 1},
                {"integrand": "2x", "lower_limit": 0, "upper_limit": 1},
            ]
        )
        # closed form 1/2 for the first item
        assert encloses(items[0].enclosure, HP.mpf(1) / 2) and isinstance(items[1], ProblemError)
        with pytest.raises(ProblemError) as info:
            client.integrate("sinn(x)", 0, 1)
        assert info.value.code == "unknown_function" and info.value.column == 1 and info.value.status == 422
        assert client.healthy()


def _cli(*args: str) -> subprocess.CompletedProcess:
    return subprocess.run(
        [sys.executable, "-m", "quadcert.cli", *args], check=False, capture_output=True, text=True, timeout=120
    )


def test_cli_against_the_server(server: Server, tmp_path) -> None:
    done = _cli("integrate", "4/(1+x^2)", "0", "1", "--tol", "1e-10", "--url", server.url, "--json")
    assert done.returncode == 0 and '"tolerance_met": true' in done.stdout
    verdict = _cli(
        "check",
        "4/(1+x^2)",
        "0",
        "1",
        "--claimed",
        "3.14159",
        "--tol",
        "1e-9",
        "--url",
        server.url,
        "--junit",
        str(tmp_path / "report.xml"),
    )
    assert verdict.returncode == 1 and verdict.stdout.startswith("fail")
    assert "<failure" in (tmp_path / "report.xml").read_text()
    rows = tmp_path / "in.csv"
    rows.write_text("integrand,lower_limit,upper_limit\nx,0,1\n2x,0,1\n")
    table = _cli("batch", str(rows), "-o", str(tmp_path / "out.csv"), "--url", server.url)
    assert table.returncode == 2
    out = (tmp_path / "out.csv").read_text().splitlines()
    assert out[1].split(",")[3] == "certified" and "implicit_multiplication" in out[2]


def test_killed_worker_gets_a_problem_and_the_pool_recovers(server: Server) -> None:
    results: dict[str, httpx.Response] = {}
    slow = threading.Thread(
        target=lambda: results.update(slow=httpx.post(f"{server.url}/v1/integrals", json=SLOW, timeout=60))
    )
    slow.start()
    time.sleep(1.0)
    busy = [pid for pid in server.worker_pids() if _cpu_busy(pid)]
    assert busy, "expected one worker busy with the slow request"
    os.kill(busy[0], signal.SIGKILL)
    quick = httpx.post(
        f"{server.url}/v1/integrals", json={"integrand": "x", "lower_limit": 0, "upper_limit": 1}, timeout=30
    )
    slow.join(60)
    assert quick.status_code == 200
    assert results["slow"].status_code == 503 and results["slow"].json()["code"] == "worker_lost"
    assert results["slow"].headers.get("retry-after")
    for _ in range(50):
        ready = httpx.get(f"{server.url}/readyz")
        if ready.status_code == 200 and ready.json()["workers"] == 2:
            break
        time.sleep(0.1)
    assert ready.json()["workers"] == 2


def _cpu_busy(pid: int) -> bool:
    def ticks() -> int:
        with open(f"/proc/{pid}/stat") as stream:
            fields = stream.read().rsplit(")", 1)[1].split()
        return int(fields[11]) + int(fields[12])

    before = ticks()
    time.sleep(0.2)
    return ticks() > before


def test_sigterm_drains_in_flight_work_and_exits() -> None:
    running = start_server(QUADCERT_REQUEST_DEADLINE_SECONDS="4", QUADCERT_GRACE_SECONDS="15")
    results: dict[str, httpx.Response] = {}
    slow = threading.Thread(
        target=lambda: results.update(slow=httpx.post(f"{running.url}/v1/integrals", json=SLOW, timeout=60))
    )
    slow.start()
    time.sleep(0.8)
    started = time.monotonic()
    running.process.send_signal(signal.SIGTERM)
    time.sleep(0.3)
    try:
        late = httpx.post(
            f"{running.url}/v1/integrals", json={"integrand": "x", "lower_limit": 0, "upper_limit": 1}, timeout=5
        )
        assert late.status_code == 503
    except httpx.ConnectError:
        pass  # the listening socket is already closed: new work is refused either way
    slow.join(60)
    code = stop_server(running)
    assert results["slow"].status_code == 200  # finished (its engine deadline returns the enclosure so far)
    assert results["slow"].json()["stop_reason"] in ("deadline", "tolerance_met", "node_budget")
    assert code == 0 and time.monotonic() - started < 20


def test_batch_with_items_past_their_deadline_answers_every_item() -> None:
    running = start_server(QUADCERT_REQUEST_DEADLINE_SECONDS="1", QUADCERT_QUEUE_LIMIT="4")
    try:
        quick = {"integrand": "x^2", "lower_limit": 0, "upper_limit": 3, "tolerance": 1e-9}
        items = [SLOW, quick, SLOW, {"integrand": "2x", "lower_limit": 0, "upper_limit": 1}, SLOW, quick] * 2
        response = httpx.post(f"{running.url}/v1/integrals/batch", json={"items": items}, timeout=120)
        assert response.status_code == 200
        results = response.json()["results"]
        assert len(results) == len(items)
        for item, result in zip(items, results):
            if item is SLOW:  # either the enclosure so far (engine deadline) or a deadline problem
                assert result.get("stop_reason") == "deadline" or result.get("code") == "deadline_exceeded"
            elif item is quick:
                assert encloses(result["enclosure"], 9)  # closed form 3^3/3
            else:
                assert result["code"] == "implicit_multiplication"
    finally:
        stop_server(running)
