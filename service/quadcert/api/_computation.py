"""Between routes and workers: validate cheaply in-process, consult the cache, run in the pool.

Every method answers ``(status, body)`` with the real HTTP status, where body is a response dict or a
problem dict, so routes and the batch endpoint share one path and nothing raises past here.
"""

from __future__ import annotations

import asyncio
import logging
import time
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass
from decimal import Decimal
from fractions import Fraction
from typing import Any

from .._version import ENGINE_VERSION
from ..errors import EngineDefect, QuadcertError, ServiceError
from ..quadrature import Request
from ._cache import ResultCache, cache_key
from ._jobs import TASKS, Job
from ._metrics import Metrics
from ._pool import WorkerPool
from ._problems import problem_for
from ._settings import Settings

log = logging.getLogger("quadcert.computation")

Answer = tuple[int, dict[str, Any]]
_INLINE_PARSE_CHARS = 256  # shorter formulas parse in microseconds; a thread hop would cost more
#: one parsing thread: more would only take turns at the GIL with the event loop and each other
_PARSER = ThreadPoolExecutor(max_workers=1, thread_name_prefix="quadcert-parse")


def _fraction_text(value: Fraction) -> str:
    return f"{value.numerator}/{value.denominator}"


def _exact_text(value: Any) -> Any:
    """Decimals (JSON numbers as typed) keyed by their exact value, so 1e-8 and 0.00000001 share an entry."""
    if isinstance(value, Decimal) and value.is_finite():
        return _fraction_text(Fraction(value)) if abs(value.adjusted()) <= 1000 else str(value)
    return str(value) if isinstance(value, Decimal) else value


@dataclass(frozen=True)
class Prepared:
    """A request parsed on the event loop, and its cache key's content."""

    request: Request
    canonical: dict[str, Any]


class Computation:
    def __init__(self, settings: Settings, pool: WorkerPool, cache: ResultCache, metrics: Metrics) -> None:
        self.settings = settings
        self.pool = pool
        self.cache = cache
        self.metrics = metrics

    # -- shared pieces -----------------------------------------------------------------------
    def prepare(self, body: dict[str, Any]) -> Prepared:
        """Parse and validate once, in-process: coded errors come back fast, without a worker, and the worker
        gets the parsed request."""
        request = Request.build(
            body["integrand"],
            body["lower_limit"],
            body["upper_limit"],
            body.get("tolerance", Decimal("1e-8")),
            variable=body.get("variable", "x"),
            parameters=body.get("parameters"),
            relative_tolerance=body.get("relative_tolerance"),
            max_nodes=self.settings.default_max_nodes if body.get("max_nodes") is None else body["max_nodes"],
            rule=body.get("rule") or "simpson",
        )
        canonical: dict[str, Any] = {
            **request.canonical(),
            **{
                k: _exact_text(body.get(k))
                for k in (
                    "tolerance",
                    "relative_tolerance",
                    "max_nodes",
                    "include_mesh",
                    "claimed_value",
                    "sensitivities",
                )
                if k in body
            },
        }
        return Prepared(request, canonical)

    async def prepared(self, body: dict[str, Any]) -> Prepared:
        """:meth:`prepare`, off the event loop when the formula is long enough to take a while."""
        if len(body.get("integrand", "")) > _INLINE_PARSE_CHARS:
            return await asyncio.get_running_loop().run_in_executor(_PARSER, self.prepare, body)
        return self.prepare(body)

    async def validate(self, body: dict[str, Any], context: dict[str, Any]) -> Answer:
        """Whether a request would be taken, without computing it: its canonical form, or the problem."""
        try:
            prepared = await self.prepared(body)
        except QuadcertError as error:
            problem = problem_for(error, **context)
            return problem["status"], problem
        return 200, {"valid": True, "canonical": prepared.canonical, "engine_version": ENGINE_VERSION}

    def _job(self, kind: str, body: dict[str, Any], request: Request, deadline: float) -> Job:
        include_mesh = bool(body.get("include_mesh")) or kind.startswith("picture")
        return Job(
            request,
            echo=body,
            include_mesh=include_mesh,
            max_mesh_panels=self.settings.max_mesh_panels if include_mesh else None,
            claimed_value=body.get("claimed_value"),
            deadline_seconds=None if kind == "plan" else deadline * 0.8,
            picture="svg" if kind == "picture-svg" else "json",
            options={"sensitivities": True} if body.get("sensitivities") and kind in ("integral", "check") else {},
        )

    async def _run(
        self,
        kind: str,
        body: dict[str, Any],
        deadline: float,
        wait: float,
        context: dict[str, Any],
        group: str | None = None,
        compute: float | None = None,
        prepared: Prepared | None = None,
    ) -> tuple[Answer, str | None]:
        try:
            prepared = prepared or await self.prepared(body)
        except QuadcertError as error:
            problem = problem_for(error, **context)
            return (problem["status"], problem), None
        key = cache_key(kind, prepared.canonical)
        cached = self.cache.get(key)
        if cached is not None:
            return (200, {**cached, "cached": True, "compute_seconds": 0.0}), key
        started = time.perf_counter()
        try:
            answer = await self.pool.run(
                TASKS[kind],
                self._job(kind, body, prepared.request, compute or deadline),
                deadline + 1.0,
                wait,
                group=group,
                compute_seconds=None if compute is None else compute + 1.0,
            )
        except ServiceError as error:
            self.metrics.results.labels(error.code).inc()
            problem = problem_for(error, **context)
            return (problem["status"], problem), key
        self.metrics.engine_seconds.observe(time.perf_counter() - started)
        if "error" in answer:
            refusal: QuadcertError = answer["error"]
            self.metrics.results.labels("refused").inc()
            if isinstance(refusal, EngineDefect):
                log.error("engine failure", extra={"detail": refusal.message, "trace": refusal.trace})
            problem = problem_for(refusal, **context)
            return (problem["status"], problem), key
        result = answer["ok"]
        self.metrics.results.labels("certified").inc()
        return (200, result), key

    # -- integrals ---------------------------------------------------------------------------
    async def integral(
        self,
        body: dict[str, Any],
        context: dict[str, Any],
        wait: float = 0.0,
        deadline: float | None = None,
        group: str | None = None,
        compute: float | None = None,
        prepared: Prepared | None = None,
    ) -> tuple[Answer, str | None]:
        """One integral. ``deadline`` (seconds from now) covers queueing and computing; a batch item also
        passes ``compute`` (its own engine time), ``wait`` (patience for queue room) and its batch's ``group``."""
        deadline = deadline or self.settings.request_deadline_seconds
        (status, result), key = await self._run("integral", body, deadline, wait, context, group, compute, prepared)
        if status != 200 or result.get("cached"):
            return (status, result), key
        response = result  # already the answer's shape (results.integral_body, built in the worker)
        if key is not None and result["stop_reason"] != "deadline":
            self.cache.put(key, response)
        return (200, {**response, "cached": False}), key

    async def picture(
        self, body: dict[str, Any], context: dict[str, Any], kind: str = "json", prepared: Prepared | None = None
    ) -> Answer:
        """An integral and its picture, made in a worker: ``json`` (the encoded body of POST /v1/pictures, bytes)
        or ``svg`` (a document for reports, text)."""
        deadline = self.settings.request_deadline_seconds
        (status, result), key = await self._run(f"picture-{kind}", body, deadline, 0.0, context, prepared=prepared)
        if status != 200 or result.get("cached"):
            return status, result
        if key is not None and result["stop_reason"] != "deadline":
            self.cache.put(key, result)
        return 200, result

    async def check(self, body: dict[str, Any], context: dict[str, Any]) -> Answer:
        (status, result), key = await self._run("check", body, self.settings.request_deadline_seconds, 0.0, context)
        if status != 200 or result.get("cached"):
            return status, result
        response = {**result, "integral": {**result["integral"], "cached": False}}
        if key is not None and result["verdict"] != "undecided":
            self.cache.put(key, response)
        return 200, response

    async def plan(self, body: dict[str, Any], context: dict[str, Any]) -> Answer:
        (status, result), key = await self._run("plan", body, self.settings.request_deadline_seconds, 0.0, context)
        if status != 200 or result.get("cached"):
            return status, result
        response = {**result, "engine_version": ENGINE_VERSION}
        if key is not None:
            self.cache.put(key, response)
        return 200, response
