"""The planning layer: one typed pipeline from the plan input to the plan's JSON.

Public API
----------
plan(spec, *, report=None) -> dict
    The `fieldkit plan` contract (ARCHITECTURE.md); ``report(stage, done, total)`` sees the
    :data:`STAGES` in order and may raise to stop the plan.
parse_plan(spec) -> PlanInput
    The input decoded once, at the edge (every error names its field).

Records (frozen dataclasses, SI units)
--------------------------------------
PlanInput, PlanSchedule, Retrim                 the decoded input (:mod:`.inputs`, :mod:`.kit_input`)
Candidate                                       a layout at a channel after its height sweep
FinishedOption                                  rigging (RiggedOption) + safety (SafetyResult) + warnings
SkyFit                                          the sky layer's schedule table for the plan's channels

Steps (:mod:`.steps`), in the order :func:`plan` runs them
-----------------------------------------------------------
find_layouts(inp) -> tuple[Layout, ...]
fit_sky(inp) -> SkyFit | None
sweep_heights(layouts, inp, bench, sky) -> Screening     (link_layouts for a linked dipole)
finish_options(candidates, inp, bench, sky) -> Finishing  (finish + check_safety per option)
rank(options, sky) -> tuple[FinishedOption, ...]
plan_json(inp, shown=, more=, refused=, sky=, engine=) -> dict   (:mod:`.result`, the one JSON writer)
"""

from fieldkit.planning.inputs import FORMS, PlanInput, PlanSchedule, Retrim, parse_plan
from fieldkit.planning.pipeline import plan
from fieldkit.planning.records import (
    STAGES,
    Candidate,
    FinishedOption,
    Progress,
    Report,
    SkyFit,
    Workbench,
)
from fieldkit.planning.steps import (
    Finishing,
    Screening,
    check_safety,
    find_layouts,
    finish_options,
    fit_sky,
    link_layouts,
    rank,
    sweep_heights,
)

__all__ = [
    "FORMS",
    "STAGES",
    "Candidate",
    "Finishing",
    "FinishedOption",
    "PlanInput",
    "PlanSchedule",
    "Progress",
    "Report",
    "Retrim",
    "Screening",
    "SkyFit",
    "Workbench",
    "check_safety",
    "find_layouts",
    "finish_options",
    "fit_sky",
    "link_layouts",
    "parse_plan",
    "plan",
    "rank",
    "sweep_heights",
]
