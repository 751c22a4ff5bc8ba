"""Through the planner: an option that breaks a clearance rule is never recommended first."""

import pytest

from fieldkit.planning import plan

SPEC = {
    "site": {
        "ground": "perfect",
        "supports": [
            {"id": "T1", "kind": "tree", "height_m": 11, "x_m": -21, "y_m": 0},
            {"id": "T2", "kind": "tree", "height_m": 11, "x_m": 21, "y_m": 0},
            # T5 stands 6 m from the line; falling 11 m it needs 14.05 m (fall rule, question pool)
            {"id": "T5", "kind": "tree", "height_m": 11, "x_m": 21, "y_m": -14},
        ],
        "hazards": [{"kind": "power_line", "points_m": [[-200, -20], [200, -20]], "height_m": 8.0}],
    },
    "channels_mhz": [3.79],
    "form": "flat",
    "kit": {
        "wire": {"diameter_mm": 1.6, "conductor": "copper"},
        "coax": {"class": "rg-58", "length_m": 25},
        "feedpoint_mass_kg": 0.35,
        "masts": [],
        "rope": {"length_m": 60},
        "tension_n": 60,
    },
    "radio": {"power_w": 100, "mode": "ssb"},
}


@pytest.fixture(scope="module")
def result():
    return plan(SPEC)


def test_violating_option_is_never_first(result):
    options = result["options"]
    flags = [o["safety"]["raise_ok"] for o in options]
    assert flags[0] is True
    assert flags == sorted(flags, reverse=True)  # every "do not raise" after every raisable one
    bad = [o for o in options if "T5" in o["supports_used"]]
    assert bad and all(o["safety"]["raise_ok"] is False for o in bad)
    assert any("T5" in r and "TOO CLOSE" in r for r in bad[0]["safety"]["reasons"])


def test_every_option_carries_a_full_safety_block(result):
    for o in result["options"]:
        s = o["safety"]
        assert {"limit_set", "keep_out_m", "keep_out_outline_m", "min_end_height_m"} <= set(s)
        assert {"clearances", "raise_ok", "checklist", "cautions"} <= set(s)
        ids = {it["id"] for it in s["checklist"]}
        assert "pre-power-line-0" in ids and "after-swr-check" in ids
