"""Flat and sloping layouts: a dipole between two supports, each of its rope heights swept from the
minimum end height to the lower support's top (flat) or the higher rope above the lower one (sloping).
A trunk in the span rules the pair out; drooping ends keep off the other trunks too."""

from __future__ import annotations

import itertools
from collections.abc import Callable, Sequence

import numpy as np

from fieldkit.readable import given_both, height_both, length_both
from fieldkit.rigging.catenary import HangError
from fieldkit.rigging.clearing import SiteLimits, nearest_trunk
from fieldkit.rigging.hung import HungDipole, hang_span
from fieldkit.rigging.layout import Axis, Layout, Mechanics, coarse_settings
from fieldkit.rigging.supports import Support, distance_m

SLOPING_MIN_DIFFERENCE_M = 1.5  # below this a "sloping" hang is just a flat one


def _span_builder(
    a: Support, b: Support, mech: Mechanics, limits: SiteLimits
) -> Callable[[dict[str, float], float], HungDipole]:
    others = [t for t in limits.trunks if t.id not in (a.id, b.id)]
    lowest = limits.min_end_height_m

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
        if min(hung.end_heights_m) < lowest - 1e-6 or hung.feedpoint_height_m < lowest:
            raise HangError(
                f"the wire would come down to "
                f"{height_both(min(hung.end_heights_m + (hung.feedpoint_height_m,)))}, below the "
                f"{given_both(lowest)} minimum end height (site.min_end_height_m)"
            )
        if hung.tail_m > 0 and others:  # drooping ends run on past the supports toward stakes
            p = np.asarray(hung.points_m)[:, :2]
            for seg in ((p[0], p[1]), (p[-2], p[-1])):
                near = nearest_trunk(seg, others)
                if near is not None and near[1] < near[0].radius_m + limits.trunk_clearance_m:
                    raise HangError(
                        f"the drooping end passes {length_both(near[1] - near[0].radius_m)} from "
                        f"{near[0].id}'s trunk; keep {given_both(limits.trunk_clearance_m)}"
                    )
        return hung

    return build


def _span_blocked(a: Support, b: Support, limits: SiteLimits) -> str | None:
    """Why a trunk between the two supports rules the span out, or None."""
    others = [t for t in limits.trunks if t.id not in (a.id, b.id)]
    near = nearest_trunk((np.array([a.x_m, a.y_m]), np.array([b.x_m, b.y_m])), others)
    if near is None:
        return None
    trunk, d = near
    if d >= trunk.radius_m + limits.trunk_clearance_m:
        return None
    return (
        f"{trunk.id} stands between {a.id} and {b.id}: the wire would pass "
        f"{length_both(max(d - trunk.radius_m, 0.0))} from its trunk; "
        f"keep {given_both(limits.trunk_clearance_m)}"
    )


def span_site_layouts(
    supports: Sequence[Support], mech: Mechanics, *, forms: set[str], limits: SiteLimits
) -> list[Layout]:
    safe = [s for s in supports if not s.unsafe]
    lowest = limits.min_end_height_m
    out = []
    for a, b in itertools.combinations(safe, 2):
        build = _span_builder(a, b, mech, limits)
        span = distance_m(a, b)
        blocked = _span_blocked(a, b, limits)
        low_cap = min(a.height_m, b.height_m)
        if "flat" in forms and low_cap >= lowest:

            def flat(values, a=a, b=b):
                return {a.id: values["ropes"], b.id: values["ropes"]}

            lower = a if a.height_m <= b.height_m else b
            axes = (
                Axis(
                    "ropes",
                    min(lowest, low_cap),
                    low_cap,
                    low_cap,
                    "the feedpoint",
                    f"{lower.id} allows no higher" if a.height_m != b.height_m else None,
                ),
            )
            out.append(
                Layout(
                    form="flat",
                    supports_used=(a.id, b.id),
                    settings=coarse_settings(axes, flat),
                    build=build,
                    span_m=span,
                    axes=axes,
                    setting_for=flat,
                    blocked=blocked,
                    min_end_height_m=lowest,
                    kinds=(a.kind, b.kind),
                )
            )
        if "sloping" in forms and abs(a.height_m - b.height_m) >= SLOPING_MIN_DIFFERENCE_M:
            hi, lo = (a, b) if a.height_m > b.height_m else (b, a)
            if lo.height_m >= lowest:

                def sloping(values, hi=hi, lo=lo):
                    return {hi.id: values[hi.id], lo.id: lo.height_m}

                axes = (
                    Axis(
                        hi.id,
                        lo.height_m + SLOPING_MIN_DIFFERENCE_M,
                        hi.height_m,
                        hi.height_m,
                        "the feedpoint",
                        f"{hi.id} allows no higher",
                    ),
                )
                out.append(
                    Layout(
                        form="sloping",
                        supports_used=(a.id, b.id),
                        settings=coarse_settings(axes, sloping),
                        build=build,
                        span_m=span,
                        axes=axes,
                        setting_for=sloping,
                        blocked=blocked,
                        min_end_height_m=lowest,
                        kinds=(a.kind, b.kind),
                    )
                )
    return out


# -- inverted-V -------------------------------------------------------------------------------
