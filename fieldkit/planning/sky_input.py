"""The sky block of a plan: one site, one day, one radio.

The block may leave out ``site``, ``date``, ``power_w`` and ``mode``: they come from the plan (the
site's position and UTC offset, the plan's ``date``, the radio). Where it gives them and they
contradict the plan, the plan is refused naming the field — a channel ranked for another place, day or
power would be ranked wrong without a word. Its channels are the plan's, and so is its schedule
unless it has its own.
"""

from __future__ import annotations

import datetime as dt
import math
from collections.abc import Mapping
from dataclasses import replace
from typing import Any

from fieldkit.errors import InputError, join, require_mapping
from fieldkit.safety.duty import Radio
from fieldkit.sky.inputs import SkySpec, parse_sky_spec

SAME_PLACE_KM = 1.0  # a sky estimate is the same within a kilometre (IRI maps are degrees apart)
EARTH_RADIUS_KM = 6371.0  # mean earth radius (IUGG), for the distance between the two positions


def _km(a: tuple[float, float], b: tuple[float, float]) -> float:
    """Great-circle distance between two (lat, lon) positions [km] (haversine)."""
    la1, lo1, la2, lo2 = (math.radians(v) for v in (*a, *b))
    h = (
        math.sin((la2 - la1) / 2) ** 2
        + math.cos(la1) * math.cos(la2) * math.sin((lo2 - lo1) / 2) ** 2
    )
    return 2 * EARTH_RADIUS_KM * math.asin(min(1.0, math.sqrt(h)))


def _site(sky: dict[str, Any], site: Mapping[str, Any]) -> None:
    here = (site.get("lat_deg"), site.get("lon_deg"))
    if "site" not in sky:
        for key in ("lat_deg", "lon_deg"):
            if site.get(key) is None:
                raise InputError(
                    join("site", key),
                    "required with a sky block that gives no site: the site's latitude and "
                    "longitude in degrees",
                )
        sky["site"] = {"lat_deg": here[0], "lon_deg": here[1]}
        if site.get("utc_offset_h") is not None:
            sky["site"]["utc_offset_h"] = site["utc_offset_h"]
        return
    given = dict(require_mapping(sky["site"], "sky.site"))
    if None not in here and "lat_deg" in given and "lon_deg" in given:
        there = (given["lat_deg"], given["lon_deg"])
        if all(isinstance(v, int | float) for v in there):
            d = _km(here, there)
            if d > SAME_PLACE_KM:
                key = "lat_deg" if abs(there[0] - here[0]) >= abs(there[1] - here[1]) else "lon_deg"
                raise InputError(
                    join("sky.site", key),
                    f"the sky block's site ({there[0]:g}, {there[1]:g}) is {d:,.0f} km from the "
                    f"plan's site ({here[0]:g}, {here[1]:g}): a plan is for one place — leave "
                    "sky.site out (it comes from the plan's site) or correct it",
                    value=list(there),
                )
    if site.get("utc_offset_h") is not None:
        if "utc_offset_h" not in given:
            given["utc_offset_h"] = site["utc_offset_h"]
        elif given["utc_offset_h"] != site["utc_offset_h"]:
            raise InputError(
                "sky.site.utc_offset_h",
                f"{given['utc_offset_h']!r} h, but the plan's site says {site['utc_offset_h']!r} h: "
                "leave it out (it comes from the site)",
                value=given["utc_offset_h"],
            )
    sky["site"] = given


def _same(sky: dict[str, Any], key: str, plan_value: Any, words: str) -> None:
    """Take the plan's value, or refuse a different one naming ``sky.<key>``."""
    if key not in sky:
        sky[key] = plan_value
    elif (
        type(sky[key]) in (int, float)
        and sky[key] != plan_value
        or (isinstance(sky[key], str) and sky[key] != plan_value)
    ):
        raise InputError(
            join("sky", key),
            f"{sky[key]!r}, but the plan's {words} is {plan_value!r}: leave it out (it comes from "
            "the plan) or make them the same",
            value=sky[key],
        )


def parse_plan_sky(
    value: Any,
    *,
    site: Mapping[str, Any],
    date: dt.date | None,
    radio: Radio,
    channels_mhz: list[float],
    schedule=None,
) -> SkySpec | None:
    """The sky block decoded by the sky layer, with what it inherits from the plan.

    Parameters
    ----------
    value : the raw ``sky`` block (or None)
    site : the plan's raw site (``lat_deg``, ``lon_deg``, ``utc_offset_h``)
    date : the plan's ``date`` (UTC day), or None
    radio : the plan's radio (power and mode)
    channels_mhz : the plan's channels [MHz]
    schedule : the plan's window (``PlanSchedule``, with ``for_sky()``), or None

    Raises
    ------
    InputError
        A field the plan should give is missing, or one the block gives contradicts the plan; the
        sky layer's own errors, named under ``sky``.
    """
    if value is None:
        return None
    sky = dict(require_mapping(value, "sky"))
    _site(sky, site)
    if "date" not in sky and date is None:
        raise InputError(
            "sky.date", "required: the UTC day as YYYY-MM-DD (here or as the plan's date)"
        )
    if date is not None:
        _same(sky, "date", date.isoformat(), "date")
    _same(sky, "power_w", radio.power_w, "radio.power_w")
    _same(sky, "mode", radio.mode, "radio.mode")
    sky["channels_mhz"] = channels_mhz
    try:
        parsed = parse_sky_spec(sky)
    except InputError as e:
        raise InputError(join("sky", e.field), e.detail, value=e.value) from None
    if schedule is not None and "schedule" not in sky:
        parsed = replace(parsed, schedule=schedule.for_sky())
    return parsed
