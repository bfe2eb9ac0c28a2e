"""Reliability figures against a real ``quadcert serve`` on loopback: shutdown under load, a big batch beside
single requests, and a flood of silent or slow connections. Loopback only; every loop is bounded.

    python -m benchmarks.reliability shutdown --runs 10 --grace 3
    python -m benchmarks.reliability fairness
    python -m benchmarks.reliability parsing
    python -m benchmarks.reliability connections --count 1100 --hold 20 --nofile 1024
"""

from __future__ import annotations

import argparse
import resource
import signal
import socket
import statistics
import sys
import threading
import time
from collections import Counter
from typing import Any

import httpx

from tests.e2e.conftest import start_server, stop_server

SLOW = {"integrand": "sin(1000*x)", "lower_limit": 0, "upper_limit": 9000, "tolerance": 1e-9, "max_nodes": 2_000_001}


def _post(url: str, path: str, body: dict, results: dict, key: Any) -> threading.Thread:
    def run() -> None:
        started = time.monotonic()
        try:
            response = httpx.post(f"{url}{path}", json=body, timeout=600)
            results[key] = (response.status_code, response.json(), time.monotonic() - started)
        except httpx.HTTPError as error:
            results[key] = ("error " + type(error).__name__, None, time.monotonic() - started)

    thread = threading.Thread(target=run)
    thread.start()
    return thread


def shutdown(runs: int, grace: float) -> None:
    """8 slow requests and a 7-item batch in flight, then SIGTERM: exit time and every answer's status."""
    exits, statuses = [], Counter()
    for run in range(runs):
        server = start_server(QUADCERT_GRACE_SECONDS=str(grace), QUADCERT_REQUEST_DEADLINE_SECONDS="30")
        results: dict = {}
        threads = [_post(server.url, "/v1/integrals", {**SLOW, "upper_limit": 9000 + i}, results, i) for i in range(8)]
        threads.append(
            _post(
                server.url,
                "/v1/integrals/batch",
                {"items": [{"integrand": "x^2", "lower_limit": 0, "upper_limit": 3}] * 3 + [SLOW] * 4},
                results,
                "batch",
            )
        )
        time.sleep(2)
        started = time.monotonic()
        server.process.send_signal(signal.SIGTERM)
        code = server.process.wait(timeout=grace + 60)
        exits.append(time.monotonic() - started)
        for thread in threads:
            thread.join(60)
        for key, (status, body, _) in results.items():
            if key == "batch" and status == 200:
                statuses.update(f"batch item {r.get('code') or 200}" for r in body["results"])
            else:
                statuses[f"{status} {body.get('code', '') if isinstance(body, dict) else ''}".strip()] += 1
        print(f"run {run + 1}: exit code {code} after {exits[-1]:.2f} s", flush=True)
    print(
        f"SIGTERM with grace {grace} s, {runs} runs: exit after {min(exits):.2f} to {max(exits):.2f} s "
        f"(median {statistics.median(exits):.2f} s); answers: {dict(sorted(statuses.items()))}"
    )


def fairness() -> None:
    """A 500-item batch (40 slow items, 460 quick ones) with single requests sent every 0.5 s meanwhile."""
    server = start_server()
    try:
        items = [{**SLOW, "max_nodes": 200_001, "upper_limit": 1000 + i} for i in range(40)] + [
            {"integrand": "x^2", "lower_limit": 0, "upper_limit": 1001 + i, "tolerance": 1e-9} for i in range(460)
        ]
        results: dict = {}
        batch = _post(server.url, "/v1/integrals/batch", {"items": items}, results, "batch")
        singles, ready = [], Counter()
        time.sleep(0.2)
        for i in range(60):
            singles.append(
                _post(
                    server.url,
                    "/v1/integrals",
                    {"integrand": "exp(-x^2)", "lower_limit": 0, "upper_limit": 1 + i / 100},
                    results,
                    i,
                )
            )
            try:
                ready[httpx.get(f"{server.url}/readyz", timeout=10).status_code] += 1
            except httpx.HTTPError:
                ready["error"] += 1
            time.sleep(0.5)
            if "batch" in results:
                break
        for thread in [batch, *singles]:
            thread.join(600)
        status, body, seconds = results["batch"]
        codes = Counter(r.get("code") or r.get("stop_reason") for r in body["results"]) if status == 200 else {}
        waits = [results[i][2] for i in range(len(singles))]
        single_statuses = Counter(results[i][0] for i in range(len(singles)))
        print(f"batch: {status} after {seconds:.1f} s (batch deadline 60 s); items: {dict(codes)}")
        print(
            f"{len(singles)} single requests meanwhile: statuses {dict(single_statuses)}, wait "
            f"median {statistics.median(waits):.3f} s, max {max(waits):.3f} s; /readyz answers {dict(ready)}"
        )
    finally:
        stop_server(server)


def connections(count: int, hold: float, nofile: int) -> None:
    """``count`` silent connections and then ``count`` slow ones (one body byte every 0.5 s), each held for
    ``hold`` seconds against a server limited to ``nofile`` open files, while /healthz is probed."""
    for mode in ("silent", "slow"):
        server = start_server(QUADCERT_READ_TIMEOUT_SECONDS="10")
        resource.prlimit(server.process.pid, resource.RLIMIT_NOFILE, (nofile, nofile))
        port = int(server.url.rsplit(":", 1)[1])
        held = []
        for _ in range(count):
            try:
                connection = socket.create_connection(("127.0.0.1", port), timeout=5)
                if mode == "slow":
                    connection.sendall(b"POST /v1/integrals HTTP/1.1\r\nhost: t\r\ncontent-length: 9999\r\n\r\n{")
                held.append(connection)
            except OSError:
                pass
        ok = failed = 0
        slowest = 0.0
        until = time.monotonic() + hold
        while time.monotonic() < until:
            started = time.monotonic()
            try:
                ok += httpx.get(f"{server.url}/healthz", timeout=5).status_code == 200
            except httpx.HTTPError:
                failed += 1
            slowest = max(slowest, time.monotonic() - started)
            if mode == "slow":
                for connection in held:
                    try:
                        connection.send(b" ")
                    except OSError:
                        pass
            time.sleep(0.5)
        for connection in held:
            connection.close()
        print(
            f"{mode}: {len(held)} connections held {hold:.0f} s with the server at {nofile} open files: "
            f"/healthz {ok} answered 200, {failed} failed, slowest {slowest * 1000:.0f} ms; "
            f"server exit {stop_server(server)}"
        )


def parsing(items: int = 240, chars: int = 4000) -> None:
    """A batch of ``items`` distinct formulas of ``chars`` characters each (about 1 MB), with /healthz probed
    every 50 ms meanwhile: how long the event loop was held."""
    server = start_server()
    try:
        formulas = []
        for i in range(items):
            terms, j = [], 0
            while sum(len(t) + 1 for t in terms) < chars - 40:
                terms.append(f"sin({i + 1}*x+{j})")
                j += 1
            formulas.append("+".join(terms))
        body = {"items": [{"integrand": f, "lower_limit": 0, "upper_limit": 1, "tolerance": 1e-3} for f in formulas]}
        results: dict = {}
        batch = _post(server.url, "/v1/integrals/batch", body, results, "batch")
        probes = []
        while batch.is_alive() and len(probes) < 2000:
            started = time.monotonic()
            try:
                httpx.get(f"{server.url}/healthz", timeout=30)
            except httpx.HTTPError:
                pass
            probes.append(time.monotonic() - started)
            time.sleep(0.05)
        batch.join(600)
        status, _answer, seconds = results["batch"]
        size = len(httpx.Request("POST", "http://x", json=body).content)
        print(
            f"batch of {items} distinct {chars}-character formulas ({size / 1024:.0f} KiB): {status} after "
            f"{seconds:.1f} s; /healthz probed {len(probes)} times meanwhile, slowest "
            f"{max(probes) * 1000:.0f} ms, median {statistics.median(probes) * 1000:.1f} ms"
        )
    finally:
        stop_server(server)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    commands = parser.add_subparsers(dest="command", required=True)
    one = commands.add_parser("shutdown")
    one.add_argument("--runs", type=int, default=10)
    one.add_argument("--grace", type=float, default=3.0)
    commands.add_parser("fairness")
    commands.add_parser("parsing")
    flood = commands.add_parser("connections")
    flood.add_argument("--count", type=int, default=1100)
    flood.add_argument("--hold", type=float, default=20.0)
    flood.add_argument("--nofile", type=int, default=1024)
    args = parser.parse_args(argv)
    if args.command == "shutdown":
        shutdown(args.runs, args.grace)
    elif args.command == "fairness":
        fairness()
    elif args.command == "parsing":
        parsing()
    else:
        connections(args.count, args.hold, args.nofile)
    return 0


if __name__ == "__main__":
    sys.exit(main())
