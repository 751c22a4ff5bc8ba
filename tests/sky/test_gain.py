"""Antenna gain against elevation from the engine, as the reach uses it."""

import numpy as np
import pytest

from fieldkit.sky.gain import default_dipole_spec, elevation_gains


def test_quadrant_average_equals_full_circle_for_the_centred_dipole():
    # a centre-fed straight dipole over flat ground is symmetric about both axes (image theory,
    # Balanis §4.7), so averaging 0-90 deg with trapezoid end weights equals averaging 0-345 deg
    f = 5.3715
    default = elevation_gains(frequencies_mhz=[f], antenna=None, ground="perfect")[0]
    explicit = elevation_gains(
        frequencies_mhz=[f],
        antenna=default_dipole_spec(frequency_mhz=f, ground="perfect"),
        ground=None,
    )[0]
    np.testing.assert_allclose(default.gain_dbi, explicit.gain_dbi, atol=0.05)


def test_default_dipole_height_and_length():
    spec = default_dipole_spec(frequency_mhz=3.6, ground="average")
    (a, b) = spec["wires"][0]["points_m"]
    # 0.15 wavelength at 3.6 MHz = 12.49 m; 468/f ft = 39.62 m (common practice cut rule)
    assert a[2] == b[2] == pytest.approx(0.15 * 299.792458 / 3.6)
    assert b[0] - a[0] == pytest.approx(468 * 0.3048 / 3.6)
    assert spec["feed"] == {"wire": 0, "distance_m": (b[0] - a[0]) / 2}
