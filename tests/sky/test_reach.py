"""Reach of one channel from given sky numbers: link budget, skip zone and the plain verdicts.

The antenna here is the textbook pattern of a horizontal half-wave dipole over perfect ground in its
broadside plane, G = 2.15 dBi + 20 log|2 sin(k h sin Delta)| (Balanis, Antenna Theory, §4.7, image
theory), so these checks need no solver; the engine is used end to end in test_channel_day.py.
"""

import math

import numpy as np
import pytest

from fieldkit.sky.gain import ELEVATIONS_DEG, ElevationGain
from fieldkit.sky.noise import man_made_fa_db
from fieldkit.sky.path_geometry import elevation_deg, skip_distance_km, slant_path_km
from fieldkit.sky.reach import EXCESS_LOSS_DB, Radio, channel_reach

SSB = Radio(power_w=100.0, bandwidth_hz=2700.0, required_snr_db=10.0, mode="ssb")


def textbook_dipole(frequency_mhz, height_wavelengths=0.15):
    el = np.array(ELEVATIONS_DEG)
    af = np.abs(2 * np.sin(2 * np.pi * height_wavelengths * np.sin(np.radians(el))))
    gain = 2.15 + 20 * np.log10(af)
    return ElevationGain(frequency_mhz, el, gain, float(gain[-1]), 1.0, 1.0)


def reach(f, fof2, *, height=300.0, zenith=120.0, radio=SSB, r12=80.0, env="rural"):
    n = 1 if np.isscalar(fof2) else len(fof2)
    return channel_reach(
        frequency_mhz=f,
        gain=textbook_dipole(f),
        hours_utc=np.arange(n, dtype=float),
        fof2_mhz=np.atleast_1d(fof2),
        reflection_height_km=np.full(n, height),
        solar_zenith_deg=np.full(n, zenith),
        gyro_frequency_mhz=1.3,
        sunspot_number=r12,
        radio=radio,
        noise_environment=env,
    )


def test_link_budget_by_hand():
    # ITU-R P.533 §6 composition at night (absorption at its floor), 3.6 MHz, 200 km, h = 300 km:
    # P_r = 20 dBW + 2 G(70.7 deg) - (32.45 + 20 log 3.6 + 20 log p') - L_a - L_z; N = Fa + 10 log b - 204
    (row,) = reach(3.6, 5.0)
    el = elevation_deg(ground_range_km=200.0, virtual_height_km=300.0)
    g = 2.15 + 20 * math.log10(2 * math.sin(2 * math.pi * 0.15 * math.sin(math.radians(el))))
    p = slant_path_km(ground_range_km=200.0, virtual_height_km=300.0)
    sec_i = 1 / math.cos(
        math.asin(
            6371
            * math.cos(math.radians(elevation_deg(ground_range_km=200.0, virtual_height_km=110.0)))
            / 6481
        )
    )
    la = 677.2 * (1 + 0.0037 * 80) * 0.02 * sec_i / ((3.6 + 1.3) ** 1.98 + 10.2)  # George & Bradley
    signal = (
        20.0 + 2 * g - (32.45 + 20 * math.log10(3.6) + 20 * math.log10(p)) - la - EXCESS_LOSS_DB
    )
    noise = (
        float(man_made_fa_db(frequency_mhz=3.6, environment="rural")) + 10 * math.log10(2700) - 204
    )
    assert row.snr_db[20] == pytest.approx(signal - noise, abs=0.1)  # grid: 0, 10, ..., 200 km


def test_below_fof2_no_skip_zone():
    # common practice: a channel below foF2 has no skip zone
    rows = reach(3.6, [3.7, 4.5, 6.0, 9.0])
    for r in rows:
        assert r.skip_km == 0.0
        assert r.covers_km[0] == 0.0
        assert r.verdict.startswith("covers 0–")


def test_above_fof2_skip_zone_verdict():
    (row,) = reach(5.0, 4.0)
    assert row.skip_km > 100.0
    assert row.verdict.startswith(f"skip zone to {row.covers_km[0]:g} km")
    assert all(
        s is None for s, d in zip(row.snr_db, range(0, 601, 10), strict=True) if d < row.skip_km
    )


def test_above_the_usable_frequency():
    (row,) = reach(12.0, 3.0)
    # issue 16: the words say what it means. 12 MHz on foF2 3 MHz: sec φ = 4 needs a ray below the
    # horizon (secant law with earth curvature, Davies 1990 ch. 6), so no one-hop skip distance exists
    assert row.skip_km is None
    assert row.verdict == "above the NVIS range: the ionosphere returns it nowhere on one hop"
    assert row.max_range_km == 0.0
    # 7.2 MHz on foF2 2.5 MHz at 300 km: the skip zone ends past the 600 km grid (computed below)
    (far,) = reach(7.2, 2.5)
    skip = skip_distance_km(frequency_mhz=7.2, fof2_mhz=2.5, virtual_height_km=300.0)
    assert skip > 600.0 and far.max_range_km == 0.0
    assert (
        far.verdict == f"above the NVIS range: skip zone to {skip:.0f} km, heard only farther away"
    )


def test_too_much_absorption_at_noon_on_the_lowest_channel():
    # summer noon, high sunspots: ~49 dB on 1.8 MHz by George & Bradley (computed); 1 W CW
    cw = Radio(power_w=1.0, bandwidth_hz=500.0, required_snr_db=3.0, mode="cw")
    (row,) = reach(1.85, 6.0, zenith=24.0, r12=150.0, radio=cw)
    assert row.absorption_db > 40.0
    assert row.verdict.startswith("absorbed by day")


def test_too_weak():
    tiny = Radio(power_w=1e-4, bandwidth_hz=2700.0, required_snr_db=10.0, mode="ssb")
    (row,) = reach(3.6, 5.0, radio=tiny, env="business")
    assert row.verdict == "below the noise: SSB needs 10 dB signal-to-noise"


def test_fot_note():
    # Federal Standard 1037C: above 0.85 x MUF the channel is not reliable every day
    (near,) = reach(3.6, 3.8)
    (safe,) = reach(3.6, 5.0)
    assert not near.below_fot and "FOT" in near.verdict
    assert safe.below_fot and "FOT" not in safe.verdict
