"""Bad input to the ``fieldkit`` command, in real subprocesses: exit 2 and one line on stderr that
names the field; nothing on stdout, no traceback (the CLI contract of ARCHITECTURE.md)."""

from __future__ import annotations

import json
import subprocess
import time

import pytest

from tests.robustness.helpers import DIPOLE, PYTHON, ROOT, SMALL_PLAN, TRACEBACK, strict_json

BOUND_S = 30.0
TEN_THOUSAND_WIRES = {
    **DIPOLE,
    "wires": [
        {"points_m": [[-1, i * 0.1, 10], [1, i * 0.1, 10]], "diameter_mm": 1} for i in range(10_000)
    ],
}
CASES = [
    # (command, stdin bytes, text the one stderr line must contain)
    ("model", b'{"frequency_mhz": NaN}', "NaN"),
    ("model", b'{"frequency_mhz": Infinity}', "Infinity"),
    ("model", json.dumps({**DIPOLE, "frequency_mhz": 1e308}).encode(), "frequency_mhz"),
    ("model", json.dumps({**DIPOLE, "power_w": -5}).encode(), "power_w"),
    ("model", json.dumps(TEN_THOUSAND_WIRES).encode(), "wires"),
    (
        "model",
        json.dumps(
            {**DIPOLE, "wires": [{"points_m": [[-20, 0, 10], [20, 0, -3]], "diameter_mm": 2}]}
        ).encode(),
        "wires[0].points_m[1]",
    ),
    ("model", b"[" * 100_000 + b"]" * 100_000, "stdin"),
    ("model", b"\xff\xfe\x00{", "UTF-8"),
    ("model", b"", "empty"),
    ("model", b"42", "(top level)"),
    (
        "sky",
        json.dumps(
            {
                "site": {"lat_deg": 200, "lon_deg": 8.2},
                "date": "2026-12-01",
                "solar": {"f107": 120},
                "channels_mhz": [3.6],
            }
        ).encode(),
        "site.lat_deg",
    ),
    ("plan", json.dumps({**SMALL_PLAN, "site": "日本"}, ensure_ascii=False).encode(), "site"),
    (
        "plan",
        json.dumps({**SMALL_PLAN, "site": {"ground": "perfect", "supports": []}}).encode(),
        "site.supports",
    ),
]


def run(command: str, stdin: bytes, *args: str) -> tuple[subprocess.CompletedProcess, float]:
    start = time.perf_counter()
    done = subprocess.run(
        [PYTHON, "-m", "fieldkit", command, *(args or ("-",))],
        input=stdin,
        capture_output=True,
        cwd=ROOT,
        timeout=120,
    )
    return done, time.perf_counter() - start


@pytest.mark.slow
@pytest.mark.parametrize(
    "command, stdin, named", CASES, ids=[f"{c[0]}-{i}" for i, c in enumerate(CASES)]
)
def test_bad_input_exits_2_with_one_named_line(command, stdin, named):
    done, elapsed = run(command, stdin)
    err = done.stderr.decode("utf-8", "replace")
    assert done.returncode == 2, (done.returncode, err[-500:])
    assert done.stdout == b""
    assert not TRACEBACK.search(err), err[-800:]
    lines = [line for line in err.splitlines() if line.strip()]
    assert len(lines) == 1, lines
    assert lines[0].startswith(f"fieldkit {command}: ") and named in lines[0], lines[0]
    assert elapsed < BOUND_S


def test_missing_file_is_named(tmp_path):
    done, _ = run("model", b"", str(tmp_path / "nope.json"))
    assert done.returncode == 2 and b"nope.json" in done.stderr and b"Traceback" not in done.stderr


def test_a_good_spec_prints_strict_json():
    done, _ = run("model", json.dumps(DIPOLE).encode())
    assert done.returncode == 0, done.stderr[-500:]
    out = strict_json(done.stdout.decode())
    assert out["results"][0]["impedance_ohm"]["r"] > 0
