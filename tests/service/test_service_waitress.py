"""The real server: waitress on loopback in a thread, and `serve()` in a subprocess with SIGTERM."""

from __future__ import annotations

import json
import os
import re
import signal
import sqlite3
import subprocess
import sys
import threading
import urllib.error
import urllib.request
from pathlib import Path

import pytest

from fieldkit.service import create_app
from fieldkit.service.server import start_in_thread
from tests.robustness.helpers import store_export

from .service_fixtures import ack, export_doc

ROOT = Path(__file__).resolve().parents[2]


def call(url, method="GET", body=None, headers=None):
    data = None if body is None else json.dumps(body).encode()
    request = urllib.request.Request(url, data=data, method=method, headers=headers or {})
    if body is not None:
        request.add_header("Content-Type", "application/json")
    try:
        with urllib.request.urlopen(request, timeout=30) as response:
            return response.status, json.loads(response.read() or b"null"), response.headers
    except urllib.error.HTTPError as exc:
        with exc:
            return exc.code, json.loads(exc.read() or b"null"), exc.headers


@pytest.fixture
def app(tmp_path, plan_board):
    return create_app({"DATA_DIR": tmp_path / "data", "DEMO": False, "PLAN_BOARD": plan_board})


@pytest.fixture
def server(app):
    running = start_in_thread(app)
    yield running
    running.stop()


def test_waitress_serves_the_api(server):
    status, body, headers = call(server.url + "api/health")
    assert (status, body["ok"]) == (200, True)
    assert headers["Content-Security-Policy"].startswith("default-src 'self'")
    status, body, _ = call(server.url + "api/nope")
    assert (status, body["error"]) == (404, "not found")


def test_concurrent_acknowledgements_all_land_once(app, server):
    dep = store_export(app.config["DATABASE"], export_doc())  # its checklist has pre-weather
    base = f"{server.url}api/deployments/{dep}/checks/"
    bodies = [ack(at=f"2026-12-01T14:{i:02d}:00Z") for i in range(24)]
    results: list[int] = []

    def send(b):
        # Each acknowledgement twice, from different threads: replays race the first delivery.
        results.append(call(base + "pre-weather", "PUT", b)[0])

    threads = [threading.Thread(target=send, args=(b,)) for b in bodies + bodies]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert results == [200] * 48
    status, body, _ = call(base + "pre-weather")
    assert [h["client_id"] for h in body["history"]] != []
    assert sorted(h["client_id"] for h in body["history"]) == sorted(b["client_id"] for b in bodies)
    # the service's receipt order decides: the item shows the one stored last
    assert body["item"]["received_at"] == max(h["received_at"] for h in body["history"])
    last = body["history"][-1]
    assert (body["item"]["at"], body["item"]["received_at"]) == (last["at"], last["received_at"])


def start_serve(tmp_path, *extra: str, host: str = "127.0.0.1") -> tuple[subprocess.Popen, str]:
    code = (
        "import sys; from fieldkit.service import serve; "
        f"serve(host={host!r}, port=0, data_dir=sys.argv[1], lan={'--lan' in extra})"
    )
    proc = subprocess.Popen(
        [sys.executable, "-c", code, str(tmp_path / "data")],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        cwd=ROOT,
        env={**os.environ, "PYTHONUNBUFFERED": "1"},
    )
    first = proc.stdout.readline()
    return proc, first


@pytest.mark.slow
@pytest.mark.parametrize("sig", [signal.SIGTERM, signal.SIGINT])
def test_serve_stops_cleanly_on_signal(tmp_path, sig):
    proc, first = start_serve(tmp_path)
    try:
        url = re.search(r"http://127\.0\.0\.1:\d+/", first).group(0)
        status, body, _ = call(url + "api/deployments")
        assert status == 200
        assert [d["name"] for d in body["deployments"]] == ["Larch Basin relay camp (demo)"]
        status, made, _ = call(url + "api/deployments/import", "POST", export_doc())
        assert status == 201, made  # the small site, re-planned by the served plan worker
        proc.send_signal(sig)
        out, err = proc.communicate(timeout=30)
    finally:
        proc.kill()
    assert proc.returncode == 0, err
    assert "database closed" in out
    database = tmp_path / "data" / "fieldkit.sqlite3"
    conn = sqlite3.connect(database)
    try:
        assert conn.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
        assert conn.execute("SELECT count(*) FROM deployments").fetchone()[0] == 2
    finally:
        conn.close()
    wal = database.with_name(database.name + "-wal")
    assert not wal.exists() or wal.stat().st_size == 0  # checkpointed at shutdown


@pytest.mark.slow
def test_serve_lan_prints_address_key_and_qr(tmp_path):
    proc, first = start_serve(tmp_path, "--lan")
    try:
        match = re.search(r"http://([\d.]+):(\d+)/\?key=([A-Za-z0-9_-]{32})", first)
        assert match, first
        _address, port, key = match.groups()
        lines = [proc.stdout.readline() for _ in range(8)]  # notes, a blank border, the code
        assert any("\u2580" in line or "\u2584" in line or "\u2588" in line for line in lines)
        local = f"http://127.0.0.1:{port}/"  # bound to 0.0.0.0, so loopback reaches it too
        assert call(local + "api/health")[0] == 200
        assert call(local + "api/deployments")[0] == 401
        status, body, _ = call(local + "api/lan", headers={"X-Fieldkit-Key": key})
        assert status == 200
        assert body["url"] == match.group(0)
        assert body["can_rotate_key"] is True  # asked from the laptop itself
        # Rotation from the laptop: the new address and its QR code appear in the terminal.
        status, rotated, _ = call(
            local + "api/lan/key", "POST", {}, headers={"X-Fieldkit-Key": key}
        )
        assert status == 200 and rotated["rotated"] is True and not rotated["url"].endswith(key)
        proc.send_signal(signal.SIGTERM)
        out, err = proc.communicate(timeout=30)
    finally:
        proc.kill()
    assert proc.returncode == 0, err
    assert key not in err  # nothing logged with the key
    after = out.split(f"New access key: phones must open {rotated['url']}", 1)
    assert len(after) == 2, out[-500:]
    assert "\u2580" in after[1] or "\u2584" in after[1] or "\u2588" in after[1]  # its QR code


@pytest.mark.slow
def test_non_loopback_host_turns_lan_mode_on(tmp_path):
    proc, first = start_serve(tmp_path, host="0.0.0.0")
    try:
        assert "LAN mode with an access key is on" in first
        match = re.search(r":(\d+)/\?key=", proc.stdout.readline())
        assert match
        assert call(f"http://127.0.0.1:{match.group(1)}/api/kit")[0] == 401
        proc.send_signal(signal.SIGTERM)
        proc.communicate(timeout=30)
    finally:
        proc.kill()
    assert proc.returncode == 0


def test_serve_on_a_busy_port_is_a_clear_input_error(tmp_path):
    import socket

    from fieldkit.errors import InputError
    from fieldkit.service import serve

    with socket.socket() as taken:
        taken.bind(("127.0.0.1", 0))
        taken.listen()
        port = taken.getsockname()[1]
        with open(os.devnull, "w") as quiet, pytest.raises(InputError) as caught:
            serve(host="127.0.0.1", port=port, data_dir=tmp_path / "data", out=quiet)
    assert caught.value.field == "port"
    assert "--port" in caught.value.detail
