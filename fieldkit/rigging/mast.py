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
from fieldkit.errors import array, join, require_mapping, text
from fieldkit.fields import Record, num, string

# Guy anchors at about 0.7 × the guy attachment height from the mast foot (guys near 55° to the
# ground) — common practice for light telescopic masts, no single source.
GUY_RADIUS_FRACTION = 0.7
MIN_GUYS = 3  # three guys at 120° is the least that holds a mast in every direction (statics)


@dataclass(frozen=True)
class Mast:
    """A kit mast: id, extended height [m], rated top load [kg], number of guys."""

    id: str
    height_m: float
    top_load_kg: float
    guys: int


MAX_MASTS = 10
MAST = Record(
    "Mast",
    (
        string("id", required=True, description="at most 20 characters"),
        string("kind"),
        num("height_m", "m", 1, 40, required=True, description="extended height"),
        num("top_load_kg", "kg", 0, 200, required=True, description="the maker's top-load rating"),
        num("guys", "", 0, 12, integer=True, description="default 3"),
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
            )
        )
    return out


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
        """The option's mast block."""
        radius = GUY_RADIUS_FRACTION * self.apex_height_m
        guy_angle = math.atan2(self.apex_height_m, radius)
        # the guy on the pulled side takes the unbalance: T cos(angle) = unbalance
        u = self.unbalance_n
        guy_tension = u / math.cos(guy_angle) if u > 0 else 0.0
        return {
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
