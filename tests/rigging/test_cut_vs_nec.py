"""The cut list against NEC-2: the wire fieldkit says to cut, hung as fieldkit says, resonates in
NEC-2 (PyNEC; LD 5 copper, GN 2 Sommerfeld or GN 1 perfect ground; jacket as LD 2 series inductance,
Richmond & Newman 1976) within 0.5 % of the asked channel.

Sites span 3.5–7.3 MHz, spans from drooping short ones to long ones with rope, heights 5–15 m, poor to
very good ground, bare and jacketed wire.
"""

import numpy as np
import pytest

from fieldkit.antenna import parse_ground
from tests.rigging.cases import BARE, JACKETED, rig, spec, two_trees
from tests.rigging.nec_hung import nec_resonance_mhz

TOLERANCE = 0.005  # issue 5: within 0.5 % of the asked frequency


def _nec_check(option, inp, channel_mhz):
    wire = option["wire"]
    g = inp.kit.ground
    ground = (
        ("perfect",)
        if g.kind == "perfect"
        else ("lossy", g.relative_permittivity, g.conductivity_s_m)
    )
    jacket = None
    if "insulation" in wire:
        jacket = (
            wire["insulation"]["thickness_mm"] * 1e-3,
            wire["insulation"]["relative_permittivity"],
        )
    f_nec = nec_resonance_mhz(
        option["hung_wire_m"],
        feed_distance_m=option["feed_distance_m"],
        guess_mhz=channel_mhz,
        radius_m=wire["diameter_mm"] * 0.5e-3,
        ground=ground,
        jacket=jacket,
    )
    assert abs(f_nec - channel_mhz) / channel_mhz < TOLERANCE, (f_nec, channel_mhz)
    return f_nec


CASES = [
    # (name, form, supports, channel, ground, wire, masts)
    ("flat-3.6-average", "flat", two_trees(48, 12.0), 3.6, "average", BARE, ()),
    ("flat-7.3-verygood-jacket", "flat", two_trees(30, 9.0), 7.3, "very-good", JACKETED, ()),
    ("flat-5.37-perfect", "flat", two_trees(40, 8.0), 5.3715, "perfect", BARE, ()),
    ("sloping-5.37-poor", "sloping", two_trees(36, 15.0, 7.0), 5.3715, "poor", BARE, ()),
    (
        "sloping-3.79-average-jacket",
        "sloping",
        two_trees(52, 14.0, 9.0),
        3.79,
        "average",
        JACKETED,
        (),
    ),
    ("short-3.5-poor", "flat", two_trees(28, 13.0), 3.5, "poor", BARE, ()),
    ("short-3.79-average-jacket", "flat", two_trees(30, 13.5), 3.79, "average", JACKETED, ()),
    (
        "invv-7.055-average",
        "inverted-v",
        two_trees(20, 8.0),
        7.055,
        "average",
        BARE,
        ({"id": "M", "height_m": 9.0, "top_load_kg": 5.0, "guys": 3},),
    ),
    (
        "invv-3.6-poor-jacket",
        "inverted-v",
        two_trees(20, 8.0),
        3.6,
        "poor",
        JACKETED,
        ({"id": "M", "height_m": 10.0, "top_load_kg": 5.0, "guys": 3},),
    ),
]


@pytest.mark.slow
@pytest.mark.parametrize(
    ("name", "form", "supports", "channel", "ground", "wire", "masts"),
    CASES,
    ids=[c[0] for c in CASES],
)
def test_cut_list_resonates_in_nec2(name, form, supports, channel, ground, wire, masts):
    s = spec(supports=supports, channel_mhz=channel, ground=ground, wire=wire, masts=masts)
    option, engine, inp = rig(s, form)
    assert option["form"] == form
    if name.startswith("short"):
        assert option["rigging"].get("droop_tail_m", 0) > 0  # the case really droops
    pts = np.asarray(option["hung_wire_m"])
    length = np.sum(np.linalg.norm(np.diff(pts, axis=0), axis=1))
    assert length == pytest.approx(
        sum(option["cut"]["leg_m"]), rel=2e-3
    )  # the polyline is the cut wire
    _nec_check(option, inp, channel)


def test_ground_presets_used_here_exist():
    for c in CASES:
        parse_ground(c[4])


def _first(points, length):
    """The first `length` metres of a polyline (independent of fieldkit's own helper)."""
    pts = np.asarray(points, dtype=float)
    seg = np.linalg.norm(np.diff(pts, axis=0), axis=1)
    cum = np.concatenate([[0.0], np.cumsum(seg)])
    s = np.append(cum[cum < length], length)
    return np.column_stack([np.interp(s, cum, pts[:, k]) for k in range(3)])


def _inner(points, feed, leg):
    pts = np.asarray(points, dtype=float)
    seg = np.linalg.norm(np.diff(pts, axis=0), axis=1)
    cum = np.concatenate([[0.0], np.cumsum(seg)])
    k = int(np.argmin(np.abs(cum - feed)))
    left = _first(pts[: k + 1][::-1], leg)[::-1]
    right = _first(pts[k:], leg)
    return np.vstack([left, right[1:]])


@pytest.mark.slow
def test_linked_dipole_sections_resonate_in_nec2():
    from fieldkit.planning import plan

    s = spec(supports=two_trees(48, 12.0), channel_mhz=3.6, ground="average")
    s["channels_mhz"] = [3.6, 7.1]
    s["form"] = "linked"
    out = plan(s)
    opt = out["options"][0]
    assert opt["form"] == "linked"
    # links closed: the whole wire at the lowest channel
    f_low = nec_resonance_mhz(
        opt["hung_wire_m"],
        feed_distance_m=opt["feed_distance_m"],
        guess_mhz=3.6,
        radius_m=1e-3,
        ground=("lossy", 13, 0.005),
    )
    assert abs(f_low - 3.6) / 3.6 < TOLERANCE
    # links open at the stated distance: the inner part of the same hung wire at 7.1 MHz
    link = opt["links"][0]
    inner = _inner(opt["hung_wire_m"], opt["feed_distance_m"], link["link_from_feed_m"])
    f_high = nec_resonance_mhz(
        inner,
        feed_distance_m=link["link_from_feed_m"],
        guess_mhz=7.1,
        radius_m=1e-3,
        ground=("lossy", 13, 0.005),
    )
    assert abs(f_high - 7.1) / 7.1 < TOLERANCE
    assert sum(opt["cut"]["sections_m"]) == pytest.approx(opt["cut"]["leg_m"][0], abs=2e-3)
