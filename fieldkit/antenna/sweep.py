"""Translated copies of one antenna solved together: a rope-height sweep.

Raising or lowering the whole antenna changes only its coupling through the ground. What the
copies share is computed once — the mesh, the free-space and loading matrices, the pair layout of
the ground coupling, the far-field phases of the wires — and what differs from copy to copy is
computed for all copies in one pass: the image sums of the lossy ground, the linear solves, and
every far-field evaluation behind the power, the maximum, the beamwidths and the pattern (one
stacked product per stage instead of one small product per copy). The solutions equal
:func:`fieldkit.antenna.solve` of each copy to rounding.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from fieldkit.constants import SPEED_OF_LIGHT_M_S

from . import farfield, figures
from .blas import single_threaded
from .grounds import Ground
from .kernel import perfect_image_matrix
from .mesh import Antenna, Mesh
from .solver import (
    Solution,
    _free_space_matrix_cached,
    _loading_matrix_cached,
    _series_loading,
    feed_scaled_currents,
    package,
)

CHUNK = 16  # copies per pass: bounds the memory of the stacked ground coupling (~2 MB per copy)


def translation_key(antenna: Antenna, mesh: Mesh) -> tuple:
    """Equal for antennas that are translated copies of each other with the same wires."""
    return (
        mesh.shape_key(),
        tuple((w.conductor, w.insulation) for w in antenna.wires),
    )


@single_threaded()
def solve_translated(
    antennas: Sequence[Antenna],
    meshes: Sequence[Mesh],
    *,
    frequencies_hz: Sequence[float],
    ground: Ground,
    power_w: float,
    reference_impedance_ohm: float,
) -> list[list[Solution]]:
    """Solve translated copies of one antenna at each frequency (``solve`` per copy, together).

    Parameters
    ----------
    antennas, meshes : sequences
        The copies and their checked meshes (:func:`fieldkit.antenna.mesh.checked_mesh`); all
        with one :func:`translation_key`.
    frequencies_hz, ground, power_w, reference_impedance_ohm
        As :func:`fieldkit.antenna.solve` (already validated).

    Returns
    -------
    list of list of Solution
        Per copy, one solution per frequency.

    Raises
    ------
    fieldkit.errors.InputError
        As ``solve`` would for the first copy that fails.
    """
    out: list[list[Solution]] = [[] for _ in antennas]
    for lo in range(0, len(antennas), CHUNK):
        part = range(lo, min(lo + CHUNK, len(antennas)))
        for f in frequencies_hz:
            sols = _solve_chunk(
                antennas[part.start], [meshes[i] for i in part], float(f), ground, power_w,
                reference_impedance_ohm,
            )  # fmt: skip
            for i, sol in zip(part, sols, strict=True):
                out[i].append(sol)
    return out


def _ground_matrices(meshes, ground: Ground, f: float, k: float, omega: float):
    if ground.kind == "free-space":
        return 0.0
    if ground.kind == "perfect":
        return np.stack([perfect_image_matrix(m, k, omega) for m in meshes])
    from .sommerfeld import lossy_ground_matrices

    return lossy_ground_matrices(meshes, ground, f)


def _solve_chunk(antenna, meshes, f, ground, power_w, z_ref) -> list[Solution]:
    omega = 2 * math.pi * f
    k = omega / SPEED_OF_LIGHT_M_S
    mesh = meshes[0]
    z_fs = _free_space_matrix_cached(mesh, k, omega)
    zmat = z_fs + _ground_matrices(meshes, ground, f, k, omega)
    if np.ndim(zmat) == 2:
        zmat = np.broadcast_to(zmat, (len(meshes), *zmat.shape))
    z_load = _series_loading(antenna, mesh, f)
    if np.any(z_load != 0):
        zmat = zmat + _loading_matrix_cached(mesh, z_load)
    rhs = np.zeros((len(meshes), mesh.n_basis, 1), dtype=complex)
    rhs[:, mesh.feed_basis] = 1.0
    coeffs = np.linalg.solve(zmat, rhs)[..., 0]
    solved = [feed_scaled_currents(m, c, power_w) for m, c in zip(meshes, coeffs, strict=True)]
    currents = [(i0, i1) for i0, i1, _ in solved]
    grids = [farfield.power_grid(m, ground, f) for m in meshes]
    fields: list = [None] * len(meshes)
    for idx in _same_grid_groups(grids):
        el, az, _ = grids[idx[0]]
        rhat = farfield.directions(el, az)
        got = farfield.far_field_translated(
            [meshes[i] for i in idx], [currents[i] for i in idx], ground, f, [rhat] * len(idx)
        )
        for i, (e_th, e_ph) in zip(idx, got, strict=True):
            fields[i] = (e_th, e_ph, grids[i])
    return [
        package(m, f, ground, power_w, z_ref, z_load, z_in, cur, fld)
        for m, (*cur, z_in), fld in zip(meshes, solved, fields, strict=True)
    ]


def _same_grid_groups(grids) -> list[list[int]]:
    groups: dict[tuple, list[int]] = {}
    for i, (el, az, _) in enumerate(grids):
        groups.setdefault((el.tobytes(), az.tobytes()), []).append(i)
    return list(groups.values())


def evaluator(sols: Sequence[Solution]) -> figures.Evaluate:
    """Partial gains of translated copies solved at one frequency, evaluated together."""
    meshes = [s.mesh for s in sols]
    currents = [s.segment_currents_a for s in sols]
    s0 = sols[0]

    def evaluate(rhats):
        fields = farfield.far_field_translated(meshes, currents, s0.ground, s0.frequency_hz, rhats)
        return [
            farfield.gain_from_field(e_th, e_ph, s.power_w["input"])
            for (e_th, e_ph), s in zip(fields, sols, strict=True)
        ]

    return evaluate


@single_threaded()
def figures_together(sols: Sequence[Solution], pattern=None) -> list[dict | None]:
    """Zenith gain, maximum and beamwidths of translated copies at one frequency, all at once.

    They are stored in each solution (its properties then return them without more far-field
    work); with ``pattern`` = (elevations, azimuths) [deg] the partial gains [dBi] of each copy
    on that grid are returned as :meth:`Solution.gain_dbi_by_polarisation` gives them.
    """
    evaluate = evaluator(sols)
    zenith = farfield.directions([90.0], [0.0])
    for s, (g_th, g_ph) in zip(sols, evaluate([zenith] * len(sols)), strict=True):
        s._cache["zenith"] = float(figures.total_gain_db(g_th, g_ph)[0, 0])
    for s, m in zip(sols, figures.maxima(sols, evaluate), strict=True):
        s._cache["max"] = m
    widths = figures.cut_beamwidths(sols, [s.cut_azimuths_deg() for s in sols], evaluate)
    for s, (broadside, along) in zip(sols, widths, strict=True):
        s._cache["bw"] = {"broadside": broadside, "along_wire": along}
    if pattern is None:
        return [None] * len(sols)
    rhat = farfield.directions(*pattern)
    return [
        {
            "vertical": 10 * np.log10(np.maximum(g_th, 1e-30)),
            "horizontal": 10 * np.log10(np.maximum(g_ph, 1e-30)),
        }
        for g_th, g_ph in evaluate([rhat] * len(sols))
    ]
