"""Prometheus metrics, one registry per app so several apps (tests) never collide."""

from __future__ import annotations

from collections.abc import Iterator
from typing import TYPE_CHECKING

from prometheus_client import CollectorRegistry, Counter, Histogram
from prometheus_client.core import CounterMetricFamily, GaugeMetricFamily
from prometheus_client.registry import Collector

if TYPE_CHECKING:
    from ._cache import ResultCache
    from ._pool import WorkerPool


class _PoolCollector(Collector):
    def __init__(self, pool: WorkerPool, cache: ResultCache) -> None:
        self.pool, self.cache = pool, cache

    def collect(self) -> Iterator[GaugeMetricFamily | CounterMetricFamily]:
        yield GaugeMetricFamily("quadcert_jobs_pending", "Jobs queued or running", value=self.pool.pending)
        yield GaugeMetricFamily("quadcert_workers_alive", "Engine worker processes alive", value=self.pool.alive)
        yield CounterMetricFamily(
            "quadcert_worker_restarts", "Workers replaced after a deadline or a crash", value=self.pool.restarts
        )
        yield GaugeMetricFamily("quadcert_cache_entries", "Results held in the cache", value=len(self.cache))
        yield GaugeMetricFamily(
            "quadcert_cache_bytes", "Estimated memory the cached results hold", value=self.cache.bytes
        )
        yield CounterMetricFamily("quadcert_cache_hits", "Cache hits since start", value=self.cache.hits)
        yield CounterMetricFamily("quadcert_cache_misses", "Cache misses since start", value=self.cache.misses)


class Metrics:
    def __init__(self, pool: WorkerPool, cache: ResultCache) -> None:
        self.registry = CollectorRegistry()
        self.requests = Counter(
            "quadcert_http_requests", "HTTP requests by route and status", ["route", "status"], registry=self.registry
        )
        self.latency = Histogram(
            "quadcert_http_request_seconds",
            "HTTP request latency",
            ["route"],
            registry=self.registry,
            buckets=(0.001, 0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10, 30),
        )
        self.engine_seconds = Histogram(
            "quadcert_engine_seconds",
            "Engine time per computed result",
            registry=self.registry,
            buckets=(0.001, 0.005, 0.01, 0.05, 0.1, 0.5, 1, 5, 10, 60),
        )
        self.results = Counter("quadcert_results", "Computed results by outcome", ["outcome"], registry=self.registry)
        self.registry.register(_PoolCollector(pool, cache))
