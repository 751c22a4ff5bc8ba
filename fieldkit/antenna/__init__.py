"""The wire-antenna model: geometry → segments → moment-method solve → impedance, far and near field.

Pure numpy/scipy, SI units, no I/O. See :func:`solve` and :func:`model_json`.
"""

from .geometry import Antenna, Feed, Wire
from .grounds import GROUND_PRESETS, Ground, parse_ground
from .materials import Insulation
from .solver import Solution, solve
from .spec import model_json

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
