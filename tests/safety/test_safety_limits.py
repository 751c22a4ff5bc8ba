"""Exposure limit tables, duty factors and the OET 65 estimate against their published sources."""

import math

import pytest

from fieldkit.errors import InputError
from fieldkit.safety.duty import parse_radio
from fieldkit.safety.limits import exposure_limit
from fieldkit.safety.oet65 import oet65_estimate, power_density_w_m2


@pytest.mark.parametrize(
    ("limit_set", "f_mhz", "e", "h", "s_mw_cm2"),
    [
        # 47 CFR §1.1310 Table 1 (B); check values REFERENCES.md: 7 MHz 117.7 V/m, 0.313 A/m
        ("fcc-uncontrolled", 7.0, 117.7, 0.313, 180 / 49),
        # 47 CFR §1.1310 Table 1 (B); REFERENCES.md: 3.5 MHz 235 V/m
        ("fcc-uncontrolled", 3.5, 235.4, 0.6257, 180 / 12.25),
        # 47 CFR §1.1310 Table 1 (A): 1842/f, 4.89/f, 900/f² (computed at 3.5 MHz)
        ("fcc-controlled", 3.5, 526.3, 1.397, 73.47),
        ("fcc-controlled", 7.0, 263.1, 0.6986, 18.37),
        # Table 1 (A) 0.3–3 MHz row: flat 614 V/m, 1.63 A/m, 100 mW/cm²
        ("fcc-controlled", 2.0, 614.0, 1.63, 100.0),
        # Table 1 (B) 0.3–1.34 MHz row
        ("fcc-uncontrolled", 1.0, 614.0, 1.63, 100.0),
    ],
)
def test_fcc_table(limit_set, f_mhz, e, h, s_mw_cm2):
    lim = exposure_limit(limit_set, frequency_hz=f_mhz * 1e6)
    assert lim.e_v_per_m == pytest.approx(e, rel=1e-3)
    assert lim.h_a_per_m == pytest.approx(h, rel=2e-3)
    assert lim.s_w_per_m2 == pytest.approx(s_mw_cm2 * 10, rel=1e-3)  # 1 mW/cm² = 10 W/m²
    assert lim.s_from_table


def test_fcc_averaging_times():
    # 47 CFR §1.1310 Table 1: controlled averaged over 6 min, uncontrolled over 30 min
    assert exposure_limit("fcc-controlled", frequency_hz=5e6).averaging_s == 360
    assert exposure_limit("fcc-uncontrolled", frequency_hz=5e6).averaging_s == 1800


@pytest.mark.parametrize(
    ("limit_set", "e", "h"),
    [
        # ICNIRP 2020 Table 5 (from memory): public 300/f^0.7 V/m, 2.2/f A/m; computed at 5 MHz
        ("icnirp-public", 97.24, 0.44),
        # occupational 660/f^0.7 V/m, 4.9/f A/m
        ("icnirp-occupational", 213.9, 0.98),
    ],
)
def test_icnirp_at_5_mhz(limit_set, e, h):
    lim = exposure_limit(limit_set, frequency_hz=5e6)
    assert lim.e_v_per_m == pytest.approx(e, rel=1e-3)
    assert lim.h_a_per_m == pytest.approx(h, rel=1e-3)
    assert lim.averaging_s == 1800  # ICNIRP 2020: whole body, 30 min
    # no S below 30 MHz in ICNIRP Table 5: the plane-wave equivalent E²/377 is used
    assert not lim.s_from_table
    assert lim.s_w_per_m2 == pytest.approx(e**2 / 376.73, rel=1e-3)


def test_fcc_plane_wave_density_matches_e_squared_over_377():
    # 47 CFR §1.1310 Table 1 note: S is the plane-wave equivalent; 824²/377 ≈ 1800 W/m² · f⁻² (computed)
    lim = exposure_limit("fcc-uncontrolled", frequency_hz=4e6)
    assert lim.s_w_per_m2 == pytest.approx(lim.e_v_per_m**2 / 376.73, rel=2e-3)


def test_limits_bad_input():
    with pytest.raises(InputError) as err:
        exposure_limit("osha-whatever", frequency_hz=5e6)
    assert err.value.field == "limit_set"
    with pytest.raises(InputError) as err:
        exposure_limit("fcc-uncontrolled", frequency_hz=0.1e6)
    assert err.value.field == "frequency_mhz"
    assert "outside" in err.value.detail


@pytest.mark.parametrize(("mode", "duty"), [("ssb", 0.2), ("cw", 0.4), ("data", 1.0), ("fm", 1.0)])
def test_duty_factors(mode, duty):
    # OET Bulletin 65 Supplement B, Table 1 (from memory): SSB 20 %, CW 40 %, FM/data 100 %
    r = parse_radio({"power_w": 100, "mode": mode, "transmit_fraction": 0.5})
    assert r.duty_factor == duty
    assert r.average_power_w == pytest.approx(100 * duty * 0.5)


def test_radio_default_is_worst_case():
    r = parse_radio({"power_w": 100, "mode": "ssb"})
    assert r.transmit_fraction == 1.0
    assert r.to_json()["average_power_w"] == 20.0


@pytest.mark.parametrize(
    ("radio", "field"),
    [
        ({"power_w": -5, "mode": "ssb"}, "radio.power_w"),
        ({"power_w": 0, "mode": "ssb"}, "radio.power_w"),
        ({"power_w": "100", "mode": "ssb"}, "radio.power_w"),
        ({"power_w": 100, "mode": "psk-ish"}, "radio.mode"),
        ({"mode": "ssb"}, "radio.power_w"),
        ({"power_w": 100}, "radio.mode"),
        ({"power_w": 100, "mode": "ssb", "transmit_fraction": 1.5}, "radio.transmit_fraction"),
        ({"power_w": 100, "mode": "ssb", "tx": 1}, "radio.tx"),
        ([100, "ssb"], "radio"),
    ],
)
def test_radio_bad_input(radio, field):
    with pytest.raises(InputError) as err:
        parse_radio(radio)
    assert err.value.field == field


def test_oet65_against_hand_value():
    # OET Bulletin 65 (1997) eq. (10): S = 0.64·EIRP/(π R²), solved for R by hand:
    # 100 W SSB (20 %), dipole 2.15 dBi → EIRP 32.82 W; FCC uncontrolled 7 MHz S = 180/49 mW/cm² = 36.73 W/m²
    # R = sqrt(0.64 · 32.82 / (π · 36.73)) = 0.4266 m (computed)
    est = oet65_estimate(average_power_w=20.0, s_limit_w_m2=36.735)
    assert est.eirp_w == pytest.approx(32.82, rel=1e-3)
    assert est.distance_m == pytest.approx(0.4266, rel=2e-3)
    assert power_density_w_m2(eirp_w=est.eirp_w, distance_m=est.distance_m) == pytest.approx(36.735)


def test_oet65_1500w_cw_example():
    # OET 65 eq. (10) by hand: 1500 W CW (40 %) = 600 W, gain 0 dBi, S = 146.9 W/m² (3.5 MHz uncontrolled)
    # R = sqrt(0.64·600/(π·146.9)) = 0.9121 m (computed)
    est = oet65_estimate(average_power_w=600.0, s_limit_w_m2=1800 / 12.25, gain_dbi=0.0)
    assert est.distance_m == pytest.approx(math.sqrt(0.64 * 600 / (math.pi * 146.94)), rel=1e-3)
    assert est.distance_m == pytest.approx(0.9121, rel=2e-3)
