"""The main geomagnetic field at a point from the IGRF-13 spherical-harmonic coefficients.

Used for the modified dip (modip) that the CCIR maps are drawn in, and for the electron
gyrofrequency of the absorption law. The synthesis follows PyIRI 0.1.7's ``igrf_library`` (MIT
licence, © 2023 V. Forsythe; after the IAGA pyIGRF release and chaosmagpy) operation for operation,
so the result equals PyIRI's to the last bit (tests/sky/test_iri.py checks it against PyIRI itself);
numpy only, so the sky layer needs neither PyIRI nor scipy at run time.

References
----------
.. [1] P. Alken et al., "International Geomagnetic Reference Field: the thirteenth generation",
   Earth, Planets and Space 73, 49, 2021, doi:10.1186/s40623-020-01288-x.
.. [2] R. A. Langel, "The main field", in J. A. Jacobs (ed.), *Geomagnetism* vol. 1, Academic
   Press 1987, eqs. (51)-(53) (geodetic to geocentric), Schmidt quasi-normalised Legendre functions.
.. [3] K. Rawer, *Wave Propagation in the Ionosphere*, Kluwer 1993 (modified dip,
   tan μ = I / √cos φ).
"""

from __future__ import annotations

import numpy as np

IGRF_DEGREE = 13  # IGRF-13 main field to degree 13 (Alken et al. 2021)
IGRF_EPOCHS = np.arange(1900, 2025 + 5, 5)  # the file's 26 columns, 1900-2025 every 5 years
EARTH_RADIUS_KM = 6371.2  # IGRF reference radius (Alken et al. 2021)
WGS84_EQUATORIAL_KM = 6378.137  # WGS-84 ellipsoid
WGS84_FLATTENING = 1.0 / 298.257223563


def coefficients_at(table: np.ndarray, decimal_year: float) -> np.ndarray:
    """Gauss coefficients (195,) at a date: linear in time between epochs, extrapolated after 2025.

    ``table`` is the (195, 26) block of the IGRF-13 file [nT]; the interpolation is the two-point
    formula of scipy's ``interp1d`` that PyIRI uses, written out.
    """
    x = IGRF_EPOCHS
    i = int(np.clip(np.searchsorted(x, decimal_year), 1, len(x) - 1))
    y_lo, y_hi = table[:, i - 1], table[:, i]
    slope = (y_hi - y_lo) / (x[i] - x[i - 1])
    return slope * (decimal_year - x[i - 1]) + y_lo


def _geocentric(h_km: np.ndarray, geodetic_colat_deg: np.ndarray):
    """Geocentric radius [km], colatitude [deg] and the rotation (sin, cos) back to geodetic [2]."""
    eqrad = WGS84_EQUATORIAL_KM
    plrad = eqrad * (1.0 - WGS84_FLATTENING)
    ctgd = np.cos(np.deg2rad(geodetic_colat_deg))
    stgd = np.sin(np.deg2rad(geodetic_colat_deg))
    a2 = eqrad * eqrad
    a4 = a2 * a2
    b2 = plrad * plrad
    b4 = b2 * b2
    c2 = ctgd * ctgd
    s2 = 1.0 - c2
    rho = np.sqrt(a2 * s2 + b2 * c2)
    rad = np.sqrt(h_km * (h_km + 2.0 * rho) + (a4 * s2 + b4 * c2) / rho**2)
    cd = (h_km + rho) / rad
    sd = (a2 - b2) * ctgd * stgd / (rho * rad)
    cthc = np.clip(ctgd * cd - stgd * sd, -1.0, 1.0)
    return rad, np.rad2deg(np.arccos(cthc)), sd, cd


def _legendre(nmax: int, theta_deg: np.ndarray) -> np.ndarray:
    """Schmidt quasi-normalised P(n, m) in [n, m] and dP(n, m)/dθ in [m, n + 1] [2]."""
    costh = np.cos(np.radians(theta_deg))
    sinth = np.sqrt(1 - costh**2)
    p = np.zeros((nmax + 1, nmax + 2) + costh.shape)
    p[0, 0] = 1
    p[1, 1] = sinth
    rootn = np.sqrt(np.arange(2 * nmax**2 + 1))
    for m in range(nmax):
        p_mm = rootn[m + m + 1] * p[m, m]
        p[m + 1, m] = costh * p_mm
        if m > 0:
            p[m + 1, m + 1] = sinth * p_mm / rootn[m + m + 2]
        for n in range(m + 2, nmax + 1):
            d = n * n - m * m
            e = n + n - 1
            p[n, m] = (e * costh * p[n - 1, m] - rootn[d - e] * p[n - 2, m]) / rootn[d]
    p[0, 2] = -p[1, 1]
    p[1, 2] = p[1, 0]
    for n in range(2, nmax + 1):
        p[0, n + 1] = -np.sqrt((n * n + n) / 2.0) * p[n, 1]
        p[1, n + 1] = (
            np.sqrt(2.0 * (n * n + n)) * p[n, 0] - np.sqrt(n * n + n - 2) * p[n, 2]
        ) / 2.0
        for m in range(2, n):
            part1 = np.sqrt((n + m) * (n - m + 1)) * p[n, m - 1]
            part2 = np.sqrt((n + m + 1.0) * (n - m)) * p[n, m + 1]
            p[m, n + 1] = 0.5 * part1 - part2
        p[n, n + 1] = np.sqrt(2.0 * n) * p[n, n - 1] / 2.0
    return p


def _synthesis(coeffs: np.ndarray, radius_km, theta_deg, phi_deg):
    """Radial, colatitude and azimuthal field components (B_r, B_θ, B_φ) [nT] [2]."""
    nmax = IGRF_DEGREE
    radius = np.asarray(radius_km, dtype=float) / EARTH_RADIUS_KM
    theta = np.asarray(theta_deg, dtype=float)
    shape = np.broadcast(radius, theta, np.asarray(phi_deg, dtype=float)).shape
    r_n = radius ** (-3)
    pnm = _legendre(nmax, theta)
    sinth = pnm[1, 1]
    phi = np.radians(np.asarray(phi_deg, dtype=float))
    cos_mp = np.cos(np.multiply.outer(np.arange(nmax + 1), phi))
    sin_mp = np.sin(np.multiply.outer(np.arange(nmax + 1), phi))
    b_r, b_t, b_p = np.zeros(shape), np.zeros(shape), np.zeros(shape)
    num = 0
    for n in range(1, nmax + 1):
        b_r += (n + 1) * pnm[n, 0] * r_n * coeffs[num]
        b_t += -pnm[0, n + 1] * r_n * coeffs[num]
        num += 1
        for m in range(1, n + 1):
            g, h = coeffs[num], coeffs[num + 1]
            b_r += (n + 1) * pnm[n, m] * r_n * (g * cos_mp[m] + h * sin_mp[m])
            b_t += -pnm[m, n + 1] * r_n * (g * cos_mp[m] + h * sin_mp[m])
            with np.errstate(divide="ignore", invalid="ignore"):
                div = np.where(theta == 0.0, pnm[m, n + 1], pnm[n, m] / sinth)
                div = np.where(theta == np.degrees(np.pi), -pnm[m, n + 1], div)
            b_p += m * div * r_n * (g * sin_mp[m] - h * cos_mp[m])
            num += 2
        r_n = r_n / radius
    return b_r, b_t, b_p


def field(
    table: np.ndarray, *, decimal_year: float, lat_deg, lon_deg, height_km: float
) -> tuple[np.ndarray, np.ndarray]:
    """Inclination [deg] and total intensity [nT] of the main field at geodetic points.

    Parameters
    ----------
    table : ndarray
        The (195, 26) IGRF-13 coefficient block [nT].
    decimal_year : float
        Date [year].
    lat_deg, lon_deg : ndarray
        Geodetic latitude and longitude (east positive) [deg].
    height_km : float
        Height above the WGS-84 ellipsoid [km].
    """
    lat = np.asarray(lat_deg, dtype=float)
    h = np.full(lat.shape, height_km)
    radius, colat, sd, cd = _geocentric(h, 90.0 - lat)
    b_r, b_t, b_p = _synthesis(coefficients_at(table, decimal_year), radius, colat, lon_deg)
    x, y, z = -b_t, b_p, -b_r
    x, z = x * cd + z * sd, z * cd - x * sd
    hsq = x * x + y * y
    return np.rad2deg(np.arctan2(z, np.sqrt(hsq))), np.sqrt(hsq + z * z)


def modip_deg(inclination_deg: np.ndarray, lat_deg: np.ndarray) -> np.ndarray:
    """Modified dip μ = atan(I / √cos φ) [deg] (Rawer 1993) [3], I and φ in degrees as in IRI."""
    rad_arg = np.deg2rad(inclination_deg / np.sqrt(np.cos(np.deg2rad(lat_deg))))
    return np.rad2deg(np.arctan(rad_arg))
