"""Monthly-median F2 layer for one site and UTC day from the International Reference Ionosphere.

A thin wrapper round PyIRI (which ships the CCIR/URSI coefficient maps, so nothing is fetched at run
time). PyIRI re-reads and re-parses the coefficient files of two months on every call (about 0.3 s);
this module keeps the parsed maps in memory, so after the first call in a process a whole day costs
a few tens of milliseconds.

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
import threading
from dataclasses import dataclass

import numpy as np

from fieldkit.sky.path_geometry import reflection_height_km

CCIR = 0  # PyIRI switch: CCIR (0) or URSI (1) foF2 maps; CCIR is the IRI default over land
GYRO_HZ_PER_TESLA = 2.7992e10  # e / (2 pi m_e); CODATA 2018
ABSORPTION_FIELD_HEIGHT_KM = 100.0  # gyrofrequency taken near 100 km; ITU-R P.533 §5.3

_lock = threading.Lock()
_pyiri = None


def _library():
    """Import PyIRI once and keep its parsed coefficient maps in memory."""
    global _pyiri
    with _lock:
        if _pyiri is None:
            import PyIRI
            import PyIRI.igrf_library as igrf
            import PyIRI.main_library as ml

            reader = ml.read_ccir_ursi_coeff
            if not hasattr(reader, "cache_info"):

                @functools.lru_cache(maxsize=24)
                def cached_reader(mth, coeff_dir, output_deciles=False, output_quartiles=None):
                    arrays = reader(mth, coeff_dir, output_deciles, output_quartiles)
                    for a in arrays:
                        a.setflags(write=False)  # shared between calls: must never be modified
                    return arrays

                cached_reader.__wrapped_reader__ = reader
                ml.read_ccir_ursi_coeff = cached_reader
            _pyiri = (PyIRI, ml, igrf)
        return _pyiri


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
    pyiri, _, igrf = _library()
    out = igrf.inclination(
        pyiri.coeff_dir,
        decimal_year,
        np.array([lon_deg]),
        np.array([lat_deg]),
        ABSORPTION_FIELD_HEIGHT_KM,
        only_inc=False,
    )
    total_nt = float(np.asarray(out[6]).ravel()[0])
    return GYRO_HZ_PER_TESLA * total_nt * 1e-9 / 1e6


@functools.lru_cache(maxsize=64)
def _estimate(
    day: dt.date, lat_deg: float, lon_deg: float, f107: float, hours: tuple
) -> SkyEstimate:
    pyiri, ml, _ = _library()
    hours_utc = np.array(hours, dtype=float)
    f2, _, e, _, _, _, _ = ml.IRI_density_1day(
        day.year,
        day.month,
        day.day,
        hours_utc,
        np.array([lon_deg]),
        np.array([lat_deg]),
        np.array([300.0]),
        f107,
        pyiri.coeff_dir,
        CCIR,
    )
    m3000 = np.asarray(f2["M3000"], dtype=float)[:, 0]
    result = SkyEstimate(
        hours_utc=hours_utc,
        fof2_mhz=np.asarray(f2["fo"], dtype=float)[:, 0],
        hmf2_km=np.asarray(f2["hm"], dtype=float)[:, 0],
        m3000=m3000,
        reflection_height_km=reflection_height_km(m3000=m3000),
        foe_mhz=np.asarray(e["fo"], dtype=float)[:, 0],
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
    """Monthly-median foF2, hmF2 and M(3000)F2 per hour from IRI (PyIRI, CCIR maps).

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
