"""Issue 17's four ratios in one run: fieldkit from a cold start against one NEC-2 height sweep.

The reference is the NEC-2 (PyNEC) 47-height sweep of ``bench_height_sweep.py`` as a whole Python
process. Measured in the same run, each as whole processes (start-up included), best of
``--repeat`` alternating rounds, wall and CPU (user + system, from ``os.wait4`` per process):

1. the same sweep job as ``fieldkit model -`` (47 specs in one array)      target ≤ 0.2 × NEC-2
2. ``fieldkit sky assets/demo/sky.json``                                   target ≤ 0.25 × NEC-2
3. ``fieldkit plan assets/demo/larch-basin-plan.json`` (cold process)       target ≤ 1.0 × NEC-2
   and the warm plan (a process that has planned the demo once, as the running service has)
                                                                           target ≤ 0.5 × NEC-2
   the warm plan also with the hang caches emptied before it (rigging/memo.py answers a re-plan's
   repeated hangs; a site the process has not hung before gets none of that)
   both also with the engine's numpy kernels (``FIELDKIT_NUMPY_KERNELS=1``: no compiled kernel)
4. the peak RSS of the cold demo plan process                              target ≤ 150 MB

"Cold" is a new process with fieldkit's cache directory already filled (the compact IRI tables
and fitted ground images, built on first use); the first-ever runs into an empty cache directory
are printed too. The benchmark uses a cache directory of its own (``FIELDKIT_CACHE_DIR``) and
compiles fieldkit's bytecode first, as a pip install does. The load average is printed beside the
figures: the team machine has 2 shared cores, so compare ratios and CPU times, not walls alone.

Run: ``.venv/bin/python benchmarks/bench_coldstart.py [--repeat N]`` (PyNEC is a test dependency).
``--tree DIR`` runs another fieldkit source tree instead (``python -m fieldkit`` with that tree first
on the path), e.g. ``git -C /work/main archive main | tar -x -C /tmp/before`` for a before/after.
"""

from __future__ import annotations

import argparse
import datetime as dt
import importlib.util
import json
import os
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(Path(__file__).resolve().parent))

from bench_height_sweep import NEC_SCRIPT, specs  # noqa: E402

DEMO = ROOT / "assets" / "demo"
CWD = ROOT  # children run here (``python -m`` puts the working directory first on the path)
WARM_PLAN = """
import copy, json, sys, time
from fieldkit.planning import plan
from fieldkit.rigging import hung
demo = json.load(open(sys.argv[1]))
plan(copy.deepcopy(demo))  # the first plan of the process: imports, caches
def empty_hang_caches():  # as for a site the process has not hung before (rigging/memo.py)
    for cache in (hung.hang_span.cache, hung.hang_inverted_v.cache, hung._RECUT_CACHE):
        cache.clear()
best = {"wall": float("inf"), "cpu": float("inf"), "wall_fresh": float("inf"), "cpu_fresh": float("inf")}
for _ in range(int(sys.argv[2])):
    for suffix in ("", "_fresh"):
        if suffix:
            empty_hang_caches()
        w, c = time.perf_counter(), time.process_time()
        out = plan(copy.deepcopy(demo))
        best["wall" + suffix] = min(best["wall" + suffix], time.perf_counter() - w)
        best["cpu" + suffix] = min(best["cpu" + suffix], time.process_time() - c)
print(json.dumps({**best, "options": len(out["options"])}))
"""


def run(cmd: list[str], *, stdin: str | None = None, env: dict) -> dict:
    """One whole process: wall [s], CPU (user + system) [s], peak RSS [MB] and its stdout.

    The child's own resource usage comes from ``os.wait4`` (not the sum over all children).
    """
    with tempfile.TemporaryFile("w+") as fin, tempfile.TemporaryFile("w+") as fout:
        fin.write(stdin or "")
        fin.seek(0)
        t0 = time.perf_counter()
        proc = subprocess.Popen(
            cmd, stdin=fin, stdout=fout, stderr=subprocess.PIPE, env=env, cwd=CWD, text=True
        )
        err = proc.stderr.read()
        _, status, usage = os.wait4(proc.pid, 0)
        wall = time.perf_counter() - t0
        proc.returncode = os.waitstatus_to_exitcode(status)
        proc.stderr.close()
        fout.seek(0)
        out = fout.read()
    if proc.returncode != 0:
        raise SystemExit(f"{' '.join(cmd[:3])} failed: {err.strip()[-400:]}")
    return {
        "wall": wall,
        "cpu": usage.ru_utime + usage.ru_stime,
        "rss_mb": usage.ru_maxrss / 1024,
        "out": out,
    }


def best(runs: list[dict], key: str) -> float:
    return min(r[key] for r in runs)


def load() -> str:
    return ", ".join(f"{x:.2f}" for x in os.getloadavg())


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=3, help="alternating rounds (best is kept)")
    ap.add_argument("--warm-runs", type=int, default=3, help="timed plans in the warm process")
    ap.add_argument("--tree", type=Path, help="another fieldkit source tree to measure")
    args = ap.parse_args()
    cache = tempfile.mkdtemp(prefix="fieldkit-bench-cache-")
    env = {**os.environ, "FIELDKIT_CACHE_DIR": cache}
    if args.tree:
        global CWD
        CWD = args.tree.resolve()
        package = CWD / "fieldkit"
        env["PYTHONPATH"] = str(args.tree.resolve())
        fk_cmd = [sys.executable, "-m", "fieldkit"]
    else:
        package = Path(importlib.util.find_spec("fieldkit").origin).parent
        exe = Path(sys.executable).with_name("fieldkit")  # the console script, as users run it
        fk_cmd = [str(exe)] if exe.exists() else [sys.executable, "-m", "fieldkit"]
    subprocess.run([sys.executable, "-m", "compileall", "-q", str(package)], check=True)
    model = [*fk_cmd, "model", "-"]
    sweep = json.dumps(specs())
    sky = [*fk_cmd, "sky", str(DEMO / "sky.json")]
    plan = [*fk_cmd, "plan", str(DEMO / "larch-basin-plan.json")]
    nec = [sys.executable, "-c", NEC_SCRIPT]
    warm = [
        sys.executable,
        "-c",
        WARM_PLAN,
        str(DEMO / "larch-basin-plan.json"),
        str(args.warm_runs),
    ]
    stamp = dt.datetime.now(dt.UTC).strftime("%Y-%m-%d %H:%M UTC")
    load_before = load()
    try:
        first = {
            "sky": run(sky, env=env),  # builds the IRI tables (imports PyIRI once)
            "sweep": run(model, stdin=sweep, env=env),  # fits the ground at 3.6 MHz
            "plan": run(plan, env=env),  # fits the plan's other frequencies
        }
        run(nec, env=env)  # warm-up of the reference, untimed
        keys = ("nec", "sweep", "sky", "plan", "warm", "plan_np", "warm_np")
        rounds: dict[str, list[dict]] = {k: [] for k in keys}
        env_np = {**env, "FIELDKIT_NUMPY_KERNELS": "1"}  # the engine's numpy reference kernels
        for _ in range(args.repeat):  # alternate, so that machine load hits every side alike
            rounds["nec"].append(run(nec, env=env))
            rounds["sweep"].append(run(model, stdin=sweep, env=env))
            rounds["sky"].append(run(sky, env=env))
            rounds["plan"].append(run(plan, env=env))
            rounds["warm"].append(run(warm, env=env))
            rounds["plan_np"].append(run(plan, env=env_np))
            rounds["warm_np"].append(run(warm, env=env_np))
    finally:
        shutil.rmtree(cache, ignore_errors=True)
    n_heights = len(json.loads(rounds["sweep"][-1]["out"]))
    n_options = len(json.loads(rounds["plan"][-1]["out"])["options"])
    nec_wall, nec_cpu = best(rounds["nec"], "wall"), best(rounds["nec"], "cpu")
    print(f"fieldkit cold start against NEC-2 — {stamp}, best of {args.repeat} rounds")
    print(f"fieldkit: {package.parent}")
    print(f"load average (1, 5, 15 min): before {load_before}; after {load()}")
    print(f"NEC-2 47-height sweep (PyNEC, one process): wall {nec_wall:.3f} s, CPU {nec_cpu:.3f} s")
    print(f"{'':38} {'wall s':>8} {'CPU s':>8} {'wall ratio':>11} {'CPU ratio':>10}  target")
    rows = [
        ("1. sweep job, fieldkit model -", "sweep", 0.2, f"{n_heights} heights"),
        ("2. fieldkit sky (demo), cold", "sky", 0.25, ""),
        ("3. fieldkit plan (demo), cold", "plan", 1.0, f"{n_options} options"),
        ("3. demo plan, warm process", "warm", 0.5, f"{args.warm_runs} plans per process"),
    ]
    rows += [
        ("   cold plan, numpy kernels", "plan_np", 1.0, "FIELDKIT_NUMPY_KERNELS=1"),
        ("   warm plan, numpy kernels", "warm_np", 0.5, "FIELDKIT_NUMPY_KERNELS=1"),
    ]
    for key in ("warm", "warm_np"):  # the warm process reports its own best plan
        rounds[key] = [{**w, **json.loads(w["out"].strip().splitlines()[-1])} for w in rounds[key]]
    rounds["warm_fresh"] = [
        {"wall": w["wall_fresh"], "cpu": w["cpu_fresh"]} for w in rounds["warm"]
    ]
    rows.insert(
        4, ("   warm, hang caches emptied", "warm_fresh", 0.5, "hangs solved afresh (memo.py)")
    )
    for label, key, target, note in rows:
        wall, cpu = best(rounds[key], "wall"), best(rounds[key], "cpu")
        print(
            f"{label:38} {wall:8.3f} {cpu:8.3f} {wall / nec_wall:11.3f} {cpu / nec_cpu:10.3f}"
            f"  ≤ {target:g}  {note}"
        )
    rss = max(r["rss_mb"] for r in rounds["plan"])
    print(f"4. peak RSS of the cold demo plan process: {rss:.0f} MB (target ≤ 150 MB)")
    print(
        "first runs into an empty cache directory (wall / CPU s): "
        + ", ".join(f"{k} {v['wall']:.2f} / {v['cpu']:.2f}" for k, v in first.items())
    )


if __name__ == "__main__":
    main()
