"""Wire geometry: polylines, junctions, the feed, checks, and segmentation into the moment-method mesh.

Wires are thin straight pieces joined end to end (a polyline); wires whose end points coincide are
joined at a junction. Each piece is cut into segments no longer than the wavelength divided by
:data:`SEGMENTS_PER_WAVELENGTH`; a node is always placed at the feed. Triangle (rooftop) basis
functions straddle every node shared by two segments; at a junction of k segments, k − 1 basis
functions connect the first segment to each of the others, which keeps Kirchhoff's current law.

References
----------
.. [1] S. M. Rao, D. R. Wilton, A. W. Glisson, "Electromagnetic scattering by surfaces of arbitrary
   shape", IEEE Trans. AP-30(3), 1982, doi:10.1109/TAP.1982.1142818 (rooftop basis; its wire form).
.. [2] G. J. Burke, A. J. Poggio, *Numerical Electromagnetics Code (NEC) — Method of Moments*, Part
   III: User's Guide, LLNL 1981, §2 (thin-wire segmentation rules: segment ≲ λ/10, length ≫ radius).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from functools import lru_cache

import numpy as np

from fieldkit.constants import SPEED_OF_LIGHT_M_S
from fieldkit.errors import InputError

from .grounds import Ground
from .materials import CONDUCTORS, Insulation

# λ/80 segments: resonance within 0.04 % of a mesh 4× finer (λ/40: 0.1 %, but X moves ~1 Ω);
# measured, docs/engine.md
SEGMENTS_PER_WAVELENGTH = 80
MIN_SEGMENTS_PER_WIRE = 15  # short wires still get a smooth current
MAX_SEGMENTS = 600  # beyond this the dense solve is too slow for interactive use
MIN_PIECE_RADII = (
    4.0  # thin-wire limit: a piece at least 4 radii long (NEC User's Guide: Δ/a ≳ 2..8)
)
JUNCTION_TOLERANCE_M = 1e-3  # end points closer than this are one junction


@dataclass(frozen=True)
class Wire:
    """One conductor: a polyline of straight pieces.

    Parameters
    ----------
    points_m : numpy.ndarray, shape (n, 3)
        Polyline vertices, x east, y north, z up [m]; ground surface z = 0.
    radius_m : float
        Conductor radius [m].
    conductor : str
        ``"perfect"``, ``"copper"``, ``"aluminium"``, ``"copper-clad-steel"`` or ``"steel"``.
    insulation : Insulation or None
        Dielectric jacket, if any.
    """

    points_m: np.ndarray
    radius_m: float
    conductor: str = "copper"
    insulation: Insulation | None = None

    def __post_init__(self) -> None:
        pts = np.asarray(self.points_m, dtype=float)
        object.__setattr__(self, "points_m", pts)

    def __hash__(self) -> int:
        return hash((self.points_m.tobytes(), self.radius_m, self.conductor, self.insulation))

    def __eq__(self, other: object) -> bool:
        return (
            isinstance(other, Wire)
            and np.array_equal(self.points_m, other.points_m)
            and (self.radius_m, self.conductor, self.insulation)
            == (other.radius_m, other.conductor, other.insulation)
        )


@dataclass(frozen=True)
class Feed:
    """A voltage-gap source at ``distance_m`` along wire ``wire``'s polyline from its first point."""

    wire: int
    distance_m: float


@dataclass(frozen=True)
class Antenna:
    """Wires and the feed."""

    wires: tuple[Wire, ...]
    feed: Feed


@dataclass(frozen=True)
class Mesh:
    """Segments and basis functions of an antenna (SI units).

    Half ``h`` of the basis functions lives on segment ``half_seg[h]`` with shape ``half_shape[h]``
    (0: rising from 0 at the segment start to 1 at its end; 1: falling) and sign ``half_sign[h]``
    relative to the segment direction; halves ``2m`` and ``2m+1`` belong to basis ``m``.
    """

    start: np.ndarray  # (N, 3) segment start points [m]
    end: np.ndarray  # (N, 3)
    length: np.ndarray  # (N,)
    tangent: np.ndarray  # (N, 3) unit vectors
    radius: np.ndarray  # (N,)
    wire: np.ndarray  # (N,) wire index of each segment
    half_seg: np.ndarray  # (2M,)
    half_shape: np.ndarray  # (2M,)
    half_sign: np.ndarray  # (2M,)
    feed_basis: int
    feed_point: np.ndarray = field(repr=False)
    _memo: dict = field(default_factory=dict, repr=False, compare=False)

    def relative(self) -> Mesh:
        """This mesh moved so that its first segment starts at the origin.

        Translated copies of the same wires (a rope-height sweep) share it, and with it one
        :meth:`shape_key`, under which the solve caches what a translation does not change (the
        free-space matrix, the ground-pair layout, the far-field phases of the wires).
        """
        if "relative" not in self._memo:
            o = self.start[0]
            self._memo["relative"] = (
                self
                if not o.any()
                else replace(
                    self,
                    start=self.start - o,
                    end=self.end - o,
                    feed_point=self.feed_point - o,
                    _memo={},
                )
            )
        return self._memo["relative"]

    def shape_key(self) -> bytes:
        """Key equal for meshes that differ only by a translation (a rope-height sweep).

        Built from the segments of :meth:`relative`, the radii and the basis layout; the cached
        free-space and ground-pair layouts of the solve use it.
        """
        if "shape_key" not in self._memo:
            rel = self.relative()
            self._memo["shape_key"] = b"|".join(
                np.ascontiguousarray(a).tobytes()
                for a in (
                    rel.start,
                    rel.end,
                    self.radius,
                    self.half_seg,
                    self.half_shape,
                    self.half_sign,
                )
            )
        return self._memo["shape_key"]

    @property
    def n_segments(self) -> int:
        return len(self.length)

    @property
    def n_basis(self) -> int:
        return len(self.half_seg) // 2

    @property
    def centre(self) -> np.ndarray:
        return 0.5 * (self.start + self.end)


def _piece_lengths(points: np.ndarray) -> np.ndarray:
    return np.linalg.norm(np.diff(points, axis=0), axis=1)


def check_antenna(antenna: Antenna, ground: Ground) -> None:
    """Refuse geometry the solver cannot model, naming the wire and the point."""
    if not antenna.wires:
        raise InputError("wires", "expected at least one wire")
    for i, w in enumerate(antenna.wires):
        name = f"wires[{i}]"
        pts = w.points_m
        if pts.ndim != 2 or pts.shape[1] != 3 or len(pts) < 2:
            raise InputError(f"{name}.points_m", "expected at least two [x, y, z] points in metres")
        if not np.all(np.isfinite(pts)):
            raise InputError(f"{name}.points_m", "expected finite coordinates")
        if not (w.radius_m > 0 and math.isfinite(w.radius_m)):
            raise InputError(
                f"{name}.diameter_mm", f"expected more than 0, got {2e3 * w.radius_m:g}"
            )
        if w.conductor not in CONDUCTORS:
            raise InputError(f"{name}.conductor", f"expected one of: {', '.join(CONDUCTORS)}")
        lengths = _piece_lengths(pts)
        for j, piece in enumerate(lengths):
            if piece < MIN_PIECE_RADII * w.radius_m:
                what = (
                    "zero-length piece"
                    if piece == 0
                    else (
                        f"piece {piece * 1e3:.3g} mm long, shorter than {MIN_PIECE_RADII:g} wire radii "
                        "(thin-wire limit)"
                    )
                )
                raise InputError(
                    f"{name}.points_m[{j + 1}]", f"{what} between points {j} and {j + 1}"
                )
        if ground.kind != "free-space":
            for j, p in enumerate(pts):
                if p[2] <= w.radius_m:
                    raise InputError(
                        f"{name}.points_m[{j}]",
                        f"point at z = {p[2]:g} m is below or touching the ground; expected above "
                        f"the ground (z > wire radius {w.radius_m:g} m)",
                    )
    f = antenna.feed
    if not (0 <= f.wire < len(antenna.wires)):
        raise InputError(
            "feed.wire", f"expected a wire index 0..{len(antenna.wires) - 1}, got {f.wire}"
        )
    total = float(_piece_lengths(antenna.wires[f.wire].points_m).sum())
    r = antenna.wires[f.wire].radius_m
    if not (MIN_PIECE_RADII * r <= f.distance_m <= total - MIN_PIECE_RADII * r):
        raise InputError(
            "feed.distance_m",
            f"feed at {f.distance_m:g} m is off wire {f.wire} (length {total:g} m); expected a point "
            "inside the wire, away from its ends",
        )
    # Every piece becomes at least one segment: refuse before the pairwise overlap check, which
    # is O(pieces²) in time and memory (2000 points once took 8 s and 0.7 GB only to be refused).
    pieces = sum(len(w.points_m) - 1 for w in antenna.wires)
    if pieces > MAX_SEGMENTS:
        raise InputError(
            "wires",
            f"the wires have {pieces} straight pieces, each at least one segment; the limit is "
            f"{MAX_SEGMENTS} segments (use fewer points)",
        )
    _check_overlaps(antenna)


def _segment_distance(p1, q1, p2, q2) -> np.ndarray:
    """Closest distance between segment sets [p1,q1] and [p2,q2] (broadcast) [m]."""
    d1, d2, r = q1 - p1, q2 - p2, p1 - p2
    a = np.einsum("...i,...i", d1, d1)
    e = np.einsum("...i,...i", d2, d2)
    f = np.einsum("...i,...i", d2, r)
    c = np.einsum("...i,...i", d1, r)
    b = np.einsum("...i,...i", d1, d2)
    denom = a * e - b * b
    with np.errstate(divide="ignore", invalid="ignore"):
        s = np.where(denom > 1e-12 * a * e, np.clip((b * f - c * e) / denom, 0, 1), 0.0)
        t = (b * s + f) / e
        t = np.clip(t, 0, 1)
        s = np.clip((b * t - c) / a, 0, 1)
    return np.linalg.norm(p1 + d1 * s[..., None] - (p2 + d2 * t[..., None]), axis=-1)


def _check_overlaps(antenna: Antenna) -> None:
    """Pieces of different wires (or non-adjacent pieces of one wire) must not touch or cross."""
    starts, ends, owner, index, radius = [], [], [], [], []
    for i, w in enumerate(antenna.wires):
        for j in range(len(w.points_m) - 1):
            starts.append(w.points_m[j])
            ends.append(w.points_m[j + 1])
            owner.append(i)
            index.append(j)
            radius.append(w.radius_m)
    p, q = np.array(starts), np.array(ends)
    owner, index, radius = np.array(owner), np.array(index), np.array(radius)
    dist = _segment_distance(p[:, None], q[:, None], p[None], q[None])
    n = len(p)
    ii, jj = np.triu_indices(n, 1)
    close = dist[ii, jj] < (radius[ii] + radius[jj]) + 1e-9
    for a, b in zip(ii[close], jj[close], strict=True):
        if owner[a] == owner[b] and abs(index[a] - index[b]) == 1:
            continue  # consecutive pieces of one polyline share a vertex
        ends_a, ends_b = (p[a], q[a]), (p[b], q[b])
        pairs = [(x, y) for x in range(2) for y in range(2)]
        gap, ia, ib = min((float(np.linalg.norm(ends_a[x] - ends_b[y])), x, y) for x, y in pairs)
        if gap < JUNCTION_TOLERANCE_M and owner[a] != owner[b]:
            # touching at end points is a junction; refuse only a piece folded back along the other
            da = ends_a[1 - ia] - ends_a[ia]
            db = ends_b[1 - ib] - ends_b[ib]
            cos = float(da @ db) / (np.linalg.norm(da) * np.linalg.norm(db))
            if cos < 1 - 1e-6:
                continue
        raise InputError(
            f"wires[{owner[b]}].points_m[{index[b]}]",
            f"piece {index[b]} of wire {owner[b]} overlaps or crosses piece {index[a]} of wire "
            f"{owner[a]}; wires may only meet at their end points",
        )


@lru_cache(maxsize=64)
def checked_mesh(antenna: Antenna, ground: Ground, max_frequency_hz: float) -> Mesh:
    """:func:`check_antenna` then :func:`build_mesh`, cached (a spec is checked, then solved)."""
    check_antenna(antenna, ground)
    return _translated_mesh(antenna, max_frequency_hz)


_RELATIVE_MESHES: dict[bytes, Mesh] = {}
_RELATIVE_MESHES_SIZE = 32


def _translated_mesh(antenna: Antenna, max_frequency_hz: float) -> Mesh:
    """:func:`build_mesh`, reusing the mesh of a translated copy of the same wires (a sweep).

    Segmentation depends only on the wires relative to each other, so the mesh is built once with
    the first point of wire 0 at the origin and then shifted.
    """
    origin = antenna.wires[0].points_m[0]
    key = b"|".join(
        [np.array([max_frequency_hz, antenna.feed.wire, antenna.feed.distance_m]).tobytes()]
        + [
            np.ascontiguousarray(w.points_m - origin).tobytes() + np.float64(w.radius_m).tobytes()
            for w in antenna.wires
        ]
    )
    rel = _RELATIVE_MESHES.get(key)
    if rel is None:
        shifted = Antenna(
            wires=tuple(
                Wire(
                    points_m=w.points_m - origin,
                    radius_m=w.radius_m,
                    conductor=w.conductor,
                    insulation=w.insulation,
                )
                for w in antenna.wires
            ),
            feed=antenna.feed,
        )
        rel = build_mesh(shifted, max_frequency_hz=max_frequency_hz)
        if len(_RELATIVE_MESHES) >= _RELATIVE_MESHES_SIZE:
            _RELATIVE_MESHES.pop(next(iter(_RELATIVE_MESHES)))
        _RELATIVE_MESHES[key] = rel
    mesh = replace(
        rel,
        start=rel.start + origin,
        end=rel.end + origin,
        feed_point=rel.feed_point + origin,
        _memo={},
    )
    mesh._memo["relative"] = rel  # translated copies share the relative mesh and its caches
    return mesh


def build_mesh(antenna: Antenna, *, max_frequency_hz: float) -> Mesh:
    """Cut the wires into segments and set up the basis functions.

    Parameters
    ----------
    antenna : Antenna
        Checked geometry (see :func:`check_antenna`).
    max_frequency_hz : float
        Highest frequency to be solved [Hz]; sets the segment length.
    """
    target = SPEED_OF_LIGHT_M_S / max_frequency_hz / SEGMENTS_PER_WAVELENGTH
    node_xyz: list[np.ndarray] = []
    seg_nodes: list[tuple[int, int]] = []
    seg_wire: list[int] = []
    end_nodes: list[tuple[np.ndarray, int]] = []  # (point, node id) of wire end points, for joining
    feed_node = -1

    def node_at(point: np.ndarray, is_end: bool) -> int:
        if is_end:
            for xyz, nid in end_nodes:
                if np.linalg.norm(xyz - point) < JUNCTION_TOLERANCE_M:
                    return nid
        node_xyz.append(point)
        nid = len(node_xyz) - 1
        if is_end:
            end_nodes.append((point, nid))
        return nid

    for wi, w in enumerate(antenna.wires):
        pts = w.points_m
        wire_len = float(_piece_lengths(pts).sum())
        seg_len = max(min(target, wire_len / MIN_SEGMENTS_PER_WIRE), MIN_PIECE_RADII * w.radius_m)
        # insert the feed as a polyline vertex so that a node falls exactly on it
        feed_here = antenna.feed.wire == wi
        cum = np.concatenate([[0.0], np.cumsum(_piece_lengths(pts))])
        verts = [pts[0]]
        marks = [False]
        for j in range(1, len(pts)):
            if feed_here and cum[j - 1] < antenna.feed.distance_m < cum[j]:
                u = (antenna.feed.distance_m - cum[j - 1]) / (cum[j] - cum[j - 1])
                split = pts[j - 1] + u * (pts[j] - pts[j - 1])
                if min(np.linalg.norm(split - pts[j - 1]), np.linalg.norm(split - pts[j])) > 1e-6:
                    verts.append(split)
                    marks.append(True)
            verts.append(pts[j])
            marks.append(feed_here and abs(cum[j] - antenna.feed.distance_m) <= 1e-6)
        prev = node_at(verts[0], True)
        for j in range(1, len(verts)):
            a, b = verts[j - 1], verts[j]
            n = max(1, math.ceil(np.linalg.norm(b - a) / seg_len - 1e-9))
            for k in range(1, n + 1):
                is_last = j == len(verts) - 1 and k == n
                nid = node_at(a + (b - a) * (k / n), is_last)
                seg_nodes.append((prev, nid))
                seg_wire.append(wi)
                prev = nid
                if k == n and marks[j]:
                    feed_node = nid

    if len(seg_nodes) > MAX_SEGMENTS:
        raise InputError(
            "wires",
            f"the wires need {len(seg_nodes)} segments at this frequency; the limit is {MAX_SEGMENTS} "
            "(use fewer or longer pieces, or less wire)",
        )
    xyz = np.array(node_xyz)
    sn = np.array(seg_nodes)
    start, end = xyz[sn[:, 0]], xyz[sn[:, 1]]
    length = np.linalg.norm(end - start, axis=1)
    tangent = (end - start) / length[:, None]
    seg_wire_a = np.array(seg_wire)
    radius = np.array([antenna.wires[i].radius_m for i in seg_wire_a])

    # segments attached to each node: (segment, node is its end?)
    attached: dict[int, list[tuple[int, bool]]] = {}
    for s, (a, b) in enumerate(seg_nodes):
        attached.setdefault(a, []).append((s, False))
        attached.setdefault(b, []).append((s, True))
    half_seg, half_shape, half_sign = [], [], []
    feed_basis = -1
    for nid in sorted(attached):
        segs = attached[nid]
        if len(segs) < 2:
            continue
        s0, at_end0 = segs[0]
        for s1, at_end1 in segs[1:]:
            # current flows toward the node on s0 and away from it on s1
            half_seg += [s0, s1]
            half_shape += [0 if at_end0 else 1, 0 if at_end1 else 1]
            half_sign += [1 if at_end0 else -1, -1 if at_end1 else 1]
            if nid == feed_node:
                feed_basis = len(half_seg) // 2 - 1
    if feed_basis < 0:
        raise InputError("feed.distance_m", "the feed does not fall on a wire node")
    return Mesh(
        start=start,
        end=end,
        length=length,
        tangent=tangent,
        radius=radius,
        wire=seg_wire_a,
        half_seg=np.array(half_seg),
        half_shape=np.array(half_shape),
        half_sign=np.array(half_sign, dtype=float),
        feed_basis=feed_basis,
        feed_point=xyz[feed_node],
    )
