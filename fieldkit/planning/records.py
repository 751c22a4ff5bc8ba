"""The typed values that pass between the plan's steps, and the plan's progress report."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

from fieldkit.rigging.cut import EngineCounter
from fieldkit.rigging.layouts import Layout
from fieldkit.rigging.options import Screened, Warm
from fieldkit.rigging.rigged import RiggedOption
from fieldkit.safety.block import SafetyResult

#: The stages of :func:`fieldkit.planning.plan`, in the order the report sees them.
STAGES = ("layouts", "height sweeps", "resonance", "safety", "result")

Report = Callable[[str, int, int], None]


@dataclass(frozen=True)
class Candidate:
    """A layout at a channel, ranked by its score before the exact cut.

    A candidate comes from the height sweep (``screened``) or, for a linked dipole, already worked
    out in full (``rigged``): exactly one of the two is set.
    """

    layout: Layout
    frequency_hz: float
    score_db: float
    screened: Screened | None = None
    rigged: RiggedOption | None = None

    @classmethod
    def of_sweep(cls, sc: Screened) -> Candidate:
        return cls(sc.layout, sc.frequency_hz, sc.score_db, screened=sc)

    @classmethod
    def of_rigged(cls, r: RiggedOption) -> Candidate:
        return cls(r.layout, r.frequency_hz, r.score_db, rigged=r)

    @property
    def form(self) -> str:
        return self.rigged.form if self.rigged is not None else self.layout.form

    @property
    def supports_used(self) -> tuple[str, ...]:
        return self.layout.supports_used


@dataclass(frozen=True)
class FinishedOption:
    """An option worked out in full: the rigging (resonance, hung wire, cut, SWR, mast, feedline),
    its safety findings, and every warning it shows."""

    rigged: RiggedOption
    safety: SafetyResult
    warnings: tuple[str, ...]
    sky_row: dict[str, Any] | None = None  # its channel's schedule row with its own antenna gain

    @property
    def frequency_hz(self) -> float:
        return self.rigged.frequency_hz

    @property
    def form(self) -> str:
        return self.rigged.form

    @property
    def supports_used(self) -> tuple[str, ...]:
        return self.rigged.layout.supports_used

    @property
    def score_db(self) -> float:
        return self.rigged.score_db

    @property
    def raise_ok(self) -> bool:
        return self.safety.raise_ok


@dataclass(frozen=True)
class SkyFit:
    """The sky layer's schedule table for the plan's channels.

    Attributes
    ----------
    rank : channel [MHz, 6 decimals] → place in the schedule table (0 = covers the window best)
    by_channel : channel → its row of the sky layer's schedule table (JSON)
    schedule : the sky layer's schedule summary (JSON, without the channel rows)
    source : where the sky numbers came from
    context : the sky estimate, to work out reach again with an option's own antenna gain
    ceiling : the day's highest NVIS frequency [MHz] and its hour (largest foF2)
    """

    rank: dict[float, int]
    by_channel: dict[float, dict[str, Any]]
    schedule: dict[str, Any]
    source: tuple[str, ...]
    context: Any = None
    ceiling: tuple[float, int] | None = None

    def rank_of(self, frequency_hz: float) -> int:
        return self.rank.get(round(frequency_hz / 1e6, 6), len(self.rank))

    def row(self, frequency_hz: float) -> dict[str, Any] | None:
        return self.by_channel.get(round(frequency_hz / 1e6, 6))


def channel_rank(sky: SkyFit | None, frequency_hz: float) -> int:
    """Place of a channel in the sky's schedule table (0 for every channel without a sky)."""
    return 0 if sky is None else sky.rank_of(frequency_hz)


class Progress:
    """The plan's report: ``report(stage, done, total)`` at every step boundary and engine solve.

    Without a report every call is a no-op. The report may raise to stop the plan: the exception
    goes through unchanged (nothing here catches it, and the plan holds no lock or shared state).
    """

    def __init__(self, report: Report | None) -> None:
        self._report = report
        self.stage, self.done, self.total = STAGES[0], 0, 1

    def at(self, stage: str, done: int, total: int) -> None:
        """Enter or advance a stage and report it."""
        self.stage, self.done, self.total = stage, done, max(total, done)
        self.tick()

    def tick(self) -> None:
        """Report the current stage again (called before every engine solve)."""
        if self._report is not None:
            self._report(self.stage, self.done, self.total)


@dataclass
class Workbench:
    """What the steps of one plan share: the engine (with its store of solutions), the warm starts
    of the resonance searches, the progress report and the time spent per phase [s]."""

    progress: Progress
    engine: EngineCounter = field(default_factory=EngineCounter)
    warm: Warm = field(default_factory=lambda: Warm({}))
    times: dict[str, float] = field(default_factory=lambda: {"sky_s": 0.0})

    def __post_init__(self) -> None:
        self.engine.on_solve = self.progress.tick
