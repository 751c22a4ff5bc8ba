"""Rope-height choice: sweep the heights the supports allow and score each by an NVIS figure of merit.

The figure is the mean gain (dBi, ground and conductor loss included) over the sky cap that serves
0–300 km: elevations from the take-off angle of a 300 km one-hop path at a 300 km virtual height
(about 63°, spherical earth, from :func:`fieldkit.sky.elevation_deg`) up to the zenith, averaged over
solid angle and all azimuths. The recommendation: among the heights within 0.3 dB of the best
(below what an operator can hear), the one that matches the coax best (lowest SWR), and of those
matching about as well the lowest — lower is easier and safer to rig. The reason given is the computed
cause: the pattern (zenith gain, elevation of the strongest radiation) against the soil loss
(radiation efficiency), the match, and the slope of the figure at the top of the sweep.

References
----------
.. [1] NVIS uses elevations of roughly 70–90° and covers roughly 0–300 km (common practice,
   REFERENCES.md "Facts of the trade"); ITU-R P.533-14 §5.1 ray geometry for the take-off angle.
.. [2] A horizontal dipole about half a wavelength above ground has a null straight up: the wave
   reflected by the ground arrives in opposite phase (common practice; REFERENCES.md, NEC-2 over
   perfect ground: zenith null at 0.5 wavelength).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from fieldkit.readable import given_both, height_both

NVIS_MAX_RANGE_KM = 300.0  # common practice: NVIS serves about 0–300 km
NVIS_VIRTUAL_HEIGHT_KM = (
    300.0  # common practice: NVIS virtual heights ~250–300 km by day, more at night
)
WITHIN_BEST_DB = 0.3  # issue 5: heights within 0.3 dB of the best count as equal (not audible)
# SWR estimates closer than this are a tie, resolved by the lower height: 0.1 of SWR is a few tenths of
# a percent of mismatch loss (REFERENCES.md mismatch-loss formula; SWR 1.5 → 0.18 dB, 1.6 → 0.23 dB)
SWR_TIE = 0.1
# "More height would help" only when the figure still climbs at least this fast at the top of the
# sweep: three more metres would then give the 0.3 dB an operator may notice
MORE_HEIGHT_DB_PER_M = 0.1
AZIMUTHS_DEG = np.arange(0.0, 360.0, 30.0)
# Ends below 3 m are within reach of a raised hand and a walking head under the wire (common practice);
# the safety block's RF keep-out may ask for more. The site may lower it to 1.5 m (a low-power wire on
# short poles), never further: below that the wire is at waist height.
MIN_END_HEIGHT_M = 3.0
LOWEST_END_HEIGHT_M = 1.5
# Half a wavelength up, give or take: the zone where the zenith null is the cause (common practice)
ZENITH_NULL_WAVELENGTHS = (0.4, 0.65)


def low_end_words(lowest_m: float, min_end_height_m: float) -> str | None:
    """Why a wire lower than 3 m is risky, in plain words (None at 3 m and above)."""
    if lowest_m >= MIN_END_HEIGHT_M - 1e-6:
        return None
    return (
        f"the wire comes down to {height_both(lowest_m)}, the site allowing ends down to "
        f"{given_both(min_end_height_m)}: below {given_both(MIN_END_HEIGHT_M)} a raised hand, a carried pole or a head walking under it "
        "reaches the wire, and touching a wire that is transmitting burns even "
        "at low power — fence or flag the low parts (the safety block's low-wire zone) and never "
        "transmit while anyone is near them"
    )


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
    """One swept setting and what the engine says of it.

    Attributes
    ----------
    rope_heights_m : rope height per support id ("ends" for an inverted-V's end insulators) [m]
    feedpoint_height_m : [m]
    nvis_dbi : NVIS figure (mean gain over the 0–300 km elevations) [dBi]
    zenith_dbi : gain straight up [dBi]
    efficiency : radiation efficiency (ground and conductor loss) [-]
    resistance_ohm, reactance_ohm : feed impedance at the screening leg [Ω]
    max_gain_dbi, max_gain_elevation_deg : strongest radiation and its elevation [dBi], [deg]
    swept_m : the value of the swept rope height (the axis of the sweep) [m]
    axis : what was swept: a support id, "ends", "apex" or "ropes" (both ropes of a flat pair)
    """

    rope_heights_m: dict[str, float]
    feedpoint_height_m: float
    nvis_dbi: float
    zenith_dbi: float
    efficiency: float
    resistance_ohm: float = float("nan")
    reactance_ohm: float = float("nan")
    max_gain_dbi: float = float("nan")
    max_gain_elevation_deg: float = float("nan")
    swept_m: float = float("nan")
    axis: str = ""

    @property
    def swr_estimate(self) -> float:
        """SWR on 50 Ω once the legs are trimmed to resonance here (R alone; X trimmed away) [-]."""
        from fieldkit.rigging.cut import REFERENCE_IMPEDANCE_OHM

        r = self.resistance_ohm
        if not r > 0:
            return float("nan")
        return max(r / REFERENCE_IMPEDANCE_OHM, REFERENCE_IMPEDANCE_OHM / r)

    @property
    def height_m(self) -> float:
        """The swept height, or the feedpoint height where no axis is recorded [m]."""
        return self.swept_m if math.isfinite(self.swept_m) else self.feedpoint_height_m


def point_from_solution(
    solution: Any,
    *,
    rope_heights_m: dict[str, float],
    feedpoint_height_m: float,
    swept_m: float = float("nan"),
    axis: str = "",
) -> HeightPoint:
    """Score one engine solution of a hung setting."""
    z = complex(solution.impedance_ohm)
    return HeightPoint(
        rope_heights_m=dict(rope_heights_m),
        feedpoint_height_m=float(feedpoint_height_m),
        nvis_dbi=nvis_figure_dbi(solution),
        zenith_dbi=float(solution.zenith_gain_dbi),
        efficiency=float(solution.radiation_efficiency),
        resistance_ohm=z.real,
        reactance_ohm=z.imag,
        max_gain_dbi=float(solution.max_gain_dbi),
        max_gain_elevation_deg=float(solution.max_gain_elevation_deg),
        swept_m=float(swept_m),
        axis=axis,
    )


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


def choose(points: Sequence[HeightPoint]) -> int:
    """Index of the recommended point: within 0.3 dB of the best, lowest SWR, then lowest."""
    best_db = max(p.nvis_dbi for p in points)
    ok = [i for i, p in enumerate(points) if p.nvis_dbi >= best_db - WITHIN_BEST_DB]
    swrs = [points[i].swr_estimate for i in ok]
    if all(math.isfinite(s) for s in swrs):
        least = min(swrs)
        ok = [i for i, s in zip(ok, swrs, strict=True) if s <= least + SWR_TIE]
    return min(ok, key=lambda i: points[i].height_m)


def describe(q: HeightPoint, wavelength_m: float | None = None) -> str:
    """A swept point in the operator's words: which rope at what height, and the feedpoint."""

    def up(height_m: float) -> str:  # "9.3 m (30.4 ft, 0.11 wavelength)"
        wl = f"{height_m / wavelength_m:.2f} wavelength" if wavelength_m else ""
        return height_both(height_m, aside=wl)

    feed = f"the feedpoint at {up(q.feedpoint_height_m)}"
    if q.axis == "ends":
        return f"ends at {height_both(q.height_m)}"
    if q.axis == "apex":
        ends = q.rope_heights_m.get("ends")
        tail = f" and the ends at {height_both(ends)}" if ends else ""
        return f"the apex at {up(q.height_m)}{tail}"
    if q.axis == "ropes":
        return f"both ropes at {height_both(q.height_m)} and {feed}"
    if q.axis:
        return f"the {q.axis} rope at {height_both(q.height_m)} and {feed}"
    return feed


def _worse_because(
    q: HeightPoint, c: HeightPoint, wavelength_m: float | None, ground_name: str
) -> str:
    """Why the worse point q loses against c, from what the engine computed: pattern or soil."""
    d_fig = q.nvis_dbi - c.nvis_dbi
    d_eff = 10 * math.log10(max(q.efficiency, 1e-9) / max(c.efficiency, 1e-9))
    d_pattern = d_fig - d_eff
    eff = f"radiation efficiency {q.efficiency * 100:.0f} % against {c.efficiency * 100:.0f} %"
    soil = f"the {ground_name} ground" if ground_name else "the soil"
    if d_eff < d_pattern:  # the soil takes more of the difference than the shape of the beam
        return f"{soil} absorbs more of the power ({eff})"
    low_el = float(nvis_elevations_deg()[0])
    zen = f"straight up the gain is {q.zenith_dbi:.1f} dBi against {c.zenith_dbi:.1f} dBi"
    if math.isfinite(q.max_gain_elevation_deg) and q.max_gain_elevation_deg < low_el:
        words = (
            f"the strongest radiation leaves at {q.max_gain_elevation_deg:.0f}° elevation, below the "
            f"NVIS angles ({low_el:.0f}–90°), and {zen}"
        )
    else:
        words = f"the beam overhead is weaker: {zen}"
    lo, hi = ZENITH_NULL_WAVELENGTHS
    if wavelength_m and lo <= q.feedpoint_height_m / wavelength_m <= hi:
        words += (
            " — about half a wavelength up, the wave reflected by the ground cancels the one going "
            "straight up (common practice: the zenith null near 0.5 wavelength)"
        )
    if d_eff < -0.1:
        words += f"; {soil} takes a little more too ({eff})"
    return words


def top_slope_db_per_m(points: Sequence[HeightPoint]) -> float:
    """How fast the figure climbs at the top of a sweep [dB/m]: the derivative at the top of the
    parabola through the three highest points (the secant of the last two when there are only two)."""
    pts = sorted(points, key=lambda q: q.height_m)[-3:]
    (x1, y1), (x2, y2) = ((q.height_m, q.nvis_dbi) for q in pts[-2:])
    secant = (y2 - y1) / max(x2 - x1, 1e-9)
    if len(pts) < 3:
        return secant
    x0, y0 = pts[0].height_m, pts[0].nvis_dbi
    a = (secant - (y1 - y0) / max(x1 - x0, 1e-9)) / max(x2 - x0, 1e-9)  # half the 2nd derivative
    return secant + a * (x2 - x1)


def recommend(
    points: Sequence[HeightPoint],
    *,
    ground_name: str,
    wavelength_m: float | None = None,
    top_why: str | None = None,
    best_only: bool = False,
) -> tuple[int, str]:
    """The recommended point and why, in plain words, from the computed causes.

    Parameters
    ----------
    points : the swept points of one axis, any order
    ground_name : the site's ground, for the words
    wavelength_m : the channel's wavelength, to give heights in wavelengths [m]
    top_why : why the sweep ends at its top (e.g. the rope in the kit); None for the supports' limit
    best_only : take the best figure, without the 0.3 dB / SWR / lower preference (an inverted-V's
        apex, swept before its ends: the preference is applied once, on the last height swept, so
        that two 0.3 dB allowances do not add up)

    Returns
    -------
    (index into ``points``, reason)
    """
    pick = (
        max(range(len(points)), key=lambda i: points[i].nvis_dbi) if best_only else choose(points)
    )
    order = sorted(range(len(points)), key=lambda i: points[i].height_m)
    p = points[pick]
    best = max(range(len(points)), key=lambda i: points[i].nvis_dbi)
    b = points[best]

    def at(q: HeightPoint) -> str:
        return describe(q, wavelength_m)

    parts = []
    lead = at(p)
    if pick == best:
        parts.append(f"with {lead} the NVIS figure is best ({b.nvis_dbi:.1f} dBi)")
    else:
        text = (
            f"with {lead} the NVIS figure is {p.nvis_dbi:.1f} dBi, within {WITHIN_BEST_DB} dB of the "
            f"best ({b.nvis_dbi:.1f} dBi with {at(b)}) — too little to hear"
        )
        if p.swr_estimate < b.swr_estimate - SWR_TIE:
            text += (
                f"; it matches the 50 Ω coax better: about {p.resistance_ohm:.0f} Ω at resonance, "
                f"SWR about {p.swr_estimate:.1f} against {b.swr_estimate:.1f}"
            )
        else:
            text += ", and lower is easier and safer to rig"
        parts.append(text)
    above = [points[i] for i in order if points[i].height_m > p.height_m]
    below = [points[i] for i in order if points[i].height_m < p.height_m]
    worse_above = [q for q in above if q.nvis_dbi < p.nvis_dbi - WITHIN_BEST_DB]
    if worse_above:
        q = min(worse_above, key=lambda q: q.nvis_dbi)
        parts.append(
            f"higher is worse: with {at(q)} the figure is {q.nvis_dbi:.1f} dBi because "
            + _worse_because(q, p, wavelength_m, ground_name)
        )
    worse_below = [q for q in below if q.nvis_dbi < p.nvis_dbi - WITHIN_BEST_DB]
    if worse_below:
        q = min(worse_below, key=lambda q: q.height_m)
        parts.append(
            f"lower is worse: with {at(q)} the figure drops to {q.nvis_dbi:.1f} dBi because "
            + _worse_because(q, p, wavelength_m, ground_name)
        )
    if not above and below:
        slope = top_slope_db_per_m([points[i] for i in order])
        limit = top_why or "the supports allow no higher"
        more = "higher ends" if p.axis == "ends" else "more height"
        if slope >= MORE_HEIGHT_DB_PER_M:
            parts.append(
                f"{limit}; {more} would still help: the figure climbs about "
                f"{slope:.2f} dB per metre at the top of the sweep"
            )
        elif slope > -MORE_HEIGHT_DB_PER_M and pick == best:
            parts.append(f"{limit}; the figure is nearly level there, {more} would hardly help")
    return pick, "; ".join(parts)


def sweep_json(points: Sequence[HeightPoint]) -> list[dict[str, Any]]:
    return [
        {
            "rope_heights_m": {k: round(v, 2) for k, v in p.rope_heights_m.items()},
            "feedpoint_height_m": round(p.feedpoint_height_m, 2),
            "nvis_mean_gain_dbi": round(p.nvis_dbi, 2),
            "zenith_gain_dbi": round(p.zenith_dbi, 2),
            "radiation_efficiency": round(p.efficiency, 3),
            **(
                {
                    "swept": p.axis,
                    "swept_height_m": round(p.swept_m, 2),
                    "max_gain_elevation_deg": round(p.max_gain_elevation_deg, 1),
                    "swr_estimate": round(p.swr_estimate, 2),
                }
                if p.axis and math.isfinite(p.swr_estimate)
                else {}
            ),
        }
        for p in points
    ]
