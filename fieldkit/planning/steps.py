"""The named steps of a plan: layouts, sky fit, height sweeps, finishing with safety, ranking.

Each step takes and returns typed values (:mod:`fieldkit.planning.records`); the JSON is written
once, at the end (:mod:`fieldkit.planning.result`).
"""

from __future__ import annotations

import time
from dataclasses import dataclass, replace
from typing import Any

import numpy as np

from fieldkit.errors import InputError, join
from fieldkit.planning.inputs import PlanInput
from fieldkit.planning.records import Candidate, FinishedOption, SkyFit, Workbench, channel_rank
from fieldkit.readable import given_both, height_both
from fieldkit.rigging.cut import trim_cm_per_leg
from fieldkit.rigging.heights import LOWEST_END_HEIGHT_M, MIN_END_HEIGHT_M, low_end_words
from fieldkit.rigging.layouts import Layout, site_layouts
from fieldkit.rigging.linked import linked_option
from fieldkit.rigging.options import Refusal, Refused, finish, screen
from fieldkit.rigging.rigged import (
    RiggedOption,
    hung_points_m,
    option_cut_instruction,
    shown_rope_heights_m,
)
from fieldkit.rigging.vee import INVERTED_V_MIN_DROP_M, no_apex_reason
from fieldkit.safety.block import SafetyResult, check_option
from fieldkit.safety.checked_option import CheckedOption, MastAtSite, WireSpec, feed_point
from fieldkit.sky.ranking import row_key

# Channels within 6 % of one already swept on a layout reuse its chosen heights (one engine solve
# instead of a sweep): heights in wavelengths differ by < 6 %, the NVIS figure by hundredths of a dB.
CHANNEL_GROUP_FRACTION = 0.06
OTHER_CHANNEL_LAYOUTS = 2  # layouts screened on the channels after the sky's best one
TOP_CHANNEL_OPTIONS = 3  # options in full on the best channel; then the best of each other channel
MAX_OPTIONS = 6  # options returned in full, best first (the rest are listed in "more")
MAX_SAFETY_CHECKS = 16  # options worked out while looking for a raisable first option
LOW_END_MARGIN_M = 0.05  # an end this much under the safety's lowest safe end height gets a warning


@dataclass(frozen=True)
class Screening:
    """The height sweeps: every candidate with its score, and what could not be done."""

    candidates: tuple[Candidate, ...]
    refused: tuple[Refused, ...]


@dataclass(frozen=True)
class Finishing:
    """Options worked out in full (not yet ranked), candidates left as one line, refusals."""

    options: tuple[FinishedOption, ...]
    rest: tuple[Candidate, ...]
    refused: tuple[Refused, ...]


def _no_layout_reason(inp: PlanInput) -> str:
    lowest = inp.limits.min_end_height_m
    if inp.form == "inverted-v":
        return no_apex_reason(inp.supports, inp.masts, lowest)
    safe = [s for s in inp.supports if not s.unsafe]
    if len(safe) < 2 and not inp.masts:
        return (
            "need at least two safe supports, a safe tree tall enough for an inverted-V apex "
            f"of {given_both(lowest + INVERTED_V_MIN_DROP_M)} or more, or a mast in kit.masts"
        )
    words = (
        f"the supports are too low: every rope height is under the {given_both(lowest)} minimum "
        "end height"
    )
    if lowest > LOWEST_END_HEIGHT_M:
        words += (
            f"; site.min_end_height_m may lower it to {given_both(LOWEST_END_HEIGHT_M)} for a "
            "low-power wire where people are kept away from it"
        )
    return words


def find_layouts(inp: PlanInput) -> tuple[Layout, ...]:
    """Every way the site allows to hang the dipole in the asked form; the ones the site's geometry
    rules out (a trunk in the span) come along with their reason and are refused by the screening.

    Raises
    ------
    fieldkit.errors.InputError
        When there is none (the message says why and what to change).
    """
    both = {"flat", "sloping"}
    forms = both if inp.form in ("auto", "linked") else {inp.form} & both
    if inp.form in ("auto", "inverted-v"):
        forms = forms | {"inverted-v"}
    layouts = site_layouts(
        list(inp.supports), list(inp.masts), inp.kit.mech, forms=forms, limits=inp.limits
    )
    if inp.form == "linked":
        layouts = [lay for lay in layouts if lay.blocked is None]
    if not layouts:
        raise InputError("site.supports", _no_layout_reason(inp))
    return tuple(layouts)


def _sky_fit(ctx, sched: dict[str, Any], ceiling) -> SkyFit | None:
    if not sched or not sched.get("channels"):
        return None
    table = sorted(sched["channels"], key=row_key, reverse=True)
    return SkyFit(
        rank={round(t["frequency_mhz"], 6): i for i, t in enumerate(table)},
        by_channel={round(t["frequency_mhz"], 6): t for t in table},
        schedule={k: v for k, v in sched.items() if k != "channels"},
        source=tuple(sorted(set(ctx.sky.source or []))),
        context=ctx,
        ceiling=ceiling,
    )


def fit_sky(inp: PlanInput) -> SkyFit | None:
    """The sky layer's schedule table for the plan's channels (None without a sky or a schedule),
    with the default dipole: it orders the height sweeps; the options are ranked again with their
    own antenna (:func:`fit_options_to_sky`)."""
    if inp.sky is None or inp.sky.schedule is None:
        return None
    from fieldkit.sky.day import schedule_fit, sky_context
    from fieldkit.sky.what_works import nvis_ceiling

    try:
        ctx = sky_context(inp.sky)
        sched = schedule_fit(ctx, {})
    except InputError as e:
        raise InputError(join("sky", e.field), e.detail, value=e.value) from None
    return _sky_fit(ctx, sched, nvis_ceiling(ctx))


def fit_options_to_sky(
    options: tuple[FinishedOption, ...], sky: SkyFit | None
) -> tuple[tuple[FinishedOption, ...], SkyFit | None]:
    """Each option's schedule row with its own antenna gain (the hung wire's engine solution: its
    pattern over the NVIS elevations and its efficiency), and the schedule table again with the
    best option's antenna on each channel."""
    if sky is None or sky.context is None or not options:
        return options, sky
    from fieldkit.sky.day import schedule_fit, schedule_row
    from fieldkit.sky.gain import elevation_gain_of

    ctx = sky.context
    out, best = [], {}
    for o in options:
        f_mhz = round(o.frequency_hz / 1e6, 6)
        gain = elevation_gain_of(o.rigged.resonance.solution, frequency_mhz=f_mhz)
        out.append(replace(o, sky_row=schedule_row(ctx, f_mhz, gain)))
        if f_mhz not in best or o.score_db > best[f_mhz][0]:
            best[f_mhz] = (o.score_db, gain)
    sched = schedule_fit(ctx, {f: g for f, (_, g) in best.items() if f in ctx.spec.channels_mhz})
    fit = _sky_fit(ctx, sched, sky.ceiling) or sky
    for o in out:  # the channel's place in the table worked out with the planned antennas
        if o.sky_row is not None:
            o.sky_row["rank"] = fit.rank_of(o.frequency_hz)
    return tuple(out), fit


def plan_warnings(inp: PlanInput, sky: SkyFit | None) -> tuple[str, ...]:
    """The plan's own warnings: first the schedule's hours at which no channel works and what would,
    then channels above the NVIS range, then licence notes on the channels, then the input's
    (defaults used, supports left out)."""
    from fieldkit.safety.licence import licence_notes
    from fieldkit.sky.what_works import above_nvis_words

    first = []
    none_works = (sky.schedule.get("when_none_works") if sky is not None else None) or {}
    if none_works.get("words"):
        first.append(none_works["words"])
    ceiling = None if sky is None else sky.ceiling
    for f in sorted(inp.channels_hz):
        words = above_nvis_words(round(f / 1e6, 6), ceiling)
        if words:
            first.append(words)
    first.extend(licence_notes(inp.channels_hz, power_w=inp.radio.power_w))
    return (*first, *inp.warnings)


def sweep_count(n_layouts: int, n_channels: int) -> int:
    """Height sweeps a plan runs: every layout on the first channel, the best few on the others."""
    return n_layouts + (n_channels - 1) * min(OTHER_CHANNEL_LAYOUTS, n_layouts)


def _screen_one(layout: Layout, f: float, inp: PlanInput, bench: Workbench, near: list):
    """One layout at one channel: a sweep, or the heights of a channel within 6 % swept before."""
    kw = {"frequency_hz": f, "kit": inp.kit, "engine": bench.engine, "warm": bench.warm}
    if near:
        return screen(layout, **kw, only=near[0].chosen, swept_at_hz=near[0].frequency_hz)
    return screen(layout, **kw)


def _near(swept: list, f: float) -> list:
    return [sc for sc in swept if abs(f / sc.frequency_hz - 1) < CHANNEL_GROUP_FRACTION]


def sweep_heights(
    layouts: tuple[Layout, ...], inp: PlanInput, bench: Workbench, sky: SkyFit | None
) -> Screening:
    """Every layout on the first channel (the one that best fits the schedule when the sky is given,
    else the lowest), then only the best few layouts on the others: which layout wins depends on the
    site and hardly on the channel."""
    order = sorted(inp.channels_hz, key=lambda f: (channel_rank(sky, f), f))
    total = sweep_count(len(layouts), len(order))
    candidates: list[Candidate] = []
    refused: list[Refused] = []
    swept: dict[int, list] = {}  # layout index -> screened channels of its full sweeps
    layout_order = list(range(len(layouts)))
    for n, f in enumerate(order):
        for i in layout_order if n == 0 else layout_order[:OTHER_CHANNEL_LAYOUTS]:
            bench.progress.at("height sweeps", len(candidates) + len(refused), total)
            near = _near(swept.get(i, []), f)
            try:
                sc = _screen_one(layouts[i], f, inp, bench, near)
            except Refusal as e:
                refused.append(Refused.of(layouts[i], f, e))
                continue
            if not near:
                swept.setdefault(i, []).append(sc)
            candidates.append(Candidate.of_sweep(sc))
        if n == 0:
            best = {id(c.layout): c.score_db for c in candidates}
            layout_order.sort(key=lambda i: -best.get(id(layouts[i]), -1e9))
    bench.progress.at("height sweeps", total, total)
    return Screening(tuple(candidates), tuple(refused))


def link_layouts(layouts: tuple[Layout, ...], inp: PlanInput, bench: Workbench) -> Screening:
    """A linked dipole on the longest flat spans, worked out in full."""
    bench.progress.at("height sweeps", 0, 1)
    got = linked_option(
        list(layouts), sorted(inp.channels_hz), kit=inp.kit, engine=bench.engine, warm=bench.warm
    )
    bench.progress.at("height sweeps", 1, 1)
    return Screening(tuple(Candidate.of_rigged(r) for r in got["options"]), tuple(got["refused"]))


def finish_order(candidates: tuple[Candidate, ...], sky: SkyFit | None) -> list[Candidate]:
    """Order in which options are worked out in full: without a sky estimate, by score; with one,
    the best few on the best channel, then the best on each other channel, then the rest."""
    by_score = sorted(candidates, key=lambda c: -c.score_db)
    if sky is None:
        return by_score
    ranked = sorted(by_score, key=lambda c: sky.rank_of(c.frequency_hz))
    top = sky.rank_of(ranked[0].frequency_hz)
    first = [c for c in ranked if sky.rank_of(c.frequency_hz) == top][:TOP_CHANNEL_OPTIONS]
    seen, others = set(), []
    for c in ranked:
        ch = sky.rank_of(c.frequency_hz)
        if ch != top and ch not in seen:
            seen.add(ch)
            others.append(c)
    head = first + others
    return head + [c for c in ranked if not any(c is h for h in head)]


def checked_option(r: RiggedOption, inp: PlanInput) -> CheckedOption:
    """The option as the safety rules read it: the numbers the operator is shown (mm, cm, 1e-6 MHz)."""
    hung = r.hung
    wire = np.array(hung_points_m(hung), dtype=float)
    feed_d = round(hung.feed_distance_m, 3)
    mast = None
    if r.mast is not None:
        x, y = r.layout.mast_xy
        shown = r.mast.to_json()
        mast = MastAtSite(
            shown["id"], x, y, shown["height_m"], shown["guys"], shown.get("wind_limit_m_s")
        )
    w = inp.kit.wire
    return CheckedOption(
        frequency_hz=round(r.frequency_hz / 1e6, 6) * 1e6,
        supports_used=tuple(r.layout.supports_used),
        rope_heights_m=shown_rope_heights_m(r.chosen),
        wire_m=wire,
        feed_distance_m=feed_d,
        feed_m=feed_point(wire, feed_d),
        wire=WireSpec(
            w.diameter_m, w.conductor, w.insulation_thickness_m, w.insulation_permittivity
        ),
        mast=mast,
        swr=round(r.swr, 3),
        trim_cm_per_100khz=trim_cm_per_leg(r.resonance, 100e3),
        cut_text=option_cut_instruction(r, inp.kit).text_both,
    )


def check_safety(r: RiggedOption, inp: PlanInput) -> SafetyResult:
    """The option's safety findings; the resonance search's solution gives the near field."""
    option = checked_option(r, inp)
    solution = r.resonance.solution
    if abs(solution.frequency_hz / option.frequency_hz - 1) > 1e-6:
        solution = None
    return check_option(
        option,
        supports=inp.supports,
        hazards=inp.hazards,
        radio=inp.radio,
        ground=inp.kit.ground,
        limit_set=inp.limit_set,
        solution=solution,
    )


def option_warnings(
    r: RiggedOption, safety: SafetyResult, min_end_height_m: float = MIN_END_HEIGHT_M
) -> tuple[str, ...]:
    """The rigging's warnings, led by "do not raise" when a safety check fails, then a wire lower
    than 3 m, and the lowest end against the RF keep-out."""
    warnings = list(r.warnings)
    low = low_end_words(float(np.asarray(r.hung.points_m)[:, 2].min()), min_end_height_m)
    if low:
        warnings.insert(0, low)
    if not safety.raise_ok:
        reasons = safety.reasons or ("a safety check fails",)
        warnings.insert(0, "do not raise as planned: " + "; ".join(str(x) for x in reasons))
    low_end = min(round(h, 2) for h in r.hung.end_heights_m)
    need = safety.min_end_height_m
    if need > low_end + LOW_END_MARGIN_M:
        warnings.append(
            f"the lowest wire end hangs at {height_both(low_end)}; keep it at "
            f"{height_both(need)} or more so that no RF keep-out zone remains under the ends "
            "(safety block)"
        )
    return tuple(warnings)


def _timed(bench: Workbench, key: str, fn, *args):
    t1 = time.perf_counter()
    try:
        return fn(*args)
    finally:
        bench.times[key] += time.perf_counter() - t1


def _rig(c: Candidate, inp: PlanInput, bench: Workbench) -> RiggedOption:
    if c.rigged is not None:
        return c.rigged
    kw = {"kit": inp.kit, "engine": bench.engine, "warm": bench.warm}
    return _timed(bench, "finish_s", lambda: finish(c.screened, **kw))


def _with_safety(r: RiggedOption, inp: PlanInput, bench: Workbench) -> FinishedOption:
    safety = _timed(bench, "safety_s", check_safety, r, inp)
    return FinishedOption(r, safety, option_warnings(r, safety, inp.limits.min_end_height_m))


def finish_options(
    candidates: tuple[Candidate, ...], inp: PlanInput, bench: Workbench, sky: SkyFit | None
) -> Finishing:
    """The exact cut, SWR curve and safety findings for the best few, in screened order, until
    MAX_OPTIONS are in hand and at least one of them may be raised (MAX_SAFETY_CHECKS at most).

    The first MAX_OPTIONS are worked out first ("resonance"), then checked ("safety"); when none of
    them may be raised, more are worked out and checked one by one (still "safety").
    """
    bench.times["finish_s"] = bench.times["safety_s"] = 0.0
    order = finish_order(candidates, sky)
    rigged: list[RiggedOption] = []
    refused: list[Refused] = []
    total = min(len(order), MAX_OPTIONS)
    n = 0
    while n < len(order) and len(rigged) < MAX_OPTIONS and n < MAX_SAFETY_CHECKS:
        bench.progress.at("resonance", len(rigged), total)
        _try_rig(order[n], inp, bench, rigged, refused)
        n += 1
    bench.progress.at("resonance", len(rigged), total)
    options = []
    for i, r in enumerate(rigged):
        bench.progress.at("safety", i, len(rigged))
        options.append(_with_safety(r, inp, bench))
    rest = _more_until_raisable(order[n:], n, inp, bench, options, refused)
    bench.progress.at("safety", len(options), len(options))
    return Finishing(tuple(options), tuple(rest), tuple(refused))


def _try_rig(c: Candidate, inp, bench, rigged: list, refused: list) -> None:
    try:
        rigged.append(_rig(c, inp, bench))
    except Refusal as e:
        refused.append(Refused.of(c.layout, c.frequency_hz, e))


def _more_until_raisable(
    left: list[Candidate], tried: int, inp: PlanInput, bench: Workbench, options: list, refused
) -> list[Candidate]:
    """Work out and check more candidates until one may be raised; the rest stay one line each."""
    rest = []
    for c in left:
        enough = len(options) >= MAX_OPTIONS and any(o.raise_ok for o in options)
        if enough or tried >= MAX_SAFETY_CHECKS:
            rest.append(c)
            continue
        tried += 1
        bench.progress.at("safety", len(options), len(options) + 1)
        got: list[RiggedOption] = []
        _try_rig(c, inp, bench, got, refused)
        options += [_with_safety(r, inp, bench) for r in got]
    return rest


def rank(options: tuple[FinishedOption, ...], sky: SkyFit | None) -> tuple[FinishedOption, ...]:
    """Never first when it may not be raised; then the channel that best fits the schedule; then
    the score."""

    def key(o: FinishedOption) -> tuple:
        if o.sky_row is not None:  # its own antenna's reach in the window, best first
            return (not o.raise_ok, tuple(-v for v in row_key(o.sky_row)), -o.score_db)
        return (not o.raise_ok, (channel_rank(sky, o.frequency_hz),), -o.score_db)

    return tuple(sorted(options, key=key))
