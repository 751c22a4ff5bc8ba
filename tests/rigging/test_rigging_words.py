"""The rigging texts give feet beside every metre figure a person acts on, each figure rounded once:
the readable helpers on hand-worked values, and the texts made directly where no test site brings
them out (tests/plan/test_plan_words.py checks the texts of real plans).

Feet are metres / 0.3048 (international foot, exact: international yard and pound agreement, 1959);
inches are feet × 12."""

import json
from pathlib import Path

import numpy as np
import pytest

from fieldkit.errors import InputError
from fieldkit.planning import plan
from fieldkit.readable import (
    droop_both,
    given_both,
    height_both,
    height_text,
    whole_both,
)
from fieldkit.rigging.catenary import HangError
from fieldkit.rigging.clearing import SiteLimits, Trunk, mast_position
from fieldkit.rigging.feedline import parse_coax
from fieldkit.rigging.heights import HeightPoint, describe
from fieldkit.rigging.hung import hang_inverted_v, hang_span
from fieldkit.rigging.layout import Mechanics
from fieldkit.rigging.line import line_words
from fieldkit.rigging.mast import Mast
from fieldkit.rigging.spans import _span_blocked
from fieldkit.rigging.vee import _trunk_clash, _vee_builder, clearing_words
from fieldkit.site import Support
from tests.words import bare_metres, feet_disagree

NBSP = "\u00a0"
SITES = Path(__file__).resolve().parents[1] / "plan" / "sites"


def _plain(text: str) -> str:
    return text.replace(NBSP, " ")


def _reads_in_both(text: str) -> None:
    assert bare_metres(text) == [], text
    assert feet_disagree(text) == [], text


def test_whole_metres_and_whole_feet():
    assert whole_both(35.0) == "35 m (115 ft)"  # 114.83 ft (hand-worked, 35 / 0.3048)
    # the feet come from the length, not from the rounded metres: 18.4 m = 60.37 ft, 18 m = 59.06 ft
    assert whole_both(18.4) == "18 m (60 ft)"


def test_a_figure_as_given_with_whole_feet():
    assert given_both(30) == "30 m (98 ft)"  # 98.43 ft
    assert given_both(0.5) == "0.5 m (2 ft)"  # 1.64 ft
    assert given_both(2.5) == "2.5 m (8 ft)"  # 8.20 ft


def test_a_droop_reads_to_the_centimetre_and_the_quarter_inch():
    # 0.37 m = 14.567 in → 14½ in to the nearest ¼ in = 1 ft 2½ in (hand-worked, 0.0254 m per inch)
    assert _plain(droop_both(0.37)) == "0.37 m (1 ft 2½ in)"
    assert _plain(droop_both(0.25)) == "0.25 m (9¾ in)"  # 9.84 in → 9¾ in


def test_a_height_with_an_aside_keeps_one_pair_of_brackets():
    # 9.28 m (the JSON's value) = 30.446 ft → 30.4 ft, as the app's fixed(): floor(304.46 + 0.5)
    assert height_both(9.2812, aside="0.11 wavelength") == "9.3 m (30.4 ft, 0.11 wavelength)"
    # 9.249 m travels as 9.25 m in the JSON and reads 9.3 m in the app (halves up), so here too
    assert height_text(9.249) == "9.3 m" == height_both(9.249).split(" (")[0]


def _point(axis: str, rope: dict[str, float], feed: float) -> HeightPoint:
    swept = rope.get(axis, max(rope.values()))
    return HeightPoint(
        rope_heights_m=rope, feedpoint_height_m=feed, nvis_dbi=4.0, zenith_dbi=5.0,
        efficiency=0.5, swept_m=swept, axis=axis,
    )  # fmt: skip


@pytest.mark.parametrize(
    ("point", "words"),
    [
        # 12.3 m = 40.35 ft → 40.4 ft; 11.9 m = 39.04 ft → 39.0 ft; 11.9 / 70 m = 0.17 wavelength
        (
            _point("ropes", {"A": 12.3, "B": 12.3}, 11.9),
            "both ropes at 12.3 m (40.4 ft) and the feedpoint at 11.9 m (39.0 ft, 0.17 wavelength)",
        ),
        (
            _point("T1", {"T1": 13.5, "T2": 10.0}, 9.28),  # 44.29 ft; 9.28 m = 30.45 ft
            "the T1 rope at 13.5 m (44.3 ft) and the feedpoint at 9.3 m (30.4 ft, 0.13 wavelength)",
        ),
        (
            _point("apex", {"apex": 10.0, "ends": 6.0}, 10.0),  # 32.81 ft; 19.69 ft
            "the apex at 10.0 m (32.8 ft, 0.14 wavelength) and the ends at 6.0 m (19.7 ft)",
        ),
        (_point("ends", {"apex": 10.0, "ends": 4.5}, 10.0), "ends at 4.5 m (14.8 ft)"),  # 14.76 ft
        (_point("", {"A": 8.5}, 8.0), "the feedpoint at 8.0 m (26.2 ft, 0.11 wavelength)"),  # 26.25
    ],
)  # fmt: skip
def test_a_swept_height_reads_in_both_units(point, words):
    assert describe(point, 70.0) == words
    _reads_in_both(words)


_SPAN = dict(
    a_height_m=13.0, b_height_m=13.0, leg_m=19.0, wire_weight_n_per_m=0.2,
    rope_weight_n_per_m=0.1, feed_load_n=5.0,
)  # fmt: skip


def test_the_droop_note_gives_the_tape_reading_of_the_drooping_wire():
    hung = hang_span(a_xy=(-15.0, 0.0), b_xy=(15.0, 0.0), tension_n=60.0, **_SPAN)
    (note,) = hung.notes
    assert f"short span: {hung.tail_m:.2f} m (" in note  # the metres as before, feet beside
    assert " ft " in _plain(note) and _plain(note).count(" in)") == 1
    _reads_in_both(note)  # each to its own rounding: 1 cm and ¼ in, 0.1 m and 1 ft


def test_a_wire_that_will_not_hang_names_both_lengths_in_feet():
    with pytest.raises(HangError) as e:
        hang_span(a_xy=(-15.0, 0.0), b_xy=(15.0, 0.0), tension_n=7.0, **_SPAN)
    # 38 m = 124.67 ft, 30 m = 98.43 ft
    assert str(e.value) == (
        "38 m (125 ft) of wire will not hang between supports 30 m (98 ft) apart at a 7 N pull"
    )


def test_a_trunk_in_the_span_gives_both_distances_in_both_units():
    a = Support("A", "tree", 12.0, -15.0, 0.0)
    b = Support("B", "tree", 12.0, 15.0, 0.0)
    limits = SiteLimits(trunks=(Trunk("C", 0.0, 0.7, 0.3),), trunk_clearance_m=1.0)
    words = _span_blocked(a, b, limits)
    # the wire passes 0.7 m from C's centre, 0.4 m from its bark = 1.31 ft; keep 1 m = 3.28 ft
    assert words == (
        "C stands between A and B: the wire would pass 0.4 m (1 ft) from its trunk; keep 1 m (3 ft)"
    )


def test_an_inverted_v_near_a_trunk_says_how_near_in_both_units():
    limits = SiteLimits(trunks=(Trunk("T4", 6.0, 1.5, 0.3),), trunk_clearance_m=2.0)
    centre = np.array([0.0, 0.0])
    words = _trunk_clash(centre, (np.array([-10.0, 0.0]), np.array([10.0, 0.0])), limits, None)
    # the leg passes 1.5 m from T4's centre, 1.2 m from its bark = 3.94 ft; keep 2 m = 6.56 ft
    assert words == (
        "every direction of the legs passes near a trunk, e.g. 1.2 m (4 ft) from the trunk of T4; "
        "keep 2 m (7 ft)"
    )


def test_a_stake_outside_the_clearing_gives_feet():
    hung = hang_inverted_v(
        centre_xy=(0.0, 0.0), axis_xy=(1.0, 0.0), apex_height_m=9.0, end_height_m=3.0,
        leg_m=10.0, wire_weight_n_per_m=0.2, feed_load_n=5.0, tension_n=60.0,
    )  # fmt: skip
    (words,) = clearing_words(hung, SiteLimits(clearing_radius_m=5.0))
    assert "just outside the 5 m (16 ft) clearing" in words  # 16.40 ft
    _reads_in_both(words)


_MECH = Mechanics(
    wire_weight_n_per_m=0.2, rope_weight_n_per_m=0.1, balun_n=2.0, coax_weight_n_per_m=0.5,
    coax_length_m=25.0, tension_n=60.0,
)  # fmt: skip


def _vee(limits: SiteLimits):
    return _vee_builder(
        apex_of=lambda u: np.array([0.0, 0.0]), preferred=(1.0, 0.0), mech=_MECH, limits=limits,
        mast=None, apex_tree=None,
    )  # fmt: skip


def test_a_vee_short_of_rope_gives_heights_and_rope_in_both_units():
    with pytest.raises(HangError) as e:
        _vee(SiteLimits(rope_length_m=5.0))({"apex": 10.0, "ends": 4.0}, 10.0)
    words = str(e.value)
    # 10 m = 32.81 ft; 5 m = 16.40 ft (the kit's rope as given)
    assert words.startswith("with the apex at 10.0 m (32.8 ft) and the ends at ")
    assert words.endswith(
        "of rope for the stake ropes and the apex halyard, the kit has 5 m (16 ft)"
    )
    _reads_in_both(words)


def test_vee_stakes_outside_the_clearing_give_both_units():
    with pytest.raises(HangError) as e:
        _vee(SiteLimits(clearing_radius_m=3.0))({"apex": 10.0, "ends": 4.0}, 10.0)
    words = str(e.value)
    assert "outside the clearing, which reaches 3 m (10 ft) from the site origin" in words  # 9.84
    _reads_in_both(words)


def test_a_mast_point_on_a_trunk_gives_the_trunk_radius_in_feet():
    tree = Support("T1", "tree", 14.0, 4.0, 4.0, trunk_radius_m=0.4)
    with pytest.raises(InputError) as e:
        mast_position(
            Mast("M1", 9.0, 2.0, 3), [tree], SiteLimits.for_supports([tree], mast_xy_m=(4.1, 4.0))
        )
    assert "(4.1, 4) m is on T1's trunk, of radius 0.4 m (1 ft): " in e.value.detail  # 1.31 ft


def test_a_mast_point_outside_the_clearing_gives_the_clearing_in_feet():
    spec = json.loads((SITES / "one-tree-and-mast.json").read_text())
    spec["site"]["clearing_radius_m"], spec["site"]["mast_xy_m"] = 20.0, [30.0, 0.0]
    with pytest.raises(InputError) as e:
        plan(spec)
    assert e.value.field == "site.mast_xy_m"
    # 20 m = 65.62 ft
    assert "(30, 0) m is outside the clearing, which reaches 20 m (66 ft) from the site origin" in (
        e.value.detail
    )


def test_the_reading_moved_through_the_coax_names_its_length_in_feet():
    words = line_words(parse_coax({"class": "rg-58", "length_m": 25}), frequency_hz=7.1e6)
    assert "through 25 m (82 ft) of RG-58 class coax" in words  # 82.02 ft
