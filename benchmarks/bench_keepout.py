"""Time the safety block of one plan option: the keep-out search on the engine's near field.

Run:  .venv/bin/python benchmarks/bench_keepout.py [--ground perfect|average|...] [--repeat N] [--plan]

For each case (a flat 40 m dipole at 8 m and an inverted-V with 2.5 m ends, demo site) it prints the
engine solve, the whole safety block, the number of near-field points the search used, and — side by
side — NEC-2 (PyNEC, the reference) computing the near field at the same number of points (NE and NH
cards), with the ratio. With --plan it also runs the demo plan and prints the share of its time spent
in safety blocks.
"""

from __future__ import annotations

import argparse
import copy
import json
import statistics
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "assets" / "demo" / "larch-basin-plan.json"


def _cases():
    x = np.linspace(-20, 20, 21)
    z = 8.0 - 0.6 * (1 - (x / 20) ** 2)
    flat = {
        "form": "flat",
        "frequency_mhz": 3.79,
        "supports_used": ["T1", "T2"],
        "rope_heights_m": {"T1": 8.0, "T2": 8.0},
        "hung_wire_m": [[float(a), 1.5, float(b)] for a, b in zip(x, z, strict=True)],
        "feed_distance_m": 20.0,
        "wire": {"diameter_mm": 1.6, "conductor": "copper"},
        "feedpoint_height_m": 7.4,
    }
    inv = {
        "form": "inverted-v",
        "frequency_mhz": 3.79,
        "supports_used": ["M1"],
        "rope_heights_m": {"M1": 9.0},
        "hung_wire_m": [[-13.5, 0, 2.5], [0, 0, 9.0], [13.5, 0, 2.5]],
        "feed_distance_m": float(np.hypot(13.5, 6.5)),
        "wire": {"diameter_mm": 1.6, "conductor": "copper"},
        "feedpoint_height_m": 9.0,
        "mast": {"id": "M1", "height_m": 9.0, "guys": 3},
    }
    return [
        ("flat 40 m at 8 m, 100 W SSB", flat, {"power_w": 100, "mode": "ssb"}),
        ("inverted-V, ends 2.5 m, 100 W SSB", inv, {"power_w": 100, "mode": "ssb"}),
        ("inverted-V, ends 2.5 m, 400 W data", inv, {"power_w": 400, "mode": "data"}),
    ]


def _nec_near_field(option, ground, n_points: int) -> float:
    """Seconds for NEC-2 to solve the same wire and give E and H at n points (reference)."""
    import PyNEC

    pts = np.array(option["hung_wire_m"], float)
    t0 = time.perf_counter()
    ctx = PyNEC.nec_context()
    geo = ctx.get_geometry()
    for tag, (a, b) in enumerate(zip(pts[:-1], pts[1:], strict=True), start=1):
        nseg = max(1, int(round(np.linalg.norm(b - a) / 1.0)))
        geo.wire(tag, nseg, *a, *b, 0.8e-3, 1.0, 1.0)
    ctx.geometry_complete(0)
    if ground.kind == "perfect":
        ctx.gn_card(1, 0, 0, 0, 0, 0, 0, 0)
    elif ground.kind == "lossy":
        ctx.gn_card(2, 0, ground.relative_permittivity, ground.conductivity_s_m, 0, 0, 0, 0)
    ctx.ex_card(0, len(pts) // 2, 1, 0, 1.0, 0, 0, 0, 0, 0)
    ctx.fr_card(0, 1, option["frequency_mhz"], 0)
    # one NE and one NH card over a grid of about n points (NEC's own rectangular grid)
    side = max(2, int(round(np.sqrt(n_points / 3))))
    ctx.ne_card(0, side, side, 3, -20.0, -5.0, 0.5, 40.0 / side, 10.0 / side, 0.65)
    ctx.nh_card(0, side, side, 3, -20.0, -5.0, 0.5, 40.0 / side, 10.0 / side, 0.65)
    ctx.get_near_field_pattern(0)
    ctx.get_near_field_pattern(1)
    return time.perf_counter() - t0


def _timed(block, option, site, radio, ground):
    t0 = time.perf_counter()
    out = block(option=copy.deepcopy(option), site=site, radio=radio, ground=ground)
    return time.perf_counter() - t0, out


def _solve_time(option, ground, radio) -> float:
    """The one engine solve inside the block, timed alone."""
    from fieldkit.antenna import Antenna, Feed, Wire, solve

    w = Wire(points_m=np.array(option["hung_wire_m"], float), radius_m=0.8e-3, conductor="copper")
    t0 = time.perf_counter()
    solve(
        Antenna(wires=(w,), feed=Feed(wire=0, distance_m=option["feed_distance_m"])),
        frequencies_hz=[option["frequency_mhz"] * 1e6],
        ground=ground,
        power_w=radio["power_w"],
    )
    return time.perf_counter() - t0


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--ground", default="perfect", help="ground preset (default perfect)")
    parser.add_argument("--repeat", type=int, default=3, help="runs per case (median printed)")
    parser.add_argument("--plan", action="store_true", help="also time the demo plan")
    args = parser.parse_args()

    from fieldkit.antenna import parse_ground
    from fieldkit.safety import safety_block

    site = json.loads(DEMO.read_text())["site"]
    ground = parse_ground(args.ground)
    print(f"ground: {args.ground}; median of {args.repeat} runs")
    print(
        f"{'case':38s} {'solve s':>8s} {'block s':>8s} {'points':>7s} {'NEC-2 s':>8s} {'ratio':>6s}"
    )
    for name, option, radio in _cases():
        # first call: the engine's per-(frequency, ground) tables are built here, not timed below
        cold_s, _ = _timed(safety_block, option, site, radio, ground)
        print(f"{name:38s} first call {cold_s:.3f} s (engine tables cold)")
        block_s = statistics.median(
            _timed(safety_block, option, site, radio, ground)[0] for _ in range(args.repeat)
        )
        solve_s = statistics.median(_solve_time(option, ground, radio) for _ in range(args.repeat))
        _, out = _timed(safety_block, option, site, radio, ground)
        n = out["exposure"]["near_field_points"]
        nec_s = statistics.median(_nec_near_field(option, ground, n) for _ in range(args.repeat))
        print(
            f"{name:38s} {solve_s:8.3f} {block_s:8.3f} {n:7d} {nec_s:8.3f} {block_s / nec_s:6.2f}"
        )
        print(
            f"{'':38s} keep-out {out['keep_out_m']} m, min end height {out['min_end_height_m']} m"
        )

    if args.plan:
        from fieldkit.planning import plan

        spec = json.loads(DEMO.read_text())
        spec.pop("name", None)
        spec["site"]["ground"] = args.ground
        t0 = time.perf_counter()
        result = plan(spec)
        total = time.perf_counter() - t0
        safety_s = result["engine"]["safety_s"]  # the plan times its own safety checks
        print(
            f"demo plan: {total:.1f} s, of which safety checks {safety_s:.1f} s "
            f"({100 * safety_s / total:.0f} %), "
            f"{len(result['options'])} options"
        )
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
