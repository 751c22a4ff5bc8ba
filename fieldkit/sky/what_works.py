"""What would work when the kit's channels do not: the frequencies that cover the NVIS zone at the hours
no channel works, and the highest NVIS frequency of the day.

From the sky layer's own figures: a frequency covers the zone from 0 km only at or below foF2 (the MUF
at zero range, secant law at vertical incidence), and reliably — most days of the month — at or below
the FOT, 0.85 × foF2; at the low end absorption and noise take the signal-to-noise below what the mode
needs. Each frequency of a 50 kHz grid over the HF range is traced through the same reach model as the
channels (:mod:`fieldkit.sky.reach`), with the antenna gain of the nearest channel (a dipole re-cut for
a nearby frequency and hung the same way keeps about its pattern: that is the approximation here).

References
----------
.. [1] Secant law and Martyn's theorem: MUF(D) = foF2 sec φ, so MUF(0) = foF2 (K. Davies, *Ionospheric
   Radio*, IEE 1990, ch. 6).
.. [2] FOT = 0.85 × monthly-median MUF (Federal Standard 1037C).
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import asdict, dataclass

import numpy as np

from fieldkit.sky.gain import ElevationGain
from fieldkit.sky.inputs import MAX_CHANNEL_MHZ, MIN_CHANNEL_MHZ, Schedule
from fieldkit.sky.path_geometry import fot_mhz
from fieldkit.sky.ranking import NVIS_ZONE_KM, clock_text, hour_score, schedule_hours
from fieldkit.sky.reach import HourReach

FREQUENCY_STEP_MHZ = 0.05  # the grid of trial frequencies: finer than a channel plan needs
# Without a sky estimate: NVIS is worked on about 2–10 MHz; foF2 rarely exceeds 10 MHz outside solar
# maximum (common practice, no single source)
COMMON_NVIS_TOP_MHZ = 10.0


@dataclass(frozen=True)
class WorkingBand:
    """What covers the NVIS zone at one hour.

    Attributes
    ----------
    hour_utc : the hour
    fof2_mhz : the sky estimate's foF2 then [MHz]
    fot_mhz : 0.85 × foF2: reliable most days up to here [MHz]
    low_mhz, high_mhz : lowest and highest trial frequency that covers the whole zone (0–300 km, or
        the schedule's distances) [MHz]; None when none does
    """

    hour_utc: int
    fof2_mhz: float
    fot_mhz: float
    low_mhz: float | None
    high_mhz: float | None


def idle_hours(
    schedule: Schedule, channels: Sequence[tuple[float, list[HourReach]]], hours_utc
) -> list[int]:
    """Indices of the schedule's hours at which no channel reaches any of the NVIS zone, in the
    window's order (from its start, past midnight)."""
    hours = np.asarray(hours_utc, dtype=float)
    idle = [
        i
        for i in schedule_hours(schedule, hours)
        if all(hour_score(rows[i], schedule.distances_km) <= 0.0 for _, rows in channels)
    ]
    return sorted(idle, key=lambda i: (hours[i] - schedule.start_utc_h) % 24.0)


def _full(row: HourReach, distances_km) -> bool:
    want = len(distances_km) if distances_km else NVIS_ZONE_KM[1] - 1e-6
    return hour_score(row, distances_km) >= want


def working_bands(
    ctx, hour_indices: Sequence[int], gain_for: Callable[[float], ElevationGain], distances_km=None
) -> list[WorkingBand]:
    """The frequencies that would cover the zone at each of the given hours.

    Parameters
    ----------
    ctx : fieldkit.sky.day.SkyContext
    hour_indices : which hours of the day
    gain_for : frequency [MHz] -> the antenna gain to use there
    distances_km : the schedule's distances, or None for the whole 0–300 km zone
    """
    idx = list(hour_indices)
    if not idx:
        return []
    fof2 = np.asarray(ctx.sky.fof2_mhz, dtype=float)[idx]
    top = min(MAX_CHANNEL_MHZ, float(fof2.max()) + FREQUENCY_STEP_MHZ)
    grid = np.arange(MIN_CHANNEL_MHZ, top + 1e-9, FREQUENCY_STEP_MHZ)
    ok = np.zeros((len(idx), len(grid)), dtype=bool)
    for j, f in enumerate(grid):
        rows = ctx.reach(float(f), gain_for(float(f)), hours=idx)
        ok[:, j] = [_full(r, distances_km) for r in rows]
    out = []
    for k, i in enumerate(idx):
        good = grid[ok[k]]
        out.append(
            WorkingBand(
                hour_utc=int(ctx.sky.hours_utc[i]),
                fof2_mhz=round(float(fof2[k]), 2),
                fot_mhz=round(float(fot_mhz(muf_mhz=fof2[k])), 2),
                low_mhz=round(float(good.min()), 2) if good.size else None,
                high_mhz=round(float(good.max()), 2) if good.size else None,
            )
        )
    return out


def hours_text(hours: Sequence[int]) -> str:
    """Hour samples as UTC spans: [21, 22, 23, 0, 1, 2] -> "21:00–02:00 UTC"."""
    hs = sorted(set(int(h) % 24 for h in hours))
    if not hs:
        return ""
    spans, start, prev = [], hs[0], hs[0]
    for h in hs[1:]:
        if h != prev + 1:
            spans.append((start, prev))
            start = h
        prev = h
    spans.append((start, prev))
    if len(spans) > 1 and spans[0][0] == 0 and spans[-1][1] == 23:  # wraps past midnight
        spans = [(spans[-1][0], spans[0][1]), *spans[1:-1]]
    parts = [clock_text(a) if a == b else f"{clock_text(a)}–{clock_text(b)}" for a, b in spans]
    return ", ".join(parts) + " UTC"


def summary(bands: Sequence[WorkingBand], distances_km=None) -> dict:
    """The range that works at every idle hour, with the words for the plan's warnings."""
    hours = [b.hour_utc for b in bands]
    lows = [b.low_mhz for b in bands if b.low_mhz is not None]
    highs = [b.high_mhz for b in bands if b.high_mhz is not None]
    fof2 = [b.fof2_mhz for b in bands]
    zone = f"all of {', '.join(f'{d:g}' for d in distances_km)} km" if distances_km else "0–300 km"
    out = {
        "hours_utc": hours,
        "fof2_mhz": [min(fof2), max(fof2)],
        "fot_mhz": min(b.fot_mhz for b in bands),
        "low_mhz": None,
        "high_mhz": None,
        "by_hour": [asdict(b) for b in bands],
    }
    when = hours_text(hours)
    n = len(hours)
    head = (
        f"no channel of the kit works at {when} ({n} hour{'s' if n != 1 else ''} of the schedule)"
    )
    sky = f"foF2 {min(fof2):.1f}–{max(fof2):.1f} MHz by the sky estimate"
    if len(lows) == len(bands) and max(lows) <= min(highs):
        lo, hi = max(lows), min(highs)
        out["low_mhz"], out["high_mhz"] = lo, hi
        reliable = min(out["fot_mhz"], hi)
        text = f"{head}: about {lo:.1f}–{hi:.1f} MHz would cover {zone} then ({sky}"
        if reliable >= lo:
            text += f"; up to {reliable:.1f} MHz on most days, the FOT"
        else:
            text += (
                f"; all of it above the FOT, {out['fot_mhz']:.1f} MHz: on some days the layer will "
                "not return it"
            )
        out["words"] = text + ")"
    elif lows:
        each = "; ".join(
            f"{clock_text(b.hour_utc)} {b.low_mhz:.1f}–{b.high_mhz:.1f} MHz"
            for b in bands
            if b.low_mhz is not None
        )
        out["words"] = (
            f"{head}: no one frequency covers {zone} at all of them; by hour: {each} ({sky})"
        )
    else:
        out["words"] = (
            f"{head}: no frequency from {MIN_CHANNEL_MHZ:g} MHz up covers {zone} then with this "
            f"radio and antenna ({sky}): plan for other hours or more power"
        )
    return out


def nvis_ceiling(ctx) -> tuple[float, int]:
    """The highest frequency that reaches the zone from 0 km at any hour of the day — the day's
    largest foF2 [MHz] — and its hour (MUF at zero range = foF2 [1]_)."""
    fof2 = np.asarray(ctx.sky.fof2_mhz, dtype=float)
    i = int(np.argmax(fof2))
    return float(fof2[i]), int(ctx.sky.hours_utc[i])


def above_nvis_words(frequency_mhz: float, ceiling: tuple[float, int] | None) -> str | None:
    """A warning when a channel lies above the NVIS range: above the day's largest foF2 (with a sky
    estimate), or above the frequencies NVIS normally uses (without one); None otherwise."""
    f = frequency_mhz
    if ceiling is not None:
        top, hour = ceiling
        if f <= top:
            return None
        return (
            f"{f:g} MHz is above the NVIS range of this day: the highest frequency that comes back "
            f"from straight overhead is about {top:.1f} MHz (foF2 at {clock_text(hour)} UTC, sky "
            "estimate); on this channel the wave goes through the ionosphere overhead and returns only "
            f"beyond a skip zone, if at all — choose a channel below {top:.1f} MHz for 0–300 km"
        )
    if f <= COMMON_NVIS_TOP_MHZ:
        return None
    return (
        f"{f:g} MHz is above the frequencies NVIS normally uses (about 2–{COMMON_NVIS_TOP_MHZ:g} MHz, "
        "common practice): it rarely comes back from straight overhead; give a sky block (the site's "
        "position and the date) for the highest NVIS frequency of the day"
    )
