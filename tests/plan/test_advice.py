"""Issue 13 end to end: every case of "What is wrong today", planned from the sites in tests/plan/sites,
gives the right advice or a clear error. Sources are named beside each check."""

import copy
import json
import math
from pathlib import Path

import numpy as np
import pytest

from fieldkit.errors import InputError
from fieldkit.planning import plan
from fieldkit.planning.inputs import parse_plan
from fieldkit.planning.steps import fit_sky
from fieldkit.rigging.clearing import TRUNK_CLEARANCE_M, segment_distance_m
from fieldkit.rigging.heights import MORE_HEIGHT_DB_PER_M, WITHIN_BEST_DB
from fieldkit.rigging.mast import GUY_RADIUS_FRACTION

SITES = Path(__file__).resolve().parent / "sites"


def site(name):
    return json.loads((SITES / f"{name}.json").read_text())


def _axis_points(opt, axis):
    pts = [p for p in opt["height_sweep"] if p.get("swept") == axis]
    return sorted(pts, key=lambda p: p["swept_height_m"])


def _top_slope(pts):
    """dB per metre at the top of a sweep from the parabola through its top three points (computed)."""
    x = [p["swept_height_m"] for p in pts[-3:]]
    y = [p["nvis_mean_gain_dbi"] for p in pts[-3:]]
    if len(x) < 3:
        return (y[-1] - y[-2]) / (x[-1] - x[-2])
    a, b, _ = np.polyfit(x, y, 2)
    return 2 * a * x[-1] + b


def _more_height_only_when_the_slope_says_so(out):
    for opt in out["options"]:
        if "would still help" not in opt["height_choice"]:
            continue
        axes = {p.get("swept") for p in opt["height_sweep"]} - {None}
        slopes = [_top_slope(pts) for a in axes if len(pts := _axis_points(opt, a)) >= 2]
        assert max(slopes) >= MORE_HEIGHT_DB_PER_M - 0.02, (opt["height_choice"], slopes)


@pytest.mark.slow
@pytest.mark.parametrize("name", ["tall-trees-7mhz-poor", "trees-40m-7mhz"])
def test_tall_trees_hang_at_the_nvis_optimum(name):
    out = plan(site(name))
    flat = next(o for o in out["options"] if o["form"] == "flat")
    # common practice (REFERENCES.md): the NVIS optimum over real ground is 0.1–0.25 wavelength
    # (0.1–0.3 by the issue, depending on the ground)
    assert 0.1 <= flat["feedpoint_height_wavelengths"] <= 0.3
    pts = _axis_points(flat, "ropes")
    chosen = flat["rope_heights_m"]["T1"]
    assert pts[0]["swept_height_m"] < chosen < pts[-1]["swept_height_m"]  # inside the sweep
    assert len(pts) >= 10  # the whole range, not two settings
    # the stated cause above: the zenith null near 0.5 wavelength (common practice), not the soil
    assert "half a wavelength" in flat["height_choice"]
    assert "more height would still help" not in flat["height_choice"]
    _more_height_only_when_the_slope_says_so(out)


@pytest.mark.slow
def test_sea_water_raises_to_the_tops_for_the_match():
    out = plan(site("sea-water-8m"))
    opt = out["options"][0]
    assert opt["rope_heights_m"] == {"P1": 8.0, "P2": 8.0}
    pts = _axis_points(opt, "ropes")
    best = max(pts, key=lambda p: p["nvis_mean_gain_dbi"])
    assert opt["nvis"]["mean_gain_dbi"] >= best["nvis_mean_gain_dbi"] - WITHIN_BEST_DB
    assert opt["swr"] < best["swr_estimate"]  # the exact SWR at the tops beats the best figure's
    assert opt["swr"] < 1.5


@pytest.mark.slow
def test_branch_apex_and_ends_are_swept():
    out = plan(site("one-tree-and-mast"))
    vee = next(o for o in out["options"] if o["supports_used"] == ["T1"])
    apex = _axis_points(vee, "apex")
    ends = _axis_points(vee, "ends")
    assert len({p["swept_height_m"] for p in apex}) >= 2 and len(ends) >= 2
    assert ends[0]["swept_height_m"] == pytest.approx(3.0)  # from the minimum end height up


@pytest.mark.slow
@pytest.mark.parametrize("name", ["mast-12m-3.6", "mast-10m-3.6"])
def test_inverted_v_on_the_kit_rope(name):
    s = site(name)
    out = plan(s)
    (opt,) = out["options"]
    rig = opt["rigging"]
    rope = s["kit"]["rope"]["length_m"]
    # the tie-off distance is bounded by the rope in the kit (to within what the exact cut adds)
    assert rig["rope_needed_m"] <= rope + 1.0
    assert len(rig["stakes_m"]) == 2
    mx, my = opt["mast"]["x_m"], opt["mast"]["y_m"]
    for st in rig["stakes_m"]:
        # plane trigonometry: bearing from north, distance in the ground plan, from the mast
        dx, dy = st["x_m"] - mx, st["y_m"] - my
        assert st["distance_m"] == pytest.approx(math.hypot(dx, dy), abs=0.11)
        assert st["bearing_deg"] == pytest.approx(math.degrees(math.atan2(dx, dy)) % 360, abs=1)
    assert min(opt["end_heights_m"]) >= 3.0 - 1e-6
    # with a clearing of 30 m the stakes come in and the ends down
    s["site"]["clearing_radius_m"] = 30.0
    near = plan(s)["options"][0]
    for st in near["rigging"]["stakes_m"]:
        assert math.hypot(st["x_m"], st["y_m"]) <= 30.0 + 0.5
    assert min(near["end_heights_m"]) < min(opt["end_heights_m"])


@pytest.mark.slow
def test_the_mast_keeps_off_the_lone_trees_trunk():
    s = site("one-tree-and-mast")
    out = plan(s)
    opt = next(o for o in out["options"] if o["supports_used"] == ["M1"])
    tree = s["site"]["supports"][0]
    d = math.hypot(opt["mast"]["x_m"] - tree["x_m"], opt["mast"]["y_m"] - tree["y_m"])
    # hand sketch: the guy circle (0.7 × 9 m, common practice) plus the 0.3 m trunk
    assert d >= 0.3 + GUY_RADIUS_FRACTION * 9.0 - 0.01
    centre = np.array([opt["mast"]["x_m"], opt["mast"]["y_m"]])
    for st in opt["rigging"]["stakes_m"]:
        free = segment_distance_m(np.array([0.0, 0.0]), centre, np.array([st["x_m"], st["y_m"]]))
        assert free - 0.3 >= TRUNK_CLEARANCE_M - 1e-6
    # the operator's point is used; on the trunk it is refused by name
    s["site"]["mast_xy_m"] = [-10.0, 4.0]
    got = next(o for o in plan(s)["options"] if o["supports_used"] == ["M1"])
    assert (got["mast"]["x_m"], got["mast"]["y_m"]) == (-10.0, 4.0)
    s["site"]["mast_xy_m"] = [0.1, 0.0]
    with pytest.raises(InputError) as e:
        plan(s)
    assert e.value.field == "site.mast_xy_m"


@pytest.mark.slow
def test_no_channel_works_is_said_first():
    out = plan(site("north-62-january"))
    first = out["warnings"][0]
    assert first.startswith("no channel of the kit works at 21:00–02:00 UTC (6 hours")
    w = out["sky"]["schedule"]["when_none_works"]
    assert f"{w['low_mhz']:.1f}–{w['high_mhz']:.1f} MHz" in first
    # the sky layer's own foF2 at those hours bounds what would work (MUF(0) = foF2, Davies ch. 6)
    assert w["high_mhz"] <= w["fof2_mhz"][0] + 1e-9 and w["low_mhz"] <= 2.0 <= w["high_mhz"]
    # and 7.1 MHz is above that day's NVIS range
    assert any("7.1 MHz is above the NVIS range" in x for x in out["warnings"])


@pytest.mark.parametrize(
    ("change", "field"),
    [
        ({"site": {"lat_deg": 10.0, "lon_deg": 8.2}}, "sky.site.lat_deg"),
        ({"site": {"lat_deg": 46.8, "lon_deg": -60.0}}, "sky.site.lon_deg"),
        ({"date": "2026-06-01"}, "sky.date"),
        ({"power_w": 1000}, "sky.power_w"),
        ({"mode": "cw"}, "sky.mode"),
        ({"site": {"lat_deg": 46.8, "lon_deg": 8.2, "utc_offset_h": 3}}, "sky.site.utc_offset_h"),
    ],
)
def test_a_sky_block_for_another_place_day_or_radio_is_refused(change, field):
    s = site("sky-other-site")
    s["date"] = "2026-12-01"
    s["site"]["utc_offset_h"] = 1
    s["sky"] = {"solar": {"f107": 120}, **change}
    with pytest.raises(InputError) as e:
        parse_plan(s)
    assert e.value.field == field


def test_the_sky_block_inherits_the_plan():
    s = site("sky-other-site")
    s["date"] = "2026-12-01"
    s["sky"] = {"solar": {"f107": 120}}
    spec = parse_plan(s).sky
    assert (spec.lat_deg, spec.lon_deg) == (46.8, 8.2)
    assert spec.day.isoformat() == "2026-12-01" and spec.power_w == 20 and spec.mode.name == "ssb"
    s.pop("date")
    with pytest.raises(InputError) as e:
        parse_plan(s)
    assert e.value.field == "sky.date"
    s["date"] = "2026-12-01"
    s["site"].pop("lat_deg")
    with pytest.raises(InputError) as e:
        parse_plan(s)
    assert e.value.field == "site.lat_deg"


@pytest.mark.slow
def test_the_sky_ranking_uses_the_planned_antenna():
    # 5 W on a wire 2.5 m over average ground: much of the power heats the soil (efficiency ~20 %);
    # the default 0.15-wavelength dipole the sky layer assumes would reach further (ITU-R P.533 link
    # budget with the antenna's own gain at both ends)
    s = site("qrp-4m-poles")
    s["schedule"] = {"start_utc": "16:00", "end_utc": "20:00"}
    s["date"] = "2026-12-01"
    s["sky"] = {"solar": {"f107": 120}}
    out = plan(s)
    opt = out["options"][0]
    default = fit_sky(parse_plan(s)).row(opt["frequency_mhz"] * 1e6)
    assert opt["sky"]["score"] < default["score"] or (
        opt["sky"]["mean_nvis_snr_db"] < default["mean_nvis_snr_db"] - 3.0
    )


def test_coincident_supports_are_refused_by_name():
    with pytest.raises(InputError) as e:
        plan(site("coincident-supports"))
    assert e.value.field == "site.supports[1].x_m" and "one place" in e.value.detail


def test_a_ground_of_empty_space_is_refused_by_name():
    with pytest.raises(InputError) as e:
        plan(site("lossless-unit-ground"))
    assert e.value.field == "site.ground.relative_permittivity"


def test_two_poles_cannot_be_an_inverted_v():
    with pytest.raises(InputError) as e:
        plan(site("two-poles-inverted-v"))
    d = e.value.detail
    assert "kit mast" in d and "tree" in d and "P1 and P2 are poles" in d
    assert "too low" not in d


@pytest.mark.slow
def test_a_low_power_wire_on_short_poles():
    s = site("qrp-4m-poles")
    out = plan(s)
    opt = out["options"][0]
    low = min(p[2] for p in opt["hung_wire_m"])
    assert 2.0 - 1e-6 <= low < 3.0
    assert any("below 3 m" in w for w in opt["warnings"])  # says why that is risky
    ids = {it["id"] for it in opt["safety"]["checklist"]}
    assert "pre-wire-in-reach" in ids and opt["safety"]["low_wire_zones_m"]
    # the default 3 m minimum refuses it, and says how to lower it
    s["site"].pop("min_end_height_m")
    with pytest.raises(InputError) as e:
        plan(s)
    assert "site.min_end_height_m" in e.value.detail
    s["site"]["min_end_height_m"] = 1.0
    with pytest.raises(InputError) as e:
        plan(s)
    assert e.value.field == "site.min_end_height_m"


@pytest.mark.slow
def test_a_channel_above_the_nvis_range_is_warned():
    s = site("channel-29mhz")
    out = plan(copy.deepcopy(s))
    top = out["sky"]["nvis_ceiling"]["frequency_mhz"]
    words = next(w for w in out["warnings"] if "29 MHz is above the NVIS range" in w)
    assert f"{top:.1f} MHz" in words
    s.pop("sky")
    s.pop("schedule")
    out = plan(s)
    assert any("29 MHz is above the frequencies NVIS normally uses" in w for w in out["warnings"])


def test_new_site_fields_are_checked():
    s = site("one-tree-and-mast")
    for key, value, field in [
        ("clearing_radius_m", 0, "site.clearing_radius_m"),
        ("mast_xy_m", [1, 2, 3], "site.mast_xy_m"),
        ("mast_xy_m", ["a", 2], "site.mast_xy_m[0]"),
    ]:
        t = copy.deepcopy(s)
        t["site"][key] = value
        with pytest.raises(InputError) as e:
            parse_plan(t)
        assert e.value.field == field
    t = copy.deepcopy(s)
    t["site"]["supports"][0]["trunk_radius_m"] = -1
    with pytest.raises(InputError) as e:
        parse_plan(t)
    assert e.value.field == "site.supports[0].trunk_radius_m"
    t["site"]["supports"][0]["trunk_radius_m"] = 2.0
    assert parse_plan(t).limits.trunks[0].radius_m == 2.0


@pytest.mark.slow
def test_an_inverted_v_apex_is_swept_again_when_its_ends_press_against_it():
    # found by the lead: the apex was swept once with the ends at 3 m and stopped at 5.9 m of a 9 m
    # mast; the ends then rose until the least drop (2 m under the apex) held them, and the advice
    # blamed that rule ("higher ends would still help") while the mast had 3 m to spare. Common
    # practice: the drop rule is the rigger's own, not a limit of the site; here the kit's rope is.
    out = plan(site("mast-9m-60m-sea-water"))
    # the channel swept on this layout (5.3715 MHz borrows its heights, within a few percent)
    vee = next(
        o
        for o in out["options"]
        if o["form"] == "inverted-v" and o["mast"] and o["frequency_mhz"] == 5.357
    )
    words = vee["height_choice"]
    assert "below the apex" not in words, words
    if "would still help" in words:
        assert "rope" in words, words  # the limit named is the one that holds
    apex = vee["rope_heights_m"]["M1"]
    assert min(vee["end_heights_m"]) <= apex - 2.0 + 0.05  # the V keeps its drop
    axes = [p.get("swept") for p in vee["height_sweep"] if p.get("swept")]
    assert axes.count("apex") >= 3 and axes.count("ends") >= 2  # one pass of each axis shown
    assert axes == sorted(axes, key=["apex", "ends"].index)  # apex points first, then the ends
