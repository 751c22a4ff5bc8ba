"""``plan(spec, *, report=None)``: the one place that composes rigging, sky and safety.

site + kit + channels → every layout the site allows (pairs of safe supports flat or sloping, an
inverted-V on each kit mast or from the highest branch) → the sky layer's schedule fit per channel
(when ``sky`` is given) → height sweeps with the engine (every layout on the best channel, the best
two on the others; :mod:`fieldkit.rigging`) → for the best few: resonance, cut list, SWR, mast,
feedline, and the safety findings (:mod:`fieldkit.safety`) → options best first. An option whose
safety findings say it may not be raised is never first.
"""

from __future__ import annotations

import time
from typing import Any

from fieldkit.errors import InputError
from fieldkit.planning.inputs import PlanInput, parse_plan
from fieldkit.planning.records import Progress, Report, Workbench
from fieldkit.planning.result import engine_json, plan_json, summary_json
from fieldkit.planning.retrim_step import retrim_options
from fieldkit.planning.steps import (
    MAX_OPTIONS,
    Finishing,
    Screening,
    find_layouts,
    finish_options,
    fit_options_to_sky,
    fit_sky,
    link_layouts,
    rank,
    sweep_heights,
)


def _screen(inp: PlanInput, bench: Workbench, t0: float):
    """Layouts, the sky fit and the height sweeps (or a linked dipole worked out in full)."""
    bench.progress.at("layouts", 0, 2)
    layouts = find_layouts(inp)
    bench.progress.at("layouts", 1, 2)
    if inp.form == "linked":
        return None, link_layouts(layouts, inp, bench)
    t1 = time.perf_counter()
    sky = fit_sky(inp)
    bench.times["sky_s"] = time.perf_counter() - t1
    bench.progress.at("layouts", 2, 2)
    return sky, sweep_heights(layouts, inp, bench, sky)


def _nothing_hangs(screening: Screening) -> InputError:
    whys = "; ".join(sorted({r.why for r in screening.refused}))
    return InputError("site", f"nothing can be hung with this site and kit: {whys}")


def _result(inp, bench, sky, screening: Screening, finishing: Finishing, t0: float) -> dict:
    bench.progress.at("result", 0, 1)
    found, sky = fit_options_to_sky(finishing.options, sky)
    options = rank(found, sky)
    retrims = retrim_options(options[:MAX_OPTIONS], inp, bench)
    more = [summary_json(o) for o in options[MAX_OPTIONS:]]
    more += [summary_json(c) for c in finishing.rest]
    out = plan_json(
        inp,
        shown=options[:MAX_OPTIONS],
        more=more,
        refused=screening.refused + finishing.refused,
        sky=sky,
        engine=engine_json(bench.engine, bench.times, time.perf_counter() - t0),
        retrims=retrims,
    )
    bench.progress.at("result", 1, 1)
    return out


def plan(spec: Any, *, report: Report | None = None) -> dict:
    """Plan the cut and the hang for a site, a kit and channels.

    Parameters
    ----------
    spec : dict
        The plan input of ARCHITECTURE.md (site, channels_mhz, form, kit, radio, optional sky,
        schedule, name, limit_set, retrim).
    report : callable, optional
        ``report(stage, done, total)``, called at every step boundary and before every engine solve
        and safety check, with ``stage`` one of :data:`fieldkit.planning.STAGES` in that order and
        ``done <= total``. It may raise any exception to stop the plan: the exception propagates
        unchanged. Without it the plan is the same.

    Returns
    -------
    dict
        ``options`` best first (each with the contract fields, ``safety`` included), ``more`` (one
        line per option not worked out in full), ``refused`` (what could not be done and why),
        ``warnings``, ``engine`` (cost figures).

    Raises
    ------
    fieldkit.errors.InputError
        For bad input, and when nothing at all can be hung (the message says why and what to change).
    """
    t0 = time.perf_counter()
    bench = Workbench(Progress(report))
    bench.progress.at("layouts", 0, 2)
    inp = parse_plan(spec)
    sky, screening = _screen(inp, bench, t0)
    bench.times["screen_s"] = time.perf_counter() - t0 - bench.times["sky_s"]
    if not screening.candidates:
        raise _nothing_hangs(screening)
    finishing = finish_options(screening.candidates, inp, bench, sky)
    return _result(inp, bench, sky, screening, finishing, t0)
