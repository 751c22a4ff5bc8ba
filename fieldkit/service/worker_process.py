"""One plan worker process seen from the service: start it, send it jobs, read what it says, kill it.

The process is :mod:`fieldkit.service.plan_worker`. A reader thread turns its output into messages on
a queue (a ``result_bytes`` message carries the plan's JSON text along); when the process ends the
queue gets :data:`GONE`. Killing is the hard stop of a plan: nothing the plan does can resist it.
"""

from __future__ import annotations

import contextlib
import json
import os
import queue
import subprocess
import sys
import threading
from pathlib import Path
from typing import IO, Any

import fieldkit

# The end of a worker's output (it exited, crashed or was killed): no more messages.
GONE: dict[str, Any] = {"gone": True}
# A plan uses one core: the linear algebra libraries would otherwise start a thread per core and take
# the core the service answers on. The user's own setting wins.
SINGLE_THREAD_ENV = {"OMP_NUM_THREADS": "1", "OPENBLAS_NUM_THREADS": "1", "MKL_NUM_THREADS": "1"}
# How long a worker may take to load the calculators before it counts as broken [s]; a cold start
# on a slow laptop is 2-5 s.
START_TIMEOUT_S = 90.0


class WorkerBroken(RuntimeError):
    """The worker process did not start, or died while running a plan."""


def _environment() -> dict[str, str]:
    env = {**SINGLE_THREAD_ENV, **os.environ, "PYTHONUNBUFFERED": "1"}
    package_root = str(Path(fieldkit.__file__).resolve().parents[1])
    env["PYTHONPATH"] = os.pathsep.join(p for p in (package_root, env.get("PYTHONPATH")) if p)
    return env


class WorkerProcess:
    """A plan worker process; :meth:`start` it (again after it died), :meth:`send`, read :attr:`messages`."""

    def __init__(self, name: str, *, niceness: int = 0) -> None:
        self.name = name
        self.niceness = niceness
        self.proc: subprocess.Popen | None = None
        self.messages: queue.Queue[tuple[dict[str, Any], str | None]] = queue.Queue()
        self._lock = threading.Lock()

    @property
    def alive(self) -> bool:
        return self.proc is not None and self.proc.poll() is None

    def start(self) -> None:
        """Start the process if it is not running, and wait until it has loaded the calculators."""
        with self._lock:
            if self.alive:
                return
            self.messages = queue.Queue()
            self.proc = subprocess.Popen(
                [sys.executable, "-m", "fieldkit.service.plan_worker", str(self.niceness)],
                stdin=subprocess.PIPE,
                stdout=subprocess.PIPE,
                env=_environment(),
                close_fds=True,
            )
            threading.Thread(
                target=self._read,
                args=(self.proc.stdout, self.messages),
                name=f"{self.name}-reader",
                daemon=True,
            ).start()
            try:
                first, _ = self.messages.get(timeout=START_TIMEOUT_S)
            except queue.Empty:
                first = GONE
            if not first.get("ready"):
                self._kill_locked()
                raise WorkerBroken(f"the plan worker did not start within {START_TIMEOUT_S:g} s")

    @staticmethod
    def _read(stream: IO[bytes], messages: queue.Queue) -> None:
        try:
            for line in stream:
                try:
                    message = json.loads(line)
                except ValueError:
                    continue
                payload = None
                if "result_bytes" in message:
                    payload = stream.read(int(message["result_bytes"])).decode("utf-8")
                    stream.readline()
                messages.put((message, payload))
        except (OSError, ValueError):  # the pipe closed under us: the process is gone
            pass
        finally:
            messages.put((GONE, None))

    def send(self, message: dict[str, Any]) -> None:
        data = json.dumps(message, separators=(",", ":"), allow_nan=False).encode() + b"\n"
        proc = self.proc
        if proc is None or proc.stdin is None:
            raise WorkerBroken("the plan worker is not running")
        try:
            proc.stdin.write(data)
            proc.stdin.flush()
        except (BrokenPipeError, OSError, ValueError) as exc:
            raise WorkerBroken(f"the plan worker stopped listening ({exc})") from None

    def kill(self) -> None:
        with self._lock:
            self._kill_locked()

    def _kill_locked(self) -> None:
        proc, self.proc = self.proc, None
        if proc is None:
            return
        if proc.poll() is None:
            proc.kill()
        with contextlib.suppress(subprocess.TimeoutExpired):  # SIGKILL waits for nothing
            proc.wait(timeout=10)
        for stream in (proc.stdin, proc.stdout):
            if stream is not None:
                with contextlib.suppress(OSError):
                    stream.close()
