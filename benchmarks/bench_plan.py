"""The whole demo plan against one NEC-2 (PyNEC) run of a 47-height sweep of the same dipole.

Issue 5's speed target: a whole plan of the demo scenario (all support pairs, forms and channels, with
the height sweep) should cost no more than one NEC-2 height sweep. Printed side by side: the demo plan
(`fieldkit.planning.plan` on assets/demo/larch-basin-plan.json, in-process, safety blocks and the sky
estimate included and also shown without the sky), and NEC-2 on 47 heights (3–26 m) of a 3.79 MHz
copper dipole of the demo's 1.6 mm wire over the demo's poor ground (GN 2 Sommerfeld, LD 5, 41
segments, impedance and a 0–90° elevation cut in two planes), plus the ratios and the engine solves
the plan used.

Run: ``.venv/bin/python benchmarks/bench_plan.py``  (PyNEC is a test-only dependency, GPL-3.0)
"""

from __future__ import annotations

import copy
import json
import os
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from fieldkit.planning import plan  # noqa: E402

FREQUENCY_MHZ = 3.79
HEIGHTS_M = np.linspace(3.0, 26.0, 47)
HALF_M = 18.8  # about the plan's 3.79 MHz leg
RADIUS_M = 0.8e-3  # the demo's 1.6 mm wire
POOR = (13.0, 0.002)  # "poor" ground preset (REFERENCES.md)
COPPER_S_M = 1 / 1.7241e-8  # IEC 60028


def nec_sweep() -> float:
    import PyNEC

    t0 = time.perf_counter()
    for h in HEIGHTS_M:
        c = PyNEC.nec_context()
        g = c.get_geometry()
        g.wire(1, 41, -HALF_M, 0, h, HALF_M, 0, h, RADIUS_M, 1, 1)
        c.geometry_complete(0)
        c.ld_card(5, 0, 0, 0, COPPER_S_M, 0, 0)
        c.gn_card(2, 0, POOR[0], POOR[1], 0, 0, 0, 0)
        c.ex_card(0, 1, 21, 0, 1.0, 0, 0, 0, 0, 0)
        c.fr_card(0, 1, FREQUENCY_MHZ, 0)
        c.rp_card(0, 91, 2, 0, 5, 0, 0, 0.0, 0.0, 1.0, 90.0, 0, 0)
        np.ravel(c.get_input_parameters(0).get_impedance())
        np.asarray(c.get_radiation_pattern(0).get_gain())
    return time.perf_counter() - t0


def timed_plan(spec: dict) -> tuple[float, dict]:
    t0 = time.perf_counter()
    out = plan(spec)
    return time.perf_counter() - t0, out


def main() -> None:
    with open(ROOT / "assets" / "demo" / "larch-basin-plan.json") as fh:
        demo = json.load(fh)
    t_nec = nec_sweep()
    t_cold, out = timed_plan(copy.deepcopy(demo))  # first call: imports, PyIRI coefficients, caches
    t_warm, out = timed_plan(copy.deepcopy(demo))  # what the running service sees
    no_sky = copy.deepcopy(demo)
    no_sky.pop("sky")
    t_nosky, _ = timed_plan(no_sky)
    e = out["engine"]
    load = ", ".join(f"{v:.2f}" for v in os.getloadavg())
    print(f"load average {load} (the figures move with it: the machine is shared)")
    print(f"NEC-2 47-height sweep (PyNEC, GN 2, 41 segments): {t_nec:.2f} s")
    print(
        f"demo plan, whole (sky + rigging + safety): first call {t_cold:.2f} s, warm {t_warm:.2f} s — "
        f"{e['solve_calls']} engine calls, {e['frequencies_solved']} frequency solves "
        f"({e.get('solutions_reused', 0)} reused), "
        f"{len(out['options'])} options in full, {len(out['more'])} more listed, {len(out['refused'])} refused"
    )
    print("  phases (warm): " + ", ".join(f"{k} {v:.2f}" for k, v in e.items() if k.endswith("_s")))
    print(f"demo plan without the sky estimate (warm): {t_nosky:.2f} s")
    print(
        f"ratio plan/NEC-2 sweep = {t_warm / t_nec:.2f} warm, {t_cold / t_nec:.2f} first call "
        f"(target ≤ 1); without sky {t_nosky / t_nec:.2f}"
    )
    best = out["options"][0]
    print(
        f"best: {best['form']} {best['frequency_mhz']} MHz on {', '.join(best['supports_used'])}, "
        f"legs {best['cut']['leg_m'][0]} m, feedpoint {best['feedpoint_height_m']} m"
    )


if __name__ == "__main__":
    main()
