"""Candidate layouts on a site: which supports, which form, which rope heights may be swept.

A layout is geometry only — it knows how to hang a dipole of a given leg length at a given setting of
rope heights. Electrical work (resonance, sweep) happens in :mod:`fieldkit.rigging.options`.
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from fieldkit.constants import STANDARD_GRAVITY_M_S2
from fieldkit.rigging.catenary import HangError
from fieldkit.rigging.heights import MIN_END_HEIGHT_M
from fieldkit.rigging.hung import HungDipole, hang_inverted_v, hang_span
from fieldkit.rigging.mast import Mast
from fieldkit.rigging.supports import Support, distance_m

HEIGHT_STEP_M = (
    1.5  # sweep step: finer than a throw-line operator can place a branch (common practice)
)
MAX_SETTINGS = 5  # heights per sweep: the figure of merit is smooth in height (checked in tests)
SLOPING_MIN_DIFFERENCE_M = 1.5  # below this a "sloping" hang is just a flat one
INVERTED_V_MIN_DROP_M = 2.0  # ends at least this far below the apex to make it a V
# Legs no steeper than 45° below horizontal (apex angle 90° or more): steeper legs cancel each other's
# radiation straight up (common practice). Short legs from a high apex end higher than asked.
INVERTED_V_MAX_LEG_SLOPE_DEG = 45.0


def _end_height(asked_m: float, apex_m: float, leg_m: float) -> float:
    """End height for an inverted-V: as asked, or higher when the legs would hang too steep [m]."""
    return max(asked_m, apex_m - leg_m * math.sin(math.radians(INVERTED_V_MAX_LEG_SLOPE_DEG)))


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
class Layout:
    """A way to hang the dipole on this site.

    Attributes
    ----------
    form : "flat" | "sloping" | "inverted-v"
    supports_used : support ids (and the mast id for an inverted-V)
    settings : the rope-height settings to sweep, lowest first; keys are support ids (or "ends")
    build : (setting, leg length [m]) -> HungDipole; raises HangError when it cannot hang
    span_m : distance between the end supports (None for an inverted-V on stakes) [m]
    mast : the centre mast, or None
    mast_xy : where the mast stands [m]
    """

    form: str
    supports_used: tuple[str, ...]
    settings: tuple[dict[str, float], ...]
    build: Callable[[dict[str, float], float], HungDipole]
    span_m: float | None = None
    mast: Mast | None = None
    mast_xy: tuple[float, float] | None = None
    notes: tuple[str, ...] = field(default_factory=tuple)


def height_grid(low: float, high: float) -> list[float]:
    """Rope heights from low to high [m], at most MAX_SETTINGS, about HEIGHT_STEP_M apart."""
    if high <= low + 1e-9:
        return [high]
    n = min(MAX_SETTINGS, max(2, int(round((high - low) / HEIGHT_STEP_M)) + 1))
    return [float(h) for h in np.linspace(low, high, n)]


def _span_builder(
    a: Support, b: Support, mech: Mechanics
) -> Callable[[dict[str, float], float], HungDipole]:
    def build(setting: dict[str, float], leg_m: float) -> HungDipole:
        ha, hb = setting[a.id], setting[b.id]
        feed_guess = min(ha, hb) - 1.0
        for _ in range(2):  # the hanging coax depends on the feedpoint height: one fixed-point pass
            hung = hang_span(
                a_xy=(a.x_m, a.y_m),
                a_height_m=ha,
                b_xy=(b.x_m, b.y_m),
                b_height_m=hb,
                leg_m=leg_m,
                wire_weight_n_per_m=mech.wire_weight_n_per_m,
                rope_weight_n_per_m=mech.rope_weight_n_per_m,
                feed_load_n=mech.feed_load_n(feed_guess),
                tension_n=mech.tension_n,
            )
            feed_guess = hung.feedpoint_height_m
        if (
            min(hung.end_heights_m) < MIN_END_HEIGHT_M - 1e-6
            or hung.feedpoint_height_m < MIN_END_HEIGHT_M
        ):
            raise HangError(
                f"the wire would come down to {min(hung.end_heights_m + (hung.feedpoint_height_m,)):.1f} m, "
                f"below the {MIN_END_HEIGHT_M:g} m minimum"
            )
        return hung

    return build


def span_layouts(supports: list[Support], mech: Mechanics, *, forms: set[str]) -> list[Layout]:
    """Flat and sloping layouts for every pair of safe supports."""
    safe = [s for s in supports if not s.unsafe]
    out = []
    for a, b in itertools.combinations(safe, 2):
        build = _span_builder(a, b, mech)
        span = distance_m(a, b)
        low_cap = min(a.height_m, b.height_m)
        if "flat" in forms and low_cap >= MIN_END_HEIGHT_M:
            grid = (
                height_grid(MIN_END_HEIGHT_M + 1.0, low_cap)
                if low_cap > MIN_END_HEIGHT_M + 1
                else [low_cap]
            )
            out.append(
                Layout(
                    form="flat",
                    supports_used=(a.id, b.id),
                    settings=tuple({a.id: h, b.id: h} for h in grid),
                    build=build,
                    span_m=span,
                )
            )
        if "sloping" in forms and abs(a.height_m - b.height_m) >= SLOPING_MIN_DIFFERENCE_M:
            hi, lo = (a, b) if a.height_m > b.height_m else (b, a)
            if lo.height_m >= MIN_END_HEIGHT_M:
                grid = height_grid(
                    max(MIN_END_HEIGHT_M + 1.0, lo.height_m - 3 * HEIGHT_STEP_M), lo.height_m
                )
                out.append(
                    Layout(
                        form="sloping",
                        supports_used=(a.id, b.id),
                        settings=tuple({hi.id: hi.height_m, lo.id: h} for h in grid),
                        build=build,
                        span_m=span,
                    )
                )
    return out


def mast_tension_n(
    mast: Mast, *, apex_m: float, end_m: float, leg_m: float, mech: Mechanics
) -> tuple[float, HungDipole]:
    """The largest pull (up to the kit's) at which the mast carries the inverted-V, and the hang.

    Raises
    ------
    HangError
        When even the lightest pull that holds the legs overloads the mast.
    """
    rating_n = mast.top_load_kg * STANDARD_GRAVITY_M_S2
    load = mech.feed_load_n(apex_m)

    def hang(t: float) -> HungDipole:
        return hang_inverted_v(
            centre_xy=(0.0, 0.0),
            axis_xy=(1.0, 0.0),
            apex_height_m=apex_m,
            end_height_m=end_m,
            leg_m=leg_m,
            wire_weight_n_per_m=mech.wire_weight_n_per_m,
            feed_load_n=load,
            tension_n=t,
        )

    t_hi = mech.tension_n
    hung = hang(t_hi)
    if hung.top_load_n <= rating_n:
        return t_hi, hung
    # lightest workable pull: halve until the legs can no longer be held at this drop
    t_lo = t_hi
    lightest = None
    for _ in range(12):
        t_try = t_lo / 2
        try:
            h_try = hang(t_try)
        except HangError:
            break
        t_lo, lightest = t_try, h_try
        if h_try.top_load_n <= rating_n:
            break
    if lightest is None or lightest.top_load_n > rating_n:
        least = (lightest or hung).top_load_n / STANDARD_GRAVITY_M_S2
        raise HangError(
            f"{mast.id} is too weak: even at the lightest pull that holds the legs the top load is "
            f"{least:.2f} kg against its {mast.top_load_kg:g} kg rating"
        )
    for _ in range(30):  # bisect between a pull that fits (t_lo) and one that overloads (t_hi)
        mid = 0.5 * (t_lo + t_hi)
        h_mid = hang(mid)
        if h_mid.top_load_n <= rating_n:
            t_lo, lightest = mid, h_mid
        else:
            t_hi = mid
    return t_lo, lightest


def inverted_v_layouts(
    supports: list[Support], masts: list[Mast], mech: Mechanics, *, site_xy: tuple[float, float]
) -> list[Layout]:
    """An inverted-V on each kit mast, ends on stake ropes, legs along the longest open line of the site."""
    safe = [s for s in supports if not s.unsafe]
    axis = (1.0, 0.0)
    if len(safe) >= 2:
        a, b = max(itertools.combinations(safe, 2), key=lambda p: distance_m(*p))
        d = distance_m(a, b)
        axis = ((b.x_m - a.x_m) / d, (b.y_m - a.y_m) / d)
    out = []
    for mast in masts:
        apex = mast.height_m
        top = apex - INVERTED_V_MIN_DROP_M
        if top < MIN_END_HEIGHT_M:
            continue
        grid = height_grid(MIN_END_HEIGHT_M, min(top, MIN_END_HEIGHT_M + 3 * HEIGHT_STEP_M))

        def build(
            setting: dict[str, float], leg_m: float, mast: Mast = mast, apex: float = apex
        ) -> HungDipole:
            end = _end_height(setting["ends"], apex, leg_m)
            tension, local = mast_tension_n(mast, apex_m=apex, end_m=end, leg_m=leg_m, mech=mech)
            hung = hang_inverted_v(
                centre_xy=site_xy,
                axis_xy=axis,
                apex_height_m=apex,
                end_height_m=end,
                leg_m=leg_m,
                wire_weight_n_per_m=mech.wire_weight_n_per_m,
                feed_load_n=mech.feed_load_n(apex),
                tension_n=tension,
            )
            return hung

        out.append(
            Layout(
                form="inverted-v",
                supports_used=(mast.id,),
                settings=tuple({mast.id: apex, "ends": h} for h in grid),
                build=build,
                mast=mast,
                mast_xy=site_xy,
                notes=(
                    f"stand {mast.id} at ({site_xy[0]:.0f}, {site_xy[1]:.0f}) m with the legs toward "
                    f"{_bearing_word(axis)}; tie each end to a stake with rope",
                ),
            )
        )
    out.extend(_branch_apex_layouts(safe, mech, axis))
    return out


def _branch_apex_layouts(
    safe: list[Support], mech: Mechanics, axis: tuple[float, float]
) -> list[Layout]:
    """An inverted-V with its apex on the highest safe branch (a tree as the centre support)."""
    trees = [s for s in safe if s.kind == "tree"]
    if not trees:
        return []
    tree = max(trees, key=lambda s: s.height_m)
    apex = tree.height_m
    top = apex - INVERTED_V_MIN_DROP_M
    if top < MIN_END_HEIGHT_M:
        return []
    grid = height_grid(MIN_END_HEIGHT_M, min(top, MIN_END_HEIGHT_M + 3 * HEIGHT_STEP_M))

    def build(setting: dict[str, float], leg_m: float) -> HungDipole:
        return hang_inverted_v(
            centre_xy=(tree.x_m, tree.y_m),
            axis_xy=axis,
            apex_height_m=apex,
            end_height_m=_end_height(setting["ends"], apex, leg_m),
            leg_m=leg_m,
            wire_weight_n_per_m=mech.wire_weight_n_per_m,
            feed_load_n=mech.feed_load_n(apex),
            tension_n=mech.tension_n,
        )

    return [
        Layout(
            form="inverted-v",
            supports_used=(tree.id,),
            settings=tuple({tree.id: apex, "ends": h} for h in grid),
            build=build,
            notes=(
                f"apex on the {tree.id} branch at {apex:g} m, legs toward {_bearing_word(axis)}; the "
                "branch carries the feedpoint and both legs' pull: choose a sound branch",
            ),
        )
    ]


def _bearing_word(axis: tuple[float, float]) -> str:
    """Compass line of an axis (both directions), e.g. 'east–west'."""
    ang = math.degrees(math.atan2(axis[0], axis[1])) % 180  # from north, clockwise
    names = ["north–south", "north-east–south-west", "east–west", "south-east–north-west"]
    return names[int(((ang + 22.5) % 180) // 45)]
