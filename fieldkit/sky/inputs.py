"""Validation of the `fieldkit sky` input: every bad value is refused with the field named."""

from __future__ import annotations

import datetime as dt
import re
from dataclasses import dataclass
from typing import Any

from fieldkit.errors import InputError, array, choice, join, number, require_mapping
from fieldkit.fields import Field, Record, nested, num, string
from fieldkit.model_fields import MODEL, ground_field
from fieldkit.sky.noise import NOISE_ENVIRONMENTS
from fieldkit.sky.solar import f107_from_sunspot
from fieldkit.sky.sounding import Sounding

MIN_CHANNEL_MHZ = 1.8  # the HF range fieldkit plans for (issue 4)
MAX_CHANNEL_MHZ = 30.0
MAX_CHANNELS = 24
# F10.7 monthly means seen since 1947 lie between about 64 and 370 sfu (from memory); the IRI maps
# are interpolated between IG12 = 0 and 100 and extrapolate beyond, so refuse what no sun produces.
MIN_F107 = 60.0
MAX_F107 = 400.0
MAX_SUNSPOT = 400.0
MIN_YEAR, MAX_YEAR = 1958, 2050  # IGRF-13 (in PyIRI) covers 1900-2025 and is extrapolated after

# Amateur-band presets (ITU Radio Regulations Art. 5; 60 m: WRC-15, 5351.5-5366.5 kHz): one
# representative NVIS channel each, for operators who type a band instead of a frequency.
BAND_PRESETS_MHZ = {"80m": 3.6, "60m": 5.3595, "40m": 7.1}


@dataclass(frozen=True)
class Mode:
    """Emission mode: receiver bandwidth [Hz] and the signal-to-noise it needs in that bandwidth [dB]."""

    name: str
    bandwidth_hz: float
    required_snr_db: float
    source: str


# common practice, no single source: SNR for just-usable copy by trained operators
MODES = {
    "ssb": Mode("ssb", 2700.0, 10.0, "common practice: SSB voice, 2.7 kHz, just usable at ~10 dB"),
    "cw": Mode("cw", 500.0, 3.0, "common practice: CW by ear, 500 Hz filter, ~3 dB"),
    "am": Mode("am", 6000.0, 20.0, "common practice: AM voice, 6 kHz, ~20 dB"),
    "fm": Mode(
        "fm", 12000.0, 12.0, "common practice: narrow-band FM voice, ~12 kHz, threshold ~12 dB"
    ),
    "data": Mode(
        "data", 2700.0, 5.0, "common practice: robust HF data modem in a voice channel, ~5 dB"
    ),
}


@dataclass(frozen=True)
class Schedule:
    """A window of the day, inclusive hour samples; wraps past midnight when end < start."""

    start_utc_h: float
    end_utc_h: float
    distances_km: tuple[float, ...] | None
    start_text: str
    end_text: str


@dataclass(frozen=True)
class SkySpec:
    lat_deg: float
    lon_deg: float
    utc_offset_h: float | None
    ground: Any  # engine ground spec (preset name or constants), passed to the engine as given
    day: dt.date
    f107: float
    sunspot_number: float | None
    solar_given: str
    channels_mhz: tuple[float, ...]
    sounding: Sounding | None
    antenna: dict | None
    power_w: float
    mode: Mode
    noise_environment: str
    schedule: Schedule | None
    defaults_used: tuple[str, ...]


DEFAULTS = {"power_w": 100.0, "mode": "ssb", "noise_environment": "rural"}
SKY_SITE = Record(
    "SkySite",
    (
        num(
            "lat_deg",
            "deg",
            -90,
            90,
            required=True,
            missing="required: the site's latitude and longitude in degrees",
        ),
        num(
            "lon_deg",
            "deg",
            -180,
            180,
            required=True,
            missing="required: the site's latitude and longitude in degrees",
        ),
        num("utc_offset_h", "h", -12, 14),
        ground_field(description="only without an antenna (then it goes in the antenna spec)"),
    ),
    "where the sky is estimated",
)
SOLAR = Record(
    "Solar",
    (
        num(
            "f107", "sfu", MIN_F107, MAX_F107, description="monthly mean F10.7 (or sunspot_number)"
        ),
        num("sunspot_number", "", 0, MAX_SUNSPOT, description="smoothed R12 (or f107)"),
    ),
    "solar activity: exactly one of f107 or sunspot_number",
    one_of=(("f107", "sunspot_number"),),
)
SOUNDING = Record(
    "Sounding",
    (
        num("hour_utc", "h", 0, description="below 24; without it the reading holds all day"),
        num(
            "fof2_mhz", "MHz", 0.5, 20, required=True, missing="required: the observed foF2 in MHz"
        ),
        num(
            "virtual_height_km",
            "km",
            150,
            800,
            required=True,
            missing="required: the observed virtual height h'F in km",
        ),
        num("hmf2_km", "km", 150, 800),
        num("muf3000_mhz", "MHz", hi=80, description="at least fof2_mhz"),
    ),
    "an ionosonde reading",
)
SKY_SCHEDULE = Record(
    "SkySchedule",
    (
        string("start_utc", required=True, missing="required: a UTC time as HH:MM"),
        string("end_utc", required=True, missing="required: a UTC time as HH:MM"),
        num("distances_km", "km", 0, 600, many=True, schema={"minItems": 1, "maxItems": 20}),
    ),
    "the operating window (UTC) and the distances to reach",
)
_REQUIRED = "required field is missing"
SKY = Record(
    "SkySpec",
    (
        nested("site", SKY_SITE, required=True, missing=_REQUIRED),
        string("date", required=True, missing=_REQUIRED, schema={"format": "date"}),
        nested("solar", SOLAR, required=True, missing=_REQUIRED),
        Field(
            "channels_mhz",
            required=True,
            missing=_REQUIRED,
            schema={
                "type": "array",
                "minItems": 1,
                "maxItems": MAX_CHANNELS,
                "items": {
                    "oneOf": [
                        {"type": "number", "minimum": MIN_CHANNEL_MHZ, "maximum": MAX_CHANNEL_MHZ},
                        {"type": "string", "enum": list(BAND_PRESETS_MHZ)},
                    ]
                },
            },
        ),
        nested("sounding", SOUNDING),
        nested(
            "antenna",
            MODEL.variant(
                "SkyAntenna",
                one_of=(),
                description="a model spec; the sky layer solves it at each channel",
            ),
        ),
        num("power_w", "W", 0, 100000, exclusive_minimum=True, description="default 100 W"),
        string("mode", *MODES, description="default ssb"),
        string("noise_environment", *NOISE_ENVIRONMENTS, description="default rural"),
        num("bandwidth_hz", "Hz", 10, 20000),
        num("required_snr_db", "dB", -30, 60),
        nested("schedule", SKY_SCHEDULE),
    ),
    "the `fieldkit sky` input",
)
TOP_KEYS = SKY.names


def parse_date(value: Any, field: str) -> dt.date:
    """A UTC day as YYYY-MM-DD, between the years the sky estimate covers."""
    if not isinstance(value, str) or not re.fullmatch(r"\d{4}-\d{2}-\d{2}", value):
        raise InputError(field, f"expected a date as YYYY-MM-DD, got {value!r}", value=value)
    try:
        day = dt.date.fromisoformat(value)
    except ValueError:
        raise InputError(
            field, f"{value!r} is not a calendar date (YYYY-MM-DD)", value=value
        ) from None
    if not MIN_YEAR <= day.year <= MAX_YEAR:
        raise InputError(
            field, f"expected a year from {MIN_YEAR} to {MAX_YEAR}, got {day.year}", value=value
        )
    return day


def _clock(value: Any, field: str) -> float:
    m = re.fullmatch(r"(\d{1,2}):(\d{2})", value) if isinstance(value, str) else None
    if (
        not m
        or int(m.group(1)) > 24
        or int(m.group(2)) > 59
        or (int(m.group(1)) == 24 and int(m.group(2)))
    ):
        raise InputError(
            field, f"expected a UTC time as HH:MM (00:00-24:00), got {value!r}", value=value
        )
    return int(m.group(1)) + int(m.group(2)) / 60.0


def _site(value: Any) -> tuple[float, float, float | None, Any]:
    site = require_mapping(value, "site")
    SKY_SITE.check(site, "site")
    SKY_SITE.require(site, "site")
    lat = SKY_SITE.number(site, "site", "lat_deg")
    lon = SKY_SITE.number(site, "site", "lon_deg")
    offset = None
    if "utc_offset_h" in site:
        offset = SKY_SITE.number(site, "site", "utc_offset_h")
    ground = site.get("ground")
    if ground is not None:
        from fieldkit.antenna import parse_ground

        parse_ground(ground, field="site.ground")  # refuse a bad ground before any solving
    return lat, lon, offset, ground


def _solar(value: Any) -> tuple[float, float | None, str]:
    solar = require_mapping(value, "solar")
    SOLAR.check(solar, "solar")
    if len(solar) != 1:
        raise InputError(
            "solar", "expected exactly one of f107 (sfu) or sunspot_number (R12)", value=solar
        )
    if "f107" in solar:
        f107 = SOLAR.number(solar, "solar", "f107")
        return f107, None, "f107"
    r12 = SOLAR.number(solar, "solar", "sunspot_number")
    return f107_from_sunspot(sunspot_number=r12), r12, "sunspot_number"


def _channels(value: Any) -> tuple[float, ...]:
    items = array(value, "channels_mhz", min_items=1, max_items=MAX_CHANNELS)
    out = []
    for i, item in enumerate(items):
        field = join("channels_mhz", i)
        if isinstance(item, str):
            out.append(BAND_PRESETS_MHZ[choice(item, field, BAND_PRESETS_MHZ)])
        else:
            out.append(
                number(item, field, unit="MHz", minimum=MIN_CHANNEL_MHZ, maximum=MAX_CHANNEL_MHZ)
            )
    return tuple(out)


def _sounding(value: Any) -> Sounding:
    s = require_mapping(value, "sounding")
    SOUNDING.check(s, "sounding")
    SOUNDING.require(s, "sounding")
    hour = None  # without its hour the reading is taken for the whole day (contract example)
    if "hour_utc" in s:
        hour = SOUNDING.number(s, "sounding", "hour_utc")
        if hour >= 24:
            raise InputError(
                "sounding.hour_utc", f"expected an hour below 24, got {hour:g}", value=hour
            )
    fof2 = SOUNDING.number(s, "sounding", "fof2_mhz")
    hv = SOUNDING.number(s, "sounding", "virtual_height_km")
    hm = SOUNDING.number(s, "sounding", "hmf2_km") if "hmf2_km" in s else None
    muf = None
    if "muf3000_mhz" in s:
        muf = number(s["muf3000_mhz"], "sounding.muf3000_mhz", unit="MHz", minimum=fof2, maximum=80)
    return Sounding(hour_utc=hour, fof2_mhz=fof2, virtual_height_km=hv, hmf2_km=hm, muf3000_mhz=muf)


def _schedule(value: Any) -> Schedule:
    s = require_mapping(value, "schedule")
    SKY_SCHEDULE.check(s, "schedule")
    SKY_SCHEDULE.require(s, "schedule")
    start = _clock(s["start_utc"], "schedule.start_utc")
    end = _clock(s["end_utc"], "schedule.end_utc")
    distances = None
    if "distances_km" in s:
        items = array(s["distances_km"], "schedule.distances_km", min_items=1, max_items=20)
        distances = tuple(
            SKY_SCHEDULE.field("distances_km").read_number(d, join("schedule.distances_km", i))
            for i, d in enumerate(items)
        )
    return window(start, end, distances, s["start_utc"], s["end_utc"])


def window(
    start_h: float,
    end_h: float,
    distances_km: tuple[float, ...] | None,
    start_text: str,
    end_text: str,
) -> Schedule:
    """A schedule from its ends in hours (UTC, 0–24): 24:00 stays the end of the day [h]."""
    return Schedule(
        start_h % 24.0, end_h % 24.0 if end_h < 24 else 24.0, distances_km, start_text, end_text
    )


def parse_sky_spec(spec: Any) -> SkySpec:
    """Validate a `fieldkit sky` input object and return it as a :class:`SkySpec`.

    Raises
    ------
    fieldkit.errors.InputError
        Naming the first bad field and what is expected.
    """
    spec = require_mapping(spec, "")
    SKY.check(spec, "")
    SKY.require(spec, "")
    lat, lon, offset, ground = _site(spec["site"])
    day = parse_date(spec["date"], "date")
    f107, r12, solar_given = _solar(spec["solar"])
    channels = _channels(spec["channels_mhz"])
    sounding = _sounding(spec["sounding"]) if "sounding" in spec else None
    antenna = None
    if "antenna" in spec:
        antenna = dict(require_mapping(spec["antenna"], "antenna"))
        if ground is not None:
            raise InputError(
                "site.ground", "give the ground inside the antenna spec when an antenna is given"
            )
    defaults_used = tuple(k for k in DEFAULTS if k not in spec)
    power = SKY.number(spec, "", "power_w", default=DEFAULTS["power_w"])
    mode_name = choice(spec.get("mode", DEFAULTS["mode"]), "mode", MODES)
    mode = MODES[mode_name]
    if "bandwidth_hz" in spec or "required_snr_db" in spec:
        bandwidth = mode.bandwidth_hz
        required = mode.required_snr_db
        if "bandwidth_hz" in spec:
            bandwidth = SKY.number(spec, "", "bandwidth_hz")
        if "required_snr_db" in spec:
            required = SKY.number(spec, "", "required_snr_db")
        mode = Mode(mode.name, bandwidth, required, "given by the operator")
    environment = choice(
        spec.get("noise_environment", DEFAULTS["noise_environment"]),
        "noise_environment",
        NOISE_ENVIRONMENTS,
    )
    schedule = _schedule(spec["schedule"]) if "schedule" in spec else None
    return SkySpec(
        lat_deg=lat,
        lon_deg=lon,
        utc_offset_h=offset,
        ground=ground,
        day=day,
        f107=f107,
        sunspot_number=r12,
        solar_given=solar_given,
        channels_mhz=channels,
        sounding=sounding,
        antenna=antenna,
        power_w=power,
        mode=mode,
        noise_environment=environment,
        schedule=schedule,
        defaults_used=defaults_used,
    )
