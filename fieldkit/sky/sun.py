"""Sun position, sunrise and sunset by the NOAA solar calculator equations.

References
----------
.. [1] NOAA Global Monitoring Laboratory, "Solar Calculation Details" and the NOAA_Solar_Calculations
   spreadsheet (general solar position equations after J. Meeus, *Astronomical Algorithms*, 2nd ed.,
   Willmann-Bell, 1998, ch. 25 and 28).
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass

import numpy as np

SUNRISE_ZENITH_DEG = 90.833  # sun's upper limb on the horizon with standard refraction; NOAA [1]
_J2000 = 2451545.0  # Julian day of 2000-01-01 12:00 TT; Meeus ch. 7


@dataclass(frozen=True)
class SunTimes:
    """Sunrise and sunset of one UTC day at one place.

    Attributes
    ----------
    sunrise_utc_h, sunset_utc_h : float or None
        Hours after 00:00 UTC of the day, 0 <= t < 24; None when the sun does not rise (set) within
        the UTC day (see ``polar``).
    solar_noon_utc_h : float
        Hours after 00:00 UTC [h].
    polar : str or None
        "polar-night" or "midnight-sun" when the sun stays below or above the horizon all day.
        Near the polar circles a UTC day can also hold only a sunrise or only a sunset.
    """

    sunrise_utc_h: float | None
    sunset_utc_h: float | None
    solar_noon_utc_h: float
    polar: str | None


def _julian_day(day: dt.date, utc_hours):
    ordinal = day.toordinal() + 1721424.5  # Julian day of 00:00 UTC (proleptic Gregorian)
    return ordinal + np.asarray(utc_hours, dtype=float) / 24.0


def _declination_and_eot(jd):
    """Solar declination [rad] and equation of time [min] (NOAA spreadsheet, columns G–V)."""
    t = (jd - _J2000) / 36525.0
    l0 = np.radians(np.mod(280.46646 + t * (36000.76983 + t * 0.0003032), 360.0))
    m = np.radians(357.52911 + t * (35999.05029 - 0.0001537 * t))
    e = 0.016708634 - t * (0.000042037 + 0.0000001267 * t)
    c = (
        np.sin(m) * (1.914602 - t * (0.004817 + 0.000014 * t))
        + np.sin(2 * m) * (0.019993 - 0.000101 * t)
        + np.sin(3 * m) * 0.000289
    )
    true_long = np.degrees(l0) + c
    omega = np.radians(125.04 - 1934.136 * t)
    app_long = np.radians(true_long - 0.00569 - 0.00478 * np.sin(omega))
    eps0 = 23.0 + (26.0 + (21.448 - t * (46.815 + t * (0.00059 - t * 0.001813))) / 60.0) / 60.0
    eps = np.radians(eps0 + 0.00256 * np.cos(omega))
    decl = np.arcsin(np.sin(eps) * np.sin(app_long))
    y = np.tan(eps / 2.0) ** 2
    eot = 4.0 * np.degrees(
        y * np.sin(2 * l0)
        - 2 * e * np.sin(m)
        + 4 * e * y * np.sin(m) * np.cos(2 * l0)
        - 0.5 * y * y * np.sin(4 * l0)
        - 1.25 * e * e * np.sin(2 * m)
    )
    return decl, eot


def solar_zenith_deg(*, day: dt.date, utc_hours, lat_deg: float, lon_deg: float):
    """Solar zenith angle (no refraction) at the given UTC hours of a day.

    Parameters
    ----------
    day : datetime.date
        The UTC day.
    utc_hours : float or array_like
        Hours after 00:00 UTC [h].
    lat_deg, lon_deg : float
        Site latitude (north positive) and longitude (east positive) [deg].

    Returns
    -------
    ndarray
        Zenith angle of the sun's centre [deg].

    References
    ----------
    NOAA solar calculator equations [1]_ (true solar time, hour angle, zenith).
    """
    hours = np.asarray(utc_hours, dtype=float)
    decl, eot = _declination_and_eot(_julian_day(day, hours))
    true_solar_min = np.mod(hours * 60.0 + eot + 4.0 * lon_deg, 1440.0)
    hour_angle = np.radians(true_solar_min / 4.0 - 180.0)
    lat = np.radians(lat_deg)
    cos_z = np.sin(lat) * np.sin(decl) + np.cos(lat) * np.cos(decl) * np.cos(hour_angle)
    return np.degrees(np.arccos(np.clip(cos_z, -1.0, 1.0)))


def _event(day: dt.date, lat_deg: float, lon_deg: float, guess_h: float, sign: int):
    """Sunrise (sign -1) or sunset (+1) near ``guess_h``: two fixed-point passes of the NOAA method."""
    t = guess_h
    for _ in range(3):
        decl, eot = _declination_and_eot(_julian_day(day, t))
        lat = np.radians(lat_deg)
        cos_ha = np.cos(np.radians(SUNRISE_ZENITH_DEG)) / (np.cos(lat) * np.cos(decl)) - np.tan(
            lat
        ) * np.tan(decl)
        if cos_ha > 1.0:
            return None, "polar-night"
        if cos_ha < -1.0:
            return None, "midnight-sun"
        ha_deg = np.degrees(np.arccos(cos_ha))
        noon_min = 720.0 - 4.0 * lon_deg - eot
        t = float((noon_min + sign * 4.0 * ha_deg) / 60.0)
    return t, None


def _local_day_events(day: dt.date, lat_deg: float, lon_deg: float):
    _, eot = _declination_and_eot(_julian_day(day, 12.0))
    noon_h = float((720.0 - 4.0 * lon_deg - eot) / 60.0)
    rise, polar = _event(day, lat_deg, lon_deg, noon_h - 6.0, -1)
    if polar:
        return noon_h, None, None, polar
    sett, polar = _event(day, lat_deg, lon_deg, noon_h + 6.0, +1)
    if polar:
        return noon_h, None, None, polar
    return noon_h, rise, sett, None


def _inside(times: list[float]) -> float | None:
    inside = [t for t in times if 0.0 <= t < 24.0]
    return min(inside) if inside else None


def sun_times(*, day: dt.date, lat_deg: float, lon_deg: float) -> SunTimes:
    """Sunrise, sunset and solar noon in hours UTC within the given UTC day.

    Far from Greenwich the solar day straddles two UTC days (at 151 E the sun sets at about 08:50
    and rises at about 18:40 UTC); the events returned are those that fall inside 00:00–24:00 UTC,
    taken from the solar days before, of and after ``day``.

    Parameters
    ----------
    day : datetime.date
        The UTC day.
    lat_deg, lon_deg : float
        Site latitude and longitude (east positive) [deg].

    Returns
    -------
    SunTimes

    References
    ----------
    NOAA solar calculator [1]_: hour angle of sunrise at zenith 90.833 deg; solar noon
    ``720 - 4 lon - EoT`` minutes UTC.
    """
    noons, rises, sets, polar_of_day = [], [], [], None
    for shift in (-1, 0, 1):
        noon, rise, sett, polar = _local_day_events(
            day + dt.timedelta(days=shift), lat_deg, lon_deg
        )
        noons.append(noon + 24.0 * shift)
        if shift == 0:
            polar_of_day = polar
        if rise is not None:
            rises.append(rise + 24.0 * shift)
            sets.append(sett + 24.0 * shift)
    noon = _inside(noons)
    if noon is None:
        noon = noons[1] % 24.0
    return SunTimes(_inside(rises), _inside(sets), noon, polar_of_day if not rises else None)
