"""Rope-height sweep: one `fieldkit model` process versus a whole-process NEC-2 (PyNEC) script.

47 heights from 2 to 25 m of a 40 m flat copper dipole (2 mm) at 3.6 MHz over average ground
(εr 13, σ 0.005 S/m), each with the impedance and a 1° elevation pattern (0–90°) in two planes
(along and across the wire). fieldkit: one `fieldkit model -` process fed a JSON array of 47 specs.
NEC-2: one Python process running PyNEC, 41 segments, Sommerfeld ground (GN 2), LD 5 copper.
Both are timed as whole processes (start-up included) in the same run. Target: fieldkit ≤ 1/5 of
NEC-2's wall time, peak memory < 300 MB.

Before timing, fieldkit's bytecode is compiled (as a pip install does; with PYTHONDONTWRITEBYTECODE
set, every run would otherwise recompile each edited module) and each side runs once untimed, so
both start from warm caches. The load average is printed beside the figures.

Run: ``.venv/bin/python benchmarks/bench_height_sweep.py [--repeat N]``
"""

from __future__ import annotations

import argparse
import importlib.util
import json
import os
import resource
import shutil
import subprocess
import sys
import time
from pathlib import Path

import numpy as np

FREQUENCY_MHZ = 3.6
HEIGHTS_M = np.linspace(2.0, 25.0, 47)
HALF_M = 20.0
RADIUS_M = 1e-3
GROUND = (13.0, 0.005)
COPPER_S_M = 1 / 1.7241e-8  # IEC 60028
ELEVATION = list(range(0, 91))
AZIMUTH = [0, 90]

NEC_SCRIPT = f"""
import numpy as np, PyNEC
out = []
for h in {HEIGHTS_M.tolist()!r}:
    c = PyNEC.nec_context()
    g = c.get_geometry()
    g.wire(1, 41, -{HALF_M}, 0, h, {HALF_M}, 0, h, {RADIUS_M}, 1, 1)
    c.geometry_complete(0)
    c.ld_card(5, 0, 0, 0, {COPPER_S_M}, 0, 0)
    c.gn_card(2, 0, {GROUND[0]}, {GROUND[1]}, 0, 0, 0, 0)
    c.ex_card(0, 1, 21, 0, 1.0, 0, 0, 0, 0, 0)
    c.fr_card(0, 1, {FREQUENCY_MHZ}, 0)
    c.rp_card(0, 91, 2, 0, 5, 0, 0, 0.0, 0.0, 1.0, 90.0, 0, 0)
    z = complex(np.ravel(c.get_input_parameters(0).get_impedance())[0])
    gain = np.asarray(c.get_radiation_pattern(0).get_gain())
    out.append((z.real, z.imag, float(gain.max())))
print(len(out), out[0], out[-1])
"""


def specs() -> list[dict]:
    return [
        {
            "frequency_mhz": FREQUENCY_MHZ,
            "ground": {"relative_permittivity": GROUND[0], "conductivity_s_m": GROUND[1]},
            "wires": [
                {
                    "points_m": [[-HALF_M, 0, h], [HALF_M, 0, h]],
                    "diameter_mm": 2e3 * RADIUS_M,
                    "conductor": "copper",
                }
            ],
            "feed": {"wire": 0, "distance_m": HALF_M},
            "pattern": {"elevation_deg": ELEVATION, "azimuth_deg": AZIMUTH},
        }
        for h in HEIGHTS_M.tolist()
    ]


def fieldkit_command() -> list[str]:
    exe = Path(sys.executable).with_name("fieldkit")
    if exe.exists():
        return [str(exe), "model", "-"]
    found = shutil.which("fieldkit")
    if found:
        return [found, "model", "-"]
    return [sys.executable, "-m", "fieldkit.antenna", "-"]  # until the CLI is installed


def _child_cpu() -> float:
    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime


def run(cmd: list[str], stdin: str | None = None) -> tuple[float, float, str]:
    """Wall and CPU (user + system) seconds of one child process, and its stdout."""
    cpu0 = _child_cpu()
    t0 = time.perf_counter()
    proc = subprocess.run(cmd, input=stdin, capture_output=True, text=True, check=False)
    wall = time.perf_counter() - t0
    if proc.returncode != 0:
        raise SystemExit(f"{cmd[0]} failed: {proc.stderr.strip()}")
    return wall, _child_cpu() - cpu0, proc.stdout


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=1, help="runs of each side (best time is kept)")
    args = ap.parse_args()
    payload = json.dumps(specs())
    cmd = fieldkit_command()
    package = Path(importlib.util.find_spec("fieldkit").origin).parent
    subprocess.run([sys.executable, "-m", "compileall", "-q", str(package)], check=True)
    run(cmd, payload)  # warm-up, untimed
    # RUSAGE_CHILDREN maxrss is that of the largest child so far: read it before NEC-2 runs
    fk_rss_mb = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024
    run([sys.executable, "-c", NEC_SCRIPT])
    fk_runs, nec_runs = [], []
    for _ in range(args.repeat):  # alternate the two so that machine load hits both alike
        wall, cpu, out = run(cmd, payload)
        fk_runs.append((wall, cpu))
        wall, cpu, nec_out = run([sys.executable, "-c", NEC_SCRIPT])
        nec_runs.append((wall, cpu))
    results = json.loads(out)
    z = [r["results"][0]["impedance_ohm"] for r in results]
    fk_wall, fk_cpu = min(w for w, _ in fk_runs), min(c for _, c in fk_runs)
    nec_wall, nec_cpu = min(w for w, _ in nec_runs), min(c for _, c in nec_runs)
    print(f"fieldkit command: {' '.join(cmd)}")
    print(
        f"fieldkit: {len(results)} heights, wall {fk_wall:.2f} s, CPU {fk_cpu:.2f} s (one process)"
    )
    print(f"          first Z {z[0]}, last Z {z[-1]}")
    print(
        f"NEC-2   : wall {nec_wall:.2f} s, CPU {nec_cpu:.2f} s (one process); {nec_out.strip()[:90]}"
    )
    print(
        f"ratio fieldkit/NEC-2: wall {fk_wall / nec_wall:.3f}, CPU {fk_cpu / nec_cpu:.3f} (target ≤ 0.2)"
    )
    print(f"fieldkit peak memory {fk_rss_mb:.0f} MB (target < 300 MB)")
    print("load average (1, 5, 15 min): " + ", ".join(f"{x:.2f}" for x in os.getloadavg()))


if __name__ == "__main__":
    main()
