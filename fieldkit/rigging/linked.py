"""Linked dipole: several channels on one wire, links (open/closed jumpers) at the right places.

The whole wire is sized and hung for the lowest channel (all links closed). For each higher channel
the engine finds, on that same hung shape, the distance from the feedpoint at which to open the
links so that the inner part resonates there. The wire beyond an open link still hangs but is not
driven; it is left out of the model. NEC-2 with the open outer sections present across 5 cm gaps
puts a 3.6/7.1 MHz pair's upper resonance 0.28 % lower than without them (docs/rigging.md), well
inside the trim the operator does at the links anyway.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Any

from fieldkit.rigging.cut import EngineCounter, resonate, swr_curve
from fieldkit.rigging.hung import truncate_about_feed
from fieldkit.rigging.layouts import Layout
from fieldkit.rigging.options import Kit, Refusal, Refused, Warm, evaluate
from fieldkit.rigging.rigged import LINKED_NOTE, LinkedWire, RiggedOption

MAX_LINKED_LAYOUTS = 3  # longest spans first: a linked dipole is long


def link_sections(
    hung_full, *, leg_full_m: float, channels_hz: list[float], kit: Kit, engine: EngineCounter
) -> list[dict[str, Any]]:
    """Link positions (distance from the feedpoint along each leg) for each channel above the lowest."""
    links = []
    outer = leg_full_m
    for f in sorted(channels_hz[1:], reverse=False):
        guess = leg_full_m * channels_hz[0] / f
        res = resonate(
            lambda L: truncate_about_feed(hung_full, L),
            engine=engine,
            wire=kit.wire,
            ground=kit.ground,
            frequency_hz=f,
            leg_guess_m=guess,
        )
        if res.leg_m >= outer:
            raise Refusal("the channels are too close together for links on one wire")
        curve = swr_curve(res, engine=engine, wire=kit.wire, ground=kit.ground)
        links.append(
            {
                "frequency_mhz": round(f / 1e6, 6),
                "link_from_feed_m": round(res.leg_m, 3),
                "impedance_ohm": {
                    "r": round(res.solution.impedance_ohm.real, 2),
                    "x": round(res.solution.impedance_ohm.imag, 2),
                },
                "swr": round(float(res.solution.swr), 3),
                "bandwidth_2to1": curve["bandwidth_2to1"],
                "links": "open the links at this distance from the feedpoint; close every link nearer the feedpoint",
            }
        )
        outer = res.leg_m
    # sections per leg, feedpoint outward
    marks = sorted([lk["link_from_feed_m"] for lk in links]) + [leg_full_m]
    prev = 0.0
    sections = []
    for m in marks:
        sections.append(round(m - prev, 3))
        prev = m
    return [{"sections_m": sections}, *links]


def _linked(rigged: RiggedOption, channels_hz: list[float], *, kit: Kit, engine) -> RiggedOption:
    """The lowest channel's option with the link positions of the others."""
    res = rigged.resonance
    first, *links = link_sections(
        res.hung, leg_full_m=res.leg_m, channels_hz=channels_hz, kit=kit, engine=engine
    )
    wire = LinkedWire(tuple(first["sections_m"]), tuple(links), tuple(channels_hz))
    return replace(rigged, linked=wire, warnings=(*rigged.warnings, LINKED_NOTE))


def linked_option(
    layouts: list[Layout], channels_hz: list[float], *, kit: Kit, engine: EngineCounter, warm: Warm
) -> dict[str, list]:
    """Linked-dipole options on the longest flat spans: ``{"options": [RiggedOption], "refused":
    [Refused]}``."""
    spans = sorted(
        (lay for lay in layouts if lay.form == "flat"), key=lambda lay: -(lay.span_m or 0)
    )
    options, refused = [], []
    low = channels_hz[0]
    for lay in spans[:MAX_LINKED_LAYOUTS]:
        try:
            rigged = evaluate(lay, frequency_hz=low, kit=kit, engine=engine, warm=warm)
            options.append(_linked(rigged, channels_hz, kit=kit, engine=engine))
        except Refusal as e:
            refused.append(Refused.of(lay, low, e, form="linked"))
    return {"options": options, "refused": refused}
