"""The one entry point that composes the layers: ``plan(spec) -> dict`` (the `fieldkit plan` contract).

site + kit + channels → every layout the site allows (pairs of safe supports flat or sloping, an
inverted-V on each kit mast or from the highest branch) → the sky layer's schedule fit per channel
(when ``sky`` is given) → height sweeps with the engine (every layout on the best channel, the best
two on the others; :mod:`fieldkit.rigging`) → for the best few: resonance, cut list, SWR, mast,
feedline, and the safety block (:mod:`fieldkit.safety`) → options best first. An option whose safety
block says ``raise_ok: false`` is never first.
"""

from __future__ import annotations

import time
from typing import Any

from fieldkit.errors import InputError, join
from fieldkit.planning.inputs import FORMS, PlanInput, parse_plan
from fieldkit.rigging.cut import EngineCounter, retrim
from fieldkit.rigging.layouts import inverted_v_layouts, span_layouts
from fieldkit.rigging.linked import linked_option
from fieldkit.rigging.options import Refusal, Warm, finish, screen

# Channels within 6 % of one already swept on a layout reuse its chosen heights (one engine solve
# instead of a sweep): heights in wavelengths differ by < 6 %, the NVIS figure by hundredths of a dB.
CHANNEL_GROUP_FRACTION = 0.06
OTHER_CHANNEL_LAYOUTS = 2  # layouts screened on the channels after the sky's best one
TOP_CHANNEL_OPTIONS = 3  # options in full on the best channel; then the best of each other channel
MAX_OPTIONS = 6  # options returned in full, best first (the rest are listed in "more")
MAX_SAFETY_CHECKS = 16  # safety blocks computed while looking for a raisable first option

__all__ = ["FORMS", "plan"]


def _safety(
    option: dict[str, Any], spec: dict[str, Any], inp: PlanInput
) -> tuple[dict | None, str | None]:
    try:
        from fieldkit.safety import safety_block
    except ImportError:
        return (
            None,
            "safety checks are not available in this build: do not raise without a manual check",
        )
    # the resonance search already solved this hung wire at the channel: reuse it for the near field
    res = option.get("_resonance")
    solution = getattr(res, "solution", None)
    if (
        solution is not None
        and abs(solution.frequency_hz / (option["frequency_mhz"] * 1e6) - 1) > 1e-6
    ):
        solution = None
    block = safety_block(
        option={k: v for k, v in option.items() if not k.startswith("_")},
        site=spec["site"],
        radio=spec["radio"],
        ground=inp.kit.ground,
        limit_set=inp.limit_set,
        solution=solution,
    )
    return block, None


def plan(spec: dict) -> dict:
    """Plan the cut and the hang for a site, a kit and channels.

    Parameters
    ----------
    spec : dict
        The plan input of ARCHITECTURE.md (site, channels_mhz, form, kit, radio, optional sky,
        schedule, name, limit_set, retrim).

    Returns
    -------
    dict
        ``options`` best first (each with the contract fields, ``safety`` included), ``refused`` (what
        could not be done and why), ``warnings``, ``engine`` (cost figures).

    Raises
    ------
    fieldkit.errors.InputError
        For bad input, and when nothing at all can be hung (the message says why and what to change).
    """
    t0 = time.perf_counter()
    inp = parse_plan(spec)
    engine = EngineCounter()
    warm = Warm({})
    layouts = []
    span_forms = (
        {"flat", "sloping"} if inp.form in ("auto", "linked") else {inp.form} & {"flat", "sloping"}
    )
    if span_forms:
        layouts += span_layouts(inp.supports, inp.kit.mech, forms=span_forms)
    if inp.form in ("auto", "inverted-v"):
        layouts += inverted_v_layouts(inp.supports, inp.masts, inp.kit.mech, site_xy=inp.mast_xy)
    options: list[dict[str, Any]] = []
    refused: list[dict[str, Any]] = []
    warnings: list[str] = list(inp.warnings)
    if not layouts:
        raise InputError(
            "site.supports",
            _no_layout_reason(inp),
        )
    channels = sorted(inp.channels_hz)
    times = {"sky_s": 0.0}
    sky = None
    if inp.form == "linked":
        got = linked_option(layouts, channels, kit=inp.kit, engine=engine, warm=warm)
        refused.extend(got["refused"])
        candidates = [(o["score_db"], o) for o in got["options"]]
    else:
        t1 = time.perf_counter()
        sky = _sky_fit(spec, inp)
        times["sky_s"] = time.perf_counter() - t1
        # every layout on the first channel (the one that best fits the schedule when the sky is
        # given, else the lowest), then only the best few layouts on the other channels: which layout
        # wins depends on the site and hardly on the channel
        order = sorted(channels, key=lambda f: (_channel_rank(sky, f), f))
        candidates = []
        swept: dict[int, list] = {}  # layout index -> screened channels of its full sweeps
        layout_order = list(range(len(layouts)))
        for n, f in enumerate(order):
            use = layout_order if n == 0 else layout_order[:OTHER_CHANNEL_LAYOUTS]
            for i in use:
                lay = layouts[i]
                near = [
                    sc
                    for sc in swept.get(i, [])
                    if abs(f / sc.frequency_hz - 1) < CHANNEL_GROUP_FRACTION
                ]
                try:
                    if near:
                        sc = screen(
                            lay,
                            frequency_hz=f,
                            kit=inp.kit,
                            engine=engine,
                            warm=warm,
                            only=near[0].chosen,
                            swept_at_hz=near[0].frequency_hz,
                        )
                    else:
                        sc = screen(lay, frequency_hz=f, kit=inp.kit, engine=engine, warm=warm)
                        swept.setdefault(i, []).append(sc)
                    candidates.append((sc.score_db, sc))
                except Refusal as e:
                    refused.append(_refusal(lay, f, e))
            if n == 0:
                best = {id(sc.layout): sc.score_db for _, sc in candidates}
                layout_order.sort(key=lambda i: -best.get(id(layouts[i]), -1e9))
    times["screen_s"] = time.perf_counter() - t0 - times["sky_s"]
    if not candidates:
        whys = "; ".join(sorted({r["why"] for r in refused}))
        raise InputError("site", f"nothing can be hung with this site and kit: {whys}")
    times["finish_s"] = times["safety_s"] = 0.0
    candidates = _finish_order(candidates, sky)
    # the exact cut, SWR curve and safety block only for the best few, in screened order, until
    # MAX_OPTIONS are in hand and at least one of them may be raised
    tried = 0
    rest = []
    for _score, cand in candidates:
        have_ok = any((o["safety"] or {}).get("raise_ok") for o in options)
        if (len(options) >= MAX_OPTIONS and have_ok) or tried >= MAX_SAFETY_CHECKS:
            rest.append(cand)
            continue
        tried += 1
        if isinstance(cand, dict):
            opt = cand
        else:
            try:
                t1 = time.perf_counter()
                opt = finish(cand, kit=inp.kit, engine=engine, warm=warm)
                times["finish_s"] += time.perf_counter() - t1
            except Refusal as e:
                refused.append(_refusal(cand.layout, cand.frequency_hz, e))
                continue
        t1 = time.perf_counter()
        block, note = _safety(opt, spec, inp)
        times["safety_s"] += time.perf_counter() - t1
        opt["safety"] = block
        if note:
            opt["warnings"].append(note)
        if block is not None and not block.get("raise_ok", False):
            reasons = block.get("reasons") or ["a safety check fails"]
            opt["warnings"].insert(
                0, "do not raise as planned: " + "; ".join(str(r) for r in reasons)
            )
        low_end = min(opt["end_heights_m"])
        if block is not None and block.get("min_end_height_m", 0) > low_end + 0.05:
            opt["warnings"].append(
                f"the lowest wire end hangs at {low_end:.1f} m; keep it at {block['min_end_height_m']:.1f} m "
                "or more so that no RF keep-out zone remains under the ends (safety block)"
            )
        options.append(opt)
    for opt in options:
        if sky is not None:
            opt["sky"] = sky["by_channel"].get(round(opt["frequency_mhz"], 6))
    # never first when it may not be raised; then the channel that best fits the schedule; then score
    options.sort(
        key=lambda o: (
            not (o["safety"] or {}).get("raise_ok", False),
            _channel_rank(sky, o["frequency_mhz"] * 1e6),
            -o["score_db"],
        )
    )
    shown = options[:MAX_OPTIONS]
    more = [_summary(o) for o in options[MAX_OPTIONS:]] + [_summary(c) for c in rest]
    if inp.retrim is not None:
        _attach_retrim(shown, inp)
    for opt in options:
        opt.pop("_resonance", None)
    return {
        "name": inp.name,
        "options": shown,
        "more": more,
        "refused": refused,
        "warnings": warnings,
        "ranking": (
            "options that fail a safety check come after all others; then the channel that best covers "
            "the schedule (sky estimate, when the sky and schedule are given); then score = mean NVIS "
            "gain over the 0–300 km elevations minus feedline loss"
        ),
        "sky": None if sky is None else {"schedule": sky["schedule"], "source": sky["source"]},
        "engine": {
            "solve_calls": engine.calls,
            "frequencies_solved": engine.frequencies,
            "solutions_reused": engine.reused,
            **{k: round(v, 3) for k, v in times.items()},
            "total_seconds": round(time.perf_counter() - t0, 3),
        },
    }


def _finish_order(candidates: list, sky: dict[str, Any] | None) -> list:
    """Order in which options are worked out in full: without a sky estimate, by score; with one,
    the best few on the best channel, then the best on each other channel, then the rest."""
    by_score = sorted(candidates, key=lambda c: -c[0])
    if sky is None:
        return by_score
    ranked = sorted(by_score, key=lambda c: _channel_rank(sky, _freq(c[1])))
    top = _channel_rank(sky, _freq(ranked[0][1]))
    first = [c for c in ranked if _channel_rank(sky, _freq(c[1])) == top][:TOP_CHANNEL_OPTIONS]
    seen, others = set(), []
    for c in ranked:
        ch = _channel_rank(sky, _freq(c[1]))
        if ch != top and ch not in seen:
            seen.add(ch)
            others.append(c)
    head = first + others
    return head + [c for c in ranked if not any(c is h for h in head)]


def _freq(c) -> float:
    return c["frequency_mhz"] * 1e6 if isinstance(c, dict) else c.frequency_hz


def _sky_fit(spec: dict[str, Any], inp: PlanInput) -> dict[str, Any] | None:
    """The sky layer's schedule table for the plan's channels, or None without a sky input."""
    if spec.get("sky") is None:
        return None
    from fieldkit.sky import sky_json

    sky_spec = dict(spec["sky"])
    sky_spec["channels_mhz"] = [round(f / 1e6, 6) for f in inp.channels_hz]
    if spec.get("schedule") is not None and "schedule" not in sky_spec:
        sky_spec["schedule"] = spec["schedule"]
    try:
        out = sky_json(sky_spec)
    except InputError as e:
        raise InputError(join("sky", e.field), e.detail, value=e.value) from None
    sched = out.get("schedule")
    if not sched or not sched.get("channels"):
        return None
    table = sorted(
        sched["channels"],
        key=lambda t: (
            t["hours_full"],
            t["score"],
            t["hours_below_fot"],
            t["mean_nvis_snr_db"] if t["mean_nvis_snr_db"] is not None else -999.0,
        ),
        reverse=True,
    )
    return {
        "rank": {round(t["frequency_mhz"], 6): i for i, t in enumerate(table)},
        "by_channel": {round(t["frequency_mhz"], 6): t for t in table},
        "schedule": {k: v for k, v in sched.items() if k != "channels"},
        "source": sorted(set(out.get("sky_source") or [])),
    }


def _channel_rank(sky: dict[str, Any] | None, f_hz: float) -> int:
    if sky is None:
        return 0
    return sky["rank"].get(round(f_hz / 1e6, 6), len(sky["rank"]))


def _summary(c) -> dict[str, Any]:
    """One line for an option not shown in full."""
    if isinstance(c, dict):
        form, f, used, score = c["form"], c["frequency_mhz"], c["supports_used"], c["score_db"]
    else:
        form, f, used, score = (
            c.layout.form,
            round(c.frequency_hz / 1e6, 6),
            list(c.layout.supports_used),
            c.score_db,
        )
    return {
        "form": form,
        "frequency_mhz": f,
        "supports_used": used,
        "score_db": round(score, 2),
        "note": "not worked out in full; ask for this form and channel alone to see its cut list and checks",
    }


def _refusal(layout, f: float, e: Exception) -> dict[str, Any]:
    return {
        "form": layout.form,
        "supports_used": list(layout.supports_used),
        "frequency_mhz": round(f / 1e6, 6),
        "why": str(e),
    }


def _attach_retrim(options: list[dict[str, Any]], inp: PlanInput) -> None:
    r = inp.retrim
    for opt in options:
        if abs(opt["frequency_mhz"] * 1e6 - r["target_hz"]) > 1.0 or opt["form"] != r.get(
            "form", opt["form"]
        ):
            continue
        opt["retrim"] = retrim(
            opt["_resonance"],
            target_hz=r["target_hz"],
            leg_now_m=r.get("leg_now_m"),
            dip_hz=r.get("dip_hz"),
            measured_at_hz=r.get("at_hz"),
            measured_r_ohm=r.get("r_ohm"),
            measured_x_ohm=r.get("x_ohm"),
        )


def _no_layout_reason(inp: PlanInput) -> str:
    safe = [s for s in inp.supports if not s.unsafe]
    if len(safe) < 2 and not inp.masts:
        return (
            "need at least two safe supports, a safe tree tall enough for an inverted-V apex "
            "(5 m or more), or a mast in kit.masts"
        )
    return "the supports are too low: every rope height is under the 3 m minimum end height"
