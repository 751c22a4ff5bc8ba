"""The plan's one cut instruction end to end: the same strings in the cut block and the checklist item,
the parts adding up to the cut, and a spool too short for the full spare giving one length, not two.

Source: the cut = leg + 2 × wrap + spare and the spare = 3 % of the leg are fieldkit's own rules of
common practice (rigging/cut.py); sums below are computed from the plan's own figures.
"""

from __future__ import annotations

import copy
import json

import pytest

from fieldkit.paths import assets_dir
from fieldkit.planning import plan
from fieldkit.readable import tape_cm
from fieldkit.rigging.cut import CUT_LONG_FRACTION, spare_m

NBSP = "\u00a0"


def _demo() -> dict:
    with open(assets_dir() / "demo" / "larch-basin-plan.json") as fh:
        spec = json.load(fh)
    spec.pop("name")
    spec["channels_mhz"] = spec["sky"]["channels_mhz"] = [3.605]
    return spec


def test_spare_is_three_percent_or_what_the_spool_leaves():
    # legs 2 × (19.645 + 2 × 0.15) = 39.89 m (computed); a 40.5 m spool leaves 0.61 m: 0.305 per leg
    assert spare_m(leg_m=19.645, wrap_allowance_m=0.15, spool_m=None) == pytest.approx(
        0.589, abs=1e-3
    )
    assert spare_m(leg_m=19.645, wrap_allowance_m=0.15, spool_m=40.5) == pytest.approx(0.305)
    assert spare_m(leg_m=19.645, wrap_allowance_m=0.15, spool_m=70.0) == pytest.approx(
        CUT_LONG_FRACTION * 19.645
    )
    assert spare_m(leg_m=19.645, wrap_allowance_m=0.15, spool_m=39.89) == 0.0


@pytest.mark.slow
def test_one_instruction_in_the_cut_block_and_the_checklist():
    result = plan(_demo())
    for option in result["options"]:
        cut = option["cut"]
        ins = cut["instruction"]
        item = next(it for it in option["safety"]["checklist"] if it["id"] == "pre-cut-wire")
        assert item["text"].startswith(ins["text"]["both"])
        (piece,) = ins["pieces"]
        assert piece["legs"] == ["A", "B"]
        # cut = leg + 2 wrap + 3 % spare (the demo's 70 m spool holds it)
        leg, wrap = cut["leg_m"][0], cut["wrap_allowance_m"]
        assert piece["cut"]["m"] == pytest.approx(
            leg + 2 * wrap + CUT_LONG_FRACTION * leg, abs=2e-3
        )
        # the parts read off the tape add up to the cut as shown (in centimetres)
        marks = [tape_cm(mk["from_feedpoint_end"]["m"]) for mk in piece["marks"]]
        assert marks[0] == tape_cm(wrap)
        spare_cm = int(piece["spare"]["metric"].split(NBSP)[0])
        assert marks[-1] + spare_cm == tape_cm(piece["cut"]["m"])
        # the advice names the same spare, no second length to cut
        assert piece["spare"]["metric"] in cut["cut_long_advice"]


@pytest.mark.slow
def test_a_short_spool_gives_one_length_with_a_smaller_spare():
    spec = _demo()
    spec["kit"] = copy.deepcopy(spec["kit"])
    spec["kit"]["wire"]["spool_m"] = 40.5  # holds both legs, not the full 3 % spare
    result = plan(spec)
    option = result["options"][0]
    ins = option["cut"]["instruction"]
    (piece,) = ins["pieces"]
    total_cm = 2 * tape_cm(piece["cut"]["m"])
    assert total_cm <= 4050, ins["total"]  # what is cut fits on the spool
    assert piece["spare"]["m"] < CUT_LONG_FRACTION * option["cut"]["leg_m"][0]
    assert any("keeps the spare the spool leaves" in w for w in option["warnings"])
