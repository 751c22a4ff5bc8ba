"""The coax as a line: a radio-end reading moved to the feedpoint, against hand-computed
telegrapher's-equation examples and against scikit-rf's own line function."""

import cmath
import math

import numpy as np
import pytest

from fieldkit.constants import SPEED_OF_LIGHT_M_S as C0
from fieldkit.errors import InputError
from fieldkit.rigging.feedline import VELOCITY_FACTORS, Coax, parse_coax
from fieldkit.rigging.line import (
    feedpoint_impedance,
    feedpoint_swr,
    propagation_constant,
    radio_impedance,
    wavelengths,
)


def _lossless(length_m: float, vf: float = 0.66) -> Coax:
    return Coax("test line", 0.0, 0.0, 0.04, length_m, vf)


def _quarter_wave_m(f_hz: float, vf: float = 0.66) -> float:
    return vf * C0 / f_hz / 4


def test_quarter_wave_inverts_the_load():
    # lossless λ/4 line: Z_in = Z0² / Z_L (Chipman, Schaum's Transmission Lines 1968, ch. 5,
    # the quarter-wave transformer): 50² / 25 = 100 Ω at the radio end
    f = 3.65e6
    line = _lossless(_quarter_wave_m(f))
    (z_radio,) = radio_impedance([25.0], frequencies_hz=[f], coax=line)
    assert z_radio == pytest.approx(100.0 + 0j, abs=1e-6)
    (z_feed,) = feedpoint_impedance([100.0], frequencies_hz=[f], coax=line)
    assert z_feed == pytest.approx(25.0 + 0j, abs=1e-6)


def test_eighth_wave_worked_example():
    # lossless λ/8 line, βl = π/4, tan βl = 1: Z_in = Z0 (Z_L + jZ0)/(Z0 + jZ_L)
    # Z_L = 100 Ω: 50 (100 + j50)/(50 + j100) = 50 (100 + j50)(50 − j100)/12500
    #            = 50 (10000 − j7500)/12500 = 40 − j30 Ω (by hand; Chipman 1968 ch. 4, eq. for Z_in)
    f = 7.1e6
    line = _lossless(_quarter_wave_m(f) / 2)
    (z_radio,) = radio_impedance([100.0], frequencies_hz=[f], coax=line)
    assert z_radio == pytest.approx(40.0 - 30.0j, abs=1e-6)


def test_lossy_line_worked_example():
    # αl = 0.1 Np, βl = π/4, Z_L = 100 Ω. tanh(a + jb) = (sinh 2a + j sin 2b)/(cosh 2a + cos 2b)
    # = (sinh 0.2 + j·1)/(cosh 0.2 + 0) = (0.201336 + j)/1.020067 = 0.197375 + j0.980328 (by hand,
    # 4-figure tables); Z_in = Z0 (Z_L + Z0 t)/(Z0 + Z_L t) (Chipman 1968 ch. 4)
    t = 0.197375 + 0.980328j
    # numerator 100 + 50t = 109.869 + j49.016; denominator 50 + 100t = 69.738 + j98.033;
    # ratio = (12467.2 − j7352.5)/14473.8 = 0.86137 − j0.50799; × 50 = 43.07 − j25.40 Ω (by hand)
    expected = 50 * (100 + 50 * t) / (50 + 100 * t)
    f = 7.1e6
    length = _quarter_wave_m(f) / 2
    loss_db = 0.1 * 20 / math.log(10)  # 0.1 Np of matched loss = 0.8686 dB
    # an explicit line with that matched loss at 7.1 MHz, all of it in the √f term
    line = Coax("test line", loss_db / length * 100 / math.sqrt(7.1), 0.0, 0.04, length, 0.66)
    assert line.matched_loss_db(f) == pytest.approx(loss_db)
    (z_radio,) = radio_impedance([100.0], frequencies_hz=[f], coax=line)
    assert z_radio == pytest.approx(expected, abs=2e-3)
    assert z_radio == pytest.approx(43.07 - 25.40j, abs=0.01)
    (back,) = feedpoint_impedance([z_radio], frequencies_hz=[f], coax=line)
    assert back == pytest.approx(100.0 + 0j, abs=1e-9)


def test_against_scikit_rf_line_function():
    # scikit-rf's tlineFunctions.zl_2_zin (its closed form, not the network cascade fieldkit uses)
    from skrf.tlineFunctions import zl_2_zin

    coax = parse_coax({"class": "rg-58", "length_m": 12.5})
    f = np.linspace(3.4e6, 3.9e6, 11)
    zl = 40 + 1j * np.linspace(-60, 60, 11)
    gamma = propagation_constant(coax, frequencies_hz=f)
    expected = zl_2_zin(50.0, zl, gamma * coax.length_m)  # θ = γl: Γ_in = Γ_L e^(−2θ) there
    got = radio_impedance(zl, frequencies_hz=f, coax=coax)
    np.testing.assert_allclose(got, expected, rtol=1e-9)
    np.testing.assert_allclose(feedpoint_impedance(got, frequencies_hz=f, coax=coax), zl, rtol=1e-9)


def test_issue_14_rg58_is_nearly_a_quarter_wave():
    # issue 14: 12.5 m of RG-58 (v = 0.66) at 3.65 MHz: λ in the cable = 0.66 c / f = 54.2 m,
    # so 12.5 m is 0.23 λ (computed)
    coax = parse_coax({"class": "rg-58", "length_m": 12.5})
    assert coax.velocity_factor == VELOCITY_FACTORS["rg-58"][0] == 0.66
    assert wavelengths(coax, frequency_hz=3.65e6) == pytest.approx(0.2306, abs=1e-3)
    # a low dipole on channel at 25 + j0 Ω reads near 50²/25 = 100 Ω at the radio (λ/4 inverts)
    (z_radio,) = radio_impedance([25.0], frequencies_hz=[3.65e6], coax=coax)
    assert abs(z_radio - 25) > 50 and abs(z_radio.imag) > 10


def test_velocity_factor_override_and_explicit_line():
    coax = parse_coax({"class": "rg-8x", "length_m": 20, "velocity_factor": 0.82})
    assert coax.velocity_factor == 0.82
    explicit = parse_coax(
        {"loss_db_per_100m_at_mhz": {"10": 4.0}, "mass_kg_per_m": 0.04, "length_m": 20}
    )
    assert explicit.velocity_factor is None
    with pytest.raises(InputError) as e:
        feedpoint_impedance([50.0], frequencies_hz=[7e6], coax=explicit)
    assert e.value.field == "kit.coax.velocity_factor"
    with pytest.raises(InputError) as e:
        parse_coax({"class": "rg-58", "length_m": 20, "velocity_factor": 1.2})
    assert e.value.field == "kit.coax.velocity_factor"


def test_swr_at_the_radio_taken_back_through_the_loss():
    # |Γ_in| = |Γ_L| e^(−2αl) (Chipman 1968 ch. 5): 3 dB of matched loss halves |Γ| in power twice;
    # SWR 3 at the load (|Γ| = 0.5) reads |Γ| = 0.5 · 10^(−3/10) = 0.2506 → SWR 1.669 at the radio
    coax = Coax("test line", 3.0 / math.sqrt(3.6) / 0.25, 0.0, 0.04, 25.0, 0.66)
    assert coax.matched_loss_db(3.6e6) == pytest.approx(3.0)
    g_radio = 0.5 * 10 ** (-3 / 10)
    swr_radio = (1 + g_radio) / (1 - g_radio)
    (swr_feed,) = feedpoint_swr([swr_radio], frequencies_hz=[3.6e6], coax=coax)
    assert swr_feed == pytest.approx(3.0, rel=1e-9)
    assert cmath.isclose(swr_radio, 1.669, rel_tol=1e-3)


def test_the_feedline_block_shows_the_velocity_factor_it_uses():
    from fieldkit.rigging.feedline import feedline_json

    block = feedline_json(parse_coax({"class": "rg-8x", "length_m": 20}), frequency_hz=7e6, swr=1.2)
    assert block["velocity_factor"] == VELOCITY_FACTORS["rg-8x"][0]
    given = parse_coax({"class": "rg-8x", "length_m": 20, "velocity_factor": 0.82})
    assert feedline_json(given, frequency_hz=7e6, swr=1.2)["velocity_factor"] == 0.82
    explicit = parse_coax(
        {"loss_db_per_100m_at_mhz": {"10": 4.0}, "mass_kg_per_m": 0.04, "length_m": 20}
    )
    assert "velocity_factor" not in feedline_json(explicit, frequency_hz=7e6, swr=1.2)
