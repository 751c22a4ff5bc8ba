"""The plan input's ``kit``: wire, coax, masts, rope, pull and wrap, decoded once into typed values."""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from fieldkit.constants import STANDARD_GRAVITY_M_S2
from fieldkit.errors import array, require_mapping
from fieldkit.fields import Record, arr, nested, num, string
from fieldkit.rigging.cut import WRAP_ALLOWANCE_M
from fieldkit.rigging.feedline import COAX, Coax, parse_coax
from fieldkit.rigging.layouts import Mechanics
from fieldkit.rigging.loads import Strength
from fieldkit.rigging.mast import MAST, MAX_MASTS, Mast, parse_masts
from fieldkit.rigging.options import Kit
from fieldkit.rigging.strength import (
    RopeStrength,
    rope_stiffness_n,
    rope_strength,
    wire_strength,
)
from fieldkit.rigging.wind import DEFAULT_DESIGN_WIND_M_S, Weather, coax_diameter_m
from fieldkit.rigging.wire import WIRE, KitWire, parse_wire
from fieldkit.safety.weather import DEFAULT_MAST_WIND_LIMIT_M_S

# Laid rope of polyester/nylon: about 0.8 × the fibre density over the rope's circle, 4 mm ≈ 10 g/m
# (from memory, typical maker tables 9–12 g/m).
ROPE_PACKED_DENSITY_KG_M3 = 800.0
DEFAULT_TENSION_N = (
    50.0  # a firm two-hand pull on a halyard (common practice); said in the warnings
)
DEFAULT_ROPE_DIAMETER_MM = 4.0
ROPE = Record(
    "Rope",
    (
        num(
            "length_m",
            "m",
            1,
            2000,
            description="all the rope in the kit (checked against the hang)",
        ),
        num("diameter_mm", "mm", 1, 30, description=f"default {DEFAULT_ROPE_DIAMETER_MM:g} mm"),
        num("mass_kg_per_m", "kg/m", 0, 1, description="instead of the diameter"),
        num(
            "working_load_n",
            "N",
            1,
            100000,
            description="the maker's working load (default: estimated from the diameter)",
        ),
        string("note"),
    ),
    "the kit's rope",
)
KIT = Record(
    "PlanKit",
    (
        nested(
            "wire",
            WIRE,
            required=True,
            missing="required: the antenna wire (diameter_mm, conductor, insulation)",
        ),
        nested(
            "coax",
            COAX,
            required=True,
            missing="required: coax class and length_m, or explicit loss and mass",
        ),
        num(
            "feedpoint_mass_kg",
            "kg",
            0,
            10,
            required=True,
            missing="required: balun (or centre insulator) mass in kg",
        ),
        arr("masts", MAST, schema={"maxItems": MAX_MASTS}),
        nested("rope", ROPE),
        arr("throw_lines", description="context only", schema={"items": {"type": "object"}}),
        num("tension_n", "N", 5, 2000, description=f"end pull; default {DEFAULT_TENSION_N:g} N"),
        num(
            "weak_link_n",
            "N",
            1,
            100000,
            description="the weak link's rated breaking load on each halyard",
        ),
        num(
            "design_wind_m_s",
            "m/s",
            0,
            60,
            description=(
                f"the wind the wire, ropes and guys are checked for; default {DEFAULT_DESIGN_WIND_M_S:g} "
                "m/s (a gale)"
            ),
        ),
        num("ice_mm", "mm", 0, 50, description="radial ice on wire and ropes; default 0"),
        num(
            "wrap_allowance_m",
            "m",
            0,
            1,
            description=f"per end of each leg; default {WRAP_ALLOWANCE_M:g} m",
        ),
        string("note"),
    ),
    "the kit the plan may use",
)


@dataclass(frozen=True)
class Rope:
    """The kit's rope: length (None: not given) [m], mass per metre [kg/m], diameter [mm] and the
    maker's working load (None: not given) [N]."""

    length_m: float | None
    mass_kg_per_m: float
    diameter_mm: float = DEFAULT_ROPE_DIAMETER_MM
    working_load_n: float | None = None


@dataclass(frozen=True)
class KitInput:
    """The decoded kit: what the rigging needs (:class:`fieldkit.rigging.options.Kit`), the masts,
    and the defaults that were used (said in the plan's warnings)."""

    kit: Kit
    masts: tuple[Mast, ...]
    warnings: tuple[str, ...]


def rope_mass_kg_per_m(diameter_mm: float) -> float:
    """Mass per metre of laid rope of this diameter [kg/m] (packed density × the rope's circle)."""
    return ROPE_PACKED_DENSITY_KG_M3 * math.pi * (diameter_mm * 1e-3 / 2) ** 2


def _tension_n(kit: Mapping[str, Any], warnings: list[str]) -> float:
    if "tension_n" in kit:
        return KIT.number(kit, "kit", "tension_n")
    warnings.append(
        f"kit.tension_n not given: planned for {DEFAULT_TENSION_N:g} N, a firm hand pull"
    )
    return DEFAULT_TENSION_N


def _rope(kit: Mapping[str, Any], warnings: list[str]) -> Rope:
    length, mass = None, rope_mass_kg_per_m(DEFAULT_ROPE_DIAMETER_MM)
    diameter, working = DEFAULT_ROPE_DIAMETER_MM, None
    if "rope" in kit:
        rope = require_mapping(kit["rope"], "kit.rope")
        ROPE.check(rope, "kit.rope")
        if "length_m" in rope:
            length = ROPE.number(rope, "kit.rope", "length_m")
        if "diameter_mm" in rope:
            diameter = ROPE.number(rope, "kit.rope", "diameter_mm")
        if "mass_kg_per_m" in rope:
            mass = ROPE.number(rope, "kit.rope", "mass_kg_per_m")
        elif "diameter_mm" in rope:
            mass = rope_mass_kg_per_m(diameter)
        if "working_load_n" in rope:
            working = ROPE.number(rope, "kit.rope", "working_load_n")
    if length is None:
        warnings.append("kit.rope.length_m not given: rope length is not checked")
    return Rope(length, mass, diameter, working)


def _optional(kit: Mapping[str, Any], name: str) -> float | None:
    return KIT.number(kit, "kit", name) if name in kit else None


def _guy_rope(mast: Mast, rope: Rope, kit_rope: RopeStrength) -> RopeStrength:
    g = mast.guy_rope
    if g.of_kit:
        return kit_rope
    if g.working_load_n is not None:
        return rope_strength(diameter_mm=0.0, working_load_n=g.working_load_n)
    return rope_strength(diameter_mm=g.diameter_mm or rope.diameter_mm, working_load_n=None)


def _strength(
    kit: Mapping[str, Any], wire: KitWire, coax: Coax, rope: Rope, masts: list[Mast]
) -> Strength:
    """The strength figures of the kit and the weather it is checked for."""
    wind = _optional(kit, "design_wind_m_s")
    ice_mm = _optional(kit, "ice_mm") or 0.0
    weather = Weather(
        wind if wind is not None else DEFAULT_DESIGN_WIND_M_S, ice_mm * 1e-3, wind is not None
    )
    kit_rope = rope_strength(diameter_mm=rope.diameter_mm, working_load_n=rope.working_load_n)
    return Strength(
        wire=wire_strength(wire),
        wire_diameter_m=wire.diameter_m + 2 * wire.insulation_thickness_m,
        rope=kit_rope,
        rope_diameter_m=rope.diameter_mm * 1e-3,
        weak_link_n=_optional(kit, "weak_link_n"),
        weather=weather,
        coax_diameter_m=coax_diameter_m(coax.class_code),
        guy_ropes={m.id: _guy_rope(m, rope, kit_rope) for m in masts},
        rope_stiffness_n=rope_stiffness_n(diameter_mm=rope.diameter_mm),
        mast_wind_m_s={
            m.id: m.wind_limit_m_s if m.wind_limit_m_s is not None else DEFAULT_MAST_WIND_LIMIT_M_S
            for m in masts
        },
    )


def _wrap_m(kit: Mapping[str, Any]) -> float:
    if "wrap_allowance_m" not in kit:
        return WRAP_ALLOWANCE_M
    return KIT.number(kit, "kit", "wrap_allowance_m")


def _mechanics(
    wire: KitWire, coax: Coax, rope: Rope, *, balun_kg: float, tension_n: float
) -> Mechanics:
    g = STANDARD_GRAVITY_M_S2
    return Mechanics(
        wire_weight_n_per_m=wire.mass_kg_per_m * g,
        rope_weight_n_per_m=rope.mass_kg_per_m * g,
        balun_n=balun_kg * g,
        coax_weight_n_per_m=coax.mass_kg_per_m * g,
        coax_length_m=coax.length_m,
        tension_n=tension_n,
    )


def parse_kit(value: Any, *, ground, ground_name: str) -> KitInput:
    """Decode the plan input's ``kit`` (every error names its field, ``kit.rope.length_m``)."""
    kit = require_mapping(value, "kit")
    KIT.check(kit, "kit")
    KIT.require(kit, "kit", ("wire", "coax"))
    wire = parse_wire(kit["wire"], "kit.wire")
    coax = parse_coax(kit["coax"], "kit.coax")
    masts = parse_masts(kit.get("masts", []), "kit.masts")
    KIT.require(kit, "kit", ("feedpoint_mass_kg",))
    balun = KIT.number(kit, "kit", "feedpoint_mass_kg")
    warnings: list[str] = []
    tension = _tension_n(kit, warnings)
    rope = _rope(kit, warnings)
    if "throw_lines" in kit:
        array(kit["throw_lines"], "kit.throw_lines")
    wrap = _wrap_m(kit)
    rigging_kit = Kit(
        wire=wire,
        mech=_mechanics(wire, coax, rope, balun_kg=balun, tension_n=tension),
        coax=coax,
        rope_length_m=rope.length_m,
        wrap_allowance_m=wrap,
        ground=ground,
        ground_name=ground_name,
        strength=_strength(kit, wire, coax, rope, masts),
    )
    return KitInput(rigging_kit, tuple(masts), tuple(warnings))
