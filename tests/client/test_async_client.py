"""The async client in-process over httpx's ASGI transport."""

from __future__ import annotations

import math

import httpx
import pytest

from quadcert.api import Settings, create_app
from quadcert.client import AsyncClient
from quadcert.errors import ProblemError
from tests.conftest import HP, encloses

pytestmark = pytest.mark.anyio


@pytest.fixture
def anyio_backend() -> str:
    return "asyncio"


async def test_async_client_calls() -> None:
    app = create_app(Settings(workers=1, log_level="WARNING"))
    async with app.router.lifespan_context(app):
        transport = httpx.ASGITransport(app=app)
        async with AsyncClient("http://quadcert.test", transport=transport) as client:
            result = await client.integrate("1/(1+25*x^2)", -1, 1, 1e-10)
            assert encloses(result.enclosure, 2 * HP.atan(5) / 5)  # closed form
            verdict = await client.check("1/(1+25*x^2)", -1, 1, 0.5, 1e-6)
            assert verdict.verdict == "fail" and verdict.distance[0] > 1e-6
            planned = await client.plan("exp(x)", 0, 2, 0.5e-4)
            assert planned.trapezoid.nodes == 315  # hand calculation, see tests/quadrature/test_planner.py
            mixed = await client.batch(
                [
                    {"integrand": "x", "lower_limit": 0, "upper_limit": 2},
                    {"integrand": "log(x)", "lower_limit": -1, "upper_limit": 1},
                ]
            )
            # closed form 2^2/2 for the first item
            assert encloses(mixed[0].enclosure, 2) and mixed[1].code == "undefined_at_point"
            tail = await client.integrate("exp(-x^2)", -math.inf, "inf", 1e-9, include_mesh=True)
            assert encloses(tail.enclosure, HP.sqrt(HP.pi))  # A&S 7.1.1: the integral over the line is √π
            assert tail.mesh[0].lower == -math.inf and tail.mesh[-1].upper == math.inf
            assert tail.mesh[-1].bound == "tail-envelope" and tail.bounds_used["tail-envelope"] == 2
            with pytest.raises(ProblemError) as info:
                await client.integrate("1/x", 1, math.inf)
            assert info.value.problem["code"] == "divergent_integral"
            assert info.value.problem["location"] == ["inf", "inf"]
            with pytest.raises(ProblemError) as info:
                await client.integrate("x +", 0, 1)
            assert info.value.problem["code"] == "unexpected_end"
