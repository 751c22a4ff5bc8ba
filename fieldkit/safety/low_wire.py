"""Where the wire hangs within reach: the ground under the parts lower than 3 m, as zones to fence.

A wire end below 3 m can be touched by a raised hand (about 2.4 m), a carried pole or tool, or caught
by a head walking under it; touching a wire that is transmitting burns, even where the fields at a
distance are under the exposure limits. The zone is the ground under every part of the wire lower
than ``LOW_WIRE_HEIGHT_M``, widened by ``ZONE_MARGIN_M`` either side.
"""

from __future__ import annotations

import math

import numpy as np

# Below 3 m the wire is within reach of a raised hand (~2.4 m), a carried pole, or a walking head
# (common practice, no single source; the same figure as rigging's default minimum end height)
LOW_WIRE_HEIGHT_M = 3.0
ZONE_MARGIN_M = 1.0  # an arm's length beside the low wire (common practice, no single source)
CAP_POINTS = 9  # points on each half-circle end of a zone


def _runs(wire: np.ndarray, below_m: float) -> list[np.ndarray]:
    """Plan-view pieces of the polyline lower than ``below_m``, crossings interpolated."""
    runs, cur = [], []
    for i in range(len(wire)):
        p = wire[i]
        if i > 0:
            q = wire[i - 1]
            if (q[2] < below_m) != (p[2] < below_m):  # crossing between q and p
                t = (below_m - q[2]) / (p[2] - q[2])
                cur.append(q[:2] + t * (p[:2] - q[:2]))
                if q[2] < below_m:
                    runs.append(np.array(cur))
                    cur = []
        if p[2] < below_m:
            cur.append(p[:2])
    if cur:
        runs.append(np.array(cur))
    return runs


def _capsule(a: np.ndarray, b: np.ndarray, r: float) -> list[list[float]]:
    d = b - a
    n = float(np.hypot(*d))
    u = d / n if n > 1e-9 else np.array([1.0, 0.0])
    base = math.atan2(u[1], u[0])
    pts = []
    for centre, start in ((b, base - math.pi / 2), (a, base + math.pi / 2)):
        for k in range(CAP_POINTS):
            t = start + math.pi * k / (CAP_POINTS - 1)
            pts.append(
                [
                    round(float(centre[0] + r * math.cos(t)), 2),
                    round(float(centre[1] + r * math.sin(t)), 2),
                ]
            )
    return pts


def low_wire_zones(
    wire_m, *, below_m: float = LOW_WIRE_HEIGHT_M, margin_m: float = ZONE_MARGIN_M
) -> list[list[list[float]]]:
    """Ground-plan polygons under the wire where it hangs lower than ``below_m``.

    Parameters
    ----------
    wire_m : (n, 3) the hung wire [m]
    below_m : height under which the wire counts as within reach [m]
    margin_m : width of the zone either side of the low wire [m]

    Returns
    -------
    list of polygons [[x, y], ...] [m]; empty when the wire is nowhere that low
    """
    wire = np.asarray(wire_m, dtype=float)
    out = []
    for run in _runs(wire, below_m):
        # the two points of the run farthest apart: the legs are straight in plan view
        if len(run) == 1:
            a = b = run[0]
        else:
            d = np.linalg.norm(run[:, None, :] - run[None, :, :], axis=2)
            i, j = np.unravel_index(int(np.argmax(d)), d.shape)
            a, b = run[i], run[j]
        out.append(_capsule(a, b, margin_m))
    return out
