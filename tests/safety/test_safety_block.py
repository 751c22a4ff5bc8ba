"""The option's safety block end to end on the engine: contract, consistency with the real near field,
verdicts on hand-made sketches and bad input."""

import copy

import numpy as np
import pytest

from fieldkit.antenna import Antenna, Feed, Ground, Wire, solve
from fieldkit.errors import InputError
from fieldkit.safety import safety_block
from fieldkit.safety.exposure import exposure_ratio
from fieldkit.safety.limits import exposure_limit

PERFECT = Ground(kind="perfect")
SITE = {
    "ground": "perfect",
    "supports": [
        {"id": "T1", "kind": "tree", "height_m": 13.5, "x_m": -24, "y_m": 6},
        {"id": "T2", "kind": "tree", "height_m": 10.0, "x_m": 21, "y_m": -3},
        {"id": "T3", "kind": "tree", "height_m": 12.0, "x_m": 4, "y_m": 30, "unsafe": True},
    ],
    "hazards": [{"kind": "power_line", "points_m": [[-200, -38], [200, -38]], "height_m": 8.5}],
}
HALF = 13.5
APEX = 9.0
END_Z = 2.5
# inverted-V on a 9 m centre mast at (0, 0), ends at 2.5 m toward stakes (a hand-made sketch)
INV_V = {
    "form": "inverted-v",
    "frequency_mhz": 3.79,
    "supports_used": ["M1"],
    "rope_heights_m": {"M1": APEX},
    "hung_wire_m": [[-HALF, 0, END_Z], [0, 0, APEX], [HALF, 0, END_Z]],
    "feed_distance_m": float(np.hypot(HALF, APEX - END_Z)),
    "wire": {"diameter_mm": 1.6, "conductor": "copper"},
    "feedpoint_height_m": APEX,
    "mast": {"id": "M1", "height_m": 9.0, "guys": 3},
    "swr": 1.4,
}
RADIO = {"power_w": 400, "mode": "data"}
CONTRACT = {
    "limit_set",
    "keep_out_m",
    "keep_out_outline_m",
    "min_end_height_m",
    "clearances",
    "raise_ok",
    "checklist",
    "cautions",
}


def _fields(option, power_w, ground=PERFECT):
    w = Wire(points_m=np.array(option["hung_wire_m"], float), radius_m=0.8e-3, conductor="copper")
    sol = solve(
        Antenna(wires=(w,), feed=Feed(wire=0, distance_m=option["feed_distance_m"])),
        frequencies_hz=[option["frequency_mhz"] * 1e6],
        ground=ground,
        power_w=power_w,
    )[0]
    lim = exposure_limit("fcc-uncontrolled", frequency_hz=option["frequency_mhz"] * 1e6)

    def ratio(points, factor=1.0):
        e, h = sol.near_field(np.asarray(points, float))
        return exposure_ratio(
            e, h, e_limit=lim.e_v_per_m, h_limit=lim.h_a_per_m, averaging_factor=factor
        )

    return ratio


@pytest.fixture(scope="module")
def block():
    return safety_block(option=INV_V, site=SITE, radio=RADIO, ground=PERFECT)


def test_contract_fields(block):
    assert set(block) >= CONTRACT
    assert block["limit_set"] == "fcc-uncontrolled"
    assert block["keep_out_m"] > 0 and len(block["keep_out_outline_m"]) >= 3
    assert all(len(p) == 2 for p in block["keep_out_outline_m"])
    ids = [it["id"] for it in block["checklist"]]
    assert len(ids) == len(set(ids))
    assert {
        "pre-power-line-0",
        "pre-unsafe-support-t3",
        "pre-mast-wind-m1",
        "after-swr-check",
    } <= set(ids)
    assert all(
        it["stage"] in ("pre-raise", "raise", "after-raise", "tear-down")
        for it in block["checklist"]
    )
    assert any("planning aid" in c for c in block["cautions"])
    assert block["raise_ok"] is True and block["reasons"] == []
    # the keep-out item carries the numbers: distance, power and mode
    keep = [it for it in block["checklist"] if it["id"].startswith("pre-keep-out-end")]
    assert keep and all(
        "400 W data" in it["text"] and " ft) from the " in it["text"] for it in keep
    )


def test_same_input_same_ids(block):
    again = safety_block(option=copy.deepcopy(INV_V), site=SITE, radio=RADIO, ground=PERFECT)
    assert [it["id"] for it in again["checklist"]] == [it["id"] for it in block["checklist"]]


def _bracket(zones, ratio, factor=1.0):
    """Per boundary point: the worst ratio over the person's heights 15 cm inside and 15 cm outside."""
    heights = (0.5, 1.0, 1.8)
    inner, outer = [], []
    for poly in zones:
        for x, y in poly[1:-1]:  # boundary points; the first and last sit on the wire line
            # outward: away from the nearest point of the wire's plan line (the x axis, |x| ≤ HALF)
            away = np.array([x - np.clip(x, -HALF, HALF), y])
            off = 0.15 * away / np.linalg.norm(away)
            inner += [[x - off[0], y - off[1], z] for z in heights]
            outer += [[x + off[0], y + off[1], z] for z in heights]
    r_in = ratio(inner, factor).reshape(-1, len(heights)).max(axis=1)
    r_out = ratio(outer, factor).reshape(-1, len(heights)).max(axis=1)
    return r_in, r_out


def test_outline_agrees_with_the_real_near_field(block):
    """Just inside the outline the field is over the limit at some person height, just outside under it
    at all of them (the engine's near field, evaluated directly)."""
    ratio = _fields(INV_V, RADIO["power_w"])
    zones = block["exposure"]["keep_out_zones_m"]
    assert len(zones) == 2  # one around each low end
    r_in, r_out = _bracket(zones, ratio)  # data mode: duty 100 %, transmitting throughout
    assert len(r_in) >= 10
    assert (r_in > 1.0).all() and (r_out < 1.0).all()


def test_power_for_no_zone(block):
    p0 = block["exposure"]["power_for_no_zone_w"]
    assert 0 < p0 < RADIO["power_w"]
    below = safety_block(
        option=INV_V, site=SITE, radio={"power_w": 0.97 * p0, "mode": "data"}, ground=PERFECT
    )
    assert below["keep_out_m"] == 0 and below["keep_out_outline_m"] == []
    above = safety_block(
        option=INV_V, site=SITE, radio={"power_w": 1.05 * p0, "mode": "data"}, ground=PERFECT
    )
    assert above["keep_out_m"] > 0
    # SSB at 20 % duty: the same zone needs five times the power (OET 65 Suppl. B duty factors)
    ssb = safety_block(
        option=INV_V, site=SITE, radio={"power_w": 400, "mode": "ssb"}, ground=PERFECT
    )
    assert ssb["exposure"]["power_for_no_zone_w"] == pytest.approx(5 * p0, rel=1e-3)


def test_min_end_height_clears_the_ends(block):
    """Raise the ends to the minimum end height (+ 5 cm): nobody under an end is over the limit."""
    h = block["min_end_height_m"]
    assert h > END_Z
    raised = copy.deepcopy(INV_V)
    for p in (raised["hung_wire_m"][0], raised["hung_wire_m"][2]):
        p[2] = h + 0.05
    raised["feed_distance_m"] = float(np.hypot(HALF, APEX - h - 0.05))
    ratio = _fields(raised, RADIO["power_w"])
    under = [[sx * HALF, 0.0, z] for sx in (-1, 1) for z in (0.5, 1.0, 1.8)]
    assert ratio(under).max() < 1.0


def test_oet65_estimate_shown_beside(block):
    oet = block["exposure"]["oet65"]
    assert oet["ground_factor"] == 2.56 and "crude" in oet["note"]
    assert oet["distance_m"] > 0


def _flat(y_t2: float, unsafe_t1: bool = False):
    site = copy.deepcopy(SITE)
    site["supports"][1]["y_m"] = y_t2
    site["supports"][0]["unsafe"] = unsafe_t1
    option = {
        "form": "flat",
        "frequency_mhz": 7.055,
        "supports_used": ["T1", "T2"],
        "rope_heights_m": {"T1": 10.0, "T2": 10.0},
        "hung_wire_m": [[-10.0, y_t2, 10.0], [0.0, y_t2, 9.4], [10.0, y_t2, 10.0]],
        "feed_distance_m": float(np.hypot(10, 0.6)),
        "wire": {"diameter_mm": 1.6, "conductor": "copper"},
        "feedpoint_height_m": 9.4,
    }
    site["supports"][0]["x_m"], site["supports"][0]["y_m"] = -11.0, y_t2
    site["supports"][1]["x_m"] = 11.0
    return option, site


def test_support_at_the_limit_is_ok_and_just_inside_is_not():
    # T2 (10 m) exactly 13.048 m from the line (fall rule 10 m + 10 ft): clear; 5 cm closer: do not raise
    limit_y = -38.0 + 10.0 + 3.048
    option, site = _flat(limit_y)
    ok = safety_block(
        option=option, site=site, radio={"power_w": 100, "mode": "ssb"}, ground=PERFECT
    )
    t2 = next(c for c in ok["clearances"] if c["object"] == "support T2")
    assert t2["ok"] and t2["distance_m"] == pytest.approx(13.05, abs=0.01)
    option, site = _flat(limit_y - 0.05)
    bad = safety_block(
        option=option, site=site, radio={"power_w": 100, "mode": "ssb"}, ground=PERFECT
    )
    assert bad["raise_ok"] is False
    assert any("support T2" in r for r in bad["reasons"])
    item = next(it for it in bad["checklist"] if it["id"] == "pre-power-line-0")
    assert "do not raise" in item["text"]


def test_unsafe_support_in_use_blocks_raising():
    option, site = _flat(0.0, unsafe_t1=True)
    out = safety_block(
        option=option, site=site, radio={"power_w": 100, "mode": "ssb"}, ground=PERFECT
    )
    assert out["raise_ok"] is False and any("T1" in r and "unsafe" in r for r in out["reasons"])


@pytest.mark.parametrize(
    ("kwargs", "field"),
    [
        ({"radio": {"power_w": -100, "mode": "ssb"}}, "radio.power_w"),
        ({"radio": {"power_w": 100, "mode": "morse"}}, "radio.mode"),
        ({"limit_set": "fcc-whatever"}, "limit_set"),
        (
            {
                "site": {
                    **SITE,
                    "hazards": [{"kind": "power_line", "points_m": [[0, -38]], "height_m": 8}],
                }
            },
            "site.hazards[0].points_m",
        ),
        (
            {
                "site": {
                    **SITE,
                    "hazards": [{"kind": "power_line", "points_m": [[0, -38], [9, -38]]}],
                }
            },
            "site.hazards[0].height_m",
        ),
        ({"option": {**INV_V, "supports_used": ["T9"]}}, "option.supports_used[0]"),
        ({"option": {**INV_V, "hung_wire_m": [[0, 0, 5]]}}, "option.hung_wire_m"),
        ({"option": {**INV_V, "hung_wire_m": [[0, 0, 5], [1, 0, -1]]}}, "option.hung_wire_m[1][2]"),
        ({"option": {**INV_V, "feed_distance_m": 99.0}}, "option.feed_distance_m"),
        ({"option": {**INV_V, "frequency_mhz": "3.8"}}, "option.frequency_mhz"),
        (
            {"option": {**INV_V, "frequency_mhz": 500.0}},
            "option.frequency_mhz",
        ),  # beyond the tables
        (
            {"option": {**INV_V, "wire": {"diameter_mm": 1.6, "conductor": "gold"}}},
            "option.wire.conductor",
        ),
        ({"option": {**INV_V, "wire": None}}, "option.wire"),
        ({"option": {**INV_V, "mast": {"id": "M1", "x_m": "a"}}}, "option.mast.x_m"),
        (
            {"site": {**SITE, "supports": [{**SITE["supports"][0], "unsafe": "yes"}]}},
            "site.supports[0].unsafe",
        ),
    ],
)
def test_bad_input_names_the_field(kwargs, field):
    args = {"option": INV_V, "site": SITE, "radio": RADIO, "ground": PERFECT, **kwargs}
    with pytest.raises(InputError) as err:
        safety_block(**args)
    assert err.value.field == field


@pytest.mark.slow
def test_outline_over_average_ground_agrees_with_the_real_near_field():
    """Over lossy (average) ground — the Sommerfeld near field — the same bracketing holds."""
    average = Ground(kind="lossy", relative_permittivity=13.0, conductivity_s_m=0.005)
    out = safety_block(option=INV_V, site=SITE, radio=RADIO, ground=average)
    assert out["keep_out_m"] > 0
    ratio = _fields(INV_V, RADIO["power_w"], ground=average)
    r_in, r_out = _bracket(out["exposure"]["keep_out_zones_m"], ratio)
    assert len(r_in) >= 4
    assert (r_in > 1.0).all() and (r_out < 1.0).all()


def test_given_solution_gives_the_same_block(block):
    # the caller's solution at another power: fields are rescaled by √(P/P_input)
    w = Wire(points_m=np.array(INV_V["hung_wire_m"], float), radius_m=0.8e-3, conductor="copper")
    sol = solve(
        Antenna(wires=(w,), feed=Feed(wire=0, distance_m=INV_V["feed_distance_m"])),
        frequencies_hz=[INV_V["frequency_mhz"] * 1e6],
        ground=PERFECT,
        power_w=1.0,
    )[0]
    again = safety_block(option=INV_V, site=SITE, radio=RADIO, ground=PERFECT, solution=sol)
    assert again["keep_out_m"] == pytest.approx(block["keep_out_m"], abs=0.01)
    assert again["min_end_height_m"] == pytest.approx(block["min_end_height_m"], abs=0.01)
    with pytest.raises(InputError) as err:
        safety_block(
            option={**INV_V, "frequency_mhz": 7.1},
            site=SITE,
            radio=RADIO,
            ground=PERFECT,
            solution=sol,
        )
    assert err.value.field == "solution"


def test_path_through_the_zone_and_low_wire_items(block):
    # a footpath crossing under the west end (inside its zone) gets its own item
    site = {
        **SITE,
        "hazards": [*SITE["hazards"], {"kind": "path", "points_m": [[-HALF, -20], [-HALF, 20]]}],
    }
    out = safety_block(option=INV_V, site=site, radio=RADIO, ground=PERFECT)
    ids = {it["id"] for it in out["checklist"]}
    assert "pre-path-in-zone-1" in ids
    # ... but not a path 10 m away from every zone
    far = {
        **SITE,
        "hazards": [*SITE["hazards"], {"kind": "path", "points_m": [[-40, 15], [40, 15]]}],
    }
    assert "pre-path-in-zone-1" not in {
        it["id"]
        for it in safety_block(option=INV_V, site=far, radio=RADIO, ground=PERFECT)["checklist"]
    }
    # ends at 2.0 m are within reach of a standing person (reach ~2.4 m, common practice)
    low = copy.deepcopy(INV_V)
    low["hung_wire_m"][0][2] = low["hung_wire_m"][2][2] = 2.0
    low["feed_distance_m"] = float(np.hypot(HALF, APEX - 2.0))
    out = safety_block(option=low, site=SITE, radio={"power_w": 10, "mode": "ssb"}, ground=PERFECT)
    item = next(it for it in out["checklist"] if it["id"] == "pre-wire-in-reach")
    assert "2.0 m" in item["text"] and item["required"]


@pytest.mark.parametrize(
    ("limit_set", "stricter"), [("icnirp-public", True), ("fcc-controlled", False)]
)
def test_limit_sets_order(block, limit_set, stricter):
    # ICNIRP public at 3.79 MHz: 300/f^0.7 = 118 V/m < FCC uncontrolled 824/f = 217 V/m (tables)
    # FCC controlled 1842/f = 486 V/m > uncontrolled
    out = safety_block(option=INV_V, site=SITE, radio=RADIO, ground=PERFECT, limit_set=limit_set)
    assert out["limit_set"] == limit_set
    if stricter:
        assert out["keep_out_m"] > block["keep_out_m"]
        assert out["exposure"]["power_for_no_zone_w"] < block["exposure"]["power_for_no_zone_w"]
    else:
        assert out["exposure"]["power_for_no_zone_w"] > block["exposure"]["power_for_no_zone_w"]


@pytest.mark.parametrize("power_w", [20.0, 60.0, 200.0, 800.0])
def test_power_scaling_is_consistent(block, power_w):
    # fields ∝ √P, so the power at which no zone is left does not depend on the power asked about,
    # and the zone grows with power (ratio ∝ P)
    out = safety_block(
        option=INV_V, site=SITE, radio={"power_w": power_w, "mode": "data"}, ground=PERFECT
    )
    p0 = block["exposure"]["power_for_no_zone_w"]
    assert out["exposure"]["power_for_no_zone_w"] == pytest.approx(p0, rel=0.01)
    assert (out["keep_out_m"] > 0) == (power_w > p0)
    if power_w > RADIO["power_w"]:
        assert out["keep_out_m"] >= block["keep_out_m"]
    else:
        assert out["keep_out_m"] <= block["keep_out_m"]
