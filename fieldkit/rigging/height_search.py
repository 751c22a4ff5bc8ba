"""Searching one rope height (a flat pair's ropes, a sloping pair's higher rope, an inverted-V's apex or
its ends) over its whole range for the best NVIS figure, with few engine solves.

The range runs from the lowest height at which the wire may hang (ends at the minimum end height, a
leg no steeper than allowed) to the highest the support, the rope in the kit and the clearing allow;
both edges are found with the hang alone (geometry, no engine). The engine then solves a coarse grid
over the whole range — 0.05 wavelength apart, fine enough not to step over a peak of the figure: the
NVIS figure of a horizontal dipole changes by a few tenths of a dB per 0.05 wavelength (REFERENCES.md,
NEC-2 zenith gains at 0.08/0.16/0.24 wavelength) — and refines around the best point with parabolic
steps until the peak is known to 0.01 wavelength. The whole range is swept because the figure has more
than one peak in height (a second one near 0.75 wavelength, above the null near 0.5 wavelength), and
lower heights are worth knowing even when they lose: they are easier and safer to rig.

References
----------
.. [1] Parabolic interpolation of a maximum through three points (successive parabolic interpolation):
   W. H. Press et al., *Numerical Recipes*, 3rd ed., Cambridge 2007, §10.3, eq. 10.3.1.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

import numpy as np

from fieldkit.rigging.heights import WITHIN_BEST_DB, HeightPoint

COARSE_STEP_WAVELENGTHS = 0.05  # coarse grid: a few tenths of a dB of figure per step (see above)
MIN_COARSE_STEP_M = 1.0  # never finer than a metre on the coarse grid (high channels, short ranges)
FINE_STEP_WAVELENGTHS = 0.01  # the peak is known to 0.01 wavelength: hundredths of a dB
# a halyard is set to about half a metre by eye from the ground (common practice, no single source)
MIN_FINE_STEP_M = 0.5
# the edges of the range, from the hang alone (no engine): half the 0.5 m a halyard is set to by eye
BOUND_TOLERANCE_M = 0.25
MAX_REFINE_STEPS = 4  # parabolic steps after the coarse grid (1–2 are usual)
# Axis-by-axis passes at most: an inverted-V's apex is swept again when its ends came to rest against
# the least drop below it (found on a 60 m inverted-V over sea water: the apex stopped at 5.9 m of a
# 9 m mast with the ends pressed 2 m under it, "higher ends would still help")
MAX_PASSES = 3
# a coarse point sits up to about this much below its peak (0.025 wavelength off a peak whose figure
# falls ~0.3 dB over 0.05 wavelength: measured on the engine's height sweeps, 7.1 MHz, poor ground)
PEAK_MARGIN_DB = 0.15


@dataclass(frozen=True)
class Range:
    """The heights a swept rope may take, and what ends the range at each side.

    Attributes
    ----------
    low_m, high_m : lowest and highest height at which the wire hangs as required [m]
    low_why, high_why : why the range ends there, in plain words (the first refusal met beyond the
        edge); None where the range ends at the asked bound itself (the support's top, say)
    """

    low_m: float
    high_m: float
    low_why: str | None = None
    high_why: str | None = None


def coarse_step_m(wavelength_m: float) -> float:
    """Spacing of the coarse grid [m]."""
    return max(COARSE_STEP_WAVELENGTHS * wavelength_m, MIN_COARSE_STEP_M)


def fine_step_m(wavelength_m: float) -> float:
    """Resolution the peak is refined to [m]."""
    return max(FINE_STEP_WAVELENGTHS * wavelength_m, MIN_FINE_STEP_M)


def _grid(low: float, high: float, step: float) -> list[float]:
    if high - low < 1e-6:
        return [high]
    n = max(2, math.ceil((high - low) / step - 1e-9) + 1)
    return [float(v) for v in np.linspace(low, high, n)]


def _edge(good: float, bad: float, why_bad: str, refuses: Callable[[float], str | None]):
    """Bisect between a height that hangs and one that does not; (edge, why beyond it)."""
    while abs(bad - good) > BOUND_TOLERANCE_M:
        mid = 0.5 * (good + bad)
        why = refuses(mid)
        if why is None:
            good = mid
        else:
            bad, why_bad = mid, why
    return good, why_bad


def feasible_range(
    low_m: float,
    high_m: float,
    refuses: Callable[[float], str | None],
    *,
    probe_step_m: float,
) -> Range | str:
    """The part of [low, high] where the wire hangs, found with the hang alone.

    Parameters
    ----------
    low_m, high_m : the asked bounds of the swept height [m]
    refuses : height [m] -> None when the wire hangs there as required, else why not (plain words)
    probe_step_m : spacing of the first probes [m]; the edges are then bisected to 25 cm

    Returns
    -------
    Range, or the reason (str) when no height in the range hangs
    """
    probes = _grid(low_m, high_m, probe_step_m)
    whys = [refuses(h) for h in probes]
    ok = [i for i, w in enumerate(whys) if w is None]
    if not ok:
        return next(w for w in reversed(whys) if w)
    lo_i, hi_i = ok[0], ok[-1]
    low, low_why = probes[lo_i], None
    if lo_i > 0:
        low, low_why = _edge(probes[lo_i], probes[lo_i - 1], whys[lo_i - 1], refuses)
    high, high_why = probes[hi_i], None
    if hi_i < len(probes) - 1:
        high, high_why = _edge(probes[hi_i], probes[hi_i + 1], whys[hi_i + 1], refuses)
    return Range(low, high, low_why, high_why)


def _vertex(x: tuple[float, float, float], y: tuple[float, float, float]) -> float | None:
    """Abscissa of the maximum of the parabola through three points, or None (no maximum) [1]_."""
    (a, b, c), (fa, fb, fc) = x, y
    num = (b - a) ** 2 * (fb - fc) - (b - c) ** 2 * (fb - fa)
    den = (b - a) * (fb - fc) - (b - c) * (fb - fa)
    if den == 0:
        return None
    v = b - 0.5 * num / den
    # a maximum needs the middle point above the chord of the outer two
    chord = fa + (fc - fa) * (b - a) / (c - a)
    return v if fb > chord else None


def _valid(done: dict[float, HeightPoint | None]) -> list[tuple[float, HeightPoint]]:
    return sorted((h, p) for h, p in done.items() if p is not None)


def _peak_to_refine(done, refined: set[float]) -> float | None:
    """The height of the peak to refine next: the best point first; then the lowest local maximum
    whose figure may come within 0.3 dB of the best once refined (coarse points sit up to ~0.1 dB
    below their peak), because the lower of two equal peaks is the one recommended."""
    valid = _valid(done)
    if len(valid) < 2:
        return None
    best_db = max(p.nvis_dbi for _, p in valid)
    if not refined:
        return max(valid, key=lambda hp: hp[1].nvis_dbi)[0]
    for i, (h, p) in enumerate(valid):
        left = valid[i - 1][1].nvis_dbi if i > 0 else -math.inf
        right = valid[i + 1][1].nvis_dbi if i + 1 < len(valid) else -math.inf
        if (
            p.nvis_dbi >= max(left, right)
            and p.nvis_dbi >= best_db - WITHIN_BEST_DB - PEAK_MARGIN_DB
        ):
            if min(abs(h - r) for r in refined) > 1e-6 and h < min(refined):
                return h
            return None
    return None


def _refine(done, at, start: float, fine: float, coarse: float) -> float:
    """Parabolic steps around the local maximum nearest ``start``; returns where it ended."""
    h_best = start
    for _ in range(MAX_REFINE_STEPS):
        valid = _valid(done)
        hs = [h for h, _ in valid]
        i = min(range(len(hs)), key=lambda k: abs(hs[k] - h_best))
        # climb to the local maximum next to the start
        while i + 1 < len(valid) and valid[i + 1][1].nvis_dbi > valid[i][1].nvis_dbi:
            i += 1
        while i > 0 and valid[i - 1][1].nvis_dbi > valid[i][1].nvis_dbi:
            i -= 1
        h_best = hs[i]
        if 0 < i < len(valid) - 1:
            trio = valid[i - 1 : i + 2]
            v = _vertex(tuple(h for h, _ in trio), tuple(p.nvis_dbi for _, p in trio))
            if v is None:
                break
            v = min(max(v, trio[0][0]), trio[2][0])
            if min(abs(v - h) for h in hs) < fine:  # the peak is known to the fine spacing
                break
            at(v)
        else:
            # best at an edge: when the parabola through the three edge points peaks between the
            # edge and its neighbour, look there; when it still climbs at the edge, the edge is
            # the best the range allows and its slope comes from the same parabola (no solve)
            other = hs[1] if i == 0 else hs[-2]
            if abs(other - hs[i]) <= fine + 1e-9:
                break
            if len(valid) < 3:
                if abs(other - hs[i]) <= 0.5 * coarse + 1e-9:
                    break
                at(0.5 * (hs[i] + other))
                continue
            trio = valid[:3] if i == 0 else valid[-3:]
            x, y = tuple(h for h, _ in trio), tuple(p.nvis_dbi for _, p in trio)
            v = _vertex(x, y)
            lo, hi = sorted((hs[i], other))
            if v is None or not lo + fine < v < hi - fine:
                break
            at(v)
    return h_best


def search(
    rng: Range,
    evaluate: Callable[[float], HeightPoint | None],
    *,
    wavelength_m: float,
) -> list[HeightPoint]:
    """Coarse grid over the range, then parabolic refinement around the best point.

    Parameters
    ----------
    rng : the heights the rope may take (:func:`feasible_range`)
    evaluate : height [m] -> the scored point (one engine solve), or None when it cannot hang there
    wavelength_m : wavelength of the channel [m]; sets the coarse and the fine spacing

    Returns
    -------
    list of HeightPoint, ordered by the swept height; each evaluated height once

    Notes
    -----
    When the best point is at an edge of the range and the figure still climbs there (the parabola
    through the three edge points has no maximum short of the edge), no more points are solved: the
    edge is the best the range allows. Engine cost: the coarse grid (2 points for a range under 0.05
    wavelength) plus 0–3 refinement points.
    """
    done: dict[float, HeightPoint | None] = {}

    def at(h: float) -> None:
        key = round(h, 3)
        if key not in done:
            done[key] = evaluate(h)

    for h in _grid(rng.low_m, rng.high_m, coarse_step_m(wavelength_m)):
        at(h)
    fine = fine_step_m(wavelength_m)
    refined: set[float] = set()
    for _ in range(2):  # the global best, then the lowest other peak that may be chosen instead
        target = _peak_to_refine(done, refined)
        if target is None:
            break
        refined.add(_refine(done, at, target, fine, coarse_step_m(wavelength_m)))
    return [p for _, p in sorted((h, p) for h, p in done.items() if p is not None)]


@dataclass(frozen=True)
class LayoutSweep:
    """A layout's rope heights swept axis by axis, and the recommendation.

    Attributes
    ----------
    points : every solved point, axis after axis, each axis ordered by its height
    chosen : the recommended setting (rope height per support id, "ends")
    pick : index into ``points`` of the recommended point
    why : the reasons, in plain words (one clause group per axis)
    ranges : per axis key, the range the rope could take
    """

    points: tuple[HeightPoint, ...]
    chosen: dict[str, float]
    pick: int
    why: str
    ranges: dict[str, Range]


def sweep_layout(
    layout,
    *,
    build: Callable[[dict[str, float]], Any],
    solve: Callable[[Any], Any],
    wavelength_m: float,
    ground_name: str,
) -> LayoutSweep:
    """Sweep each axis of a layout in turn (the others held), recommend, and move on.

    Parameters
    ----------
    layout : fieldkit.rigging.layouts.Layout
    build : setting -> hung dipole at the screening leg (raises HangError where it cannot hang)
    solve : hung dipole -> engine solution at the channel (one frequency)
    wavelength_m : of the channel [m]
    ground_name : the site's ground, for the words

    Raises
    ------
    HangError
        When no height of the first axis can hang (the reason met at the top of its range).
    """
    from fieldkit.rigging.catenary import HangError
    from fieldkit.rigging.heights import point_from_solution, recommend

    values = layout.start()
    hangs: dict[tuple, Any] = {}  # each setting hung once: probed for the range, then solved

    def hung_at(s: dict[str, float]):
        key = tuple(sorted((k, round(v, 4)) for k, v in s.items()))
        if key not in hangs:
            try:
                hangs[key] = build(s)
            except HangError as e:
                hangs[key] = e
        if isinstance(hangs[key], HangError):
            raise hangs[key]
        return hangs[key]

    # per axis, the points and the reason of its last pass (an earlier pass held other values)
    swept: dict[str, tuple[list[HeightPoint], int]] = {}
    whys: dict[str, str] = {}
    ranges: dict[str, Range] = {}
    last_key = layout.axes[-1].key
    for sweep_pass in range(MAX_PASSES):
        held = False  # the last axis ended at an edge the other axis set: sweep both again
        for n, axis in enumerate(layout.axes):

            def setting(v: float, key: str = axis.key) -> dict[str, float]:
                return layout.setting_for({**values, key: v})

            def refuses(v: float) -> str | None:
                try:
                    hung_at(setting(v))
                except HangError as e:
                    return str(e)
                return None

            rng = feasible_range(
                axis.low_m, axis.high_m, refuses, probe_step_m=coarse_step_m(wavelength_m)
            )
            if isinstance(rng, str):
                if n == 0 and sweep_pass == 0:
                    raise HangError(rng)
                continue  # an axis that cannot move keeps its value
            if axis.key == "ends":  # ends asked lower than the steepest leg allows hang higher
                low_hung = hung_at(setting(rng.low_m))
                rng = Range(
                    max(rng.low_m, min(low_hung.end_heights_m)),
                    rng.high_m,
                    rng.low_why,
                    rng.high_why,
                )
                rng = Range(min(rng.low_m, rng.high_m), rng.high_m, rng.low_why, rng.high_why)
            ranges[axis.key] = rng

            def evaluate(v: float, key: str = axis.key) -> HeightPoint | None:
                s = setting(v, key)
                try:
                    hung = hung_at(s)
                except HangError:
                    return None
                if "ends" in s:  # the ends as they hang (a steep leg's are higher than asked)
                    s = {**s, "ends": round(min(hung.end_heights_m), 3)}
                return point_from_solution(
                    solve(hung),
                    rope_heights_m=s,
                    feedpoint_height_m=hung.feedpoint_height_m,
                    swept_m=v,
                    axis=key,
                )

            got = search(rng, evaluate, wavelength_m=wavelength_m)
            if not got:
                if n == 0 and sweep_pass == 0:
                    raise HangError(rng.high_why or "cannot hang")
                continue
            last = n == len(layout.axes) - 1
            i, why = recommend(
                got,
                ground_name=ground_name,
                wavelength_m=wavelength_m,
                top_why=rng.high_why or axis.top_why,
                best_only=not last,
            )
            values[axis.key] = got[i].swept_m
            swept[axis.key] = (got, i)
            last_key = axis.key
            whys[axis.key] = why
            held = last and n > 0 and _held_by_other_axis(got, i, rng, values, wavelength_m)
        if not held:
            break
    points: list[HeightPoint] = []
    pick = 0
    for a in layout.axes:  # axis after axis, as the points were first swept
        if a.key in swept:
            got, i = swept[a.key]
            if a.key == last_key:
                pick = len(points) + i
            points.extend(got)
    why = "; ".join(whys[a.key] for a in layout.axes if a.key in whys)
    return LayoutSweep(tuple(points), layout.setting_for(values), pick, why, ranges)


def _held_by_other_axis(got, i: int, rng: Range, values: dict[str, float], wavelength_m) -> bool:
    """An inverted-V's ends chose the top of their range, and that top is the least drop below the
    apex: the apex is then swept again with the ends where they went, and the ends after it."""
    from fieldkit.rigging.vee import INVERTED_V_MIN_DROP_M  # vee builds on this module

    if "apex" not in values:
        return False
    at_top = got[i].swept_m >= rng.high_m - fine_step_m(wavelength_m) / 2
    best = max(range(len(got)), key=lambda k: got[k].nvis_dbi)
    under_apex = rng.high_m >= values["apex"] - INVERTED_V_MIN_DROP_M - BOUND_TOLERANCE_M
    return at_top and best == i and under_apex
