"""Issue 14, mechanics and feedline, end to end: each case of the issue gives the right number or a
clear warning; the loads per support, the guys, the mast's wind rating and the new kit fields."""

import copy
import json
import math
from pathlib import Path

import pytest

from fieldkit.constants import STANDARD_GRAVITY_M_S2
from fieldkit.errors import InputError
from fieldkit.paths import assets_dir
from fieldkit.planning import plan
from fieldkit.rigging.mast import guy_tensions_n

SITES = Path(__file__).resolve().parent / "sites"


def _load(path):
    with open(path) as fh:
        return json.load(fh)


@pytest.fixture(scope="module")
def demo():
    d = _load(assets_dir() / "demo" / "larch-basin-plan.json")
    d.pop("sky")
    d.pop("schedule")
    d["channels_mhz"] = [3.79]
    return d


@pytest.fixture(scope="module")
def one_tree():
    return _load(SITES / "one-tree-and-mast.json")


def _first(spec):
    return plan(copy.deepcopy(spec))["options"][0]


def _with(spec, **kit):
    out = copy.deepcopy(spec)
    out["kit"].update(kit)
    return out


def test_the_demo_plans_without_strength_warnings_and_shows_its_loads(demo):
    o = _first(demo)
    # the contract (ARCHITECTURE.md, second round): rigging.loads per support, H and V pull in N
    by_id = o["rigging"]["loads"]
    strength = o["rigging"]["strength"]
    assert not [w for w in o["warnings"] if "breaks" in w or "carries" in w or "feedline" in w]
    assert set(by_id) == set(o["supports_used"])
    for sid, s in by_id.items():
        sup = o["rigging"]["supports"][sid]
        # the same statics as the branch load already shown: |(H, V + downhaul)|
        assert math.hypot(s["horizontal_n"], s["vertical_n"]) == pytest.approx(
            sup["branch_load_n"], abs=0.2
        )
        assert s["in_wind_n"] > sup["branch_load_n"]  # a gale adds load
    assert strength["wind_m_s"] == 17.2 and o["rigging"]["guy_tension_n"] == []


def test_1_6_mm_copper_at_800_n_warns_the_wire_rope_and_branches(demo):
    o = _first(_with(demo, tension_n=800))
    words = " | ".join(o["warnings"])
    # soft-drawn copper of 1.6 mm breaks at roughly 0.45 kN (issue 14, from memory)
    assert "planned pull of 800 N breaks the wire" in words and "442 N" in words
    assert "rope's working load" in words
    for sid, s in o["rigging"]["loads"].items():
        # at 800 N each branch carries ~1.1–1.25 kN (issue 14: 1248 N on its site)
        assert 1000 < math.hypot(s["horizontal_n"], s["vertical_n"]) < 1300
        assert f"the branch of {sid} carries" in words
    assert o["rigging"]["strength"]["wire_breaking_n"] == pytest.approx(442, abs=1)


def test_hard_drawn_wire_and_a_weak_link(demo):
    hard = copy.deepcopy(demo)
    hard["kit"]["wire"]["temper"] = "hard"
    o = _first(_with(hard, tension_n=300))
    words = " | ".join(o["warnings"])
    assert "breaks the wire" not in words and "more than the wire may carry" not in words
    assert o["wire"]["temper"] == "hard"
    weak = _first(_with(demo, weak_link_n=50))  # the demo pulls 60 N
    assert any("weak link (50 N) parts at the planned pull of 60 N" in w for w in weak["warnings"])
    strong = _first(_with(demo, weak_link_n=1000))
    assert any("the wire would break first" in w for w in strong["warnings"])
    given = copy.deepcopy(demo)
    given["kit"]["rope"]["working_load_n"] = 40
    o = _first(given)
    assert any("rope's working load of 40 N (the maker's)" in w for w in o["warnings"])


def test_soft_copper_pulled_past_a_third_of_its_breaking_load_will_stretch(demo):
    # 442 N breaking: above ~147 N (a third, from memory) soft-drawn copper stretches for good
    o = _first(_with(demo, tension_n=180, design_wind_m_s=0))
    assert any("soft-drawn copper stretches for good above about 147 N" in w for w in o["warnings"])
    assert not any("breaks the wire" in w for w in o["warnings"])


def test_a_branch_apex_at_2000_n_is_named_with_its_load(one_tree):
    spec = _with(one_tree, tension_n=2000, masts=[])
    o = _first(spec)
    assert o["form"] == "inverted-v" and o["mast"] is None
    (apex,) = o["rigging"]["loads"].values()
    top_kg = o["rigging"]["top_load_kg"]
    # issue 14: ~188 kg on the branch; here 184 kg of apex load, and the halyard's downhaul as much
    # again (statics: a halyard over the branch carries the apex on both of its parts)
    assert 180 < top_kg < 190
    assert apex["vertical_n"] == pytest.approx(2 * top_kg * STANDARD_GRAVITY_M_S2, rel=1e-3)
    words = " | ".join(o["warnings"])
    assert f"the branch of T1 carries 3.6 kN ({apex['load_kg']:.0f} kg)" in words
    assert "breaks the wire" in words


def test_mast_guys_by_statics_and_the_makers_wind_rating(one_tree):
    spec = copy.deepcopy(one_tree)
    spec["kit"]["masts"][0]["wind_limit_m_s"] = 12.5
    o = plan(spec)["options"]
    o = next(x for x in o if x["mast"] is not None)
    guys = o["rigging"]["guy_tension_n"]
    loads = o["rigging"]["strength"]
    assert len(guys) == 3 and min(guys) > 0  # today: guy_tension_n 0
    assert loads["guy_wind_m_s"] == 12.5  # the maker's rating, below the 17.2 m/s gale
    want = guy_tensions_n(head_force_n=loads["guy_head_force_n"], guys=3)
    assert guys == pytest.approx(list(want), abs=0.2)  # head force shown to 0.1 N
    assert o["mast"]["guy_tension_n"] == max(guys) and o["mast"]["wind_limit_m_s"] == 12.5
    wind_item = next(i for i in o["safety"]["checklist"] if i["rule"] == "mast-wind")
    assert "12.5 m/s (the maker's rating)" in wind_item["text"]
    weak = copy.deepcopy(spec)
    weak["kit"]["masts"][0]["guy_rope"] = {"working_load_n": 5}
    o = next(x for x in plan(weak)["options"] if x["mast"] is not None)
    assert any("each guy of M1 may carry" in w and "5 N" in w for w in o["warnings"])


def test_wind_and_ice_raise_the_tension(demo):
    calm = _first(_with(demo, design_wind_m_s=0))["rigging"]["strength"]
    assert calm["wire_tension_in_wind_n"] == pytest.approx(calm["wire_tension_n"], abs=0.1)
    iced = _first(_with(demo, design_wind_m_s=20, ice_mm=10))
    loads = iced["rigging"]["strength"]
    assert loads["ice_mm"] == 10 and loads["wind_from"] == "the kit"
    assert loads["wire_tension_in_wind_n"] > 2 * loads["wire_tension_n"]


def test_a_wind_beyond_the_wire_names_the_pull_that_holds(demo):
    o = _first(_with(demo, design_wind_m_s=30))
    (words,) = [w for w in o["warnings"] if w.startswith("in a 30 m/s wind the tied-off wire")]
    most = float(words.split("pull no more than ")[1].split(" N")[0])
    assert 20 < most < 60  # the demo pulls 60 N
    again = _first(_with(demo, design_wind_m_s=30, tension_n=most))["rigging"]["strength"]
    # at that pull the wire in the same wind stays within what it may carry (shown to 1 N)
    assert again["wire_tension_in_wind_n"] <= again["wire_working_n"] + 1.0
    stormy = _first(_with(demo, design_wind_m_s=50))
    assert any("no pull that holds the wire up" in w for w in stormy["warnings"])


def test_500_m_of_rg58_warns_and_the_choke_is_in_the_checklist(demo):
    spec = copy.deepcopy(demo)
    spec["kit"]["coax"]["length_m"] = 500
    spec["channels_mhz"] = [3.605]
    o = _first(spec)
    loss = [w for w in o["warnings"] if w.startswith("the feedline loses")]
    assert len(loss) == 1 and "11.3 dB" in loss[0] and "LMR-400 class" in loss[0]
    assert o["feedline"]["total_loss_db"] == pytest.approx(11.3, abs=0.05)
    choke = next(i for i in o["safety"]["checklist"] if i["id"] == "pre-choke")
    assert choke["stage"] == "pre-raise" and "SWR" in choke["text"] and "feedpoint" in choke["text"]
    assert "at the feedpoint" in o["cut"]["choke_advice"] and "trim" in o["cut"]["choke_advice"]


BAD = [
    (("wire", "temper"), "medium", "kit.wire.temper"),
    (("wire", "stranded"), "yes", "kit.wire.stranded"),
    (("rope", "working_load_n"), -5, "kit.rope.working_load_n"),
    (("weak_link_n",), "strong", "kit.weak_link_n"),
    (("design_wind_m_s",), 100, "kit.design_wind_m_s"),
    (("ice_mm",), -1, "kit.ice_mm"),
    (("masts", 0, "wind_limit_m_s"), 0, "kit.masts[0].wind_limit_m_s"),
    (("masts", 0, "diameter_mm"), 1, "kit.masts[0].diameter_mm"),
    (("masts", 0, "guy_rope"), "nylon", "kit.masts[0].guy_rope"),
    (("masts", 0, "guy_rope"), {}, "kit.masts[0].guy_rope"),
    (("masts", 0, "guy_rope"), {"strength": 3}, "kit.masts[0].guy_rope.strength"),
    (("masts", 0, "guy_rope"), {"working_load_n": 0}, "kit.masts[0].guy_rope.working_load_n"),
]


@pytest.mark.parametrize(("path", "value", "field"), BAD, ids=[b[2] + "=" + str(b[1]) for b in BAD])
def test_bad_strength_input_names_its_field(one_tree, path, value, field):
    spec = copy.deepcopy(one_tree)
    node = spec["kit"]
    for key in path[:-1]:
        node = node[key]
    node[path[-1]] = value
    with pytest.raises(InputError) as e:
        plan(spec)
    assert e.value.field == field


def test_temper_is_for_copper_only(one_tree):
    spec = copy.deepcopy(one_tree)
    spec["kit"]["wire"].update(conductor="copper-clad-steel", temper="hard")
    with pytest.raises(InputError) as e:
        plan(spec)
    assert e.value.field == "kit.wire.temper" and "copper wire only" in e.value.detail


def test_a_mast_or_pole_at_an_end_is_not_called_a_branch(demo):
    # found by the lead on a one-oak-and-mast site: the mast at the far end "carried" a branch;
    # the adult's-weight caution is for branches (common practice), a mast has the maker's rating
    s = copy.deepcopy(demo)
    s["form"] = "flat"
    s["kit"]["tension_n"] = 1500
    for sp in s["site"]["supports"]:
        sp["kind"] = "pole" if sp["id"] == "T1" else sp.get("kind", "tree")
    o = _first(s)
    carries = {sid: sp["carries"] for sid, sp in o["rigging"]["loads"].items()}
    assert carries["T1"] == "pole top"
    assert not any("branch of T1" in w for w in o["warnings"])
    # an end pole needs a back guy against the span's pull (common practice)
    assert any(
        w.startswith("the pole T1 takes the wire's pull at its top: 1.5 kN") for w in o["warnings"]
    )
    assert any(
        f"branch of {i}" in w for i, v in carries.items() if v == "branch" for w in o["warnings"]
    )
