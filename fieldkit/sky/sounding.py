"""Apply an observed ionospheric reading (a sounding) to the monthly-median sky estimate.

The reading replaces the estimate at its hour; at neighbouring hours the estimate is pulled toward
it with a weight that falls linearly to zero :data:`SOUNDING_SPAN_H` hours away: foF2 and MUF(3000)
by the observed/modelled ratio, heights by the observed–modelled difference. A reading given without
its hour (the contract allows it) is taken to hold for the whole day, and the output says so.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fieldkit.sky.iri import SkyEstimate

# fieldkit choice: departures of foF2 from the monthly median stay correlated for a few hours
# (day-to-day variability, Davies, Ionospheric Radio, 1990, ch. 5); beyond that the median is kept.
SOUNDING_SPAN_H = 3.0


@dataclass(frozen=True)
class Sounding:
    """An observed reading at one hour.

    Attributes
    ----------
    hour_utc : float or None
        Time of the reading, hours after 00:00 UTC [h]; None: the reading holds for all hours.
    fof2_mhz : float
        Observed F2 critical frequency [MHz].
    virtual_height_km : float
        Observed virtual height h'F [km]; used as the mirror reflection height.
    hmf2_km : float or None
        Observed height of the F2 peak [km].
    muf3000_mhz : float or None
        Observed MUF(3000)F2 [MHz].
    """

    hour_utc: float | None
    fof2_mhz: float
    virtual_height_km: float
    hmf2_km: float | None = None
    muf3000_mhz: float | None = None


@dataclass(frozen=True)
class Sky:
    """The sky used for the channel day: estimate with any sounding applied.

    ``source`` per hour is "observed" (the reading's hour), "blended" (pulled toward the reading) or
    "modelled" (the monthly median).
    """

    hours_utc: np.ndarray
    fof2_mhz: np.ndarray
    hmf2_km: np.ndarray
    reflection_height_km: np.ndarray
    muf3000_mhz: np.ndarray
    source: tuple[str, ...]
    gyro_frequency_mhz: float


def _weights(hours_utc: np.ndarray, hour: float | None) -> np.ndarray:
    if hour is None:
        return np.ones_like(hours_utc)
    gap = np.abs(hours_utc - hour) % 24.0
    gap = np.minimum(gap, 24.0 - gap)
    return np.clip(1.0 - gap / SOUNDING_SPAN_H, 0.0, 1.0)


def apply_sounding(estimate: SkyEstimate, sounding: Sounding | None) -> Sky:
    """Merge a sounding into the estimate (or pass the estimate through when there is none).

    Parameters
    ----------
    estimate : SkyEstimate
        Monthly-median estimate from :func:`fieldkit.sky.iri.sky_estimate`.
    sounding : Sounding or None
        Observed reading.

    Returns
    -------
    Sky
    """
    hours = np.asarray(estimate.hours_utc, dtype=float)
    fof2 = np.array(estimate.fof2_mhz, dtype=float)
    hmf2 = np.array(estimate.hmf2_km, dtype=float)
    height = np.array(estimate.reflection_height_km, dtype=float)
    muf3000 = np.array(estimate.fof2_mhz * estimate.m3000, dtype=float)
    source = ["modelled"] * len(hours)
    if sounding is not None:
        w = _weights(hours, sounding.hour_utc)

        def at(values):  # the modelled value at the reading's hour (each hour's own when none)
            if sounding.hour_utc is None:
                return values
            return np.interp(
                sounding.hour_utc, np.append(hours, 24.0), np.append(values, values[0])
            )

        fof2 = fof2 * (1.0 + w * (sounding.fof2_mhz / at(fof2) - 1.0))
        height = height + w * (sounding.virtual_height_km - at(height))
        if sounding.hmf2_km is not None:
            hmf2 = hmf2 + w * (sounding.hmf2_km - at(hmf2))
        if sounding.muf3000_mhz is not None:
            muf3000 = muf3000 * (1.0 + w * (sounding.muf3000_mhz / at(muf3000) - 1.0))
        source = ["observed" if wi >= 1.0 else "blended" if wi > 0 else "modelled" for wi in w]
    return Sky(
        hours_utc=hours,
        fof2_mhz=fof2,
        hmf2_km=hmf2,
        reflection_height_km=height,
        muf3000_mhz=muf3000,
        source=tuple(source),
        gyro_frequency_mhz=estimate.gyro_frequency_mhz,
    )
