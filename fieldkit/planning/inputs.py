"""The `fieldkit plan` input decoded once, at the edge, into typed records.

:func:`parse_plan` checks every field and names it in every error (``site.supports[2].height_m``):
the site (supports, hazards, ground), the channels and form, the kit (:mod:`.kit_input`), the radio,
the limit set, the schedule, the re-trim reading and the sky block (decoded by the sky layer's own
parser). Nothing downstream validates the input again.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, replace
from typing import Any

from fieldkit.errors import InputError, array, check_keys, choice, join, number, require_mapping
from fieldkit.planning.kit_input import parse_kit
from fieldkit.rigging.mast import Mast
from fieldkit.rigging.options import Kit
from fieldkit.safety import parse_hazards, parse_limit_set, parse_radio
from fieldkit.safety.duty import Radio
from fieldkit.safety.hazards import Path, PowerLine
from fieldkit.site import Support, parse_supports
from fieldkit.sky.inputs import (  # one HF range for plan and sky
    MAX_CHANNEL_MHZ,
    MIN_CHANNEL_MHZ,
    SkySpec,
    parse_sky_spec,
    window,
)
from fieldkit.sky.inputs import Schedule as SkySchedule

FORMS = ("flat", "inverted-v", "sloping", "linked", "auto")
RETRIM_FORMS = ("flat", "sloping", "inverted-v")
PLAN_FIELDS = (
    "name",
    "site",
    "channels_mhz",
    "form",
    "kit",
    "radio",
    "sky",
    "schedule",
    "limit_set",
    "retrim",
)
PLAN_REQUIRED = ("site", "channels_mhz", "kit", "radio")
SITE_FIELDS = (
    "name",
    "lat_deg",
    "lon_deg",
    "elevation_m",
    "utc_offset_h",
    "ground",
    "supports",
    "hazards",
)
SCHEDULE_FIELDS = ("start_utc", "end_utc")
RETRIM_FIELDS = ("frequency_mhz", "form", "leg_now_m", "dip_mhz", "at_mhz", "r_ohm", "x_ohm")
DEFAULT_LIMIT_SET = "fcc-uncontrolled"
MAX_CHANNELS = 12
# every pair of usable supports is screened with the engine (~0.4 s a pair on a 2-core laptop):
# 10 supports = 45 pairs keeps a plan within about 30 s (measured: 20 supports took 70 s)
MAX_USABLE_SUPPORTS = 10


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
class Retrim:
    """A measurement after raising: the channel to re-trim for [Hz] and the SWR dip [Hz], or an
    analyser reading R + jX [Ω] at a frequency [Hz]; ``form`` restricts it to one form."""

    target_hz: float
    form: str | None = None
    leg_now_m: float | None = None
    dip_hz: float | None = None
    at_hz: float | None = None
    r_ohm: float | None = None
    x_ohm: float | None = None


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


def _ground(value: Any):
    from fieldkit.antenna import parse_ground

    g = parse_ground(value, "site.ground")
    name = value if isinstance(value, str) else "this"
    return g, name


@dataclass(frozen=True)
class _Site:
    ground: Any
    ground_name: str
    supports: tuple[Support, ...]
    hazards: tuple[PowerLine | Path, ...]


def _site(value: Any) -> _Site:
    site = require_mapping(value, "site")
    check_keys(site, "site", SITE_FIELDS)
    if "ground" not in site:
        raise InputError(
            "site.ground",
            "required: a ground preset name or {relative_permittivity, conductivity_s_m}",
        )
    ground, name = _ground(site["ground"])
    supports = tuple(parse_supports(site.get("supports", []), "site.supports"))
    hazards = tuple(parse_hazards(site.get("hazards", []), "site.hazards"))
    return _Site(ground, name, supports, hazards)


def _channels(value: Any) -> tuple[float, ...]:
    chans = array(value, "channels_mhz", min_items=1, max_items=MAX_CHANNELS)
    channels = tuple(
        number(
            c, join("channels_mhz", i), unit="MHz", minimum=MIN_CHANNEL_MHZ, maximum=MAX_CHANNEL_MHZ
        )
        * 1e6
        for i, c in enumerate(chans)
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
    check_keys(sched, "schedule", SCHEDULE_FIELDS)
    hours = {k: _utc_hours(sched[k], join("schedule", k)) for k in SCHEDULE_FIELDS if k in sched}
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


def _retrim_number(obj: Mapping[str, Any], key: str, unit: str, lo: float, hi: float) -> float:
    return number(obj[key], join("retrim", key), unit=unit, minimum=lo, maximum=hi)


def _retrim_reading(obj: Mapping[str, Any]) -> dict[str, float]:
    """The measured dip, or the analyser's R + jX at a frequency."""
    if "dip_mhz" in obj:
        return {"dip_hz": _retrim_number(obj, "dip_mhz", "MHz", 1.0, 40) * 1e6}
    if "at_mhz" in obj and "x_ohm" in obj:
        out = {
            "at_hz": _retrim_number(obj, "at_mhz", "MHz", 1.0, 40) * 1e6,
            "x_ohm": _retrim_number(obj, "x_ohm", "ohm", -5000, 5000),
        }
        if "r_ohm" in obj:
            out["r_ohm"] = _retrim_number(obj, "r_ohm", "ohm", 0, 5000)
        return out
    raise InputError(
        "retrim.dip_mhz", "give the measured SWR dip (dip_mhz), or at_mhz with r_ohm and x_ohm"
    )


def _retrim(value: Any, channels: tuple[float, ...]) -> Retrim | None:
    """``{"frequency_mhz", "form"?, "leg_now_m"?, "dip_mhz"}`` or ``{..., "at_mhz", "r_ohm", "x_ohm"}``."""
    if value is None:
        return None
    obj = require_mapping(value, "retrim")
    check_keys(obj, "retrim", RETRIM_FIELDS)
    if "frequency_mhz" not in obj:
        raise InputError("retrim.frequency_mhz", "required: the channel to re-trim for")
    target = _retrim_number(obj, "frequency_mhz", "MHz", MIN_CHANNEL_MHZ, MAX_CHANNEL_MHZ) * 1e6
    if all(abs(target - c) > 1.0 for c in channels):
        raise InputError("retrim.frequency_mhz", "expected one of channels_mhz")
    form = choice(obj["form"], "retrim.form", RETRIM_FORMS) if "form" in obj else None
    leg = _retrim_number(obj, "leg_now_m", "m", 0.5, 200) if "leg_now_m" in obj else None
    return Retrim(target, form, leg, **_retrim_reading(obj))


def _sky(value: Any, channels: tuple[float, ...], schedule: PlanSchedule | None) -> SkySpec | None:
    """The sky block, decoded by the sky layer on the plan's channels (and window, unless the block
    has its own); its errors are named under ``sky``."""
    if value is None:
        return None
    sky = dict(require_mapping(value, "sky"))
    sky["channels_mhz"] = [round(f / 1e6, 6) for f in channels]
    try:
        parsed = parse_sky_spec(sky)
    except InputError as e:
        raise InputError(join("sky", e.field), e.detail, value=e.value) from None
    if schedule is not None and "schedule" not in sky:
        parsed = replace(parsed, schedule=schedule.for_sky())
    return parsed


def parse_plan(spec: Any) -> PlanInput:
    """Decode and check a `fieldkit plan` input (ARCHITECTURE.md), once.

    Raises
    ------
    fieldkit.errors.InputError
        Naming the first bad field and what is expected.
    """
    obj = require_mapping(spec, "")
    check_keys(obj, "", PLAN_FIELDS)
    for key in PLAN_REQUIRED:
        if key not in obj:
            raise InputError(key, "required")
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
    retrim = _retrim(obj.get("retrim"), channels)
    return PlanInput(
        name=obj.get("name"),
        supports=site.supports,
        hazards=site.hazards,
        masts=kit.masts,
        channels_hz=channels,
        form=form,
        kit=kit.kit,
        mast_xy=mast_xy,
        radio=radio,
        limit_set=limit_set,
        sky=_sky(obj.get("sky"), channels, schedule),
        schedule=schedule,
        retrim=retrim,
        warnings=(*kit.warnings, *unsafe_words),
    )
