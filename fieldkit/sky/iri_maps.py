"""IRI monthly-median F2 and E peak parameters at one site from the coefficient tables (numpy only).

foF2 and M(3000)F2 are the CCIR numerical maps (Jones & Gallet: diurnal Fourier series times
geographic functions of modip, latitude and longitude) at the two solar levels IG12 = 0 and 100;
hmF2 follows from M(3000)F2, foF2/foE and R12 (Bilitza et al. 1979, as in IRI); foE is the NeQuick
solar-zenith formula. The two monthly medians round the day are weighted by date and the result
interpolated to the day's solar index, exactly as ``PyIRI.main_library.IRI_density_1day`` does.

The arithmetic follows PyIRI 0.1.7 (MIT licence, © 2023 V. Forsythe) operation for operation and
array layout for array layout, so the numbers equal PyIRI's to the last bit; tests/sky/test_iri.py
checks them against a direct PyIRI call. Only the parameters the sky layer uses are computed (no
Es, F1 or profile), and nothing here reads a file: the tables come from
:mod:`fieldkit.sky.iri_tables`.

References
----------
.. [1] V. Forsythe et al., "PyIRI: Whole-Globe Approach to the International Reference Ionosphere
   Modeling Implemented in Python", Space Weather 22, 2024, doi:10.1029/2023SW003739.
.. [2] W. B. Jones, R. M. Gallet, "Representation of diurnal and geographic variations of
   ionospheric data by numerical methods", ITU Telecommunication Journal 32(1), 1965, pp. 18-28;
   W. B. Jones, R. P. Graham, M. Leftin, *Advances in ionospheric mapping by numerical methods*,
   1966.
.. [3] D. Bilitza, N. M. Sheikh, R. Eyfrig, "A global model for the height of the F2-peak using
   M3000 values from the CCIR numerical maps", Telecomm. J. 46, 1979, pp. 549-553.
.. [4] B. Nava, P. Coïsson, S. M. Radicella, "A new version of the NeQuick ionosphere electron
   density model", J. Atmos. Sol.-Terr. Phys. 70(15), 2008, doi:10.1016/j.jastp.2008.01.015.
"""

from __future__ import annotations

import datetime as dt
import math
from dataclasses import dataclass

import numpy as np

from fieldkit.sky import igrf

# Orders of the CCIR maps (Jones & Gallet 1965): highest power of sin(modip) per longitude order,
# number of geographic functions, number of diurnal terms
QM_FOF2 = (12, 12, 9, 5, 2, 1, 1, 1, 1)
QM_M3000 = (7, 8, 6, 3, 2, 1, 1)
NK_FOF2, NK_M3000 = 76, 49
NJ_FOF2, NJ_M3000 = 13, 9
SOLAR_IG12 = (0.0, 100.0)  # the two solar levels of the maps
MODIP_HEIGHT_KM = 300.0  # IRI takes the inclination for modip at 300 km
MEDIAN_DAY = 15  # a monthly median stands for the 15th
# NeQuick effective solar zenith angle (Nava et al. 2008)
CHI0_DEG = 86.23292796211615
CHI_ALPHA = 12.0


@dataclass(frozen=True)
class PeakParameters:
    """F2 and E peak parameters per hour (arrays of shape (n_hours,))."""

    fof2_mhz: np.ndarray
    hmf2_km: np.ndarray
    m3000: np.ndarray
    foe_mhz: np.ndarray


def _fexp(x: np.ndarray) -> np.ndarray:
    """exp(x) clamped outside ±80, as IRI's FEXP."""
    y = np.zeros(x.shape)
    y[x > 80.0] = 5.5406e34
    y[x < -80.0] = 1.8049e-35
    inside = (x >= -80.0) & (x <= 80.0)
    y[inside] = np.exp(x[inside])
    return y


def _quadratic_root(a: float, b: float, c: float):
    return (-b + np.sqrt(b**2 - 4.0 * a * c)) / (2.0 * a)


def f107_to_r12(f107):
    """R12 from F10.7, inverse of F10.7 = 63.75 + 0.728 R12 + 8.9e-4 R12² (IRI-2020)."""
    return _quadratic_root(8.9e-4, 0.728, 63.75 - f107)


def r12_to_ig12(r12):
    """IG12 from R12 (IRI-2020, sunspot series version 2)."""
    return -11.5634 + 1.5332 * r12 - 0.0031 * r12**2


def ig12_to_r12(ig12):
    return _quadratic_root(-0.0031, 1.5332, -11.5634 - ig12)


def _diurnal(nj: int, hours_utc: np.ndarray) -> np.ndarray:
    """1, sin t, cos t, sin 2t, … (nj terms) per hour, t = 15°·UT − 180° → (n_hours, nj) [2]."""
    d = np.zeros((nj, hours_utc.size))
    hou = np.deg2rad(15.0 * hours_utc - 180.0)
    row = 0
    for j in range(nj):
        for i in range(2):
            if row == nj:
                break
            d[row] = np.cos(hou * (i + j)) if i == 0 else np.sin(hou * (i + j))
            row += 1
    return d.T


def _geographic(qm, nk: int, lon, lat, modip) -> np.ndarray:
    """Geographic functions sinᵏ(modip) cosʲ(lat) {cos, sin}(j lon) → (nk, n_sites) [2]."""
    g = np.zeros((nk, lon.size))
    k = 0
    for j, q in enumerate(qm):
        for i in range(q):
            for m in range(2):
                if j == 0 and m == 1:  # sin(0·lon) vanishes
                    continue
                f3 = np.cos(np.deg2rad(lon * j)) if m == 0 else np.sin(np.deg2rad(lon * j))
                g[k] = (np.sin(np.deg2rad(modip))) ** i * (np.cos(np.deg2rad(lat))) ** j * f3
                k += 1
    return g


def _product(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """a @ b with every sum taken term by term, k = 0, 1, … (not BLAS's blocked order).

    PyIRI's coefficient arrays are object arrays (its Fortran reader returns Python floats), so its
    products are summed in this order; doing the same keeps the maps equal to PyIRI's to the bit.
    """
    out = a[:, :1] * b[:1, :]
    for k in range(1, a.shape[1]):
        out = out + a[:, k : k + 1] * b[k : k + 1, :]
    return out


def _julian_day(t: dt.datetime) -> float:
    """Julian date (Fliegel & Van Flandern, as NOVAS)."""
    y, m = t.year, t.month
    return (
        367.0 * y
        - int((7.0 * (y + int((m + 9.0) / 12.0))) / 4.0)
        + int((275.0 * m) / 9.0)
        + t.day
        + 1721013.5
        + (t.hour + t.minute / 60.0 + t.second / math.pow(60, 2)) / 24.0
        - 0.5 * math.copysign(1, 100.0 * y + m - 190002.5)
        + 0.5
    )


def _subsolar_point(jd: float) -> tuple[float, float]:
    """Longitude and latitude of the subsolar point [deg] (low-precision solar coordinates)."""
    t = (jd - 2451545.0) / 36525.0
    lms = np.mod(280.460 + 36000.771 * t, 360.0)
    anomaly = np.mod(357.527723 + 35999.05034 * t, 360.0)
    ecl = (
        lms
        + 1.914666471 * np.sin(np.deg2rad(anomaly))
        + 0.01999464 * np.sin(np.deg2rad(2.0 * anomaly))
    )
    eps = 23.439291 - 0.0130042 * t
    dec = np.rad2deg(np.arcsin(np.sin(np.deg2rad(eps)) * np.sin(np.deg2rad(ecl))))
    gmst = 67310.54841 + (876600.0 * 3600.0 + 8640184.812866) * t + 0.93104 * t**2 - 6.2e-6 * t**3
    gmst = np.mod(gmst, 86400.0) / 240.0
    num = np.cos(np.deg2rad(eps)) * np.sin(np.deg2rad(ecl)) / np.cos(np.deg2rad(dec))
    den = np.cos(np.deg2rad(ecl)) / np.cos(np.deg2rad(dec))
    lon = -(gmst - np.rad2deg(np.arctan2(num, den)))
    lon = lon - np.floor_divide(np.abs(lon), 360) * 360 * np.sign(lon)
    if lon > 180.0:
        lon = lon - 360.0
    if lon < -180.0:
        lon = lon + 360.0
    return lon, dec


def _solar_zenith(year: int, month: int, hours_utc: np.ndarray, lon, lat) -> np.ndarray:
    """Solar zenith angle on the median day at each hour → (n_hours, n_sites) [deg]."""
    out = np.zeros((hours_utc.size, lon.size))
    for i, ut in enumerate(hours_utc):
        hour = np.fix(ut)
        minute = np.fix((ut - hour) * 60.0)
        jd = _julian_day(dt.datetime(year, month, MEDIAN_DAY, int(hour), int(minute)))
        s_lon, s_lat = _subsolar_point(jd)
        cos_z = np.sin(np.deg2rad(s_lat)) * np.sin(np.deg2rad(lat)) + np.cos(
            np.deg2rad(s_lat)
        ) * np.cos(np.deg2rad(lat)) * np.cos(np.deg2rad(s_lon - lon))
        out[i, :] = np.rad2deg(np.arccos(cos_z))
    return out


def _foe(month: int, chi_eff: np.ndarray, lat, f107: float) -> np.ndarray:
    """E-layer critical frequency [MHz] (NeQuick, Nava et al. 2008) [4]."""
    seas = -1 if month in (1, 2, 11, 12) else (0 if month in (3, 4, 9, 10) else 1)
    ee = _fexp(np.deg2rad(0.3 * lat))
    seasp = seas * (ee - 1.0) / (ee + 1.0)
    foe = np.sqrt(
        0.49 + (1.112 - 0.019 * seasp) ** 2 * np.sqrt(f107) * (np.cos(np.deg2rad(chi_eff))) ** 0.6
    )
    return np.nan_to_num(foe)


def _decimal_year_of_median(year: int, month: int) -> float:
    t = dt.datetime(year, month, MEDIAN_DAY)
    days = int(dt.datetime(year, 12, 31).strftime("%j"))
    return year + (t.timetuple().tm_yday - 1) / days


def monthly_medians(tables, *, year: int, month: int, hours_utc, lon, lat) -> dict:
    """foF2, M(3000)F2, hmF2 and foE at the two solar levels → arrays (n_hours, n_sites, 2).

    ``tables`` is an :class:`fieldkit.sky.iri_tables.IriTables`.
    """
    inc, _ = igrf.field(
        tables.igrf,
        decimal_year=_decimal_year_of_median(year, month),
        lat_deg=lat,
        lon_deg=lon,
        height_km=MODIP_HEIGHT_KM,
    )
    modip = igrf.modip_deg(inc, lat)
    d_fof2, d_m3000 = _diurnal(NJ_FOF2, hours_utc), _diurnal(NJ_M3000, hours_utc)
    g_fof2 = _geographic(QM_FOF2, NK_FOF2, lon, lat, modip)
    g_m3000 = _geographic(QM_M3000, NK_M3000, lon, lat, modip)
    c_fof2, c_m3000 = tables.fof2[month - 1], tables.m3000[month - 1]
    shape = (hours_utc.size, lon.size, 2)
    fof2, m3000, foe = np.zeros(shape), np.zeros(shape), np.zeros(shape)
    for s in range(2):
        fof2[:, :, s] = _product(_product(d_fof2, c_fof2[:, :, s]), g_fof2)
        m3000[:, :, s] = _product(_product(d_m3000, c_m3000[:, :, s]), g_m3000)
    chi = _solar_zenith(year, month, hours_utc, lon, lat)
    ee = _fexp(CHI_ALPHA * (chi - CHI0_DEG))
    chi_eff = np.nan_to_num(((90.0 - 0.24 * _fexp(20.0 - 0.2 * chi)) * ee + chi) / (ee + 1.0))
    solar_f107 = [_r12_to_f107(ig12_to_r12(np.float64(ig))) for ig in SOLAR_IG12]
    for s in range(2):
        foe[:, :, s] = _foe(month, chi_eff, lat, solar_f107[s])
    return {"fo": fof2, "M3000": m3000, "hm": _hmf2(m3000, foe, fof2, modip), "foE": foe}


def _r12_to_f107(r12):
    return 63.75 + 0.728 * r12 + 8.9e-4 * r12**2


def _hmf2(m3000, foe, fof2, modip) -> np.ndarray:
    """hmF2 = 1490/(M(3000)F2 + ΔM) − 176 km (Bilitza et al. 1979) [3] at both solar levels."""
    r12 = np.zeros(m3000.shape)
    for s, ig in enumerate(SOLAR_IG12):
        r12[:, :, s] = ig12_to_r12(np.float64(ig))
    mod = np.broadcast_to(np.asarray(modip)[None, :, None], m3000.shape)
    ratio = fof2 / foe
    ratio[ratio < 1.7] = 1.7
    f1 = 0.00232 * r12 + 0.222
    f2 = 1.0 - r12 / 150.0 * np.exp(-((mod / 40.0) ** 2))
    f3 = 1.2 - 0.0116 * np.exp(r12 / 41.84)
    f4 = 0.096 * (r12 - 25.0) / 150.0
    delta_m = f1 * f2 / (ratio - f3) + f4
    return 1490.0 / (m3000 + delta_m) - 176.0


def _median_months(day: dt.date) -> tuple[dt.datetime, dt.datetime, float, float]:
    """The medians before and after the day (15th of the months) and their weights."""
    mid = dt.datetime(day.year, day.month, MEDIAN_DAY)
    event = dt.datetime(day.year, day.month, day.day)
    if day.day >= MEDIAN_DAY:
        after = mid + dt.timedelta(days=30)
        before, after = mid, dt.datetime(after.year, after.month, MEDIAN_DAY)
    else:
        prev = mid - dt.timedelta(days=30)
        before, after = dt.datetime(prev.year, prev.month, MEDIAN_DAY), mid
    span = (after - before).days
    return before, after, (after - event).days / span, (event - before).days / span


def peak_parameters(
    tables, *, day: dt.date, hours_utc, lat_deg: float, lon_deg: float, f107: float
):
    """F2 and E peak parameters of a UTC day at one site, as ``IRI_density_1day`` [1].

    Parameters
    ----------
    tables : fieldkit.sky.iri_tables.IriTables
    day : datetime.date
    hours_utc : ndarray
        Hours after 00:00 UTC [h].
    lat_deg, lon_deg : float
        Geographic latitude and longitude (east positive) [deg].
    f107 : float
        Solar radio flux F10.7 [sfu]; interpolated as IG12 between the maps' two levels.

    Returns
    -------
    PeakParameters
    """
    hours = np.asarray(hours_utc, dtype=float)
    lon, lat = np.array([float(lon_deg)]), np.array([float(lat_deg)])
    before, after, w1, w2 = _median_months(day)
    p1 = monthly_medians(
        tables, year=before.year, month=before.month, hours_utc=hours, lon=lon, lat=lat
    )
    p2 = monthly_medians(
        tables, year=after.year, month=after.month, hours_utc=hours, lon=lon, lat=lat
    )
    sol = r12_to_ig12(f107_to_r12(f107))
    out = {}
    for key in ("fo", "M3000", "hm", "foE"):
        both = np.swapaxes(p1[key] * w1 + p2[key] * w2, 0, 2)  # (2, n_sites, n_hours)
        lo_hi = both[0, :] * (100 - sol) / (100 - 0) + both[1, :] * (sol - 0) / (100 - 0)
        out[key] = np.swapaxes(lo_hi, 0, 1)[:, 0]
    return PeakParameters(
        fof2_mhz=out["fo"], hmf2_km=out["hm"], m3000=out["M3000"], foe_mhz=out["foE"]
    )
