"""Run one layout's height sweep the way the planner's screening does (tests only): parse the plan
input, make the site's layouts with its limits, find a screening leg near resonance, then sweep
(:func:`fieldkit.rigging.height_search.sweep_layout`) with the engine, one frequency per height."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from fieldkit.constants import SPEED_OF_LIGHT_M_S
from fieldkit.planning.inputs import parse_plan
from fieldkit.rigging.clearing import SiteLimits
from fieldkit.rigging.cut import EngineCounter
from fieldkit.rigging.height_search import LayoutSweep, sweep_layout
from fieldkit.rigging.layouts import Layout, site_layouts
from fieldkit.rigging.options import Warm, _build, _resonate_at


@dataclass
class Swept:
    sweep: LayoutSweep
    layout: Layout
    leg_m: float
    inp: Any
    engine: EngineCounter
    wavelength_m: float

    @property
    def best(self):
        return max(self.sweep.points, key=lambda p: p.nvis_dbi)

    @property
    def chosen(self):
        return self.sweep.points[self.sweep.pick]

    def hung(self, setting):
        return self.layout.build(setting, self.leg_m)


def swept(spec_obj, form: str, *, limits: dict | None = None, index: int = 0) -> Swept:
    inp = parse_plan(spec_obj)
    lim = SiteLimits.for_supports(
        inp.supports, rope_length_m=inp.kit.rope_length_m, **(limits or {})
    )
    layouts = [
        lay
        for lay in site_layouts(inp.supports, inp.masts, inp.kit.mech, forms={form}, limits=lim)
        if lay.form == form and lay.blocked is None
    ]
    lay = layouts[index]
    f = inp.channels_hz[0]
    engine, warm = EngineCounter(), Warm({})
    _resonate_at(lay, lay.setting_for(lay.start()), f, inp.kit, engine, warm, screening=True)
    leg = warm.guess(f)[0]
    lam = SPEED_OF_LIGHT_M_S / f
    sw = sweep_layout(
        lay,
        build=lambda s: _build(lay, s, leg, f),
        solve=lambda h: engine.solve(h, inp.kit.wire, frequencies_hz=[f], ground=inp.kit.ground)[0],
        wavelength_m=lam,
        ground_name=inp.kit.ground_name,
    )
    return Swept(sw, lay, leg, inp, engine, lam)
