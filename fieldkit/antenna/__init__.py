"""The wire-antenna model: geometry → segments → moment-method solve → impedance, far and near field.

Pure numpy/scipy, SI units, no I/O. See :func:`solve` and :func:`model_json`.
"""

import os

# The dense systems here are small (≤ 600 unknowns): BLAS worker threads only add start-up and
# spin-wait time (2-3× the CPU of a height sweep on a busy 2-core machine, docs/engine.md). Takes
# effect when this package is what first imports numpy (the `fieldkit model` command).
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")

from .grounds import GROUND_PRESETS, Ground, parse_ground
from .heap import retain_freed_memory
from .materials import Insulation
from .mesh import Antenna, Feed, Wire
from .solver import Solution, solve
from .spec import model_json

# The engine's arrays are freed and allocated again thousands of times per plan: keep the freed
# memory in the heap rather than page-faulting it in again each time (heap.py; glibc only).
retain_freed_memory()

__all__ = [
    "GROUND_PRESETS",
    "Antenna",
    "Feed",
    "Ground",
    "Insulation",
    "Solution",
    "Wire",
    "model_json",
    "parse_ground",
    "solve",
]
