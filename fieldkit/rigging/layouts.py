"""Candidate layouts on a site: which supports, which form, which rope heights may be swept.

A layout is geometry only — it knows how to hang a dipole of a given leg length at a given setting of
rope heights, and which rope heights may be swept (its axes). Electrical work (resonance, sweep) happens
in :mod:`fieldkit.rigging.options`; the sweep itself in :mod:`fieldkit.rigging.height_search`.

Forms and their axes (each from the minimum end height to the supports' limit — a support lets you
hoist lower than its top):

- flat: both ropes of a pair at one height;
- sloping: the lower support at its top, the higher one swept above it;
- inverted-V on a kit mast or from the highest safe branch: the apex, then the end height. The ends are
  bounded by the rope in the kit (stake ropes) and by the clearing; the legs and ropes keep a clearance
  from every trunk; the mast stands where the site says, or at a computed point clear of every trunk.

Where the geometry of the site rules a layout out (a trunk in the span), the layout carries the reason
in ``blocked`` and is never solved.
"""

from __future__ import annotations

import itertools
from collections.abc import Sequence

from fieldkit.errors import InputError, join
from fieldkit.readable import length_both
from fieldkit.rigging.clearing import SiteLimits, Trunk
from fieldkit.rigging.layout import (
    HEIGHT_STEP_M,
    MAX_SETTINGS,
    Axis,
    Layout,
    Mechanics,
    height_grid,
)
from fieldkit.rigging.mast import Mast
from fieldkit.rigging.spans import SLOPING_MIN_DIFFERENCE_M, span_site_layouts
from fieldkit.rigging.supports import Support, distance_m
from fieldkit.rigging.vee import (
    INVERTED_V_MAX_LEG_SLOPE_DEG,
    INVERTED_V_MIN_DROP_M,
    Stake,
    mast_tension_n,
    stakes,
    vee_site_layouts,
)

# Two supports closer than this are one place: nothing can hang between them (a span needs 1 m,
# hung.hang_span), and a duplicate entry is the likelier cause
SAME_PLACE_M = 0.5

__all__ = [
    "HEIGHT_STEP_M",
    "INVERTED_V_MAX_LEG_SLOPE_DEG",
    "INVERTED_V_MIN_DROP_M",
    "MAX_SETTINGS",
    "SLOPING_MIN_DIFFERENCE_M",
    "Axis",
    "Layout",
    "Mechanics",
    "SiteLimits",
    "Stake",
    "Trunk",
    "check_positions",
    "height_grid",
    "inverted_v_layouts",
    "mast_tension_n",
    "site_layouts",
    "span_layouts",
    "stakes",
]


def check_positions(supports: Sequence[Support], field: str = "site.supports") -> None:
    """Refuse two supports at one place (nothing can hang between them; likely a typing slip).

    Raises
    ------
    InputError
        Naming the later support's ``x_m``.
    """
    for (_i, a), (j, b) in itertools.combinations(enumerate(supports), 2):
        d = distance_m(a, b)
        if d < SAME_PLACE_M:
            raise InputError(
                join(join(field, j), "x_m"),
                f"{b.id} stands {length_both(d)} from {a.id}: two supports at one place cannot hold a span; "
                "give each support its own position (x_m, y_m), or list it once",
                value=[b.x_m, b.y_m],
            )


# -- flat and sloping -------------------------------------------------------------------------


def site_layouts(
    supports: Sequence[Support],
    masts: Sequence[Mast],
    mech: Mechanics,
    *,
    forms: set[str],
    limits: SiteLimits,
) -> list[Layout]:
    """Every layout of the asked forms on this site, blocked ones included (with their reason).

    Parameters
    ----------
    supports : the site's supports (unsafe ones are never used, but their trunks are still there)
    masts : the kit's masts
    mech : kit mechanics
    forms : subset of {"flat", "sloping", "inverted-v"}
    limits : minimum end height, clearing, mast point, trunks, rope in the kit

    Raises
    ------
    InputError
        Two supports at one place (field ``site.supports[i].x_m``).
    """
    check_positions(supports)
    out = span_site_layouts(supports, mech, forms=forms, limits=limits)
    if "inverted-v" in forms:
        out += vee_site_layouts(supports, masts, mech, limits=limits)
    return out


def span_layouts(
    supports: list[Support],
    mech: Mechanics,
    *,
    forms: set[str],
    limits: SiteLimits | None = None,
) -> list[Layout]:
    """Flat and sloping layouts for every pair of safe supports that may be rigged."""
    limits = limits or SiteLimits.for_supports(supports)
    check_positions(supports)
    return [
        lay
        for lay in span_site_layouts(
            supports, mech, forms=forms & {"flat", "sloping"}, limits=limits
        )
        if lay.blocked is None
    ]


def inverted_v_layouts(
    supports: list[Support],
    masts: list[Mast],
    mech: Mechanics,
    *,
    site_xy: tuple[float, float] | None = None,
    limits: SiteLimits | None = None,
) -> list[Layout]:
    """An inverted-V on each kit mast and from the highest safe branch (see :func:`site_layouts`).

    ``site_xy`` is accepted for the callers of the first round and not used: the mast stands at
    ``limits.mast_xy_m`` when given, else at the computed point nearest the centroid of the safe
    supports that clears every trunk (:func:`fieldkit.rigging.clearing.mast_position`).
    """
    del site_xy
    limits = limits or SiteLimits.for_supports(supports)
    return [
        lay
        for lay in site_layouts(supports, masts, mech, forms={"inverted-v"}, limits=limits)
        if lay.form == "inverted-v" and lay.blocked is None
    ]
