"""Import cost of scikit-rf (Touchstone and the coax de-embedding), side by side with numpy's.

fieldkit imports scikit-rf only when a re-trim reading is taken at the radio end or an analyser
file is given (``fieldkit/rigging/line.py``, ``analyser.py``); the demo plan never pays for it
(``tests/cli/test_imports.py``). This prints, for fresh interpreters (median of N interleaved runs):

* ``import numpy`` alone;
* ``import numpy, scipy`` (what a plan already has loaded before the re-trim step);
* ``import skrf`` alone, and on top of numpy + scipy (the extra cost inside a plan);
* one radio-end reading moved to the feedpoint in a fresh process (import + first transform);

with ratios to numpy's import, wall and CPU.

Run: ``.venv/bin/python benchmarks/bench_skrf_import.py [--runs N]``
"""

from __future__ import annotations

import argparse
import os
import resource
import statistics
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
CASES = {
    "numpy": "import numpy",
    "numpy + scipy": "import numpy, scipy.special",
    "skrf alone": "import skrf",
    "skrf after numpy + scipy": "import numpy, scipy.special\nt = time.perf_counter()\nimport skrf",
    "one radio-end reading": (
        "from fieldkit.rigging.feedline import parse_coax\n"
        "from fieldkit.rigging.line import feedpoint_impedance\n"
        "c = parse_coax({'class': 'rg-58', 'length_m': 12.5})\n"
        "t = time.perf_counter()\n"
        "feedpoint_impedance([60 - 30j], frequencies_hz=[3.6e6], coax=c)"
    ),
}
PROBE = "import time\nt = time.perf_counter()\n{code}\nprint(time.perf_counter() - t)"


def _once(code: str) -> tuple[float, float]:
    """Wall time inside the process from the last ``t =`` mark, and the whole process's CPU [s]."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    got = subprocess.run(
        [sys.executable, "-c", PROBE.format(code=code)],
        capture_output=True,
        text=True,
        check=True,
        cwd=ROOT,
        env={**os.environ, "PYTHONPATH": str(ROOT)},
    )
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    return float(got.stdout.strip().splitlines()[-1]), cpu


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--runs", type=int, default=9)
    args = parser.parse_args()
    times: dict[str, list[tuple[float, float]]] = {name: [] for name in CASES}
    for _ in range(args.runs):  # interleaved, so load changes hit every case alike
        for name, code in CASES.items():
            times[name].append(_once(code))
    load = ", ".join(f"{v:.2f}" for v in os.getloadavg())
    print(f"load average {load}; fresh interpreters, median of {args.runs} runs")
    base_wall = statistics.median(w for w, _ in times["numpy"])
    base_cpu = statistics.median(c for _, c in times["numpy"])
    print(f"  {'case':28s} {'wall ms':>8s} {'ratio':>6s}   {'process CPU ms':>14s} {'ratio':>6s}")
    for name, got in times.items():
        wall = statistics.median(w for w, _ in got)
        cpu = statistics.median(c for _, c in got)
        print(
            f"  {name:28s} {wall * 1e3:8.1f} {wall / base_wall:6.2f}   "
            f"{cpu * 1e3:14.1f} {cpu / base_cpu:6.2f}"
        )
    print("  (wall: from the mark to the end of the import or transform; CPU: the whole process)")


if __name__ == "__main__":
    main()
