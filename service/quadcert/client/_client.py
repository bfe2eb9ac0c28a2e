"""httpx-based clients; responses become the engine's own result types."""

from __future__ import annotations

import math
from decimal import Decimal, InvalidOperation
from typing import Any, Self

import httpx
import simplejson
from tenacity import AsyncRetrying, Retrying, retry_if_exception, stop_after_attempt

from ..errors import ProblemError
from ..results import CheckResult, IntegralResult, Plan, check_from, integral_from, plan_from

DEFAULT_URL = "http://127.0.0.1:8000"


_JSON = {"content-type": "application/json"}
_NUMBERS = ("tolerance", "relative_tolerance", "claimed_value")


def _exact(value: Any) -> Any:
    """Decimal text (such as a claim read from a solver's output) goes out as a JSON number with those digits."""
    if isinstance(value, str):
        try:
            number = Decimal(value.strip())
        except InvalidOperation:
            return value
        return number if number.is_finite() else value
    return value


def _encode(body: Any) -> bytes:
    """JSON with Decimals written as their digits, so the server certifies the number typed, not a float."""
    text: str = simplejson.dumps(body, use_decimal=True, allow_nan=False)
    return text.encode()


def _limit(value: Any) -> Any:
    """An infinite limit (math.inf, Decimal('-Infinity')) goes out as the text "inf" or "-inf": JSON has no
    infinity."""
    if isinstance(value, (float, Decimal)) and not isinstance(value, bool) and value in (math.inf, -math.inf):
        return "inf" if value > 0 else "-inf"
    return value


def _request(
    integrand: str, lower_limit: Any, upper_limit: Any, tolerance: Any, options: dict[str, Any]
) -> dict[str, Any]:
    body = {
        "integrand": integrand,
        "lower_limit": _limit(lower_limit),
        "upper_limit": _limit(upper_limit),
        "tolerance": tolerance,
    }
    body.update({k: v for k, v in options.items() if v is not None})
    return _exact_numbers(body)


def _exact_numbers(body: dict[str, Any]) -> dict[str, Any]:
    """Numbers given as decimal text go out as JSON numbers with exactly those digits."""
    return {k: _exact(v) if k in _NUMBERS else v for k, v in body.items()}


def _answer(response: httpx.Response) -> dict[str, Any]:
    try:
        body = response.json()
    except ValueError:
        body = None
    if response.status_code >= 400 or not isinstance(body, dict):
        retry_after = _seconds(response.headers.get("retry-after"))
        if isinstance(body, dict) and "code" in body:
            raise ProblemError(body, retry_after)
        raise ProblemError(
            {"status": response.status_code, "code": "unexpected_response", "detail": response.text[:200]}, retry_after
        )
    return body


def _seconds(header: str | None) -> float | None:
    try:
        return max(0.0, float(header)) if header is not None else None
    except ValueError:
        return None


def _unreachable(base_url: str, error: httpx.HTTPError) -> ProblemError:
    """A transport failure as an error of our own hierarchy (no status: no HTTP answer came)."""
    kind = "timed_out" if isinstance(error, httpx.TimeoutException) else "service_unreachable"
    return ProblemError({"code": kind, "detail": f"no answer from {base_url}: {type(error).__name__}: {error}"})


#: at most this many tries for one call, and at most this long between two
ATTEMPTS = 3
LONGEST_WAIT = 30.0


def _retryable(error: BaseException) -> bool:
    """503 (saturated, draining, a lost worker, too many connections) and transport failures: every call
    here is a pure computation, so sending it again is always safe."""
    return isinstance(error, ProblemError) and error.status in (None, 503) and error.code != "timed_out"


def _wait(state: Any) -> float:
    """The server's Retry-After when it gave one, else 0.5 s, 1 s, 2 s ..."""
    error = state.outcome.exception() if state.outcome else None
    advised: float | None = getattr(error, "retry_after", None)
    if advised is not None:
        return min(float(advised), LONGEST_WAIT)
    attempt: int = state.attempt_number
    return min(0.5 * 2.0 ** (attempt - 1), LONGEST_WAIT)


def _retrying(attempts: int) -> dict[str, Any]:
    return {
        "stop": stop_after_attempt(max(1, attempts)),
        "wait": _wait,
        "retry": retry_if_exception(_retryable),
        "reraise": True,
    }


def _checked_url(url: str) -> str:
    """A base URL with its scheme: ``localhost:8000`` alone is a mistake to name, not to guess at."""
    if not url.startswith(("http://", "https://")):
        raise ProblemError(
            {
                "code": "invalid_url",
                "detail": f"{url!r} is not an http:// or https:// URL; write http://{url}",
            }
        )
    return url


def _batch(body: dict[str, Any]) -> list[IntegralResult | ProblemError]:
    return [
        ProblemError(item) if "code" in item and "value" not in item else integral_from(item)
        for item in body["results"]
    ]


class Client:
    """Blocking client. Pass ``transport=httpx.ASGITransport(app)`` to talk to an app in-process."""

    def __init__(
        self, base_url: str = DEFAULT_URL, *, timeout: float = 60.0, attempts: int = ATTEMPTS, **httpx_options: Any
    ) -> None:
        self._http = httpx.Client(base_url=_checked_url(base_url), timeout=timeout, **httpx_options)
        self._attempts = attempts

    def _post(self, path: str, body: Any) -> dict[str, Any]:
        """POST with retries on 503 (honouring Retry-After) and transport failures, which become ProblemError."""
        for attempt in Retrying(**_retrying(self._attempts)):
            with attempt:
                try:
                    response = self._http.post(path, content=_encode(body), headers=_JSON)
                except httpx.HTTPError as error:
                    raise _unreachable(str(self._http.base_url), error) from None
                return _answer(response)
        raise AssertionError("unreachable")  # tenacity either returns or re-raises

    def __enter__(self) -> Self:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def close(self) -> None:
        self._http.close()

    def integrate(
        self, integrand: str, lower_limit: Any, upper_limit: Any, tolerance: float = 1e-8, **options: Any
    ) -> IntegralResult:
        body = _request(integrand, lower_limit, upper_limit, tolerance, options)
        return integral_from(self._post("/v1/integrals", body))

    def batch(self, items: list[dict[str, Any]]) -> list[IntegralResult | ProblemError]:
        return _batch(self._post("/v1/integrals/batch", {"items": [_exact_numbers(i) for i in items]}))

    def picture(
        self, integrand: str, lower_limit: Any, upper_limit: Any, tolerance: float = 1e-8, **options: Any
    ) -> dict[str, Any]:
        """The certified integral and its picture's data, as ``POST /v1/pictures`` answers them."""
        return self._post("/v1/pictures", _request(integrand, lower_limit, upper_limit, tolerance, options))

    def check(
        self,
        integrand: str,
        lower_limit: Any,
        upper_limit: Any,
        claimed_value: float,
        tolerance: float = 1e-8,
        **options: Any,
    ) -> CheckResult:
        body = _request(integrand, lower_limit, upper_limit, tolerance, {**options, "claimed_value": claimed_value})
        return check_from(self._post("/v1/checks", body))

    def plan(self, integrand: str, lower_limit: Any, upper_limit: Any, tolerance: float = 1e-8, **options: Any) -> Plan:
        body = _request(integrand, lower_limit, upper_limit, tolerance, options)
        return plan_from(self._post("/v1/plans", body))

    def healthy(self) -> bool:
        try:
            return self._http.get("/healthz").status_code == 200
        except httpx.HTTPError:
            return False


class AsyncClient:
    """The same calls as :class:`Client`, awaitable."""

    def __init__(
        self, base_url: str = DEFAULT_URL, *, timeout: float = 60.0, attempts: int = ATTEMPTS, **httpx_options: Any
    ) -> None:
        self._http = httpx.AsyncClient(base_url=_checked_url(base_url), timeout=timeout, **httpx_options)
        self._attempts = attempts

    async def _post(self, path: str, body: Any) -> dict[str, Any]:
        async for attempt in AsyncRetrying(**_retrying(self._attempts)):
            with attempt:
                try:
                    response = await self._http.post(path, content=_encode(body), headers=_JSON)
                except httpx.HTTPError as error:
                    raise _unreachable(str(self._http.base_url), error) from None
                return _answer(response)
        raise AssertionError("unreachable")

    async def __aenter__(self) -> Self:
        return self

    async def __aexit__(self, *exc: object) -> None:
        await self.aclose()

    async def aclose(self) -> None:
        await self._http.aclose()

    async def integrate(
        self, integrand: str, lower_limit: Any, upper_limit: Any, tolerance: float = 1e-8, **options: Any
    ) -> IntegralResult:
        body = _request(integrand, lower_limit, upper_limit, tolerance, options)
        return integral_from(await self._post("/v1/integrals", body))

    async def batch(self, items: list[dict[str, Any]]) -> list[IntegralResult | ProblemError]:
        return _batch(await self._post("/v1/integrals/batch", {"items": [_exact_numbers(i) for i in items]}))

    async def check(
        self,
        integrand: str,
        lower_limit: Any,
        upper_limit: Any,
        claimed_value: float,
        tolerance: float = 1e-8,
        **options: Any,
    ) -> CheckResult:
        body = _request(integrand, lower_limit, upper_limit, tolerance, {**options, "claimed_value": claimed_value})
        return check_from(await self._post("/v1/checks", body))

    async def plan(
        self, integrand: str, lower_limit: Any, upper_limit: Any, tolerance: float = 1e-8, **options: Any
    ) -> Plan:
        body = _request(integrand, lower_limit, upper_limit, tolerance, options)
        return plan_from(await self._post("/v1/plans", body))
