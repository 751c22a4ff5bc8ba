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

from . import farfield
from .blas import single_threaded
from .grounds import Ground
from .kernel import free_space_matrix, loading_matrix, perfect_image_matrix, segment_end_currents
from .materials import conductor_impedance_per_m, insulation_impedance_per_m
from .mesh import Antenna, Mesh, checked_mesh

MIN_FREQUENCY_HZ = MIN_FREQUENCY_MHZ * 1e6
MAX_FREQUENCY_HZ = MAX_FREQUENCY_MHZ * 1e6
BEAMWIDTH_STEP_DEG = 3.0  # coarse sampling of the cuts for −3 dB widths (crossings refined)


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
    def partial_gains(self, elevation_deg, azimuth_deg) -> tuple[np.ndarray, np.ndarray]:
        """Linear partial gains (θ/vertical, φ/horizontal) [n_azimuth, n_elevation] [-]."""
        rhat = farfield.directions(elevation_deg, azimuth_deg)
        e_th, e_ph = farfield.far_field(
            self.mesh, *self.segment_currents_a, self.ground, self.frequency_hz, rhat
        )
        return farfield.gain_from_field(e_th, e_ph, self.power_w["input"])

    def gain_dbi(self, elevation_deg, azimuth_deg) -> np.ndarray:
        """Total gain in dBi re input power, [n_azimuth, n_elevation]; ground and conductor loss included."""
        g_th, g_ph = self.partial_gains(elevation_deg, azimuth_deg)
        return 10 * np.log10(np.maximum(g_th + g_ph, 1e-30))

    def gain_dbi_by_polarisation(self, elevation_deg, azimuth_deg) -> dict[str, np.ndarray]:
        """``{"vertical": …, "horizontal": …}`` partial gains (θ and φ components) in dBi."""
        g_th, g_ph = self.partial_gains(elevation_deg, azimuth_deg)
        return {
            "vertical": 10 * np.log10(np.maximum(g_th, 1e-30)),
            "horizontal": 10 * np.log10(np.maximum(g_ph, 1e-30)),
        }

    @property
    def zenith_gain_dbi(self) -> float:
        return float(self.gain_dbi([90.0], [0.0])[0, 0])

    @single_threaded()
    def _maximum(self) -> tuple[float, float, float]:
        if "max" not in self._cache:
            lo = -90.0 if self.ground.kind == "free-space" else 0.0
            coarse = self._cache.get("grid")
            if coarse is None:
                el, az = np.arange(lo, 90.01, 10.0), np.arange(0.0, 360.0, 15.0)
                g = self.gain_dbi(el, az)
            else:  # the power-integration grid of solve() already covers the sky
                el, az, g = coarse["elevation_deg"], coarse["azimuth_deg"], coarse["intensity_w_sr"]
            ia, ie = _first_max(g)
            best_el, best_az = el[ie], az[ia]
            for step in (2.0, 0.4):  # local refinements around the best direction
                el2 = np.clip(best_el + step * np.arange(-3, 4), lo, 90)
                az2 = best_az + 1.5 * step * np.arange(-3, 4)
                g2 = self.gain_dbi(el2, az2)
                ja, je = _first_max(g2)
                best_el, best_az = el2[je], az2[ja]
            self._cache["max"] = (float(g2[ja, je]), float(best_el), float(best_az % 360))
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

    @single_threaded()
    def beamwidth_deg(self) -> dict[str, float]:
        """−3 dB width of the elevation cut through zenith, broadside (⟂ wire) and along the wire [deg].

        The width is that of the lobe holding the cut's maximum, measured from its −3 dB points.
        """
        if "bw" not in self._cache:
            axis = self.wire_azimuth_deg()
            widths = _cut_beamwidths(self, [axis + 90.0, axis])
            self._cache["bw"] = {"broadside": widths[0], "along_wire": widths[1]}
        return dict(self._cache["bw"])

    # -- near field --------------------------------------------------------------------------
    @single_threaded()
    def near_field(self, points_m) -> tuple[np.ndarray, np.ndarray]:
        """E [V/m] and H [A/m] complex RMS vectors (n, 3) at points, ground included."""
        from .nearfield import near_field

        return near_field(self, np.asarray(points_m, dtype=float).reshape(-1, 3))


MAX_TIE_DB = 1e-9  # gains this close are a tie (symmetric directions), resolved by the first


def _first_max(g: np.ndarray) -> tuple[int, int]:
    """Index of the first entry within MAX_TIE_DB of the maximum (ties not left to rounding)."""
    flat = np.ravel(g)
    i = int(np.argmax(flat >= flat.max() - MAX_TIE_DB))
    return tuple(int(x) for x in np.unravel_index(i, np.shape(g)))


def _cut_beamwidths(sol: Solution, azimuths_deg: list[float]) -> list[float]:
    """−3 dB width of the lobe holding the maximum of vertical cuts through zenith [deg].

    A cut runs from the horizon at its azimuth (0°) over zenith (90°) to the opposite horizon
    (180°). Sampled every BEAMWIDTH_STEP_DEG, then the peak and both −3 dB crossings are refined
    inside their brackets; the samples of all cuts go to the far field together.
    """
    lo, hi = (-90.0, 270.0) if sol.ground.kind == "free-space" else (0.0, 180.0)
    n_cut = len(azimuths_deg)
    az = np.radians(np.asarray(azimuths_deg, dtype=float))

    def gain(cut_index: np.ndarray, theta_deg: np.ndarray) -> np.ndarray:
        t, a = np.radians(theta_deg), az[cut_index]
        rhat = np.stack([np.cos(t) * np.cos(a), np.cos(t) * np.sin(a), np.sin(t)], axis=-1)
        e_th, e_ph = farfield.far_field(
            sol.mesh, *sol.segment_currents_a, sol.ground, sol.frequency_hz, rhat
        )
        g_th, g_ph = farfield.gain_from_field(e_th, e_ph, sol.power_w["input"])
        return 10 * np.log10(np.maximum(g_th + g_ph, 1e-30))

    step = BEAMWIDTH_STEP_DEG
    theta = np.arange(lo, hi + step / 2, step)
    n = len(theta)
    rows = np.repeat(np.arange(n_cut), n)
    cut = gain(rows, np.tile(theta, n_cut)).reshape(n_cut, n)
    peak = np.argmax(cut >= cut.max(axis=1, keepdims=True) - MAX_TIE_DB, axis=1)  # first of ties
    offsets = np.arange(-step, step + 0.01, 0.25)
    fine = np.clip(theta[peak][:, None] + offsets[None, :], lo, hi)
    level = (
        gain(np.repeat(np.arange(n_cut), len(offsets)), fine.ravel()).reshape(n_cut, -1).max(axis=1)
        - 3.0
    )
    # each crossing: (cut, index inside the lobe, index outside it or None at the end of the cut)
    crossings = []
    cut_rows, levels = cut.tolist(), level.tolist()  # Python floats: the walks below are scalar
    for c in range(n_cut):
        i = j = int(peak[c])
        row, lv = cut_rows[c], levels[c]
        while i > 0 and row[i - 1] >= lv:
            i -= 1
        while j < n - 1 and row[j + 1] >= lv:
            j += 1
        crossings += [(c, i, i - 1 if i > 0 else None), (c, j, j + 1 if j < n - 1 else None)]
    inner = [x for x in crossings if x[2] is not None]
    edge: dict[tuple, float] = {}
    if inner:
        t = np.array([np.linspace(theta[o], theta[i], 9) for _, i, o in inner])
        g = gain(np.repeat([c for c, _, _ in inner], 9), t.ravel()).reshape(len(inner), 9)
        for x, tk, gk in zip(inner, t, g, strict=True):
            k = int(np.argmax(gk >= level[x[0]]))  # first sample inside the lobe, walking inward
            edge[x] = (
                float(tk[0])
                if k == 0
                else float(np.interp(level[x[0]], gk[k - 1 : k + 1], tk[k - 1 : k + 1]))
            )
    widths = []
    for c in range(n_cut):
        left, right = crossings[2 * c], crossings[2 * c + 1]
        lo_edge = float(theta[0]) if left[2] is None else edge[left]
        hi_edge = float(theta[-1]) if right[2] is None else edge[right]
        widths.append(hi_edge - lo_edge)
    return widths


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
    z_in = 1.0 / coeff[mesh.feed_basis]
    if z_in.real <= 0:
        raise InputError("wires", "the model gives a feed resistance ≤ 0; check the geometry")
    # scale so that the delivered power is power_w with RMS currents
    i_feed = math.sqrt(power_w / z_in.real)
    coeff = coeff / coeff[mesh.feed_basis] * i_feed
    i_start, i_end = segment_end_currents(mesh, coeff)
    seg_sq = (np.abs(i_start) ** 2 + np.abs(i_end) ** 2 + (i_start * i_end.conj()).real) / 3
    conductor_loss = float((z_load.real * mesh.length * seg_sq).sum())
    grid: dict = {}
    radiated = farfield.radiated_power(mesh, i_start, i_end, ground, f, grid=grid)
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
