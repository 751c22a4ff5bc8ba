"""Monthly-median F2 layer for one site and UTC day from the International Reference Ionosphere.

The IRI's CCIR maps as PyIRI implements them (PyIRI ships the coefficient maps, so nothing is
fetched at run time), evaluated by :mod:`fieldkit.sky.iri_maps` from the compact tables of
:mod:`fieldkit.sky.iri_tables`: the numbers are PyIRI's to the last bit, without importing PyIRI,
scipy or matplotlib, so a cold `fieldkit sky` costs a few tens of milliseconds here instead of about
a second. Results are also kept in memory per site, day and solar flux.

References
----------
.. [1] V. Forsythe et al., "PyIRI: Whole-Globe Approach to the International Reference Ionosphere
   Modeling Implemented in Python", Space Weather 22, 2024, doi:10.1029/2023SW003739.
.. [2] D. Bilitza et al., "The International Reference Ionosphere model: A review and description of
   an ionospheric benchmark", Reviews of Geophysics 60, 2022, doi:10.1029/2022RG000792.
.. [3] ITU-R P.533-14, §5.1 (mirror reflection height from M(3000)F2).
"""

from __future__ import annotations

import datetime as dt
import functools
from dataclasses import dataclass

import numpy as np

from fieldkit.sky import igrf, iri_maps, iri_tables
from fieldkit.sky.path_geometry import reflection_height_km

GYRO_HZ_PER_TESLA = 2.7992e10  # e / (2 pi m_e); CODATA 2018
ABSORPTION_FIELD_HEIGHT_KM = 100.0  # gyrofrequency taken near 100 km; ITU-R P.533 §5.3


@dataclass(frozen=True)
class SkyEstimate:
    """Hourly monthly-median F2 parameters at one site (arrays of length ``len(hours_utc)``).

    Attributes
    ----------
    hours_utc : ndarray
        Hours after 00:00 UTC [h].
    fof2_mhz : ndarray
        F2 critical frequency [MHz].
    hmf2_km : ndarray
        Height of the F2 peak [km].
    m3000 : ndarray
        Propagation factor M(3000)F2 (dimensionless).
    reflection_height_km : ndarray
        Mirror reflection height ``1490/M(3000)F2 - 176`` [km] (ITU-R P.533 §5.1).
    foe_mhz : ndarray
        E-layer critical frequency [MHz].
    gyro_frequency_mhz : float
        Electron gyrofrequency at 100 km above the site from IGRF [MHz].
    """

    hours_utc: np.ndarray
    fof2_mhz: np.ndarray
    hmf2_km: np.ndarray
    m3000: np.ndarray
    reflection_height_km: np.ndarray
    foe_mhz: np.ndarray
    gyro_frequency_mhz: float


def _decimal_year(day: dt.date) -> float:
    start = dt.date(day.year, 1, 1)
    length = (dt.date(day.year + 1, 1, 1) - start).days
    return day.year + (day - start).days / length


@functools.lru_cache(maxsize=64)
def _gyro_frequency_mhz(lat_deg: float, lon_deg: float, decimal_year: float) -> float:
    _, total = igrf.field(
        iri_tables.load().igrf,
        decimal_year=decimal_year,
        lat_deg=np.array([lat_deg]),
        lon_deg=np.array([lon_deg]),
        height_km=ABSORPTION_FIELD_HEIGHT_KM,
    )
    total_nt = float(total[0])
    return GYRO_HZ_PER_TESLA * total_nt * 1e-9 / 1e6


@functools.lru_cache(maxsize=64)
def _estimate(
    day: dt.date, lat_deg: float, lon_deg: float, f107: float, hours: tuple
) -> SkyEstimate:
    hours_utc = np.array(hours, dtype=float)
    peaks = iri_maps.peak_parameters(
        iri_tables.load(), day=day, hours_utc=hours_utc, lat_deg=lat_deg, lon_deg=lon_deg, f107=f107
    )
    m3000 = peaks.m3000
    result = SkyEstimate(
        hours_utc=hours_utc,
        fof2_mhz=peaks.fof2_mhz,
        hmf2_km=peaks.hmf2_km,
        m3000=m3000,
        reflection_height_km=reflection_height_km(m3000=m3000),
        foe_mhz=peaks.foe_mhz,
        gyro_frequency_mhz=_gyro_frequency_mhz(lat_deg, lon_deg, _decimal_year(day)),
    )
    for a in (result.hours_utc, result.fof2_mhz, result.hmf2_km, result.m3000):
        a.setflags(write=False)
    result.reflection_height_km.setflags(write=False)
    result.foe_mhz.setflags(write=False)
    return result


def sky_estimate(
    *, day: dt.date, lat_deg: float, lon_deg: float, f107: float, hours_utc=tuple(range(24))
) -> SkyEstimate:
    """Monthly-median foF2, hmF2 and M(3000)F2 per hour from IRI (CCIR maps, as PyIRI).

    Parameters
    ----------
    day : datetime.date
        UTC day; PyIRI interpolates between the medians of the two nearest months.
    lat_deg, lon_deg : float
        Geographic latitude and longitude (east positive) [deg].
    f107 : float
        Solar radio flux F10.7 [sfu] (PyIRI converts it to IG12 for foF2).
    hours_utc : sequence of float
        Hours after 00:00 UTC [h].

    Returns
    -------
    SkyEstimate
        Read-only arrays (the result is cached and shared).

    Notes
    -----
    These are monthly medians: on a given day foF2 commonly lies within about +/-20 % of them.

    References
    ----------
    Forsythe et al. (2024) [1]_; Bilitza et al. (2022) [2]_; ITU-R P.533-14 §5.1 [3]_.
    """
    return _estimate(
        day, float(lat_deg), float(lon_deg), float(f107), tuple(float(h) for h in hours_utc)
    )
