"""The re-trim from a measurement where it was taken: a dip, an R + jX reading or a whole sweep,
at the feedpoint or at the radio end of the coax (moved to the feedpoint by :mod:`line`).

A sweep gives the resonance (where X crosses zero, linearly between the points either side), the
lowest SWR on 50 Ω, the model's correction factor (measured over model resonance for the leg as it
is) and the re-trim per leg (:func:`fieldkit.rigging.cut.retrim`). With R known at resonance, the
ground class that fits best (:mod:`ground_fit`).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from fieldkit.readable import given_both
from fieldkit.rigging.analyser import Sweep
from fieldkit.rigging.cut import REFERENCE_IMPEDANCE_OHM, retrim
from fieldkit.rigging.feedline import Coax

NEAR_RESONANCE = 0.2  # |X| ≤ 0.2 R: R within ~1 % of its value at X = 0 (a dipole's R moves slowly)
CURVE_POINTS = 401  # the measured curve as drawn: a phone screen is narrower than 401 px


@dataclass(frozen=True)
class Reading:
    """A measurement after raising, as given (SI).

    Attributes
    ----------
    at : "feedpoint" or "radio" (the radio end of the kit's coax)
    dip_hz : the SWR dip [Hz], or None
    at_hz, r_ohm, x_ohm : an analyser reading R + jX at a frequency [Hz, Ω], or None
    sweep : an analyser file's sweep, or None
    """

    at: str = "feedpoint"
    dip_hz: float | None = None
    at_hz: float | None = None
    r_ohm: float | None = None
    x_ohm: float | None = None
    sweep: Sweep | None = None


@dataclass(frozen=True)
class SweepFindings:
    """What a sweep says at the feedpoint: resonance [Hz] (None without a X = 0 crossing), R there
    [Ω], lowest SWR and its frequency [Hz], and the curve (f [Hz], SWR, Z [Ω] or None)."""

    resonance_hz: float | None
    r_at_resonance_ohm: float | None
    lowest_swr_hz: float
    lowest_swr: float
    frequencies_hz: np.ndarray
    swr: np.ndarray
    z_ohm: np.ndarray | None


def swr_of(z_ohm: np.ndarray) -> np.ndarray:
    """SWR on 50 Ω of impedances [-]."""
    g = np.abs((z_ohm - REFERENCE_IMPEDANCE_OHM) / (z_ohm + REFERENCE_IMPEDANCE_OHM))
    return (1 + g) / np.maximum(1 - g, 1e-12)


def _lowest(f: np.ndarray, swr: np.ndarray) -> tuple[float, float]:
    """The lowest SWR, its frequency refined by the parabola through the point and its neighbours."""
    i = int(np.argmin(swr))
    if 0 < i < len(f) - 1:
        a, b, c = swr[i - 1 : i + 2]
        den = a - 2 * b + c
        if den > 0:
            t = 0.5 * (a - c) / den  # vertex offset in steps, |t| ≤ 0.5
            step = (f[i + 1] - f[i - 1]) / 2
            return float(f[i] + t * step), float(b - 0.25 * (a - c) * t)
    return float(f[i]), float(swr[i])


def _resonance(f: np.ndarray, z: np.ndarray, target_hz: float) -> tuple[float, float] | None:
    """Where X crosses zero nearest the target, and R there (linear between the points)."""
    x = z.imag
    k = np.nonzero(np.sign(x[:-1]) != np.sign(x[1:]))[0]
    if not len(k):
        return None
    t = -x[k] / (x[k + 1] - x[k])
    fr = f[k] + t * (f[k + 1] - f[k])
    j = int(np.argmin(np.abs(fr - target_hz)))
    r = z.real[k[j]] + t[j] * (z.real[k[j] + 1] - z.real[k[j]])
    return float(fr[j]), float(r)


def sweep_findings(sweep: Sweep, *, at: str, coax: Coax, target_hz: float) -> SweepFindings:
    """The sweep moved to the feedpoint (when taken at the radio) and what it says there."""
    from fieldkit.rigging.line import feedpoint_impedance, feedpoint_swr

    f = sweep.frequencies_hz
    z = sweep.z_ohm
    if z is not None:
        if at == "radio":
            z = feedpoint_impedance(z, frequencies_hz=f, coax=coax)
            _passive(z, f, coax, "retrim.sweep.text")
        swr = swr_of(z)
    else:
        swr = (
            sweep.swr
            if at == "feedpoint"
            else feedpoint_swr(sweep.swr, frequencies_hz=f, coax=coax)
        )
    low_f, low = _lowest(f, swr)
    res = _resonance(f, z, target_hz) if z is not None else None
    return SweepFindings(res[0] if res else None, res[1] if res else None, low_f, low, f, swr, z)


def _curve(found: SweepFindings) -> list[dict[str, float]]:
    n = len(found.frequencies_hz)
    idx = np.unique(np.linspace(0, n - 1, min(n, CURVE_POINTS)).round().astype(int))
    rows = []
    for i in idx:
        row = {
            "frequency_mhz": round(float(found.frequencies_hz[i]) / 1e6, 6),
            "swr": round(float(min(found.swr[i], 99.0)), 3),
        }
        if found.z_ohm is not None:
            row["r_ohm"] = round(float(found.z_ohm[i].real), 2)
            row["x_ohm"] = round(float(found.z_ohm[i].imag), 2)
        rows.append(row)
    return rows


def _sweep_words(found: SweepFindings, *, at: str, sweep: Sweep) -> str:
    if found.resonance_hz is not None:
        said = "the resonance is where the sweep's X crosses zero"
    elif sweep.z_ohm is not None:
        said = (
            "X does not cross zero inside the sweep: the resonance is estimated from the point "
            "nearest X = 0 with the model's dX/df; sweep wider to see it"
        )
    else:
        said = "an SWR-only file: the re-trim follows the lowest SWR"
    if at == "radio" and sweep.z_ohm is not None:
        said += "; R and X were moved from the radio end to the feedpoint through the coax"
    elif at == "radio":
        said += (
            "; the SWR was taken back through the coax's loss (the lowest SWR's frequency does "
            "not move along a 50 Ω line)"
        )
    return said


def _dip_from_sweep(res, found: SweepFindings) -> float:
    if found.resonance_hz is not None:
        return found.resonance_hz
    if found.z_ohm is not None:
        i = int(np.argmin(np.abs(found.z_ohm.imag)))
        return float(found.frequencies_hz[i] - found.z_ohm[i].imag / res.dx_df_ohm_per_hz)
    return found.lowest_swr_hz


def sweep_json(found: SweepFindings, *, at: str, sweep: Sweep) -> dict[str, Any]:
    """The re-trim's ``sweep`` block: findings at the feedpoint and the curve to draw."""
    return {
        "source": sweep.source,
        "points": len(sweep.frequencies_hz),
        "resonance_mhz": None if found.resonance_hz is None else round(found.resonance_hz / 1e6, 5),
        "r_at_resonance_ohm": None
        if found.r_at_resonance_ohm is None
        else round(found.r_at_resonance_ohm, 1),
        "lowest_swr_mhz": round(found.lowest_swr_hz / 1e6, 5),
        "lowest_swr": round(found.lowest_swr, 2),
        "curve": _curve(found),
        "note": _sweep_words(found, at=at, sweep=sweep),
    }


def _passive(z_feed: np.ndarray, f: np.ndarray, coax: Coax, field: str) -> None:
    """Refuse a radio-end reading the coax cannot have carried: R < 0 once moved to the feedpoint."""
    from fieldkit.errors import InputError

    bad = z_feed.real < -0.5  # half an ohm: the rounding of an analyser's R near a short
    if np.any(bad):
        i = int(np.argmax(bad))
        raise InputError(
            field,
            f"at {f[i] / 1e6:g} MHz this reading cannot have come through "
            f"{given_both(coax.length_m)} of {coax.words} coax with {coax.matched_loss_db(f[i]):.2f} dB of loss: at the feedpoint it "
            "would have R < 0. Check kit.coax (class, length, velocity factor), or whether it "
            "was taken at the feedpoint",
        )


def _reading_at_feedpoint(reading: Reading, coax: Coax) -> tuple[complex, dict[str, Any]]:
    """A single R + jX reading at the feedpoint, with what was done to it."""
    from fieldkit.errors import InputError
    from fieldkit.rigging.line import feedpoint_impedance, line_words

    if reading.r_ohm is None and reading.at == "radio":
        raise InputError(
            "retrim.r_ohm",
            "required with at: radio: R is needed with X to move the reading through the coax",
        )
    z = complex(reading.r_ohm or 0.0, reading.x_ohm)
    if reading.at == "feedpoint":
        return z, {}
    (zf,) = feedpoint_impedance([z], frequencies_hz=[reading.at_hz], coax=coax)
    _passive(np.array([zf]), np.array([reading.at_hz]), coax, "retrim.r_ohm")
    return complex(zf), {
        "feedpoint_r_ohm": round(zf.real, 2),
        "feedpoint_x_ohm": round(zf.imag, 2),
        "line": line_words(coax, frequency_hz=reading.at_hz),
    }


def measured_retrim(
    res,
    *,
    target_hz: float,
    leg_now_m: float | None,
    reading: Reading,
    coax: Coax,
    engine,
    wire,
    site_ground: str,
) -> dict[str, Any]:
    """The option's ``retrim`` block from a measurement where it was taken.

    Parameters
    ----------
    res : the option's resonance (:class:`fieldkit.rigging.cut.Resonance`)
    target_hz : the channel to re-trim for [Hz]
    leg_now_m : the leg as it hangs now [m], None for the cut list's
    reading : the measurement
    coax : the kit's coax (for a reading at the radio end)
    site_ground : the site's ground in words, for the ground fit's offer
    """
    from fieldkit.rigging.line import DIP_WORDS

    extra: dict[str, Any] = {"measured_at": reading.at}
    r_res = None
    if reading.sweep is not None:
        found = sweep_findings(reading.sweep, at=reading.at, coax=coax, target_hz=target_hz)
        dip = _dip_from_sweep(res, found)
        out = retrim(res, target_hz=target_hz, leg_now_m=leg_now_m, dip_hz=dip)
        extra["sweep"] = sweep_json(found, at=reading.at, sweep=reading.sweep)
        r_res = found.r_at_resonance_ohm
    elif reading.dip_hz is not None:
        out = retrim(res, target_hz=target_hz, leg_now_m=leg_now_m, dip_hz=reading.dip_hz)
        extra["dip_note"] = DIP_WORDS
    else:
        z, moved = _reading_at_feedpoint(reading, coax)
        out = retrim(
            res,
            target_hz=target_hz,
            leg_now_m=leg_now_m,
            measured_at_hz=reading.at_hz,
            measured_r_ohm=reading.r_ohm,
            measured_x_ohm=z.imag,
        )
        extra.update(moved)
        near = reading.r_ohm is not None and abs(z.imag) <= NEAR_RESONANCE * z.real
        r_res = z.real if near else None
        if not near:
            extra["ground_fit_note"] = (
                "no ground fit: that needs R at resonance (X within ±20 % of R at the feedpoint, "
                "read at the dip) or an analyser sweep"
            )
    if r_res is not None and r_res > 0:
        extra["ground_fit"] = _ground_fit(res, out, r_res, engine, wire, site_ground)
    return {**out, **extra}


def _ground_fit(res, out, r_res: float, engine, wire, site_ground: str) -> dict[str, Any]:
    from fieldkit.rigging.ground_fit import fit_ground, ground_fit_json

    dip = out["measured_dip_mhz"] * 1e6
    fits = fit_ground(
        res, engine=engine, wire=wire, resonance_hz=dip, r_ohm=r_res, leg_now_m=out["leg_now_m"]
    )
    return ground_fit_json(fits, resonance_hz=dip, r_ohm=r_res, site_ground=site_ground)
