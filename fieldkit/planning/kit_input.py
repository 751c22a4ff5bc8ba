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
from fieldkit.rigging.mast import MAST, MAX_MASTS, Mast, parse_masts
from fieldkit.rigging.options import Kit
from fieldkit.rigging.wire import WIRE, KitWire, parse_wire

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
    """The kit's rope: length (None: not given) [m] and mass per metre [kg/m]."""

    length_m: float | None
    mass_kg_per_m: float


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
    if "rope" in kit:
        rope = require_mapping(kit["rope"], "kit.rope")
        ROPE.check(rope, "kit.rope")
        if "length_m" in rope:
            length = ROPE.number(rope, "kit.rope", "length_m")
        if "mass_kg_per_m" in rope:
            mass = ROPE.number(rope, "kit.rope", "mass_kg_per_m")
        elif "diameter_mm" in rope:
            mass = rope_mass_kg_per_m(ROPE.number(rope, "kit.rope", "diameter_mm"))
    if length is None:
        warnings.append("kit.rope.length_m not given: rope length is not checked")
    return Rope(length, mass)


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
    )
    return KitInput(rigging_kit, tuple(masts), tuple(warnings))
