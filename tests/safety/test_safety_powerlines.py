"""Power-line clearance on hand-made sketches; hazard validation.

Rules: fall rule — if anything falls, no part within 10 ft (3.048 m) of the line (US amateur licence
question pool 2022–2026); approach distance 10 ft up to 50 kV + 4 in per 10 kV above
(29 CFR 1910.333(c)(3)(i)(A)). Distances below are worked by hand on each sketch.
"""

import numpy as np
import pytest

from fieldkit.errors import InputError
from fieldkit.safety.hazards import Path, PowerLine, parse_hazards
from fieldkit.safety.powerlines import (
    LINE_CLEARANCE_M,
    Rig,
    RiggedSupport,
    approach_distance_m,
    line_clearances,
    line_summary,
)

LINE = PowerLine(points_m=np.array([[-200.0, -38.0], [200.0, -38.0]]), height_m=8.5)


def _rig(y_t2: float, h_t2: float = 10.0) -> Rig:
    """A flat dipole from T1 (−24, 6) at 12 m to T2 (21, y) — sketch of the demo clearing."""
    a = np.array([-22.0, 6.0, 12.0])
    b = np.array([19.0, y_t2, h_t2])
    wire = np.array([a, (a + b) / 2 - [0, 0, 1.5], b])
    return Rig(
        wire_m=wire,
        feed_m=wire[1],
        supports=(
            RiggedSupport("T1", "tree", -24.0, 6.0, 13.5, 12.0, a),
            RiggedSupport("T2", "tree", 21.0, y_t2, h_t2, h_t2, b),
        ),
    )


def test_ten_feet_is_3_048_m():
    # 10 ft × 0.3048 m/ft (exact) — REFERENCES.md "3.05 m"
    assert abs(LINE_CLEARANCE_M - 3.048) < 1e-12


@pytest.mark.parametrize(
    ("kv", "metres"),
    [
        (None, 3.048),  # unknown: taken as ≤ 50 kV
        (20, 3.048),
        (50, 3.048),
        (60, 3.048 + 0.1016),  # 29 CFR 1910.333(c)(3): +4 in per 10 kV over 50
        (55, 3.048 + 0.1016),  # a part of 10 kV counts as a step (conservative reading)
        (138, 3.048 + 9 * 0.1016),
    ],
)
def test_approach_distance(kv, metres):
    assert approach_distance_m(kv) == pytest.approx(metres)


def test_demo_clearing_is_clear():
    # T2 at y = −3 is 35 m from the line (y = −38); it falls 10 m: needs 13.05 m (hand sketch)
    cl = line_clearances(0, LINE, _rig(-3.0))
    by = {c.object: c for c in cl}
    assert by["support T2"].distance_m == pytest.approx(35.0)
    assert by["support T2"].required_m == pytest.approx(10 + 3.048)
    assert all(c.ok for c in cl)
    text = line_summary(0, LINE, _rig(-3.0), cl)
    assert "nearest support T2 is 35.0 m" in text and text.endswith("clear")
    assert "south" in text


def test_support_exactly_at_the_limit_passes_and_just_inside_fails():
    # support of 10 m whose base is 13.048 m from the line: exactly at the fall-rule limit
    y_limit = -38.0 + 10.0 + 3.048
    at = {c.object: c for c in line_clearances(0, LINE, _rig(y_limit))}["support T2"]
    assert at.distance_m == pytest.approx(13.048)
    assert at.ok
    inside = {c.object: c for c in line_clearances(0, LINE, _rig(y_limit - 0.01))}["support T2"]
    assert not inside.ok
    assert "TOO CLOSE" in inside.why


def test_wire_rule_uses_each_points_own_height():
    # T2 end low at 4 m but 8 m from the line: support (falls 4 m, needs 7.05) ok; the wire end at 4 m
    # needs 7.05 m: ok; a 10 m T1-side wire 44 m away is fine (hand sketch)
    cl = {c.object: c for c in line_clearances(0, LINE, _rig(-30.0, h_t2=4.0))}
    assert cl["support T2"].ok and cl["wire"].ok
    assert cl["wire"].distance_m == pytest.approx(8.0, abs=0.01)
    # same end at 6 m height: needs 9.05 m > 8 m → the wire (and the support) fail
    cl = {c.object: c for c in line_clearances(0, LINE, _rig(-30.0, h_t2=6.0))}
    assert not cl["wire"].ok and not cl["support T2"].ok
    assert cl["wire"].required_m == pytest.approx(6.0 + 3.048, abs=0.01)


def test_throw_line_and_approach():
    # T2 rope at 10 m, 12 m from the line: the throw weight can fly 10 m past → needs 13.05 m: fail
    cl = {c.object: c for c in line_clearances(0, LINE, _rig(-26.0))}
    assert not cl["throw line at T2"].ok
    # approach in 3-D: T2's halyard runs from 0 to 10 m at (21, −26); the conductor at (21, −38, 8.5)
    # is level with the halyard's 8.5 m point: 12.0 m (hand sketch)
    assert cl["people and handled objects"].distance_m == pytest.approx(12.0, abs=0.01)
    assert cl["people and handled objects"].ok


def test_crossing_line_fails_everything():
    # the line runs right under the wire
    line = PowerLine(points_m=np.array([[0.0, -100.0], [0.0, 100.0]]), height_m=7.0)
    cl = {c.object: c for c in line_clearances(0, line, _rig(-3.0))}
    assert cl["wire"].distance_m == pytest.approx(0.0, abs=0.06)
    assert not cl["wire"].ok
    # the sagging centre is at 9.5 m, the line at 7 m: 2.5 m, inside the approach distance
    assert not cl["people and handled objects"].ok


def test_parse_hazards_ok():
    hz = parse_hazards(
        [
            {
                "kind": "power_line",
                "points_m": [[-200, -38], [200, -38]],
                "height_m": 8.5,
                "note": "track",
            },
            {"kind": "path", "points_m": [[0, -38], [0, 40]]},
        ]
    )
    assert isinstance(hz[0], PowerLine) and hz[0].height_m == 8.5 and hz[0].voltage_kv is None
    assert isinstance(hz[1], Path)
    assert parse_hazards(None) == [] and parse_hazards([]) == []


@pytest.mark.parametrize(
    ("hazards", "field", "words"),
    [
        (
            [{"kind": "power_line", "points_m": [[0, 0]], "height_m": 8}],
            "site.hazards[0].points_m",
            "at least 2",
        ),
        (
            [{"kind": "power_line", "points_m": [[0, 0], [10, 0]]}],
            "site.hazards[0].height_m",
            "missing",
        ),
        (
            [{"kind": "power_line", "points_m": [[0, 0], [10, 0]], "height_m": -1}],
            "site.hazards[0].height_m",
            "more than 0",
        ),
        (
            [{"kind": "power_line", "points_m": [[0, 0], [0, 0]], "height_m": 8}],
            "site.hazards[0].points_m",
            "coincide",
        ),
        (
            [{"kind": "power_line", "points_m": [[0, 0, 3], [1, 0]], "height_m": 8}],
            "site.hazards[0].points_m[0]",
            "[x_m, y_m]",
        ),
        (
            [{"kind": "power_line", "points_m": [[0, "a"], [1, 0]], "height_m": 8}],
            "site.hazards[0].points_m[0][1]",
            "number",
        ),
        ([{"kind": "volcano", "points_m": [[0, 0], [1, 0]]}], "site.hazards[0].kind", "power_line"),
        ([{"points_m": [[0, 0], [1, 0]]}], "site.hazards[0].kind", "missing"),
        ([{"kind": "power_line", "height_m": 8}], "site.hazards[0].points_m", "missing"),
        (
            [{"kind": "power_line", "points_m": [[0, 0], [1, 0]], "height_m": 8, "hieght": 3}],
            "site.hazards[0].hieght",
            "unknown",
        ),
        (
            [{"kind": "power_line", "points_m": [[0, 0], [1, 0]], "height_m": 8, "voltage_kv": 0}],
            "site.hazards[0].voltage_kv",
            "more than 0",
        ),
        ({"kind": "power_line"}, "site.hazards", "array"),
        (["line"], "site.hazards[0]", "object"),
    ],
)
def test_parse_hazards_errors(hazards, field, words):
    with pytest.raises(InputError) as err:
        parse_hazards(hazards)
    assert err.value.field == field
    assert words in err.value.detail
