"""A pool of engine worker processes with hard per-job deadlines and a bounded queue.

CPU work never runs on the event loop.  Each worker serves one job at a
time over a pipe; a job that overruns its deadline has its worker killed and
replaced, so one runaway formula cannot hold a slot or affect other jobs.
A worker that dies mid-job yields a clear error for that job only.
"""

from __future__ import annotations

import asyncio
import itertools
import logging
import multiprocessing
import multiprocessing.connection
import os
import signal
from dataclasses import dataclass, field
from typing import Any

from ..errors import DeadlineExceeded, Saturated, ServiceError, ShuttingDown, WorkerLost
from ._jobs import execute

log = logging.getLogger("quadcert.pool")


def _worker_main(connection: multiprocessing.connection.Connection, backend: str = "flint") -> None:
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # the parent decides when workers stop
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    if backend == "flint":
        from ..arithmetic import claim_flint_context

        claim_flint_context()  # a worker runs one job at a time on one thread: it owns flint's context
    while True:
        try:
            message = connection.recv()
        except (EOFError, OSError):
            return
        if message is None:
            return
        job_id, kind, request = message
        answer = execute(kind, request)
        try:
            connection.send((job_id, answer))
        except (BrokenPipeError, OSError):
            return


@dataclass
class _Job:
    kind: str
    request: dict[str, Any]
    deadline: float
    future: asyncio.Future = field(repr=False)


class _Worker:
    def __init__(self, context: multiprocessing.context.BaseContext, backend: str) -> None:
        parent, child = context.Pipe()
        self.connection = parent
        self.process = context.Process(target=_worker_main, args=(child, backend), daemon=True)
        self.process.start()
        child.close()
        self.busy = False

    def kill(self) -> None:
        if self.process.is_alive():
            self.process.kill()
        self.process.join(timeout=5)
        self.connection.close()


class WorkerPool:
    """``await pool.run(kind, request, deadline)`` → the job's answer dict."""

    def __init__(self, size: int, queue_limit: int, backend: str = "flint") -> None:
        self.size = size
        self.backend = backend
        self.queue_limit = queue_limit
        self._context = multiprocessing.get_context("spawn")
        self._queue: asyncio.Queue[_Job] | None = None
        self._workers: list[_Worker] = []
        self._tasks: list[asyncio.Task] = []
        self._ids = itertools.count()
        self._pending = 0
        self.closed = False
        self.restarts = 0
        self.completed = 0

    # -- lifecycle ---------------------------------------------------------------------------
    async def start(self) -> None:
        self._queue = asyncio.Queue()
        loop = asyncio.get_running_loop()
        self._workers = await loop.run_in_executor(None, lambda: [_Worker(self._context, self.backend) for _ in range(self.size)])
        self._tasks = [asyncio.create_task(self._serve(i)) for i in range(self.size)]

    async def close(self) -> None:
        self.closed = True
        for task in self._tasks:
            task.cancel()
        await asyncio.gather(*self._tasks, return_exceptions=True)
        for worker in self._workers:
            try:
                worker.connection.send(None)
            except OSError:
                pass
        loop = asyncio.get_running_loop()
        await loop.run_in_executor(None, lambda: [w.kill() for w in self._workers])
        if self._queue is not None:
            while not self._queue.empty():
                job = self._queue.get_nowait()
                if not job.future.done():
                    job.future.set_exception(ShuttingDown("the service is shutting down"))

    # -- state for probes and metrics --------------------------------------------------------
    @property
    def pending(self) -> int:
        return self._pending

    @property
    def alive(self) -> int:
        return sum(1 for w in self._workers if w.process.is_alive())

    @property
    def ready(self) -> bool:
        return not self.closed and self.alive > 0 and self._pending < self.queue_limit

    def pids(self) -> list[int]:
        return [w.process.pid for w in self._workers if w.process.pid is not None]

    # -- submitting --------------------------------------------------------------------------
    async def run(self, kind: str, request: dict[str, Any], deadline_seconds: float,
                  wait_for_slot: float = 0.0) -> dict[str, Any]:
        if self.closed or self._queue is None:
            raise ShuttingDown("the service is shutting down")
        if self._pending >= self.queue_limit:
            if wait_for_slot <= 0:
                raise Saturated("all workers are busy and the queue is full")
            await self._wait_for_slot(wait_for_slot)
        loop = asyncio.get_running_loop()
        job = _Job(kind, request, deadline_seconds, loop.create_future())
        self._pending += 1
        try:
            self._queue.put_nowait(job)
            return await job.future
        finally:
            self._pending -= 1

    async def _wait_for_slot(self, patience: float) -> None:
        loop = asyncio.get_running_loop()
        until = loop.time() + patience
        while self._pending >= self.queue_limit:
            if loop.time() > until or self.closed:
                raise Saturated("all workers are busy and the queue is full")
            await asyncio.sleep(0.01)

    async def _serve(self, index: int) -> None:
        assert self._queue is not None
        while True:
            job = await self._queue.get()
            if job.future.done():  # the caller went away
                continue
            try:
                answer = await self._dispatch(index, job)
            except ServiceError as error:
                if not job.future.done():
                    job.future.set_exception(error)
            else:
                self.completed += 1
                if not job.future.done():
                    job.future.set_result(answer)

    async def _dispatch(self, index: int, job: _Job) -> dict[str, Any]:
        worker = self._workers[index]
        if not worker.process.is_alive():
            worker = await self._replace(index)
        job_id = next(self._ids)
        loop = asyncio.get_running_loop()
        received: asyncio.Future = loop.create_future()
        fd = worker.connection.fileno()

        def readable() -> None:
            if received.done():
                return
            try:
                received.set_result(worker.connection.recv())
            except (EOFError, OSError) as error:
                received.set_exception(WorkerLost(f"the worker stopped during the job ({error or 'EOF'})"))

        try:
            worker.connection.send((job_id, job.kind, job.request))
        except (BrokenPipeError, OSError):
            await self._replace(index)
            raise WorkerLost("the worker was gone before the job started") from None
        loop.add_reader(fd, readable)
        try:
            reply_id, answer = await asyncio.wait_for(received, timeout=job.deadline)
        except asyncio.TimeoutError:
            loop.remove_reader(fd)
            log.warning("job over deadline; restarting worker", extra={"kind": job.kind,
                                                                        "deadline": job.deadline})
            await self._replace(index)
            raise DeadlineExceeded(f"the computation passed its {job.deadline:g} s deadline") from None
        except WorkerLost:
            loop.remove_reader(fd)
            await self._replace(index)
            raise
        except asyncio.CancelledError:
            loop.remove_reader(fd)
            await self._replace(index)
            raise
        loop.remove_reader(fd)
        if reply_id != job_id:  # cannot happen with one job per worker; refuse rather than mix answers
            await self._replace(index)
            raise WorkerLost("the worker answered out of order")
        return answer

    async def _replace(self, index: int) -> _Worker:
        old = self._workers[index]
        loop = asyncio.get_running_loop()
        await loop.run_in_executor(None, old.kill)
        if self.closed:
            raise ShuttingDown("the service is shutting down")
        fresh = await loop.run_in_executor(None, lambda: _Worker(self._context, self.backend))
        self._workers[index] = fresh
        self.restarts += 1
        return fresh

