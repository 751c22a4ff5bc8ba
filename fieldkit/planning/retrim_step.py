"""The re-trim step: the plan's measurement worked out on each shown option it applies to."""

from __future__ import annotations

from typing import Any

from fieldkit.planning.inputs import PlanInput
from fieldkit.planning.records import FinishedOption, Workbench
from fieldkit.planning.retrim_input import Retrim
from fieldkit.rigging.measured import measured_retrim


def retrim_applies(r: Retrim, o: FinishedOption) -> bool:
    """The measurement is for this option's channel (and form, when it names one)."""
    same_channel = abs(round(o.frequency_hz / 1e6, 6) * 1e6 - r.target_hz) <= 1.0
    return same_channel and (r.form is None or r.form == o.form)


def retrim_options(
    shown: tuple[FinishedOption, ...], inp: PlanInput, bench: Workbench
) -> tuple[dict[str, Any] | None, ...]:
    """The ``retrim`` block of each shown option (None where the measurement does not apply)."""
    r = inp.retrim
    if r is None:
        return tuple(None for _ in shown)
    out = []
    for o in shown:
        if not retrim_applies(r, o):
            out.append(None)
            continue
        block = measured_retrim(
            o.rigged.resonance,
            target_hz=r.target_hz,
            leg_now_m=r.leg_now_m,
            reading=r.reading,
            coax=inp.kit.coax,
            engine=bench.engine,
            wire=inp.kit.wire,
            site_ground=inp.kit.ground_name,
        )
        if r.sweep_name is not None and "sweep" in block:
            block["sweep"]["name"] = r.sweep_name
        out.append(block)
    return tuple(out)
