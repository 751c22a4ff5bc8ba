"""ITU-R P.372 noise figures computed from the published c, d constants (constants from memory)."""

import math

import pytest

from fieldkit.sky.noise import galactic_fa_db, man_made_fa_db, noise_power_dbw, total_fa_db


@pytest.mark.parametrize(
    ("environment", "frequency_mhz", "expected_db"),
    [
        # ITU-R P.372, Table 2: Fa = c - d log10 f (c, d from memory); values computed by hand
        ("rural", 3.5, 67.2 - 27.7 * 0.544068),  # 52.13 dB
        ("rural", 7.0, 67.2 - 27.7 * 0.845098),  # 43.79 dB
        ("quiet-rural", 3.5, 53.6 - 28.6 * 0.544068),  # 38.04 dB
        ("residential", 7.0, 72.5 - 27.7 * 0.845098),  # 49.09 dB
        ("business", 10.0, 76.8 - 27.7),  # 49.1 dB
    ],
)
def test_man_made_noise(environment, frequency_mhz, expected_db):
    assert man_made_fa_db(frequency_mhz=frequency_mhz, environment=environment) == pytest.approx(
        expected_db, abs=0.01
    )


def test_galactic_noise():
    # ITU-R P.372, Table 2: galactic Fa = 52 - 23 log10 f (from memory): 29.0 dB at 10 MHz
    assert galactic_fa_db(frequency_mhz=10.0) == pytest.approx(29.0)


def test_galactic_noise_screened_below_fof2():
    below = total_fa_db(frequency_mhz=3.5, environment="quiet-rural", galactic_reaches_ground=False)
    above = total_fa_db(frequency_mhz=3.5, environment="quiet-rural", galactic_reaches_ground=True)
    assert float(below) == pytest.approx(53.6 - 28.6 * math.log10(3.5))
    # power sum of 38.04 dB and 52 - 23 log10 3.5 = 39.49 dB (computed)
    assert float(above) == pytest.approx(10 * math.log10(10**3.804 + 10**3.949), abs=0.02)


def test_noise_power_in_bandwidth():
    # ITU-R P.372 §2: N = Fa + 10 log b - 204 dBW; 52.13 dB in 2.7 kHz -> -117.56 dBW (computed)
    assert float(noise_power_dbw(fa_db=52.13, bandwidth_hz=2700.0)) == pytest.approx(
        -117.56, abs=0.01
    )
