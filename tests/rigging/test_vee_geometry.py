"""Inverted-V and span geometry against hand-made sketches of sites: the mast clear of the trunks, legs
and ropes a stated clearance off every trunk, stakes inside the clearing and within the kit's rope,
the stake bearings and distances, and the refusals a sketch makes obvious."""

import json
import math
from pathlib import Path

import numpy as np
import pytest

from fieldkit.errors import InputError
from fieldkit.planning.inputs import parse_plan
from fieldkit.rigging.clearing import (
    TREE_TRUNK_RADIUS_M,
    TRUNK_CLEARANCE_M,
    SiteLimits,
    mast_position,
    segment_distance_m,
)
from fieldkit.rigging.layouts import check_positions, site_layouts, stakes
from fieldkit.rigging.mast import GUY_RADIUS_FRACTION, Mast
from fieldkit.rigging.supports import Support
from tests.rigging.cases import spec
from tests.rigging.sweeps import swept

SITES = Path(__file__).resolve().parents[1] / "plan" / "sites"
M9 = {"id": "M1", "height_m": 9.0, "top_load_kg": 3.0, "guys": 3}


def _site(name):
    return json.loads((SITES / f"{name}.json").read_text())


def _tree(i, x, y, h=12.0):
    return {"id": i, "kind": "tree", "height_m": h, "x_m": x, "y_m": y}


def _footprint(hung):
    """Ground-plan segments centre → stake of both legs (legs and ropes run along them)."""
    p = np.asarray(hung.points_m)
    k = int(
        np.argmin(
            np.abs(
                np.r_[0, np.cumsum(np.linalg.norm(np.diff(p, axis=0), axis=1))]
                - hung.feed_distance_m
            )
        )
    )
    centre = p[k, :2]
    return centre, [(centre, np.array([s.x_m, s.y_m])) for s in stakes(hung)]


def _clearances(hung, trunks):
    centre, segs = _footprint(hung)
    return {t.id: min(segment_distance_m(t.xy, a, b) - t.radius_m for a, b in segs) for t in trunks}


def test_mast_beside_a_lone_tree_clears_its_trunk():
    # sketch: one tree at the origin, 0.3 m trunk; a 9 m mast's guys reach 0.7 × 9 = 6.3 m out
    # (common practice), so the mast stands at least 6.6 m from the trunk's centre, not on it
    tree = Support("T1", "tree", 14.0, 0.0, 0.0)
    limits = SiteLimits.for_supports([tree])
    p, words = mast_position(Mast("M1", 9.0, 2.0, 3), [tree], limits)
    need = TREE_TRUNK_RADIUS_M + GUY_RADIUS_FRACTION * 9.0
    assert math.hypot(*p) >= need - 1e-9
    assert math.hypot(*p) <= need + 0.5 + 1e-9  # and as near the middle as the guys allow
    assert "T1" in words


@pytest.mark.slow
def test_lone_tree_and_mast_legs_clear_the_trunk():
    s = swept(_site("one-tree-and-mast"), "inverted-v", index=0)
    assert s.layout.supports_used == ("M1",)
    hung = s.hung(s.sweep.chosen)
    lim = SiteLimits.for_supports(s.inp.supports)
    for tid, free in _clearances(hung, lim.trunks).items():
        assert free >= TRUNK_CLEARANCE_M - 1e-6, (tid, free)


def test_legs_turn_round_a_tree_on_the_preferred_line():
    # sketch: T1 (−20, 0) and T2 (20, 0) make the east–west line the preferred leg direction; the mast
    # is given at the origin; T3 stands on that line 12 m east (0.5 m off it): the legs must turn
    sup = [_tree("T1", -20, 0), _tree("T2", 20, 0), _tree("T3", 12, 0.5, 8.0)]
    s = spec(supports=sup, channel_mhz=7.1, masts=[M9])
    inp = parse_plan(s)
    lim = SiteLimits.for_supports(inp.supports, mast_xy_m=(0.0, 0.0))
    (lay,) = [
        x
        for x in site_layouts(
            inp.supports, inp.masts, inp.kit.mech, forms={"inverted-v"}, limits=lim
        )
        if x.supports_used == ("M1",)
    ]
    hung = lay.build({"M1": 9.0, "ends": 3.0}, 10.0)
    free = _clearances(hung, lim.trunks)
    assert all(f >= TRUNK_CLEARANCE_M - 1e-6 for f in free.values()), free
    a, b = stakes(hung)
    assert abs(math.sin(math.radians(a.bearing_deg))) < 0.99  # not east–west any more


@pytest.mark.parametrize(("offset_m", "blocked"), [(0.8, True), (1.5, False)])
def test_a_trunk_in_the_span_blocks_the_pair(offset_m, blocked):
    # sketch: A (−20, 0), B (20, 0); C in the middle, offset_m north of the wire line, 0.3 m trunk:
    # 0.8 m leaves 0.5 m of bark to wire (< 1 m), 1.5 m leaves 1.2 m
    sup = [_tree("A", -20, 0), _tree("B", 20, 0), _tree("C", 0, offset_m, 6.0)]
    inp = parse_plan(spec(supports=sup, channel_mhz=7.1))
    lim = SiteLimits.for_supports(inp.supports)
    (ab,) = [
        x
        for x in site_layouts(inp.supports, [], inp.kit.mech, forms={"flat"}, limits=lim)
        if set(x.supports_used) == {"A", "B"}
    ]
    assert (ab.blocked is not None) == blocked
    if blocked:
        assert "C stands between A and B" in ab.blocked and "0.5 m" in ab.blocked


@pytest.mark.slow
def test_stakes_stay_in_the_clearing_and_within_the_rope():
    s0 = _site("mast-12m-3.6")
    s = swept(s0, "inverted-v", limits={"clearing_radius_m": 30.0})
    hung = s.hung(s.sweep.chosen)
    for st in stakes(hung):
        assert math.hypot(st.x_m, st.y_m) <= 30.0 + 1e-6
    assert "clearing" in (s.sweep.ranges["ends"].high_why or "")
    # without a clearing the kit's 60 m of rope bounds the ends: two stake ropes (each from the end
    # insulator straight down its leg's line to the stake, plus 1.5 m of tie-off) fit in it
    s = swept(s0, "inverted-v")
    hung = s.hung(s.sweep.chosen)
    reach = float(np.hypot(*np.asarray(hung.points_m)[-1, :2]))
    rope = 2 * (math.hypot(hung.stake_distance_m - reach, hung.end_heights_m[0]) + 1.5)
    assert rope <= 60.0 + 1e-6
    assert s.sweep.ranges["ends"].low_m == pytest.approx(3.0)  # swept from the minimum end height


def test_stake_bearing_and_distance_by_hand():
    # sketch: mast at (10, −5); the stakes' bearing is atan2(dx, dy) from north, distance the plan
    # distance (plane trigonometry)
    inp = parse_plan(spec(supports=[], channel_mhz=7.1, masts=[M9]))
    lim = SiteLimits(mast_xy_m=(10.0, -5.0))
    (lay,) = site_layouts([], inp.masts, inp.kit.mech, forms={"inverted-v"}, limits=lim)
    hung = lay.build({"M1": 9.0, "ends": 3.0}, 10.0)
    for st in stakes(hung):
        dx, dy = st.x_m - 10.0, st.y_m + 5.0
        assert st.distance_m == pytest.approx(math.hypot(dx, dy), abs=1e-6)
        assert st.bearing_deg == pytest.approx(math.degrees(math.atan2(dx, dy)) % 360, abs=1e-6)
        assert st.distance_m == pytest.approx(hung.stake_distance_m)


def test_given_mast_point_on_a_trunk_is_refused():
    tree = Support("T1", "tree", 14.0, 4.0, 4.0)
    with pytest.raises(InputError) as e:
        mast_position(
            Mast("M1", 9.0, 2.0, 3), [tree], SiteLimits.for_supports([tree], mast_xy_m=(4.1, 4.0))
        )
    assert e.value.field == "site.mast_xy_m" and "T1" in e.value.detail


def test_two_supports_at_one_place_are_refused():
    sup = [Support("T1", "tree", 12.0, 5.0, 5.0), Support("T2", "tree", 11.0, 5.0, 5.0)]
    with pytest.raises(InputError) as e:
        check_positions(sup)
    assert e.value.field == "site.supports[1].x_m" and "one place" in e.value.detail


@pytest.mark.slow
def test_lower_minimum_end_height_lets_short_poles_hang():
    # 4 m poles, 42 m apart, 7.1 MHz: with the ends at least 3 m the wire cannot hang (sag and the
    # feedpoint load bring it to ~2.5 m); with a 2 m minimum it can, and every point stays above 2 m
    s0 = _site("qrp-4m-poles")
    s0["site"].pop("min_end_height_m")
    s = swept(s0, "flat", limits={"min_end_height_m": 2.0})
    hung = s.hung(s.sweep.chosen)
    assert min(min(hung.end_heights_m), hung.feedpoint_height_m) >= 2.0 - 1e-6
    with pytest.raises(Exception, match=r"below the 3 m \(10 ft\) minimum"):
        swept(s0, "flat")
