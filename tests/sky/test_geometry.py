"""Path geometry against worked values (REFERENCES.md, ITU-R P.533 geometry) and trade facts."""

import math

import numpy as np
import pytest

from fieldkit.sky import elevation_deg, ground_range_km
from fieldkit.sky.path_geometry import (
    fot_mhz,
    incidence_deg,
    muf_mhz,
    reflection_height_km,
    skip_distance_km,
    slant_path_km,
)


@pytest.mark.parametrize(
    ("distance_km", "height_km", "expected_deg"),
    [
        (200.0, 300.0, 70.7),  # REFERENCES.md worked value, ITU-R P.533 §5.1 geometry (computed)
        (100.0, 250.0, 78.2),  # REFERENCES.md worked value (computed)
        (0.0, 300.0, 90.0),  # straight up at zero range
    ],
)
def test_elevation_worked_values(distance_km, height_km, expected_deg):
    got = elevation_deg(ground_range_km=distance_km, virtual_height_km=height_km)
    assert got == pytest.approx(expected_deg, abs=0.05)


def test_incidence_and_secant_worked_value():
    # REFERENCES.md: D = 200 km, h = 300 km -> phi = 18.4 deg, sec phi = 1.054 (computed)
    phi = incidence_deg(ground_range_km=200.0, height_km=300.0)
    assert phi == pytest.approx(18.4, abs=0.05)
    assert 1.0 / math.cos(math.radians(phi)) == pytest.approx(1.054, abs=0.001)
    assert muf_mhz(fof2_mhz=5.0, ground_range_km=200.0, virtual_height_km=300.0) == pytest.approx(
        5.0 * 1.054, abs=0.01
    )


def test_range_is_inverse_of_elevation():
    d = np.linspace(0.0, 2000.0, 41)
    for h in (90.0, 250.0, 400.0):
        back = ground_range_km(
            elevation_deg=elevation_deg(ground_range_km=d, virtual_height_km=h), virtual_height_km=h
        )
        np.testing.assert_allclose(back, d, atol=1e-6)


def test_short_range_matches_flat_earth():
    # flat-earth tan(Delta) = 2h/D (Davies, Ionospheric Radio, ch. 6); near vertical the curved earth
    # tilts the local horizon by about theta = D/2R, so Delta is lower by about that much (computed)
    for d, h in ((50.0, 300.0), (150.0, 250.0), (300.0, 300.0)):
        flat = math.degrees(math.atan(2 * h / d))
        theta = math.degrees(d / (2 * 6371.0))
        got = elevation_deg(ground_range_km=d, virtual_height_km=h)
        assert flat - got == pytest.approx(theta, abs=0.15)


def test_slant_path():
    assert slant_path_km(ground_range_km=0.0, virtual_height_km=300.0) == pytest.approx(600.0)
    # flat-earth 2 sqrt(h^2 + (D/2)^2) = 632.5 km at D = 200 km; curvature shortens it slightly
    assert slant_path_km(ground_range_km=200.0, virtual_height_km=300.0) == pytest.approx(
        632.5, rel=0.01
    )


def test_skip_distance_secant_law():
    # Davies ch. 6, flat earth: sec phi = f/foF2, D_skip = 2 h sqrt((f/foF2)^2 - 1) = 587.9 km for
    # f = 7, foF2 = 5, h = 300 (computed); the spherical earth adds a few per cent at this range
    skip = skip_distance_km(frequency_mhz=7.0, fof2_mhz=5.0, virtual_height_km=300.0)
    assert skip == pytest.approx(2 * 300 * math.sqrt((7 / 5) ** 2 - 1), rel=0.04)
    # at the skip distance the secant-law MUF equals the frequency (definition of the skip distance)
    assert muf_mhz(fof2_mhz=5.0, ground_range_km=skip, virtual_height_km=300.0) == pytest.approx(
        7.0
    )


def test_channel_below_fof2_has_no_skip_zone():
    # common practice: below the critical frequency the wave returns at every range, no skip zone
    for f in (3.0, 4.9, 5.0):
        assert skip_distance_km(frequency_mhz=f, fof2_mhz=5.0, virtual_height_km=300.0) == 0.0


def test_frequency_far_above_fof2_is_never_reflected():
    assert skip_distance_km(frequency_mhz=30.0, fof2_mhz=3.0, virtual_height_km=300.0) is None


def test_fot():
    # Federal Standard 1037C: FOT = 0.85 x MUF
    assert fot_mhz(muf_mhz=10.0) == pytest.approx(8.5)


def test_nvis_elevations_cover_0_to_300_km():
    # common practice: NVIS uses roughly 70-90 deg elevation and covers roughly 0-300 km; at the
    # NVIS virtual heights (250-400 km, common practice) 70-90 deg lands between 0 and ~180-290 km
    for h in (250.0, 300.0, 400.0):
        assert ground_range_km(elevation_deg=90.0, virtual_height_km=h) == pytest.approx(
            0.0, abs=1e-6
        )
        assert 150.0 <= ground_range_km(elevation_deg=70.0, virtual_height_km=h) <= 320.0


def test_reflection_height_from_m3000():
    # ITU-R P.533 §5.1: h = 1490/M(3000)F2 - 176; M = 3.0 -> 320.7 km (computed)
    assert reflection_height_km(m3000=3.0) == pytest.approx(320.67, abs=0.01)
