"""Non-deviative ionospheric absorption of a sky-wave hop (George & Bradley).

References
----------
.. [1] P. A. Bradley and J. R. George, "New HF propagation-prediction procedures", and
   J. R. George and P. A. Bradley, "A new method of predicting the ionospheric absorption of high
   frequency waves at oblique incidence", Telecommunication Journal 41(5), 307-311, 1974; the same
   absorption law is used by CCIR Report 252-2 (1970 supplement) and early editions of ITU-R P.533.
   Constants from memory; check against the paper before tightening tolerances.
.. [2] ITU-R P.533-14 (2019), §5.3: absorption reckoned at 110 km; night-time floor of the
   diurnal factor, F(chi) = max(cos^p(0.881 chi), 0.02) (from memory).
"""

from __future__ import annotations

import numpy as np

from fieldkit.sky.path_geometry import ABSORPTION_HEIGHT_KM, incidence_deg

GB_NUMERATOR_DB = 677.2  # dB MHz^1.98; George & Bradley (1974)
GB_FREQUENCY_EXPONENT = 1.98  # George & Bradley (1974)
GB_DENOMINATOR_OFFSET = 10.2  # MHz^1.98; George & Bradley (1974)
GB_SUNSPOT_COEFFICIENT = 0.0037  # per unit of R12; George & Bradley (1974)
GB_ZENITH_FACTOR = 0.881  # cos(0.881 chi) vanishes at chi = 102 deg; George & Bradley (1974)
GB_ZENITH_EXPONENT = 1.3  # diurnal exponent p; George & Bradley (1974)
NIGHT_FLOOR = 0.02  # minimum of the diurnal factor; ITU-R P.533 §5.3 (from memory)


def absorption_index(*, solar_zenith_deg, sunspot_number):
    """Absorption index ``I = (1 + 0.0037 R12) max(cos^1.3(0.881 chi), 0.02)`` (dimensionless).

    Parameters
    ----------
    solar_zenith_deg : float or array_like
        Solar zenith angle at the control point [deg].
    sunspot_number : float
        12-month smoothed sunspot number R12 (dimensionless).
    """
    chi = np.radians(np.asarray(solar_zenith_deg, dtype=float))
    diurnal = np.clip(np.cos(GB_ZENITH_FACTOR * chi), 0.0, None) ** GB_ZENITH_EXPONENT
    diurnal = np.maximum(diurnal, NIGHT_FLOOR)
    return (1.0 + GB_SUNSPOT_COEFFICIENT * max(sunspot_number, 0.0)) * diurnal


def absorption_db(
    *, frequency_mhz, gyro_frequency_mhz, ground_range_km, solar_zenith_deg, sunspot_number
):
    """Absorption loss of one hop [dB] by the George & Bradley law.

    ``L = 677.2 I sec(i) / ((f + fH)^1.98 + 10.2)`` with the incidence angle ``i`` at 110 km.

    Parameters
    ----------
    frequency_mhz : float or array_like
        Operating frequency [MHz].
    gyro_frequency_mhz : float
        Electron gyrofrequency near 100 km at the control point [MHz].
    ground_range_km : float or array_like
        Ground range of the hop [km] (sets the incidence angle at 110 km).
    solar_zenith_deg : float or array_like
        Solar zenith angle at the control point [deg].
    sunspot_number : float
        R12 (dimensionless).

    Returns
    -------
    ndarray
        Absorption [dB], broadcast over the inputs.

    Notes
    -----
    The control point of a 0–600 km path is within 300 km of the station, so the station's solar
    zenith angle is used for every distance. Deviative absorption near the reflection level (large
    close to foF2 and foE) is not included.

    References
    ----------
    George & Bradley (1974) [1]_; ITU-R P.533-14 §5.3 [2]_.
    """
    f = np.asarray(frequency_mhz, dtype=float)
    sec_i = 1.0 / np.cos(
        np.radians(incidence_deg(ground_range_km=ground_range_km, height_km=ABSORPTION_HEIGHT_KM))
    )
    index = absorption_index(solar_zenith_deg=solar_zenith_deg, sunspot_number=sunspot_number)
    denom = (f + gyro_frequency_mhz) ** GB_FREQUENCY_EXPONENT + GB_DENOMINATOR_OFFSET
    return GB_NUMERATOR_DB * index * sec_i / denom
