"""A pool of engine worker processes: fair queueing, deadlines that include the wait, a shutdown that ends.

CPU work never runs on the event loop. Each worker serves one job at a time over a socket pair, which the loop
reads without blocking as the bytes arrive, so a reply of any size (a 100,000-panel mesh) arrives whole.

* **Deadlines cover queueing.** A job carries the absolute time by which its caller needs an answer. One that
  is still queued then is answered 504 without running; one that runs is given only what is left, and its
  worker is killed and replaced if it overruns.
* **Fair sharing.** Jobs are queued per group: a batch is one group, every single request is a group of its
  own. A free worker takes the next job of the group served least so far, and one group may hold only a share
  of the queue, so a 500-item batch cannot make single requests wait behind all of it.
* **Shutdown always ends.** :meth:`close` answers every queued and running job with ``ShuttingDown`` (503),
  kills the workers and returns; it never waits on a worker.
"""

from __future__ import annotations

import asyncio
import importlib
import itertools
import logging
import multiprocessing
import multiprocessing.connection
import os
import pickle
import signal
import socket
import struct
import traceback
from collections import OrderedDict, deque
from collections.abc import Callable
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass, field
from multiprocessing.reduction import ForkingPickler
from typing import Any

from ..arithmetic import Backend
from ..errors import DeadlineExceeded, EngineDefect, QuadcertError, Saturated, ServiceError, ShuttingDown, WorkerLost

log = logging.getLogger("quadcert.pool")

#: share of the queue one group (a batch) may hold; the rest stays open to everyone else
GROUP_SHARE = 0.5
#: the engine's own soft deadline, as a share of the time left when a job starts (the hard one kills)
ENGINE_SHARE = 0.8


#: modules a worker imports as it starts, before it takes a job: the engine, its tasks and the ball backend, so
#: that a worker's first job does not pay for loading them (its deadline would)
PRELOAD = ("quadcert.api._jobs", "quadcert.arithmetic._flint_backend")


def _worker_main(
    connection: multiprocessing.connection.Connection, backend: Backend = "flint", preload: tuple[str, ...] = PRELOAD
) -> None:
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # the parent decides when workers stop
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    if backend == "flint":
        from ..arithmetic import claim_flint_context

        claim_flint_context()  # a worker runs one job at a time on one thread: it owns flint's context
    for name in preload:
        importlib.import_module(name)
    while True:
        try:
            message = connection.recv()
        except (EOFError, OSError):
            return
        if message is None:
            return
        job_id, task, payload, seconds = message
        answer = execute(task, payload, seconds)
        try:
            connection.send((job_id, answer))
        except (BrokenPipeError, OSError):
            return
        except Exception as error:  # noqa: BLE001 - an answer that does not pickle must still be answered
            connection.send((job_id, {"error": _defect(error)}))


#: a task takes its payload and the seconds its engine may run, and returns the answer's body
Task = Callable[[Any, float | None], dict[str, Any]]


def execute(task: Task, payload: Any, seconds: float | None) -> dict[str, Any]:
    """Never raises: an answer is {"ok": body} or {"error": a QuadcertError, every field intact}."""
    try:
        return {"ok": task(payload, seconds)}
    except QuadcertError as error:
        return {"error": error}
    except Exception as error:  # noqa: BLE001 - every failure must become an answer
        return {"error": _defect(error)}


def _defect(error: Exception) -> EngineDefect:
    return EngineDefect(f"{type(error).__name__}: {error}", trace=traceback.format_exc(limit=8))


@dataclass
class _Job:
    task: Task
    payload: Any
    expires_at: float  # loop time by which the caller needs the answer (queueing included)
    compute_limit: float  # the longest the job may run once a worker takes it
    group: str
    enqueued_at: float
    future: asyncio.Future[dict[str, Any]] = field(repr=False)


def _kill_all(workers: list[_Worker]) -> None:
    for worker in workers:
        worker.kill()


class _Worker:
    def __init__(self, context: multiprocessing.context.SpawnContext, backend: Backend) -> None:
        parent, child = context.Pipe()  # a socket pair on POSIX
        self.connection = parent
        # the parent's end as a non-blocking socket for the event loop: replies of any size are read as they
        # arrive, with no thread in between (a thread per reply queued behind the GIL halved throughput)
        self.socket = socket.socket(fileno=os.dup(parent.fileno()))
        self.socket.setblocking(False)
        self.process = context.Process(target=_worker_main, args=(child, backend), daemon=True)
        self.process.start()
        child.close()

    def kill(self) -> None:
        if self.process.is_alive():
            self.process.kill()
        self.process.join(timeout=5)
        self.socket.close()
        self.connection.close()


async def _send(loop: asyncio.AbstractEventLoop, sock: socket.socket, message: Any) -> None:
    """One message in multiprocessing's framing (the worker reads it with Connection.recv)."""
    payload = ForkingPickler.dumps(message)
    size = len(payload)
    header = struct.pack("!i", size) if size <= 0x7FFFFFFF else struct.pack("!iQ", -1, size)
    await loop.sock_sendall(sock, header + payload)


async def _receive(loop: asyncio.AbstractEventLoop, sock: socket.socket) -> Any:
    """One message written by the worker's Connection.send, read as it arrives."""
    (size,) = struct.unpack("!i", await _exactly(loop, sock, 4))
    if size == -1:
        (size,) = struct.unpack("!Q", await _exactly(loop, sock, 8))
    return pickle.loads(await _exactly(loop, sock, size))


async def _exactly(loop: asyncio.AbstractEventLoop, sock: socket.socket, count: int) -> bytes:
    data = bytearray()
    while len(data) < count:
        chunk = await loop.sock_recv(sock, min(count - len(data), 1 << 20))
        if not chunk:
            raise EOFError("the worker closed its end")
        data += chunk
    return bytes(data)


class WorkerPool:
    """``await pool.run(task, payload, deadline_seconds)`` → the job's answer dict."""

    def __init__(self, size: int, queue_limit: int, backend: Backend = "flint") -> None:
        self.size = size
        self.backend = backend
        self.queue_limit = queue_limit
        self._context = multiprocessing.get_context("spawn")
        self._threads: ThreadPoolExecutor | None = None
        self._groups: OrderedDict[str, deque[_Job]] = OrderedDict()
        self._queued = 0
        self._running: dict[int, _Job] = {}
        self._per_group: dict[str, int] = {}
        self._served: dict[str, int] = {}  # jobs taken per group still holding admitted jobs
        self._changed: asyncio.Condition | None = None
        self._workers: list[_Worker] = []
        self._tasks: list[asyncio.Task[None]] = []
        self._ids = itertools.count()
        self._singles = itertools.count()
        self._pending = 0
        self.closed = False
        self.restarts = 0
        self.completed = 0

    # -- lifecycle ---------------------------------------------------------------------------
    async def start(self) -> None:
        self._changed = asyncio.Condition()
        # for kills and spawns, which wait on processes
        self._threads = ThreadPoolExecutor(max_workers=self.size + 2, thread_name_prefix="quadcert-pool")
        loop = asyncio.get_running_loop()
        self._workers = await loop.run_in_executor(
            self._threads, lambda: [_Worker(self._context, self.backend) for _ in range(self.size)]
        )
        self._tasks = [asyncio.create_task(self._serve(i)) for i in range(self.size)]

    async def close(self) -> None:
        """Answer every queued and running job with ShuttingDown, stop the workers, return. Idempotent."""
        if self.closed and not self._tasks:
            return
        self.closed = True
        self._fail_queued(ShuttingDown("the service is shutting down"))
        for task in self._tasks:
            task.cancel()
        await asyncio.gather(*self._tasks, return_exceptions=True)
        self._tasks = []
        for worker in self._workers:
            if worker.process.is_alive():
                worker.process.kill()  # a signal, not a wait: close never blocks on a worker
        if self._threads is not None:
            threads, workers = self._threads, self._workers
            await asyncio.get_running_loop().run_in_executor(threads, _kill_all, workers)
            threads.shutdown(wait=False, cancel_futures=True)
        if self._changed is not None:
            async with self._changed:
                self._changed.notify_all()

    def _fail_queued(self, error: ServiceError) -> None:
        for jobs in self._groups.values():
            for job in jobs:
                if not job.future.done():
                    job.future.set_exception(error)
        self._groups.clear()
        self._queued = 0

    # -- state for probes and metrics --------------------------------------------------------
    @property
    def pending(self) -> int:
        """Jobs admitted and not yet answered: queued or running."""
        return self._pending

    @property
    def alive(self) -> int:
        return sum(1 for w in self._workers if w.process.is_alive())

    def oldest_wait(self) -> float:
        """Seconds the longest-queued job has waited (0 with an empty queue)."""
        now = asyncio.get_running_loop().time()
        firsts = [jobs[0].enqueued_at for jobs in self._groups.values() if jobs]
        return now - min(firsts) if firsts else 0.0

    @property
    def ready(self) -> bool:
        return not self.closed and self.alive > 0 and self._pending < self.queue_limit

    def pids(self) -> list[int]:
        return [w.process.pid for w in self._workers if w.process.pid is not None]

    # -- submitting --------------------------------------------------------------------------
    async def run(
        self,
        task: Task,
        payload: Any,
        deadline_seconds: float,
        wait_for_slot: float = 0.0,
        group: str | None = None,
        compute_seconds: float | None = None,
    ) -> dict[str, Any]:
        """Run one job. ``deadline_seconds`` counts from now and covers the wait in the queue;
        ``compute_seconds`` caps the run itself (default: whatever is left); ``wait_for_slot`` is how long to
        wait for room instead of answering Saturated at once (batches); jobs of one ``group`` share the
        queue fairly with everyone else."""
        if self.closed or self._changed is None:
            raise ShuttingDown("the service is shutting down")
        loop = asyncio.get_running_loop()
        group = group if group is not None else f"single-{next(self._singles)}"
        await self._admit(group, wait_for_slot)
        now = loop.time()
        job = _Job(
            task,
            payload,
            now + deadline_seconds,
            deadline_seconds if compute_seconds is None else compute_seconds,
            group,
            now,
            loop.create_future(),
        )
        self._pending += 1
        self._per_group[group] = self._per_group.get(group, 0) + 1
        try:
            self._groups.setdefault(group, deque()).append(job)
            self._queued += 1
            async with self._changed:
                self._changed.notify_all()
            return await job.future
        finally:
            self._pending -= 1
            left = self._per_group[group] - 1
            if left:
                self._per_group[group] = left
            else:
                del self._per_group[group]
                self._served.pop(group, None)
            async with self._changed:
                self._changed.notify_all()

    def _has_room(self, group: str) -> bool:
        share = max(1, int(self.queue_limit * GROUP_SHARE))
        return self._pending < self.queue_limit and self._per_group.get(group, 0) < share

    async def _admit(self, group: str, patience: float) -> None:
        """Wait (on events, not by polling) until the queue has room for one more job of this group."""
        if self._has_room(group):
            return
        if patience <= 0:
            raise Saturated("all workers are busy and the queue is full")
        assert self._changed is not None
        try:
            async with self._changed:
                await asyncio.wait_for(
                    self._changed.wait_for(lambda: self.closed or self._has_room(group)), timeout=patience
                )
        except TimeoutError:
            raise Saturated("all workers are busy and the queue is full") from None
        if self.closed:
            raise ShuttingDown("the service is shutting down")

    def _take(self) -> _Job | None:
        """The next job from the group served least so far (then the one waiting longest): a single request
        goes ahead of a batch that has already had workers, and batches take turns."""
        while self._groups:
            group = min(self._groups, key=lambda g: (self._served.get(g, 0), self._groups[g][0].enqueued_at))
            jobs = self._groups[group]
            job = jobs.popleft()
            self._queued -= 1
            if not jobs:
                del self._groups[group]
            if not job.future.done():  # a caller that went away leaves nothing to do
                self._served[group] = self._served.get(group, 0) + 1
                return job
        return None

    # -- serving -----------------------------------------------------------------------------
    async def _serve(self, index: int) -> None:
        assert self._changed is not None
        loop = asyncio.get_running_loop()
        while True:
            async with self._changed:
                await self._changed.wait_for(lambda: self._queued > 0)
                job = self._take()
            if job is None:
                continue
            left = job.expires_at - loop.time()
            if left <= 0:
                job.future.set_exception(
                    DeadlineExceeded(
                        f"the request waited {loop.time() - job.enqueued_at:.3g} s in the queue and passed its "
                        "deadline before a worker was free"
                    )
                )
                continue
            self._running[index] = job
            try:
                answer = await self._dispatch(index, job, min(left, job.compute_limit))
            except ServiceError as error:
                if not job.future.done():
                    job.future.set_exception(error)
            except asyncio.CancelledError:
                if not job.future.done():
                    job.future.set_exception(ShuttingDown("the service is shutting down; the job was stopped"))
                raise
            else:
                self.completed += 1
                if not job.future.done():
                    job.future.set_result(answer)
            finally:
                self._running.pop(index, None)

    async def _dispatch(self, index: int, job: _Job, left: float) -> dict[str, Any]:
        worker = self._workers[index]
        if not worker.process.is_alive():
            worker = await self._replace(index)
        job_id = next(self._ids)
        loop = asyncio.get_running_loop()
        try:
            # the engine stops itself before the hard deadline
            await _send(loop, worker.socket, (job_id, job.task, job.payload, left * ENGINE_SHARE))
        except (BrokenPipeError, OSError, EOFError):
            await self._replace(index)
            raise WorkerLost("the worker was gone before the job started") from None
        except asyncio.CancelledError:
            worker.process.kill()
            raise
        try:
            reply_id, answer = await asyncio.wait_for(_receive(loop, worker.socket), timeout=left)
            reply: dict[str, Any] = answer
        except TimeoutError:
            log.warning("job over deadline; restarting worker", extra={"task": job.task.__name__, "deadline": left})
            await self._replace(index)
            raise DeadlineExceeded(f"the computation passed its {left:.3g} s deadline") from None
        except (EOFError, OSError) as error:
            await self._replace(index)
            raise WorkerLost(f"the worker stopped during the job ({error or 'EOF'})") from None
        except asyncio.CancelledError:
            worker.process.kill()  # shutting down: stop the work, never wait for it
            raise
        if reply_id != job_id:  # cannot happen with one job per worker; refuse rather than mix answers
            await self._replace(index)
            raise WorkerLost("the worker answered out of order")
        return reply

    async def _replace(self, index: int) -> _Worker:
        old = self._workers[index]
        loop = asyncio.get_running_loop()
        await loop.run_in_executor(self._threads, old.kill)
        if self.closed:
            raise ShuttingDown("the service is shutting down")
        fresh = await loop.run_in_executor(self._threads, lambda: _Worker(self._context, self.backend))
        self._workers[index] = fresh
        self.restarts += 1
        return fresh
