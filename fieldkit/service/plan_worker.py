"""The plan worker: a separate process that runs plans for the service, one at a time.

Started by :mod:`fieldkit.service.plan_jobs` as ``python -m fieldkit.service.plan_worker [NICE]``
(NICE: how much to lower its own scheduling priority). A plan is
CPU-bound Python and numpy for seconds; in its own process it neither holds the service's GIL (health,
ticks, reads and static files stay quick) nor shares its memory, and a plan past its deadline can be
killed outright — the one stop that always works.

Protocol, one JSON object per line on the worker's stdin and on the file descriptor it was handed as
stdout (anything a library prints goes to stderr instead):

- in: ``{"job": ID, "spec": {...}, "deadline_s": S}`` — plan ``spec``; ``{"cancel": ID}`` — stop it.
- out: ``{"ready": true}`` once the calculators are loaded; ``{"job": ID, "progress": [stage, done,
  total]}`` while planning; then ``{"job": ID, "result_bytes": N}`` followed by N bytes of the plan's
  JSON and a newline, or ``{"job": ID, "error": {...}, "status": 422}`` (an input error, as the API
  answers it), or ``{"job": ID, "stopped": "deadline" | "cancelled", "stage": ...}``.

When stdin closes (the service went away, however it died) the worker exits at once.
"""

from __future__ import annotations

import json
import os
import queue
import sys
import threading
import time
import traceback
from typing import Any, BinaryIO

from fieldkit import jsonio
from fieldkit.errors import InputError

# Before the planner's first report (its stages: fieldkit.planning.STAGES).
STARTING = "starting"
# The planner reports before every engine solve (hundreds of times); the service hears of it at most
# this often [s], and at every change of stage. The deadline and cancel checks run at every report.
PROGRESS_INTERVAL_S = 0.1


class PlanStopped(Exception):
    """Raised from the progress callback: the job's deadline passed or it was cancelled."""

    def __init__(self, reason: str) -> None:
        super().__init__(reason)
        self.reason = reason


class Worker:
    def __init__(self, out: BinaryIO) -> None:
        self.out = out
        self.out_lock = threading.Lock()
        self.jobs: queue.Queue[dict[str, Any]] = queue.Queue()
        self.cancelled: set[str] = set()
        self.lock = threading.Lock()

    def send(self, message: dict[str, Any], payload: bytes | None = None) -> None:
        data = json.dumps(message, separators=(",", ":"), allow_nan=False).encode() + b"\n"
        with self.out_lock:
            self.out.write(data)
            if payload is not None:
                self.out.write(payload + b"\n")
            self.out.flush()

    def read_commands(self) -> None:
        """Stdin reader (a thread): queue jobs, note cancellations, exit when the service is gone."""
        for line in sys.stdin.buffer:
            try:
                message = json.loads(line)
            except ValueError:
                continue
            if "cancel" in message:
                with self.lock:
                    self.cancelled.add(str(message["cancel"]))
            elif "job" in message:
                self.jobs.put(message)
        os._exit(0)  # stdin closed: nobody is waiting for any result

    def run(self) -> None:
        while True:
            self.run_job(self.jobs.get())

    def run_job(self, message: dict[str, Any]) -> None:
        job_id = str(message["job"])
        deadline = time.monotonic() + float(message["deadline_s"])
        where: dict[str, Any] = {"stage": None, "sent": 0.0}

        def report(stage: str, done: int, total: int) -> None:
            now = time.monotonic()
            with self.lock:
                cancelled = job_id in self.cancelled
            if cancelled:
                raise PlanStopped("cancelled")
            if now > deadline:
                raise PlanStopped("deadline")
            if stage != where["stage"] or now - where["sent"] >= PROGRESS_INTERVAL_S:
                where["stage"], where["sent"] = stage, now
                self.send({"job": job_id, "progress": [stage, int(done), int(total)]})

        try:
            report(STARTING, 0, 1)
            result = plan(message["spec"], report)
            payload = jsonio.dumps(result, pretty=False).encode()
        except PlanStopped as exc:
            self.send({"job": job_id, "stopped": exc.reason, "stage": where["stage"] or STARTING})
        except InputError as exc:
            self.send({"job": job_id, "error": exc.to_json(), "status": exc.status})
        except Exception:  # noqa: BLE001 - reported to the service as an internal error
            traceback.print_exc(file=sys.stderr)
            self.send({"job": job_id, "failed": True})
        else:
            self.send({"job": job_id, "result_bytes": len(payload)}, payload)
        finally:
            with self.lock:
                self.cancelled.discard(job_id)


def plan(spec: Any, report) -> Any:
    """The plan of ``spec``; ``report(stage, done, total)`` at every step the planner reports, and
    it may raise to stop the plan (the interface agreed with the planning layer, TEAM.md)."""
    from fieldkit.planning import plan as make_plan

    return make_plan(spec, report=report)


def warm_up() -> None:
    """Load the plan chain and the IRI tables before the first job, and keep the engine's fitted
    ground images in the cache directory as the CLI does (a worker pays each fit once)."""
    import fieldkit.planning  # noqa: F401
    from fieldkit import disk_cache
    from fieldkit.sky import iri_tables

    disk_cache.keep_image_fits()
    disk_cache.keep_default_gains()
    iri_tables.load()


def main(argv: list[str] | None = None) -> int:
    args = sys.argv[1:] if argv is None else argv
    niceness = int(args[0]) if args else 0
    if niceness and hasattr(os, "nice"):
        os.nice(niceness)  # the service's own threads and the window come first
    out = os.fdopen(os.dup(sys.stdout.fileno()), "wb")  # the protocol's own descriptor
    os.dup2(sys.stderr.fileno(), sys.stdout.fileno())  # a library's print() goes to stderr
    sys.stdout = sys.stderr
    worker = Worker(out)
    threading.Thread(target=worker.read_commands, name="plan-worker-stdin", daemon=True).start()
    warm_up()
    worker.send({"ready": True})
    worker.run()
    return 0


if __name__ == "__main__":
    sys.exit(main())
