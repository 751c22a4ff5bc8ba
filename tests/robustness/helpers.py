"""Shared pieces for the robustness tests: a checklist deployment, a real server in a subprocess,
and a walk over JSON output that finds NaN, infinities and tracebacks.

Everything here runs the real parts: SQLite on disk, waitress in its own process, the real engine.
"""

from __future__ import annotations

import copy
import json
import math
import os
import re
import signal
import subprocess
import sys
import time
import urllib.error
import urllib.request
import uuid
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[2]
PYTHON = sys.executable

# Checklist items shaped like the safety block of ARCHITECTURE.md (id, stage, text, required); the
# robustness tests acknowledge these, so they must not depend on the plan layer's numbers.
CHECKLIST = [
    {"id": f"pre-item-{i}", "stage": "pre-raise", "text": f"Check {i} done.", "required": True}
    for i in range(4)
] + [{"id": "after-swr", "stage": "after-raise", "text": "Measure the SWR dip.", "required": True}]

# A small plan input (two trees, one channel, flat) that the real plan layer solves in a few
# seconds; perfect ground keeps it independent of the lossy-ground step of the engine.
SMALL_PLAN = {
    "site": {
        "ground": "perfect",
        "supports": [
            {"id": "T1", "kind": "tree", "height_m": 13.5, "x_m": -24, "y_m": 6},
            {"id": "T2", "kind": "tree", "height_m": 10.0, "x_m": 21, "y_m": -3},
        ],
        "hazards": [],
    },
    "channels_mhz": [3.79],
    "form": "flat",
    "kit": {
        "wire": {"diameter_mm": 1.6, "conductor": "copper"},
        "coax": {"class": "rg-58", "length_m": 25},
        "feedpoint_mass_kg": 0.35,
        "masts": [],
        "rope": {"length_m": 60},
        "tension_n": 60,
    },
    "radio": {"power_w": 100, "mode": "ssb"},
}


def demo_variant(demo_input: dict, n: int) -> dict:
    """The demo plan input with a channel moved by n kHz: a different input, so no cache answers."""
    spec = {k: v for k, v in demo_input.items() if k != "name"}
    spec["channels_mhz"] = [round(3.605 + 0.001 * n, 4), *spec["channels_mhz"][1:]]
    spec["sky"] = {**spec["sky"], "channels_mhz": spec["channels_mhz"]}
    return spec


def long_variant(demo_input: dict, n: int) -> dict:
    """The longest plan a site may ask for: the demo variant with six more trees (ten supports, 45
    pairs to sweep: the most a plan takes) and twelve channels from 2 to 9.7 MHz (the most a plan
    takes): ~150 engine solves, ~1.9 s of work on the team's machine with the compiled kernels (the
    demo alone plans in ~0.3 s warm, and six more trees alone in ~1 s: too close to a deadline)."""
    spec = demo_variant(demo_input, n)
    channels = [round(2.0 + 0.7 * i + 0.001 * n, 4) for i in range(12)]
    spec["channels_mhz"] = channels
    spec["sky"] = {**spec["sky"], "channels_mhz": channels}
    extra = [
        {"id": f"X{i}", "kind": "tree", "height_m": 9.0 + i, "x_m": -40.0 + 16 * i, "y_m": 45.0}
        for i in range(6)
    ]
    spec["site"] = {**spec["site"], "supports": [*spec["site"]["supports"], *extra]}
    return spec


# A half-wave dipole 10 m over perfect ground at 3.6 MHz: the base of the model-spec mutations.
DIPOLE = {
    "frequency_mhz": 3.6,
    "ground": "perfect",
    "wires": [{"points_m": [[-20.0, 0.0, 10.0], [20.0, 0.0, 10.0]], "diameter_mm": 2.0}],
    "feed": {"wire": 0, "distance_m": 20.0},
}


def checklist_export(deployment_id: str | None = None, name: str = "Robustness fixture") -> dict:
    """An export document (the import format of the service) of :data:`SMALL_PLAN` holding
    :data:`CHECKLIST` as its stored result.

    Through ``POST /api/deployments/import`` the result is recomputed from the input (the import
    trusts no derived state); :func:`store_export` stores it as it is, for tests of the checklist
    mechanics that need a known checklist rather than a plan's numbers."""
    return {
        "format": "fieldkit-deployment",
        "format_version": 1,
        "deployment": {
            "id": deployment_id or str(uuid.uuid4()),
            "name": name,
            "input": copy.deepcopy(SMALL_PLAN),
            "result": {
                "options": [
                    {
                        "form": "flat",
                        "frequency_mhz": 3.79,
                        "safety": {"raise_ok": True, "checklist": CHECKLIST},
                    }
                ]
            },
            "plan_error": None,
            "created_at": "2026-12-01T12:00:00.000000Z",
            "updated_at": "2026-12-01T12:00:00.000000Z",
            "revision": 1,
        },
        "acknowledgements": [],
    }


def ack(*, done: bool = True, by: str = "AB", at: str = "2026-12-01T14:05:00Z", client_id=None):
    return {"done": done, "by": by, "at": at, "client_id": client_id or str(uuid.uuid4())}


def non_finite_paths(value: Any, path: str = "") -> list[str]:
    """Where a NaN or infinity hides in a decoded JSON value (empty list: none)."""
    found: list[str] = []
    stack = [(value, path)]
    while stack:
        item, where = stack.pop()
        if isinstance(item, float) and not math.isfinite(item):
            found.append(where or "(top)")
        elif isinstance(item, dict):
            stack.extend((v, f"{where}.{k}") for k, v in item.items())
        elif isinstance(item, list):
            stack.extend((v, f"{where}[{i}]") for i, v in enumerate(item))
    return found


def strict_json(text: str) -> Any:
    """Parse JSON refusing NaN/Infinity literals (Python's json would accept them)."""

    def refuse(name: str) -> Any:
        raise AssertionError(f"{name} in JSON output")

    return json.loads(text, parse_constant=refuse)


TRACEBACK = re.compile(r"Traceback \(most recent call last\)|File \".*\", line \d+")


def store_export(database: Path, doc: dict) -> str:
    """Write an export-format document straight into a store (migrated first), as the laptop that
    planned it keeps it: its stored result and acknowledgements as they are. Returns its id."""
    from fieldkit import store
    from fieldkit.store import acknowledgements, deployments

    store.migrate(database)
    dep = doc["deployment"]
    conn = store.connect(database)
    try:
        with store.transaction(conn):
            deployments.insert(
                conn,
                deployment_id=dep["id"],
                name=dep["name"],
                plan_input=dep["input"],
                plan_result=dep["result"],
                plan_error=dep.get("plan_error"),
                created_at=dep["created_at"],
                updated_at=dep["updated_at"],
                revision=dep["revision"],
            )
            for ack in doc["acknowledgements"]:
                acknowledgements.insert(conn, deployment_id=dep["id"], **ack)
    finally:
        conn.close()
    return dep["id"]


def seed_data_dir(data_dir: Path, doc: dict | None = None) -> str:
    """Create the database with one checklist deployment (so the service skips the demo plan)."""
    from fieldkit.store import database_path

    Path(data_dir).mkdir(parents=True, exist_ok=True)
    return store_export(database_path(Path(data_dir)), doc or checklist_export())


class ServerProcess:
    """``fieldkit.service.serve`` in a subprocess on a free loopback port (port 0), temp data dir."""

    START_TIMEOUT_S = 30.0

    def __init__(self, data_dir: Path, *, log_path: Path | None = None) -> None:
        self.data_dir = Path(data_dir)
        self.log_path = log_path or self.data_dir / "server.log"
        self.proc: subprocess.Popen | None = None
        self.port = 0

    def start(self) -> ServerProcess:
        code = (
            "import sys; from fieldkit.service import serve; "
            f"serve(host='127.0.0.1', port=0, data_dir={str(self.data_dir)!r})"
        )
        env = {**os.environ, "FIELDKIT_HOME": str(self.data_dir), "PYTHONUNBUFFERED": "1"}
        self._log = open(self.log_path, "ab")  # noqa: SIM115 - closed in stop()
        self.proc = subprocess.Popen(
            [PYTHON, "-c", code],
            cwd=ROOT,
            env=env,
            stdout=subprocess.PIPE,
            stderr=self._log,
        )
        deadline = time.monotonic() + self.START_TIMEOUT_S
        line = b""
        while time.monotonic() < deadline:
            line = self.proc.stdout.readline()
            match = re.search(rb"http://127\.0\.0\.1:(\d+)/", line)
            if match:
                self.port = int(match.group(1))
                break
            if not line and self.proc.poll() is not None:
                raise RuntimeError(f"server exited early: {self.log_path.read_text()[-2000:]}")
        else:
            self.kill()
            raise RuntimeError(f"server did not start within {self.START_TIMEOUT_S} s")
        while time.monotonic() < deadline:
            try:
                with urllib.request.urlopen(self.url("/api/health"), timeout=2) as r:
                    if r.status == 200:
                        return self
            except (urllib.error.URLError, ConnectionError, TimeoutError):
                time.sleep(0.05)
        self.kill()
        raise RuntimeError("server never answered /api/health")

    def url(self, path: str) -> str:
        return f"http://127.0.0.1:{self.port}{path}"

    def kill(self) -> None:
        """SIGKILL: no handler runs, no checkpoint, the WAL stays as it was."""
        if self.proc and self.proc.poll() is None:
            self.proc.send_signal(signal.SIGKILL)
            self.proc.wait(10)
        self._close()

    def stop(self) -> int | None:
        """SIGTERM: the clean shutdown path."""
        if self.proc and self.proc.poll() is None:
            self.proc.send_signal(signal.SIGTERM)
            try:
                self.proc.wait(15)
            except subprocess.TimeoutExpired:
                self.proc.kill()
                self.proc.wait(5)
        self._close()
        return self.proc.returncode if self.proc else None

    def _close(self) -> None:
        if self.proc and self.proc.stdout:
            self.proc.stdout.close()
        log = getattr(self, "_log", None)
        if log and not log.closed:
            log.close()

    def __enter__(self) -> ServerProcess:
        return self.start()

    def __exit__(self, *exc: object) -> None:
        self.stop()


def request_json(url: str, *, method: str = "GET", body: Any = None, timeout: float = 10.0):
    """(status, decoded JSON) with urllib; HTTP errors are returned, not raised."""
    data = None if body is None else json.dumps(body).encode()
    req = urllib.request.Request(url, data=data, method=method)
    if data is not None:
        req.add_header("Content-Type", "application/json")
    try:
        with urllib.request.urlopen(req, timeout=timeout) as r:
            return r.status, strict_json(r.read().decode())
    except urllib.error.HTTPError as exc:
        return exc.code, strict_json(exc.read().decode() or "null")


def stop_server(running) -> None:
    """Stop a :func:`fieldkit.service.server.start_in_thread` server, even when its trigger is gone.

    After the 300 kB-header case of test_raw_http, about one run in five, waitress's wake-up pipe is
    already closed when ``RunningServer.stop`` pulls it (EBADF; reported to the service owner). The
    sockets are then closed from here, which is what ``stop`` would have asked the loop to do.
    """
    try:
        running.stop()
    except OSError:
        from waitress import wasyncore

        wasyncore.close_all(running.server._map)
        running.thread.join(10)
        running.server.task_dispatcher.shutdown()
