"""RF keep-out zones from the near field of the hung antenna.

The fields come from one engine solve of the option's hung wire at the radio's peak-envelope power,
ground included (:meth:`fieldkit.antenna.Solution.near_field`). They are time-averaged with the mode's
duty factor and the transmit fraction (:mod:`fieldkit.safety.duty`) and compared with the chosen limit
set (:mod:`fieldkit.safety.limits`). For fields below 30 MHz in the near field, E and H are both checked;
the exposure ratio of a point is

    ratio = a · max(|E|² / E_lim², |H|² / H_lim²),     a = duty factor × transmit fraction,

so ratio ≥ 1 means over the limit (ratio scales with power, which gives the power at which no zone is
left). A person is taken as a column 1.8 m tall: the worst of the fields at 0.5, 1.0 and 1.8 m above
ground decides (no spatial averaging over the body, which the standards allow — conservative).

Sampling (a coarse grid refined at the boundary): rays in the ground plane leave the wire's plan
view — at right angles on both sides from stations along the wire, and in a fan round each end. Each
ray is screened at its foot (under the wire) and one step out; rays over the limit, or near it and
rising outward, are sampled every 0.5 m and their last crossing refined with 6 more samples and
log-linear interpolation. Stations are 3 m apart, and 0.5 m apart within 1.5 m of each end and
wherever a zone is found or the field under the wire comes near the limit. The ray ends, walked once around the wire, form the outline polygon
directly. Every pass sends all its points to the engine in one vectorised call. Points closer than
0.1 m to the wire are "touching": thin-wire fields mean nothing there, and they count as inside.

References
----------
.. [1] 47 CFR §1.1310 (both E and H apply in the near field below 300 MHz); FCC OET Bulletin 65 (1997),
   §2 (near-field evaluation, time and spatial averaging).
.. [2] ICNIRP 2020, Health Phys. 118(5): reference levels averaged over 30 min and the whole body.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, replace

import numpy as np

from fieldkit.safety.plan_view import distance_to_polyline

FieldFn = Callable[[np.ndarray], tuple[np.ndarray, np.ndarray]]

#: Heights above ground at which a standing person is checked [m] (feet/knees, trunk, head).
PERSON_HEIGHTS_M = (0.5, 1.0, 1.8)
#: The person's height [m].
PERSON_HEIGHT_M = PERSON_HEIGHTS_M[-1]
#: Closer than this to the wire a point counts as touching it [m].
CONTACT_M = 0.1
#: Ray sample spacing [m], first reach of the rays [m] and the furthest they grow to [m].
RAY_STEP_M = 0.5
RAY_START_M = 4.0
RAY_MAX_M = 96.0
#: Refinement samples between the last coarse sample over the limit and the next one.
REFINE = 6
#: Screening: each line is first sampled at its foot and this far out [m]; it is followed further when
#: over the limit there, or rising outward above this share of the limit.
SCREEN_STEP_M = 0.5
SCREEN_RATIO = 0.25
#: The vertical line under each wire end: sample spacing and furthest reach [m].
END_STEP_M = 0.25
END_MAX_M = 24.0
#: A wire lower than the head height plus this anywhere [m] gets every height checked everywhere.
LOW_WIRE_MARGIN_M = 1.0
#: A wire shorter than this in plan view is treated as a point (rays all round it) [m].
POINT_LIKE_M = 0.5
#: Stations along the wire: at most this spacing [m] and at most this many stations.
STATION_STEP_M = 3.0
MAX_STATIONS = 16
#: Station spacing near a zone found on the coarse stations [m], and the share of the limit under the
#: wire at a coarse station that calls for it.
FINE_STATION_M = 0.5
FINE_TRIGGER = 0.5
FINE_END_M = 1.5
#: Rays in the fan around each wire end (between the two side rays).
FAN_RAYS = 5


def exposure_ratio(
    e: np.ndarray, h: np.ndarray, *, e_limit: float, h_limit: float, averaging_factor: float
) -> np.ndarray:
    """Time-averaged exposure as a fraction of the limit, per point.

    Parameters
    ----------
    e, h : complex ndarray (n, 3)
        RMS phasors of E [V/m] and H [A/m] at peak-envelope power.
    e_limit, h_limit : float
        Limits [V/m], [A/m] (RMS, time-averaged).
    averaging_factor : float
        Duty factor × transmit fraction.
    """
    e2 = np.sum(np.abs(e) ** 2, axis=-1)
    h2 = np.sum(np.abs(h) ** 2, axis=-1)
    return averaging_factor * np.maximum(e2 / e_limit**2, h2 / h_limit**2)


@dataclass(frozen=True)
class Landmark:
    """A place the keep-out distance is measured from: a wire end or the feedpoint."""

    key: str  # stable id fragment ("end-t1", "feedpoint")
    name: str  # plain words ("north end (T1)")
    point_m: np.ndarray  # (3,)


@dataclass(frozen=True)
class KeepOut:
    keep_out_m: float
    outline_m: list[list[float]]
    zones_m: list[list[list[float]]]
    by_landmark: list[tuple[Landmark, float]]  # largest zone distance from each landmark [m]
    by_height: list[tuple[float, float]]  # (height_m, keep_out_m) on the coarse samples
    min_end_height_m: float
    end_separation_m: list[tuple[str, float]]
    max_ratio: float
    max_ratio_point_m: np.ndarray
    touching: bool
    end_extrapolated: bool  # the end field was followed above the end (the end is lower than s*)
    coax_drop: list[tuple[float, float]]  # (height_m, ratio)
    beyond_reach: bool  # the zone reached the furthest ray sample
    n_points: int


@dataclass(frozen=True)
class _PlanLine:
    """The wire in plan view as arc length → point and tangent."""

    seg: np.ndarray
    seg_len: np.ndarray
    starts: np.ndarray
    cum: np.ndarray

    @property
    def length(self) -> float:
        return float(self.cum[-1])

    @classmethod
    def of(cls, plan: np.ndarray) -> _PlanLine:
        seg = np.diff(plan, axis=0)
        seg_len = np.linalg.norm(seg, axis=1)
        keep = seg_len > 1e-9
        return cls(
            seg[keep],
            seg_len[keep],
            plan[:-1][keep],
            np.concatenate([[0.0], np.cumsum(seg_len[keep])]),
        )

    def at(self, s: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        k = np.clip(np.searchsorted(self.cum, s, side="right") - 1, 0, len(self.seg) - 1)
        tang = self.seg[k] / self.seg_len[k, None]
        return self.starts[k] + ((s - self.cum[k]) / self.seg_len[k])[:, None] * self.seg[k], tang


# Rays carry a sort key (group, position) that walks once around the wire: left side forward (0),
# the fan round the last end (1), right side backward (2), the fan round the first end (3).
def _side_rays(pl: _PlanLine, s: np.ndarray):
    origin, tang = pl.at(s)
    normal = np.column_stack([-tang[:, 1], tang[:, 0]])
    keys = np.concatenate(
        [np.column_stack([np.zeros_like(s), s]), np.column_stack([np.full_like(s, 2), -s])]
    )
    return np.vstack([origin, origin]), np.vstack([normal, -normal]), keys


def _fan_rays(pl: _PlanLine):
    phi = np.linspace(0, np.pi, FAN_RAYS + 2)[1:-1]
    (first, last), tang = pl.at(np.array([0.0, pl.length]))
    n_first = np.array([-tang[0, 1], tang[0, 0]])
    n_last = np.array([-tang[1, 1], tang[1, 0]])
    end = np.cos(phi)[:, None] * n_last + np.sin(phi)[:, None] * tang[1]
    start = np.cos(phi)[:, None] * -n_first + np.sin(phi)[:, None] * -tang[0]
    idx = np.arange(FAN_RAYS, dtype=float)
    keys = np.concatenate(
        [np.column_stack([np.ones_like(idx), idx]), np.column_stack([np.full_like(idx, 3), idx])]
    )
    return (
        np.vstack([np.repeat(last[None], FAN_RAYS, 0), np.repeat(first[None], FAN_RAYS, 0)]),
        np.vstack([end, start]),
        keys,
    )


def _circle_rays(plan: np.ndarray):
    """A wire vertical (or tiny) in plan view: a full circle of rays from its centre."""
    phi = np.linspace(0, 2 * np.pi, 4 * (FAN_RAYS + 1), endpoint=False)
    keys = np.column_stack([np.zeros_like(phi), phi])
    return (
        np.repeat(plan.mean(axis=0)[None], len(phi), axis=0),
        np.column_stack([np.cos(phi), np.sin(phi)]),
        keys,
    )


class _Evaluator:
    """Exposure ratio at points, with touching points marked, counting the points sent to the engine."""

    def __init__(self, fields: FieldFn, wire_m: np.ndarray, *, e_limit, h_limit, averaging_factor):
        self.fields, self.wire = fields, wire_m
        self.kw = {"e_limit": e_limit, "h_limit": h_limit, "averaging_factor": averaging_factor}
        self.n_points = 0

    def __call__(self, pts: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """ratio (inf where touching) and the touching mask."""
        flat = pts.reshape(-1, 3)
        touch = distance_to_polyline(flat, self.wire) < CONTACT_M
        ratio = np.full(len(flat), np.inf)
        if (~touch).any():
            e, h = self.fields(flat[~touch])
            self.n_points += int((~touch).sum())
            ratio[~touch] = exposure_ratio(np.asarray(e), np.asarray(h), **self.kw)
        return ratio.reshape(pts.shape[:-1]), touch.reshape(pts.shape[:-1])


def _last_over(r: np.ndarray) -> np.ndarray:
    """Index of the last sample ≥ 1 along the last axis, −1 where none."""
    over = r >= 1.0
    idx = r.shape[-1] - 1 - np.argmax(over[..., ::-1], axis=-1)
    return np.where(over.any(axis=-1), idx, -1)


def _crossing(d0: np.ndarray, d1: np.ndarray, r0: np.ndarray, r1: np.ndarray) -> np.ndarray:
    """Distance where the ratio falls through 1 between (d0, r0 ≥ 1) and (d1, r1 < 1), log-linear."""
    r0 = np.where(np.isfinite(r0), r0, 1e6)
    l0, l1 = np.log(np.maximum(r0, 1.0)), np.log(np.maximum(r1, 1e-30))
    t = np.where(l0 > l1, l0 / np.where(l0 > l1, l0 - l1, 1.0), 0.0)
    return d0 + np.clip(t, 0.0, 1.0) * (d1 - d0)


@dataclass(frozen=True)
class _Lines:
    boundary: np.ndarray  # (rays, heights) distance along the ray where the ratio falls to 1 [m]
    inside: np.ndarray  # (rays, heights) the ray starts inside a zone at that height
    head_foot: np.ndarray  # (rays,) ratio at head height under the wire where the ray starts
    max_ratio: float
    max_point_m: np.ndarray
    touching: bool
    beyond: bool


def _merge(a: _Lines, b: _Lines) -> _Lines:
    best = a if a.max_ratio >= b.max_ratio else b
    return _Lines(
        boundary=np.vstack([a.boundary, b.boundary]),
        inside=np.vstack([a.inside, b.inside]),
        head_foot=np.concatenate([a.head_foot, b.head_foot]),
        max_ratio=best.max_ratio,
        max_point_m=best.max_point_m,
        touching=a.touching or b.touching,
        beyond=a.beyond or b.beyond,
    )


def _boundaries(
    ev: _Evaluator,
    origins: np.ndarray,
    dirs: np.ndarray,
    heights: np.ndarray,
    *,
    wire_low: bool,
    point_like: bool,
) -> _Lines:
    """Zone boundary along every (ray, height) line: screen, sample, refine."""
    n_rays, n_h = len(origins), len(heights)
    ray = np.repeat(np.arange(n_rays), n_h)
    z = np.tile(heights, n_rays)
    best = {"ratio": -1.0, "point": origins[0]}
    touching = False

    def note(pts: np.ndarray, r: np.ndarray, t: np.ndarray) -> None:
        nonlocal touching
        touching |= bool(t.any())
        finite = np.where(np.isfinite(r), r, -1.0)
        if finite.size and finite.max() > best["ratio"]:
            k = int(np.argmax(finite))
            best["ratio"], best["point"] = float(finite.flat[k]), pts.reshape(-1, 3)[k]

    def run(idx: np.ndarray, dist: np.ndarray) -> np.ndarray:
        xy = origins[ray[idx], None, :] + dist[..., None] * dirs[ray[idx], None, :]
        pts = np.concatenate([xy, np.broadcast_to(z[idx, None], dist.shape)[..., None]], axis=-1)
        r, t = ev(pts)
        note(pts, r, t)
        return r

    # screening. Under a wire that is above the person everywhere, the field grows with height at any
    # spot (nearer the wire; the ground's image is further away), and along a ray it is largest at
    # the foot, under the wire. So: the head height at every foot; the lower heights only at feet
    # where the head is over the limit (or everywhere when the wire comes low); one step out only on
    # rays whose foot is at least SCREEN_RATIO of the limit (every ray for a wire that is vertical in
    # plan view, whose field can grow outward). Lines under the limit at the foot and not growing
    # outward are outside every zone.
    top = int(np.argmax(heights))
    feet, which = np.unique(np.round(origins, 6), axis=0, return_inverse=True)
    which = np.ravel(which)
    r_feet = np.full((len(feet), n_h), -1.0)
    head_pts = np.column_stack([feet, np.full(len(feet), heights[top])])
    r_head, t_head = ev(head_pts)
    note(head_pts, r_head, t_head)
    r_feet[:, top] = r_head
    low_feet = np.nonzero(np.ones(len(feet), bool) if wire_low else r_head >= 1.0)[0]
    others = [i for i in range(n_h) if i != top]
    if len(low_feet) and others:
        low_pts = np.concatenate(
            [
                np.repeat(feet[low_feet], len(others), axis=0),
                np.tile(heights[others], len(low_feet))[:, None],
            ],
            axis=1,
        )
        r_low, t_low = ev(low_pts)
        note(low_pts, r_low, t_low)
        r_feet[np.ix_(low_feet, others)] = r_low.reshape(len(low_feet), len(others))
    r_foot = r_feet[which]  # (rays, heights)
    probe = np.nonzero(point_like | wire_low | (r_foot[:, top] >= SCREEN_RATIO))[0]
    outward = np.zeros(n_rays, dtype=bool)
    if len(probe):
        step_pts = np.column_stack(
            [origins[probe] + SCREEN_STEP_M * dirs[probe], np.full(len(probe), heights[top])]
        )
        r_step, t_step = ev(step_pts)
        note(step_pts, r_step, t_step)
        outward[probe] = (r_step >= 1.0) | (
            (r_step > r_foot[probe, top]) & (r_step >= SCREEN_RATIO)
        )
    follow = np.zeros((n_rays, n_h), dtype=bool)
    follow[:, top] = outward
    if wire_low:
        follow |= outward[:, None]
    active = ((r_foot >= 1.0) | follow).reshape(-1)
    every = np.arange(n_rays * n_h)
    boundary = np.zeros(len(every))
    inside = np.zeros(len(every), dtype=bool)
    beyond_any = False
    idx = np.nonzero(active)[0]
    if len(idx):
        reach = RAY_START_M
        while True:
            n = int(round(reach / RAY_STEP_M)) + 1
            dist = np.broadcast_to(np.arange(n) * RAY_STEP_M, (len(idx), n))
            r = run(idx, dist)
            last = _last_over(r)
            beyond = last == n - 1
            if not beyond.any() or reach >= RAY_MAX_M:
                break
            reach = min(RAY_MAX_M, 2 * reach)
        beyond_any = bool(beyond.any())
        ins = last >= 0
        inside[idx[ins]] = True
        boundary[idx[beyond]] = reach
        rows = np.nonzero(ins & ~beyond)[0]
        if len(rows):
            frac = np.arange(REFINE + 2) / (REFINE + 1)
            fine_d = dist[rows, last[rows]][:, None] + frac[None, :] * RAY_STEP_M
            r_inner = run(idx[rows], fine_d[:, 1:-1])
            r_fine = np.concatenate(
                [r[rows, last[rows]][:, None], r_inner, r[rows, last[rows] + 1][:, None]], axis=1
            )
            j = _last_over(r_fine)
            jj = np.arange(len(rows))
            boundary[idx[rows]] = _crossing(
                fine_d[jj, j], fine_d[jj, j + 1], r_fine[jj, j], r_fine[jj, j + 1]
            )
    return _Lines(
        boundary=boundary.reshape(n_rays, n_h),
        inside=inside.reshape(n_rays, n_h),
        head_foot=r_foot[:, top],
        max_ratio=best["ratio"],
        max_point_m=np.asarray(best["point"]),
        touching=touching,
        beyond=beyond_any,
    )


def _end_separation(ev: _Evaluator, end_m: np.ndarray) -> float:
    """Distance below a wire end at which the exposure ratio falls to 1 [m].

    Sampled straight down from the end (just outside touching, then every END_STEP_M, in chunks that
    double until the ratio is under 1); past a point on the wire the line is under another part of the
    antenna and stops. Where the ground comes first, the line goes on above the end at the same
    distances (the end's field moves with the end when it is raised: an extrapolation, reported).
    """
    samples = np.concatenate(
        [[CONTACT_M + 0.01], np.arange(END_STEP_M, END_MAX_M + 1e-9, END_STEP_M)]
    )
    ratio = np.zeros(0)
    blocked = False
    done, chunk = 0, 1  # the first chunk is the single sample next to the end
    while done < len(samples):
        s = samples[done : done + chunk]
        z = np.where(end_m[2] - s > 0.05, end_m[2] - s, end_m[2] + s)
        r, t = ev(np.column_stack([np.full_like(s, end_m[0]), np.full_like(s, end_m[1]), z]))
        ratio = np.concatenate([ratio, np.where(np.logical_or.accumulate(t) | blocked, 0.0, r)])
        blocked |= bool(t.any())
        done += len(s)
        if ratio[-1] < 1.0:
            break
        chunk = max(4, 2 * chunk)
    k = int(_last_over(ratio))
    if k < 0:
        return 0.0
    if k == len(ratio) - 1:
        return float(samples[k])
    return float(_crossing(samples[k], samples[k + 1], ratio[k], ratio[k + 1]))


def keep_out(
    fields: FieldFn,
    *,
    wire_m: np.ndarray,
    feed_m: np.ndarray,
    e_limit: float,
    h_limit: float,
    averaging_factor: float,
    landmarks: list[Landmark],
) -> KeepOut:
    """Keep-out zone of a wire antenna for a person standing on the ground.

    Parameters
    ----------
    fields : callable
        points (n, 3) [m] → (E, H) complex (n, 3) RMS [V/m], [A/m] at peak-envelope power.
    wire_m : ndarray (n, 3)
        The hung wire polyline [m].
    feed_m : ndarray (3,)
        Feedpoint [m] (the coax drops vertically from it).
    e_limit, h_limit : float
        Limits [V/m], [A/m].
    averaging_factor : float
        Duty factor × transmit fraction.
    landmarks : list of Landmark
        Wire ends and feedpoint; each zone point is counted against the nearest one.

    Returns
    -------
    KeepOut
    """
    wire = np.asarray(wire_m, dtype=float)
    ev = _Evaluator(
        fields, wire, e_limit=e_limit, h_limit=h_limit, averaging_factor=averaging_factor
    )
    plan = wire[:, :2]
    heights = np.array(PERSON_HEIGHTS_M)
    pl = _PlanLine.of(plan)
    point_like = len(pl.seg) == 0 or pl.length < POINT_LIKE_M
    kw = {
        "wire_low": bool(wire[:, 2].min() < heights.max() + LOW_WIRE_MARGIN_M),
        "point_like": point_like,
    }
    if point_like:
        origins, dirs, keys = _circle_rays(plan)
        lines = _boundaries(ev, origins, dirs, heights, **kw)
    else:
        n = int(min(MAX_STATIONS, max(2, math.ceil(pl.length / STATION_STEP_M) + 1)))
        coarse = np.linspace(0.0, pl.length, n)
        parts = [_side_rays(pl, coarse), _fan_rays(pl)]
        origins, dirs, keys = (np.concatenate([p[i] for p in parts]) for i in range(3))
        lines = _boundaries(ev, origins, dirs, heights, **kw)
        # finer stations (every FINE_STATION_M) within FINE_END_M of each end — the field under a wire
        # peaks near its ends, often between coarse stations — and within one coarse step of any zone
        # found or wherever the field under the wire comes near the limit
        hit = lines.inside.any(axis=1) | (lines.head_foot >= FINE_TRIGGER)
        step = coarse[1] - coarse[0]
        at = np.where(keys[:, 0] == 0, keys[:, 1], np.where(keys[:, 0] == 2, -keys[:, 1], 0.0))
        at = np.where(keys[:, 0] == 1, pl.length, at)
        grid = np.arange(0.0, pl.length + 1e-9, FINE_STATION_M)
        near = (np.abs(grid[:, None] - at[hit][None, :]) <= step).any(axis=1)
        near |= (grid <= FINE_END_M) | (grid >= pl.length - FINE_END_M)
        new = grid[near & (np.abs(grid[:, None] - coarse[None, :]) > 1e-6).all(axis=1)]
        if len(new):
            o2, d2, k2 = _side_rays(pl, new)
            fine = _boundaries(ev, o2, d2, heights, **kw)
            origins, dirs, keys = (
                np.vstack([origins, o2]),
                np.vstack([dirs, d2]),
                np.vstack([keys, k2]),
            )
            lines = _merge(lines, fine)
    order = np.lexsort((keys[:, 1], keys[:, 0]))
    origins, dirs = origins[order], dirs[order]
    lines = replace(
        lines,
        boundary=lines.boundary[order],
        inside=lines.inside[order],
        head_foot=lines.head_foot[order],
    )
    boundary = lines.boundary.max(axis=1)
    inside = lines.inside.any(axis=1)

    edge = origins + boundary[:, None] * dirs
    zone_pts = edge[inside]
    keep = float(distance_to_polyline(zone_pts, plan).max()) if inside.any() else 0.0
    outline, zones = _polygons(origins, edge, inside)

    by_landmark = []
    if landmarks:
        marks = np.array([lm.point_m[:2] for lm in landmarks])
        dm = np.linalg.norm(zone_pts[:, None, :] - marks[None], axis=2)
        owner = dm.argmin(axis=1)
        for i, lm in enumerate(landmarks):
            mine = dm[owner == i, i]
            by_landmark.append((lm, float(mine.max()) if len(mine) else 0.0))

    by_height = []
    for ih, hz in enumerate(heights):
        ok = lines.inside[:, ih]
        pts = (origins + lines.boundary[:, ih, None] * dirs)[ok]
        by_height.append(
            (float(hz), float(distance_to_polyline(pts, plan).max()) if ok.any() else 0.0)
        )

    # the vertical line under each wire end: how far below the end the limit is met
    ends = [lm for lm in landmarks if lm.key != "feedpoint"] or [
        Landmark("end-first", "first end", wire[0]),
        Landmark("end-last", "last end", wire[-1]),
    ]
    end_sep = [(lm.name, _end_separation(ev, lm.point_m)) for lm in ends]
    min_end = PERSON_HEIGHT_M + max(CONTACT_M, max(v for _, v in end_sep))
    extrapolated = any(
        sep > lm.point_m[2] - 0.05 for (_, sep), lm in zip(end_sep, ends, strict=True)
    )

    # coax drop: under the feedpoint, at the person's heights
    drop_h = heights[heights < feed_m[2] - CONTACT_M]
    coax = []
    if len(drop_h):
        pts = np.column_stack(
            [np.full(len(drop_h), feed_m[0]), np.full(len(drop_h), feed_m[1]), drop_h]
        )
        r_drop, _ = ev(pts)
        coax = [(float(z), float(r)) for z, r in zip(drop_h, r_drop, strict=True)]

    max_ratio = max(lines.max_ratio, max((r for _, r in coax), default=0.0))
    return KeepOut(
        keep_out_m=keep,
        outline_m=outline,
        zones_m=zones,
        by_landmark=by_landmark,
        by_height=by_height,
        min_end_height_m=min_end,
        end_separation_m=end_sep,
        max_ratio=max_ratio,
        max_ratio_point_m=lines.max_point_m,
        touching=lines.touching,
        end_extrapolated=extrapolated,
        coax_drop=coax,
        beyond_reach=lines.beyond,
        n_points=ev.n_points,
    )


def _polygons(origins: np.ndarray, edge: np.ndarray, inside: np.ndarray):
    """The outline polygon (all zones, joined along the wire) and one polygon per zone."""
    if not inside.any():
        return [], []
    n = len(inside)
    outline = []
    for i in range(n):
        if inside[i]:
            outline.append(edge[i])
        elif inside[i - 1] or inside[(i + 1) % n]:
            outline.append(origins[i])
    zones = []
    if inside.all():
        zones.append(edge)
    else:
        start = int(np.argmin(inside))  # a ray outside every zone
        run: list[np.ndarray] = []
        for step in range(1, n + 1):
            i = (start + step) % n
            if inside[i]:
                if not run:
                    run.append(origins[i])
                run.append(edge[i])
            elif run:
                run.append(origins[(i - 1) % n])
                zones.append(np.array(run))
                run = []
        if run:
            run.append(origins[start - 1])
            zones.append(np.array(run))

    def rounded(poly):
        return [[round(float(x), 2), round(float(y), 2)] for x, y in poly]

    return rounded(outline), [rounded(z) for z in zones]
