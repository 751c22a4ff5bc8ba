"""A sounding overrides the estimate at its hour and fades out within SOUNDING_SPAN_H hours."""

import datetime as dt

import numpy as np
import pytest

from fieldkit.sky.iri import sky_estimate
from fieldkit.sky.sounding import SOUNDING_SPAN_H, Sounding, apply_sounding


@pytest.fixture(scope="module")
def estimate():
    return sky_estimate(day=dt.date(2026, 12, 1), lat_deg=46.8, lon_deg=8.2, f107=120.0)


def test_no_sounding_passes_the_median_through(estimate):
    sky = apply_sounding(estimate, None)
    np.testing.assert_array_equal(sky.fof2_mhz, estimate.fof2_mhz)
    assert set(sky.source) == {"modelled"}


def test_observed_hour_and_neighbours(estimate):
    s = Sounding(
        hour_utc=14.0, fof2_mhz=7.0, virtual_height_km=280.0, hmf2_km=300.0, muf3000_mhz=20.0
    )
    sky = apply_sounding(estimate, s)
    assert sky.fof2_mhz[14] == pytest.approx(7.0)
    assert sky.reflection_height_km[14] == pytest.approx(280.0)
    assert sky.hmf2_km[14] == pytest.approx(300.0)
    assert sky.muf3000_mhz[14] == pytest.approx(20.0)
    assert sky.source[14] == "observed"
    assert sky.source[13] == sky.source[15] == "blended"
    # one hour away, the ratio is pulled 1 - 1/3 of the way toward the observation
    ratio = 7.0 / estimate.fof2_mhz[14]
    w = 1.0 - 1.0 / SOUNDING_SPAN_H
    assert sky.fof2_mhz[15] == pytest.approx(estimate.fof2_mhz[15] * (1 + w * (ratio - 1)))
    far = [h for h in range(24) if min(abs(h - 14), 24 - abs(h - 14)) >= SOUNDING_SPAN_H]
    np.testing.assert_array_equal(sky.fof2_mhz[far], np.asarray(estimate.fof2_mhz)[far])
    assert all(sky.source[h] == "modelled" for h in far)


def test_wraps_past_midnight(estimate):
    sky = apply_sounding(estimate, Sounding(hour_utc=23.0, fof2_mhz=2.0, virtual_height_km=350.0))
    assert sky.source[23] == "observed"
    assert sky.source[0] == sky.source[1] == "blended"
    assert sky.fof2_mhz[0] < estimate.fof2_mhz[0]


def test_reading_without_hour_holds_all_day(estimate):
    # ARCHITECTURE.md contract example: {"fof2_mhz": 4.0, "virtual_height_km": 300}, no hour
    sky = apply_sounding(estimate, Sounding(hour_utc=None, fof2_mhz=4.0, virtual_height_km=300.0))
    np.testing.assert_allclose(sky.fof2_mhz, 4.0)
    np.testing.assert_allclose(sky.reflection_height_km, 300.0)
    assert set(sky.source) == {"observed"}
