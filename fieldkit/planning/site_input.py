"""The room the site gives the rig (issue 13): the lowest the wire may hang, the clearing's radius,
where the centre mast stands, and every support as a trunk to keep off — decoded once into the
rigging layer's :class:`fieldkit.rigging.clearing.SiteLimits`. The fields live in the plan's site
table (:data:`ROOM`, read here and by the API's schema)."""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from typing import Any

from fieldkit.errors import InputError, array, join
from fieldkit.fields import Record, num
from fieldkit.readable import given_both
from fieldkit.rigging.clearing import SiteLimits
from fieldkit.rigging.heights import LOWEST_END_HEIGHT_M, MIN_END_HEIGHT_M
from fieldkit.site import POSITION_RANGE_M, Support

MAX_MIN_END_HEIGHT_M = 30.0  # higher than any end a throw line places
ROOM = (
    num(
        "min_end_height_m",
        "m",
        LOWEST_END_HEIGHT_M,
        MAX_MIN_END_HEIGHT_M,
        description=(
            f"the lowest a wire end or the feedpoint may hang; default {MIN_END_HEIGHT_M:g} m "
            "(below that the wire is within reach: the plan says so and the safety block shows "
            "the zone to fence)"
        ),
    ),
    num(
        "clearing_radius_m",
        "m",
        0.0,
        POSITION_RANGE_M[1],
        exclusive_minimum=True,
        nullable=True,
        description="stakes, the centre mast and an inverted-V's wire stay this close to the site origin",
    ),
    num(
        "mast_xy_m",
        "m",
        *POSITION_RANGE_M,
        many=True,
        nullable=True,
        schema={"minItems": 2, "maxItems": 2},
        description="[x, y]: where the centre mast stands (default: a point clear of every trunk)",
    ),
)
_ROOM = Record("Room", ROOM)


def _xy(value: Any, field: str) -> tuple[float, float]:
    items = array(value, field, min_items=2, max_items=2)
    f = _ROOM.field("mast_xy_m")
    x, y = (f.read_number(v, join(field, i)) for i, v in enumerate(items))
    return float(x), float(y)


def parse_site_limits(
    site: Mapping[str, Any], supports: Sequence[Support], *, rope_length_m: float | None
) -> SiteLimits:
    """``site.min_end_height_m`` (default 3, at least 1.5), ``site.clearing_radius_m``,
    ``site.mast_xy_m`` ([x, y]); the supports' ``trunk_radius_m`` (default by kind)."""
    lowest = _ROOM.number(site, "site", "min_end_height_m", MIN_END_HEIGHT_M)
    radius = None
    if site.get("clearing_radius_m") is not None:
        radius = _ROOM.number(site, "site", "clearing_radius_m")
    mast_xy = None
    if site.get("mast_xy_m") is not None:
        mast_xy = _xy(site["mast_xy_m"], "site.mast_xy_m")
        if radius is not None and math.hypot(*mast_xy) > radius:
            raise InputError(
                "site.mast_xy_m",
                f"({mast_xy[0]:g}, {mast_xy[1]:g}) m is outside the clearing, which reaches "
                f"{given_both(radius)} from the site origin",
                value=list(mast_xy),
            )
    return SiteLimits.for_supports(
        supports,
        min_end_height_m=float(lowest),
        clearing_radius_m=radius,
        mast_xy_m=mast_xy,
        rope_length_m=rope_length_m,
    )
