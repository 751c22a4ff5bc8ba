"""One plan option as the safety rules read it: typed, SI units, decoded once.

The planner builds a :class:`CheckedOption` straight from its own typed option; the dict-taking
:func:`fieldkit.safety.safety_block` (the API contract) decodes the option JSON with
:func:`option_from_json`, naming every bad field (``option.hung_wire_m[1][2]``).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from fieldkit.errors import InputError, array, choice, join, number, require_mapping
from fieldkit.safety.plan_view import polyline_length


@dataclass(frozen=True)
class WireSpec:
    """The antenna wire, for the engine solve when the caller has no solution (SI)."""

    diameter_m: float
    conductor: str
    insulation_thickness_m: float = 0.0
    insulation_permittivity: float = 1.0


@dataclass(frozen=True)
class MastAtSite:
    """The option's centre mast: where it stands and how tall (None: under the feedpoint) [m]."""

    id: str
    x_m: float | None = None
    y_m: float | None = None
    height_m: float | None = None
    guys: int | None = None
    wind_limit_m_s: float | None = None  # the maker's rating; None: the common-practice limit


@dataclass(frozen=True)
class CheckedOption:
    """What the safety rules need from a plan option.

    Attributes
    ----------
    frequency_hz : the channel [Hz]
    supports_used : support ids (site supports or the option's mast)
    rope_heights_m : rope height per support id [m] (a support without one is hoisted to its top)
    wire_m : (n, 3) the hung wire polyline [m]
    feed_distance_m : feedpoint distance along the polyline [m]
    feed_m : (3,) the feedpoint [m]
    wire : the wire, for a solve of its own (None when the caller passes the solution)
    mast : the centre mast, or None
    swr : SWR at the channel, for the after-raise item
    trim_cm_per_100khz : leg change that moves the dip 100 kHz [cm], for the re-trim item
    cut_text : the option's one cut instruction with every length in both units
        (:mod:`fieldkit.rigging.instruction`), for the cut-and-mark item; None without one
    """

    frequency_hz: float
    supports_used: tuple[str, ...]
    rope_heights_m: Mapping[str, float]
    wire_m: np.ndarray
    feed_distance_m: float
    feed_m: np.ndarray = field(repr=False)
    wire: WireSpec | None = None
    mast: MastAtSite | None = None
    swr: float | None = None
    trim_cm_per_100khz: float | None = None
    cut_text: str | None = None


def feed_point(wire: np.ndarray, distance_m: float) -> np.ndarray:
    """The point ``distance_m`` along a polyline [m]."""
    seg = np.diff(wire, axis=0)
    lengths = np.linalg.norm(seg, axis=1)
    cum = np.concatenate([[0.0], np.cumsum(lengths)])
    k = int(np.clip(np.searchsorted(cum, distance_m, side="right") - 1, 0, len(seg) - 1))
    t = 0.0 if lengths[k] == 0 else (distance_m - cum[k]) / lengths[k]
    return wire[k] + t * seg[k]


def _wire_points(value: Any, field: str) -> np.ndarray:
    out = []
    for i, p in enumerate(array(value, field, min_items=2)):
        f = join(field, i)
        xyz = array(p, f)
        if len(xyz) != 3:
            raise InputError(f, f"expected [x_m, y_m, z_m], got {len(xyz)} number(s)")
        out.append([number(v, join(f, j), unit="m") for j, v in enumerate(xyz)])
        if out[-1][2] <= 0:
            raise InputError(
                join(f, 2), f"expected a height above ground (> 0 m), got {out[-1][2]:g}"
            )
    return np.array(out)


def _wire_spec(value: Any) -> WireSpec:
    from fieldkit.antenna.materials import CONDUCTORS

    kit = require_mapping(value, "option.wire")
    diameter = number(
        kit.get("diameter_mm"),
        "option.wire.diameter_mm",
        unit="mm",
        minimum=0.0,
        exclusive_minimum=True,
    )
    conductor = choice(kit.get("conductor", "copper"), "option.wire.conductor", CONDUCTORS)
    if not kit.get("insulation"):
        return WireSpec(diameter / 1000, conductor)
    ins = require_mapping(kit["insulation"], "option.wire.insulation")
    thickness = number(
        ins.get("thickness_mm"), "option.wire.insulation.thickness_mm", unit="mm", minimum=0.0
    )
    eps = number(
        ins.get("relative_permittivity"),
        "option.wire.insulation.relative_permittivity",
        minimum=1.0,
    )
    return WireSpec(diameter / 1000, conductor, thickness / 1000, eps)


def _mast(value: Any, feed: np.ndarray) -> MastAtSite | None:
    """The option's mast block: id, and where it stands (default: under the feedpoint)."""
    if not isinstance(value, Mapping) or "id" not in value:
        return None
    x = number(value.get("x_m", float(feed[0])), "option.mast.x_m", unit="m")
    y = number(value.get("y_m", float(feed[1])), "option.mast.y_m", unit="m")
    top = number(
        value.get("height_m", float(feed[2])), "option.mast.height_m", unit="m", minimum=0.0
    )
    guys = value.get("guys")
    wind = None
    if "wind_limit_m_s" in value:
        wind = number(
            value["wind_limit_m_s"], "option.mast.wind_limit_m_s", unit="m/s", minimum=0.0
        )
    return MastAtSite(str(value["id"]), x, y, top, guys if isinstance(guys, int) else None, wind)


def _supports_used(option: Mapping[str, Any]) -> tuple[str, ...]:
    used = array(option.get("supports_used", []), "option.supports_used")
    for i, sid in enumerate(used):
        if not isinstance(sid, str):
            raise InputError(join("option.supports_used", i), f"expected a support id, got {sid!r}")
    return tuple(used)


def _rope_heights(option: Mapping[str, Any], used: tuple[str, ...]) -> dict[str, float]:
    heights = option.get("rope_heights_m") or {}
    if not isinstance(heights, Mapping):
        raise InputError(
            "option.rope_heights_m", "expected an object: support id → rope height in m"
        )
    return {
        sid: number(heights[sid], join("option.rope_heights_m", sid), unit="m", minimum=0.0)
        for sid in used
        if sid in heights
    }


def _trim_cm(option: Mapping[str, Any]) -> float | None:
    """The cut list's leg change per 100 kHz, when the option carries its trim table [cm]."""
    cut = option.get("cut") if isinstance(option.get("cut"), Mapping) else {}
    steps = cut.get("trim_steps") if isinstance(cut.get("trim_steps"), list) else []
    return next(
        (
            float(s["cut_cm_per_leg_to_raise"])
            for s in steps
            if isinstance(s, Mapping)
            and s.get("shift_khz") == 100
            and isinstance(s.get("cut_cm_per_leg_to_raise"), int | float)
        ),
        None,
    )


def _cut_text(option: Mapping[str, Any]) -> str | None:
    """The cut instruction's text in both units, when the option carries it (``cut.instruction``)."""
    cut = option.get("cut") if isinstance(option.get("cut"), Mapping) else {}
    instruction = cut.get("instruction") if isinstance(cut.get("instruction"), Mapping) else {}
    texts = instruction.get("text") if isinstance(instruction.get("text"), Mapping) else {}
    text = texts.get("both")
    return text if isinstance(text, str) else None


def _frequency_hz(option: Mapping[str, Any]) -> float:
    f_mhz = number(
        option.get("frequency_mhz"),
        "option.frequency_mhz",
        unit="MHz",
        minimum=0.0,
        exclusive_minimum=True,
    )
    return f_mhz * 1e6


def _feed_distance(option: Mapping[str, Any], wire: np.ndarray) -> float:
    feed_d = number(option.get("feed_distance_m"), "option.feed_distance_m", unit="m", minimum=0.0)
    length = polyline_length(wire)
    if feed_d > length + 1e-9:
        raise InputError(
            "option.feed_distance_m", f"{feed_d:g} m is beyond the wire's length {length:.3f} m"
        )
    return feed_d


def option_from_json(option: Any, *, with_wire: bool = True) -> CheckedOption:
    """Decode a plan option's JSON (``frequency_mhz``, ``supports_used``, ``rope_heights_m``,
    ``hung_wire_m``, ``feed_distance_m``, ``wire``, optional ``mast``, ``swr``, ``cut``).

    ``with_wire=False`` skips the wire (the caller passes the engine's solution instead).
    """
    option = require_mapping(option, "option")
    f_hz = _frequency_hz(option)
    wire = _wire_points(option.get("hung_wire_m"), "option.hung_wire_m")
    feed_d = _feed_distance(option, wire)
    feed = feed_point(wire, feed_d)
    used = _supports_used(option)
    swr = option.get("swr")
    return CheckedOption(
        frequency_hz=f_hz,
        supports_used=used,
        rope_heights_m=_rope_heights(option, used),
        wire_m=wire,
        feed_distance_m=feed_d,
        feed_m=feed,
        wire=_wire_spec(option.get("wire")) if with_wire else None,
        mast=_mast(option.get("mast"), feed),
        swr=float(swr) if isinstance(swr, int | float) and not isinstance(swr, bool) else None,
        trim_cm_per_100khz=_trim_cm(option),
        cut_text=_cut_text(option),
    )
