"""Supports on the site sketch, and the measuring helpers used on the spot.

The support record and its parser live in :mod:`fieldkit.site` (shared with the safety layer).
"""

from __future__ import annotations

import math

from fieldkit.errors import InputError
from fieldkit.site import SUPPORT_KINDS, Support, parse_supports  # one Support for every layer

__all__ = [
    "SUPPORT_KINDS",
    "Support",
    "clinometer_height_m",
    "distance_m",
    "halyard_rope_m",
    "pace_distance_m",
    "parse_supports",
]

# Rope beyond the up-and-down run at each halyard: a tie-off at the base and a bowline/knot at the
# insulator, 1.5 m together; plus 10 % slack for the route over the branch (common practice).
HALYARD_TIE_OFF_M = 1.5
HALYARD_SLACK_FRACTION = 0.10


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
