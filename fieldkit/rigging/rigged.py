"""A layout worked out in full, as a typed record, and its one JSON writer.

:func:`fieldkit.rigging.options.finish` returns a :class:`RiggedOption`: the exact resonance (with the
hung wire and the engine's solution), the SWR curve, the mast load, the feedline loss, the warnings.
:func:`rigged_json` writes the option's rigging fields of the plan contract from it, once, at the end.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from fieldkit.constants import SPEED_OF_LIGHT_M_S, STANDARD_GRAVITY_M_S2
from fieldkit.fields import Record, arr, nested, num, string
from fieldkit.rigging.cut import Resonance, SwrCurve, cut_json, spare_m
from fieldkit.rigging.feed_advice import CHOKE_ADVICE
from fieldkit.rigging.feedline import feedline_json
from fieldkit.rigging.heights import HeightPoint, sweep_json
from fieldkit.rigging.hung import HungDipole
from fieldkit.rigging.instruction import CutInstruction, cut_instruction
from fieldkit.rigging.layouts import Layout
from fieldkit.rigging.loads import Loads, loads_json, strength_json
from fieldkit.rigging.mast import MastLoad
from fieldkit.rigging.supports import HALYARD_TIE_OFF_M, halyard_rope_m
from fieldkit.rigging.vee import stakes

LINKED_NOTE = (
    "with a link open, the wire beyond it still hangs there and lowers that channel's resonance by "
    "about 0.3 % (NEC-2 check): check the SWR dip on each channel and trim at the links"
)
SECTIONS_NOTE = (
    "per leg, feedpoint outward; add the wrap allowance at each link and the end insulator"
)
NVIS_FIGURE_WORDS = "mean gain over the elevations that serve 0–300 km (take-off angle to zenith)"
_OBJECT = {"type": "object"}
_NUMBERS = {"type": "array", "items": {"type": "number"}}
RIGGED_OPTION = Record(
    "RiggedOption",
    (
        string("form", "flat", "sloping", "inverted-v", "linked", required=True),
        num("frequency_mhz", "MHz", required=True),
        arr("supports_used", required=True, schema={"items": {"type": "string"}}),
        nested("rope_heights_m", required=True, description="rope height per support id [m]"),
        arr("end_heights_m", required=True, schema={"items": {"type": "number"}}),
        arr(
            "hung_wire_m",
            required=True,
            description="the wire as it will hang: a model spec's points_m",
            schema={"items": _NUMBERS},
        ),
        num("feed_distance_m", "m", required=True, description="along hung_wire_m"),
        nested("wire", required=True, description="the kit wire"),
        nested(
            "cut", required=True, description="leg_m per leg, wrap_allowance_m, total_wire_m, trim"
        ),
        num("feedpoint_height_m", "m", required=True),
        num("feedpoint_height_wavelengths", "", required=True),
        num("sag_m", "m", required=True),
        nested("impedance_ohm", required=True, description="r and x at the channel [Ω]"),
        num("swr", "", required=True),
        nested("swr_curve", required=True),
        nested("nvis", required=True, description="zenith gain, beamwidth, mean NVIS gain"),
        arr(
            "height_sweep",
            required=True,
            schema={"items": _OBJECT},
            description=(
                "every swept setting: rope heights, feedpoint height, NVIS figure, zenith gain, "
                "efficiency; swept (ropes, a support id, apex or ends), swept_height_m, "
                "max_gain_elevation_deg, swr_estimate"
            ),
        ),
        string("height_choice", required=True),
        nested("mast", required=True, nullable=True),
        nested("feedline", required=True, description="loss and mass"),
        nested(
            "rigging",
            required=True,
            description=(
                "loads and rope; an inverted-V's stakes_m: one {x_m, y_m, bearing_deg, distance_m} "
                "per end, from the mast or the point under the apex"
            ),
        ),
        arr("warnings", required=True, schema={"items": {"type": "string"}}),
        num("score_db", "dB", required=True),
        num("apex_angle_deg", "deg", description="inverted-V only"),
        arr("links", description="linked dipole only", schema={"items": _OBJECT}),
        num("channels_mhz", "MHz", many=True, description="linked dipole only"),
    ),
    "one plan option, best first",
)


@dataclass(frozen=True)
class LinkPosition:
    """Where to open the links for one channel of a linked dipole, and the wire's figures there."""

    frequency_hz: float
    from_feed_m: float  # along each leg, from the feedpoint
    impedance_ohm: complex
    swr: float
    bandwidth_2to1: Any  # as swr_curve gives it

    @classmethod
    def of(cls, res, *, frequency_hz: float, bandwidth_2to1: Any) -> LinkPosition:
        z = complex(res.solution.impedance_ohm)
        return cls(frequency_hz, res.leg_m, z, float(res.solution.swr), bandwidth_2to1)

    def json(self) -> dict[str, Any]:
        return {
            "frequency_mhz": round(self.frequency_hz / 1e6, 6),
            "link_from_feed_m": round(self.from_feed_m, 3),
            "impedance_ohm": {
                "r": round(self.impedance_ohm.real, 2),
                "x": round(self.impedance_ohm.imag, 2),
            },
            "swr": round(self.swr, 3),
            "bandwidth_2to1": self.bandwidth_2to1,
            "links": "open the links at this distance from the feedpoint; close every link nearer the feedpoint",
        }


@dataclass(frozen=True)
class LinkedWire:
    """A linked dipole's sections and link positions (one per channel above the lowest)."""

    sections_m: tuple[float, ...]
    links: tuple[LinkPosition, ...]
    channels_hz: tuple[float, ...]


@dataclass(frozen=True)
class RiggedOption:
    """A screened layout at a channel worked out in full (without its safety findings).

    Attributes
    ----------
    layout : the layout (supports, form, how it hangs)
    frequency_hz : the channel [Hz]
    points : the swept rope heights, ``pick`` the chosen one and ``why`` in plain words
    resonance : the exact resonance at the chosen heights: ``leg_m``, ``hung`` wire, ``solution``
    bare_leg_m : the leg a bare wire would need (jacketed kit wire only) [m]
    swr_curve : SWR around the channel and the 2:1 band
    mast : the centre mast's load, or None
    feed_loss_db : feedline loss at the option's SWR [dB]
    warnings : plain-words warnings of the rigging
    linked : sections and links of a linked dipole, or None
    loads : what the supports, wire, ropes and guys carry, or None (no strength figures)
    """

    layout: Layout
    frequency_hz: float
    points: tuple[HeightPoint, ...]
    pick: int
    why: str
    resonance: Resonance
    bare_leg_m: float | None
    swr_curve: SwrCurve
    mast: MastLoad | None
    feed_loss_db: float
    warnings: tuple[str, ...]
    linked: LinkedWire | None = None
    loads: Loads | None = None

    @property
    def hung(self) -> HungDipole:
        return self.resonance.hung

    @property
    def chosen(self) -> dict[str, float]:
        return self.points[self.pick].rope_heights_m

    @property
    def form(self) -> str:
        return "linked" if self.linked is not None else self.layout.form

    @property
    def swr(self) -> float:
        return float(self.resonance.solution.swr)

    @property
    def score_db(self) -> float:
        """NVIS figure less the feedline loss, as shown (0.01 dB) [dB]."""
        return round(self.points[self.pick].nvis_dbi - round(self.feed_loss_db, 3), 2)


def rope_needed_m(layout: Layout, hung: HungDipole, setting: dict[str, float]) -> float:
    """All the rope this hang needs: halyards, or an inverted-V's stake ropes and apex halyard [m]."""
    if layout.form == "inverted-v":
        rope_each = end_rope_m(hung, setting)
        if layout.mast is not None:
            return 2 * rope_each
        return 2 * rope_each + _apex_rope_m(hung)
    total = 0.0
    for i, sid in enumerate(layout.supports_used):
        total += halyard_rope_m(rope_height_m=setting[sid], span_rope_m=hung.span_rope_m[i])
    return total


def end_rope_m(hung: HungDipole, setting: dict[str, float]) -> float:
    """One stake rope: from the end insulator (as it hangs) down its leg's line to the stake, with
    the tie-off [m]."""
    return (
        math.hypot(hung.stake_distance_m - _reach(hung), hung.end_heights_m[0]) + HALYARD_TIE_OFF_M
    )


def _apex_rope_m(hung: HungDipole) -> float:
    """An apex hauled up over a branch on its own halyard [m]."""
    return halyard_rope_m(rope_height_m=hung.feedpoint_height_m, span_rope_m=0.0)


def _reach(hung: HungDipole) -> float:
    p = np.asarray(hung.points_m)
    c = p[len(p) // 2]
    return float(np.hypot(*(p[-1, :2] - c[:2])))


def _inverted_v_json(r: RiggedOption, kit) -> dict[str, Any]:
    hung, layout, g = r.hung, r.layout, STANDARD_GRAVITY_M_S2
    rope_each = end_rope_m(hung, r.chosen)
    out: dict[str, Any] = {
        "stake_distance_m": round(hung.stake_distance_m, 1),
        "end_rope_m": round(rope_each, 1),
        "rope_needed_m": round(rope_needed_m(layout, hung, r.chosen), 1),
        "top_load_kg": round(hung.top_load_n / g, 3),
        "stakes_m": [st.to_json() for st in stakes(hung)],
        "stakes_from": (
            f"bearing and distance from {layout.mast.id}"
            if layout.mast is not None
            else f"bearing and distance from the point under the apex on {layout.supports_used[0]}"
        ),
    }
    if layout.mast is None:  # apex hauled up over a branch on its own halyard
        out["apex_halyard_rope_m"] = round(_apex_rope_m(hung), 1)
    if hung.end_tension_n[0] < kit.mech.tension_n - 1e-6:
        out["note"] = (
            f"pull the ends to only {hung.end_tension_n[0]:.0f} N (not {kit.mech.tension_n:g} N) so the "
            "mast head stays within its rating"
        )
    return out


def _span_json(r: RiggedOption) -> dict[str, Any]:
    hung, layout, setting = r.hung, r.layout, r.chosen
    supports = {}
    for i, sid in enumerate(layout.supports_used):
        t = hung.end_tension_n[i]
        v = hung.support_vertical_n[i]
        rope = halyard_rope_m(rope_height_m=setting[sid], span_rope_m=hung.span_rope_m[i])
        # the branch carries the span pull and the downhaul along the trunk (tension t both ways)
        branch = math.hypot(hung.horizontal_tension_n, v + t)
        supports[sid] = {
            "rope_tension_n": round(t, 1),
            "branch_load_n": round(branch, 1),
            "span_rope_m": round(hung.span_rope_m[i], 2),
            "halyard_rope_m": round(rope, 1),
        }
    out: dict[str, Any] = {
        "supports": supports,
        "rope_needed_m": round(rope_needed_m(layout, hung, setting), 1),
    }
    if hung.tail_m > 0:
        out["droop_tail_m"] = round(hung.tail_m, 2)
    return out


def rigging_json(r: RiggedOption, kit) -> dict[str, Any]:
    """Loads and rope: tension, support loads, halyard rope per support, stakes."""
    hung, g = r.hung, STANDARD_GRAVITY_M_S2
    out: dict[str, Any] = {
        "tension_n": round(max(hung.end_tension_n), 1),
        "horizontal_tension_n": round(hung.horizontal_tension_n, 1),
        "feedpoint_load_kg": round(kit.mech.feed_load_n(hung.feedpoint_height_m) / g, 3),
    }
    extra = _inverted_v_json(r, kit) if r.layout.form == "inverted-v" else _span_json(r)
    out = {**out, **extra}
    if r.loads is not None and kit.strength is not None:
        out["guy_tension_n"] = [round(t, 1) for t in r.loads.guys_n]
        out["loads"] = loads_json(r.loads)
        out["strength"] = strength_json(r.loads, kit.strength)
    return out


def hung_points_m(hung: HungDipole) -> list[list[float]]:
    """The hung wire's polyline as shown (mm) [m]."""
    return [[round(float(v), 3) for v in p] for p in hung.points_m]


def shown_rope_heights_m(setting: dict[str, float]) -> dict[str, float]:
    """Rope height per support as shown (cm; an inverted-V's end height is not a support) [m]."""
    return {k: round(v, 2) for k, v in setting.items() if k != "ends"}


def _mast_json(r: RiggedOption) -> dict[str, Any] | None:
    if r.mast is None:
        return None
    mast = r.mast.to_json()
    mast["x_m"], mast["y_m"] = (round(float(v), 2) + 0.0 for v in r.layout.mast_xy)
    return mast


def _nvis_json(r: RiggedOption) -> dict[str, Any]:
    sol = r.resonance.solution
    return {
        "mean_gain_dbi": round(r.points[r.pick].nvis_dbi, 2),
        "zenith_gain_dbi": round(float(sol.zenith_gain_dbi), 2),
        "max_gain_dbi": round(float(sol.max_gain_dbi), 2),
        "max_gain_elevation_deg": round(float(sol.max_gain_elevation_deg), 1),
        "beamwidth_deg": {k: round(float(v), 1) for k, v in sol.beamwidth_deg().items()},
        "radiation_efficiency": round(float(sol.radiation_efficiency), 3),
        "figure": NVIS_FIGURE_WORDS,
    }


def option_cut_instruction(r: RiggedOption, kit) -> CutInstruction:
    """The option's one cut instruction: what the cut block, the Card and the checklist item say."""
    leg, wrap = r.resonance.leg_m, kit.wrap_allowance_m
    return cut_instruction(
        legs_m=[leg, leg],
        wrap_allowance_m=wrap,
        spare_m=spare_m(leg_m=leg, wrap_allowance_m=wrap, spool_m=kit.wire.spool_m),
        sections_m=None if r.linked is None else r.linked.sections_m,
    )


def _cut_json(r: RiggedOption, kit) -> dict[str, Any]:
    cut = cut_json(
        r.resonance,
        frequency_hz=r.frequency_hz,
        wire=kit.wire,
        wrap_allowance_m=kit.wrap_allowance_m,
        bare_leg_m=r.bare_leg_m,
        instruction=option_cut_instruction(r, kit),
    )
    if r.linked is not None:
        cut["sections_m"] = list(r.linked.sections_m)
        cut["sections_note"] = SECTIONS_NOTE
    cut["choke_advice"] = CHOKE_ADVICE
    return cut


def rigged_json(r: RiggedOption, kit) -> dict[str, Any]:
    """The option's rigging fields of the plan contract (everything but safety, sky, re-trim)."""
    hung, f, sol = r.hung, r.frequency_hz, r.resonance.solution
    option: dict[str, Any] = {
        "form": r.form,
        "frequency_mhz": round(f / 1e6, 6),
        "supports_used": list(r.layout.supports_used),
        "rope_heights_m": shown_rope_heights_m(r.chosen),
        "end_heights_m": [round(h, 2) for h in hung.end_heights_m],
        "hung_wire_m": hung_points_m(hung),
        "feed_distance_m": round(hung.feed_distance_m, 3),
        "wire": kit.wire.to_json(),
        "cut": _cut_json(r, kit),
        "feedpoint_height_m": round(hung.feedpoint_height_m, 2),
        "feedpoint_height_wavelengths": round(
            hung.feedpoint_height_m / (SPEED_OF_LIGHT_M_S / f), 3
        ),
        "sag_m": round(hung.sag_m, 2),
        "impedance_ohm": {
            "r": round(sol.impedance_ohm.real, 2),
            "x": round(sol.impedance_ohm.imag, 2),
        },
        "swr": round(r.swr, 3),
        "swr_curve": r.swr_curve.to_json(),
        "nvis": _nvis_json(r),
        "height_sweep": sweep_json(r.points),
        "height_choice": r.why,
        "mast": _mast_json(r),
        "feedline": feedline_json(kit.coax, frequency_hz=f, swr=r.swr),
        "rigging": rigging_json(r, kit),
        "warnings": list(r.warnings),
        "score_db": r.score_db,
    }
    if r.layout.form == "inverted-v":
        option["apex_angle_deg"] = round(hung.apex_angle_deg, 1)
    if r.linked is not None:
        option["links"] = [lk.json() for lk in r.linked.links]
        option["channels_mhz"] = [round(c / 1e6, 6) for c in r.linked.channels_hz]
    return RIGGED_OPTION.written(option)
