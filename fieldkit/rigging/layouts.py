"""Candidate layouts on a site: which supports, which form, which rope heights may be swept.

A layout is geometry only — it knows how to hang a dipole of a given leg length at a given setting of
rope heights, and which rope heights may be swept (its axes). Electrical work (resonance, sweep) happens
in :mod:`fieldkit.rigging.options`; the sweep itself in :mod:`fieldkit.rigging.height_search`.

Forms and their axes (each from the minimum end height to the supports' limit — a support lets you
hoist lower than its top):

- flat: both ropes of a pair at one height;
- sloping: the lower support at its top, the higher one swept above it;
- inverted-V on a kit mast or from the highest safe branch: the apex, then the end height. The ends are
  bounded by the rope in the kit (stake ropes) and by the clearing; the legs and ropes keep a clearance
  from every trunk; the mast stands where the site says, or at a computed point clear of every trunk.

Where the geometry of the site rules a layout out (a trunk in the span), the layout carries the reason
in ``blocked`` and is never solved.
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np

from fieldkit.errors import InputError, join
from fieldkit.rigging.catenary import HangError
from fieldkit.rigging.clearing import (
    SiteLimits,
    Trunk,
    bearing_deg,
    fits_clearing,
    mast_position,
    nearest_trunk,
)
from fieldkit.rigging.heights import MIN_END_HEIGHT_M
from fieldkit.rigging.hung import HungDipole, hang_span
from fieldkit.rigging.mast import Mast
from fieldkit.rigging.supports import HALYARD_TIE_OFF_M, Support, distance_m, halyard_rope_m
from fieldkit.rigging.vee import (
    INVERTED_V_MAX_LEG_SLOPE_DEG,
    INVERTED_V_MIN_DROP_M,
    end_height_m,
    local_vee,
    mast_tension_n,
    placed,
)

HEIGHT_STEP_M = (
    1.5  # sweep step: finer than a throw-line operator can place a branch (common practice)
)
MAX_SETTINGS = 5  # coarse settings listed per layout (the sweep itself refines, height_search)
SLOPING_MIN_DIFFERENCE_M = 1.5  # below this a "sloping" hang is just a flat one
# Two supports closer than this are one place: nothing can hang between them (a span needs 1 m,
# hung.hang_span), and a duplicate entry is the likelier cause
SAME_PLACE_M = 0.5
AXIS_TURN_STEP_DEG = (
    15.0  # inverted-V legs: other directions tried when the preferred one is blocked
)

__all__ = [
    "INVERTED_V_MAX_LEG_SLOPE_DEG",
    "INVERTED_V_MIN_DROP_M",
    "Axis",
    "Layout",
    "Mechanics",
    "SiteLimits",
    "Stake",
    "Trunk",
    "check_positions",
    "height_grid",
    "inverted_v_layouts",
    "mast_tension_n",
    "site_layouts",
    "span_layouts",
    "stakes",
]


@dataclass(frozen=True)
class Mechanics:
    """Kit figures the hung shape needs (SI)."""

    wire_weight_n_per_m: float
    rope_weight_n_per_m: float
    balun_n: float
    coax_weight_n_per_m: float
    coax_length_m: float
    tension_n: float

    def feed_load_n(self, feed_height_m: float) -> float:
        """Balun plus the coax hanging from the feedpoint to the ground [N]."""
        return self.balun_n + self.coax_weight_n_per_m * min(
            max(feed_height_m, 0.0), self.coax_length_m
        )


@dataclass(frozen=True)
class Axis:
    """One rope height a layout may sweep.

    Attributes
    ----------
    key : "ropes" (both ropes of a flat pair), a support id (the higher rope of a sloping pair),
        "apex" or "ends" (inverted-V)
    low_m, high_m : the asked bounds [m]; the hang may allow less (height_search.feasible_range)
    start_m : its value while another axis is swept first [m]
    what : what the swept height is called in the advice ("the feedpoint", "the apex", "the ends")
    top_why : what ends the axis at ``high_m``, in plain words
    """

    key: str
    low_m: float
    high_m: float
    start_m: float
    what: str
    top_why: str | None = None


@dataclass(frozen=True)
class Layout:
    """A way to hang the dipole on this site.

    Attributes
    ----------
    form : "flat" | "sloping" | "inverted-v"
    supports_used : support ids (and the mast id for an inverted-V)
    settings : a few rope-height settings along the first axis, lowest first; keys are support ids
        (or "ends")
    build : (setting, leg length [m]) -> HungDipole; raises HangError when it cannot hang
    span_m : distance between the end supports (None for an inverted-V on stakes) [m]
    mast : the centre mast, or None
    mast_xy : where the mast stands [m]
    notes : plain-words notes for the option
    axes : the rope heights to sweep, in order
    setting_for : axis values -> setting (rope height per support id, "ends")
    blocked : why this layout cannot be rigged on this site (None when it can)
    min_end_height_m : the lowest the wire may come [m]
    """

    form: str
    supports_used: tuple[str, ...]
    settings: tuple[dict[str, float], ...]
    build: Callable[[dict[str, float], float], HungDipole]
    span_m: float | None = None
    mast: Mast | None = None
    mast_xy: tuple[float, float] | None = None
    notes: tuple[str, ...] = field(default_factory=tuple)
    axes: tuple[Axis, ...] = ()
    setting_for: Callable[[Mapping[str, float]], dict[str, float]] | None = None
    blocked: str | None = None
    min_end_height_m: float = MIN_END_HEIGHT_M

    def start(self) -> dict[str, float]:
        """Axis values before any sweep."""
        return {a.key: a.start_m for a in self.axes}


def height_grid(low: float, high: float) -> list[float]:
    """Rope heights from low to high [m], at most MAX_SETTINGS, about HEIGHT_STEP_M apart."""
    if high <= low + 1e-9:
        return [high]
    n = min(MAX_SETTINGS, max(2, int(round((high - low) / HEIGHT_STEP_M)) + 1))
    return [float(h) for h in np.linspace(low, high, n)]


def _coarse_settings(axes: tuple[Axis, ...], setting_for) -> tuple[dict[str, float], ...]:
    first, values = axes[0], {a.key: a.start_m for a in axes}
    return tuple(
        setting_for({**values, first.key: h}) for h in height_grid(first.low_m, first.high_m)
    )


def check_positions(supports: Sequence[Support], field: str = "site.supports") -> None:
    """Refuse two supports at one place (nothing can hang between them; likely a typing slip).

    Raises
    ------
    InputError
        Naming the later support's ``x_m``.
    """
    for (_i, a), (j, b) in itertools.combinations(enumerate(supports), 2):
        d = distance_m(a, b)
        if d < SAME_PLACE_M:
            raise InputError(
                join(join(field, j), "x_m"),
                f"{b.id} stands {d:.1f} m from {a.id}: two supports at one place cannot hold a span; "
                "give each support its own position (x_m, y_m), or list it once",
                value=[b.x_m, b.y_m],
            )


# -- flat and sloping -------------------------------------------------------------------------


def _span_builder(
    a: Support, b: Support, mech: Mechanics, limits: SiteLimits
) -> Callable[[dict[str, float], float], HungDipole]:
    others = [t for t in limits.trunks if t.id not in (a.id, b.id)]
    lowest = limits.min_end_height_m

    def build(setting: dict[str, float], leg_m: float) -> HungDipole:
        ha, hb = setting[a.id], setting[b.id]
        feed_guess = min(ha, hb) - 1.0
        for _ in range(2):  # the hanging coax depends on the feedpoint height: one fixed-point pass
            hung = hang_span(
                a_xy=(a.x_m, a.y_m),
                a_height_m=ha,
                b_xy=(b.x_m, b.y_m),
                b_height_m=hb,
                leg_m=leg_m,
                wire_weight_n_per_m=mech.wire_weight_n_per_m,
                rope_weight_n_per_m=mech.rope_weight_n_per_m,
                feed_load_n=mech.feed_load_n(feed_guess),
                tension_n=mech.tension_n,
            )
            feed_guess = hung.feedpoint_height_m
        if min(hung.end_heights_m) < lowest - 1e-6 or hung.feedpoint_height_m < lowest:
            raise HangError(
                f"the wire would come down to {min(hung.end_heights_m + (hung.feedpoint_height_m,)):.1f} m, "
                f"below the {lowest:g} m minimum"
            )
        if hung.tail_m > 0 and others:  # drooping ends run on past the supports toward stakes
            p = np.asarray(hung.points_m)[:, :2]
            for seg in ((p[0], p[1]), (p[-2], p[-1])):
                near = nearest_trunk(seg, others)
                if near is not None and near[1] < near[0].radius_m + limits.trunk_clearance_m:
                    raise HangError(
                        f"the drooping end passes {near[1] - near[0].radius_m:.1f} m from {near[0].id}'s "
                        f"trunk (keep {limits.trunk_clearance_m:g} m)"
                    )
        return hung

    return build


def _span_blocked(a: Support, b: Support, limits: SiteLimits) -> str | None:
    """Why a trunk between the two supports rules the span out, or None."""
    others = [t for t in limits.trunks if t.id not in (a.id, b.id)]
    near = nearest_trunk((np.array([a.x_m, a.y_m]), np.array([b.x_m, b.y_m])), others)
    if near is None:
        return None
    trunk, d = near
    if d >= trunk.radius_m + limits.trunk_clearance_m:
        return None
    return (
        f"{trunk.id} stands between {a.id} and {b.id}: the wire would pass "
        f"{max(d - trunk.radius_m, 0.0):.1f} m from its trunk (keep {limits.trunk_clearance_m:g} m)"
    )


def _span_layouts(
    supports: Sequence[Support], mech: Mechanics, *, forms: set[str], limits: SiteLimits
) -> list[Layout]:
    safe = [s for s in supports if not s.unsafe]
    lowest = limits.min_end_height_m
    out = []
    for a, b in itertools.combinations(safe, 2):
        build = _span_builder(a, b, mech, limits)
        span = distance_m(a, b)
        blocked = _span_blocked(a, b, limits)
        low_cap = min(a.height_m, b.height_m)
        if "flat" in forms and low_cap >= lowest:

            def flat(values, a=a, b=b):
                return {a.id: values["ropes"], b.id: values["ropes"]}

            lower = a if a.height_m <= b.height_m else b
            axes = (
                Axis(
                    "ropes",
                    min(lowest, low_cap),
                    low_cap,
                    low_cap,
                    "the feedpoint",
                    f"{lower.id} allows no higher" if a.height_m != b.height_m else None,
                ),
            )
            out.append(
                Layout(
                    form="flat",
                    supports_used=(a.id, b.id),
                    settings=_coarse_settings(axes, flat),
                    build=build,
                    span_m=span,
                    axes=axes,
                    setting_for=flat,
                    blocked=blocked,
                    min_end_height_m=lowest,
                )
            )
        if "sloping" in forms and abs(a.height_m - b.height_m) >= SLOPING_MIN_DIFFERENCE_M:
            hi, lo = (a, b) if a.height_m > b.height_m else (b, a)
            if lo.height_m >= lowest:

                def sloping(values, hi=hi, lo=lo):
                    return {hi.id: values[hi.id], lo.id: lo.height_m}

                axes = (
                    Axis(
                        hi.id,
                        lo.height_m + SLOPING_MIN_DIFFERENCE_M,
                        hi.height_m,
                        hi.height_m,
                        "the feedpoint",
                        f"{hi.id} allows no higher",
                    ),
                )
                out.append(
                    Layout(
                        form="sloping",
                        supports_used=(a.id, b.id),
                        settings=_coarse_settings(axes, sloping),
                        build=build,
                        span_m=span,
                        axes=axes,
                        setting_for=sloping,
                        blocked=blocked,
                        min_end_height_m=lowest,
                    )
                )
    return out


# -- inverted-V -------------------------------------------------------------------------------


@dataclass(frozen=True)
class Stake:
    """Where an inverted-V end's rope is staked: site position, compass bearing and distance from the
    mast (or from the point under the apex) [m], [deg]."""

    x_m: float
    y_m: float
    bearing_deg: float
    distance_m: float

    def to_json(self) -> dict[str, float]:
        return {
            "x_m": round(self.x_m, 1),
            "y_m": round(self.y_m, 1),
            "bearing_deg": round(self.bearing_deg) % 360,
            "distance_m": round(self.distance_m, 1),
        }


def stakes(hung: HungDipole) -> tuple[Stake, Stake]:
    """The two stake positions of an inverted-V, from its hung polyline and stake distance."""
    p = np.asarray(hung.points_m)
    centre = p[int(np.argmin(np.abs(np.cumsum(np.r_[0.0, _seg(p)]) - hung.feed_distance_m)))][:2]
    out = []
    for end in (p[0, :2], p[-1, :2]):
        d = end - centre
        n = float(np.hypot(*d))
        u = d / n if n > 1e-9 else np.array([1.0, 0.0])
        xy = centre + u * float(hung.stake_distance_m or n)
        out.append(Stake(float(xy[0]), float(xy[1]), bearing_deg(u), float(hung.stake_distance_m)))
    return out[0], out[1]


def _seg(p: np.ndarray) -> np.ndarray:
    return np.linalg.norm(np.diff(p, axis=0), axis=1)


def _stake_rope_m(hung: HungDipole, reach_m: float) -> float:
    """Rope from one end insulator down to its stake, with the tie-off [m]."""
    run = float(hung.stake_distance_m) - reach_m
    return math.hypot(run, hung.end_heights_m[0]) + HALYARD_TIE_OFF_M


def _axes_in_order(preferred: tuple[float, float]) -> list[np.ndarray]:
    """The preferred leg direction first, then turned by 15°, 30°, … either way (half a turn)."""
    base = math.atan2(preferred[1], preferred[0])
    turns = [0.0]
    k = 1
    while k * AXIS_TURN_STEP_DEG < 90.0 + 1e-9:
        turns += [k * AXIS_TURN_STEP_DEG, -k * AXIS_TURN_STEP_DEG]
        k += 1
    return [
        np.array([math.cos(base + math.radians(t)), math.sin(base + math.radians(t))])
        for t in turns[:-1]
    ]


def _vee_builder(
    *,
    apex_of: Callable[[np.ndarray], np.ndarray],
    preferred: tuple[float, float],
    mech: Mechanics,
    limits: SiteLimits,
    mast: Mast | None,
    apex_tree: Trunk | None,
) -> Callable[[dict[str, float], float], HungDipole]:
    """Hang an inverted-V; turn the legs until the ropes and stakes fit the site."""
    directions = _axes_in_order(preferred)

    def build(setting: dict[str, float], leg_m: float) -> HungDipole:
        apex = setting["apex"]
        end = end_height_m(setting["ends"], apex, leg_m)
        if end < limits.min_end_height_m - 1e-6:
            raise HangError(f"the ends would hang below the {limits.min_end_height_m:g} m minimum")
        if apex - end < INVERTED_V_MIN_DROP_M - 1e-6:
            raise HangError(
                f"the ends must hang at least {INVERTED_V_MIN_DROP_M:g} m below the apex"
            )
        if mast is not None:
            _, local = mast_tension_n(mast, apex_m=apex, end_m=end, leg_m=leg_m, mech=mech)
        else:
            local = local_vee(
                apex_m=apex, end_m=end, leg_m=leg_m, mech=mech, tension_n=mech.tension_n
            )
        reach = float(np.asarray(local.points_m)[-1, 0])
        rope = 2 * _stake_rope_m(local, reach)
        if mast is None:
            rope += halyard_rope_m(rope_height_m=apex, span_rope_m=0.0)
        if limits.rope_length_m is not None and rope > limits.rope_length_m + 1e-6:
            raise HangError(
                f"with the apex at {apex:.1f} m and the ends at {end:.1f} m the V needs about "
                f"{rope:.0f} m of rope (stake ropes{'' if mast is not None else ' and the apex halyard'}), "
                f"the kit has {limits.rope_length_m:g} m"
            )
        why = "no direction fits"
        for u in directions:
            centre = apex_of(u)
            stake = float(local.stake_distance_m)
            tips = (centre - u * stake, centre + u * stake)
            if not all(fits_clearing(t, limits) for t in (*tips, centre)):
                why = (
                    f"the stakes would stand {stake:.0f} m from the "
                    f"{'mast' if mast is not None else 'apex'}, outside the clearing "
                    f"({limits.clearing_radius_m:g} m from the site origin)"
                )
                continue
            others = [t for t in limits.trunks if apex_tree is None or t.id != apex_tree.id]
            clash = [
                (t, d)
                for tip in tips
                for t, d in [nearest_trunk((centre, tip), others) or (None, math.inf)]
                if t is not None and d < t.radius_m + limits.trunk_clearance_m
            ]
            if clash:
                t, d = clash[0]
                why = (
                    f"every direction of the legs passes near a trunk (e.g. {t.id}: "
                    f"{max(d - t.radius_m, 0.0):.1f} m, keep {limits.trunk_clearance_m:g} m)"
                )
                continue
            return placed(local, centre_xy=centre, axis_xy=u)
        raise HangError(why)

    return build


def _vee_axes(top_m: float, lowest: float, top_why: str) -> tuple[Axis, ...]:
    return (
        Axis("apex", min(lowest + INVERTED_V_MIN_DROP_M, top_m), top_m, top_m, "the apex", top_why),
        Axis("ends", lowest, max(top_m - INVERTED_V_MIN_DROP_M, lowest), lowest, "the ends"),
    )


def _longest_line(safe: Sequence[Support]) -> tuple[float, float]:
    """Direction of the longest line between two safe supports (east–west without a pair)."""
    if len(safe) < 2:
        return (1.0, 0.0)
    a, b = max(itertools.combinations(safe, 2), key=lambda p: distance_m(*p))
    d = distance_m(a, b)
    if d < SAME_PLACE_M:
        return (1.0, 0.0)
    return ((b.x_m - a.x_m) / d, (b.y_m - a.y_m) / d)


def _vee_layout(
    *,
    apex_id: str,
    top_m: float,
    apex_of: Callable[[np.ndarray], np.ndarray],
    preferred: tuple[float, float],
    mech: Mechanics,
    limits: SiteLimits,
    mast: Mast | None,
    apex_tree: Trunk | None,
    top_why: str,
    note: str,
    mast_xy: tuple[float, float] | None = None,
) -> Layout | None:
    lowest = limits.min_end_height_m
    if top_m - INVERTED_V_MIN_DROP_M < lowest:
        return None
    build = _vee_builder(
        apex_of=apex_of,
        preferred=preferred,
        mech=mech,
        limits=limits,
        mast=mast,
        apex_tree=apex_tree,
    )

    def setting_for(values: Mapping[str, float]) -> dict[str, float]:
        return {apex_id: values["apex"], "ends": values["ends"]}

    axes = _vee_axes(top_m, lowest, top_why)
    return Layout(
        form="inverted-v",
        supports_used=(apex_id,),
        settings=tuple(
            {apex_id: top_m, "ends": h}
            for h in height_grid(lowest, min(axes[1].high_m, lowest + 3 * HEIGHT_STEP_M))
        ),
        build=lambda s, leg: build({"apex": s[apex_id], "ends": s["ends"]}, leg),
        mast=mast,
        mast_xy=mast_xy,
        notes=(note,),
        axes=axes,
        setting_for=setting_for,
        min_end_height_m=lowest,
    )


def _mast_layout(
    mast: Mast, safe: Sequence[Support], mech: Mechanics, limits: SiteLimits
) -> Layout | None:
    xy, where = mast_position(mast, safe, limits)
    centre = np.asarray(xy, dtype=float)
    return _vee_layout(
        apex_id=mast.id,
        top_m=mast.height_m,
        apex_of=lambda u: centre,
        preferred=_longest_line(safe),
        mech=mech,
        limits=limits,
        mast=mast,
        apex_tree=None,
        top_why=f"{mast.id} extends no higher",
        note=where + "; tie each end's rope to a stake (see the stake positions)",
        mast_xy=(float(xy[0]), float(xy[1])),
    )


def _branch_layout(safe: Sequence[Support], mech: Mechanics, limits: SiteLimits) -> Layout | None:
    """An inverted-V with its apex on the highest safe branch (a tree as the centre support)."""
    trees = [s for s in safe if s.kind == "tree"]
    if not trees:
        return None
    tree = max(trees, key=lambda s: s.height_m)
    trunk = limits.trunk(tree)
    base = np.array([tree.x_m, tree.y_m])
    toward = -base if np.hypot(*base) > 1e-6 else np.array([0.0, -1.0])
    off = trunk.radius_m + limits.trunk_clearance_m

    def apex_of(u: np.ndarray) -> np.ndarray:
        # the apex hangs off the trunk, on the side toward the site origin, legs at right angles
        n = np.array([-u[1], u[0]])
        return base + off * (n if float(n @ toward) >= 0 else -n)

    return _vee_layout(
        apex_id=tree.id,
        top_m=tree.height_m,
        apex_of=apex_of,
        preferred=_longest_line(safe),
        mech=mech,
        limits=limits,
        mast=None,
        apex_tree=trunk,
        top_why=f"no higher branch on {tree.id}",
        note=(
            f"apex on a {tree.id} branch, {off:.1f} m out from the trunk; the branch carries the "
            "feedpoint and both legs' pull: choose a sound branch; tie each end's rope to a stake "
            "(see the stake positions)"
        ),
    )


def site_layouts(
    supports: Sequence[Support],
    masts: Sequence[Mast],
    mech: Mechanics,
    *,
    forms: set[str],
    limits: SiteLimits,
) -> list[Layout]:
    """Every layout of the asked forms on this site, blocked ones included (with their reason).

    Parameters
    ----------
    supports : the site's supports (unsafe ones are never used, but their trunks are still there)
    masts : the kit's masts
    mech : kit mechanics
    forms : subset of {"flat", "sloping", "inverted-v"}
    limits : minimum end height, clearing, mast point, trunks, rope in the kit

    Raises
    ------
    InputError
        Two supports at one place (field ``site.supports[i].x_m``).
    """
    check_positions(supports)
    out = _span_layouts(supports, mech, forms=forms, limits=limits)
    if "inverted-v" in forms:
        safe = [s for s in supports if not s.unsafe]
        out += [lay for m in masts if (lay := _mast_layout(m, safe, mech, limits)) is not None]
        branch = _branch_layout(safe, mech, limits)
        if branch is not None:
            out.append(branch)
    return out


def span_layouts(
    supports: list[Support],
    mech: Mechanics,
    *,
    forms: set[str],
    limits: SiteLimits | None = None,
) -> list[Layout]:
    """Flat and sloping layouts for every pair of safe supports that may be rigged."""
    limits = limits or SiteLimits.for_supports(supports)
    check_positions(supports)
    return [
        lay
        for lay in _span_layouts(supports, mech, forms=forms & {"flat", "sloping"}, limits=limits)
        if lay.blocked is None
    ]


def inverted_v_layouts(
    supports: list[Support],
    masts: list[Mast],
    mech: Mechanics,
    *,
    site_xy: tuple[float, float] | None = None,
    limits: SiteLimits | None = None,
) -> list[Layout]:
    """An inverted-V on each kit mast and from the highest safe branch (see :func:`site_layouts`).

    ``site_xy`` is accepted for the callers of the first round and not used: the mast stands at
    ``limits.mast_xy_m`` when given, else at the computed point nearest the centroid of the safe
    supports that clears every trunk (:func:`fieldkit.rigging.clearing.mast_position`).
    """
    del site_xy
    limits = limits or SiteLimits.for_supports(supports)
    return [
        lay
        for lay in site_layouts(supports, masts, mech, forms={"inverted-v"}, limits=limits)
        if lay.form == "inverted-v" and lay.blocked is None
    ]
