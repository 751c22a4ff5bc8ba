"""Antenna gain against elevation for the reach estimate, from the fieldkit antenna engine.

The gain at an elevation is averaged in power over azimuth (the stations being reached lie in all
directions), once per channel: it does not depend on the hour.
"""

from __future__ import annotations

import copy
import functools
import json
import zlib
from dataclasses import dataclass
from typing import Protocol

import numpy as np

from fieldkit.constants import SPEED_OF_LIGHT_M_S
from fieldkit.errors import InputError, join

DEFAULT_HEIGHT_WAVELENGTHS = 0.15  # default NVIS dipole height, 0.15 lambda (issue 4)
# Cut length of a wire half-wave dipole, 468/f(MHz) ft = 142.6/f m (common practice, handbook rule)
DEFAULT_LENGTH_M_MHZ = 468.0 * 0.3048
DEFAULT_WIRE_DIAMETER_MM = 2.0  # about AWG 12 (ASTM B258: 2.053 mm)
DEFAULT_GROUND = "average"  # issue 4: default antenna over average ground
ELEVATIONS_DEG = tuple(float(e) for e in range(10, 91, 2))
AZIMUTHS_SYMMETRIC_DEG = tuple(float(a) for a in range(0, 91, 15))  # centred dipole along x
AZIMUTHS_FULL_DEG = tuple(float(a) for a in range(0, 360, 15))
FREQUENCY_KEYS = ("frequency_mhz", "frequencies_mhz", "pattern", "near_field")


@dataclass(frozen=True)
class ElevationGain:
    """Azimuth-averaged gain of one antenna at one frequency.

    Attributes
    ----------
    frequency_mhz : float
    elevation_deg : ndarray
        Ascending elevation angles [deg].
    gain_dbi : ndarray
        Power-average over azimuth of the total gain [dBi] (ground and conductor loss included).
    zenith_gain_dbi, swr, radiation_efficiency : float
        From the engine's solution.
    """

    frequency_mhz: float
    elevation_deg: np.ndarray
    gain_dbi: np.ndarray
    zenith_gain_dbi: float
    swr: float
    radiation_efficiency: float

    def at(self, elevation_deg):
        """Gain [dBi] at elevations [deg], linear interpolation; below the grid the lowest value."""
        return np.interp(elevation_deg, self.elevation_deg, self.gain_dbi)


def default_dipole_spec(*, frequency_mhz: float, ground) -> dict:
    """Model spec of the default antenna: a centre-fed wire half-wave dipole 0.15 lambda high."""
    wavelength_m = SPEED_OF_LIGHT_M_S / (frequency_mhz * 1e6)
    half = DEFAULT_LENGTH_M_MHZ / frequency_mhz / 2.0
    height = DEFAULT_HEIGHT_WAVELENGTHS * wavelength_m
    return {
        "ground": ground if ground is not None else DEFAULT_GROUND,
        "wires": [
            {
                "points_m": [[-half, 0.0, height], [half, 0.0, height]],
                "diameter_mm": DEFAULT_WIRE_DIAMETER_MM,
                "conductor": "copper",
            }
        ],
        "feed": {"wire": 0, "distance_m": half},
    }


def _model_json():
    from fieldkit.antenna import model_json

    return model_json


def _azimuth_weights(azimuths) -> np.ndarray:
    """Weights of an azimuth average: uniform round a full circle, trapezoidal over a quadrant."""
    if azimuths == AZIMUTHS_SYMMETRIC_DEG:  # 0..90 deg stands for the whole circle by symmetry
        w = np.ones(len(azimuths))
        w[0] = w[-1] = 0.5
    else:
        w = np.ones(len(azimuths))
    return w / w.sum()


def _reduce(result: dict, azimuths, frequency_mhz: float) -> ElevationGain:
    gains = np.asarray(result["gain_dbi"], dtype=float)  # [n_azimuth, n_elevation]
    if gains.shape != (len(azimuths), len(ELEVATIONS_DEG)):
        raise RuntimeError(f"engine returned gain_dbi of shape {gains.shape}")
    mean = 10.0 * np.log10(_azimuth_weights(azimuths) @ (10.0 ** (gains / 10.0)))
    elev = np.array(ELEVATIONS_DEG)
    elev.setflags(write=False)
    mean.setflags(write=False)
    return ElevationGain(
        frequency_mhz=frequency_mhz,
        elevation_deg=elev,
        gain_dbi=mean,
        zenith_gain_dbi=float(result["zenith_gain_dbi"]),
        swr=float(result["swr"]),
        radiation_efficiency=float(result["radiation_efficiency"]),
    )


def elevation_gain_of(solution, *, frequency_mhz: float | None = None) -> ElevationGain:
    """Azimuth-averaged gain against elevation of an antenna the caller has already solved.

    Parameters
    ----------
    solution : fieldkit.antenna.Solution
        The engine's solution of the antenna at the channel (a plan option's hung wire, say).
    frequency_mhz : float, optional
        The channel [MHz]; default the solution's frequency.
    """
    f = solution.frequency_hz / 1e6 if frequency_mhz is None else float(frequency_mhz)
    gains = np.asarray(
        solution.gain_dbi(list(ELEVATIONS_DEG), list(AZIMUTHS_FULL_DEG)), dtype=float
    )
    result = {
        "gain_dbi": gains,
        "zenith_gain_dbi": float(solution.zenith_gain_dbi),
        "swr": float(solution.swr),
        "radiation_efficiency": float(solution.radiation_efficiency),
    }
    return _reduce(result, AZIMUTHS_FULL_DEG, f)


def _solve(spec: dict, frequencies_mhz: tuple[float, ...], azimuths, field: str) -> list[dict]:
    spec = copy.deepcopy(spec)
    for key in FREQUENCY_KEYS:
        spec.pop(key, None)
    spec["frequencies_mhz"] = list(frequencies_mhz)
    spec["pattern"] = {"elevation_deg": list(ELEVATIONS_DEG), "azimuth_deg": list(azimuths)}
    try:
        out = _model_json()(spec)
    except InputError as exc:
        raise InputError(
            join(field, exc.field) if exc.field else field, exc.detail, value=exc.value
        ) from None
    return out["results"]


class GainStore(Protocol):
    """Where default-dipole gains may be kept across processes (:class:`fieldkit.disk_cache.ArrayDir`)."""

    def load(self, key: str) -> np.ndarray | None: ...

    def save(self, key: str, array: np.ndarray) -> None: ...


_store: GainStore | None = None


def keep_default_gains_in(store: GainStore | None) -> None:
    """Keep the default dipole's gains across processes in ``store`` (the CLI and the plan workers
    set one in the cache directory, named by the engine's source: a changed engine starts afresh).
    A stored gain is the engine's own result; the sky layer does no file I/O itself."""
    global _store
    _store = store


def _stored_gain(key: str, frequency_mhz: float) -> ElevationGain | None:
    row = _store.load(key) if _store is not None else None
    n = len(ELEVATIONS_DEG)
    if row is None or row.dtype != np.float64 or row.shape != (n + 3,) or np.isnan(row).any():
        return None
    elev, gain = np.array(ELEVATIONS_DEG), np.array(row[:n])
    elev.setflags(write=False)
    gain.setflags(write=False)
    zenith, swr, efficiency = (float(x) for x in row[n:])
    return ElevationGain(frequency_mhz, elev, gain, zenith, swr, efficiency)


@functools.lru_cache(maxsize=128)
def _default_gain(frequency_mhz: float, ground_json: str) -> ElevationGain:
    text = f"{frequency_mhz!r} {ground_json}"
    key = f"{text[:80]}-{zlib.crc32(text.encode()):08x}"  # the store keeps file-safe characters
    got = _stored_gain(key, frequency_mhz)
    if got is not None:
        return got
    spec = default_dipole_spec(frequency_mhz=frequency_mhz, ground=json.loads(ground_json))
    (result,) = _solve(spec, (frequency_mhz,), AZIMUTHS_SYMMETRIC_DEG, "site")
    got = _reduce(result, AZIMUTHS_SYMMETRIC_DEG, frequency_mhz)
    if _store is not None:
        scalars = [got.zenith_gain_dbi, got.swr, got.radiation_efficiency]
        _store.save(key, np.concatenate([got.gain_dbi, scalars]))
    return got


@functools.lru_cache(maxsize=32)
def _given_gains(spec_json: str, frequencies_mhz: tuple[float, ...]) -> tuple[ElevationGain, ...]:
    results = _solve(json.loads(spec_json), frequencies_mhz, AZIMUTHS_FULL_DEG, "antenna")
    return tuple(
        _reduce(r, AZIMUTHS_FULL_DEG, f) for r, f in zip(results, frequencies_mhz, strict=True)
    )


def elevation_gains(*, frequencies_mhz, antenna: dict | None, ground) -> list[ElevationGain]:
    """Azimuth-averaged gain against elevation per channel, one engine solve per channel.

    Parameters
    ----------
    frequencies_mhz : sequence of float
        Channels [MHz].
    antenna : dict or None
        A `fieldkit model` spec (its frequency, pattern and near-field fields are replaced by the
        channels); None for the default half-wave dipole 0.15 lambda high, cut for each channel.
    ground : str or dict or None
        Ground of the default dipole (preset name or constants); None for average ground.

    Returns
    -------
    list of ElevationGain
        Results are cached in the process by antenna, ground and frequency.
    """
    freqs = tuple(float(f) for f in frequencies_mhz)
    if antenna is not None:
        return list(_given_gains(json.dumps(antenna, sort_keys=True), freqs))
    ground_json = json.dumps(ground if ground is not None else DEFAULT_GROUND, sort_keys=True)
    return [_default_gain(f, ground_json) for f in freqs]
