"""Crash durability: acknowledgements that got a 200 survive SIGKILL of the service, in order."""

from __future__ import annotations

import json
import os
import random
import signal
import sqlite3
import subprocess
import sys
import threading
import time
import urllib.error
import urllib.request
import uuid
from pathlib import Path

import pytest

from fieldkit.store import database_path
from tests.robustness.helpers import store_export

from .service_fixtures import export_doc

ROOT = Path(__file__).resolve().parents[2]
SERVER = """
import sys
from waitress.server import create_server
from fieldkit.service import create_app
app = create_app({"DATA_DIR": sys.argv[1], "DEMO": False})
server = create_server(app, host="127.0.0.1", port=0, threads=6)
print(server.effective_port, flush=True)
server.run()
"""


def start(data_dir: Path) -> tuple[subprocess.Popen, str]:
    proc = subprocess.Popen(
        [sys.executable, "-c", SERVER, str(data_dir)],
        stdout=subprocess.PIPE,
        text=True,
        cwd=ROOT,
        env={**os.environ, "PYTHONUNBUFFERED": "1"},
    )
    return proc, f"http://127.0.0.1:{int(proc.stdout.readline())}"


def send(url: str, method: str, body: dict) -> int:
    request = urllib.request.Request(
        url,
        data=json.dumps(body).encode(),
        method=method,
        headers={"Content-Type": "application/json"},
    )
    with urllib.request.urlopen(request, timeout=10) as response:
        return response.status


@pytest.mark.slow
def test_acknowledgements_survive_sigkill(tmp_path):
    rng = random.Random(20261201)  # fixed seed: the kill moments are reproducible
    data_dir = tmp_path / "data"
    data_dir.mkdir()
    dep = store_export(database_path(data_dir), export_doc())  # its checklist has pre-weather
    proc, base = start(data_dir)
    confirmed: list[str] = []
    faults = 0
    try:
        for round_ in range(4):
            stop = threading.Event()

            def stream(base=base, stop=stop, round_=round_):
                i = 0
                while not stop.is_set():
                    body = {
                        "done": i % 2 == 0,
                        "by": "KS",
                        "at": f"2026-12-01T1{round_}:{i // 60 % 60:02d}:{i % 60:02d}Z",
                        "client_id": str(uuid.uuid4()),
                    }
                    try:
                        status = send(
                            f"{base}/api/deployments/{dep}/checks/pre-weather", "PUT", body
                        )
                    except (urllib.error.URLError, ConnectionError, OSError):
                        return  # the server died mid-request: that one was never confirmed
                    if status == 200:
                        confirmed.append(body["client_id"])
                    i += 1

            writer = threading.Thread(target=stream)
            writer.start()
            time.sleep(rng.uniform(0.3, 1.5))
            proc.send_signal(signal.SIGKILL)
            proc.wait(timeout=10)
            proc.stdout.close()
            faults += 1
            stop.set()
            writer.join(timeout=20)
            proc, base = start(data_dir)
            request = f"{base}/api/deployments/{dep}/checks/pre-weather"
            with urllib.request.urlopen(request, timeout=10) as response:
                history = [h["client_id"] for h in json.loads(response.read())["history"]]
            # Every confirmed acknowledgement is there, in the order it was confirmed; at most the
            # one in flight at the kill may be there without a confirmation.
            assert history[: len(confirmed)] == confirmed
            assert len(history) - len(confirmed) <= 1
            confirmed[:] = history
    finally:
        proc.kill()
        proc.wait(timeout=10)
        proc.stdout.close()
    assert faults == 4 and len(confirmed) > 20
    conn = sqlite3.connect(data_dir / "fieldkit.sqlite3")
    try:
        assert conn.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
    finally:
        conn.close()
