"""Sites for the rigging tests (not the demo scenario): small plan inputs of each form, and a helper
that runs the rigging layer on them exactly as plan() does, without the safety block."""

from __future__ import annotations

import copy

from fieldkit.planning.inputs import parse_plan
from fieldkit.rigging.cut import EngineCounter
from fieldkit.rigging.layouts import inverted_v_layouts, span_layouts
from fieldkit.rigging.options import Warm, finish, screen
from fieldkit.rigging.rigged import rigged_json

BARE = {"diameter_mm": 2.0, "conductor": "copper"}
JACKETED = {
    "diameter_mm": 1.6,
    "conductor": "copper",
    "insulation": {"thickness_mm": 0.7, "relative_permittivity": 3.5},
}


def spec(*, supports, channel_mhz, ground="average", wire=None, masts=(), tension_n=60.0):
    return {
        "site": {"ground": ground, "supports": supports, "hazards": []},
        "channels_mhz": [channel_mhz],
        "form": "auto",
        "kit": {
            "wire": copy.deepcopy(wire or BARE),
            "coax": {"class": "rg-58", "length_m": 25},
            "feedpoint_mass_kg": 0.35,
            "masts": list(masts),
            "rope": {"length_m": 200, "diameter_mm": 4},
            "tension_n": tension_n,
        },
        "radio": {"power_w": 100, "mode": "ssb"},
    }


def two_trees(span_m, h1, h2=None):
    return [
        {"id": "A", "kind": "tree", "height_m": h1, "x_m": -span_m / 2, "y_m": 0},
        {
            "id": "B",
            "kind": "tree",
            "height_m": h1 if h2 is None else h2,
            "x_m": span_m / 2,
            "y_m": 0,
        },
    ]


def rig(spec_obj, form):
    """The finished option of the given form (first layout of that form) and the engine counter."""
    inp = parse_plan(spec_obj)
    engine = EngineCounter()
    warm = Warm({})
    if form == "inverted-v":
        layouts = inverted_v_layouts(inp.supports, inp.masts, inp.kit.mech, site_xy=inp.mast_xy)
    else:
        layouts = [
            lay
            for lay in span_layouts(inp.supports, inp.kit.mech, forms={form})
            if lay.form == form
        ]
    lay = layouts[0]
    sc = screen(lay, frequency_hz=inp.channels_hz[0], kit=inp.kit, engine=engine, warm=warm)
    return rigged_json(finish(sc, kit=inp.kit, engine=engine, warm=warm), inp.kit), engine, inp
