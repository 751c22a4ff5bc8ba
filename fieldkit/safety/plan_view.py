"""Plan-view and 3-D geometry helpers: distances to polylines, densifying, compass words."""

from __future__ import annotations

import math

import numpy as np

_COMPASS = (
    "north",
    "north-east",
    "east",
    "south-east",
    "south",
    "south-west",
    "west",
    "north-west",
)


def distance_to_polyline(points: np.ndarray, polyline: np.ndarray) -> np.ndarray:
    """Shortest distance from each point to a polyline, in any dimension.

    Parameters
    ----------
    points : ndarray (n, d)
        Points [m].
    polyline : ndarray (m, d)
        Vertices of the polyline [m]; one vertex is a point.

    Returns
    -------
    ndarray (n,)
        Distances [m].
    """
    p = np.atleast_2d(np.asarray(points, dtype=float))
    line = np.atleast_2d(np.asarray(polyline, dtype=float))
    if len(line) == 1:
        return np.linalg.norm(p - line[0], axis=1)
    a, b = line[:-1], line[1:]
    ab = b - a
    ab2 = np.einsum("ij,ij->i", ab, ab)
    ap = p[:, None, :] - a[None, :, :]
    t = np.einsum("nmd,md->nm", ap, ab) / np.where(ab2 > 0, ab2, 1.0)
    t = np.clip(t, 0.0, 1.0)
    nearest = a[None] + t[..., None] * ab[None]
    return np.linalg.norm(p[:, None, :] - nearest, axis=2).min(axis=1)


def densify(polyline: np.ndarray, *, step_m: float) -> np.ndarray:
    """The polyline's vertices plus points at most ``step_m`` apart along every piece."""
    line = np.atleast_2d(np.asarray(polyline, dtype=float))
    out = [line[:1]]
    for a, b in zip(line[:-1], line[1:], strict=True):
        n = max(1, math.ceil(float(np.linalg.norm(b - a)) / step_m))
        t = np.linspace(0.0, 1.0, n + 1)[1:, None]
        out.append(a + t * (b - a))
    return np.vstack(out)


def compass_word(dx: float, dy: float) -> str:
    """Eight-point compass direction of the vector (dx east, dy north)."""
    bearing = math.degrees(math.atan2(dx, dy)) % 360.0
    return _COMPASS[int((bearing + 22.5) // 45.0) % 8]


def polyline_length(polyline: np.ndarray) -> float:
    line = np.atleast_2d(np.asarray(polyline, dtype=float))
    return float(np.linalg.norm(np.diff(line, axis=0), axis=1).sum())
