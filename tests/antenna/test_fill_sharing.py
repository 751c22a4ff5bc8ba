"""The free-space fill's shortcuts give the very numbers of the direct computation (issue 17).

The reference is numpy's own complex ``expm1`` and a fill with the geometry cache emptied; the
NEC-2 checks of tests/antenna cover that direct computation.
"""

from __future__ import annotations

import math

import numpy as np

from fieldkit.antenna import Antenna, Feed, Wire, kernel, parse_ground
from fieldkit.antenna.solver import checked_mesh
from fieldkit.constants import SPEED_OF_LIGHT_M_S


def _bits(a: np.ndarray) -> np.ndarray:
    return np.ascontiguousarray(a).view(np.uint64)


def test_expm1_of_an_imaginary_argument_is_numpys_to_the_bit():
    rng = np.random.default_rng(17)
    for _ in range(5):
        r = rng.uniform(1e-4, 100.0, (50, 20, 4))
        k = rng.uniform(1e-3, 1.3)  # 0.05–60 MHz (computed: 2π f / c)
        assert np.array_equal(_bits(kernel._expm1_minus_j(k, r)), _bits(np.expm1(-1j * k * r)))


def _mesh():
    pts = [
        [-20.0, 0.0, 12.0],
        [-7.0, 0.5, 10.8],
        [0.0, 0.0, 10.5],
        [9.0, -0.4, 10.9],
        [19.0, 0, 12],
    ]
    wire = Wire(points_m=np.array(pts), radius_m=0.8e-3, conductor="copper")
    antenna = Antenna(wires=(wire,), feed=Feed(wire=0, distance_m=20.05))
    return checked_mesh(antenna, parse_ground("poor"), 3.8e6)


def test_a_wire_filled_at_several_frequencies_matches_a_fresh_fill():
    mesh = _mesh()
    filled = []
    for f in (3.6e6, 3.636e6, 3.456e6):  # a resonance pair and an SWR-curve point share geometry
        omega = 2 * math.pi * f
        filled.append(kernel.free_space_matrix(mesh, omega / SPEED_OF_LIGHT_M_S, omega))
    for f, z in zip((3.6e6, 3.636e6, 3.456e6), filled, strict=True):
        kernel._GEOMETRY_CACHE.clear()
        omega = 2 * math.pi * f
        fresh = kernel.free_space_matrix(mesh, omega / SPEED_OF_LIGHT_M_S, omega)
        assert np.array_equal(_bits(z), _bits(fresh))
        fresh_image = kernel.perfect_image_matrix(mesh, omega / SPEED_OF_LIGHT_M_S, omega)
        again = kernel.perfect_image_matrix(mesh, omega / SPEED_OF_LIGHT_M_S, omega)
        assert np.array_equal(_bits(fresh_image), _bits(again))
