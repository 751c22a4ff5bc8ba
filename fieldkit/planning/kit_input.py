"""The plan input's ``kit``: wire, coax, masts, rope, pull and wrap, decoded once into typed values."""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from fieldkit.constants import STANDARD_GRAVITY_M_S2
from fieldkit.errors import InputError, array, check_keys, number, require_mapping
from fieldkit.rigging.cut import WRAP_ALLOWANCE_M
from fieldkit.rigging.feedline import Coax, parse_coax
from fieldkit.rigging.layouts import Mechanics
from fieldkit.rigging.mast import Mast, parse_masts
from fieldkit.rigging.options import Kit
from fieldkit.rigging.wire import KitWire, parse_wire

KIT_FIELDS = (
    "wire",
    "coax",
    "feedpoint_mass_kg",
    "masts",
    "rope",
    "throw_lines",
    "tension_n",
    "wrap_allowance_m",
    "note",
)
ROPE_FIELDS = ("length_m", "diameter_mm", "mass_kg_per_m", "note")
# Laid rope of polyester/nylon: about 0.8 × the fibre density over the rope's circle, 4 mm ≈ 10 g/m
# (from memory, typical maker tables 9–12 g/m).
ROPE_PACKED_DENSITY_KG_M3 = 800.0
DEFAULT_TENSION_N = (
    50.0  # a firm two-hand pull on a halyard (common practice); said in the warnings
)
DEFAULT_ROPE_DIAMETER_MM = 4.0


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


def _required(kit: Mapping[str, Any]) -> None:
    if "wire" not in kit:
        raise InputError(
            "kit.wire", "required: the antenna wire (diameter_mm, conductor, insulation)"
        )
    if "coax" not in kit:
        raise InputError("kit.coax", "required: coax class and length_m, or explicit loss and mass")


def _feedpoint_mass_kg(kit: Mapping[str, Any]) -> float:
    if "feedpoint_mass_kg" not in kit:
        raise InputError(
            "kit.feedpoint_mass_kg", "required: balun (or centre insulator) mass in kg"
        )
    return number(
        kit["feedpoint_mass_kg"], "kit.feedpoint_mass_kg", unit="kg", minimum=0, maximum=10
    )


def _tension_n(kit: Mapping[str, Any], warnings: list[str]) -> float:
    if "tension_n" in kit:
        return number(kit["tension_n"], "kit.tension_n", unit="N", minimum=5, maximum=2000)
    warnings.append(
        f"kit.tension_n not given: planned for {DEFAULT_TENSION_N:g} N, a firm hand pull"
    )
    return DEFAULT_TENSION_N


def _rope(kit: Mapping[str, Any], warnings: list[str]) -> Rope:
    length, mass = None, rope_mass_kg_per_m(DEFAULT_ROPE_DIAMETER_MM)
    if "rope" in kit:
        rope = require_mapping(kit["rope"], "kit.rope")
        check_keys(rope, "kit.rope", ROPE_FIELDS)
        if "length_m" in rope:
            length = number(
                rope["length_m"], "kit.rope.length_m", unit="m", minimum=1, maximum=2000
            )
        if "mass_kg_per_m" in rope:
            mass = number(
                rope["mass_kg_per_m"], "kit.rope.mass_kg_per_m", unit="kg/m", minimum=0, maximum=1
            )
        elif "diameter_mm" in rope:
            d = number(
                rope["diameter_mm"], "kit.rope.diameter_mm", unit="mm", minimum=1, maximum=30
            )
            mass = rope_mass_kg_per_m(d)
    if length is None:
        warnings.append("kit.rope.length_m not given: rope length is not checked")
    return Rope(length, mass)


def _wrap_m(kit: Mapping[str, Any]) -> float:
    if "wrap_allowance_m" not in kit:
        return WRAP_ALLOWANCE_M
    return number(kit["wrap_allowance_m"], "kit.wrap_allowance_m", unit="m", minimum=0, maximum=1)


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
    check_keys(kit, "kit", KIT_FIELDS)
    _required(kit)
    wire = parse_wire(kit["wire"], "kit.wire")
    coax = parse_coax(kit["coax"], "kit.coax")
    masts = parse_masts(kit.get("masts", []), "kit.masts")
    balun = _feedpoint_mass_kg(kit)
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
