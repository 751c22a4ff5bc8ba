"""The desktop window for real: Xvfb, Qt WebEngine through pywebview, in a subprocess per window.

The page reports its title (and an API answer fetched from inside the page) back to Python. pywebview's
``evaluate_js`` wraps the script in ``eval()``, which the service's Content-Security-Policy
(``script-src 'self'``, no 'unsafe-eval') rightly refuses; ``window.run_js`` hands the script to Qt's
``runJavaScript`` unchanged (privileged, outside the page's CSP) and returns the last value on Qt.
"""

from __future__ import annotations

import json
import os
import re
import shutil
import signal
import subprocess
import sys
import textwrap
import urllib.request
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
pytestmark = [
    pytest.mark.desktop,
    pytest.mark.slow,
    pytest.mark.skipif(shutil.which("Xvfb") is None, reason="needs Debian's xvfb"),
]

REPORT = textwrap.dedent(
    """
    import json, sys

    def report(window):
        try:
            title = window.run_js("document.title")
            health = window.run_js(
                "var r = new XMLHttpRequest(); r.open('GET', '/api/health', false); r.send();"
                " r.responseText"
            )
            print("REPORT " + json.dumps({"title": title, "health": health}), flush=True)
        finally:
            window.destroy()
    """
)


@pytest.fixture(scope="module")
def display():
    """A private Xvfb; ``-displayfd`` lets the server pick a free display (no race with others)."""
    read_fd, write_fd = os.pipe()
    server = subprocess.Popen(
        ["Xvfb", "-displayfd", str(write_fd), "-screen", "0", "1280x800x24", "-nolisten", "tcp"],
        pass_fds=(write_fd,),
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
    )
    os.close(write_fd)
    with os.fdopen(read_fd) as pipe:
        number = pipe.readline().strip()
    assert number.isdigit(), "Xvfb did not start"
    yield f":{number}"
    server.terminate()
    server.wait(timeout=10)


def run_under_xvfb(
    display: str, script: str, *args: str, timeout: float = 120
) -> subprocess.CompletedProcess:
    env = {k: v for k, v in os.environ.items() if k not in ("DISPLAY", "WAYLAND_DISPLAY")}
    env.pop("QT_QPA_PLATFORM", None)
    env["DISPLAY"] = display
    proc = subprocess.Popen(
        [sys.executable, "-c", script, *args],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        cwd=ROOT,
        env=env,
        start_new_session=True,  # on a hang, end the window process and its helpers together
    )
    try:
        out, err = proc.communicate(timeout=timeout)
    except subprocess.TimeoutExpired:
        os.killpg(proc.pid, signal.SIGKILL)
        out, err = proc.communicate()
        pytest.fail(f"the window did not close within {timeout} s: {out[-1000:]} {err[-2000:]}")
    return subprocess.CompletedProcess(proc.args, proc.returncode, out, err)


def reported(proc: subprocess.CompletedProcess) -> dict:
    lines = [line for line in proc.stdout.splitlines() if line.startswith("REPORT ")]
    assert lines, f"no report; stdout={proc.stdout[-2000:]} stderr={proc.stderr[-3000:]}"
    return json.loads(lines[0].removeprefix("REPORT "))


def test_window_loads_a_page_and_reports_its_title(display, tmp_path):
    web = tmp_path / "web"
    web.mkdir()
    (web / "index.html").write_text(
        "<!doctype html><html><head><title>fieldkit window probe</title></head><body></body></html>",
        encoding="utf-8",
    )
    script = REPORT + textwrap.dedent(
        """
        from fieldkit.desktop import open_window
        from fieldkit.service import create_app
        app = create_app({"DATA_DIR": sys.argv[1], "WEB_DIR": sys.argv[2], "DEMO": False})
        sys.exit(open_window(app, on_loaded=report))
        """
    )
    proc = run_under_xvfb(display, script, str(tmp_path / "data"), str(web))
    assert proc.returncode == 0, proc.stderr[-3000:]
    got = reported(proc)
    assert got["title"] == "fieldkit window probe"
    assert json.loads(got["health"])["ok"] is True


def test_run_opens_the_app_in_a_window_and_stops_when_it_closes(display, tmp_path):
    index = (ROOT / "web" / "index.html").read_text(encoding="utf-8")
    expected = re.search(r"<title>([^<]*)</title>", index).group(1)
    script = REPORT + textwrap.dedent(
        """
        from fieldkit.desktop import run
        sys.exit(run(data_dir=sys.argv[1], on_loaded=report))
        """
    )
    proc = run_under_xvfb(display, script, str(tmp_path / "data"))
    assert proc.returncode == 0, proc.stderr[-3000:]
    assert reported(proc)["title"] == expected
    url = re.search(r"fieldkit window on (http://127\.0\.0\.1:\d+/)", proc.stdout).group(1)
    with pytest.raises(OSError):  # the server stopped with the window
        urllib.request.urlopen(url + "api/health", timeout=2)
    database = tmp_path / "data" / "fieldkit.sqlite3"
    assert database.exists()
    wal = database.with_name(database.name + "-wal")
    assert not wal.exists() or wal.stat().st_size == 0


def test_without_a_display_it_serves_and_says_why(tmp_path):
    env = {k: v for k, v in os.environ.items() if k not in ("DISPLAY", "WAYLAND_DISPLAY")}
    env.pop("QT_QPA_PLATFORM", None)
    proc = subprocess.Popen(
        [
            sys.executable,
            "-c",
            "import sys; from fieldkit.desktop import run; sys.exit(run(data_dir=sys.argv[1]))",
            str(tmp_path / "data"),
        ],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        cwd=ROOT,
        env={**env, "PYTHONUNBUFFERED": "1"},
    )
    try:
        lines = []
        while not any("http://127.0.0.1:" in line for line in lines):
            line = proc.stdout.readline()
            assert line, proc.stderr.read()
            lines.append(line)
        text = "".join(lines)
        assert "No desktop window: no display" in text
        url = re.search(r"http://127\.0\.0\.1:\d+/", text).group(0)
        if ":8765/" not in url:
            assert "8765 is not free" in text
        with urllib.request.urlopen(url + "api/health", timeout=10) as response:
            assert json.loads(response.read())["ok"] is True
        proc.send_signal(signal.SIGTERM)
        proc.communicate(timeout=30)
    finally:
        proc.kill()
    assert proc.returncode == 0
