"""Centre mast: which kit mast holds the feedpoint, its top load against its rating, guys.

The top load is what the mast head carries straight down: the vertical components of both legs'
tension at the apex, plus the balun and the hanging coax. A rating is stated by the maker as a mass
[kg] at the top; fieldkit compares like with like (newtons / g).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from fieldkit.constants import STANDARD_GRAVITY_M_S2
from fieldkit.errors import InputError, array, join, require_mapping, text
from fieldkit.fields import Field, Record, num, ref, string

# Guy anchors at about 0.7 × the guy attachment height from the mast foot (guys near 55° to the
# ground) — common practice for light telescopic masts, no single source.
GUY_RADIUS_FRACTION = 0.7
MIN_GUYS = 3  # three guys at 120° is the least that holds a mast in every direction (statics)


@dataclass(frozen=True)
class GuyRope:
    """What a mast's guys are made of: the kit's rope (``of_kit``), or a cord of its own with the
    maker's working load [N] and its diameter [mm] (either may be None: not stated)."""

    of_kit: bool = True
    working_load_n: float | None = None
    diameter_mm: float | None = None


@dataclass(frozen=True)
class Mast:
    """A kit mast: id, extended height [m], rated top load [kg], number of guys; the maker's wind
    rating [m/s] and tube diameter [m] when stated; what the guys are made of."""

    id: str
    height_m: float
    top_load_kg: float
    guys: int
    wind_limit_m_s: float | None = None
    diameter_m: float | None = None
    guy_rope: GuyRope = GuyRope()


MAX_MASTS = 10
GUY_ROPE = Record(
    "GuyRope",
    (
        num("working_load_n", "N", 1, 100000, description="the maker's working load"),
        num("diameter_mm", "mm", 1, 30),
        string("note"),
    ),
    "a guy cord of its own",
)
MAST = Record(
    "Mast",
    (
        string("id", required=True, description="at most 20 characters"),
        string("kind"),
        num("height_m", "m", 1, 40, required=True, description="extended height"),
        num("top_load_kg", "kg", 0, 200, required=True, description="the maker's top-load rating"),
        num("guys", "", 0, 12, integer=True, description="default 3"),
        num(
            "wind_limit_m_s",
            "m/s",
            1,
            60,
            description="the maker's wind rating (default Beaufort 6, 10.8 m/s, common practice)",
        ),
        num("diameter_mm", "mm", 5, 300, description="tube diameter for the wind (default 40 mm)"),
        Field(
            "guy_rope",
            schema={"oneOf": [{"type": "string", "enum": ["rope"]}, ref(GUY_ROPE)]},
            refers=(GUY_ROPE,),
            description='what the guys are made of: "rope" (the kit\'s rope, the default) or a cord',
        ),
        string("note"),
    ),
    "a kit mast",
)


def parse_masts(value: Any, field: str = "kit.masts") -> list[Mast]:
    out = []
    for i, item in enumerate(array(value, field, max_items=MAX_MASTS)):
        f = join(field, i)
        obj = require_mapping(item, f)
        MAST.check(obj, f)
        MAST.require(obj, f)
        guys = int(MAST.number(obj, f, "guys", default=3))
        out.append(
            Mast(
                id=text(obj["id"], join(f, "id"), max_length=20),
                height_m=MAST.number(obj, f, "height_m"),
                top_load_kg=MAST.number(obj, f, "top_load_kg"),
                guys=guys,
                wind_limit_m_s=_optional(obj, f, "wind_limit_m_s"),
                diameter_m=None
                if "diameter_mm" not in obj
                else 1e-3 * _optional(obj, f, "diameter_mm"),
                guy_rope=_guy_rope(obj.get("guy_rope", "rope"), join(f, "guy_rope")),
            )
        )
    return out


def _optional(obj: dict, path: str, name: str) -> float | None:
    return MAST.number(obj, path, name) if name in obj else None


def _guy_rope(value: Any, field: str) -> GuyRope:
    if value == "rope":
        return GuyRope()
    if isinstance(value, str):
        raise InputError(
            field, f'expected "rope" (the kit\'s rope) or a cord object, got "{value}"'
        )
    obj = require_mapping(value, field)
    GUY_ROPE.check(obj, field)
    wl = GUY_ROPE.number(obj, field, "working_load_n") if "working_load_n" in obj else None
    d = GUY_ROPE.number(obj, field, "diameter_mm") if "diameter_mm" in obj else None
    if wl is None and d is None:
        raise InputError(field, "give the cord's working_load_n (the maker's) or its diameter_mm")
    return GuyRope(False, wl, d)


def guy_tensions_n(*, head_force_n: float, guys: int) -> tuple[float, ...]:
    """Tension in each guy holding a horizontal force at the mast head, from the direction that
    loads that guy most [N] (statics; pretension not included).

    The guys are equally spaced and anchored ``GUY_RADIUS_FRACTION`` × their height out. A force between
    two neighbouring guys is held by those two (the others slacken): in the ground plane the guy at
    angle φ from the force takes F·sin(σ − φ)/sin(σ), σ = 360°/n, largest F/sin σ (φ = σ − 90°) when
    σ ≥ 90° (three guys: 1.155 F), else F (force along the guy); along its slope it is that over
    cos β, β the guy's angle above the ground.
    """
    n = max(guys, MIN_GUYS)
    sector = 2 * math.pi / n
    spread = 1 / math.sin(sector) if sector >= math.pi / 2 - 1e-12 else 1.0
    cos_beta = GUY_RADIUS_FRACTION / math.hypot(1.0, GUY_RADIUS_FRACTION)
    return tuple(head_force_n * spread / cos_beta for _ in range(n))


def max_pull_for_mast(
    *, rating_kg: float, fixed_load_n: float, leg_weight_n: float, apex_sin: float
) -> float:
    """A first guess at the largest end pull the mast can carry [N].

    Each leg puts about half its weight plus pull × sin(leg angle below horizontal at the apex) on the
    mast head; the exact figure comes from the hung shape (mast_json).
    """
    spare = rating_kg * STANDARD_GRAVITY_M_S2 - fixed_load_n - leg_weight_n
    return max(spare, 0.0) / max(2 * apex_sin, 1e-3)


@dataclass(frozen=True)
class MastLoad:
    """A kit mast carrying the apex: load against rating, guys [SI]."""

    mast: Mast
    apex_height_m: float
    top_load_n: float
    unbalance_n: float = 0.0
    guys_n: tuple[float, ...] = ()  # each guy's tension by statics (fieldkit.rigging.loads) [N]

    @property
    def load_kg(self) -> float:
        return self.top_load_n / STANDARD_GRAVITY_M_S2

    @property
    def ok(self) -> bool:
        return (
            self.load_kg <= self.mast.top_load_kg
            and self.apex_height_m <= self.mast.height_m + 1e-9
        )

    @property
    def why(self) -> str:
        m, load_kg = self.mast, self.load_kg
        why = (
            f"top load {load_kg:.2f} kg within the {m.top_load_kg:g} kg rating"
            if self.ok
            else f"top load {load_kg:.2f} kg exceeds the {m.top_load_kg:g} kg rating: do not use {m.id}"
        )
        if m.guys < MIN_GUYS:
            why += f"; {m.id} lists {m.guys} guys, use at least {MIN_GUYS}"
        return why

    def to_json(self) -> dict[str, Any]:
        """The option's mast block (``wind_limit_m_s``: the maker's rating, when the kit gives it)."""
        radius = GUY_RADIUS_FRACTION * self.apex_height_m
        guy_angle = math.atan2(self.apex_height_m, radius)
        # the guy on the pulled side takes the unbalance: T cos(angle) = unbalance
        u = self.unbalance_n
        guy_tension = u / math.cos(guy_angle) if u > 0 else 0.0
        if self.guys_n:  # wind and pull by statics: the most any guy carries
            guy_tension = max(self.guys_n)
        out = {
            "id": self.mast.id,
            "height_m": round(self.apex_height_m, 2),
            "top_load_kg": round(self.load_kg, 2),
            "rating_kg": self.mast.top_load_kg,
            "ok": self.ok,
            "guys": max(self.mast.guys, MIN_GUYS),
            "guy_radius_m": round(radius, 2),
            "guy_tension_n": round(guy_tension, 1),
            "why": self.why,
        }
        if self.mast.wind_limit_m_s is not None:
            out["wind_limit_m_s"] = self.mast.wind_limit_m_s
        return out


def mast_json(
    mast: Mast, *, apex_height_m: float, top_load_n: float, unbalance_n: float = 0.0
) -> dict[str, Any]:
    """The option's mast block: load against rating, guys and their radius.

    Parameters
    ----------
    apex_height_m : height of the feedpoint on the mast [m]
    top_load_n : downward load at the mast head [N]
    unbalance_n : net horizontal pull at the head that the guys must hold [N]
    """
    return MastLoad(mast, apex_height_m, top_load_n, unbalance_n).to_json()
