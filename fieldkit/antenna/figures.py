"""Far-field figures of solved antennas: maximum gain and its direction, −3 dB widths of the cuts.

Each search runs in stages (a coarse scan, then refinements round what the scan found); a stage
asks for the gains of every solution at its own directions through one ``evaluate`` call, so that a
sweep of translated copies (:mod:`fieldkit.antenna.sweep`) evaluates all of them together while a
single solution simply evaluates its own. The figures are the same either way.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence

import numpy as np

from . import farfield

# directions (..., 3) per solution → linear partial gains (θ, φ) per solution, shape (...)
Evaluate = Callable[[Sequence[np.ndarray]], list[tuple[np.ndarray, np.ndarray]]]

MAX_TIE_DB = 1e-9  # gains this close are a tie (symmetric directions), resolved by the first
BEAMWIDTH_STEP_DEG = 3.0  # coarse sampling of the cuts for −3 dB widths (crossings refined)
MAX_REFINE_STEPS_DEG = (2.0, 0.4)  # local refinements round the best direction of the scan


def total_gain_db(g_th: np.ndarray, g_ph: np.ndarray) -> np.ndarray:
    """Total gain [dBi] from linear partial gains."""
    return 10 * np.log10(np.maximum(g_th + g_ph, 1e-30))


def _gains_db(evaluate: Evaluate, rhats: Sequence[np.ndarray]) -> list[np.ndarray]:
    return [total_gain_db(g_th, g_ph) for g_th, g_ph in evaluate(rhats)]


def first_max(g: np.ndarray) -> tuple[int, ...]:
    """Index of the first entry within MAX_TIE_DB of the maximum (ties not left to rounding)."""
    flat = np.ravel(g)
    i = int(np.argmax(flat >= flat.max() - MAX_TIE_DB))
    return tuple(int(x) for x in np.unravel_index(i, np.shape(g)))


def maxima(sols: Sequence, evaluate: Evaluate) -> list[tuple[float, float, float]]:
    """(max gain [dBi], its elevation [deg], its azimuth [deg]) of each solution.

    Starts from the power-integration grid of the solve (which covers the sky) or a 10° × 15° scan,
    then refines twice round the best direction on 7 × 7 grids.
    """
    lows = [-90.0 if s.ground.kind == "free-space" else 0.0 for s in sols]
    scans = []
    missing = [i for i, s in enumerate(sols) if s._cache.get("grid") is None]
    if missing:
        grids = [(np.arange(lows[i], 90.01, 10.0), np.arange(0.0, 360.0, 15.0)) for i in missing]
        found = _gains_db(evaluate, [farfield.directions(el, az) for el, az in grids])
        scanned = dict(zip(missing, zip(grids, found, strict=True), strict=True))
    for i, s in enumerate(sols):
        grid = s._cache.get("grid")
        if grid is None:
            (el, az), g = scanned[i]
        else:
            el, az, g = grid["elevation_deg"], grid["azimuth_deg"], grid["intensity_w_sr"]
        ia, ie = first_max(g)
        scans.append((el[ie], az[ia]))
    best = scans
    out: list = [None] * len(sols)
    for step in MAX_REFINE_STEPS_DEG:
        grids = [
            (np.clip(e + step * np.arange(-3, 4), lo, 90), a + 1.5 * step * np.arange(-3, 4))
            for (e, a), lo in zip(best, lows, strict=True)
        ]
        found = _gains_db(evaluate, [farfield.directions(el, az) for el, az in grids])
        best = []
        for i, ((el2, az2), g2) in enumerate(zip(grids, found, strict=True)):
            ja, je = first_max(g2)
            best.append((el2[je], az2[ja]))
            out[i] = (float(g2[ja, je]), float(el2[je]), float(az2[ja] % 360))
    return out


def _cut_directions(theta_deg: np.ndarray, azimuth_rad: np.ndarray) -> np.ndarray:
    t = np.radians(theta_deg)
    return np.stack(
        [np.cos(t) * np.cos(azimuth_rad), np.cos(t) * np.sin(azimuth_rad), np.sin(t)], axis=-1
    )


def cut_beamwidths(
    sols: Sequence, azimuths_deg: Sequence[Sequence[float]], evaluate: Evaluate
) -> list[list[float]]:
    """−3 dB width of the lobe holding the maximum of vertical cuts through zenith [deg].

    A cut runs from the horizon at its azimuth (0°) over zenith (90°) to the opposite horizon
    (180°). Sampled every BEAMWIDTH_STEP_DEG, then the peak and both −3 dB crossings are refined
    inside their brackets; the samples of all cuts go to the far field together.
    """
    spans = [(-90.0, 270.0) if s.ground.kind == "free-space" else (0.0, 180.0) for s in sols]
    azs = [np.radians(np.asarray(a, dtype=float)) for a in azimuths_deg]
    step = BEAMWIDTH_STEP_DEG
    thetas = [np.arange(lo, hi + step / 2, step) for lo, hi in spans]
    scans = _gains_db(
        evaluate,
        [
            _cut_directions(np.tile(th, len(az)), az[np.repeat(np.arange(len(az)), len(th))])
            for th, az in zip(thetas, azs, strict=True)
        ],
    )
    cuts = [g.reshape(len(az), len(th)) for g, az, th in zip(scans, azs, thetas, strict=True)]
    peaks = [np.argmax(c >= c.max(axis=1, keepdims=True) - MAX_TIE_DB, axis=1) for c in cuts]
    offsets = np.arange(-step, step + 0.01, 0.25)
    fines = [
        np.clip(th[pk][:, None] + offsets[None, :], lo, hi)
        for th, pk, (lo, hi) in zip(thetas, peaks, spans, strict=True)
    ]
    found = _gains_db(
        evaluate,
        [
            _cut_directions(fine.ravel(), az[np.repeat(np.arange(len(az)), len(offsets))])
            for fine, az in zip(fines, azs, strict=True)
        ],
    )
    levels = [g.reshape(len(az), -1).max(axis=1) - 3.0 for g, az in zip(found, azs, strict=True)]
    # each crossing: (cut, index inside the lobe, index outside it or None at the end of the cut)
    crossings = []
    for cut, peak, level in zip(cuts, peaks, levels, strict=True):
        n = cut.shape[1]
        rows, lvs = cut.tolist(), level.tolist()  # Python floats: the walks below are scalar
        mine = []
        for c in range(len(rows)):
            i = j = int(peak[c])
            row, lv = rows[c], lvs[c]
            while i > 0 and row[i - 1] >= lv:
                i -= 1
            while j < n - 1 and row[j + 1] >= lv:
                j += 1
            mine += [(c, i, i - 1 if i > 0 else None), (c, j, j + 1 if j < n - 1 else None)]
        crossings.append(mine)
    inners = [[x for x in mine if x[2] is not None] for mine in crossings]
    walks = [
        np.array([np.linspace(th[o], th[i], 9) for _, i, o in inner]) if inner else None
        for inner, th in zip(inners, thetas, strict=True)
    ]
    asked = [k for k, w in enumerate(walks) if w is not None]
    found = _gains_db(
        evaluate,
        [
            _cut_directions(walks[k].ravel(), azs[k][np.repeat([c for c, _, _ in inners[k]], 9)])
            for k in asked
        ],
    )
    walked = dict(zip(asked, found, strict=True))
    out = []
    for k in range(len(sols)):
        edge: dict[tuple, float] = {}
        if k in walked:
            g = walked[k].reshape(len(inners[k]), 9)
            for x, tk, gk in zip(inners[k], walks[k], g, strict=True):
                lv = levels[k][x[0]]
                j = int(np.argmax(gk >= lv))  # first sample inside the lobe, walking inward
                edge[x] = (
                    float(tk[0])
                    if j == 0
                    else float(np.interp(lv, gk[j - 1 : j + 1], tk[j - 1 : j + 1]))
                )
        th, mine = thetas[k], crossings[k]
        widths = []
        for c in range(len(azs[k])):
            left, right = mine[2 * c], mine[2 * c + 1]
            lo_edge = float(th[0]) if left[2] is None else edge[left]
            hi_edge = float(th[-1]) if right[2] is None else edge[right]
            widths.append(hi_edge - lo_edge)
        out.append(widths)
    return out
