"""Validation of the `fieldkit plan` input: every field checked at the edge, named in every error."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from fieldkit.constants import STANDARD_GRAVITY_M_S2
from fieldkit.errors import InputError, array, check_keys, choice, join, number, require_mapping
from fieldkit.rigging.cut import WRAP_ALLOWANCE_M
from fieldkit.rigging.feedline import parse_coax
from fieldkit.rigging.layouts import Mechanics
from fieldkit.rigging.mast import Mast, parse_masts
from fieldkit.rigging.options import Kit
from fieldkit.rigging.supports import Support, parse_supports
from fieldkit.rigging.wire import parse_wire
from fieldkit.sky.inputs import MAX_CHANNEL_MHZ, MIN_CHANNEL_MHZ  # one HF range for plan and sky

FORMS = ("flat", "inverted-v", "sloping", "linked", "auto")
# Laid rope of polyester/nylon: about 0.8 × the fibre density over the rope's circle, 4 mm ≈ 10 g/m
# (from memory, typical maker tables 9–12 g/m).
ROPE_PACKED_DENSITY_KG_M3 = 800.0
DEFAULT_TENSION_N = (
    50.0  # a firm two-hand pull on a halyard (common practice); said in the warnings
)
DEFAULT_ROPE_DIAMETER_MM = 4.0


# every pair of usable supports is screened with the engine (~0.4 s a pair on a 2-core laptop):
# 10 supports = 45 pairs keeps a plan within about 30 s (measured: 20 supports took 70 s)
MAX_USABLE_SUPPORTS = 10


@dataclass(frozen=True)
class PlanInput:
    name: str | None
    supports: list[Support]
    masts: list[Mast]
    channels_hz: list[float]
    form: str
    kit: Kit
    mast_xy: tuple[float, float]
    limit_set: str
    retrim: dict[str, Any] | None
    warnings: list[str]


def _ground(value: Any):
    from fieldkit.antenna import parse_ground

    g = parse_ground(value, "site.ground")
    name = value if isinstance(value, str) else "this"
    return g, name


def parse_plan(spec: Any) -> PlanInput:
    obj = require_mapping(spec, "")
    check_keys(
        obj,
        "",
        (
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
        ),
    )
    warnings: list[str] = []
    for key in ("site", "channels_mhz", "kit", "radio"):
        if key not in obj:
            raise InputError(key, "required")
    site = require_mapping(obj["site"], "site")
    check_keys(
        site,
        "site",
        (
            "name",
            "lat_deg",
            "lon_deg",
            "elevation_m",
            "utc_offset_h",
            "ground",
            "supports",
            "hazards",
        ),
    )
    if "ground" not in site:
        raise InputError(
            "site.ground",
            "required: a ground preset name or {relative_permittivity, conductivity_s_m}",
        )
    ground, ground_name = _ground(site["ground"])
    supports = parse_supports(site.get("supports", []), "site.supports")
    try:
        from fieldkit.safety import parse_hazards
    except ImportError:
        array(site.get("hazards", []), "site.hazards")
    else:
        parse_hazards(site.get("hazards", []), "site.hazards")
    chans = array(obj["channels_mhz"], "channels_mhz", min_items=1, max_items=12)
    channels = []
    for i, c in enumerate(chans):
        f = number(
            c, join("channels_mhz", i), unit="MHz", minimum=MIN_CHANNEL_MHZ, maximum=MAX_CHANNEL_MHZ
        )
        channels.append(f * 1e6)
    if len(set(channels)) != len(channels):
        raise InputError("channels_mhz", "each channel once, please")
    form = choice(obj.get("form", "auto"), "form", FORMS)
    if form == "linked" and len(channels) < 2:
        raise InputError("channels_mhz", "a linked dipole needs at least two channels")

    kit_obj = require_mapping(obj["kit"], "kit")
    check_keys(
        kit_obj,
        "kit",
        (
            "wire",
            "coax",
            "feedpoint_mass_kg",
            "masts",
            "rope",
            "throw_lines",
            "tension_n",
            "wrap_allowance_m",
            "note",
        ),
    )
    if "wire" not in kit_obj:
        raise InputError(
            "kit.wire", "required: the antenna wire (diameter_mm, conductor, insulation)"
        )
    if "coax" not in kit_obj:
        raise InputError("kit.coax", "required: coax class and length_m, or explicit loss and mass")
    wire = parse_wire(kit_obj["wire"], "kit.wire")
    coax = parse_coax(kit_obj["coax"], "kit.coax")
    masts = parse_masts(kit_obj.get("masts", []), "kit.masts")
    if "feedpoint_mass_kg" not in kit_obj:
        raise InputError(
            "kit.feedpoint_mass_kg", "required: balun (or centre insulator) mass in kg"
        )
    balun = number(
        kit_obj["feedpoint_mass_kg"], "kit.feedpoint_mass_kg", unit="kg", minimum=0, maximum=10
    )
    if "tension_n" in kit_obj:
        tension = number(kit_obj["tension_n"], "kit.tension_n", unit="N", minimum=5, maximum=2000)
    else:
        tension = DEFAULT_TENSION_N
        warnings.append(
            f"kit.tension_n not given: planned for {DEFAULT_TENSION_N:g} N, a firm hand pull"
        )
    rope_len = None
    rope_w = (
        ROPE_PACKED_DENSITY_KG_M3 * 3.141592653589793 * (DEFAULT_ROPE_DIAMETER_MM * 1e-3 / 2) ** 2
    )
    if "rope" in kit_obj:
        rope = require_mapping(kit_obj["rope"], "kit.rope")
        check_keys(rope, "kit.rope", ("length_m", "diameter_mm", "mass_kg_per_m", "note"))
        if "length_m" in rope:
            rope_len = number(
                rope["length_m"], "kit.rope.length_m", unit="m", minimum=1, maximum=2000
            )
        if "mass_kg_per_m" in rope:
            rope_w = number(
                rope["mass_kg_per_m"], "kit.rope.mass_kg_per_m", unit="kg/m", minimum=0, maximum=1
            )
        elif "diameter_mm" in rope:
            d = number(
                rope["diameter_mm"], "kit.rope.diameter_mm", unit="mm", minimum=1, maximum=30
            )
            rope_w = ROPE_PACKED_DENSITY_KG_M3 * 3.141592653589793 * (d * 1e-3 / 2) ** 2
    if rope_len is None:
        warnings.append("kit.rope.length_m not given: rope length is not checked")
    if "throw_lines" in kit_obj:
        array(kit_obj["throw_lines"], "kit.throw_lines")
    wrap = WRAP_ALLOWANCE_M
    if "wrap_allowance_m" in kit_obj:
        wrap = number(
            kit_obj["wrap_allowance_m"], "kit.wrap_allowance_m", unit="m", minimum=0, maximum=1
        )
    g = STANDARD_GRAVITY_M_S2
    mech = Mechanics(
        wire_weight_n_per_m=wire.mass_kg_per_m * g,
        rope_weight_n_per_m=rope_w * g,
        balun_n=balun * g,
        coax_weight_n_per_m=coax.mass_kg_per_m * g,
        coax_length_m=coax.length_m,
        tension_n=tension,
    )
    kit = Kit(
        wire=wire,
        mech=mech,
        coax=coax,
        rope_length_m=rope_len,
        wrap_allowance_m=wrap,
        ground=ground,
        ground_name=ground_name,
    )
    try:
        from fieldkit.safety import parse_radio
    except ImportError:
        require_mapping(obj["radio"], "radio")
    else:
        parse_radio(obj["radio"], "radio")
    limit_set = obj.get("limit_set", "fcc-uncontrolled")
    try:
        from fieldkit.safety import parse_limit_set
    except ImportError:
        pass
    else:
        limit_set = parse_limit_set(limit_set, "limit_set")
    if obj.get("sky") is not None:
        require_mapping(obj["sky"], "sky")
    if obj.get("schedule") is not None:
        sched = require_mapping(obj["schedule"], "schedule")
        check_keys(sched, "schedule", ("start_utc", "end_utc"))
        for key in ("start_utc", "end_utc"):
            if key in sched:
                _parse_utc_time(sched[key], join("schedule", key))
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
    for s in supports:
        if s.unsafe:
            warnings.append(f"{s.id} is marked unsafe and is not used")
    return PlanInput(
        name=obj.get("name"),
        supports=supports,
        masts=masts,
        channels_hz=channels,
        form=form,
        kit=kit,
        mast_xy=mast_xy,
        limit_set=limit_set,
        retrim=_parse_retrim(obj.get("retrim"), channels),
        warnings=warnings,
    )


def _parse_retrim(value: Any, channels: list[float]) -> dict[str, Any] | None:
    """``{"frequency_mhz": target, "form"?, "leg_now_m"?, "dip_mhz"}`` or ``{..., "at_mhz", "r_ohm", "x_ohm"}``."""
    if value is None:
        return None
    f = "retrim"
    obj = require_mapping(value, f)
    check_keys(
        obj, f, ("frequency_mhz", "form", "leg_now_m", "dip_mhz", "at_mhz", "r_ohm", "x_ohm")
    )
    if "frequency_mhz" not in obj:
        raise InputError(join(f, "frequency_mhz"), "required: the channel to re-trim for")
    target = (
        number(
            obj["frequency_mhz"],
            join(f, "frequency_mhz"),
            unit="MHz",
            minimum=MIN_CHANNEL_MHZ,
            maximum=MAX_CHANNEL_MHZ,
        )
        * 1e6
    )
    if all(abs(target - c) > 1.0 for c in channels):
        raise InputError(join(f, "frequency_mhz"), "expected one of channels_mhz")
    out: dict[str, Any] = {"target_hz": target}
    if "form" in obj:
        out["form"] = choice(obj["form"], join(f, "form"), ("flat", "sloping", "inverted-v"))
    if "leg_now_m" in obj:
        out["leg_now_m"] = number(
            obj["leg_now_m"], join(f, "leg_now_m"), unit="m", minimum=0.5, maximum=200
        )
    if "dip_mhz" in obj:
        out["dip_hz"] = (
            number(obj["dip_mhz"], join(f, "dip_mhz"), unit="MHz", minimum=1.0, maximum=40) * 1e6
        )
    elif "at_mhz" in obj and "x_ohm" in obj:
        out["at_hz"] = (
            number(obj["at_mhz"], join(f, "at_mhz"), unit="MHz", minimum=1.0, maximum=40) * 1e6
        )
        out["x_ohm"] = number(
            obj["x_ohm"], join(f, "x_ohm"), unit="ohm", minimum=-5000, maximum=5000
        )
        if "r_ohm" in obj:
            out["r_ohm"] = number(
                obj["r_ohm"], join(f, "r_ohm"), unit="ohm", minimum=0, maximum=5000
            )
    else:
        raise InputError(
            join(f, "dip_mhz"),
            "give the measured SWR dip (dip_mhz), or at_mhz with r_ohm and x_ohm",
        )
    return out


def _parse_utc_time(value: Any, field: str) -> int:
    """A schedule time "HH:MM" (UTC, 00:00-24:00) -> minutes after midnight."""
    ok = isinstance(value, str) and len(value) == 5 and value[2] == ":"
    if ok and value[:2].isdigit() and value[3:].isdigit():
        h, m = int(value[:2]), int(value[3:])
        if (h < 24 and m < 60) or (h == 24 and m == 0):
            return h * 60 + m
    raise InputError(field, f'expected a UTC time "HH:MM" from 00:00 to 24:00, got {value!r}')
