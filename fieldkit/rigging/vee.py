"""The inverted-V as it is rigged: apex on a kit mast or a tree branch, legs down to end insulators,
ropes on to stakes. The apex and then the end height are swept; the ends are bounded by the rope in the
kit and the clearing, the legs and ropes keep off every trunk (the legs turn until they do), and the
stake positions are given as bearing and distance from the mast or the point under the apex.

References
----------
.. [1] Legs no steeper than 45° below horizontal (apex angle 90° or more): steeper legs cancel each
   other's radiation straight up (common practice, no single source).
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, replace

import numpy as np

from fieldkit.constants import STANDARD_GRAVITY_M_S2
from fieldkit.readable import given_both, height_both, length_both, whole_both
from fieldkit.rigging.catenary import HangError
from fieldkit.rigging.clearing import (
    SiteLimits,
    Trunk,
    bearing_deg,
    fits_clearing,
    mast_position,
    nearest_trunk,
)
from fieldkit.rigging.hung import HungDipole, hang_inverted_v
from fieldkit.rigging.layout import HEIGHT_STEP_M, Axis, Layout, Mechanics, height_grid
from fieldkit.rigging.mast import Mast
from fieldkit.rigging.supports import HALYARD_TIE_OFF_M, Support, distance_m, halyard_rope_m

INVERTED_V_MIN_DROP_M = 2.0  # ends at least this far below the apex to make it a V
# Legs no steeper than 45° below horizontal [1]_. Short legs from a high apex end higher than asked.
INVERTED_V_MAX_LEG_SLOPE_DEG = 45.0


def end_height_m(asked_m: float, apex_m: float, leg_m: float) -> float:
    """End height for an inverted-V: as asked, or higher when the legs would hang too steep [m]."""
    return max(asked_m, apex_m - leg_m * math.sin(math.radians(INVERTED_V_MAX_LEG_SLOPE_DEG)))


def local_vee(*, apex_m: float, end_m: float, leg_m: float, mech, tension_n: float) -> HungDipole:
    """The inverted-V with the kit's wire and feedpoint load at a pull [N], apex at the origin and
    legs along x (:func:`placed` moves it onto the site)."""
    return hang_inverted_v(
        centre_xy=(0.0, 0.0),
        axis_xy=(1.0, 0.0),
        apex_height_m=apex_m,
        end_height_m=end_m,
        leg_m=leg_m,
        wire_weight_n_per_m=mech.wire_weight_n_per_m,
        feed_load_n=mech.feed_load_n(apex_m),
        tension_n=tension_n,
    )


def placed(local: HungDipole, *, centre_xy: np.ndarray, axis_xy: np.ndarray) -> HungDipole:
    """A V hung at the origin along +x, moved to its apex point and turned to its leg direction."""

    p = np.asarray(local.points_m, dtype=float)
    u = np.asarray(axis_xy, dtype=float) / np.linalg.norm(axis_xy)
    n = np.array([-u[1], u[0]])
    xy = np.asarray(centre_xy, dtype=float)[None, :] + p[:, :1] * u[None, :] + p[:, 1:2] * n
    return replace(local, points_m=np.column_stack([xy, p[:, 2]]))


def mast_tension_n(
    mast: Mast, *, apex_m: float, end_m: float, leg_m: float, mech
) -> tuple[float, HungDipole]:
    """The largest pull (up to the kit's) at which the mast carries the inverted-V, and the hang
    (apex at the origin, legs along x).

    Raises
    ------
    HangError
        When even the lightest pull that holds the legs overloads the mast.
    """
    rating_n = mast.top_load_kg * STANDARD_GRAVITY_M_S2

    def hang(t: float) -> HungDipole:
        return local_vee(apex_m=apex_m, end_m=end_m, leg_m=leg_m, mech=mech, tension_n=t)

    t_hi = mech.tension_n
    hung = hang(t_hi)
    if hung.top_load_n <= rating_n:
        return t_hi, hung
    # lightest workable pull: halve until the legs can no longer be held at this drop
    t_lo = t_hi
    lightest = None
    for _ in range(12):
        t_try = t_lo / 2
        try:
            h_try = hang(t_try)
        except HangError:
            break
        t_lo, lightest = t_try, h_try
        if h_try.top_load_n <= rating_n:
            break
    if lightest is None or lightest.top_load_n > rating_n:
        least = (lightest or hung).top_load_n / STANDARD_GRAVITY_M_S2
        raise HangError(
            f"{mast.id} is too weak: even at the lightest pull that holds the legs the top load is "
            f"{least:.2f} kg against its {mast.top_load_kg:g} kg rating"
        )
    for _ in range(30):  # bisect between a pull that fits (t_lo) and one that overloads (t_hi)
        mid = 0.5 * (t_lo + t_hi)
        h_mid = hang(mid)
        if h_mid.top_load_n <= rating_n:
            t_lo, lightest = mid, h_mid
        else:
            t_hi = mid
    return t_lo, lightest


# Two supports closer than this are one place (see layouts.SAME_PLACE_M)
_SAME_PLACE_M = 0.5
AXIS_TURN_STEP_DEG = (
    15.0  # inverted-V legs: other directions tried when the preferred one is blocked
)


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
    """Hang an inverted-V; turn the legs until the ropes and stakes fit the site.

    ``strict=False`` (the exact cut, a percent or so longer or shorter than the screening leg) lets
    the rope and the clearing be exceeded a little rather than lose the option: the finished option
    then says so (``rope short``, :func:`clearing_words`). Trunks are kept off either way.
    """
    directions = _axes_in_order(preferred)

    def build(setting: dict[str, float], leg_m: float, strict: bool = True) -> HungDipole:
        apex = setting["apex"]
        end = end_height_m(setting["ends"], apex, leg_m)
        if end < limits.min_end_height_m - 1e-6:
            raise HangError(
                f"the ends would hang below the {given_both(limits.min_end_height_m)} minimum"
            )
        if apex - end < INVERTED_V_MIN_DROP_M - 1e-6:
            raise HangError(
                f"the ends must hang at least {given_both(INVERTED_V_MIN_DROP_M)} below the apex"
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
        if strict and limits.rope_length_m is not None and rope > limits.rope_length_m + 1e-6:
            raise HangError(
                f"with the apex at {height_both(apex)} and the ends at {height_both(end)} the V needs "
                f"about {whole_both(rope)} of rope for the stake ropes"
                f"{'' if mast is not None else ' and the apex halyard'}, "
                f"the kit has {given_both(limits.rope_length_m)}"
            )
        why = "no direction fits"
        for clearing in (True, False) if not strict else (True,):
            for u in directions:
                centre = apex_of(u)
                stake = float(local.stake_distance_m)
                tips = (centre - u * stake, centre + u * stake)
                if clearing and not all(fits_clearing(t, limits) for t in (*tips, centre)):
                    why = (
                        f"the stakes would stand {whole_both(stake)} from the "
                        f"{'mast' if mast is not None else 'apex'}, outside the clearing, which "
                        f"reaches {given_both(limits.clearing_radius_m)} from the site origin"
                    )
                    continue
                clash = _trunk_clash(centre, tips, limits, apex_tree)
                if clash:
                    why = clash
                    continue
                return placed(local, centre_xy=centre, axis_xy=u)
        raise HangError(why)

    return build


def _trunk_clash(centre, tips, limits: SiteLimits, apex_tree: Trunk | None) -> str | None:
    """Why a leg or stake rope passes too near a trunk, or None."""
    others = [t for t in limits.trunks if apex_tree is None or t.id != apex_tree.id]
    for tip in tips:
        near = nearest_trunk((centre, tip), others)
        if near is not None and near[1] < near[0].radius_m + limits.trunk_clearance_m:
            t, d = near
            return (
                "every direction of the legs passes near a trunk, e.g. "
                f"{length_both(max(d - t.radius_m, 0.0))} from the trunk of {t.id}; "
                f"keep {given_both(limits.trunk_clearance_m)}"
            )
    return None


def clearing_words(hung: HungDipole, limits: SiteLimits) -> list[str]:
    """A warning when a stake of the finished V stands outside the clearing (the exact cut is a
    little longer than the one the ends were swept with)."""
    out = [st for st in stakes(hung) if not fits_clearing((st.x_m, st.y_m), limits)]
    if not out:
        return []
    far = max(math.hypot(st.x_m, st.y_m) for st in out)
    return [
        f"a stake would stand {length_both(far)} from the site origin, just outside the "
        f"{given_both(limits.clearing_radius_m)} clearing: lower the ends a little or shorten the stake ropes"
    ]


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
    if d < _SAME_PLACE_M:
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
        hang=lambda s, leg: build({"apex": s[apex_id], "ends": s["ends"]}, leg, strict=False),
        advice=lambda hung: tuple(clearing_words(hung, limits)),
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
            f"apex on a branch of {tree.id}, {length_both(off)} out from the trunk; the branch carries the "
            "feedpoint and both legs' pull: choose a sound branch; tie each end's rope to a stake "
            "(see the stake positions)"
        ),
    )


def vee_site_layouts(
    supports: Sequence[Support], masts: Sequence[Mast], mech: Mechanics, *, limits: SiteLimits
) -> list[Layout]:
    """An inverted-V on each kit mast and from the highest safe branch."""
    safe = [s for s in supports if not s.unsafe]
    out = [lay for m in masts if (lay := _mast_layout(m, safe, mech, limits)) is not None]
    branch = _branch_layout(safe, mech, limits)
    return out if branch is None else [*out, branch]


def no_apex_reason(
    supports: Sequence[Support], masts: Sequence[Mast], min_end_height_m: float
) -> str:
    """Why no inverted-V can be hung here: which support kinds can be its apex, and what the site has."""
    need = min_end_height_m + INVERTED_V_MIN_DROP_M
    head = (
        "an inverted-V needs its apex on a kit mast (kit.masts) or on a tree's branch (a support of "
        f'kind "tree") at least {given_both(need)} high — the ends hang '
        f"{given_both(INVERTED_V_MIN_DROP_M)} or more below the apex and no lower than the "
        f"{given_both(min_end_height_m)} minimum end height"
    )
    safe = [s for s in supports if not s.unsafe]
    trees = [s for s in safe if s.kind == "tree"]
    low_masts = [m for m in masts if m.height_m < need]
    if masts and len(low_masts) == len(masts):
        head += "; " + ", ".join(f"{m.id} extends to {given_both(m.height_m)}" for m in masts)
    elif not masts:
        head += "; the kit has no mast"
    if trees:
        t = max(trees, key=lambda s: s.height_m)
        head += f"; the highest safe tree, {t.id}, reaches {given_both(t.height_m)}"
    kinds: dict[str, list[str]] = {}
    for s in safe:
        if s.kind != "tree":
            kinds.setdefault(s.kind, []).append(s.id)
    for kind, ids in kinds.items():
        names = " and ".join([", ".join(ids[:-1]), ids[-1]] if len(ids) > 1 else ids)
        verb = "are" if len(ids) > 1 else "is a"
        plural = "s" if len(ids) > 1 else ""
        head += (
            f"; {names} {verb} {kind}{plural}: an apex hangs only from a kit mast (its top load is "
            "rated) or a tree branch"
        )
    return head
