"""Solve the antenna: impedance, currents, power accounting and the far-field figures.

The thin-wire moment-method system of :mod:`fieldkit.antenna.kernel` (free space and image) and
:mod:`fieldkit.antenna.sommerfeld` (lossy ground) plus the wires' series loading
(:mod:`fieldkit.antenna.materials`) is solved once per frequency for a 1 V gap at the feed; currents
are then scaled to the requested input power and reported as RMS values.

References
----------
.. [1] R. F. Harrington, *Field Computation by Moment Methods*, Macmillan 1968, ch. 4.
.. [2] C. A. Balanis, *Antenna Theory*, 4th ed., Wiley 2016, §2.15 (gain, efficiency), §2.13 (SWR).
"""

from __future__ import annotations

import math
from collections import OrderedDict
from collections.abc import Iterable
from dataclasses import dataclass, field

import numpy as np

from fieldkit.constants import SPEED_OF_LIGHT_M_S
from fieldkit.errors import InputError
from fieldkit.model_fields import MAX_FREQUENCY_MHZ, MIN_FREQUENCY_MHZ

from . import farfield, figures
from .blas import single_threaded
from .grounds import Ground
from .kernel import free_space_matrix, loading_matrix, perfect_image_matrix, segment_end_currents
from .materials import conductor_impedance_per_m, insulation_impedance_per_m
from .mesh import Antenna, Mesh, checked_mesh

MIN_FREQUENCY_HZ = MIN_FREQUENCY_MHZ * 1e6
MAX_FREQUENCY_HZ = MAX_FREQUENCY_MHZ * 1e6


@dataclass(frozen=True)
class Solution:
    """The solved antenna at one frequency. Currents and fields are RMS at ``power_w["input"]``."""

    frequency_hz: float
    impedance_ohm: complex
    swr: float
    radiation_efficiency: float
    power_w: dict
    currents_a: np.ndarray
    segment_centres_m: np.ndarray
    mesh: Mesh = field(repr=False)
    ground: Ground = field(repr=False)
    segment_currents_a: tuple[np.ndarray, np.ndarray] = field(repr=False)
    _cache: dict = field(default_factory=dict, repr=False, compare=False)

    # -- far field ---------------------------------------------------------------------------
    @single_threaded()
    def partial_gains_at(self, rhat: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Linear partial gains (θ/vertical, φ/horizontal) at unit vectors ``rhat`` (..., 3) [-]."""
        e_th, e_ph = farfield.far_field(
            self.mesh, *self.segment_currents_a, self.ground, self.frequency_hz, rhat
        )
        return farfield.gain_from_field(e_th, e_ph, self.power_w["input"])

    def partial_gains(self, elevation_deg, azimuth_deg) -> tuple[np.ndarray, np.ndarray]:
        """Linear partial gains (θ/vertical, φ/horizontal) [n_azimuth, n_elevation] [-]."""
        return self.partial_gains_at(farfield.directions(elevation_deg, azimuth_deg))

    def _evaluate(self, rhats) -> list[tuple[np.ndarray, np.ndarray]]:
        return [self.partial_gains_at(r) for r in rhats]

    def gain_dbi(self, elevation_deg, azimuth_deg) -> np.ndarray:
        """Total gain in dBi re input power, [n_azimuth, n_elevation]; ground and conductor loss included."""
        return figures.total_gain_db(*self.partial_gains(elevation_deg, azimuth_deg))

    def gain_dbi_by_polarisation(self, elevation_deg, azimuth_deg) -> dict[str, np.ndarray]:
        """``{"vertical": …, "horizontal": …}`` partial gains (θ and φ components) in dBi."""
        g_th, g_ph = self.partial_gains(elevation_deg, azimuth_deg)
        return {
            "vertical": 10 * np.log10(np.maximum(g_th, 1e-30)),
            "horizontal": 10 * np.log10(np.maximum(g_ph, 1e-30)),
        }

    @property
    def zenith_gain_dbi(self) -> float:
        if "zenith" not in self._cache:
            self._cache["zenith"] = float(self.gain_dbi([90.0], [0.0])[0, 0])
        return self._cache["zenith"]

    @single_threaded()
    def _maximum(self) -> tuple[float, float, float]:
        if "max" not in self._cache:
            (self._cache["max"],) = figures.maxima([self], self._evaluate)
        return self._cache["max"]

    @property
    def max_gain_dbi(self) -> float:
        return self._maximum()[0]

    @property
    def max_gain_elevation_deg(self) -> float:
        return self._maximum()[1]

    @property
    def max_gain_azimuth_deg(self) -> float:
        return self._maximum()[2]

    def wire_azimuth_deg(self) -> float:
        """Azimuth of the horizontal current moment (the dipole's axis) [deg], in [0, 180)."""
        i0, i1 = self.segment_currents_a
        moment = ((i0 + i1)[:, None] * 0.5 * self.mesh.tangent * self.mesh.length[:, None]).sum(0)
        phase = np.exp(-1j * np.angle(moment[np.argmax(np.abs(moment[:2]))]))
        h = (moment * phase).real[:2]
        if np.hypot(*h) < 1e-12:
            return 0.0
        return float(math.degrees(math.atan2(h[1], h[0])) % 180.0)

    def cut_azimuths_deg(self) -> list[float]:
        """Azimuths of the two beamwidth cuts: broadside (⟂ wire) and along the wire [deg]."""
        axis = self.wire_azimuth_deg()
        return [axis + 90.0, axis]

    @single_threaded()
    def beamwidth_deg(self) -> dict[str, float]:
        """−3 dB width of the elevation cut through zenith, broadside (⟂ wire) and along the wire [deg].

        The width is that of the lobe holding the cut's maximum, measured from its −3 dB points.
        """
        if "bw" not in self._cache:
            ((broadside, along),) = figures.cut_beamwidths(
                [self], [self.cut_azimuths_deg()], self._evaluate
            )
            self._cache["bw"] = {"broadside": broadside, "along_wire": along}
        return dict(self._cache["bw"])

    # -- near field --------------------------------------------------------------------------
    @single_threaded()
    def near_field(self, points_m) -> tuple[np.ndarray, np.ndarray]:
        """E [V/m] and H [A/m] complex RMS vectors (n, 3) at points, ground included."""
        from .nearfield import near_field

        return near_field(self, np.asarray(points_m, dtype=float).reshape(-1, 3))


_FREE_SPACE_CACHE: OrderedDict[bytes, np.ndarray] = OrderedDict()
_FREE_SPACE_CACHE_SIZE = 32


def _free_space_matrix_cached(mesh: Mesh, k: float, omega: float) -> np.ndarray:
    """Free-space matrix, reused for translated copies of the same wires (a rope-height sweep)."""
    key = np.float64(k).tobytes() + mesh.shape_key()
    z = _FREE_SPACE_CACHE.get(key)
    if z is None:
        z = free_space_matrix(mesh, k, omega)
        _FREE_SPACE_CACHE[key] = z
        if len(_FREE_SPACE_CACHE) > _FREE_SPACE_CACHE_SIZE:
            _FREE_SPACE_CACHE.popitem(last=False)
    else:
        _FREE_SPACE_CACHE.move_to_end(key)
    return z


_LOADING_CACHE: OrderedDict[bytes, np.ndarray] = OrderedDict()


def _loading_matrix_cached(mesh: Mesh, z_load: np.ndarray) -> np.ndarray:
    """Series-loading matrix, reused for translated copies with the same loading (a sweep)."""
    key = np.ascontiguousarray(z_load).tobytes() + mesh.shape_key()
    z = _LOADING_CACHE.get(key)
    if z is None:
        z = loading_matrix(mesh, z_load)
        _LOADING_CACHE[key] = z
        if len(_LOADING_CACHE) > _FREE_SPACE_CACHE_SIZE:
            _LOADING_CACHE.popitem(last=False)
    else:
        _LOADING_CACHE.move_to_end(key)
    return z


def _ground_matrix(mesh: Mesh, ground: Ground, frequency_hz: float, k: float, omega: float):
    if ground.kind == "free-space":
        return 0.0
    if ground.kind == "perfect":
        return perfect_image_matrix(mesh, k, omega)
    from .sommerfeld import lossy_ground_matrix

    return lossy_ground_matrix(mesh, ground, frequency_hz)


def _series_loading(antenna: Antenna, mesh: Mesh, frequency_hz: float) -> np.ndarray:
    per_wire = np.array(
        [
            conductor_impedance_per_m(
                conductor=w.conductor, frequency_hz=frequency_hz, radius_m=w.radius_m
            )
            + insulation_impedance_per_m(
                insulation=w.insulation, frequency_hz=frequency_hz, radius_m=w.radius_m
            )
            for w in antenna.wires
        ]
    )
    return per_wire[mesh.wire]


def solve(
    antenna: Antenna,
    *,
    frequencies_hz: Iterable[float] | float,
    ground: Ground,
    power_w: float = 1.0,
    reference_impedance_ohm: float = 50.0,
) -> list[Solution]:
    """Solve the antenna over ground at each frequency.

    Parameters
    ----------
    antenna : Antenna
        Wires and feed; checked here (bad geometry raises :class:`fieldkit.errors.InputError`).
    frequencies_hz : float or iterable of float
        Frequencies [Hz], 0.1–60 MHz.
    ground : Ground
        Free space, perfect or lossy ground.
    power_w : float
        Power delivered to the feed [W]; scales currents and fields.
    reference_impedance_ohm : float
        Reference for SWR [ohm].

    Returns
    -------
    list of Solution
        One per frequency, in the given order.
    """
    freqs = np.atleast_1d(np.asarray(frequencies_hz, dtype=float))
    if freqs.size == 0:
        raise InputError("frequencies_mhz", "expected at least one frequency")
    for f in freqs:
        if not (MIN_FREQUENCY_HZ <= f <= MAX_FREQUENCY_HZ):
            raise InputError("frequency_mhz", f"expected 0.1 to 60 MHz, got {f / 1e6:g}")
    if not power_w > 0:
        raise InputError("power_w", f"expected more than 0 W, got {power_w:g}")
    if not reference_impedance_ohm > 0:
        raise InputError(
            "reference_impedance_ohm", f"expected more than 0 ohm, got {reference_impedance_ohm:g}"
        )
    mesh = checked_mesh(antenna, ground, float(freqs.max()))
    with single_threaded():
        return [
            _solve_one(antenna, mesh, float(f), ground, power_w, reference_impedance_ohm)
            for f in freqs
        ]


def _solve_one(
    antenna: Antenna,
    mesh: Mesh,
    f: float,
    ground: Ground,
    power_w: float,
    reference_impedance_ohm: float,
) -> Solution:
    """Solve at one frequency (see :func:`solve`)."""
    omega = 2 * math.pi * f
    k = omega / SPEED_OF_LIGHT_M_S
    zmat = _free_space_matrix_cached(mesh, k, omega) + _ground_matrix(mesh, ground, f, k, omega)
    z_load = _series_loading(antenna, mesh, f)
    if np.any(z_load != 0):
        zmat = zmat + _loading_matrix_cached(mesh, z_load)
    rhs = np.zeros(mesh.n_basis, dtype=complex)
    rhs[mesh.feed_basis] = 1.0
    coeff = np.linalg.solve(zmat, rhs)
    i_start, i_end, z_in = feed_scaled_currents(mesh, coeff, power_w)
    grid_deg = farfield.power_grid(mesh, ground, f)
    e_th, e_ph = farfield.far_field(
        mesh, i_start, i_end, ground, f, farfield.directions(grid_deg[0], grid_deg[1])
    )
    return package(
        mesh, f, ground, power_w, reference_impedance_ohm, z_load, z_in, (i_start, i_end),
        (e_th, e_ph, grid_deg),
    )  # fmt: skip


def feed_scaled_currents(mesh: Mesh, coeff: np.ndarray, power_w: float):
    """Segment end currents [A, RMS] for ``power_w`` delivered, and the feed impedance [ohm].

    ``coeff`` are the basis coefficients of the 1 V gap solve.
    """
    z_in = 1.0 / coeff[mesh.feed_basis]
    if z_in.real <= 0:
        raise InputError("wires", "the model gives a feed resistance ≤ 0; check the geometry")
    # scale so that the delivered power is power_w with RMS currents
    i_feed = math.sqrt(power_w / z_in.real)
    coeff = coeff / coeff[mesh.feed_basis] * i_feed
    i_start, i_end = segment_end_currents(mesh, coeff)
    return i_start, i_end, z_in


def package(
    mesh: Mesh,
    f: float,
    ground: Ground,
    power_w: float,
    reference_impedance_ohm: float,
    z_load: np.ndarray,
    z_in: complex,
    currents: tuple[np.ndarray, np.ndarray],
    power_field: tuple,
) -> Solution:
    """The :class:`Solution` from the solved currents and the fields on the power grid."""
    i_start, i_end = currents
    seg_sq = (np.abs(i_start) ** 2 + np.abs(i_end) ** 2 + (i_start * i_end.conj()).real) / 3
    conductor_loss = float((z_load.real * mesh.length * seg_sq).sum())
    grid: dict = {}
    e_th, e_ph, grid_deg = power_field
    radiated = farfield.power_from_field(e_th, e_ph, grid_deg, grid=grid)
    ground_loss = max(0.0, power_w - radiated - conductor_loss) if ground.kind == "lossy" else 0.0
    gamma = abs((z_in - reference_impedance_ohm) / (z_in + reference_impedance_ohm))
    swr = float((1 + gamma) / (1 - gamma)) if gamma < 1 else math.inf
    return Solution(
        frequency_hz=float(f),
        impedance_ohm=complex(z_in),
        swr=swr,
        radiation_efficiency=radiated / power_w,
        power_w={
            "input": float(power_w),
            "radiated": radiated,
            "ground_loss": ground_loss,
            "conductor_loss": conductor_loss,
        },
        currents_a=0.5 * (i_start + i_end),
        segment_centres_m=mesh.centre,
        mesh=mesh,
        ground=ground,
        segment_currents_a=(i_start, i_end),
        _cache={"grid": grid},
    )
