"""Absorption against the George & Bradley law worked by hand (constants from memory)."""

import pytest

from fieldkit.sky.absorption import absorption_db, absorption_index


def test_noon_vertical_value():
    # George & Bradley (1974): L = 677.2 I sec i / ((f + fH)^1.98 + 10.2), I = (1 + 0.0037 R12)
    # cos^1.3(0.881 chi). chi = 0, R12 = 0, f = 5, fH = 1: 6^1.98 = 34.733 -> L = 15.07 dB (computed)
    got = absorption_db(
        frequency_mhz=5.0,
        gyro_frequency_mhz=1.0,
        ground_range_km=0.0,
        solar_zenith_deg=0.0,
        sunspot_number=0.0,
    )
    assert float(got) == pytest.approx(677.2 / (34.733 + 10.2), rel=1e-3)


def test_sunspot_and_zenith_dependence():
    # I = 1.37 x cos^1.3(0.881 x 60 deg) = 1.37 x 0.60376^1.3 = 0.7110 for R12 = 100 (computed)
    assert float(absorption_index(solar_zenith_deg=60.0, sunspot_number=100.0)) == pytest.approx(
        0.7110, rel=1e-3
    )


def test_night_floor():
    # ITU-R P.533 §5.3: diurnal factor never below 0.02 (from memory)
    assert float(absorption_index(solar_zenith_deg=120.0, sunspot_number=0.0)) == pytest.approx(
        0.02
    )


def test_oblique_path_absorbs_more_and_higher_frequency_less():
    kw = {"gyro_frequency_mhz": 1.3, "solar_zenith_deg": 40.0, "sunspot_number": 80.0}
    vertical = float(absorption_db(frequency_mhz=3.6, ground_range_km=0.0, **kw))
    oblique = float(absorption_db(frequency_mhz=3.6, ground_range_km=400.0, **kw))
    higher = float(absorption_db(frequency_mhz=7.1, ground_range_km=0.0, **kw))
    assert oblique > vertical > higher
