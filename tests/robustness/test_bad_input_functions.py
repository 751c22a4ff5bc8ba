"""Bad input straight into the calculators: ``model_json``, ``sky_json`` and ``plan``.

Property: whatever the input, the call ends in a result with no NaN or infinity anywhere and that
serialises as strict JSON (RFC 8259 has no NaN), or in an :class:`InputError` that names a field
and says what is expected — never another exception, never longer than :data:`BOUND_S`.
"""

from __future__ import annotations

import copy
import json
import time

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from fieldkit.antenna import model_json
from fieldkit.errors import InputError
from fieldkit.planning import plan
from fieldkit.sky import sky_json
from tests.robustness import strategies as hs
from tests.robustness.helpers import DIPOLE, SMALL_PLAN, non_finite_paths

BOUND_S = 30.0  # per call, on the shared 2-core test machine (docs/robustness.md)
SKY = {
    "site": {"lat_deg": 46.8, "lon_deg": 8.2, "ground": "perfect"},
    "date": "2026-12-01",
    "solar": {"f107": 120},
    "channels_mhz": [3.605, 7.055],
}
MODEL_FULL = {
    **DIPOLE,
    "power_w": 100,
    "reference_impedance_ohm": 50,
    "pattern": {"elevation_deg": [90, 60, 30], "azimuth_deg": [0, 90]},
    "near_field": {"points_m": [[0, 0, 1.8], [20, 0, 1.8]]},
}
FAST = settings(
    max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow], derandomize=True
)
TRIED: dict[str, int] = {}


def holds(fn, value, name: str):
    """The property; returns the result or the error for further checks."""
    TRIED[name] = TRIED.get(name, 0) + 1
    start = time.perf_counter()
    try:
        out = fn(copy.deepcopy(value))
    except InputError as exc:
        assert isinstance(exc.field, str), exc
        # the one nameless field is a key that is itself the empty string (errors.check_keys)
        assert exc.field or exc.detail.startswith("unknown field"), exc
        assert isinstance(exc.detail, str) and exc.detail.strip(), exc
        assert "Traceback" not in exc.detail
        json.dumps(exc.to_json(), allow_nan=False)
        return exc
    finally:
        assert time.perf_counter() - start < BOUND_S, value
    assert non_finite_paths(out) == [], non_finite_paths(out)
    json.dumps(out, allow_nan=False)
    return out


@FAST
@given(hs.mutated(MODEL_FULL))
def test_model_mutations(spec):
    holds(model_json, spec, "model")


@FAST
@given(hs.hostile)
def test_model_anything_at_all(value):
    out = holds(model_json, value, "model")
    assert isinstance(out, InputError)  # no random value is a whole valid spec


@pytest.mark.slow
@settings(max_examples=100, deadline=None, derandomize=True)
@given(
    st.lists(
        st.fixed_dictionaries(
            {
                "x": st.floats(-1e4, 1e4),
                "y": st.floats(-1e4, 1e4),
                "z": st.floats(-10, 1e4),
            }
        ),
        min_size=2,
        max_size=6,
    ),
    st.floats(0.1, 60),
    st.sampled_from([0.01, 0.5, 2.0, 50.0, 100.0]),
    st.sampled_from(["free-space", "perfect", "average", "sea-water"]),
)
def test_model_random_geometry(points, frequency_mhz, diameter_mm, ground):
    """Random polylines at random frequencies: in the ground, too long, too short, folded back."""
    pts = [[p["x"], p["y"], p["z"]] for p in points]
    total = sum(
        sum((a - b) ** 2 for a, b in zip(p, q, strict=True)) ** 0.5
        for p, q in zip(pts, pts[1:], strict=False)
    )
    spec = {
        "frequency_mhz": frequency_mhz,
        "ground": ground,
        "wires": [{"points_m": pts, "diameter_mm": diameter_mm}],
        "feed": {"wire": 0, "distance_m": total / 2},
    }
    holds(model_json, spec, "model")


@pytest.mark.parametrize(
    "field, value",
    [
        ("frequency_mhz", float("nan")),
        ("frequency_mhz", 1e308),
        ("frequency_mhz", -3.6),
        ("frequency_mhz", "3.6"),
        ("frequency_mhz", True),
        ("power_w", float("inf")),
        ("power_w", -100),
        ("ground", "lava"),
        ("ground", {"relative_permittivity": float("nan"), "conductivity_s_m": 0.005}),
        ("ground", {"relative_permittivity": -13, "conductivity_s_m": 0.005}),
        ("wires", []),
        ("wires", "a wire"),
        ("feed", {"wire": 5, "distance_m": 20}),
        ("feed", {"wire": 0, "distance_m": -1}),
        ("feed", {"wire": 0.5, "distance_m": 20}),
        ("feed", {"wire": 0, "distance_m": 1e308}),
    ],
)
def test_model_named_refusals(field, value):
    spec = copy.deepcopy(DIPOLE)
    spec[field] = value
    exc = holds(model_json, spec, "model")
    assert isinstance(exc, InputError) and exc.field.startswith(field), exc


def test_model_negative_diameter_and_nan_coordinates_name_the_spot():
    spec = copy.deepcopy(DIPOLE)
    spec["wires"][0]["diameter_mm"] = -2
    assert holds(model_json, spec, "model").field == "wires[0].diameter_mm"
    spec = copy.deepcopy(DIPOLE)
    spec["wires"][0]["points_m"][1][2] = float("nan")
    assert holds(model_json, spec, "model").field == "wires[0].points_m[1][2]"


@settings(max_examples=120, deadline=None, derandomize=True)
@given(hs.mutated(SKY))
def test_sky_mutations(spec):
    holds(sky_json, spec, "sky")


@settings(max_examples=40, deadline=None, derandomize=True)
@given(hs.hostile)
def test_sky_anything_at_all(value):
    assert isinstance(holds(sky_json, value, "sky"), InputError)


@pytest.mark.parametrize(
    "path, value",
    [
        (("site", "lat_deg"), 91),
        (("site", "lat_deg"), float("nan")),
        (("site", "lon_deg"), 1e308),
        (("date",), "2026-02-30"),
        (("date",), "yesterday"),
        (("solar", "f107"), -5),
        (("channels_mhz",), []),
        (("channels_mhz",), [float("inf")]),
        (("channels_mhz",), [3.6] * 10_000),
    ],
)
def test_sky_named_refusals(path, value):
    exc = holds(sky_json, hs.replace_at(SKY, path, value), "sky")
    assert isinstance(exc, InputError) and exc.field.startswith(path[0]), exc


# The plan solves for real: only hostile values here (a valid plan costs seconds); still, where a
# hostile value happens to be acceptable, the plan must finish inside the bound.
BAD_VALUES = st.one_of(
    st.sampled_from(hs.EXTREME_NUMBERS + hs.WEIRD_TEXT),
    st.sampled_from([None, True, [], {}, [[]], hs.deep(60), list(range(5000))]),
)


@pytest.mark.slow
@settings(max_examples=80, deadline=None, derandomize=True)
@given(hs.mutated(SMALL_PLAN, values=BAD_VALUES))
def test_plan_mutations(spec):
    holds(plan, spec, "plan")


@settings(max_examples=60, deadline=None, derandomize=True)
@given(hs.hostile)
def test_plan_anything_at_all(value):
    assert isinstance(holds(plan, value, "plan"), InputError)


@pytest.mark.parametrize(
    "path, value",
    [
        (("site", "supports", 0, "height_m"), -13.5),
        (("site", "supports", 0, "height_m"), float("nan")),
        (("site", "supports", 0, "x_m"), 1e308),
        (("site", "supports"), []),
        (("site", "supports"), [{"id": "T1"}] * 10_000),
        (("site", "hazards"), [{"kind": "power_line", "points_m": [[0, 0]], "height_m": 8}]),
        (("channels_mhz",), [0]),
        (("channels_mhz",), [float("nan")]),
        (("form",), "spiral"),
        (("kit", "wire", "diameter_mm"), 0),
        (("kit", "tension_n"), float("inf")),
        (("radio", "power_w"), -1),
        (("radio", "mode"), "telepathy"),
    ],
)
def test_plan_named_refusals(path, value):
    exc = holds(plan, hs.replace_at(SMALL_PLAN, path, value), "plan")
    assert isinstance(exc, InputError) and exc.field.startswith(path[0]), exc


def test_counts_are_reported():
    """Print how many inputs the properties above tried (the figure in docs/robustness.md)."""
    print(f"\ninputs tried: {TRIED}")
