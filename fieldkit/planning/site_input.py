"""The room the site gives the rig (issue 13): the lowest the wire may hang, the clearing's radius,
where the centre mast stands, and every support as a trunk to keep off — decoded once into the
rigging layer's :class:`fieldkit.rigging.clearing.SiteLimits`."""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

from fieldkit.errors import InputError, array, number
from fieldkit.rigging.clearing import SiteLimits
from fieldkit.rigging.heights import LOWEST_END_HEIGHT_M, MIN_END_HEIGHT_M
from fieldkit.site import POSITION_RANGE_M, Support

ROOM_FIELDS = ("min_end_height_m", "clearing_radius_m", "mast_xy_m")
MAX_MIN_END_HEIGHT_M = (
    30.0  # higher than any end a throw line places (and than the 60 m supports' use)
)
MAX_CLEARING_RADIUS_M = POSITION_RANGE_M[1]


def _xy(value: Any, field: str) -> tuple[float, float]:
    items = array(value, field, min_items=2, max_items=2)
    lo, hi = POSITION_RANGE_M
    x, y = (
        number(v, f"{field}[{i}]", unit="m", minimum=lo, maximum=hi) for i, v in enumerate(items)
    )
    return float(x), float(y)


def parse_site_limits(
    site: Mapping[str, Any], supports: Sequence[Support], *, rope_length_m: float | None
) -> SiteLimits:
    """``site.min_end_height_m`` (default 3, at least 1.5), ``site.clearing_radius_m``,
    ``site.mast_xy_m`` ([x, y]); the supports' ``trunk_radius_m`` (default by kind)."""
    lowest = MIN_END_HEIGHT_M
    if "min_end_height_m" in site:
        lowest = number(
            site["min_end_height_m"],
            "site.min_end_height_m",
            unit="m",
            minimum=LOWEST_END_HEIGHT_M,
            maximum=MAX_MIN_END_HEIGHT_M,
        )
    radius = None
    if site.get("clearing_radius_m") is not None:
        radius = number(
            site["clearing_radius_m"],
            "site.clearing_radius_m",
            unit="m",
            minimum=0.0,
            exclusive_minimum=True,
            maximum=MAX_CLEARING_RADIUS_M,
        )
    mast_xy = None
    if site.get("mast_xy_m") is not None:
        mast_xy = _xy(site["mast_xy_m"], "site.mast_xy_m")
        if radius is not None and (mast_xy[0] ** 2 + mast_xy[1] ** 2) ** 0.5 > radius:
            raise InputError(
                "site.mast_xy_m",
                f"({mast_xy[0]:g}, {mast_xy[1]:g}) m is outside the clearing ({radius:g} m from the "
                "site origin)",
                value=list(mast_xy),
            )
    return SiteLimits.for_supports(
        supports,
        min_end_height_m=float(lowest),
        clearing_radius_m=radius,
        mast_xy_m=mast_xy,
        rope_length_m=rope_length_m,
    )
