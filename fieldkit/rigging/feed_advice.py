"""Advice on the feedline: a warning above 3 dB of line loss with a lower-loss coax class or the run
that would stay within it, and the choke at the feedpoint beside the cut list.

References
----------
.. [1] R. A. Chipman, *Schaum's Outline of Transmission Lines*, 1968: total loss of a mismatched line
   (:func:`fieldkit.rigging.feedline.total_loss_db`).
"""

from __future__ import annotations

from dataclasses import replace

from fieldkit.readable import given_both, whole_both
from fieldkit.rigging.feedline import COAX_CLASSES, Coax, parse_coax, total_loss_db
from fieldkit.rigging.roots import brent

#: Above 3 dB the line turns half the transmitter's power into heat (10·log 2 = 3.01 dB; the issue's
#: threshold, common practice for a field run).
LOSS_WARNING_DB = 3.0

#: Beside the cut list: where the choke goes and why it matters for the measurement (common practice,
#: no single source; the engine models no current on the outside of the coax).
CHOKE_ADVICE = (
    "Put a choke (a current balun rated for the power) at the feedpoint, where the coax meets the "
    "wire. Without it, current on the outside of the coax makes it part of the antenna: the SWR read "
    "for trimming shifts as the coax moves (and the trim goes wrong), and RF comes back along the "
    "coax to the operating position."
)


def _loss_db(coax: Coax, *, frequency_hz: float, swr: float) -> float:
    return total_loss_db(matched_loss_db=coax.matched_loss_db(frequency_hz), swr=swr)


def longest_run_m(coax: Coax, *, frequency_hz: float, swr: float, limit_db: float) -> float:
    """The run of this coax whose total loss at this SWR is ``limit_db`` [m]."""

    def excess(length_m: float) -> float:
        run = replace(coax, length_m=length_m)
        return _loss_db(run, frequency_hz=frequency_hz, swr=swr) - limit_db

    top = coax.length_m
    if excess(top) <= 0:
        return top
    return brent(excess, 1e-6, top, xtol=1e-3)


def feedline_words(coax: Coax, *, frequency_hz: float, swr: float) -> list[str]:
    """A warning when the run loses more than 3 dB (matched plus mismatch), naming a lower-loss coax
    class and the run of this coax that stays within 3 dB."""
    loss = _loss_db(coax, frequency_hz=frequency_hz, swr=swr)
    if loss <= LOSS_WARNING_DB:
        return []
    kept = 100 * 10 ** (-loss / 10)
    head = (
        f"the feedline loses {loss:.1f} dB at {frequency_hz / 1e6:g} MHz over {given_both(coax.length_m)} "
        f"of {coax.words} coax at SWR {swr:.1f}: only {kept:.0f} % of the power reaches "
        "the antenna"
    )
    better = []
    for name in COAX_CLASSES:
        other = parse_coax({"class": name, "length_m": coax.length_m})
        other_loss = _loss_db(other, frequency_hz=frequency_hz, swr=swr)
        if other_loss < loss - 0.05:
            better.append((other_loss, other.words))
    run = longest_run_m(coax, frequency_hz=frequency_hz, swr=swr, limit_db=LOSS_WARNING_DB)
    advice = [
        f"a run of at most {whole_both(run)} of this coax stays within {LOSS_WARNING_DB:g} dB"
    ]
    if better:
        best_loss, best = min(better)
        advice.insert(0, f"{best} coax would lose {best_loss:.1f} dB over the same run")
    return [f"{head}: {'; or '.join(advice)}"]
