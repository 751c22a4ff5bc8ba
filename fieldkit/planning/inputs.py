"""The `fieldkit plan` input decoded once, at the edge, into typed records.

:func:`parse_plan` checks every field and names it in every error (``site.supports[2].height_m``):
the site (supports, hazards, ground), the channels and form, the kit (:mod:`.kit_input`), the radio,
the limit set, the schedule, the re-trim reading and the sky block (decoded by the sky layer's own
parser). Nothing downstream validates the input again.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from fieldkit.errors import InputError, array, choice, join, require_mapping
from fieldkit.fields import Record, arr, nested, num, ref, string
from fieldkit.model_fields import ground_field
from fieldkit.planning.kit_input import KIT, parse_kit
from fieldkit.planning.retrim_input import RETRIM, Retrim, parse_retrim
from fieldkit.planning.site_input import ROOM, parse_site_limits
from fieldkit.planning.sky_input import parse_plan_sky
from fieldkit.rigging.clearing import SiteLimits
from fieldkit.rigging.mast import Mast
from fieldkit.rigging.options import Kit
from fieldkit.safety import LIMIT_SETS, parse_hazards, parse_limit_set, parse_radio
from fieldkit.safety.duty import RADIO, Radio
from fieldkit.safety.hazards import PATH, POWER_LINE, Path, PowerLine
from fieldkit.site import MAX_SUPPORTS, SUPPORT, Support, parse_supports
from fieldkit.sky.inputs import (  # one HF range for plan and sky
    MAX_CHANNEL_MHZ,
    MIN_CHANNEL_MHZ,
    SKY,
    SkySpec,
    parse_date,
    window,
)
from fieldkit.sky.inputs import Schedule as SkySchedule

FORMS = ("flat", "inverted-v", "sloping", "linked", "auto")
PLAN_SKY = SKY.variant(
    "PlanSky",
    optional=("channels_mhz", "site", "date"),
    description=(
        "the sky input; its channels (and, without its own, its schedule) come from the plan; "
        "site, date, power_w and mode may be left out (they come from the plan's site, date and "
        "radio) and are refused naming the field where they contradict them"
    ),
)
DEFAULT_LIMIT_SET = "fcc-uncontrolled"
MAX_CHANNELS = 12
# every pair of usable supports is screened with the engine (~0.4 s a pair on a 2-core laptop):
# 10 supports = 45 pairs keeps a plan within about 30 s (measured: 20 supports took 70 s)
MAX_USABLE_SUPPORTS = 10
MAX_NAME_LENGTH = 200
_HHMM = {"pattern": "^([01][0-9]|2[0-3]):[0-5][0-9]$|^24:00$"}
SITE = Record(
    "PlanSite",
    (
        string("name", schema={"maxLength": MAX_NAME_LENGTH}),
        num("lat_deg", "deg", -90, 90, description="the sky estimate's place (with a sky block)"),
        num("lon_deg", "deg", -180, 180, description="the sky estimate's place (with a sky block)"),
        num("elevation_m", "m", -500, 9000, description="context only"),
        num("utc_offset_h", "h", -12, 14, description="context only"),
        ground_field(
            required=True,
            missing="required: a ground preset name or {relative_permittivity, conductivity_s_m}",
        ),
        arr("supports", SUPPORT, schema={"maxItems": MAX_SUPPORTS}),
        arr(
            "hazards",
            schema={"items": {"oneOf": [ref(POWER_LINE), ref(PATH)]}},
            refers=(POWER_LINE, PATH),
        ),
        *ROOM,
    ),
    "the site sketch: ground, supports, hazards, and the room it gives the rig",
)
SITE_CONTEXT = ("lat_deg", "lon_deg", "elevation_m", "utc_offset_h")
SCHEDULE = Record(
    "PlanSchedule",
    (
        string("start_utc", description="HH:MM", schema=_HHMM),
        string("end_utc", description="HH:MM, 00:00-24:00", schema=_HHMM),
    ),
    "the operating window (UTC); used with the sky block to rank the channels",
)
PLAN = Record(
    "PlanInput",
    (
        string("name", nullable=True, schema={"maxLength": MAX_NAME_LENGTH}),
        nested("site", SITE, required=True),
        num(
            "channels_mhz",
            "MHz",
            MIN_CHANNEL_MHZ,
            MAX_CHANNEL_MHZ,
            required=True,
            many=True,
            schema={"minItems": 1, "maxItems": 12, "uniqueItems": True},
        ),
        string("form", *FORMS, description="default auto"),
        nested("kit", KIT, required=True),
        nested("radio", RADIO, required=True),
        nested("sky", PLAN_SKY, nullable=True),
        nested("schedule", SCHEDULE, nullable=True),
        string("limit_set", *LIMIT_SETS, description=f"default {DEFAULT_LIMIT_SET}"),
        nested("retrim", RETRIM, nullable=True),
        string(
            "date",
            nullable=True,
            schema={"format": "date"},
            description="the UTC day of the deployment (YYYY-MM-DD): the sky block's, unless it gives it",
        ),
    ),
    "the `fieldkit plan` input",
)


@dataclass(frozen=True)
class PlanSchedule:
    """The operating window (UTC): "HH:MM" as given and in hours; either end may be missing."""

    start_text: str | None
    end_text: str | None
    start_h: float | None
    end_h: float | None

    def for_sky(self) -> SkySchedule:
        """The window as the sky layer's schedule (both ends needed).

        Raises
        ------
        fieldkit.errors.InputError
            When an end is missing.
        """
        for key, text in (("start_utc", self.start_text), ("end_utc", self.end_text)):
            if text is None:
                raise InputError(
                    join("schedule", key), "required with a sky block: a UTC time as HH:MM"
                )
        return window(self.start_h, self.end_h, None, self.start_text, self.end_text)


@dataclass(frozen=True)
class PlanInput:
    """The whole plan input, decoded (SI units).

    Attributes
    ----------
    name : the deployment's name, or None
    supports : the site's supports (unsafe ones included, never used)
    hazards : power lines and paths on the sketch
    masts : the kit's masts
    channels_hz : the channels [Hz], as given
    form : one of :data:`FORMS`
    kit : what the rigging needs (wire, mechanics, coax, rope, wrap, ground)
    mast_xy : where a centre mast stands: the centroid of the safe supports [m]
    radio : power, mode, transmit fraction
    limit_set : the RF exposure limit set
    sky : the sky layer's decoded input (channels and schedule from the plan), or None
    schedule : the plan's operating window, or None
    retrim : a measured dip or analyser reading, or None
    warnings : defaults used and supports left out, in plain words
    limits : the room the site gives: minimum end height, clearing, the mast's point, trunks, rope
    date : the plan's UTC day, or None
    """

    name: str | None
    supports: tuple[Support, ...]
    hazards: tuple[PowerLine | Path, ...]
    masts: tuple[Mast, ...]
    channels_hz: tuple[float, ...]
    form: str
    kit: Kit
    mast_xy: tuple[float, float]
    radio: Radio
    limit_set: str
    sky: SkySpec | None
    schedule: PlanSchedule | None
    retrim: Retrim | None
    warnings: tuple[str, ...]
    limits: SiteLimits = SiteLimits()
    date: Any = None


def _ground(value: Any):
    from fieldkit.antenna import parse_ground

    g = parse_ground(value, "site.ground")
    # for the words of the height choice ("the very good ground"), never the preset's code
    name = value.replace("-", " ") if isinstance(value, str) else "site's"
    return g, name


@dataclass(frozen=True)
class _Site:
    ground: Any
    ground_name: str
    supports: tuple[Support, ...]
    hazards: tuple[PowerLine | Path, ...]
    raw: Mapping[str, Any]


def _name(value: Any, field: str) -> str | None:
    """A name shown with the plan: a string (or null) of at most 200 characters."""
    if value is not None and (not isinstance(value, str) or len(value) > MAX_NAME_LENGTH):
        raise InputError(field, f"expected a name of at most {MAX_NAME_LENGTH} characters")
    return value


def _site(value: Any) -> _Site:
    site = require_mapping(value, "site")
    SITE.check(site, "site")
    SITE.require(site, "site")
    _name(site.get("name"), "site.name")
    for key in SITE_CONTEXT:
        if key in site:
            SITE.number(site, "site", key)
    ground, name = _ground(site["ground"])
    supports = tuple(parse_supports(site.get("supports", []), "site.supports"))
    hazards = tuple(parse_hazards(site.get("hazards", []), "site.hazards"))
    return _Site(ground, name, supports, hazards, site)


def _channels(value: Any) -> tuple[float, ...]:
    chans = array(value, "channels_mhz", min_items=1, max_items=MAX_CHANNELS)
    channel = PLAN.field("channels_mhz")
    channels = tuple(
        channel.read_number(c, join("channels_mhz", i)) * 1e6 for i, c in enumerate(chans)
    )
    if len(set(channels)) != len(channels):
        raise InputError("channels_mhz", "each channel once, please")
    return channels


def _form(obj: Mapping[str, Any], channels: tuple[float, ...]) -> str:
    form = choice(obj.get("form", "auto"), "form", FORMS)
    if form == "linked" and len(channels) < 2:
        raise InputError("channels_mhz", "a linked dipole needs at least two channels")
    return form


def _utc_hours(value: Any, field: str) -> float:
    """A schedule time "HH:MM" (UTC, 00:00-24:00) -> hours after midnight."""
    ok = isinstance(value, str) and len(value) == 5 and value[2] == ":"
    if ok and value[:2].isdigit() and value[3:].isdigit():
        h, m = int(value[:2]), int(value[3:])
        if (h < 24 and m < 60) or (h == 24 and m == 0):
            return h + m / 60.0
    raise InputError(field, f'expected a UTC time "HH:MM" from 00:00 to 24:00, got {value!r}')


def _schedule(value: Any) -> PlanSchedule | None:
    if value is None:
        return None
    sched = require_mapping(value, "schedule")
    SCHEDULE.check(sched, "schedule")
    hours = {k: _utc_hours(sched[k], join("schedule", k)) for k in SCHEDULE.names if k in sched}
    return PlanSchedule(
        sched.get("start_utc"), sched.get("end_utc"), hours.get("start_utc"), hours.get("end_utc")
    )


def _usable(supports: tuple[Support, ...]) -> tuple[tuple[float, float], list[str]]:
    """Where a centre mast stands, and the warnings about unsafe supports.

    Raises
    ------
    fieldkit.errors.InputError
        When more supports are usable than a plan works out at once.
    """
    safe = [s for s in supports if not s.unsafe]
    if len(safe) > MAX_USABLE_SUPPORTS:
        raise InputError(
            "site.supports",
            f"{len(safe)} usable supports; a plan compares every pair, so at most "
            f"{MAX_USABLE_SUPPORTS} are worked out at once (a plan stays within about 30 s): "
            "remove the supports you will not use or mark them unsafe",
        )
    mast_xy = (0.0, 0.0)
    if safe:
        mast_xy = (sum(s.x_m for s in safe) / len(safe), sum(s.y_m for s in safe) / len(safe))
    return mast_xy, [f"{s.id} is marked unsafe and is not used" for s in supports if s.unsafe]


def parse_plan(spec: Any) -> PlanInput:
    """Decode and check a `fieldkit plan` input (ARCHITECTURE.md), once.

    Raises
    ------
    fieldkit.errors.InputError
        Naming the first bad field and what is expected.
    """
    obj = require_mapping(spec, "")
    PLAN.check(obj, "")
    PLAN.require(obj, "")
    site = _site(obj["site"])
    channels = _channels(obj["channels_mhz"])
    form = _form(obj, channels)
    kit = parse_kit(obj["kit"], ground=site.ground, ground_name=site.ground_name)
    radio = parse_radio(obj["radio"], "radio")
    limit_set = parse_limit_set(obj.get("limit_set", DEFAULT_LIMIT_SET), "limit_set")
    if obj.get("sky") is not None:
        require_mapping(obj["sky"], "sky")
    schedule = _schedule(obj.get("schedule"))
    mast_xy, unsafe_words = _usable(site.supports)
    retrim = parse_retrim(obj.get("retrim"), channels)
    date = parse_date(obj["date"], "date") if obj.get("date") is not None else None
    limits = parse_site_limits(site.raw, site.supports, rope_length_m=kit.kit.rope_length_m)
    sky = parse_plan_sky(
        obj.get("sky"),
        site=site.raw,
        date=date,
        radio=radio,
        channels_mhz=[round(f / 1e6, 6) for f in channels],
        schedule=schedule,
    )
    return PlanInput(
        name=_name(obj.get("name"), "name"),
        supports=site.supports,
        hazards=site.hazards,
        masts=kit.masts,
        channels_hz=channels,
        form=form,
        kit=kit.kit,
        mast_xy=mast_xy,
        radio=radio,
        limit_set=limit_set,
        sky=sky,
        schedule=schedule,
        retrim=retrim,
        warnings=(*kit.warnings, *unsafe_words),
        limits=limits,
        date=date,
    )
