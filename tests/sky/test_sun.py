"""Sun position and sunrise/sunset (NOAA equations) against PyIRI's own solar routines.

PyIRI computes the subsolar point with a separate low-precision almanac (main_library.subsolar_point,
solar_zenith); agreement to a few tenths of a degree checks our NOAA implementation independently.
"""

import datetime as dt

import numpy as np
import PyIRI.main_library as ml
import pytest

from fieldkit.sky.sun import SUNRISE_ZENITH_DEG, solar_zenith_deg, sun_times

SITES = [(46.8, 8.2), (-33.9, 151.2), (64.1, -21.9), (0.0, -78.5)]
DAYS = [dt.date(2026, 12, 1), dt.date(2026, 6, 21), dt.date(2027, 3, 20)]


def _pyiri_zenith(day, hour, lat, lon):
    when = dt.datetime(day.year, day.month, day.day) + dt.timedelta(hours=hour)
    lon_sun, lat_sun = ml.subsolar_point(ml.juldat(when))
    return float(ml.solar_zenith(float(lon_sun), float(lat_sun), float(lon), float(lat)))


@pytest.mark.parametrize("lat,lon", SITES)
@pytest.mark.parametrize("day", DAYS)
def test_zenith_agrees_with_pyiri(day, lat, lon):
    hours = np.arange(0.0, 24.0, 3.0)
    ours = solar_zenith_deg(day=day, utc_hours=hours, lat_deg=lat, lon_deg=lon)
    theirs = [_pyiri_zenith(day, h, lat, lon) for h in hours]
    np.testing.assert_allclose(ours, theirs, atol=0.2)


@pytest.mark.parametrize("lat,lon", SITES)
def test_sunrise_and_sunset_put_the_sun_on_the_horizon(lat, lon):
    day = dt.date(2026, 12, 1)
    t = sun_times(day=day, lat_deg=lat, lon_deg=lon)
    for hour in (t.sunrise_utc_h, t.sunset_utc_h):
        # zenith 90.833 deg at sunrise/sunset (NOAA), checked with PyIRI's independent sun
        assert _pyiri_zenith(day, hour, lat, lon) == pytest.approx(SUNRISE_ZENITH_DEG, abs=0.25)


def test_larch_basin_december_day():
    # 46.8 N 8.2 E on 2026-12-01: sunrise about 06:50 UTC, sunset about 15:40 UTC (NOAA solar
    # calculator, from memory of the Swiss plateau in early December: ~07:50 / 16:40 CET)
    t = sun_times(day=dt.date(2026, 12, 1), lat_deg=46.8, lon_deg=8.2)
    assert t.sunrise_utc_h == pytest.approx(6.85, abs=0.1)
    assert t.sunset_utc_h == pytest.approx(15.7, abs=0.1)


def test_equinox_day_on_the_equator():
    # about 12 h 7 min of daylight on the equator at equinox: refraction and the sun's semi-diameter
    # (common knowledge, from memory)
    t = sun_times(day=dt.date(2027, 3, 20), lat_deg=0.0, lon_deg=0.0)
    assert (t.sunset_utc_h - t.sunrise_utc_h) * 60.0 == pytest.approx(12 * 60 + 7, abs=2)


def test_events_fall_inside_the_utc_day():
    # at 151 E the sun sets ~08:50 and rises ~18:40 UTC in December (NOAA calculator, from memory)
    t = sun_times(day=dt.date(2026, 12, 1), lat_deg=-33.9, lon_deg=151.2)
    assert 0 <= t.sunset_utc_h < t.sunrise_utc_h < 24
    assert t.sunset_utc_h == pytest.approx(8.85, abs=0.15)
    assert t.sunrise_utc_h == pytest.approx(18.65, abs=0.15)


def test_polar_night_and_midnight_sun():
    assert sun_times(day=dt.date(2026, 12, 21), lat_deg=78.2, lon_deg=15.6).polar == "polar-night"
    assert sun_times(day=dt.date(2026, 6, 21), lat_deg=78.2, lon_deg=15.6).polar == "midnight-sun"
