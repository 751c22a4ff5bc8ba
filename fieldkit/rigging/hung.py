"""The dipole as it really hangs: flat or sloping between two supports, drooping ends on a short span,
or an inverted-V from a centre mast — as a 3-D polyline the engine can solve, with the loads.

The chain for two supports is rope – leg – feedpoint load – leg – rope, all catenaries
(:mod:`fieldkit.rigging.catenary`). Both halyards pay out the same rope length. When the span is too
short for the wire at the applied pull, the insulators sit at the supports and the rest of each leg
droops outward and down toward a stake (``DROOP_ANGLE_DEG``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np

from fieldkit.readable import droop_both, length_both, whole_both
from fieldkit.rigging.catenary import (
    ChainShape,
    HangError,
    Piece,
    hang_between,
    hang_to_height,
)
from fieldkit.rigging.memo import HANG_CACHE_ENTRIES, ExactCache, exact_key, exact_memo

# A drooping end runs outward and down at 45° to its stake: far enough from the trunk to keep the
# wire off the bark, steep enough to keep the stake close (common practice, no single source).
DROOP_ANGLE_DEG = 45.0
# A bend of more than this between two chords is a corner of the hang (the feedpoint load, a droop
# at a support, an inverted-V apex) and stays a vertex when the polyline is re-cut.
CORNER_DEG = 5.0


@dataclass(frozen=True)
class HungDipole:
    """A hung dipole.

    Attributes
    ----------
    points_m : the wire polyline, end to end (n, 3) [m]
    feed_distance_m : distance along the polyline to the feedpoint [m]
    feedpoint_height_m : [m]
    end_heights_m : heights of the two wire ends [m]
    sag_m : feedpoint below the straight line between the insulators (flat/sloping) [m]
    span_rope_m : rope between each support and its end insulator [m]
    tail_m : drooping length of each leg beyond its support (short span) [m]
    horizontal_tension_n : [N]
    end_tension_n : tension at each support/anchor end [N]
    support_vertical_n : vertical pull on each support from the span [N]
    apex_angle_deg : angle between the legs at the feedpoint (inverted-V), None otherwise [deg]
    top_load_n : load on the mast head (inverted-V) [N]
    stake_distance_m : horizontal distance from the mast to each end stake (inverted-V) [m]
    """

    points_m: np.ndarray
    feed_distance_m: float
    feedpoint_height_m: float
    end_heights_m: tuple[float, float]
    sag_m: float
    span_rope_m: tuple[float, float]
    tail_m: float
    horizontal_tension_n: float
    end_tension_n: tuple[float, float]
    support_vertical_n: tuple[float, float]
    apex_angle_deg: float | None = None
    top_load_n: float | None = None
    stake_distance_m: float | None = None
    notes: tuple[str, ...] = field(default_factory=tuple)


def _polyline_length(points: np.ndarray) -> float:
    return float(np.sum(np.linalg.norm(np.diff(points, axis=0), axis=1)))


def _plane_to_site(
    shape: ChainShape, first: int, last: int, origin: np.ndarray, axis: np.ndarray, z0: float
) -> np.ndarray:
    u = shape.u_m[first : last + 1]
    z = shape.z_m[first : last + 1] + z0
    xy = origin[None, :] + u[:, None] * axis[None, :]
    return np.column_stack([xy, z])


@exact_memo(HANG_CACHE_ENTRIES)
def hang_span(
    *,
    a_xy: tuple[float, float],
    a_height_m: float,
    b_xy: tuple[float, float],
    b_height_m: float,
    leg_m: float,
    wire_weight_n_per_m: float,
    rope_weight_n_per_m: float,
    feed_load_n: float,
    tension_n: float,
) -> HungDipole:
    """Hang a centre-fed dipole between two supports (flat when the rope heights match, else sloping).

    Parameters
    ----------
    a_xy, b_xy : support positions [m]
    a_height_m, b_height_m : rope heights (branch or pulley) [m]
    leg_m : electrical length of each leg [m]
    wire_weight_n_per_m, rope_weight_n_per_m : weights per length [N/m]
    feed_load_n : balun plus hanging coax at the feedpoint [N]
    tension_n : pull applied at the halyards (the larger end tension) [N]

    Raises
    ------
    HangError
        When the wire cannot be hung between these points at this pull.
    """
    a = np.asarray(a_xy, dtype=float)
    b = np.asarray(b_xy, dtype=float)
    span = float(np.linalg.norm(b - a))
    if span < 1.0:
        raise HangError("the two supports are at the same place")
    axis = (b - a) / span
    rise = b_height_m - a_height_m
    ww, wr = wire_weight_n_per_m, rope_weight_n_per_m

    legs = (Piece(leg_m, ww, True, feed_load_n), Piece(leg_m, ww, True))

    def with_ropes(r: float) -> tuple[Piece, ...]:  # the solver's inner loop: only the ropes change
        rope = Piece(r, wr, False)
        return (rope, *legs, rope)

    notes: list[str] = []
    tail = 0.0
    weight = 2 * leg_m * ww + feed_load_n
    if 2 * tension_n <= weight:  # the two end pulls cannot even carry the weight straight up
        raise HangError(
            f"a {tension_n:g} N pull cannot hold up {whole_both(2 * leg_m)} of wire and the feedpoint "
            f"({weight:.0f} N together): pull harder or lighten the feedpoint"
        )
    shape = None
    if span > 2 * leg_m:
        try:
            shape, rope = hang_between(
                with_ropes,
                span_m=span,
                rise_m=rise,
                end_tension_n=tension_n,
                free_guess=max((span - 2 * leg_m) / 2, 0.01 * span),
            )
        except HangError:
            shape = None
        if shape is not None and rope >= 0:
            wire_first, feed_idx, wire_last = (
                shape.piece_bounds[1][0],
                shape.piece_bounds[1][1],
                shape.piece_bounds[2][1],
            )
        else:
            shape = None
    if shape is None:
        # short span: insulators at the supports, the rest of each leg droops toward a stake
        def no_ropes(half: float) -> tuple[Piece, ...]:
            return (Piece(half, ww, True, feed_load_n), Piece(half, ww, True))

        try:
            shape, half = hang_between(
                no_ropes, span_m=span, rise_m=rise, end_tension_n=tension_n, free_guess=span / 2
            )
        except HangError:
            raise HangError(
                f"{whole_both(2 * leg_m)} of wire will not hang between supports {whole_both(span)} apart at a "
                f"{tension_n:g} N pull"
            ) from None
        rope = 0.0
        tail = leg_m - half
        if tail < -1e-6:
            raise HangError(
                f"{whole_both(2 * leg_m)} of wire will not hang between supports {whole_both(span)} apart at a "
                f"{tension_n:g} N pull"
            )
        tail = max(tail, 0.0)
        wire_first, feed_idx, wire_last = 0, shape.piece_bounds[0][1], shape.piece_bounds[1][1]
    pts = _plane_to_site(shape, wire_first, wire_last, a, axis, a_height_m)
    if tail > 0:
        drop = tail * math.sin(math.radians(DROOP_ANGLE_DEG))
        run = tail * math.cos(math.radians(DROOP_ANGLE_DEG))
        start = pts[0] + np.array([-axis[0] * run, -axis[1] * run, -drop])
        end = pts[-1] + np.array([axis[0] * run, axis[1] * run, -drop])
        pts = np.vstack([start, pts, end])
        feed_idx += 1
        notes.append(
            f"short span: {droop_both(tail)} of each leg droops from its support to a stake "
            f"at {DROOP_ANGLE_DEG:.0f}°, its end {length_both(drop)} below the insulator point"
        )
    feed_point = pts[feed_idx - wire_first]
    feed_distance = _polyline_length(pts[: feed_idx - wire_first + 1])
    ends = (float(pts[0, 2]), float(pts[-1, 2]))
    # the insulators (wire ends within the span) and the straight line between them
    ins_a = _plane_to_site(shape, wire_first, wire_first, a, axis, a_height_m)[0]
    ins_b = _plane_to_site(shape, wire_last, wire_last, a, axis, a_height_m)[0]
    t = float(
        np.dot(feed_point[:2] - ins_a[:2], axis) / max(np.dot(ins_b[:2] - ins_a[:2], axis), 1e-9)
    )
    sag = float(ins_a[2] + t * (ins_b[2] - ins_a[2]) - feed_point[2])
    return HungDipole(
        points_m=pts,
        feed_distance_m=feed_distance,
        feedpoint_height_m=float(feed_point[2]),
        end_heights_m=ends,
        sag_m=sag,
        span_rope_m=(rope, rope),
        tail_m=tail,
        horizontal_tension_n=shape.horizontal_tension_n,
        end_tension_n=shape.end_tensions_n,
        support_vertical_n=shape.end_vertical_n,
        notes=tuple(notes),
    )


@exact_memo(HANG_CACHE_ENTRIES)
def hang_inverted_v(
    *,
    centre_xy: tuple[float, float],
    axis_xy: tuple[float, float],
    apex_height_m: float,
    end_height_m: float,
    leg_m: float,
    wire_weight_n_per_m: float,
    feed_load_n: float,
    tension_n: float,
) -> HungDipole:
    """Hang an inverted-V from a centre mast, each leg pulled down to an end insulator and a stake rope.

    Parameters
    ----------
    centre_xy : mast position [m]
    axis_xy : horizontal direction of the legs (normalised here) [-]
    apex_height_m : feedpoint height on the mast [m]
    end_height_m : height of both end insulators [m]
    leg_m : leg length [m]
    wire_weight_n_per_m : [N/m]
    feed_load_n : balun plus hanging coax (carried by the mast) [N]
    tension_n : pull at each end insulator [N]
    """
    c = np.asarray(centre_xy, dtype=float)
    axis = np.asarray(axis_xy, dtype=float)
    axis = axis / np.linalg.norm(axis)
    drop = apex_height_m - end_height_m
    if drop <= 0:
        raise HangError("the ends must hang below the apex")
    leg = (Piece(leg_m, wire_weight_n_per_m, True),)
    shape, reach = hang_to_height(leg, drop_m=drop, end_tension_n=tension_n)
    n = shape.piece_bounds[0][1]
    right = _plane_to_site(shape, 0, n, c, axis, apex_height_m)
    left = _plane_to_site(shape, 0, n, c, -axis, apex_height_m)[::-1]
    pts = np.vstack([left, right[1:]])
    h = shape.horizontal_tension_n
    v_end = -shape.end_vertical_n[1]  # downward slope at the end: component along the stake rope
    apex_vertical = shape.end_vertical_n[0]  # what the mast supplies per leg
    top_load = 2 * apex_vertical + feed_load_n
    stake = reach + end_height_m * h / max(abs(v_end), 1e-9)
    apex_angle = 2 * math.degrees(math.atan2(reach, drop))
    return HungDipole(
        points_m=pts,
        feed_distance_m=_polyline_length(left),
        feedpoint_height_m=apex_height_m,
        end_heights_m=(end_height_m, end_height_m),
        sag_m=0.0,
        span_rope_m=(0.0, 0.0),
        tail_m=0.0,
        horizontal_tension_n=h,
        end_tension_n=(shape.end_tensions_n[1], shape.end_tensions_n[1]),
        support_vertical_n=(apex_vertical, apex_vertical),
        apex_angle_deg=apex_angle,
        top_load_n=top_load,
        stake_distance_m=stake,
    )


# A cut landing this close past a vertex drops the vertex instead of leaving a piece the engine
# refuses (shorter than 4 wire radii); the chord then shortens the leg by far less than 1 mm.
MIN_CUT_PIECE_M = 0.05


def _cut_polyline(points: np.ndarray, length_m: float) -> np.ndarray:
    """The first ``length_m`` of a polyline."""
    out = [points[0]]
    left = length_m
    for p, q in zip(points[:-1], points[1:], strict=True):
        d = float(np.linalg.norm(q - p))
        if d >= left - 1e-12:
            if left < MIN_CUT_PIECE_M and len(out) > 1:
                out.pop()
            out.append(p + (q - p) * (left / d))
            return np.array(out)
        out.append(q)
        left -= d
    return np.array(out)


def truncate_about_feed(hung: HungDipole, leg_m: float) -> HungDipole:
    """The inner part of a hung dipole, ``leg_m`` either side of the feedpoint along the wire.

    Used for a linked dipole with its links open: the whole wire still hangs in the same shape, only
    the part inside the open links is driven. The sections beyond the open links are left out of the
    model (see linked.py).
    """
    pts = np.asarray(hung.points_m)
    seg = np.linalg.norm(np.diff(pts, axis=0), axis=1)
    cum = np.concatenate([[0.0], np.cumsum(seg)])
    k = int(np.argmin(np.abs(cum - hung.feed_distance_m)))
    left = _cut_polyline(pts[: k + 1][::-1], leg_m)[::-1]
    right = _cut_polyline(pts[k:], leg_m)
    new = np.vstack([left, right[1:]])
    return replace(
        hung,
        points_m=new,
        feed_distance_m=_polyline_length(left),
        end_heights_m=(float(new[0, 2]), float(new[-1, 2])),
    )


_RECUT_CACHE = ExactCache(HANG_CACHE_ENTRIES)


def recut(hung: HungDipole, *, max_chord_m: float) -> HungDipole:
    """The same hung wire with its polyline re-cut into equal chords no longer than ``max_chord_m``.

    Between corners (the feedpoint, a droop at a support, see ``CORNER_DEG``) the new vertices are
    spaced evenly along the old polyline, which already follows the catenary to within a centimetre.
    The engine cuts every straight piece into at least one segment; pieces just under its segment
    length make one segment each, so the wire gets about as many segments as its length needs
    instead of several short ones per catenary sample.
    """
    pts = np.asarray(hung.points_m, dtype=float)
    key = (exact_key(pts), exact_key(hung.feed_distance_m), exact_key(max_chord_m))
    got = _RECUT_CACHE.get(key)
    if got is None:
        got = (True, _recut_points(pts, hung.feed_distance_m, max_chord_m))
        got[1][0].setflags(write=False)  # shared by every caller of the cache
        _RECUT_CACHE.put(key, got)
    new, feed_distance = got[1]
    return replace(hung, points_m=new, feed_distance_m=feed_distance)


def _recut_points(
    pts: np.ndarray, feed_distance_m: float, max_chord_m: float
) -> tuple[np.ndarray, float]:
    """:func:`recut` on the polyline alone: (new points, distance to the feedpoint) [m]."""
    d = np.diff(pts, axis=0)
    lengths = np.linalg.norm(d, axis=1)
    cum = np.concatenate([[0.0], np.cumsum(lengths)])
    keep = {0, len(pts) - 1, int(np.argmin(np.abs(cum - feed_distance_m)))}
    unit = d / np.maximum(lengths, 1e-12)[:, None]
    cos = np.einsum("ij,ij->i", unit[:-1], unit[1:])
    keep |= {i + 1 for i in np.flatnonzero(cos < math.cos(math.radians(CORNER_DEG)))}
    feed_vertex = pts[int(np.argmin(np.abs(cum - feed_distance_m)))]
    corners = sorted(keep)
    out = [pts[:1]]
    for i, j in zip(corners[:-1], corners[1:], strict=True):
        if cum[j] - cum[i] < 1e-9:  # a corner repeated (zero-length piece): nothing to cut
            continue
        n = max(1, math.ceil((cum[j] - cum[i]) / max_chord_m - 1e-9))
        s = np.linspace(cum[i], cum[j], n + 1)[1:]
        out.append(np.stack([np.interp(s, cum[i : j + 1], pts[i : j + 1, k]) for k in range(3)], 1))
    new = np.vstack(out)
    feed_at = int(np.argmin(np.linalg.norm(new - feed_vertex, axis=1)))
    return new, float(np.linalg.norm(np.diff(new[: feed_at + 1], axis=0), axis=1).sum())
