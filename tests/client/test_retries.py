"""The client retries 503 (honouring Retry-After) and transport failures, and maps those into ProblemError."""

from __future__ import annotations

import httpx
import pytest

from quadcert.client import Client, ProblemError

ANSWER = {
    "value": 0.5,
    "enclosure": [0.5, 0.5],
    "error_bound": 0.0,
    "tolerance": 1e-8,
    "tolerance_met": True,
    "stop_reason": "tolerance_met",
    "nodes": 3,
    "panels": 1,
    "integrand": "x",
    "lower_limit": "0",
    "upper_limit": "1",
    "precision_bits": 53,
    "compute_seconds": 0.0,
    "bounds_used": {},
    "mesh": None,
}
BUSY = {
    "type": "/problems/saturated",
    "title": "busy",
    "status": 503,
    "detail": "all workers are busy",
    "code": "saturated",
}


def test_503_is_retried_after_the_servers_delay(monkeypatch) -> None:
    calls = []
    waits = []
    monkeypatch.setattr("tenacity.nap.time.sleep", lambda seconds: waits.append(seconds))

    def handler(request: httpx.Request) -> httpx.Response:
        calls.append(request)
        if len(calls) < 3:
            return httpx.Response(503, json=BUSY, headers={"retry-after": "2"})
        return httpx.Response(200, json=ANSWER)

    with Client("http://quadcert.test", transport=httpx.MockTransport(handler)) as client:
        assert client.integrate("x", 0, 1).enclosure == (0.5, 0.5)
    assert len(calls) == 3 and waits == [2.0, 2.0]


def test_retries_end_and_the_problem_is_raised(monkeypatch) -> None:
    monkeypatch.setattr("tenacity.nap.time.sleep", lambda seconds: None)
    handler = lambda request: httpx.Response(503, json=BUSY, headers={"retry-after": "1"})
    with (
        Client("http://quadcert.test", transport=httpx.MockTransport(handler), attempts=2) as client,
        pytest.raises(ProblemError) as info,
    ):
        client.integrate("x", 0, 1)
    assert info.value.status == 503 and info.value.code == "saturated" and info.value.retry_after == 1.0


def test_a_refused_formula_is_not_retried() -> None:
    calls = []

    def handler(request: httpx.Request) -> httpx.Response:
        calls.append(request)
        return httpx.Response(422, json={**BUSY, "status": 422, "code": "unknown_function"})

    with Client("http://quadcert.test", transport=httpx.MockTransport(handler)) as client, pytest.raises(ProblemError):
        client.integrate("sinn(x)", 0, 1)
    assert len(calls) == 1


def test_transport_failures_become_problem_errors(monkeypatch) -> None:
    monkeypatch.setattr("tenacity.nap.time.sleep", lambda seconds: None)

    def handler(request: httpx.Request) -> httpx.Response:
        raise httpx.ConnectError("connection refused", request=request)

    with (
        Client("http://quadcert.test", transport=httpx.MockTransport(handler)) as client,
        pytest.raises(ProblemError) as info,
    ):
        client.integrate("x", 0, 1)
    assert info.value.status is None and info.value.code == "service_unreachable"
    with pytest.raises(ProblemError) as info:
        Client("localhost:8000")
    assert info.value.code == "invalid_url"


def test_importing_the_client_leaves_the_engine_unloaded() -> None:
    """The client needs httpx and the result types only: no mpmath, no python-flint, no compiled engine."""
    import subprocess
    import sys

    code = (
        "import sys, quadcert.client; loaded = [m for m in sys.modules if m.split('.')[0] in "
        "('mpmath', 'flint') or m.endswith('_native') or m.startswith('quadcert.quadrature')]; print(loaded)"
    )
    done = subprocess.run([sys.executable, "-c", code], check=False, capture_output=True, text=True, timeout=60)
    assert done.returncode == 0 and done.stdout.strip() == "[]", done.stdout + done.stderr
