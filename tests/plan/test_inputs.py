"""The plan input decoded once into typed records: one Support for rigging and safety, typed radio,
hazards, limit set, schedule, sky and re-trim; the same refusals wherever a support is read."""

import json

import pytest

import fieldkit.rigging.supports
import fieldkit.safety.block
from fieldkit.errors import InputError
from fieldkit.paths import assets_dir
from fieldkit.planning import parse_plan
from fieldkit.safety import safety_block
from fieldkit.safety.duty import Radio
from fieldkit.safety.hazards import PowerLine
from fieldkit.site import Support
from tests.rigging.cases import spec, two_trees


def _demo():
    with open(assets_dir() / "demo" / "larch-basin-plan.json") as fh:
        return json.load(fh)


def test_one_support_type_for_every_layer():
    assert fieldkit.rigging.supports.Support is Support
    assert fieldkit.safety.block.Support is Support
    inp = parse_plan(_demo())
    assert all(type(s) is Support for s in inp.supports)
    assert [s.id for s in inp.supports if s.unsafe] == ["T3"]


def test_the_demo_input_decodes_into_typed_values():
    inp = parse_plan(_demo())
    assert isinstance(inp.radio, Radio) and inp.radio.power_w == 100.0 and inp.radio.mode == "ssb"
    assert len(inp.hazards) == 1 and isinstance(inp.hazards[0], PowerLine)
    assert inp.hazards[0].height_m == 8.5
    assert inp.limit_set == "fcc-uncontrolled"
    assert inp.channels_hz == (3.605e6, 3.79e6, 5.3715e6, 7.055e6, 7.185e6)
    # the sky block is decoded by the sky layer on the plan's channels and the plan's window
    assert inp.sky.channels_mhz == (3.605, 3.79, 5.3715, 7.055, 7.185)
    assert (inp.sky.schedule.start_utc_h, inp.sky.schedule.end_utc_h) == (16.0, 20.0)
    assert inp.schedule.start_text == "16:00" and inp.retrim is None


@pytest.mark.parametrize(
    ("change", "field"),
    [
        ({"id": "T" * 21}, "site.supports[0].id"),
        ({"height_m": 0.2}, "site.supports[0].height_m"),
        ({"kind": "cliff"}, "site.supports[0].kind"),
        ({"unsafe": "yes"}, "site.supports[0].unsafe"),
        ({"colour": "green"}, "site.supports[0].colour"),
    ],
)
def test_plan_and_safety_refuse_a_support_alike(change, field):
    s = spec(supports=two_trees(40, 10.0), channel_mhz=7.1, ground="perfect")
    s["site"]["supports"][0].update(change)
    with pytest.raises(InputError) as by_plan:
        parse_plan(s)
    option = {
        "frequency_mhz": 7.1,
        "supports_used": ["A", "B"],
        "hung_wire_m": [[-10, 0, 9], [0, 0, 8], [10, 0, 9]],
        "feed_distance_m": 10.05,
        "wire": {"diameter_mm": 2.0, "conductor": "copper"},
    }
    with pytest.raises(InputError) as by_safety:
        safety_block(option=option, site=s["site"], radio=s["radio"], ground="perfect")
    assert by_plan.value.field == by_safety.value.field == field
    assert by_plan.value.detail == by_safety.value.detail


def test_a_sky_error_is_named_under_sky():
    s = _demo()
    s["sky"]["solar"] = {"f107": 1000}
    with pytest.raises(InputError) as e:
        parse_plan(s)
    assert e.value.field == "sky.solar.f107"


def test_the_window_needs_both_ends_with_a_sky_block():
    s = _demo()
    s["schedule"] = {"start_utc": "16:00"}
    with pytest.raises(InputError) as e:
        parse_plan(s)
    assert e.value.field == "schedule.end_utc"
    s.pop("sky")
    assert parse_plan(s).schedule.end_text is None  # without a sky the window is context only


def test_a_missing_field_says_what_to_give_and_in_which_unit():
    # found planning a one-mast site: "kit.masts[0].top_load_kg: required" did not say what it is
    s = spec(supports=two_trees(40, 10.0), channel_mhz=7.1, ground="perfect")
    s["kit"]["masts"] = [{"id": "M1", "height_m": 9}]
    with pytest.raises(InputError) as e:
        parse_plan(s)
    assert e.value.field == "kit.masts[0].top_load_kg"
    assert e.value.detail == "required: the maker's top-load rating in kg"
