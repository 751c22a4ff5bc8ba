"""The plan's own sentences (height choice, warnings, notes, checklist) read as words: no preset code
of the contract (``sea-water``, ``very-good``) and no false precision, over the grounds and supports an
operator really names (issue 16, item 3: "grounds appear as words")."""

import copy
import json
import re
from pathlib import Path

import pytest

from fieldkit.planning import plan
from tests.words import problems

SITES = Path(__file__).resolve().parent / "sites"


def _sentences(result: dict) -> list[str]:
    out = list(result["warnings"])
    for opt in result["options"]:
        out += [opt["height_choice"], *opt["warnings"]]
        out += [item["text"] for item in opt["safety"]["checklist"]]
    return out


@pytest.mark.slow
@pytest.mark.parametrize("ground", ["sea-water", "very-good"])
def test_height_choice_and_warnings_name_the_ground_in_words(ground):
    spec = copy.deepcopy(json.loads((SITES / "sea-water-8m.json").read_text()))
    spec["site"]["ground"] = ground
    result = plan(spec)
    texts = _sentences(result)
    words = ground.replace("-", " ")
    assert any(f"the {words} ground" in o["height_choice"] for o in result["options"])
    channels = tuple(f"{f:g}" for f in spec["channels_mhz"])
    assert {
        t: problems(t, exempt_numbers=channels)
        for t in texts
        if problems(t, exempt_numbers=channels)
    } == {}


@pytest.mark.slow
def test_a_branch_apex_is_named_as_a_branch_of_the_tree():
    spec = json.loads((SITES / "one-tree-and-mast.json").read_text())
    spec["kit"]["masts"] = []
    spec["form"] = "inverted-v"
    texts = _sentences(plan(spec))
    tree = spec["site"]["supports"][0]["id"]
    assert any(f"apex on a branch of {tree}" in t for t in texts)


FOOT_M = 0.3048  # international foot, exact (international yard and pound agreement, 1959)


def _feet_beside_metres(text: str) -> list[tuple[float, float]]:
    return [(float(m), float(f)) for m, f in re.findall(r"(\d+\.\d) m \((\d+\.\d) ft\)", text)]


@pytest.mark.slow
def test_the_keep_out_height_warning_gives_feet_beside_metres():
    spec = json.loads((SITES / "mast-9m-60m-sea-water.json").read_text())
    texts = [t for t in _sentences(plan(spec)) if "the lowest wire end hangs at" in t]
    assert texts
    for t in texts:
        pairs = _feet_beside_metres(t)
        assert len(pairs) == 2, t  # where the end hangs and where to keep it
        for metres, feet in pairs:
            assert abs(metres / FOOT_M - feet) < 0.2, t  # the same height, each rounded once


def test_the_low_wire_warning_gives_feet_beside_metres():
    from fieldkit.rigging.heights import low_end_words

    text = low_end_words(2.47, 2.0)
    assert "2.5 m (8.1 ft)" in text  # 2.47 m = 8.10 ft
    assert "2 m, 7 ft" in text and "below 3 m (10 ft)" in text
    assert low_end_words(3.0, 2.0) is None
