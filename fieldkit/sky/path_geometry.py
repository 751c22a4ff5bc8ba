"""One-hop sky-wave path geometry on a spherical earth: elevation, range, incidence, secant-law MUF.

The ionosphere is treated as a mirror at a virtual height ``h`` above a spherical earth of radius
:data:`EARTH_RADIUS_KM`. For a ground range ``D`` the half-angle at the earth's centre is
``theta = D / (2 R)``; the elevation (take-off) angle and the angle of incidence on the layer follow
from the triangle earth centre – station – reflection point.

References
----------
.. [1] ITU-R P.533-14 (2019), "Method for the prediction of the performance of HF circuits", §5.1
   (ray-path geometry, mirror reflection height).
.. [2] K. Davies, *Ionospheric Radio*, IEE Electromagnetic Waves Series 31, Peter Peregrinus, 1990,
   ch. 6 (secant law, Martyn's equivalent-path theorem).
.. [3] Federal Standard 1037C (1996), "optimum working frequency (FOT)": 85 % of the monthly-median MUF.
"""

from __future__ import annotations

import numpy as np

EARTH_RADIUS_KM = 6371.0  # mean earth radius; ITU-R P.533 ray geometry
FOT_FRACTION = 0.85  # FOT = 0.85 x monthly-median MUF; Federal Standard 1037C
ABSORPTION_HEIGHT_KM = 110.0  # height at which the absorbing layer is crossed; ITU-R P.533 §5.3


def _theta(ground_range_km):
    return np.asarray(ground_range_km, dtype=float) / (2.0 * EARTH_RADIUS_KM)


def elevation_deg(*, ground_range_km, virtual_height_km):
    """Elevation (take-off) angle of a one-hop path reflected at a virtual height.

    Parameters
    ----------
    ground_range_km : float or array_like
        Great-circle distance between the two stations [km], >= 0.
    virtual_height_km : float or array_like
        Virtual (mirror) reflection height [km], > 0.

    Returns
    -------
    float or ndarray
        Elevation angle above the horizon [deg]; 90 at zero range.

    References
    ----------
    ITU-R P.533-14, §5.1: ``Delta = atan[(cos theta - R/(R+h)) / sin theta]``, ``theta = D/(2R)``.
    """
    theta = _theta(ground_range_km)
    h = np.asarray(virtual_height_km, dtype=float)
    ratio = EARTH_RADIUS_KM / (EARTH_RADIUS_KM + h)
    result = np.degrees(np.arctan2(np.cos(theta) - ratio, np.sin(theta)))
    return result if result.ndim else float(result)


def ground_range_km(*, elevation_deg, virtual_height_km):
    """Ground range of a one-hop path leaving at an elevation angle (inverse of :func:`elevation_deg`).

    Parameters
    ----------
    elevation_deg : float or array_like
        Elevation angle above the horizon [deg], 0..90.
    virtual_height_km : float or array_like
        Virtual (mirror) reflection height [km], > 0.

    Returns
    -------
    float or ndarray
        Great-circle ground range [km].

    References
    ----------
    ITU-R P.533-14, §5.1; from the same triangle: ``theta = 90 deg - Delta - phi`` with
    ``sin phi = R cos Delta / (R + h)``, ``D = 2 R theta``.
    """
    delta = np.radians(np.asarray(elevation_deg, dtype=float))
    h = np.asarray(virtual_height_km, dtype=float)
    phi = np.arcsin(EARTH_RADIUS_KM * np.cos(delta) / (EARTH_RADIUS_KM + h))
    result = 2.0 * EARTH_RADIUS_KM * (np.pi / 2.0 - delta - phi)
    return result if result.ndim else float(result)


def incidence_deg(*, ground_range_km, height_km):
    """Angle of incidence on a layer at ``height_km`` for a path of the given range (mirror model).

    Parameters
    ----------
    ground_range_km : float or array_like
        Ground range [km].
    height_km : float or array_like
        Height of the layer [km].

    Returns
    -------
    float or ndarray
        Angle from the vertical at which the ray meets the layer [deg]; 0 at zero range.

    References
    ----------
    ITU-R P.533-14, §5.1: ``sin phi = R cos Delta / (R + h)``.
    """
    delta = np.radians(elevation_deg(ground_range_km=ground_range_km, virtual_height_km=height_km))
    h = np.asarray(height_km, dtype=float)
    result = np.degrees(np.arcsin(EARTH_RADIUS_KM * np.cos(delta) / (EARTH_RADIUS_KM + h)))
    return result if result.ndim else float(result)


def slant_path_km(*, ground_range_km, virtual_height_km):
    """Total virtual (group) path length of the hop, station – mirror – station [km].

    Two sides of the triangle earth centre – station – reflection point, by the law of cosines.
    By Martyn's theorem the group path equals this mirror path [2]_.
    """
    theta = _theta(ground_range_km)
    r = EARTH_RADIUS_KM
    rh = EARTH_RADIUS_KM + np.asarray(virtual_height_km, dtype=float)
    result = 2.0 * np.sqrt(r * r + rh * rh - 2.0 * r * rh * np.cos(theta))
    return result if result.ndim else float(result)


def muf_mhz(*, fof2_mhz, ground_range_km, virtual_height_km):
    """Monthly-median maximum usable frequency of a one-hop F2 path by the secant law.

    ``MUF(D) = foF2 * sec phi`` with the incidence angle ``phi`` at the virtual height; Martyn's
    theorem makes the oblique virtual height equal to the vertical one at the equivalent frequency.

    Parameters
    ----------
    fof2_mhz : float or array_like
        F2 critical frequency (ordinary wave) [MHz].
    ground_range_km : float or array_like
        Ground range [km].
    virtual_height_km : float or array_like
        Virtual (mirror) reflection height [km].

    Returns
    -------
    float or ndarray
        MUF [MHz]; equal to foF2 at zero range.

    Notes
    -----
    One virtual height is used for all frequencies at a given hour; the rise of the virtual height
    toward foF2 (group retardation) and the extraordinary wave (about fH/2 higher) are not modelled,
    which errs on the safe side.

    References
    ----------
    Davies (1990), ch. 6 (secant law and Martyn's theorem); ITU-R P.533-14 §5.1 (geometry).
    """
    phi = np.radians(incidence_deg(ground_range_km=ground_range_km, height_km=virtual_height_km))
    result = np.asarray(fof2_mhz, dtype=float) / np.cos(phi)
    return result if result.ndim else float(result)


def fot_mhz(*, muf_mhz):
    """Optimum working frequency, FOT = 0.85 x monthly-median MUF [MHz] (Federal Standard 1037C)."""
    result = FOT_FRACTION * np.asarray(muf_mhz, dtype=float)
    return result if result.ndim else float(result)


def skip_distance_km(*, frequency_mhz, fof2_mhz, virtual_height_km):
    """Skip distance: the shortest ground range at which the secant-law MUF reaches the frequency.

    Parameters
    ----------
    frequency_mhz : float
        Operating frequency [MHz].
    fof2_mhz : float
        F2 critical frequency [MHz].
    virtual_height_km : float
        Virtual (mirror) reflection height [km].

    Returns
    -------
    float or None
        0 when ``frequency <= foF2`` (no skip zone); the skip distance [km] otherwise; None when
        even a ray at grazing take-off cannot be reflected (the frequency passes through at any
        one-hop range).

    References
    ----------
    Davies (1990), ch. 6: ``sec phi = f / foF2``; geometry ITU-R P.533-14 §5.1.
    """
    if frequency_mhz <= fof2_mhz:
        return 0.0
    phi = np.arccos(fof2_mhz / frequency_mhz)
    cos_delta = (EARTH_RADIUS_KM + virtual_height_km) * np.sin(phi) / EARTH_RADIUS_KM
    if cos_delta > 1.0:
        return None
    delta = np.arccos(cos_delta)
    return float(2.0 * EARTH_RADIUS_KM * (np.pi / 2.0 - delta - phi))


def reflection_height_km(*, m3000):
    """Mirror reflection height of the F2 layer from the propagation factor M(3000)F2 [km].

    References
    ----------
    ITU-R P.533-14, §5.1: ``h_r = 1490 / M(3000)F2 - 176`` km.
    """
    result = 1490.0 / np.asarray(m3000, dtype=float) - 176.0
    return result if result.ndim else float(result)
