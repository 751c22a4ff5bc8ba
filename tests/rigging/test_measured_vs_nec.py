"""The re-trim from a reading taken at the radio end of the coax (issue 14).

The antenna is NEC-2's (PyNEC): its feed impedance for the wire fieldkit says to hang. The line is
the telegrapher's-equation input impedance written out here (Chipman, *Schaum's Outline of
Transmission Lines*, 1968, ch. 4: Z_in = Z0 (Z_L + Z0 tanh γl)/(Z0 + Z_L tanh γl)), with γ from the
class's matched loss (attenuation) and velocity factor — not fieldkit's own line code.
"""

import math

import numpy as np
import pytest

from fieldkit.constants import SPEED_OF_LIGHT_M_S as C0
from fieldkit.planning import plan
from fieldkit.rigging.feedline import parse_coax
from tests.rigging.cases import spec, two_trees
from tests.rigging.nec_hung import nec_impedance

COAX = {"class": "rg-58", "length_m": 12.5}  # issue 14: ≈ λ/4 at 3.65 MHz


def _site():
    s = spec(supports=two_trees(46, 8.0), channel_mhz=3.65, ground="average")
    s["form"] = "flat"
    s["kit"]["coax"] = dict(COAX)
    return s


def _at_radio(z_feed: complex, f_hz: float) -> complex:
    """What an analyser at the radio end reads: telegrapher's equations, by hand (see the module)."""
    coax = parse_coax(COAX)
    alpha = coax.matched_loss_db(f_hz) / (20 / math.log(10)) / coax.length_m  # dB → Np per metre
    beta = 2 * math.pi * f_hz / (0.66 * C0)  # RG-58 solid PE, v = 0.66 (makers' datasheets)
    t = np.tanh((alpha + 1j * beta) * coax.length_m)
    return complex(50 * (z_feed + 50 * t) / (50 + z_feed * t))


def _retrim(s, **reading):
    s = dict(s)
    s["retrim"] = {"frequency_mhz": 3.65, **reading}
    return plan(s)["options"][0]["retrim"]


def test_radio_end_reading_of_an_antenna_on_channel_says_leave_it():
    # issue 14's case: the antenna already on the channel; read at the radio end at 3.60 MHz
    s = _site()
    opt = plan(s)["options"][0]
    from fieldkit.antenna import model_json

    z = model_json(
        {
            "frequency_mhz": 3.60,
            "ground": "average",
            "wires": [{"points_m": opt["hung_wire_m"], **opt["wire"]}],
            "feed": {"wire": 0, "distance_m": opt["feed_distance_m"]},
        }
    )["results"][0]["impedance_ohm"]
    z_radio = _at_radio(complex(z["r"], z["x"]), 3.60e6)
    r = _retrim(s, at="radio", at_mhz=3.60, r_ohm=z_radio.real, x_ohm=z_radio.imag)
    assert abs(r["change_cm_per_leg"]) < 2.0, r  # 50 kHz of linear dX/df: within 2 cm (computed)
    assert r["measured_at"] == "radio" and "0.23 wavelength" in r["line"]
    assert r["feedpoint_x_ohm"] == pytest.approx(z["x"], abs=0.5)
    # the same numbers taken as the feedpoint's: the old answer, tens of cm off
    wrong = _retrim(s, at_mhz=3.60, r_ohm=z_radio.real, x_ohm=z_radio.imag)
    assert abs(wrong["change_cm_per_leg"]) > 20, wrong


@pytest.mark.slow
def test_radio_end_reading_of_the_nec_antenna_lands_within_1_cm():
    s = _site()
    opt = plan(s)["options"][0]
    f = 3.62e6
    z_nec = nec_impedance(
        opt["hung_wire_m"],
        feed_distance_m=opt["feed_distance_m"],
        frequency_mhz=f / 1e6,
        radius_m=opt["wire"]["diameter_mm"] * 0.5e-3,
        ground=("lossy", 13.0, 0.005),  # average ground (handbook table, REFERENCES.md)
    )
    feed = _retrim(s, at_mhz=f / 1e6, r_ohm=z_nec.real, x_ohm=z_nec.imag)
    z_radio = _at_radio(z_nec, f)
    radio = _retrim(s, at="radio", at_mhz=f / 1e6, r_ohm=z_radio.real, x_ohm=z_radio.imag)
    # issue 14: within 1 cm per leg of the feedpoint answer
    assert radio["change_cm_per_leg"] == pytest.approx(feed["change_cm_per_leg"], abs=1.0)
    assert radio["feedpoint_r_ohm"] == pytest.approx(z_nec.real, abs=0.05)
    # and a dip read at the radio is taken as it is, with the reason beside it
    dip = _retrim(s, at="radio", dip_mhz=3.62)
    assert "needs no moving through the coax" in dip["dip_note"]


def test_a_reading_the_coax_cannot_carry_is_refused():
    # 300 m of RG-58 loses ~ 6 dB at 3.65 MHz: |Γ| at the radio is at most 10^(−12/20) = 0.25,
    # SWR 1.67 (Chipman 1968 ch. 5); an open-looking 500 Ω reading cannot have come through it
    from fieldkit.errors import InputError

    s = _site()
    s["kit"]["coax"] = {"class": "rg-58", "length_m": 300}
    s["retrim"] = {"frequency_mhz": 3.65, "at": "radio", "at_mhz": 3.65, "r_ohm": 500, "x_ohm": 0}
    with pytest.raises(InputError) as e:
        plan(s)
    assert e.value.field == "retrim.r_ohm" and "R < 0" in e.value.detail
