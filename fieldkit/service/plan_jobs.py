"""Plans as bounded jobs: a pool of worker processes, a bounded queue, a deadline, progress.

A plan takes seconds of CPU. Run in the threads that answer requests it would hold the GIL against
health, ticks, reads and static files, and nothing could stop it: the probe of issue 15 had a 1 GW
plan run for minutes after its client left, and six of them made ``/api/health`` wait 40 s. Here:

- **Workers.** Each plan runs in a worker process (:mod:`fieldkit.service.plan_worker`), one plan per
  process at a time, :data:`DEFAULT_WORKERS` of them. On a 2-core laptop that is one: the plan takes
  one core, the service (waitress, SQLite) and the desktop window keep the other. A second worker
  would make two plans finish in about the time of one each only on an idle machine, and leave no
  core for the answers the field is waiting for (measured in benchmarks/bench_service_load.py).
- **Queue.** At most :data:`DEFAULT_QUEUE` jobs wait for a worker; the next one is refused with
  :class:`QueueFull` (HTTP 503 and ``Retry-After``, an estimate from recent plan times). The same input
  asked again while its plan is queued or running joins that job; a finished input is answered from
  the plan cache.
- **Deadline.** A plan runs at most ``deadline_s`` (:data:`DEFAULT_DEADLINE_S`). The worker stops it
  at the next progress report; if it cannot (no report comes), the process is killed
  :data:`KILL_GRACE_S` later and a fresh one started. Either way the job fails with
  :class:`PlanTooLong` (422): this input needs more work than one plan is given.
- **Giving up.** A request waiting for its plan notices when its client disconnects; a job nobody
  waits for or polls any more (:data:`ABANDON_S`) is cancelled the same way.
- **Waiting.** At most ``max_waiters`` requests wait for plans at once (:class:`QueueFull` beyond);
  the service runs :data:`fieldkit.service.server.THREADS` threads, so that many more are always free
  for everything else.

Progress: ``stage``, ``done``, ``total`` per job (``queued`` while waiting, then the planner's stages),
polled through ``GET /api/plans/<id>`` (:mod:`fieldkit.service.plans_api`).
"""

from __future__ import annotations

import atexit
import contextlib
import json
import math
import os
import queue
import threading
import time
import uuid
import weakref
from collections import OrderedDict, deque
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

from fieldkit.errors import InputError
from fieldkit.service.plancache import PlanCache, input_key
from fieldkit.service.worker_process import GONE, WorkerBroken, WorkerProcess

# One plan at a time per core beyond the one the service and the window need; at least one, at most
# two. Measured on 2 cores under the mixed load (bench_service_load.py, 2 Dec 2026): a second worker
# finished 25 plans in 30 s against 21 (+19 %) for health p95 88 against 77 ms and twice the memory
# (~140 MB a worker), so one. Plans in threads of the service instead finished 7 (the GIL), at the
# same health p95, with no way to stop one at its deadline.
DEFAULT_WORKERS = max(1, min(2, (os.cpu_count() or 2) - 1))
# Jobs that may wait for a worker. Four demo plans are about 10-20 s of waiting on a laptop: longer
# than that a person would rather be told to try again.
DEFAULT_QUEUE = 4
# The longest one plan may run [s]. The demo plan takes 2-5 s on a 2-core laptop; two minutes leaves
# room for a slow machine and a large site while bounding what any one input can cost.
DEFAULT_DEADLINE_S = 120.0
# How long after its deadline (or a cancel) a worker may take to stop by itself before it is killed [s].
KILL_GRACE_S = 3.0
# A job that no request waits for and nobody polled for this long is cancelled [s]; the app polls
# every second or so.
ABANDON_S = 30.0
# Finished jobs kept for polling: the last ones, for a while.
RETAIN_JOBS = 32
RETAIN_S = 600.0
# How much lower a plan worker runs than the service [nice steps, POSIX]. A plan is batch work: with
# the priority lowered the answers to phones and the window come first and the plan still gets every
# idle cycle. Measured on 2 cores (bench_service_load.py, 2 Dec 2026): health p95 77 ms against 70 ms
# at nice 0 on an idle machine, 77 against 91 ms at load 5 — within the noise either way — for 25 %
# fewer plans only while 20 clients saturate both cores; kept for the window's sake.
DEFAULT_NICENESS = 10
# Requests that may wait for plans at once: one per running and queued plan, and one more for a
# request that joins a job already there.
DEFAULT_MAX_WAITERS = DEFAULT_WORKERS + DEFAULT_QUEUE + 1
# Before any plan has finished, the guess of one plan's time for Retry-After [s].
FIRST_GUESS_S = 5.0
RETRY_AFTER_MAX_S = 120
QUEUED = "queued"


class QueueFull(InputError):
    """Too many plans queued or waiting: try again later (HTTP 503 with ``Retry-After``)."""

    def __init__(self, detail: str, retry_after_s: int) -> None:
        super().__init__("(service)", detail, status=503)
        self.retry_after_s = retry_after_s

    def to_json(self) -> dict[str, Any]:
        return {
            "error": "busy",
            "field": None,
            "detail": self.detail,
            "retry_after_s": self.retry_after_s,
        }


class PlanTooLong(InputError):
    """The plan reached its deadline and was stopped (HTTP 422: the input needs more than one plan gets)."""

    def __init__(self, deadline_s: float, stage: str) -> None:
        super().__init__(
            "(plan)",
            f"the plan was stopped at its deadline of {deadline_s:g} s, during {stage!r}: this input "
            "needs more work than one plan is given here; plan fewer channels or supports, or one form",
            status=422,
        )

    def to_json(self) -> dict[str, Any]:
        return {"error": "plan too long", "field": None, "detail": self.detail}


class PlanCancelled(InputError):
    """The job was cancelled (``DELETE /api/plans/<id>``, or everyone waiting for it left): HTTP 409."""

    def __init__(self) -> None:
        super().__init__("(plan)", "the plan was cancelled before it finished", status=409)

    def to_json(self) -> dict[str, Any]:
        return {"error": "plan cancelled", "field": None, "detail": self.detail}


class PlanRefused(InputError):
    """The planner refused the input: its error JSON, as it would have answered in-process."""

    def __init__(self, body: dict[str, Any], status: int) -> None:
        super().__init__(str(body.get("field") or ""), str(body.get("detail") or ""), status=status)
        self.body = body

    def to_json(self) -> dict[str, Any]:
        return dict(self.body)


class PlanCrashed(RuntimeError):
    """The planner failed unexpectedly (HTTP 500; its traceback is on the worker's stderr)."""


@dataclass
class Job:
    """One plan: its input, where it is, and how it ended. Fields change under the board's lock."""

    id: str
    key: str
    spec: Any
    keep: bool  # polled by id (POST /api/plans): kept while someone polls, not only while someone waits
    created: float = field(default_factory=time.monotonic)
    state: str = QUEUED  # queued, running, done, failed, cancelled
    stage: str = QUEUED
    done: int = 0
    total: int = 0
    started: float | None = None
    finished_at: float | None = None
    result_text: str | None = None
    error: Exception | None = None
    waiters: int = 0
    last_seen: float = field(default_factory=time.monotonic)
    cancel_requested: bool = False
    finished: threading.Event = field(default_factory=threading.Event)

    @property
    def over(self) -> bool:
        return self.state in ("done", "failed", "cancelled")


class PlanBoard:
    """The pool, the queue and the jobs. Thread-safe; :meth:`close` stops the workers."""

    def __init__(
        self,
        *,
        cache: PlanCache | None = None,
        workers: int = DEFAULT_WORKERS,
        queue_limit: int = DEFAULT_QUEUE,
        deadline_s: float = DEFAULT_DEADLINE_S,
        max_waiters: int | None = None,
        niceness: int = DEFAULT_NICENESS,
    ) -> None:
        if workers < 1 or queue_limit < 0 or deadline_s <= 0:
            raise ValueError("a plan board needs at least one worker and a positive deadline")
        self.cache = cache if cache is not None else PlanCache()
        self.workers = workers
        self.queue_limit = queue_limit
        self.deadline_s = deadline_s
        self.max_waiters = max_waiters if max_waiters is not None else workers + queue_limit + 1
        self.niceness = niceness
        self._cond = threading.Condition()
        self._queue: deque[Job] = deque()
        self._jobs: OrderedDict[str, Job] = OrderedDict()
        self._aliases: dict[str, str] = {}
        self._active: dict[str, Job] = {}  # by input key: queued or running
        self._waiting = 0
        self._mean_s = FIRST_GUESS_S
        self._finished = 0
        self._slots: list[_Slot] = []
        self._closed = False
        self._finalizer = weakref.finalize(self, _stop_slots, self._slots)
        atexit.register(self._finalizer)

    # ------------------------------------------------------------------ asking for plans

    def start(self) -> None:
        """Start the worker processes now (``serve`` and the desktop do, so the first plan is quick)."""
        with self._cond:
            self._start_slots()
            for slot in self._slots:
                slot.warm.set()

    def submit(self, spec: Any, *, alias: str | None = None, keep: bool = False) -> Job:
        """The job planning ``spec``: a running or queued one for the same input, a finished one from
        the cache, or a new one in the queue. Raises :class:`QueueFull` when the queue is full."""
        key = input_key(spec)
        with self._cond:
            if self._closed:
                raise QueueFull("the service is stopping", 5)
            job = self._active.get(key)
            if job is None:
                cached = self.cache.lookup(key)
                if cached is not None:
                    job = self._remember(Job(id=_new_id(), key=key, spec=None, keep=keep))
                    self._finish(job, "done", result_text=cached)
                else:
                    if len(self._queue) >= self.queue_limit:
                        raise QueueFull(
                            f"{len(self._queue)} plans are waiting for {self.workers} worker(s) "
                            "already; try again later",
                            self._retry_after(),
                        )
                    job = self._remember(Job(id=_new_id(), key=key, spec=spec, keep=keep))
                    self._active[key] = job
                    self._queue.append(job)
                    self._start_slots()
                    self._cond.notify_all()
            job.keep = job.keep or keep
            job.last_seen = time.monotonic()
            if alias:
                self._aliases[alias] = job.id
            return job

    def plan(
        self, spec: Any, *, alias: str | None = None, disconnected: Callable[[], bool] | None = None
    ) -> str:
        """Plan ``spec`` and wait for it: the plan's JSON text, or the job's error raised.

        ``disconnected()`` is asked every quarter second; when it says the client left, this waiter
        leaves too (and the job is cancelled if nobody else wants it).
        """
        with self._cond:
            if self._waiting >= self.max_waiters:
                raise QueueFull(
                    f"{self._waiting} requests are already waiting for plans; try again later, or "
                    "POST /api/plans and poll GET /api/plans/<id>",
                    self._retry_after(),
                )
            self._waiting += 1
        try:
            job = self.submit(spec, alias=alias)
            return self.wait(job, disconnected=disconnected)
        finally:
            with self._cond:
                self._waiting -= 1

    def wait(self, job: Job, *, disconnected: Callable[[], bool] | None = None) -> str:
        with self._cond:
            job.waiters += 1
        try:
            while not job.finished.wait(0.25):
                if disconnected is not None and disconnected():
                    raise PlanCancelled()
        finally:
            with self._cond:
                job.waiters -= 1
                job.last_seen = time.monotonic()
                if not job.over and job.waiters == 0 and not job.keep:
                    self._cancel(job)
        if job.state == "done":
            return job.result_text or "null"
        raise job.error or PlanCancelled()

    def result(self, job: Job) -> Any:
        """The finished job's plan, decoded (a fresh copy)."""
        if job.state != "done":
            raise job.error or PlanCancelled()
        return json.loads(job.result_text or "null")

    def find(self, job_id: str) -> Job | None:
        """The job with this id or alias (polling it keeps it alive)."""
        with self._cond:
            self._prune()
            job = self._jobs.get(self._aliases.get(job_id, job_id))
            if job is not None:
                job.last_seen = time.monotonic()
            return job

    def cancel(self, job: Job) -> None:
        with self._cond:
            if not job.over:
                self._cancel(job)

    def status(self, job: Job) -> dict[str, Any]:
        """What ``GET /api/plans/<id>`` answers about a job."""
        with self._cond:
            now = time.monotonic()
            out: dict[str, Any] = {
                "id": job.id,
                "state": job.state,
                "stage": job.stage,
                "done": job.done,
                "total": job.total,
                "queue_position": (self._queue.index(job) + 1) if job in self._queue else None,
                "elapsed_s": round(
                    ((job.finished_at or now) - job.started) if job.started else 0.0, 3
                ),
                "deadline_s": self.deadline_s,
            }
            if job.state == "done":
                out["result_url"] = f"/api/plans/{job.id}/result"
            elif job.error is not None and isinstance(job.error, InputError):
                out["error"] = job.error.to_json()
            elif job.error is not None:
                out["error"] = {"error": "internal error", "field": None, "detail": str(job.error)}
            return out

    def load(self) -> dict[str, int]:
        """Running and queued plans and waiting requests (for health and the benchmark)."""
        with self._cond:
            running = sum(1 for job in self._active.values() if job.state == "running")
            return {
                "plans_running": running,
                "plans_queued": len(self._queue),
                "plans_waited_for": self._waiting,
                "plans_finished": self._finished,
                "plan_workers": self.workers,
                "plan_queue_limit": self.queue_limit,
            }

    def close(self) -> None:
        """Cancel every job that is not over and stop the workers (the service is stopping)."""
        with self._cond:
            self._closed = True
            self._queue.clear()
            for job in list(self._jobs.values()):
                if not job.over:
                    self._finish(job, "cancelled", error=PlanCancelled())
            self._cond.notify_all()
        self._finalizer()

    # ------------------------------------------------------------------ inside (lock held)

    def _remember(self, job: Job) -> Job:
        self._jobs[job.id] = job
        self._prune()
        return job

    def _prune(self) -> None:
        now = time.monotonic()
        finished = [j for j in self._jobs.values() if j.over]
        extra = len(finished) - RETAIN_JOBS
        for job in finished:
            if extra > 0 or now - (job.finished_at or now) > RETAIN_S:
                self._jobs.pop(job.id, None)
                extra -= 1
        if len(self._aliases) > 4 * RETAIN_JOBS:
            self._aliases = {a: j for a, j in self._aliases.items() if j in self._jobs}

    def _cancel(self, job: Job) -> None:
        if job in self._queue:
            self._queue.remove(job)
            self._finish(job, "cancelled", error=PlanCancelled())
        else:
            job.cancel_requested = True  # its worker slot stops it

    def _finish(self, job: Job, state: str, *, result_text=None, error=None) -> None:
        job.state = state
        job.finished_at = time.monotonic()
        job.result_text = result_text
        job.error = error
        job.spec = None
        if self._active.get(job.key) is job:
            del self._active[job.key]
        if state == "done" and job.started is not None:
            self._finished += 1
            self._mean_s = 0.7 * self._mean_s + 0.3 * (job.finished_at - job.started)
            if result_text is not None:
                self.cache.store(job.key, result_text)
        job.finished.set()
        self._cond.notify_all()

    def _retry_after(self) -> int:
        ahead = len(self._queue) + sum(1 for j in self._active.values() if j.state == "running")
        return int(min(RETRY_AFTER_MAX_S, max(1, math.ceil(self._mean_s * ahead / self.workers))))

    def _start_slots(self) -> None:
        while len(self._slots) < self.workers:
            slot = _Slot(self, len(self._slots))
            self._slots.append(slot)
            slot.thread.start()

    def _next_job(self) -> Job | None:
        """The next queued job, now running; None after a second without one (or when closed)."""
        with self._cond:
            if not self._queue and not self._closed:
                self._cond.wait(1.0)
            if self._closed or not self._queue:
                return None
            job = self._queue.popleft()
            job.state, job.stage = "running", "starting"
            job.started = time.monotonic()
            return job

    def _abandoned(self, job: Job, now: float) -> bool:
        with self._cond:
            if job.cancel_requested:
                return True
            idle = job.waiters == 0 and now - job.last_seen > ABANDON_S
            return idle


class _Slot:
    """One worker process and the thread that feeds it jobs from the board's queue."""

    def __init__(self, board: PlanBoard, n: int) -> None:
        self.board_ref = weakref.ref(board)
        self.worker = WorkerProcess(f"fieldkit-plan-{n}", niceness=board.niceness)
        self.warm = threading.Event()
        self.stopping = False
        self.thread = threading.Thread(target=self.loop, name=f"fieldkit-plan-{n}", daemon=True)

    def loop(self) -> None:
        # The board is held only while a job runs or for the second of waiting for one: a board
        # nobody uses any more is collected, and its finalizer stops this slot and its process.
        while not self.stopping:
            board = self.board_ref()
            if board is None or board._closed:
                break
            if self.warm.is_set() and not self.worker.alive:
                self._start_quietly()
            job = board._next_job()
            if job is not None:
                self.run(board, job)
            del board, job
        self.worker.kill()

    def _start_quietly(self) -> None:
        with contextlib.suppress(WorkerBroken):  # the next job reports it
            self.worker.start()

    def run(self, board: PlanBoard, job: Job) -> None:
        try:
            self.worker.start()  # a no-op when warm; a cold start does not count against the plan
            self.worker.send({"job": job.id, "spec": job.spec, "deadline_s": board.deadline_s})
        except WorkerBroken as exc:
            self.worker.kill()
            with board._cond:
                board._finish(job, "failed", error=PlanCrashed(str(exc)))
            return
        deadline = time.monotonic() + board.deadline_s
        stop_sent_at: float | None = None
        while True:
            now = time.monotonic()
            if stop_sent_at is None and (now > deadline or board._abandoned(job, now)):
                # The job ends now, with its error; the worker is told to stop, and killed if it
                # does not within its grace (a plan that does not report cannot resist that).
                stop_sent_at = now
                self._end_stopped(board, job, deadline)
                with contextlib.suppress(WorkerBroken):  # then it is gone already
                    self.worker.send({"cancel": job.id})
            if stop_sent_at is not None and now - stop_sent_at > KILL_GRACE_S:
                self.worker.kill()
                return
            try:
                message, payload = self.worker.messages.get(timeout=0.25)
            except queue.Empty:
                continue
            if message is GONE:
                self.worker.kill()
                with board._cond:
                    if not job.over:
                        board._finish(job, "failed", error=PlanCrashed("the plan worker died"))
                return
            if message.get("job") != job.id or "progress" in message:
                if stop_sent_at is None:
                    self._progress(board, job, message)
                continue
            if stop_sent_at is None:
                self._end(board, job, message, payload, deadline)
            return  # the worker has answered for this job: it is free

    @staticmethod
    def _progress(board: PlanBoard, job: Job, message: dict[str, Any]) -> None:
        if message.get("job") == job.id and "progress" in message:
            with board._cond:
                job.stage, job.done, job.total = message["progress"]

    def _end(self, board: PlanBoard, job: Job, message, payload, deadline: float) -> None:
        """The worker's last word about a job that is still on."""
        if "stopped" in message:  # it stopped itself at a progress report
            with board._cond:
                job.stage = message.get("stage", job.stage)
            self._end_stopped(board, job, deadline)
            return
        with board._cond:
            if "result_bytes" in message:
                board._finish(job, "done", result_text=payload)
            elif "error" in message:
                board._finish(job, "failed", error=PlanRefused(message["error"], message["status"]))
            else:
                board._finish(job, "failed", error=PlanCrashed("the planner failed; see the log"))

    def _end_stopped(self, board: PlanBoard, job: Job, deadline: float) -> None:
        with board._cond:
            if job.over:
                return
            if job.cancel_requested or time.monotonic() <= deadline:
                board._finish(job, "cancelled", error=PlanCancelled())
            else:
                board._finish(job, "failed", error=PlanTooLong(board.deadline_s, job.stage))


def _stop_slots(slots: list[_Slot]) -> None:
    for slot in slots:
        slot.stopping = True
        slot.worker.kill()


def _new_id() -> str:
    return str(uuid.uuid4())
