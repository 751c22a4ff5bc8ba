"""Ranking the channels of a channel day: best channel per hour and for a schedule window.

Scores are in kilometres of the NVIS zone (0–300 km, common practice) that a channel covers at an
hour, or, when the operator lists the distances to reach, the number of those distances covered.
"""

from __future__ import annotations

import numpy as np

from fieldkit.sky.inputs import Schedule
from fieldkit.sky.reach import ABOVE_NVIS, ABSORBED, HourReach
from fieldkit.sky.reach import NVIS_ZONE_KM as _ZONE_END_KM

NVIS_ZONE_KM = (0.0, _ZONE_END_KM)


def clock_text(hours: float | None) -> str | None:
    """Hours after midnight as HH:MM (wrapped into 0..24); None stays None."""
    if hours is None:
        return None
    minutes = int(round(hours * 60.0)) % 1440
    return f"{minutes // 60:02d}:{minutes % 60:02d}"


def hour_score(reach: HourReach, distances_km: tuple[float, ...] | None) -> float:
    """How well one channel serves at one hour: km of the NVIS zone covered, or distances covered."""
    if reach.covers_km is None:
        return 0.0
    start, end = reach.covers_km
    if distances_km:
        return float(sum(start <= d <= end for d in distances_km))
    return max(0.0, min(end, NVIS_ZONE_KM[1]) - max(start, NVIS_ZONE_KM[0]))


def _best(candidates: list[tuple[float, HourReach]], distances_km) -> int | None:
    """Best channel at one hour: highest score, then below the FOT, then SNR over the zone, then reach."""
    best, key = None, None
    for i, (_, r) in enumerate(candidates):
        score = hour_score(r, distances_km)
        if score <= 0.0:
            continue
        snr = r.nvis_snr_db if r.nvis_snr_db is not None else -999.0
        k = (score, r.below_fot, snr, r.max_range_km)
        if key is None or k > key:
            best, key = i, k
    return best


def best_by_hour(channels: list[tuple[float, list[HourReach]]], distances_km=None) -> list[dict]:
    """Best channel at each hour, with the reason in plain words."""
    n_hours = len(channels[0][1])
    out = []
    for k in range(n_hours):
        hour_rows = [(f, rows[k]) for f, rows in channels]
        i = _best(hour_rows, distances_km)
        hour = hour_rows[0][1].hour_utc
        if i is None:
            out.append({"hour_utc": hour, "frequency_mhz": None, "verdict": _none_works(hour_rows)})
        else:
            f, r = hour_rows[i]
            out.append({"hour_utc": hour, "frequency_mhz": f, "verdict": r.verdict})
    return out


def _none_works(hour_rows) -> str:
    verdicts = [r.verdict for _, r in hour_rows]
    if all(v.startswith(ABOVE_NVIS) for v in verdicts):
        return f"no channel works: all are {ABOVE_NVIS}; a lower channel is needed"
    if all(v.startswith(ABSORBED) for v in verdicts):
        return f"no channel works: all are {ABSORBED}; a higher channel is needed"
    return "no channel covers the NVIS zone at this hour"


def schedule_hours(schedule: Schedule, hours_utc) -> list[int]:
    """Indices of the hour samples inside the window (both ends included; wraps past midnight)."""
    hours = np.asarray(hours_utc, dtype=float)
    if schedule.start_utc_h <= schedule.end_utc_h:
        inside = (hours >= schedule.start_utc_h) & (hours <= schedule.end_utc_h)
    else:
        inside = (hours >= schedule.start_utc_h) | (hours <= schedule.end_utc_h)
    return [int(i) for i in np.flatnonzero(inside)]


def table_row(schedule: Schedule, f: float, rows: list[HourReach], idx: list[int]) -> dict:
    """One channel's row of the schedule table: hours it works and covers the zone in the window,
    below the FOT, its score and mean NVIS SNR, and its weakest hour's verdict."""
    scores = [hour_score(rows[i], schedule.distances_km) for i in idx]
    snrs = [rows[i].nvis_snr_db for i in idx if rows[i].nvis_snr_db is not None]
    full = sum(
        s >= (len(schedule.distances_km) if schedule.distances_km else NVIS_ZONE_KM[1])
        for s in scores
    )
    return {
        "frequency_mhz": f,
        "hours_in_window": len(idx),
        "hours_working": sum(s > 0 for s in scores),
        "hours_full": full,
        "hours_below_fot": sum(rows[i].below_fot for i in idx),
        "score": round(sum(scores), 1),
        "mean_nvis_snr_db": round(sum(snrs) / len(snrs), 1) if snrs else None,
        "worst_verdict": min(((s, rows[i].verdict) for s, i in zip(scores, idx, strict=True)))[1],
    }


def row_key(row: dict) -> tuple:
    """Sort key of a table row, best last: hours covering the zone, score, hours below the FOT, SNR."""
    snr = row["mean_nvis_snr_db"] if row["mean_nvis_snr_db"] is not None else -999.0
    return (row["hours_full"], row["score"], row["hours_below_fot"], snr)


def recommend(schedule: Schedule, channels: list[tuple[float, list[HourReach]]], hours_utc) -> dict:
    """The one channel to use for a schedule window, and how it does at each hour of it."""
    idx = schedule_hours(schedule, hours_utc)
    window = {"start_utc": schedule.start_text, "end_utc": schedule.end_text}
    if schedule.distances_km:
        window["distances_km"] = list(schedule.distances_km)
    if not idx:
        return {**window, "recommended_mhz": None, "why": "the window contains no whole hour"}
    table = [table_row(schedule, f, rows, idx) for f, rows in channels]
    ranked = sorted(table, key=row_key, reverse=True)
    for rank, row in enumerate(ranked):
        row["rank"] = rank  # 0 = recommended; the table itself stays in channel order
    top = ranked[0]
    target = (
        f"all of {', '.join(f'{d:g}' for d in schedule.distances_km)} km"
        if schedule.distances_km
        else "0–300 km"
    )
    if top["hours_working"] == 0:
        return {
            **window,
            "recommended_mhz": None,
            "why": "no channel works in this window",
            "channels": table,
        }
    why = (
        f"{top['frequency_mhz']:g} MHz covers {target} at {top['hours_full']} of "
        f"{top['hours_in_window']} hours in the window and works at {top['hours_working']}"
    )
    if top["hours_below_fot"] < top["hours_working"]:
        why += f"; below the FOT (reliable most days) at {top['hours_below_fot']}"
    if top["hours_full"] < top["hours_in_window"]:
        why += f"; weakest hour: {top['worst_verdict']}"
    return {**window, "recommended_mhz": top["frequency_mhz"], "why": why, "channels": table}
