"""A layout: one way to hang the dipole on a site, as geometry — which supports, which rope heights may be
swept (its axes) and how it hangs at a setting of them. Candidates are made in
:mod:`fieldkit.rigging.layouts`."""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, field

import numpy as np

from fieldkit.rigging.heights import MIN_END_HEIGHT_M
from fieldkit.rigging.hung import HungDipole
from fieldkit.rigging.mast import Mast

HEIGHT_STEP_M = (
    1.5  # sweep step: finer than a throw-line operator can place a branch (common practice)
)
MAX_SETTINGS = 5  # coarse settings listed per layout (the sweep itself refines, height_search)


@dataclass(frozen=True)
class Mechanics:
    """Kit figures the hung shape needs (SI)."""

    wire_weight_n_per_m: float
    rope_weight_n_per_m: float
    balun_n: float
    coax_weight_n_per_m: float
    coax_length_m: float
    tension_n: float

    def feed_load_n(self, feed_height_m: float) -> float:
        """Balun plus the coax hanging from the feedpoint to the ground [N]."""
        return self.balun_n + self.coax_weight_n_per_m * min(
            max(feed_height_m, 0.0), self.coax_length_m
        )


@dataclass(frozen=True)
class Axis:
    """One rope height a layout may sweep.

    Attributes
    ----------
    key : "ropes" (both ropes of a flat pair), a support id (the higher rope of a sloping pair),
        "apex" or "ends" (inverted-V)
    low_m, high_m : the asked bounds [m]; the hang may allow less (height_search.feasible_range)
    start_m : its value while another axis is swept first [m]
    what : what the swept height is called in the advice ("the feedpoint", "the apex", "the ends")
    top_why : what ends the axis at ``high_m``, in plain words
    """

    key: str
    low_m: float
    high_m: float
    start_m: float
    what: str
    top_why: str | None = None


@dataclass(frozen=True)
class Layout:
    """A way to hang the dipole on this site.

    Attributes
    ----------
    form : "flat" | "sloping" | "inverted-v"
    supports_used : support ids (and the mast id for an inverted-V)
    settings : a few rope-height settings along the first axis, lowest first; keys are support ids
        (or "ends")
    build : (setting, leg length [m]) -> HungDipole; raises HangError when it cannot hang
    span_m : distance between the end supports (None for an inverted-V on stakes) [m]
    mast : the centre mast, or None
    mast_xy : where the mast stands [m]
    notes : plain-words notes for the option
    axes : the rope heights to sweep, in order
    setting_for : axis values -> setting (rope height per support id, "ends")
    blocked : why this layout cannot be rigged on this site (None when it can)
    min_end_height_m : the lowest the wire may come [m]
    hang : like ``build``, but lets the rope and the clearing be exceeded a little (the exact cut);
        None: the same as ``build``
    advice : the finished hang -> warnings about the site's limits it meets (None: none)
    kinds : the kind of each of ``supports_used`` (tree, mast, pole, ...; empty: not known)
    """

    form: str
    supports_used: tuple[str, ...]
    settings: tuple[dict[str, float], ...]
    build: Callable[[dict[str, float], float], HungDipole]
    span_m: float | None = None
    mast: Mast | None = None
    mast_xy: tuple[float, float] | None = None
    notes: tuple[str, ...] = field(default_factory=tuple)
    axes: tuple[Axis, ...] = ()
    setting_for: Callable[[Mapping[str, float]], dict[str, float]] | None = None
    blocked: str | None = None
    min_end_height_m: float = MIN_END_HEIGHT_M
    hang: Callable[[dict[str, float], float], HungDipole] | None = None
    advice: Callable[[HungDipole], tuple[str, ...]] | None = None
    kinds: tuple[str, ...] = ()

    def start(self) -> dict[str, float]:
        """Axis values before any sweep."""
        return {a.key: a.start_m for a in self.axes}


def height_grid(low: float, high: float) -> list[float]:
    """Rope heights from low to high [m], at most MAX_SETTINGS, about HEIGHT_STEP_M apart."""
    if high <= low + 1e-9:
        return [high]
    n = min(MAX_SETTINGS, max(2, int(round((high - low) / HEIGHT_STEP_M)) + 1))
    return [float(h) for h in np.linspace(low, high, n)]


def coarse_settings(axes: tuple[Axis, ...], setting_for) -> tuple[dict[str, float], ...]:
    first, values = axes[0], {a.key: a.start_m for a in axes}
    return tuple(
        setting_for({**values, first.key: h}) for h in height_grid(first.low_m, first.high_m)
    )
