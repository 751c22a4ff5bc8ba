"""Start-up cost of the input tables (fieldkit.fields), against a reference tree and the libraries.

Issue 12 asked whether a typed-decoding library (msgspec, pydantic) should decode the inputs; the
bound was that `fieldkit model` must not start more than 30 ms slower. fieldkit kept its own
validators and declares each input object once as a field table (`fieldkit/fields.py`), which the
parser and the OpenAPI schema both read. This prints, side by side in one run:

* wall and CPU time of `fieldkit model` on a one-wire spec (median of N interleaved runs) for this
  tree and, with ``--reference DIR``, for another checkout (e.g. main before the tables);
* the import time of the tables alone (``fieldkit.fields`` + ``fieldkit.model_fields``);
* the import time of msgspec and pydantic when the interpreter has them (``--python`` to use another).

Run: ``.venv/bin/python benchmarks/bench_input_tables.py [--reference DIR] [--runs N]``
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
SPEC = {
    "frequency_mhz": 7.1,
    "ground": "perfect",
    "wires": [{"points_m": [[-10, 0, 10], [10, 0, 10]], "diameter_mm": 2.0}],
    "feed": {"wire": 0, "distance_m": 10.0},
}


def _run(tree: Path, spec_path: str) -> tuple[float, float]:
    """Wall and CPU seconds of one `fieldkit model` process on ``tree``."""
    env = {**os.environ, "PYTHONPATH": str(tree)}
    code = "import sys; from fieldkit.cli import main; sys.exit(main(['model', sys.argv[1]]))"
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    t0 = time.perf_counter()
    subprocess.run(
        [sys.executable, "-c", code, spec_path], env=env, check=True, capture_output=True
    )
    wall = time.perf_counter() - t0
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    return wall, cpu


def _import_ms(python: str, module: str, tree: Path) -> float | None:
    env = {**os.environ, "PYTHONPATH": str(tree)}
    code = f"import time; t = time.perf_counter(); import {module}; print(time.perf_counter() - t)"
    got = subprocess.run([python, "-c", code], env=env, capture_output=True, text=True)
    return float(got.stdout) * 1e3 if got.returncode == 0 else None


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--reference", type=Path, help="another checkout to compare with")
    parser.add_argument("--runs", type=int, default=15)
    parser.add_argument("--python", default=sys.executable, help="interpreter for the libraries")
    args = parser.parse_args()
    with tempfile.NamedTemporaryFile("w", suffix=".json", delete=False) as fh:
        json.dump(SPEC, fh)
    trees = {"this tree": ROOT, **({"reference": args.reference} if args.reference else {})}
    times = {name: [] for name in trees}
    for _ in range(args.runs):  # interleaved, so load changes hit both alike
        for name, tree in trees.items():
            times[name].append(_run(tree, fh.name))
    os.unlink(fh.name)
    load = ", ".join(f"{v:.2f}" for v in os.getloadavg())
    print(f"load average {load}; `fieldkit model` on a one-wire spec, median of {args.runs} runs")
    for name, got in times.items():
        wall = statistics.median(w for w, _ in got) * 1e3
        cpu = statistics.median(c for _, c in got) * 1e3
        print(f"  {name:10s} wall {wall:6.1f} ms  CPU {cpu:6.1f} ms")
    if args.reference:
        d_wall = statistics.median(a[0] - b[0] for a, b in zip(*times.values(), strict=True))
        d_cpu = statistics.median(a[1] - b[1] for a, b in zip(*times.values(), strict=True))
        print(
            f"  difference (this − reference, paired median): wall {d_wall * 1e3:+.1f} ms, "
            f"CPU {d_cpu * 1e3:+.1f} ms (bound: +30 ms)"
        )
    tables = _import_ms(sys.executable, "fieldkit.fields, fieldkit.model_fields", ROOT)
    print(f"import of the tables alone: {tables:.1f} ms")
    for lib in ("msgspec", "pydantic"):
        ms = _import_ms(args.python, lib, ROOT)
        print(f"import {lib}: " + ("not installed here" if ms is None else f"{ms:.1f} ms"))


if __name__ == "__main__":
    main()
