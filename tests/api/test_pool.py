"""The worker pool: hard deadlines, killed workers, saturation, and recovery."""

from __future__ import annotations

import asyncio
import os
import signal

import pytest

from quadcert.api._jobs import Job, run_integral
from quadcert.api._pool import WorkerPool
from quadcert.errors import DeadlineExceeded, Saturated, ShuttingDown, WorkerLost
from quadcert.quadrature import Request
from tests.api.slow_task import sleep
from tests.conftest import HP, encloses


def _integral(integrand: str, lower: object, upper: object, tolerance: float) -> Job:
    return Job(Request.build(integrand, lower, upper, tolerance), echo={})


pytestmark = pytest.mark.anyio


@pytest.fixture
def anyio_backend() -> str:
    return "asyncio"


async def test_deadline_kills_and_replaces_the_worker() -> None:
    pool = WorkerPool(1, 4)
    await pool.start()
    try:
        with pytest.raises(DeadlineExceeded):
            await pool.run(sleep, {"seconds": 30}, deadline_seconds=0.5)
        assert pool.restarts == 1
        answer = await pool.run(run_integral, _integral("x", 0, 1, 1e-6), deadline_seconds=30)
        assert encloses(answer["ok"]["enclosure"], HP.mpf(1) / 2)  # closed form 1/2
    finally:
        await pool.close()


async def test_killed_worker_fails_only_its_job() -> None:
    pool = WorkerPool(2, 8)
    await pool.start()
    try:
        slow = asyncio.create_task(pool.run(sleep, {"seconds": 5}, deadline_seconds=30))
        await asyncio.sleep(0.3)
        busy = next(w for w in pool._workers if w.process.is_alive())  # the first worker takes the first job
        os.kill(busy.process.pid, signal.SIGKILL)
        others = await asyncio.gather(*(pool.run(run_integral, _integral("x^2", 0, 3, 1e-9), 30) for _ in range(4)))
        assert all(encloses(o["ok"]["enclosure"], 9) for o in others)  # closed form 3^3/3
        with pytest.raises(WorkerLost):
            await slow
        await asyncio.sleep(0.1)
        assert pool.alive == 2 and pool.restarts >= 1
    finally:
        await pool.close()


async def test_saturation_is_refused_not_queued_forever() -> None:
    pool = WorkerPool(1, 2)
    await pool.start()
    try:
        jobs = [asyncio.create_task(pool.run(sleep, {"seconds": 0.5}, 10)) for _ in range(2)]
        await asyncio.sleep(0.05)
        with pytest.raises(Saturated):
            await pool.run(sleep, {"seconds": 0}, 10)
        waited = await pool.run(sleep, {"seconds": 0}, 10, wait_for_slot=5)  # batches wait for a slot
        assert waited == {"ok": {"slept": 0}}
        await asyncio.gather(*jobs)
    finally:
        await pool.close()
    with pytest.raises(ShuttingDown):
        await pool.run(sleep, {"seconds": 0}, 10)


async def test_engine_errors_come_back_as_answers() -> None:
    pool = WorkerPool(1, 2)
    await pool.start()
    try:
        answer = await pool.run(run_integral, _integral("1/x", -1, 1, 1e-6), 10)
        assert answer["error"].code == "divergent_integral" and answer["error"].location is not None
    finally:
        await pool.close()


async def test_queue_wait_is_measured_and_counts_against_the_deadline() -> None:
    """One worker busy for 1 s: a job queued behind it with a 0.3 s deadline is answered DeadlineExceeded
    without running, and the pool reports how long its oldest job has waited (for /readyz)."""
    pool = WorkerPool(1, 8)
    await pool.start()
    try:
        busy = asyncio.create_task(pool.run(sleep, {"seconds": 1.0}, 10))
        await asyncio.sleep(0.1)
        waiting = asyncio.create_task(pool.run(sleep, {"seconds": 0}, 10))
        late = asyncio.create_task(pool.run(sleep, {"seconds": 0}, 0.3))
        await asyncio.sleep(0.4)
        assert pool.oldest_wait() >= 0.3
        await busy
        assert await waiting == {"ok": {"slept": 0}}
        with pytest.raises(DeadlineExceeded, match="queue"):
            await late
        assert pool.oldest_wait() == 0.0
    finally:
        await pool.close()


async def test_close_answers_queued_and_running_jobs() -> None:
    pool = WorkerPool(1, 8)
    await pool.start()
    running = asyncio.create_task(pool.run(sleep, {"seconds": 30}, 60))
    queued = asyncio.create_task(pool.run(sleep, {"seconds": 0}, 60))
    await asyncio.sleep(0.3)
    await asyncio.wait_for(pool.close(), timeout=20)  # never waits on the sleeping worker
    for job in (running, queued):
        with pytest.raises(ShuttingDown):
            await job
    assert pool.alive == 0
