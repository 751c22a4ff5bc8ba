"""The plan's own sentences (height choice, warnings, notes, checklist) read as words: no preset code
of the contract (``sea-water``, ``very-good``) and no false precision, over the grounds and supports an
operator really names (issue 16, item 3: "grounds appear as words")."""

import copy
import json
import re
from pathlib import Path

import pytest

from fieldkit.errors import InputError
from fieldkit.paths import assets_dir
from fieldkit.planning import plan
from tests.rigging.cases import spec, two_trees
from tests.words import bare_metres, feet_disagree, problems

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
    assert "down to 2 m (7 ft)" in text and "below 3 m (10 ft)" in text  # 6.6 ft, 9.8 ft
    assert low_end_words(3.0, 2.0) is None


def _all_words(spec: dict) -> list[str]:
    """The sentences of a plan, its clearance reasons, or the refusal when nothing can be hung."""
    try:
        result = plan(spec)
    except InputError as e:
        return [e.detail]
    out = _sentences(result) + [r["why"] for r in result["refused"]]
    for opt in result["options"]:
        out += [c["why"] for c in opt["safety"]["clearances"]]
    return out


def _feet_everywhere(texts: list[str]) -> None:
    assert {t: bare_metres(t) for t in texts if bare_metres(t)} == {}
    # the cut instruction makes each unit's marks add up to its own cut (tests/rigging/test_instruction)
    rest = [t for t in texts if not t.startswith("Cut ")]
    assert {t: feet_disagree(t) for t in rest if feet_disagree(t)} == {}


PLANS = sorted(p.name for p in SITES.glob("*.json")) + ["demo"]


@pytest.mark.slow
@pytest.mark.parametrize("name", PLANS)
def test_every_metre_figure_has_its_feet_beside_it(name):
    # the real plans of the test sites and the demo: every length or height in metres a person acts
    # on reads in feet too, and the feet are the metres / 0.3048 (international foot, exact, 1959) at
    # the rounding of each figure
    path = assets_dir() / "demo" / "larch-basin-plan.json" if name == "demo" else SITES / name
    _feet_everywhere(_all_words(json.loads(path.read_text())))


def _variant(name: str) -> dict:
    """Sites and kits that bring out the rigging texts the test sites do not (tests/rigging/cases)."""
    if name == "branch-apex":
        s = json.loads((SITES / "one-tree-and-mast.json").read_text())
        s["kit"]["masts"], s["form"] = [], "inverted-v"
        return s
    if name == "low-mast-vee":
        s = spec(supports=two_trees(18, 3.0), channel_mhz=7.1, ground="perfect")
        s["kit"]["masts"] = [{"id": "M1", "kind": "mast", "height_m": 4.0, "top_load_kg": 2.0}]
        s["form"] = "inverted-v"
        return s
    span, tops, mhz, spool, coax = {
        "short-span": (18, 8.0, 3.8, None, 25),
        "droop": (30, 13.0, 3.8, None, 25),
        "too-low": (40, 2.5, 7.1, None, 25),
        "spool-short": (45, 10.0, 3.6, 30, 25),
        "spool-no-spare": (45, 10.0, 3.6, 38, 25),
        "spool-spare-short": (45, 10.0, 3.6, 41, 25),
        "long-coax": (40, 12.0, 7.1, None, 150),
    }[name]
    s = spec(supports=two_trees(span, tops), channel_mhz=mhz, ground="perfect")
    s["form"] = "flat"
    s["kit"]["coax"]["length_m"] = coax
    if spool is not None:
        s["kit"]["wire"]["spool_m"] = spool
    return s


@pytest.mark.slow
@pytest.mark.parametrize(
    ("name", "phrase"),
    [
        ("branch-apex", "out from the trunk"),
        ("low-mast-vee", "M1 extends to 4 m (13 ft)"),  # 13.1 ft
        ("short-span", "18 m (59 ft) between A and B"),  # 59.1 ft
        ("droop", "of each leg droops from its support"),
        ("too-low", "under the 3 m (10 ft) minimum end height"),  # 9.8 ft
        ("spool-short", "the spool holds 30 m (98 ft)"),  # 98.4 ft
        ("spool-no-spare", "cut long, but the spool holds 38 m (125 ft)"),  # 124.7 ft
        ("spool-spare-short", "the spool of 41 m (135 ft) holds both legs"),  # 134.5 ft
        ("long-coax", "over 150 m (492 ft) of"),  # 492.1 ft
    ],
)
def test_the_rigging_texts_give_feet_beside_metres(name, phrase):
    # real plans; feet = metres / 0.3048 (international foot, exact, 1959) at each figure's rounding
    texts = _all_words(_variant(name))
    assert any(phrase in t.replace("\u00a0", " ") for t in texts), texts
    _feet_everywhere(texts)
