"""Each command imports only the layers it runs (issue 17: a cold start pays for nothing else).

Run as a user's process would run them: the real CLI entry in a fresh interpreter, then a look at
what it imported. The heavy libraries listed are those a command must not load.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "assets" / "demo"

PROBE = """
import contextlib, io, json, sys
from fieldkit import cli
with contextlib.redirect_stdout(io.StringIO()):
    rc = cli.main(sys.argv[1:])
print(json.dumps({"rc": rc, "modules": sorted(sys.modules)}))
"""

# the web service and desktop window, what PyIRI's package imports (plots, netCDF, tables), and
# scikit-rf (only for a reading at the radio end or an analyser file)
NEVER = (
    "flask",
    "waitress",
    "webview",
    "PySide6",
    "PyIRI",
    "matplotlib",
    "pandas",
    "netCDF4",
    "skrf",
)


def _imported(*args: str) -> list[str]:
    run = subprocess.run(
        [sys.executable, "-c", PROBE, *args],
        capture_output=True,
        text=True,
        timeout=300,
        cwd=ROOT,
        env=os.environ,
    )
    assert run.returncode == 0, run.stderr
    got = json.loads(run.stdout.strip().splitlines()[-1])
    assert got["rc"] == 0
    return got["modules"]


def _packages(modules: list[str]) -> set[str]:
    return {m.split(".")[0] for m in modules}


def test_model_loads_numpy_and_the_engine_only():
    mods = _imported("model", str(DEMO / "dipole-model.json"))
    assert "numpy" in _packages(mods)
    assert not _packages(mods) & {*NEVER, "scipy", "segno"}
    layers = {m.split(".")[1] for m in mods if m.startswith("fieldkit.") and m.count(".") >= 1}
    assert not layers & {"sky", "rigging", "safety", "planning", "plan", "service", "store"}


@pytest.mark.parametrize("command", ["sky", "plan"])
def test_sky_and_plan_do_not_load_pyiri_scipy_or_the_service(command):
    _imported("sky", str(DEMO / "sky.json"))  # builds the IRI tables in the test cache if needed
    name = "sky.json" if command == "sky" else "larch-basin-plan.json"
    mods = _imported(command, str(DEMO / name))
    # scipy.optimize alone costs ~0.3 s of CPU to import: the hung-wire roots no longer need it
    assert not _packages(mods) & {*NEVER, "scipy"}
