"""Room on the site: trunks to keep the wire and ropes off, the clearing's edge, where the mast stands.

Every support is an obstacle of its own radius (a trunk, a pole) whether or not it is used, and an
unsafe tree is still there. Wire and ropes keep ``TRUNK_CLEARANCE_M`` from every trunk they do not
hang from; a centre mast stands so that the circle of its guy anchors clears every trunk; stakes,
the mast and an inverted-V's wire stay inside the clearing when the site states its radius.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from fieldkit.errors import InputError
from fieldkit.readable import given_both, length_both
from fieldkit.rigging.heights import MIN_END_HEIGHT_M
from fieldkit.rigging.mast import GUY_RADIUS_FRACTION, Mast
from fieldkit.rigging.supports import Support

# Trunk radius when the site does not give one: 0.3 m for a tree (a trunk of 60 cm, the contract's
# default), 0.1 m for a pole, mast, building corner or vehicle (its own thickness; no single source)
TREE_TRUNK_RADIUS_M = 0.3
OTHER_RADIUS_M = 0.1
# Wire and ropes a metre off bark and branches, so that they neither chafe nor snag when the tree
# sways (common practice, no single source)
TRUNK_CLEARANCE_M = 1.0
MAST_SEARCH_STEP_M = 0.5  # rings around the wanted point when placing the mast
MAST_SEARCH_MAX_M = 60.0
MAST_SEARCH_ANGLES = 36


@dataclass(frozen=True)
class Trunk:
    """An obstacle on the ground plan: support id, position [m] and radius [m]."""

    id: str
    x_m: float
    y_m: float
    radius_m: float

    @property
    def xy(self) -> np.ndarray:
        return np.array([self.x_m, self.y_m])


def default_radius_m(kind: str) -> float:
    return TREE_TRUNK_RADIUS_M if kind == "tree" else OTHER_RADIUS_M


@dataclass(frozen=True)
class SiteLimits:
    """What the site and kit allow the wire, ropes, stakes and mast.

    Attributes
    ----------
    min_end_height_m : lowest a wire end or the feedpoint may hang [m]
    clearing_radius_m : stakes, mast and an inverted-V's wire within this distance of the site
        origin [m]; None = no limit
    mast_xy_m : where the centre mast stands, when the operator says so [m]
    rope_length_m : rope in the kit for stake ropes and an apex halyard [m]; None = not checked
    trunks : every support as an obstacle
    trunk_clearance_m : wire and ropes keep this from any trunk they do not hang from [m]
    """

    min_end_height_m: float = MIN_END_HEIGHT_M
    clearing_radius_m: float | None = None
    mast_xy_m: tuple[float, float] | None = None
    rope_length_m: float | None = None
    trunks: tuple[Trunk, ...] = ()
    trunk_clearance_m: float = TRUNK_CLEARANCE_M

    @classmethod
    def for_supports(
        cls, supports: Sequence[Support], *, radii: Mapping[str, float] | None = None, **kw
    ) -> SiteLimits:
        """Limits with every support as a trunk (radius from ``radii`` by id, else the support's own,
        else the kind's default)."""
        radii = radii or {}
        trunks = tuple(
            Trunk(s.id, s.x_m, s.y_m, float(radii.get(s.id, _radius(s)))) for s in supports
        )
        return cls(trunks=trunks, **kw)

    def trunk(self, support: Support) -> Trunk:
        for t in self.trunks:
            if t.id == support.id:
                return t
        return Trunk(support.id, support.x_m, support.y_m, _radius(support))


def _radius(support: Support) -> float:
    r = support.trunk_radius_m
    return default_radius_m(support.kind) if r is None else float(r)


def segment_distance_m(point: np.ndarray, a: np.ndarray, b: np.ndarray) -> float:
    """Distance from a point to the segment a–b in the ground plan [m]."""
    ab = b - a
    n = float(ab @ ab)
    t = 0.0 if n < 1e-12 else min(max(float((point - a) @ ab) / n, 0.0), 1.0)
    return float(np.hypot(*(point - (a + t * ab))))


def nearest_trunk(
    segment: tuple[np.ndarray, np.ndarray], trunks: Sequence[Trunk]
) -> tuple[Trunk, float] | None:
    """The trunk whose edge comes closest to a ground-plan segment, and its centre's distance [m]."""
    a, b = (np.asarray(p, dtype=float)[:2] for p in segment)
    best = None
    for t in trunks:
        d = segment_distance_m(t.xy, a, b)
        if best is None or d - t.radius_m < best[1] - best[0].radius_m:
            best = (t, d)
    return best


def fits_clearing(xy, limits: SiteLimits, margin_m: float = 0.0) -> bool:
    """True when a ground-plan point (with a margin around it) lies inside the clearing."""
    if limits.clearing_radius_m is None:
        return True
    return float(np.hypot(*np.asarray(xy, dtype=float)[:2])) + margin_m <= (
        limits.clearing_radius_m + 1e-6
    )


def bearing_deg(u) -> float:
    """Compass bearing of a ground-plan direction (x east, y north): 0° north, 90° east [deg]."""
    return math.degrees(math.atan2(float(u[0]), float(u[1]))) % 360.0


def _clearance(p: np.ndarray, trunks: Sequence[Trunk]) -> tuple[float, Trunk | None]:
    """Free distance from p to the nearest trunk's edge [m] (inf without trunks)."""
    best, who = math.inf, None
    for t in trunks:
        d = float(np.hypot(*(p - t.xy))) - t.radius_m
        if d < best:
            best, who = d, t
    return best, who


def mast_position(
    mast: Mast,
    safe: Sequence[Support],
    limits: SiteLimits,
    *,
    wanted_xy: tuple[float, float] | None = None,
) -> tuple[np.ndarray, str]:
    """Where the centre mast stands, and the words for the operator.

    The operator's point (``limits.mast_xy_m``) when given; else the point nearest the centre of the
    safe supports (``wanted_xy``, default their centroid; the site origin without supports) whose
    circle of guy anchors (0.7 × the mast's height) clears every trunk and lies in the clearing.

    Raises
    ------
    InputError
        When the operator's point is on a trunk or outside the clearing (field ``site.mast_xy_m``).
    """
    guy = GUY_RADIUS_FRACTION * mast.height_m
    if limits.mast_xy_m is not None:
        p = np.asarray(limits.mast_xy_m, dtype=float)
        free, who = _clearance(p, limits.trunks)
        if who is not None and free < 0:
            raise InputError(
                "site.mast_xy_m",
                f"({p[0]:g}, {p[1]:g}) m is on {who.id}'s trunk, of radius {given_both(who.radius_m)}: "
                "give a point in the open",
                value=list(limits.mast_xy_m),
            )
        if not fits_clearing(p, limits):
            raise InputError(
                "site.mast_xy_m",
                f"({p[0]:g}, {p[1]:g}) m is outside the clearing, which reaches "
                f"{given_both(limits.clearing_radius_m)} from the site origin",
                value=list(limits.mast_xy_m),
            )
        words = f"stand {mast.id} at the given point ({p[0]:.1f}, {p[1]:.1f}) m"
        if who is not None and free < guy:
            words += (
                f"; it is {length_both(free)} from {who.id}, inside its {length_both(guy)} guy "
                f"circle at its full {given_both(mast.height_m)}: run that guy clear of the tree"
            )
        return p, words
    if wanted_xy is None:
        wanted_xy = (
            (sum(s.x_m for s in safe) / len(safe), sum(s.y_m for s in safe) / len(safe))
            if safe
            else (0.0, 0.0)
        )
    centre = np.asarray(wanted_xy, dtype=float)
    angles = np.linspace(0.0, 2 * math.pi, MAST_SEARCH_ANGLES, endpoint=False)
    fallback = (centre, -math.inf)
    for ring in np.arange(0.0, MAST_SEARCH_MAX_M + 1e-9, MAST_SEARCH_STEP_M):
        pts = (
            [centre]
            if ring == 0
            else [centre + ring * np.array([math.cos(a), math.sin(a)]) for a in angles]
        )
        good = []
        for p in pts:
            if not fits_clearing(p, limits, margin_m=guy):
                continue
            free, _ = _clearance(p, limits.trunks)
            if free > fallback[1]:
                fallback = (p, free)
            if free >= guy:
                good.append(p)
        if good:
            # nearest the site origin (the coax runs there), then the first in compass order
            p = min(good, key=lambda q: (round(float(np.hypot(*q)), 1), bearing_deg(q - centre)))
            return p, _placed_words(mast, p, limits, guy, ring)
    p = fallback[0]
    free, who = _clearance(p, limits.trunks)
    words = f"stand {mast.id} at ({p[0]:.1f}, {p[1]:.1f}) m"
    if who is not None:
        words += (
            f", {length_both(free)} from {who.id}: no point here clears every trunk by the "
            f"{length_both(guy)} guy circle at its full {given_both(mast.height_m)}, so run the guys clear "
            "of the trees"
        )
    return p, words


def _placed_words(mast: Mast, p: np.ndarray, limits: SiteLimits, guy: float, moved: float) -> str:
    free, who = _clearance(p, limits.trunks)
    words = f"stand {mast.id} at ({p[0]:.1f}, {p[1]:.1f}) m"
    if who is not None:
        words += f", {length_both(free)} from {who.id}'s trunk"
        if moved > 0:
            words += (
                f", {length_both(moved)} off the middle of the supports so that the guys clear "
                "the trunks"
            )
        words += (
            f"; at its full {given_both(mast.height_m)} its guys need {length_both(guy)} all round"
        )
    return words
