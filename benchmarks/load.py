"""Drive a quadcert server past saturation on loopback and report what it held.

    python -m benchmarks.load --workers 2 --queue-limit 16 --concurrency 64 --duration 20
    python -m benchmarks.load --mix cached --concurrency 32 --duration 10
    python -m benchmarks.load --soak 600 --concurrency 16            # ten-minute memory soak

Without --url it starts its own ``quadcert serve`` on a free loopback port and stops it afterwards. Request
loops are bounded by --duration and --max-requests; only loopback addresses are accepted as targets.
"""

from __future__ import annotations

import argparse
import asyncio
import ipaddress
import json
import os
import random
import signal
import socket
import statistics
import subprocess
import sys
import time
from collections import Counter
from dataclasses import dataclass, field
from typing import Any
from urllib.parse import urlparse

import httpx

MIXES = {
    "simple": lambda rng: {
        "integrand": "exp(-x^2)",
        "lower_limit": 0,
        "upper_limit": f"{rng.randint(1, 10**6) / 10**6 + 0.5:.6f}",
        "tolerance": 1e-6,
    },
    "cached": lambda rng: {"integrand": "exp(-x^2)", "lower_limit": 0, "upper_limit": 1, "tolerance": 1e-6},
    "heavy": lambda rng: {
        "integrand": "sin(30*x)*exp(-x)",
        "lower_limit": 0,
        "upper_limit": f"{rng.randint(1, 10**6) / 10**6 + 2:.6f}",
        "tolerance": 1e-10,
    },
    "mesh": lambda rng: {
        "integrand": "sin(200*x)",
        "lower_limit": 0,
        "upper_limit": f"{rng.randint(1, 10**6) / 10**6 + 1:.6f}",
        "tolerance": 1e-8,
        "include_mesh": True,
    },
    "refused": lambda rng: {
        "integrand": rng.choice(["sinn(x)", "2x", "1/(x-0.5)", "log(x-2)"]),
        "lower_limit": 0,
        "upper_limit": 1,
    },
}
#: the soak's mix: mostly simple and cached answers, some heavy work, meshes of a few hundred KB, refusals
MIXES["mixed"] = lambda rng: MIXES[
    rng.choices(["simple", "cached", "heavy", "mesh", "refused"], weights=[50, 25, 10, 10, 5])[0]
](rng)


@dataclass
class Report:
    requests: int = 0
    seconds: float = 0.0
    statuses: Counter = field(default_factory=Counter)
    latencies: list[float] = field(default_factory=list)
    missing_retry_after: int = 0
    rss_mb: list[tuple[float, float]] = field(default_factory=list)

    def summary(self) -> dict[str, Any]:
        ordered = sorted(self.latencies) or [0.0]
        ok = self.statuses.get("200", 0)
        return {
            "requests": self.requests,
            "seconds": round(self.seconds, 3),
            "throughput_rps": round(self.requests / self.seconds, 1) if self.seconds else 0.0,
            "ok_rps": round(ok / self.seconds, 1) if self.seconds else 0.0,
            "p50_ms": round(1000 * statistics.median(ordered), 2),
            "p99_ms": round(1000 * ordered[min(len(ordered) - 1, int(0.99 * len(ordered)))], 2),
            "statuses": dict(sorted(self.statuses.items())),
            "missing_retry_after": self.missing_retry_after,
            "rss_mb": self.rss_mb,
        }


def require_loopback(url: str) -> None:
    host = urlparse(url).hostname or ""
    if host == "localhost":
        return
    try:
        if ipaddress.ip_address(host).is_loopback:
            return
    except ValueError:
        pass
    raise SystemExit(f"refusing to send load to {host!r}: only loopback targets are allowed")


def tree_rss_mb(pid: int) -> float:
    """Resident memory of a process and all its descendants, in MiB (Linux /proc)."""
    total, stack = 0, [pid]
    while stack:
        current = stack.pop()
        try:
            with open(f"/proc/{current}/status") as stream:
                for line in stream:
                    if line.startswith("VmRSS:"):
                        total += int(line.split()[1])
            for task in os.listdir(f"/proc/{current}/task"):
                with open(f"/proc/{current}/task/{task}/children") as stream:
                    stack.extend(int(p) for p in stream.read().split())
        except OSError:
            continue
    return total / 1024


async def drive(
    url: str,
    mix: str,
    concurrency: int,
    duration: float,
    max_requests: int,
    seed: int = 1,
    pid: int | None = None,
    sample_every: float = 0.0,
) -> Report:
    require_loopback(url)
    report = Report()
    rng = random.Random(seed)
    until = time.monotonic() + duration
    limits = httpx.Limits(max_connections=concurrency, max_keepalive_connections=concurrency)

    async def one_loop(client: httpx.AsyncClient) -> None:
        while time.monotonic() < until and report.requests < max_requests:
            report.requests += 1
            started = time.perf_counter()
            try:
                response = await client.post("/v1/integrals", json=MIXES[mix](rng))
                status = str(response.status_code)
                if response.status_code == 503 and "retry-after" not in response.headers:
                    report.missing_retry_after += 1
            except httpx.TimeoutException:
                status = "timeout"
            except httpx.HTTPError as error:
                status = type(error).__name__
            report.latencies.append(time.perf_counter() - started)
            report.statuses[status] += 1

    async def sampler() -> None:
        while pid is not None and sample_every > 0 and time.monotonic() < until:
            report.rss_mb.append((round(duration - (until - time.monotonic()), 1), round(tree_rss_mb(pid), 1)))
            await asyncio.sleep(sample_every)

    async with httpx.AsyncClient(base_url=url, timeout=60, limits=limits) as client:
        started = time.perf_counter()
        await asyncio.gather(sampler(), *(one_loop(client) for _ in range(concurrency)))
        report.seconds = time.perf_counter() - started
    if pid is not None:
        report.rss_mb.append((round(report.seconds, 1), round(tree_rss_mb(pid), 1)))
    return report


def free_port() -> int:
    with socket.socket() as sock:
        sock.bind(("127.0.0.1", 0))
        return sock.getsockname()[1]


def start_server(workers: int, queue_limit: int, deadline: float) -> tuple[subprocess.Popen, str]:
    port = free_port()
    env = {
        **os.environ,
        "QUADCERT_LOG_LEVEL": "WARNING",
        "QUADCERT_QUEUE_LIMIT": str(queue_limit),
        "QUADCERT_REQUEST_DEADLINE_SECONDS": str(deadline),
    }
    process = subprocess.Popen(
        [sys.executable, "-m", "quadcert.cli", "serve", "--port", str(port), "--workers", str(workers)],
        env=env,
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
    )
    url = f"http://127.0.0.1:{port}"
    for _ in range(600):
        try:
            if httpx.get(f"{url}/readyz", timeout=1).status_code == 200:
                return process, url
        except httpx.HTTPError:
            time.sleep(0.1)
    process.kill()
    raise SystemExit("server did not start")


def stop_server(process: subprocess.Popen) -> None:
    process.send_signal(signal.SIGTERM)
    try:
        process.wait(timeout=30)
    except subprocess.TimeoutExpired:
        process.kill()


def table(rows: list[tuple[str, dict[str, Any]]]) -> str:
    lines = [
        "| run | requests | seconds | req/s | ok req/s | p50 ms | p99 ms | statuses | 503 without Retry-After |",
        "| --- | ---: | ---: | ---: | ---: | ---: | ---: | --- | ---: |",
    ]
    for name, s in rows:
        lines.append(
            f"| {name} | {s['requests']} | {s['seconds']} | {s['throughput_rps']} | {s['ok_rps']} | "
            f"{s['p50_ms']} | {s['p99_ms']} | {s['statuses']} | {s['missing_retry_after']} |"
        )
    return "\n".join(lines)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--url", help="a running server on loopback; default: start one")
    parser.add_argument("--workers", type=int, default=2)
    parser.add_argument("--queue-limit", type=int, default=16)
    parser.add_argument("--deadline", type=float, default=10.0)
    parser.add_argument("--mix", choices=sorted(MIXES), default="simple")
    parser.add_argument("--concurrency", type=int, default=64)
    parser.add_argument("--duration", type=float, default=15.0)
    parser.add_argument("--max-requests", type=int, default=1_000_000)
    parser.add_argument("--soak", type=float, default=0.0, help="soak for this many seconds, sampling memory")
    parser.add_argument("--json", action="store_true")
    args = parser.parse_args(argv)
    process = None
    url = args.url
    if url is None:
        process, url = start_server(args.workers, args.queue_limit, args.deadline)
    try:
        duration = args.soak or args.duration
        pid = process.pid if process else None
        report = asyncio.run(
            drive(
                url,
                args.mix,
                args.concurrency,
                duration,
                args.max_requests,
                pid=pid,
                sample_every=max(1.0, duration / 20) if pid else 0.0,
            )
        )
    finally:
        if process is not None:
            stop_server(process)
    summary = report.summary()
    print(json.dumps(summary) if args.json else table([(f"{args.mix} x{args.concurrency}", summary)]))
    if summary["rss_mb"] and not args.json:
        print("memory (s, MiB):", summary["rss_mb"])
    return 0


if __name__ == "__main__":
    sys.exit(main())
