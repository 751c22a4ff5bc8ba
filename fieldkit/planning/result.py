"""The plan's JSON, written once at the end from the typed options (the `fieldkit plan` contract)."""

from __future__ import annotations

from typing import Any

from fieldkit.antenna import native
from fieldkit.fields import Record, arr, nested, num, string
from fieldkit.planning.inputs import PlanInput
from fieldkit.planning.records import FinishedOption, SkyFit
from fieldkit.planning.steps import plan_warnings
from fieldkit.rigging.cut import EngineCounter
from fieldkit.rigging.options import Refused
from fieldkit.rigging.rigged import RIGGED_OPTION, rigged_json
from fieldkit.safety.block import SAFETY_BLOCK

RANKING_WORDS = (
    "options that fail a safety check come after all others; then the channel that best covers "
    "the schedule (sky estimate, when the sky and schedule are given); then score = mean NVIS "
    "gain over the 0–300 km elevations minus feedline loss"
)
PLAN_OPTION = Record(
    "PlanOption",
    (
        *RIGGED_OPTION.fields,
        nested("safety", SAFETY_BLOCK, required=True),
        nested(
            "sky",
            description="the sky layer's schedule row for this channel (with a sky block)",
            nullable=True,
        ),
        nested("retrim", description="with a retrim input on this channel and form"),
    ),
    RIGGED_OPTION.description,
)
SUMMARY = Record(
    "PlanSummary",
    (
        string("form", required=True),
        num("frequency_mhz", "MHz", required=True),
        arr("supports_used", required=True, schema={"items": {"type": "string"}}),
        num("score_db", "dB", required=True),
        string("note", required=True),
    ),
    "an option not worked out in full",
)
REFUSED = Record(
    "PlanRefusal",
    (
        string("form", required=True),
        arr("supports_used", required=True, schema={"items": {"type": "string"}}),
        num("frequency_mhz", "MHz", required=True),
        string("why", required=True),
    ),
    "a form, supports and channel that cannot be done, and why",
)
PLAN_RESULT = Record(
    "PlanResult",
    (
        string("name", required=True, nullable=True),
        arr("options", PLAN_OPTION, required=True),
        arr("more", SUMMARY, required=True),
        arr("refused", REFUSED, required=True),
        arr("warnings", required=True, schema={"items": {"type": "string"}}),
        string("ranking", required=True),
        nested("sky", required=True, nullable=True),
        nested("engine", required=True, description="engine solves and seconds per phase"),
    ),
    "the `fieldkit plan` result",
)
NOT_IN_FULL_WORDS = (
    "not worked out in full; ask for this form and channel alone to see its cut list and checks"
)


def summary_json(c) -> dict[str, Any]:
    """One line for an option not shown in full (a candidate or a finished option)."""
    return SUMMARY.written(
        {
            "form": c.form,
            "frequency_mhz": round(c.frequency_hz / 1e6, 6),
            "supports_used": list(c.supports_used),
            "score_db": round(c.score_db, 2),
            "note": NOT_IN_FULL_WORDS,
        }
    )


def option_json(
    o: FinishedOption,
    inp: PlanInput,
    sky: SkyFit | None,
    *,
    retrim: dict[str, Any] | None = None,
) -> dict[str, Any]:
    """One option of the contract: rigging fields, warnings, safety block, sky row, re-trim."""
    out = rigged_json(o.rigged, inp.kit)
    out["warnings"] = list(o.warnings)
    out["safety"] = o.safety.to_json()
    if sky is not None:
        out["sky"] = o.sky_row if o.sky_row is not None else sky.row(o.frequency_hz)
    if retrim is not None:
        out["retrim"] = retrim
    return PLAN_OPTION.written(out)


def _sky_json(sky: SkyFit) -> dict[str, Any]:
    out: dict[str, Any] = {"schedule": sky.schedule, "source": list(sky.source)}
    if sky.ceiling is not None:
        out["nvis_ceiling"] = {
            "frequency_mhz": round(sky.ceiling[0], 2),
            "hour_utc": sky.ceiling[1],
        }
    return out


def engine_json(engine: EngineCounter, times: dict[str, float], total_s: float) -> dict[str, Any]:
    """What the plan cost: engine solves, seconds per phase, and which kernels ran ("compiled", or
    "numpy" when the C kernels are not built: the same numbers, slower; fieldkit/antenna/native)."""
    return {
        "kernels": "compiled" if native.compiled() else "numpy",
        "solve_calls": engine.calls,
        "frequencies_solved": engine.frequencies,
        "solutions_reused": engine.reused,
        **{k: round(v, 3) for k, v in times.items()},
        "total_seconds": round(total_s, 3),
    }


def plan_json(
    inp: PlanInput,
    *,
    shown: tuple[FinishedOption, ...],
    more: list[dict[str, Any]],
    refused: tuple[Refused, ...],
    sky: SkyFit | None,
    engine: dict[str, Any],
    retrims: tuple[dict[str, Any] | None, ...] = (),
) -> dict[str, Any]:
    """The plan result of ARCHITECTURE.md (``retrims``: each shown option's re-trim block)."""
    return PLAN_RESULT.written(
        {
            "name": inp.name,
            "options": [
                option_json(o, inp, sky, retrim=r)
                for o, r in zip(shown, retrims or (None,) * len(shown), strict=True)
            ],
            "more": more,
            "refused": [REFUSED.written(r.to_json()) for r in refused],
            "warnings": list(plan_warnings(inp, sky)),
            "ranking": RANKING_WORDS,
            "sky": None if sky is None else _sky_json(sky),
            "engine": engine,
        }
    )
