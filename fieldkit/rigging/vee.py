"""The inverted-V as it hangs: end height rule, the hang from an apex point, and the mast's pull.

References
----------
.. [1] Legs no steeper than 45° below horizontal (apex angle 90° or more): steeper legs cancel each
   other's radiation straight up (common practice, no single source).
"""

from __future__ import annotations

import math

import numpy as np

from fieldkit.constants import STANDARD_GRAVITY_M_S2
from fieldkit.rigging.catenary import HangError
from fieldkit.rigging.hung import HungDipole, hang_inverted_v
from fieldkit.rigging.mast import Mast

INVERTED_V_MIN_DROP_M = 2.0  # ends at least this far below the apex to make it a V
# Legs no steeper than 45° below horizontal [1]_. Short legs from a high apex end higher than asked.
INVERTED_V_MAX_LEG_SLOPE_DEG = 45.0


def end_height_m(asked_m: float, apex_m: float, leg_m: float) -> float:
    """End height for an inverted-V: as asked, or higher when the legs would hang too steep [m]."""
    return max(asked_m, apex_m - leg_m * math.sin(math.radians(INVERTED_V_MAX_LEG_SLOPE_DEG)))


def local_vee(*, apex_m: float, end_m: float, leg_m: float, mech, tension_n: float) -> HungDipole:
    """The inverted-V with the kit's wire and feedpoint load at a pull [N], apex at the origin and
    legs along x (:func:`placed` moves it onto the site)."""
    return hang_inverted_v(
        centre_xy=(0.0, 0.0),
        axis_xy=(1.0, 0.0),
        apex_height_m=apex_m,
        end_height_m=end_m,
        leg_m=leg_m,
        wire_weight_n_per_m=mech.wire_weight_n_per_m,
        feed_load_n=mech.feed_load_n(apex_m),
        tension_n=tension_n,
    )


def placed(local: HungDipole, *, centre_xy: np.ndarray, axis_xy: np.ndarray) -> HungDipole:
    """A V hung at the origin along +x, moved to its apex point and turned to its leg direction."""
    from dataclasses import replace

    p = np.asarray(local.points_m, dtype=float)
    u = np.asarray(axis_xy, dtype=float) / np.linalg.norm(axis_xy)
    n = np.array([-u[1], u[0]])
    xy = np.asarray(centre_xy, dtype=float)[None, :] + p[:, :1] * u[None, :] + p[:, 1:2] * n
    return replace(local, points_m=np.column_stack([xy, p[:, 2]]))


def mast_tension_n(
    mast: Mast, *, apex_m: float, end_m: float, leg_m: float, mech
) -> tuple[float, HungDipole]:
    """The largest pull (up to the kit's) at which the mast carries the inverted-V, and the hang
    (apex at the origin, legs along x).

    Raises
    ------
    HangError
        When even the lightest pull that holds the legs overloads the mast.
    """
    rating_n = mast.top_load_kg * STANDARD_GRAVITY_M_S2

    def hang(t: float) -> HungDipole:
        return local_vee(apex_m=apex_m, end_m=end_m, leg_m=leg_m, mech=mech, tension_n=t)

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
