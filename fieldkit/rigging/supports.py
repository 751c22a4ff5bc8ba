"""Supports on the site sketch, and the measuring helpers used on the spot.

A support is anything that can hold a rope end at a usable rope height: a tree, a pole, a mast, a
building corner. A support marked unsafe (dead tree, cracked branch) is never used.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from fieldkit.errors import InputError, array, check_keys, join, number, require_mapping, text

SUPPORT_KINDS = ("tree", "mast", "pole", "building", "vehicle", "other")
# Rope beyond the up-and-down run at each halyard: a tie-off at the base and a bowline/knot at the
# insulator, 1.5 m together; plus 10 % slack for the route over the branch (common practice).
HALYARD_TIE_OFF_M = 1.5
HALYARD_SLACK_FRACTION = 0.10


@dataclass(frozen=True)
class Support:
    """One support: id, kind, usable rope height [m], position x (east), y (north) [m], unsafe flag."""

    id: str
    kind: str
    height_m: float
    x_m: float
    y_m: float
    unsafe: bool = False


def parse_supports(value: Any, field: str = "site.supports") -> list[Support]:
    """Validate the site's supports (ids unique; notes allowed and ignored)."""
    items = array(value, field, max_items=40)
    out: list[Support] = []
    seen: set[str] = set()
    for i, item in enumerate(items):
        f = join(field, i)
        obj = require_mapping(item, f)
        check_keys(obj, f, ("id", "kind", "height_m", "x_m", "y_m", "unsafe", "note"))
        for key in ("id", "height_m", "x_m", "y_m"):
            if key not in obj:
                raise InputError(join(f, key), "required")
        sid = text(obj["id"], join(f, "id"), max_length=20)
        if sid in seen:
            raise InputError(join(f, "id"), f"duplicate support id {sid!r}")
        seen.add(sid)
        kind = obj.get("kind", "tree")
        if kind not in SUPPORT_KINDS:
            raise InputError(
                join(f, "kind"), f"expected one of: {', '.join(SUPPORT_KINDS)}; got {kind!r}"
            )
        unsafe = obj.get("unsafe", False)
        if not isinstance(unsafe, bool):
            raise InputError(join(f, "unsafe"), f"expected true or false, got {unsafe!r}")
        out.append(
            Support(
                id=sid,
                kind=kind,
                height_m=number(
                    obj["height_m"], join(f, "height_m"), unit="m", minimum=0.5, maximum=60
                ),
                x_m=number(obj["x_m"], join(f, "x_m"), unit="m", minimum=-5000, maximum=5000),
                y_m=number(obj["y_m"], join(f, "y_m"), unit="m", minimum=-5000, maximum=5000),
                unsafe=unsafe,
            )
        )
    return out


def distance_m(a: Support, b: Support) -> float:
    """Horizontal distance between two supports [m]."""
    return math.hypot(b.x_m - a.x_m, b.y_m - a.y_m)


def clinometer_height_m(*, angle_deg: float, distance_m: float, eye_height_m: float) -> float:
    """Height of a branch from a clinometer reading: h = d·tan(angle) + eye height [m].

    Parameters
    ----------
    angle_deg : elevation angle read on the clinometer to the branch [deg]
    distance_m : horizontal distance from the observer to the trunk [m]
    eye_height_m : the observer's eye height above the tree's base [m]

    References
    ----------
    Right-triangle trigonometry; the usual forestry clinometer method (common practice).
    """
    if not 0 < angle_deg < 90:
        raise InputError("angle_deg", f"expected between 0 and 90 degrees, got {angle_deg:g}")
    if distance_m <= 0:
        raise InputError("distance_m", f"expected more than 0 m, got {distance_m:g}")
    return distance_m * math.tan(math.radians(angle_deg)) + eye_height_m


def pace_distance_m(*, paces: float, pace_length_m: float) -> float:
    """Distance walked: paces × calibrated pace length [m] (pace length from a measured 50 m walk)."""
    if paces <= 0 or pace_length_m <= 0:
        raise InputError("paces", "expected a positive number of paces and pace length")
    return paces * pace_length_m


def halyard_rope_m(*, rope_height_m: float, span_rope_m: float) -> float:
    """Rope for one halyard: up to the branch, out to the end insulator, back down, tie-off, slack [m].

    Parameters
    ----------
    rope_height_m : height of the branch or pulley [m]
    span_rope_m : rope between the branch and the end insulator, in the span [m]
    """
    run = 2 * rope_height_m + span_rope_m + HALYARD_TIE_OFF_M
    return run * (1 + HALYARD_SLACK_FRACTION)
