"""Measuring helpers, AWG sizes, coax loss and the mast check, against named sources."""

import math

import pytest

from fieldkit.errors import InputError
from fieldkit.rigging.feedline import (
    DB_PER_100FT_TO_DB_PER_100M,
    feedline_json,
    mismatch_loss_db,
    parse_coax,
    total_loss_db,
)
from fieldkit.rigging.mast import Mast, mast_json, parse_masts
from fieldkit.rigging.supports import (
    clinometer_height_m,
    halyard_rope_m,
    pace_distance_m,
    parse_supports,
)
from fieldkit.rigging.wire import awg_diameter_m, parse_wire


@pytest.mark.parametrize(("gauge", "mm"), [(12, 2.053), (14, 1.628), (18, 1.024), (36, 0.127)])
def test_awg_diameters(gauge, mm):
    assert awg_diameter_m(gauge) * 1e3 == pytest.approx(mm, abs=5e-4)  # ASTM B258 (REFERENCES.md)


def test_awg_input_and_mass():
    w = parse_wire({"awg": 14, "conductor": "copper"})
    assert w.diameter_m == pytest.approx(1.628e-3, abs=1e-6)  # ASTM B258
    # bare copper mass = area x 8.89 g/cm^3 (REFERENCES.md density, from memory)
    assert w.mass_kg_per_m == pytest.approx(math.pi * (0.814e-3) ** 2 * 8890, rel=1e-3)


def test_clinometer_trigonometry():
    # right triangle: 20 m from the trunk, 30 degrees, eye 1.6 m -> 20 tan 30 + 1.6 = 13.147 m (computed)
    assert clinometer_height_m(angle_deg=30, distance_m=20, eye_height_m=1.6) == pytest.approx(
        13.147, abs=1e-3
    )
    # 45 degrees: height above eye equals the distance (isosceles right triangle)
    assert clinometer_height_m(angle_deg=45, distance_m=12, eye_height_m=1.5) == pytest.approx(13.5)
    with pytest.raises(InputError):
        clinometer_height_m(angle_deg=95, distance_m=12, eye_height_m=1.5)


def test_paces_and_halyard():
    assert pace_distance_m(paces=40, pace_length_m=0.75) == pytest.approx(30.0)
    # up, down, span rope, tie-off, plus 10 % slack (common practice)
    assert halyard_rope_m(rope_height_m=12, span_rope_m=3) == pytest.approx((24 + 3 + 1.5) * 1.1)


@pytest.mark.parametrize(("swr", "loss"), [(2.0, 0.512), (3.0, 1.249)])
def test_mismatch_loss(swr, loss):
    assert mismatch_loss_db(swr) == pytest.approx(loss, abs=5e-4)  # REFERENCES.md, handbook formula


@pytest.mark.parametrize(("swr", "loss"), [(2.0, 1.196), (3.0, 1.504), (1.0, 1.0)])
def test_total_line_loss_worked_values(swr, loss):
    # Chipman, Schaum's Transmission Lines (1968); worked values REFERENCES.md (ML = 1 dB)
    assert total_loss_db(matched_loss_db=1.0, swr=swr) == pytest.approx(loss, abs=5e-4)


def test_coax_class_reproduces_datasheet_points():
    # REFERENCES.md: RG-58 class ~0.35 / ~1.2 dB/100 ft at 1 / 10 MHz (nominal, from memory)
    c = parse_coax({"class": "rg-58", "length_m": 100})
    assert c.matched_loss_db(1e6) == pytest.approx(0.35 * DB_PER_100FT_TO_DB_PER_100M, rel=1e-9)
    assert c.matched_loss_db(10e6) == pytest.approx(1.2 * DB_PER_100FT_TO_DB_PER_100M, rel=1e-9)
    # between the points the loss rises monotonically
    assert c.matched_loss_db(1e6) < c.matched_loss_db(3.6e6) < c.matched_loss_db(10e6)
    lmr = parse_coax({"class": "LMR-400", "length_m": 100})
    assert lmr.matched_loss_db(7e6) < c.matched_loss_db(7e6)
    block = feedline_json(c, frequency_hz=3.6e6, swr=2.0)
    assert block["total_loss_db"] > block["matched_loss_db"]


def test_explicit_coax():
    c = parse_coax(
        {"loss_db_per_100m_at_mhz": {"1": 1.0, "10": 3.5}, "mass_kg_per_m": 0.05, "length_m": 50}
    )
    assert c.matched_loss_db(10e6) == pytest.approx(1.75)
    with pytest.raises(InputError) as e:
        parse_coax({"loss_db_per_100m_at_mhz": {"1": 1.0}, "length_m": 50})
    assert e.value.field == "kit.coax.mass_kg_per_m"


def test_mast_refuses_overload():
    m = Mast("M1", 9.0, 2.0, 3)
    ok = mast_json(m, apex_height_m=9.0, top_load_n=15.0)
    assert ok["ok"] and ok["guys"] == 3 and ok["guy_radius_m"] == pytest.approx(6.3)
    bad = mast_json(m, apex_height_m=9.0, top_load_n=25.0)
    assert not bad["ok"] and "exceeds" in bad["why"]


@pytest.mark.parametrize(
    ("value", "field"),
    [
        ([{"id": "T1", "height_m": 10, "x_m": 0}], "site.supports[0].y_m"),
        ([{"id": "T1", "height_m": -1, "x_m": 0, "y_m": 0}], "site.supports[0].height_m"),
        (
            [{"id": "T1", "height_m": 9, "x_m": 0, "y_m": 0, "unsafe": "yes"}],
            "site.supports[0].unsafe",
        ),
        (
            [
                {"id": "T1", "height_m": 9, "x_m": 0, "y_m": 0},
                {"id": "T1", "height_m": 9, "x_m": 5, "y_m": 0},
            ],
            "site.supports[1].id",
        ),
        ([{"id": "T1", "height_m": 9, "x_m": 0, "y_m": 0, "colour": 1}], "site.supports[0].colour"),
    ],
)
def test_support_validation_names_the_field(value, field):
    with pytest.raises(InputError) as e:
        parse_supports(value)
    assert e.value.field == field


def test_mast_and_wire_validation():
    with pytest.raises(InputError) as e:
        parse_masts([{"id": "M1", "height_m": 9}])
    assert e.value.field == "kit.masts[0].top_load_kg"
    with pytest.raises(InputError) as e:
        parse_wire({"conductor": "copper"})
    assert e.value.field == "kit.wire.diameter_mm"
    with pytest.raises(InputError) as e:
        parse_wire({"diameter_mm": 1.6, "conductor": "gold"})
    assert e.value.field == "kit.wire.conductor"
