"""The words of the safety block: every hazard named the same way everywhere, limit sets in words, numbers
rounded to what a person reads, a short title for the field card, and the cut instruction as an item.

Sources: the limit sets' names are those of 47 CFR §1.1310 (general population/uncontrolled and
occupational/controlled) and ICNIRP 2020 (general public, occupational); the rest is fieldkit's own
wording, checked for what it must not contain (tests/words.py).
"""

from __future__ import annotations

import copy

import numpy as np
import pytest

from fieldkit.antenna import Ground
from fieldkit.rigging.instruction import cut_instruction
from fieldkit.safety import safety_block
from fieldkit.safety.hazards import hazard_names, parse_hazards
from fieldkit.safety.limits import LIMIT_SETS
from tests.words import problems

PERFECT = Ground(kind="perfect")
SITE = {
    "ground": "perfect",
    "supports": [
        {"id": "T1", "kind": "tree", "height_m": 13.5, "x_m": -24, "y_m": 6},
        {"id": "T2", "kind": "tree", "height_m": 10.0, "x_m": 21, "y_m": -3},
        {"id": "T3", "kind": "tree", "height_m": 12.0, "x_m": 4, "y_m": 30, "unsafe": True},
    ],
    "hazards": [
        {"kind": "path", "points_m": [[-40, 15], [40, 15]]},
        {"kind": "power_line", "points_m": [[-200, -38], [200, -38]], "height_m": 8.5},
        {
            "kind": "power_line",
            "points_m": [[-200, 90], [200, 90]],
            "height_m": 9,
            "id": "Ridge line",
        },
    ],
}
HALF = 19.6
FLAT = {
    "form": "flat",
    "frequency_mhz": 3.605,
    "supports_used": ["T1", "T2"],
    "rope_heights_m": {"T1": 10.0, "T2": 10.0},
    "hung_wire_m": [[-HALF, 0, 9.5], [0, 0, 9.0], [HALF, 0, 9.5]],
    "feed_distance_m": float(np.hypot(HALF, 0.5)),
    "wire": {"diameter_mm": 1.6, "conductor": "copper"},
    "feedpoint_height_m": 9.0,
    "mast": None,
    "swr": 1.1,
    "cut": {
        "leg_m": [19.645, 19.645],
        "instruction": cut_instruction(
            legs_m=[19.645, 19.645], wrap_allowance_m=0.15, spare_m=0.589
        ).to_json(),
        "trim_steps": [{"shift_khz": 100, "cut_cm_per_leg_to_raise": 52.8}],
    },
}


def test_hazards_are_named_by_their_id_or_numbered_from_one_within_their_kind():
    assert hazard_names(parse_hazards(SITE["hazards"])) == ["path 1", "power line 1", "Ridge line"]


@pytest.fixture(scope="module", params=LIMIT_SETS)
def block(request):
    return safety_block(
        option=copy.deepcopy(FLAT),
        site=SITE,
        radio={"power_w": 100, "mode": "ssb"},
        ground=PERFECT,
        limit_set=request.param,
    )


def test_every_text_reads_as_words(block):
    texts = [it["text"] for it in block["checklist"]] + [it["title"] for it in block["checklist"]]
    texts += [c["why"] for c in block["clearances"]] + block["reasons"] + block["cautions"]
    texts.append(block["limit_set_name"])
    bad = {t: problems(t) for t in texts if problems(t)}
    assert not bad, bad


def test_limit_set_in_words(block):
    words = {
        "fcc-uncontrolled": "US general public limits (47 CFR 1.1310)",
        "fcc-controlled": "US occupational limits (47 CFR 1.1310)",
        "icnirp-public": "ICNIRP 2020 general public limits",
        "icnirp-occupational": "ICNIRP 2020 occupational limits",
    }[block["limit_set"]]
    assert block["limit_set_name"] == words
    keep = next(it for it in block["checklist"] if it["rule"] == "keep-out")
    assert words in keep["text"]


def test_each_power_line_goes_by_one_name(block):
    items = {it["id"]: it for it in block["checklist"]}
    # ids stay as they were (acknowledgements follow them): the hazard's index in the site
    assert items["pre-power-line-1"]["text"].startswith("Power line 1, ")
    assert items["pre-power-line-2"]["text"].startswith("Ridge line, ")
    assert "power line 1" in items["raise-power-line-watch-1"]["text"]
    assert items["pre-power-line-1"]["title"] == "Power line 1: clear"
    names = {c["hazard"]: c["hazard_name"] for c in block["clearances"]}
    assert names == {1: "power line 1", 2: "Ridge line"}
    assert not any("power line 0" in it["text"].lower() for it in block["checklist"])


def test_a_power_far_above_the_radio_is_read_in_two_figures(block):
    none = next(it for it in block["checklist"] if it["id"] == "pre-keep-out-none")
    p = block["exposure"]["power_for_no_zone_w"]
    assert p > 10_000  # 100 W SSB at 9 m: far below any limit (checked in test_safety_block)
    assert "kW)" in none["text"] and f"{p:.0f} W" not in none["text"]


def test_the_cut_instruction_is_a_checklist_item(block):
    item = next(it for it in block["checklist"] if it["id"] == "pre-cut-wire")
    assert item["stage"] == "pre-raise" and item["required"] is False
    assert item["text"].startswith(FLAT["cut"]["instruction"]["text"]["both"])
    assert "20.53 m (67 ft 4½ in)" in item["text"].replace("\u00a0", " ")


def test_every_item_has_a_short_title(block):
    for it in block["checklist"]:
        assert it.get("title"), it["id"]
        assert len(it["title"]) <= 50, it["title"]


def test_a_height_in_feet_is_the_one_the_app_shows():
    # found by the lead: the checklist said 30.5 ft where the Mast section said 30.4 ft for a 9.2812 m
    # feedpoint (the app converts the JSON's 9.28 m); international foot 0.3048 m (exact, 1959)
    from fieldkit.readable import height_both

    assert height_both(9.2812) == "9.3 m (30.4 ft)"
    assert round(9.28 / 0.3048, 1) == 30.4


def test_heights_round_halves_up_like_the_app():
    # web/js/units.js fixed(): floor(x·10 + 0.5 + 1e-9); Python's format would give "9.2" for 9.25
    from fieldkit.readable import fixed, height_text

    assert height_text(9.25) == "9.3 m" and height_text(9.35) == "9.4 m"
    assert fixed(-0.04, 1) == "0.0" and fixed(12.345, 2) == "12.35" and fixed(3.0, 0) == "3"
