"""What each support, the wire, the ropes and the guys carry, and whether they hold.

Per support the pull in still air at the planned tension (horizontal and vertical, from the hung
shape) and the resultant in the design weather; the wire's and the ropes' largest tension against
their working loads (:mod:`fieldkit.rigging.strength`), the weak link against the pull and the wire,
and the centre mast's guys by statics (:func:`fieldkit.rigging.mast.guy_tensions_n`). Findings come
back in plain words for the option's ``warnings``.

A branch has no rating: a load above an adult's weight is named, with the advice to lower the pull.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from fieldkit.constants import STANDARD_GRAVITY_M_S2
from fieldkit.rigging.hung import HungDipole
from fieldkit.rigging.layout import Layout, Mechanics
from fieldkit.rigging.mast import Mast, guy_tensions_n
from fieldkit.rigging.strength import SOFT_COPPER_STRETCH_FRACTION, RopeStrength, WireStrength
from fieldkit.rigging.wind import (
    DEFAULT_MAST_DIAMETER_M,
    SpanLoad,
    Weather,
    drag_n_per_m,
    ice_weight_n_per_m,
    tied_off_tension_n,
)

#: A branch asked to carry more than an adult's weight (80 kg) is named: nobody can judge from the
#: ground a limb that would not hold a climber (common practice, no single source).
BRANCH_CAUTION_N = 80.0 * STANDARD_GRAVITY_M_S2


@dataclass(frozen=True)
class Strength:
    """The kit's strength figures and the weather the rig is checked for (SI).

    Attributes
    ----------
    wire : the antenna wire's breaking and working load
    wire_diameter_m : across the wind, jacket included [m]
    rope : the kit rope's working load
    rope_diameter_m : [m]
    weak_link_n : the weak link's rated breaking load, None when the kit has none stated [N]
    weather : design wind and ice
    coax_diameter_m : [m]
    guy_ropes : per mast id, the working load of its guys
    mast_wind_m_s : per mast id, the wind it stays up in: its rating, or the common-practice limit
        (the planning layer reads it from the safety rules) [m/s]
    """

    wire: WireStrength
    wire_diameter_m: float
    rope: RopeStrength
    rope_diameter_m: float
    weak_link_n: float | None
    weather: Weather
    coax_diameter_m: float
    guy_ropes: dict[str, RopeStrength]
    mast_wind_m_s: dict[str, float]
    rope_stiffness_n: float = math.inf  # the kit rope's EA [N]


@dataclass(frozen=True)
class SupportLoad:
    """The pull on one support in still air (horizontal, vertical) and its resultant in the weather [N]."""

    id: str
    horizontal_n: float
    vertical_n: float
    in_weather_n: float
    what: (
        str  # "branch", "branch at the apex", "mast head", "mast top", "pole top", "tie-off point"
    )

    @property
    def still_n(self) -> float:
        return math.hypot(self.horizontal_n, self.vertical_n)

    def to_json(self) -> dict[str, Any]:
        return {
            "carries": self.what,
            "horizontal_n": round(self.horizontal_n, 1),
            "vertical_n": round(self.vertical_n, 1),
            "load_kg": round(self.still_n / STANDARD_GRAVITY_M_S2, 1),
            "in_wind_n": round(self.in_weather_n, 1),
            "in_wind_kg": round(self.in_weather_n / STANDARD_GRAVITY_M_S2, 1),
        }


@dataclass(frozen=True)
class Loads:
    """An option's loads: supports, the largest wire and rope tension (still and in the weather),
    the guys [N]."""

    supports: tuple[SupportLoad, ...]
    wire_tension_n: float
    wire_weather_n: float
    rope_tension_n: float
    rope_weather_n: float
    factor: float
    guys_n: tuple[float, ...] = ()
    guy_wind_m_s: float | None = None
    guy_head_force_n: float = 0.0
    most_pull_n: float = math.inf  # the largest still pull the wire allows in the weather
    weight_n: float = 0.0  # what the span (or a leg) weighs with its ropes and mid load


def _polyline_m(points: np.ndarray) -> float:
    return float(np.linalg.norm(np.diff(points, axis=0), axis=1).sum())


def _coax_drag_n(mech: Mechanics, st: Strength, height_m: float, wind_m_s: float) -> float:
    """Half the wind on the coax hanging from a height: the other half goes to the ground [N]."""
    hanging = min(height_m, mech.coax_length_m)
    return (
        0.5
        * hanging
        * drag_n_per_m(diameter_m=st.coax_diameter_m, wind_m_s=wind_m_s, ice_m=st.weather.ice_m)
    )


def _most_pull_n(in_weather, *, working_n: float, tension_n: float) -> float:
    """The largest still-air pull whose tension in the weather stays within ``working_n`` [N]
    (bisection: the tension in the weather grows with the pull)."""
    lo, hi = 0.0, tension_n
    for _ in range(40):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if in_weather(mid) <= working_n else (lo, mid)
    return lo


@dataclass(frozen=True)
class _Chain:
    """A tied-off chain between two fixed points: its chord [m] and slope (cos) [-], its parts as
    (length [m], weight [N/m], diameter [m]), a mid-span load and its drag [N], its compliance [m/N]."""

    chord_m: float
    cos_slope: float
    parts: tuple[tuple[float, float, float], ...]
    mid_n: float
    mid_drag_n: float
    compliance_m_per_n: float

    @property
    def weight_n(self) -> float:
        """Its still-air weight [N]."""
        return self.mid_n + sum(n * w for n, w, _ in self.parts)

    def in_weather_n(self, tension_n: float, weather: Weather) -> float:
        """Its tension in the weather when it pulls ``tension_n`` in still air [N]."""
        L, c, v, t = self.chord_m, self.cos_slope, weather.wind_m_s, weather.ice_m
        still = sum(n * w for n, w, _ in self.parts) / L
        ice = sum(n * ice_weight_n_per_m(diameter_m=d, ice_m=t) for n, _, d in self.parts) / L
        drag = (
            sum(n * drag_n_per_m(diameter_m=d, wind_m_s=v, ice_m=t) for n, _, d in self.parts) / L
        )
        return tied_off_tension_n(
            span_m=L,
            tension_n=tension_n,
            still=SpanLoad(still * c, self.mid_n * c),
            down=SpanLoad((still + ice) * c, self.mid_n * c),
            across=SpanLoad(drag, self.mid_drag_n),
            compliance_m_per_n=self.compliance_m_per_n,
        )


def _loads_of(chain: _Chain, st: Strength, tension_n: float, *, ratio: float = 1.0):
    """(tension in the weather, the largest still pull the wire's working load allows in it) [N].

    ``ratio``: end tension over the chain's tension in the cable equation (a span's H)."""

    def in_weather(t: float) -> float:
        return ratio * chain.in_weather_n(t / ratio, st.weather) if t > 0 else 0.0

    most = _most_pull_n(in_weather, working_n=st.wire.working_n, tension_n=tension_n)
    return in_weather(tension_n), most


def span_loads(
    layout: Layout, hung: HungDipole, mech: Mechanics, st: Strength, setting: dict[str, float]
) -> Loads:
    """A flat or sloping span (or a linked dipole): each support carries the span's pull and the
    downhaul of its halyard along the trunk (the rope tension both ways)."""
    wire_m = _polyline_m(np.asarray(hung.points_m)) - 2 * hung.tail_m
    rope_m = sum(hung.span_rope_m)
    heights = [setting[sid] for sid in layout.supports_used]
    span = layout.span_m or wire_m
    chord = math.hypot(span, heights[0] - heights[1])
    chain = _Chain(
        chord_m=chord,
        cos_slope=span / chord,
        parts=(
            (wire_m, mech.wire_weight_n_per_m, st.wire_diameter_m),
            (rope_m, mech.rope_weight_n_per_m, st.rope_diameter_m),
        ),
        mid_n=mech.feed_load_n(hung.feedpoint_height_m),
        mid_drag_n=_coax_drag_n(mech, st, hung.feedpoint_height_m, st.weather.wind_m_s),
        # the halyards stretch from the span down the trunk to their tie-offs
        compliance_m_per_n=wire_m / st.wire.stiffness_n
        + (rope_m + sum(heights)) / st.rope_stiffness_n,
    )
    t = max(hung.end_tension_n)
    h = hung.horizontal_tension_n
    t_weather, most = _loads_of(chain, st, t, ratio=t / h)
    k = t_weather / t
    supports = []
    for i, sid in enumerate(layout.supports_used):
        te, v = hung.end_tension_n[i], hung.support_vertical_n[i]
        what = _end_support_words(layout.kinds[i] if layout.kinds else "tree")
        supports.append(SupportLoad(sid, h, v + te, k * math.hypot(h, v + te), what))
    return Loads(
        tuple(supports), t, t_weather, t, t_weather, k, most_pull_n=most, weight_n=chain.weight_n
    )


def _end_support_words(kind: str) -> str:
    """What of an end support carries the span: a tree's branch, a mast's or pole's top."""
    return {"tree": "branch", "mast": "mast top", "pole": "pole top"}.get(kind, "tie-off point")


def vee_loads(
    layout: Layout, hung: HungDipole, mech: Mechanics, st: Strength, *, stake_rope_m: float
) -> Loads:
    """An inverted-V: each leg and its stake rope tied off from the apex to a stake; the apex on a
    mast head or a branch. A branch apex hangs on a halyard over the branch, so the branch carries
    the apex and the downhaul."""
    leg_m = _polyline_m(np.asarray(hung.points_m)) / 2
    stake_m = hung.stake_distance_m or leg_m
    chord = math.hypot(stake_m, hung.feedpoint_height_m)
    chain = _Chain(
        chord_m=chord,
        cos_slope=stake_m / chord,
        parts=(
            (leg_m, mech.wire_weight_n_per_m, st.wire_diameter_m),
            (stake_rope_m, mech.rope_weight_n_per_m, st.rope_diameter_m),
        ),
        mid_n=0.0,
        mid_drag_n=0.0,
        compliance_m_per_n=leg_m / st.wire.stiffness_n + stake_rope_m / st.rope_stiffness_n,
    )
    t = hung.end_tension_n[0]
    t_weather, most = _loads_of(chain, st, t)
    k = t_weather / t
    apex = hung.top_load_n or 0.0
    mast = layout.mast
    wind = _guy_wind_m_s(mast, st)
    head_h = _head_wind_n(hung, mech, st, mast, leg_m=leg_m, wind_m_s=wind)
    if mast is not None:
        load = SupportLoad(mast.id, 0.0, apex, math.hypot(apex, head_h), "mast head")
        guys = guy_tensions_n(head_force_n=head_h, guys=mast.guys)
        return Loads(
            (load,), t, t_weather, t, t_weather, k, guys, wind, head_h, most, chain.weight_n
        )
    # the halyard that holds the apex runs down the trunk: the branch carries both of its parts
    weather_h = _head_wind_n(hung, mech, st, None, leg_m=leg_m, wind_m_s=st.weather.wind_m_s)
    load = SupportLoad(
        layout.supports_used[0],
        0.0,
        2 * apex,
        math.hypot(2 * apex * k, weather_h),
        "branch at the apex",
    )
    rope_t = max(t, apex)
    return Loads(
        (load,), t, t_weather, rope_t, k * rope_t, k, most_pull_n=most, weight_n=chain.weight_n
    )


def _guy_wind_m_s(mast: Mast | None, st: Strength) -> float:
    """The wind a mast's guys hold: the design wind, or the mast's limit if lower (it comes down
    above it) [m/s]."""
    if mast is None:
        return st.weather.wind_m_s
    return min(st.weather.wind_m_s, st.mast_wind_m_s.get(mast.id, st.weather.wind_m_s))


def _head_wind_n(
    hung: HungDipole,
    mech: Mechanics,
    st: Strength,
    mast: Mast | None,
    *,
    leg_m: float,
    wind_m_s: float,
) -> float:
    """Horizontal force at the apex in a wind across the legs: half of each leg's drag (the other half
    goes to its stake), half the drag on the mast tube and on the coax down it (a mast held at the
    foot and at the guys) [N]."""
    ice = st.weather.ice_m
    wire = drag_n_per_m(diameter_m=st.wire_diameter_m, wind_m_s=wind_m_s, ice_m=ice)
    force = wire * leg_m + _coax_drag_n(mech, st, hung.feedpoint_height_m, wind_m_s)
    if mast is not None:
        d = mast.diameter_m or DEFAULT_MAST_DIAMETER_M
        force += (
            0.5 * hung.feedpoint_height_m * drag_n_per_m(diameter_m=d, wind_m_s=wind_m_s, ice_m=ice)
        )
    return force


def _n(x: float) -> str:
    """A force as read: "440 N", "1.2 kN"."""
    return f"{x / 1000:.1f} kN" if x >= 1000 else f"{x:.0f} N"


def _kg(x_n: float) -> str:
    return f"{x_n / STANDARD_GRAVITY_M_S2:.0f} kg"


def wire_words(loads: Loads, st: Strength) -> list[str]:
    """The wire's tension, still and in the weather, against its working load."""
    w, t, tw = st.wire, loads.wire_tension_n, loads.wire_weather_n
    about = f"{w.kind} breaks at about {_n(w.breaking_n)}, from memory"
    keep = f"keep it under {_n(w.working_n)} (1/{w.safety_factor:g} of its breaking load)"
    if t > w.breaking_n:
        return [
            f"the planned pull of {_n(t)} breaks the wire: {about}; {keep}, or use stronger wire "
            "(hard-drawn copper or copper-clad steel)"
        ]
    if t > w.working_n:
        return [
            f"the planned pull of {_n(t)} is more than the wire may carry: {about}; {keep}, or use "
            "stronger wire (hard-drawn copper or copper-clad steel)"
        ]
    if tw > w.working_n:
        most = loads.most_pull_n
        pull = (
            f"pull no more than {_n(most)}"
            # under twice its weight a span sags more than 1/16 of its length (H = wL²/8s): no hang
            if most >= 2 * loads.weight_n
            else "no pull that holds the wire up keeps it within that"
        )
        return [
            f"in {st.weather.words()} the tied-off wire pulls about {_n(tw)}, more than the "
            f"{_n(w.working_n)} it may carry ({about}): {pull}; use stronger wire, or take the "
            "wire down before such weather"
        ]
    if w.soft_copper and t > SOFT_COPPER_STRETCH_FRACTION * w.breaking_n:
        return [
            f"soft-drawn copper stretches for good above about {_n(SOFT_COPPER_STRETCH_FRACTION * w.breaking_n)} "
            f"(a third of its breaking load, from memory): at {_n(t)} the legs will grow and the dip "
            "move down; pull less, check the SWR again later, or use hard-drawn wire"
        ]
    return []


def rope_words(loads: Loads, st: Strength, *, ropes: str) -> list[str]:
    """The rope's tension against its working load, and the weak link."""
    out = []
    r, t, tw = st.rope, loads.rope_tension_n, loads.rope_weather_n
    if max(t, tw) > r.working_n:
        when = f"{_n(t)}" if t > r.working_n else f"{_n(tw)} in {st.weather.words()}"
        out.append(
            f"the {ropes} carry {when}, more than the rope's working load of {_n(r.working_n)} "
            f"({r.short}): pull less or use stronger rope"
        )
    out += _weak_link_words(loads, st)
    return out


def _weak_link_words(loads: Loads, st: Strength) -> list[str]:
    wl = st.weak_link_n
    if wl is None:
        return []
    if wl >= st.wire.breaking_n:
        return [
            f"the weak link ({_n(wl)}) holds more than the wire, which breaks at about "
            f"{_n(st.wire.breaking_n)}: the wire would break first; use a weak link under "
            f"{_n(st.wire.working_n)}"
        ]
    if loads.rope_tension_n >= wl:
        return [
            f"the weak link ({_n(wl)}) parts at the planned pull of {_n(loads.rope_tension_n)}: "
            f"pull less than {_n(wl)}, or use a stronger weak link"
        ]
    if loads.rope_weather_n >= wl:
        return [
            f"in {st.weather.words()} the pull reaches about {_n(loads.rope_weather_n)} and the weak "
            f"link ({_n(wl)}) parts, as it should before the branch or the wire: expect to raise the "
            "wire again after such weather"
        ]
    return []


def support_words(loads: Loads, st: Strength) -> list[str]:
    """Branches asked to carry more than an adult's weight."""
    out = []
    for s in loads.supports:
        if s.what in ("mast top", "pole top"):
            out.append(_end_top_words(s, st))
            continue
        if not s.what.startswith("branch"):  # a mast head's load is checked against its rating
            continue
        if s.still_n > BRANCH_CAUTION_N:
            size = f"{_n(s.still_n)} ({_kg(s.still_n)})"
        elif s.in_weather_n > BRANCH_CAUTION_N:
            size = f"{_n(s.in_weather_n)} ({_kg(s.in_weather_n)}) in {st.weather.words()}"
        else:
            continue
        extra = " with the halyard's downhaul" if s.what == "branch at the apex" else ""
        out.append(
            f"the branch of {s.id} carries {size}{extra}, more than an adult's weight: a branch "
            "cannot be judged from the ground; pull less, or use a limb close to the trunk or a mast"
        )
    return out


def _end_top_words(s: SupportLoad, st: Strength) -> str:
    """A mast or pole at an end of the span takes the wire's pull sideways at its top."""
    kind = s.what.removesuffix(" top")
    return (
        f"the {kind} {s.id} takes the wire's pull at its top: {_n(s.horizontal_n)} sideways in "
        f"still air, {_n(s.in_weather_n)} in all in {st.weather.words()}; guy it back in line with the wire, against "
        "the pull, with guys rated for it, and stay within the maker's top-load rating"
    )


def guy_words(loads: Loads, mast: Mast | None, st: Strength) -> list[str]:
    """The guys' tension against the working load of what they are made of."""
    if mast is None or not loads.guys_n:
        return []
    rope = st.guy_ropes.get(mast.id)
    top = max(loads.guys_n)
    if rope is None or top <= rope.working_n:
        return []
    return [
        f"in a {loads.guy_wind_m_s:g} m/s wind each guy of {mast.id} may carry {_n(top)}, more than "
        f"its working load of {_n(rope.working_n)} ({rope.short}): use stronger guy cord or more guys"
    ]


def loads_json(loads: Loads) -> dict[str, Any]:
    """The option's ``rigging.loads``: per support id (as ``rigging.supports``), what it carries,
    the horizontal and vertical pull in still air [N], and the resultant in the checked wind."""
    return {s.id: s.to_json() for s in loads.supports}


def strength_json(loads: Loads, st: Strength) -> dict[str, Any]:
    """The option's ``rigging.strength``: the wire's and ropes' pull against what they may carry,
    the wind and ice they were checked in, and the guys' figures."""
    out: dict[str, Any] = {
        "wire_tension_n": round(loads.wire_tension_n, 1),
        "wire_tension_in_wind_n": round(loads.wire_weather_n, 1),
        "wire_breaking_n": round(st.wire.breaking_n, 0),
        "wire_working_n": round(st.wire.working_n, 0),
        "wire_source": st.wire.source,
        "rope_tension_n": round(loads.rope_tension_n, 1),
        "rope_tension_in_wind_n": round(loads.rope_weather_n, 1),
        "rope_working_n": round(st.rope.working_n, 0),
        "rope_source": st.rope.source,
        "wind_m_s": st.weather.wind_m_s,
        "wind_from": "the kit"
        if st.weather.stated
        else "default: a gale (Beaufort 8), common practice",
        "note": (
            "still air at the planned pull; in the wind with the halyards tied off, the wire and "
            "ropes keep their unstretched length and the tension grows until the added sag and "
            "stretch make it up (Irvine, Cable Structures, §2.2). Defer to the makers' ratings and "
            "local practice."
        ),
    }
    if st.weather.ice_m > 0:
        out["ice_mm"] = round(st.weather.ice_m * 1e3, 1)
    if st.weak_link_n is not None:
        out["weak_link_n"] = st.weak_link_n
    if loads.guys_n:
        out["guy_wind_m_s"] = loads.guy_wind_m_s
        out["guy_head_force_n"] = round(loads.guy_head_force_n, 1)
    return out
