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

from fieldkit.rigging.cut import EngineCounter, ResonanceError, resonate, swr_curve
from fieldkit.rigging.hung import truncate_about_feed
from fieldkit.rigging.layouts import Layout
from fieldkit.rigging.options import Kit, Refusal, Refused, Warm, evaluate
from fieldkit.rigging.rigged import LINKED_NOTE, LinkedWire, LinkPosition, RiggedOption

MAX_LINKED_LAYOUTS = 3  # longest spans first: a linked dipole is long


def link_sections(
    hung_full, *, leg_full_m: float, channels_hz: list[float], kit: Kit, engine: EngineCounter
) -> tuple[tuple[float, ...], tuple[LinkPosition, ...]]:
    """Each leg's sections, feedpoint outward [m], and the link position of each channel above
    the lowest (distance from the feedpoint along each leg)."""
    links = []
    outer = leg_full_m
    for f in sorted(channels_hz[1:]):
        try:
            res = resonate(
                lambda L: truncate_about_feed(hung_full, L),
                engine=engine,
                wire=kit.wire,
                ground=kit.ground,
                frequency_hz=f,
                leg_guess_m=leg_full_m * channels_hz[0] / f,
            )
        except ResonanceError as e:
            raise Refusal(f"no link position found for {f / 1e6:g} MHz: {e}") from None
        if res.leg_m >= outer:
            raise Refusal("the channels are too close together for links on one wire")
        curve = swr_curve(res, engine=engine, wire=kit.wire, ground=kit.ground)
        links.append(LinkPosition.of(res, frequency_hz=f, bandwidth_2to1=curve["bandwidth_2to1"]))
        outer = res.leg_m
    marks = [*sorted(round(lk.from_feed_m, 3) for lk in links), leg_full_m]
    sections = tuple(round(m - prev, 3) for prev, m in zip([0.0, *marks[:-1]], marks, strict=True))
    return sections, tuple(links)


def _linked(rigged: RiggedOption, channels_hz: list[float], *, kit: Kit, engine) -> RiggedOption:
    """The lowest channel's option with the link positions of the others."""
    res = rigged.resonance
    sections, links = link_sections(
        res.hung, leg_full_m=res.leg_m, channels_hz=channels_hz, kit=kit, engine=engine
    )
    wire = LinkedWire(sections, links, tuple(channels_hz))
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
