"""The `fieldkit model` JSON contract (ARCHITECTURE.md) and its refusals of bad input."""

from __future__ import annotations

import copy
import json
import subprocess
import sys

import pytest

from fieldkit.antenna import model_json
from fieldkit.errors import InputError
from fieldkit.paths import assets_dir

BASE = {
    "frequency_mhz": 3.6,
    "ground": "perfect",
    "wires": [
        {
            "points_m": [[-20, 0, 8], [20, 0, 8]],
            "diameter_mm": 2.0,
            "conductor": "copper",
            "insulation": {"thickness_mm": 0.8, "relative_permittivity": 3.5},
        }
    ],
    "feed": {"wire": 0, "distance_m": 20.0},
    "power_w": 100,
    "reference_impedance_ohm": 50,
    "pattern": {"elevation_deg": [90, 85, 80], "azimuth_deg": [0, 90]},
    "near_field": {"points_m": [[0, 0, 1.8], [20, 0, 1.8]]},
}


def test_contract_fields_present():
    out = model_json(copy.deepcopy(BASE))
    (r,) = out["results"]
    for key in (
        "frequency_mhz",
        "impedance_ohm",
        "swr",
        "radiation_efficiency",
        "gain_dbi",
        "zenith_gain_dbi",
        "max_gain_dbi",
        "max_gain_elevation_deg",
        "beamwidth_deg",
        "near_field",
    ):
        assert key in r
    assert set(r["impedance_ohm"]) == {"r", "x"}
    assert len(r["gain_dbi"]) == 2 and len(r["gain_dbi"][0]) == 3  # [i_azimuth][i_elevation]
    assert set(r["beamwidth_deg"]) >= {"broadside", "along_wire"}
    assert len(r["near_field"]["e_v_per_m"]) == 2 and len(r["near_field"]["h_a_per_m"]) == 2
    json.dumps(out)


def test_array_and_frequencies():
    a = copy.deepcopy(BASE)
    a.pop("frequency_mhz")
    a["frequencies_mhz"] = [3.5, 3.6, 3.7]
    out = model_json([a, copy.deepcopy(BASE)])
    assert isinstance(out, list) and len(out) == 2
    assert [r["frequency_mhz"] for r in out[0]["results"]] == [3.5, 3.6, 3.7]


def test_insulation_lowers_resonance():
    # Richmond & Newman 1976: a jacket adds series inductance → reactance rises at a fixed frequency
    bare = copy.deepcopy(BASE)
    del bare["wires"][0]["insulation"]
    x_bare = model_json(bare)["results"][0]["impedance_ohm"]["x"]
    x_jacket = model_json(copy.deepcopy(BASE))["results"][0]["impedance_ohm"]["x"]
    assert x_jacket > x_bare + 1.0


def _set(spec, path, value):
    target = spec
    for key in path[:-1]:
        target = target[key]
    if value is KeyError:
        del target[path[-1]]
    else:
        target[path[-1]] = value


BAD = [
    (("frequency_mhz",), 0.05, "frequency_mhz"),
    (("frequency_mhz",), "3.6", "frequency_mhz"),
    (("ground",), "swamp", "ground"),
    (("ground",), {"relative_permittivity": 13}, "ground.conductivity_s_m"),
    (("wires", 0, "diameter_mm"), 0, "wires[0].diameter_mm"),
    (("wires", 0, "conductor"), "gold", "wires[0].conductor"),
    (("wires", 0, "colour"), "red", "wires[0].colour"),
    (("wires", 0, "points_m"), [[0, 0, 8], [0, 0, 8]], "wires[0].points_m[1]"),
    (("wires", 0, "points_m"), [[-20, 0, 8], [20, 0, -1]], "wires[0].points_m[1]"),
    (("wires", 0, "points_m"), [[-20, 0, 8], [20, 0]], "wires[0].points_m[1]"),
    (("feed", "distance_m"), 55.0, "feed.distance_m"),
    (("feed", "wire"), 3, "feed.wire"),
    (("power_w",), -1, "power_w"),
    (("pattern", "elevation_deg"), [95], "pattern.elevation_deg[0]"),
    (("near_field", "points_m"), [[0, 0, -2]], "near_field.points_m[0]"),
    (("extra",), 1, "extra"),
    (("wires",), KeyError, "wires"),
    (("wires", 0, "points_m"), [[-20, 0, 8], [20, 0, 8], [20.001, 0, 8]], "wires[0].points_m[2]"),
    (("frequency_mhz",), 60.0, "wires"),  # 40 m at 60 MHz needs more than MAX_SEGMENTS
]


@pytest.mark.parametrize(("path", "value", "field"), BAD)
def test_bad_input_names_the_field(path, value, field):
    spec = copy.deepcopy(BASE)
    _set(spec, path, value)
    with pytest.raises(InputError) as err:
        model_json(spec)
    assert err.value.field == field, str(err.value)


def test_overlapping_wires_refused():
    spec = copy.deepcopy(BASE)
    spec["wires"].append({"points_m": [[0, -5, 8], [0, 5, 8]], "diameter_mm": 2.0})
    with pytest.raises(InputError, match="overlaps or crosses") as err:
        model_json(spec)
    assert err.value.field.startswith("wires[1]")


def test_array_errors_carry_the_index():
    bad = copy.deepcopy(BASE)
    bad["wires"][0]["diameter_mm"] = -1
    with pytest.raises(InputError) as err:
        model_json([copy.deepcopy(BASE), bad])
    assert err.value.field == "[1].wires[0].diameter_mm"


def test_module_entry_point_runs_demo_and_exits_2_on_bad_input():
    demo = assets_dir() / "demo" / "dipole-model.json"  # poor ground
    ok = subprocess.run(
        [sys.executable, "-m", "fieldkit.antenna", str(demo)],
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert ok.returncode == 0, ok.stderr
    assert json.loads(ok.stdout)["results"][0]["impedance_ohm"]["r"] > 0
    bad = subprocess.run(
        [sys.executable, "-m", "fieldkit.antenna", "-"],
        input='{"ground": 1}',
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert bad.returncode == 2 and bad.stderr.count("\n") == 1
