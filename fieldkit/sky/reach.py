"""Reach of one channel: signal-to-noise against distance, skip zone, maximum range and a verdict.

For each hour and ground range the one-hop F2 path is traced with the mirror geometry of
:mod:`fieldkit.sky.path_geometry`; the received power is

    P_r = P_t + G(Delta) + G(Delta) - L_bf - L_a - L_z   [dBW]

(the same antenna at both ends), with the free-space loss of the slant path ``L_bf``, the absorption
``L_a`` of :mod:`fieldkit.sky.absorption` and the ITU-R P.533 excess-loss term ``L_z``; the noise is
the ITU-R P.372 noise of :mod:`fieldkit.sky.noise` in the mode's bandwidth.

References
----------
.. [1] ITU-R P.533-14 (2019), §6 (median signal power: basic transmission loss
   ``L_b = 32.45 + 20 log f + 20 log p' + L_i + L_z``; ``L_z`` = 8.72 dB, from memory).
.. [2] ITU-R P.372-16 (2022), noise; ITU-R P.525 (free-space basic loss 32.45 + 20 log f_MHz + 20 log d_km).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fieldkit.sky.absorption import absorption_db
from fieldkit.sky.gain import ElevationGain
from fieldkit.sky.noise import noise_power_dbw, total_fa_db
from fieldkit.sky.path_geometry import (
    elevation_deg,
    fot_mhz,
    muf_mhz,
    skip_distance_km,
    slant_path_km,
)

FREE_SPACE_CONSTANT_DB = 32.45  # 20 log10(4 pi / c) in MHz and km; ITU-R P.525
EXCESS_LOSS_DB = 8.72  # L_z, "losses not otherwise included"; ITU-R P.533-14 §6 (from memory)
DISTANCES_KM = np.arange(0.0, 601.0, 10.0)  # coverage grid, 0-600 km (issue 4)
DISTANCES_KM.setflags(write=False)
NVIS_ZONE_KM = 300.0  # NVIS covers roughly 0-300 km (common practice, REFERENCES.md)


@dataclass(frozen=True)
class Radio:
    """Transmitter power [W], receiver bandwidth [Hz] and required SNR [dB]."""

    power_w: float
    bandwidth_hz: float
    required_snr_db: float
    mode: str


@dataclass(frozen=True)
class HourReach:
    """Reach of one channel at one hour (distances in km, rounded)."""

    hour_utc: float
    skip_km: float | None
    fot_skip_km: float | None
    covers_km: tuple[float, float] | None
    max_range_km: float
    nvis_snr_db: float | None
    below_fot: bool
    verdict: str
    absorption_db: float
    noise_fa_db: float
    snr_db: tuple[float | None, ...]


def _edge(d0, m0, d1, m1):
    """Distance between d0 and d1 at which a linearly varying margin m crosses zero."""
    if m0 == m1:
        return d0
    return d0 + (d1 - d0) * m0 / (m0 - m1)


def _coverage(distances, margin, propagates, skip):
    """First contiguous covered run [start, end] on the grid, edges interpolated; or None."""
    ok = propagates & (margin >= 0.0)
    if not ok.any():
        return None
    i0 = int(np.argmax(ok))
    i1 = i0
    while i1 + 1 < len(ok) and ok[i1 + 1]:
        i1 += 1
    if i0 == 0:
        start = 0.0
    elif not propagates[i0 - 1]:
        start = max(skip or 0.0, float(distances[i0 - 1]))
    else:
        start = _edge(distances[i0 - 1], margin[i0 - 1], distances[i0], margin[i0])
    end = float(distances[i1])
    if i1 + 1 < len(ok):
        end = _edge(distances[i1], margin[i1], distances[i1 + 1], margin[i1 + 1])
    return float(start), float(end)


def _km(x):
    return None if x is None else float(round(x))


def channel_reach(
    *,
    frequency_mhz: float,
    gain: ElevationGain,
    hours_utc,
    fof2_mhz,
    reflection_height_km,
    solar_zenith_deg,
    gyro_frequency_mhz: float,
    sunspot_number: float,
    radio: Radio,
    noise_environment: str,
    distances_km=DISTANCES_KM,
) -> list[HourReach]:
    """Reach of one channel at every hour.

    Parameters
    ----------
    frequency_mhz : float
        Channel [MHz].
    gain : ElevationGain
        Antenna gain against elevation at this channel (used at both ends).
    hours_utc, fof2_mhz, reflection_height_km, solar_zenith_deg : array_like
        Per hour: time [h], foF2 [MHz], mirror height [km], solar zenith angle [deg].
    gyro_frequency_mhz : float
        Gyrofrequency near 100 km [MHz].
    sunspot_number : float
        R12 for the absorption law.
    radio : Radio
    noise_environment : str
        ITU-R P.372 environment class.
    distances_km : array_like
        Ascending ground ranges [km].

    Returns
    -------
    list of HourReach
    """
    f = frequency_mhz
    d = np.asarray(distances_km, dtype=float)[None, :]
    fof2 = np.asarray(fof2_mhz, dtype=float)[:, None]
    h = np.asarray(reflection_height_km, dtype=float)[:, None]
    chi = np.asarray(solar_zenith_deg, dtype=float)[:, None]

    muf = muf_mhz(fof2_mhz=fof2, ground_range_km=d, virtual_height_km=h)
    propagates = f <= muf
    antenna_db = 2.0 * gain.at(elevation_deg(ground_range_km=d, virtual_height_km=h))
    path_loss = (
        FREE_SPACE_CONSTANT_DB
        + 20.0 * np.log10(f)
        + 20.0 * np.log10(slant_path_km(ground_range_km=d, virtual_height_km=h))
    )
    absorb = absorption_db(
        frequency_mhz=f,
        gyro_frequency_mhz=gyro_frequency_mhz,
        ground_range_km=d,
        solar_zenith_deg=chi,
        sunspot_number=sunspot_number,
    )
    signal = 10.0 * np.log10(radio.power_w) + antenna_db - path_loss - absorb - EXCESS_LOSS_DB
    fa = total_fa_db(
        frequency_mhz=f, environment=noise_environment, galactic_reaches_ground=f > fof2[:, 0]
    )
    noise = noise_power_dbw(fa_db=fa, bandwidth_hz=radio.bandwidth_hz)[:, None]
    snr = signal - noise
    margin = snr - radio.required_snr_db

    out = []
    for k, hour in enumerate(np.asarray(hours_utc, dtype=float)):
        skip = skip_distance_km(
            frequency_mhz=f, fof2_mhz=float(fof2[k, 0]), virtual_height_km=float(h[k, 0])
        )
        fot_skip = skip_distance_km(
            frequency_mhz=f,
            fof2_mhz=float(fof2[k, 0]) * fot_mhz(muf_mhz=1.0),
            virtual_height_km=float(h[k, 0]),
        )
        covers = _coverage(d[0], margin[k], propagates[k], skip)
        verdict = _verdict(
            covers=covers,
            skip=skip,
            fot_skip=fot_skip,
            propagates=propagates[k],
            margin=margin[k],
            absorb=absorb[k],
            radio=radio,
            last_km=float(d[0, -1]),
        )
        out.append(
            HourReach(
                hour_utc=float(hour),
                skip_km=_km(skip),
                fot_skip_km=_km(fot_skip),
                covers_km=None if covers is None else (_km(covers[0]), _km(covers[1])),
                max_range_km=0.0 if covers is None else _km(covers[1]),
                nvis_snr_db=_zone_snr(d[0], snr[k], propagates[k]),
                below_fot=covers is not None and _below_fot(fot_skip, covers[0]),
                verdict=verdict,
                absorption_db=round(float(absorb[k, 0]), 1),
                noise_fa_db=round(float(fa[k]), 1),
                snr_db=tuple(
                    round(float(s), 1) if p else None
                    for s, p in zip(snr[k], propagates[k], strict=True)
                ),
            )
        )
    return out


def _below_fot(fot_skip, start_km) -> bool:
    """True when the channel is at or below the FOT (0.85 x MUF) from the start of its coverage."""
    return fot_skip is not None and fot_skip <= max(start_km, 1.0)


def _zone_snr(distances, snr, propagates):
    """Mean SNR over the propagating part of the NVIS zone [dB]; None when none propagates."""
    sel = propagates & (distances <= NVIS_ZONE_KM)
    return round(float(np.mean(snr[sel])), 1) if sel.any() else None


#: The first words of a verdict that says the channel does not serve the NVIS zone at that hour, and
#: why: too high for the ionosphere to return it nearby, eaten by the daytime D layer, or too weak.
ABOVE_NVIS = "above the NVIS range"
ABSORBED = "absorbed by day"
BELOW_NOISE = "below the noise"
MODE_WORDS = {"ssb": "SSB", "cw": "CW", "am": "AM", "fm": "FM", "data": "data"}


def _verdict(*, covers, skip, fot_skip, propagates, margin, absorb, radio, last_km) -> str:
    """The hour's reach in plain words; the first words say what it means (see ``ABOVE_NVIS`` …)."""
    if not propagates.any():
        if skip is None:
            return f"{ABOVE_NVIS}: the ionosphere returns it nowhere on one hop"
        return f"{ABOVE_NVIS}: skip zone to {skip:.0f} km, heard only farther away"
    if covers is None:
        if (propagates & (margin + absorb >= 0.0)).any():
            return f"{ABSORBED}: the D layer takes the signal at every distance"
        mode = MODE_WORDS.get(radio.mode, radio.mode)
        return f"{BELOW_NOISE}: {mode} needs {radio.required_snr_db:g} dB signal-to-noise"
    start, end = round(covers[0]), round(covers[1])
    beyond = " and beyond" if end >= last_km else ""
    if start == 0:
        text = f"covers 0–{end} km{beyond}"
    elif skip and abs(start - skip) <= 10.0:
        text = f"skip zone to {start} km; covers {start}–{end} km{beyond}"
    else:
        text = f"covers {start}–{end} km{beyond}; below the noise nearer"
    if not _below_fot(fot_skip, start):
        text += "; above the FOT close in: works on some days only"
    return text
