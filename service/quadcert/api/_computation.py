"""Between routes and workers: validate cheaply in-process, consult the cache, run in the pool.

Every method answers ``(status, body)`` with the real HTTP status, where body is a response dict or a
problem dict, so routes and the batch endpoint share one path and nothing raises past here.
"""

from __future__ import annotations

import asyncio
import logging
import time
from concurrent.futures import ThreadPoolExecutor
from decimal import Decimal
from fractions import Fraction
from typing import Any

from .._version import ENGINE_VERSION
from ..errors import QuadcertError, ServiceError
from ..formula import parse
from ..quadrature._endpoints import parse_limit
from ..quadrature._inputs import check_parameters
from ._cache import ResultCache, cache_key
from ._jobs import _error
from ._metrics import Metrics
from ._pool import WorkerPool
from ._problems import from_engine_error, problem_body
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


class Computation:
    def __init__(self, settings: Settings, pool: WorkerPool, cache: ResultCache, metrics: Metrics) -> None:
        self.settings = settings
        self.pool = pool
        self.cache = cache
        self.metrics = metrics

    # -- shared pieces -----------------------------------------------------------------------
    def canonical(self, body: dict[str, Any]) -> dict[str, Any]:
        """Parse formula, limits and parameters in-process: coded errors come back fast, without a worker."""
        values = check_parameters(body.get("parameters"))
        formula = parse(body["integrand"], variable=body.get("variable", "x"), parameters=tuple(values))
        lower = parse_limit(body["lower_limit"], "lower_limit", tuple(values))
        upper = parse_limit(body["upper_limit"], "upper_limit", tuple(values))
        return {
            "integrand": formula.text,
            "variable": formula.variable,
            "lower": lower.text,
            "upper": upper.text,
            "parameters": {k: _fraction_text(v) for k, v in sorted(values.items())},
            **{
                k: _exact_text(body.get(k))
                for k in ("tolerance", "relative_tolerance", "max_nodes", "include_mesh", "claimed_value")
                if k in body
            },
        }

    def _engine_request(self, kind: str, body: dict[str, Any], deadline: float) -> dict[str, Any]:
        request = {k: v for k, v in body.items() if v is not None}
        if kind != "plan":
            request.setdefault("max_nodes", self.settings.default_max_nodes)
            request["deadline_seconds"] = deadline * 0.8
            if request.get("include_mesh"):
                request["max_mesh_panels"] = self.settings.max_mesh_panels
        return request

    async def _run(
        self,
        kind: str,
        body: dict[str, Any],
        deadline: float,
        wait: float,
        context: dict[str, Any],
        group: str | None = None,
        compute: float | None = None,
    ) -> tuple[Answer, str | None]:
        try:
            if len(body.get("integrand", "")) > _INLINE_PARSE_CHARS:  # long text: parse off the event loop
                canonical = await asyncio.get_running_loop().run_in_executor(_PARSER, self.canonical, body)
            else:
                canonical = self.canonical(body)
        except QuadcertError as error:
            problem = problem_body(**_problem_args(_error(error)), **context)
            return (problem["status"], problem), None
        key = cache_key(kind, canonical)
        cached = self.cache.get(key)
        if cached is not None:
            return (200, {**cached, "cached": True, "compute_seconds": 0.0}), key
        started = time.perf_counter()
        try:
            answer = await self.pool.run(
                kind,
                self._engine_request(kind, body, compute or deadline),
                deadline + 1.0,
                wait,
                group=group,
                compute_seconds=None if compute is None else compute + 1.0,
            )
        except ServiceError as error:
            self.metrics.results.labels(error.code).inc()
            problem = problem_body(error.code, str(error), **context)
            return (problem["status"], problem), key
        self.metrics.engine_seconds.observe(time.perf_counter() - started)
        if "error" in answer:
            self.metrics.results.labels("refused").inc()
            if answer["error"]["code"] == "internal_error":
                log.error(
                    "engine failure", extra={"detail": answer["error"]["detail"], "trace": answer["error"].get("trace")}
                )
                answer["error"].pop("trace", None)
            problem = from_engine_error(answer["error"], **context)
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
    ) -> tuple[Answer, str | None]:
        """One integral. ``deadline`` (seconds from now) covers queueing and computing; a batch item also
        passes ``compute`` (its own engine time), ``wait`` (patience for queue room) and its batch's ``group``."""
        deadline = deadline or self.settings.request_deadline_seconds
        (status, result), key = await self._run("integral", body, deadline, wait, context, group, compute)
        if status != 200 or result.get("cached"):
            return (status, result), key
        response = result  # already the answer's shape (results.integral_body, built in the worker)
        if key is not None and result["stop_reason"] != "deadline":
            self.cache.put(key, response)
        return (200, {**response, "cached": False}), key

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


def _problem_args(error: dict[str, Any]) -> dict[str, Any]:
    args = {"code": error["code"], "detail": error["detail"]}
    for name in ("column", "field"):
        if error.get(name) is not None:
            args[name] = error[name]
    if error.get("location"):
        args["location"] = tuple(error["location"])
    return args
