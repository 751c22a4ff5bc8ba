"""Rope-height choice: sweep the heights the supports allow and score each by an NVIS figure of merit.

The figure is the mean gain (dBi, ground and conductor loss included) over the sky cap that serves
0–300 km: elevations from the take-off angle of a 300 km one-hop path at a 300 km virtual height
(about 63°, spherical earth, from :func:`fieldkit.sky.elevation_deg`) up to the zenith, averaged over
solid angle and all azimuths. The recommendation is the LOWEST rope height within 0.3 dB of the best:
lower is easier and safer to rig, and 0.3 dB is below what an operator can hear.

References
----------
.. [1] NVIS uses elevations of roughly 70–90° and covers roughly 0–300 km (common practice,
   REFERENCES.md "Facts of the trade"); ITU-R P.533-14 §5.1 ray geometry for the take-off angle.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

NVIS_MAX_RANGE_KM = 300.0  # common practice: NVIS serves about 0–300 km
NVIS_VIRTUAL_HEIGHT_KM = (
    300.0  # common practice: NVIS virtual heights ~250–300 km by day, more at night
)
WITHIN_BEST_DB = 0.3  # issue 5: recommend the lowest height within 0.3 dB of the best
AZIMUTHS_DEG = np.arange(0.0, 360.0, 30.0)
# Ends below 3 m are within reach of a raised hand and a walking head under the wire (common practice);
# the safety block's RF keep-out may ask for more.
MIN_END_HEIGHT_M = 3.0


def nvis_elevations_deg(step_deg: float = 3.0) -> np.ndarray:
    """Elevations from the take-off angle of a 300 km hop to the zenith [deg]."""
    from fieldkit.sky import elevation_deg

    low = float(
        elevation_deg(ground_range_km=NVIS_MAX_RANGE_KM, virtual_height_km=NVIS_VIRTUAL_HEIGHT_KM)
    )
    n = max(int(np.ceil((90.0 - low) / step_deg)), 2) + 1
    return np.linspace(low, 90.0, n)


def nvis_figure_dbi(solution: Any, elevations_deg: np.ndarray | None = None) -> float:
    """Solid-angle mean of the gain over the NVIS cap, all azimuths [dBi]."""
    el = (
        nvis_elevations_deg() if elevations_deg is None else np.asarray(elevations_deg, dtype=float)
    )
    g = np.asarray(solution.gain_dbi(el, AZIMUTHS_DEG), dtype=float)  # [n_az, n_el]
    lin = 10 ** (g / 10)
    w = np.cos(np.radians(el))
    w = np.where(el >= 90.0 - 1e-9, w + 1e-3, w)  # keep the zenith in when the cap is a point
    return float(10 * np.log10(np.sum(lin * w[None, :]) / (np.sum(w) * lin.shape[0])))


@dataclass(frozen=True)
class HeightPoint:
    """One swept rope height: heights per support, feedpoint height, figure of merit, zenith gain."""

    rope_heights_m: dict[str, float]
    feedpoint_height_m: float
    nvis_dbi: float
    zenith_dbi: float
    efficiency: float
    resistance_ohm: float = float("nan")
    reactance_ohm: float = float("nan")


def sweep(
    settings: Sequence[dict[str, float]],
    solve_at: Callable[[dict[str, float]], tuple[Any, float] | None],
) -> list[HeightPoint]:
    """Score each rope-height setting; ``solve_at`` returns (solution, feedpoint height) or None (cannot hang)."""
    out = []
    for heights in settings:
        got = solve_at(heights)
        if got is None:
            continue
        sol, feed_h = got
        out.append(
            HeightPoint(
                rope_heights_m=dict(heights),
                feedpoint_height_m=feed_h,
                nvis_dbi=nvis_figure_dbi(sol),
                zenith_dbi=float(sol.zenith_gain_dbi),
                efficiency=float(sol.radiation_efficiency),
            )
        )
    return out


def recommend(points: Sequence[HeightPoint], *, ground_name: str) -> tuple[int, str]:
    """Index of the lowest setting within 0.3 dB of the best, and why, in plain words."""
    best = max(range(len(points)), key=lambda i: points[i].nvis_dbi)
    best_db = points[best].nvis_dbi
    ok = [i for i, p in enumerate(points) if p.nvis_dbi >= best_db - WITHIN_BEST_DB]
    pick = min(ok, key=lambda i: points[i].feedpoint_height_m)
    p, b = points[pick], points[best]
    lowest = min(points, key=lambda q: q.feedpoint_height_m)
    parts = []
    if pick == best:
        parts.append(
            f"the feedpoint at {p.feedpoint_height_m:.1f} m gives the best NVIS figure ({best_db:.1f} dBi)"
        )
    else:
        parts.append(
            f"the feedpoint at {p.feedpoint_height_m:.1f} m gives {p.nvis_dbi:.1f} dBi, within "
            f"{WITHIN_BEST_DB} dB of the best ({best_db:.1f} dBi at {b.feedpoint_height_m:.1f} m) — "
            "too little to hear, and lower is easier and safer to rig"
        )
    if lowest is not p and lowest.nvis_dbi < p.nvis_dbi - WITHIN_BEST_DB:
        parts.append(
            f"lower is worse here: at {lowest.feedpoint_height_m:.1f} m the figure drops to "
            f"{lowest.nvis_dbi:.1f} dBi because over {ground_name} ground a very low dipole loses more "
            f"power in the soil (efficiency {lowest.efficiency * 100:.0f} % against {p.efficiency * 100:.0f} %) "
            "than it gains by sending it straight up"
        )
    if pick == max(range(len(points)), key=lambda i: points[i].feedpoint_height_m):
        parts.append("the supports allow no higher; more height would still help a little")
    return pick, "; ".join(parts)


def sweep_json(points: Sequence[HeightPoint]) -> list[dict[str, Any]]:
    return [
        {
            "rope_heights_m": {k: round(v, 2) for k, v in p.rope_heights_m.items()},
            "feedpoint_height_m": round(p.feedpoint_height_m, 2),
            "nvis_mean_gain_dbi": round(p.nvis_dbi, 2),
            "zenith_gain_dbi": round(p.zenith_dbi, 2),
            "radiation_efficiency": round(p.efficiency, 3),
        }
        for p in points
    ]
