"""A real ``quadcert serve`` on loopback, started and stopped by the tests."""

from __future__ import annotations

import os
import signal
import socket
import subprocess
import sys
import time
from collections.abc import Iterator
from dataclasses import dataclass

import httpx
import pytest


@dataclass
class Server:
    url: str
    process: subprocess.Popen

    def worker_pids(self) -> list[int]:
        children: list[int] = []
        for task in os.listdir(f"/proc/{self.process.pid}/task"):  # workers may be started from any thread
            try:
                with open(f"/proc/{self.process.pid}/task/{task}/children") as stream:
                    children.extend(int(p) for p in stream.read().split())
            except OSError:
                continue
        return [pid for pid in children if _is_worker(pid)]


def _is_worker(pid: int) -> bool:
    try:
        with open(f"/proc/{pid}/cmdline", "rb") as stream:
            command = stream.read()
        return b"spawn_main" in command
    except OSError:
        return False


def free_port() -> int:
    with socket.socket() as sock:
        sock.bind(("127.0.0.1", 0))
        return sock.getsockname()[1]


def start_server(**env: str) -> Server:
    port = free_port()
    environment = {**os.environ, "QUADCERT_LOG_LEVEL": "WARNING", **env}
    process = subprocess.Popen(
        [sys.executable, "-m", "quadcert.cli", "serve", "--port", str(port), "--workers", "2"],
        env=environment,
        stdout=subprocess.DEVNULL,
        stderr=subprocess.PIPE,
    )
    url = f"http://127.0.0.1:{port}"
    deadline = time.monotonic() + 60
    while time.monotonic() < deadline:
        if process.poll() is not None:
            raise RuntimeError(f"server exited: {process.stderr.read().decode()[-2000:]}")
        try:
            if httpx.get(f"{url}/readyz", timeout=1).status_code == 200:
                return Server(url, process)
        except httpx.HTTPError:
            pass
        time.sleep(0.1)
    process.kill()
    raise RuntimeError("server did not become ready")


def stop_server(server: Server) -> int:
    if server.process.poll() is None:
        server.process.send_signal(signal.SIGTERM)
        try:
            server.process.wait(timeout=30)
        except subprocess.TimeoutExpired:
            server.process.kill()
            server.process.wait()
    return server.process.returncode


@pytest.fixture(scope="package")
def server() -> Iterator[Server]:
    running = start_server()
    yield running
    stop_server(running)
