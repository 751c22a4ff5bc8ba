"""Evaluate a layout at a channel with the engine: resonance, height sweep, cut list, SWR, loads.

Engine budget per layout and channel: the plan's first resonance (2–3 calls of 2 frequencies,
stopped at 0.5 %), one single-frequency solve per swept height at a leg scaled from it (the gain
pattern hardly changes with a few kHz of detuning; a coarse grid 0.05 wavelength apart over each
axis and 0–3 refinement points), a resonance at the recommended heights (usually 1–2 calls,
warm-started) and one SWR curve.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from fieldkit.constants import SPEED_OF_LIGHT_M_S
from fieldkit.readable import feet_text, given_both, length_both, whole_both
from fieldkit.rigging.catenary import HangError
from fieldkit.rigging.cut import (
    CURVE_OFFSETS,
    EngineCounter,
    Resonance,
    ResonanceError,
    bare_wire_leg_m,
    resonate,
    rule_of_thumb_leg_m,
    swr_sweep,
    wire_needed_m,
)
from fieldkit.rigging.feed_advice import feedline_words
from fieldkit.rigging.feedline import Coax, total_loss_db
from fieldkit.rigging.height_search import sweep_layout
from fieldkit.rigging.heights import HeightPoint, point_from_solution
from fieldkit.rigging.hung import HungDipole, recut
from fieldkit.rigging.layouts import Layout, Mechanics
from fieldkit.rigging.loads import (
    Loads,
    Strength,
    guy_words,
    rope_words,
    span_loads,
    support_words,
    vee_loads,
    wire_words,
)
from fieldkit.rigging.mast import MastLoad
from fieldkit.rigging.rigged import RiggedOption, end_rope_m, rope_needed_m
from fieldkit.rigging.wire import KitWire

# The insulated wire resonates a few percent shorter than bare wire; start the search there.
FIRST_GUESS_FRACTION = 0.95
# The screening leg only has to be near resonance: the NVIS pattern of a dipole half a percent off
# resonance is the same to hundredths of a dB (the feed reactance changes, the current shape hardly),
# and the exact cut is found again at the chosen heights.
SCREEN_TOLERANCE = 5e-3


class Refusal(Exception):
    """This layout cannot serve this channel; the message says why in plain words."""


@dataclass(frozen=True)
class Refused:
    """A layout at a channel that cannot be done, and why (an entry of the plan's ``refused``)."""

    form: str
    supports_used: tuple[str, ...]
    frequency_hz: float
    why: str

    @classmethod
    def of(cls, layout: Layout, frequency_hz: float, e: Exception, form: str | None = None):
        return cls(form or layout.form, tuple(layout.supports_used), frequency_hz, str(e))

    def to_json(self) -> dict[str, Any]:
        return {
            "form": self.form,
            "supports_used": list(self.supports_used),
            "frequency_mhz": round(self.frequency_hz / 1e6, 6),
            "why": self.why,
        }


@dataclass(frozen=True)
class Kit:
    """What the evaluation needs from the plan input."""

    wire: KitWire
    mech: Mechanics
    coax: Coax
    rope_length_m: float | None
    wrap_allowance_m: float
    ground: Any
    ground_name: str
    strength: Strength | None = None


@dataclass
class Warm:
    """Resonances found so far, to warm-start the next search: frequency -> (leg, sensitivity)."""

    by_frequency: dict[float, tuple[float, float]]
    jacket_ratio: dict[float, float | None] = field(default_factory=dict)  # jacketed/bare leg
    reactance_slope: dict[float, float] = field(default_factory=dict)  # dX/df at resonance [Ω/Hz]

    def slope(self, f: float) -> float | None:
        """dX/df near resonance, from this channel or the nearest one (scaled as 1/f: Q ≈ const)."""
        if f in self.reactance_slope:
            return self.reactance_slope[f]
        if not self.reactance_slope:
            return None
        g = min(self.reactance_slope, key=lambda k: abs(math.log(k / f)))
        return self.reactance_slope[g] * g / f

    def guess(self, f: float) -> tuple[float, float | None]:
        if f in self.by_frequency:
            return self.by_frequency[f]
        if self.by_frequency:
            g = min(self.by_frequency, key=lambda k: abs(math.log(k / f)))
            leg, sens = self.by_frequency[g]
            return leg * g / f, sens * (f / g) ** 2  # f·L ≈ const: df/dL scales as f²
        return FIRST_GUESS_FRACTION * rule_of_thumb_leg_m(f), None


def max_chord_m(frequency_hz: float) -> float:
    """Longest polyline piece that the engine cuts into one segment at the highest frequency solved
    for a channel (the top of the SWR curve) [m]."""
    from fieldkit.antenna.mesh import SEGMENTS_PER_WAVELENGTH

    f_top = frequency_hz * (1 + max(CURVE_OFFSETS))
    return SPEED_OF_LIGHT_M_S / f_top / SEGMENTS_PER_WAVELENGTH * (1 - 1e-3)


def _build(
    layout: Layout, setting: dict[str, float], leg_m: float, f: float, exact: bool = False
) -> HungDipole:
    """The layout hung at this leg, its polyline cut to the engine's segment length at channel f
    (``exact``: the cut's own leg, which may exceed the rope or the clearing a little)."""
    hang = layout.hang if exact and layout.hang is not None else layout.build
    return recut(hang(setting, leg_m), max_chord_m=max_chord_m(f))


def _resonate_at(
    layout: Layout,
    setting: dict[str, float],
    f: float,
    kit: Kit,
    engine,
    warm: Warm,
    leg_guess_m: float | None = None,
    screening: bool = False,
) -> Resonance:
    leg, sens = warm.guess(f)
    if leg_guess_m is not None:
        leg = leg_guess_m
    try:
        res = resonate(
            lambda L: _build(layout, setting, L, f, exact=not screening),
            engine=engine,
            wire=kit.wire,
            ground=kit.ground,
            frequency_hz=f,
            leg_guess_m=leg,
            sensitivity_guess_hz_per_m=sens,
            **({"tolerance": SCREEN_TOLERANCE, "exact_slope": False} if screening else {}),
        )
    except (HangError, ResonanceError) as e:
        raise Refusal(str(e)) from None
    if screening and f in warm.by_frequency:  # keep an exact resonance over a screening one
        return res
    warm.by_frequency[f] = (res.leg_m, res.dfres_dleg_hz_per_m)
    warm.reactance_slope[f] = res.dx_df_ohm_per_hz
    return res


@dataclass(frozen=True)
class Screened:
    """A layout at a channel after the height sweep: enough to rank it, before the exact cut."""

    layout: Layout
    frequency_hz: float
    points: tuple[HeightPoint, ...]
    pick: int
    why: str
    leg_m: float
    score_db: float

    @property
    def chosen(self) -> dict[str, float]:
        return self.points[self.pick].rope_heights_m


def screen(
    layout: Layout,
    *,
    frequency_hz: float,
    kit: Kit,
    engine: EngineCounter,
    warm: Warm,
    only: dict[str, float] | None = None,
    swept_at_hz: float | None = None,
) -> Screened:
    """Sweep the layout's rope heights at a near-resonant leg length (one frequency per height).

    Each axis of the layout (a flat pair's ropes, a sloping pair's higher rope, an inverted-V's apex
    and then its ends) is swept over its whole range, from the minimum end height to the support's
    limit, the kit's rope and the clearing (:func:`fieldkit.rigging.height_search.sweep_layout`):
    a coarse grid 0.05 wavelength apart and parabolic steps around the peak.

    The leg comes from the nearest resonance already found (same channel on another layout, or another
    channel scaled by f·L ≈ const, within a percent or two); only the very first screen solves a
    resonance. The gain pattern of a dipole a percent off resonance is the same to a few hundredths of
    a dB.

    ``only`` restricts the sweep to one setting: a channel within a few percent of one already swept on
    this layout keeps that channel's chosen heights (heights in wavelengths differ by that few percent;
    the figure of merit by a few hundredths of a dB) — ``swept_at_hz`` records which.

    Raises
    ------
    Refusal
        When the site rules the layout out, the wire cannot hang here at any setting or the spool is
        clearly short.
    """
    f = frequency_hz
    if layout.blocked is not None:
        raise Refusal(layout.blocked)
    spool = kit.wire.spool_m
    rough = 2 * (FIRST_GUESS_FRACTION * rule_of_thumb_leg_m(f) * 0.95 + 2 * kit.wrap_allowance_m)
    if spool is not None and rough > spool:  # clearly short: say so before any engine work
        raise Refusal(
            f"wire spool too short: a {f / 1e6:g} MHz dipole needs about {length_both(rough)} of "
            f"wire, the spool holds {given_both(spool)}"
        )
    if not warm.by_frequency:  # nothing to scale from yet: one resonance to start the chain
        _seed(layout, f, kit, engine, warm)
    leg = warm.guess(f)[0]

    def build(setting: dict[str, float]) -> HungDipole:
        return _build(layout, setting, leg, f)

    def solve(hung: HungDipole):
        return engine.solve(hung, kit.wire, frequencies_hz=[f], ground=kit.ground)[0]

    if only is not None:
        try:
            hung = build(dict(only))
        except HangError as e:
            raise Refusal(str(e)) from None
        points = (
            point_from_solution(
                solve(hung), rope_heights_m=dict(only), feedpoint_height_m=hung.feedpoint_height_m
            ),
        )
        pick = 0
        why = (
            f"heights as swept at {swept_at_hz / 1e6:g} MHz on this layout (within a few percent "
            "of this channel)"
        )
    else:
        try:
            sweep = sweep_layout(
                layout,
                build=build,
                solve=solve,
                wavelength_m=SPEED_OF_LIGHT_M_S / f,
                ground_name=kit.ground_name,
            )
        except HangError as e:
            raise Refusal(_short_span_words(layout, f, warm) or str(e)) from None
        points, pick, why = sweep.points, sweep.pick, sweep.why
    # rank by the NVIS figure less the feedline loss at the resistance the dipole shows at resonance
    loss = total_loss_db(matched_loss_db=kit.coax.matched_loss_db(f), swr=points[pick].swr_estimate)
    return Screened(layout, f, tuple(points), pick, why, leg, points[pick].nvis_dbi - loss)


def _seed(layout: Layout, f: float, kit: Kit, engine: EngineCounter, warm: Warm) -> None:
    """The plan's first resonance, on this layout: at its start setting, else its coarse settings
    from the top down (stopped at 0.5 %: it only has to give the screening leg)."""
    tries = [layout.setting_for(layout.start())] if layout.setting_for else []
    tries += list(reversed(layout.settings))
    last = "cannot hang"
    for setting in tries:
        try:
            _resonate_at(layout, setting, f, kit, engine, warm, screening=True)
            return
        except Refusal as e:
            last = str(e)
    raise Refusal(_short_span_words(layout, f, warm) or last)


def _short_span_words(layout: Layout, f: float, warm: Warm) -> str | None:
    """The plain answer when two supports are too close for the channel, else None."""
    if layout.span_m is None:
        return None
    need = 2 * warm.guess(f)[0]
    if layout.span_m >= need:
        return None
    a, b = layout.supports_used
    return (
        f"{whole_both(layout.span_m)} between {a} and {b}; a {f / 1e6:g} MHz dipole needs about "
        f"{whole_both(need)}: drooping the ends would bring them below "
        f"{given_both(layout.min_end_height_m)} here, so use an inverted-V on "
        "a mast, or choose a higher channel"
    )


def evaluate(
    layout: Layout, *, frequency_hz: float, kit: Kit, engine: EngineCounter, warm: Warm
) -> RiggedOption:
    """Screen and finish in one step (see :func:`screen` and :func:`finish`)."""
    return finish(
        screen(layout, frequency_hz=frequency_hz, kit=kit, engine=engine, warm=warm),
        kit=kit,
        engine=engine,
        warm=warm,
    )


def _leg_guess(sc: Screened, warm: Warm) -> float:
    """A Newton step from the screening solve at the chosen heights (its X and the known slopes),
    so that the first engine call of the exact search usually lands within tolerance [m]."""
    f, p = sc.frequency_hz, sc.points[sc.pick]
    slope, (_, sens) = warm.slope(f), warm.guess(f)
    if slope and sens and np.isfinite(p.reactance_ohm):
        fr = f - p.reactance_ohm / slope
        step = (f - fr) / sens
        if abs(step) < 0.05 * sc.leg_m:
            return sc.leg_m + step
    return sc.leg_m


def _bare_leg_m(res: Resonance, *, kit: Kit, engine: EngineCounter, warm: Warm) -> float | None:
    """The leg a bare wire would need, for the jacket's share of the 143/f difference [m].

    The jacket's share of the length hardly depends on the hang or the channel (it goes with ln(b/a)
    against ln(wavelength/a)): one bare-wire solve, on the first option worked out.
    """
    if kit.wire.insulation_thickness_m <= 0:
        return None
    if not warm.jacket_ratio:
        f = res.solution.frequency_hz
        try:
            bare = bare_wire_leg_m(res, engine=engine, wire=kit.wire, ground=kit.ground)
            warm.jacket_ratio[f] = res.leg_m / bare
        except ResonanceError:
            warm.jacket_ratio[f] = None
    ratio = next(iter(warm.jacket_ratio.values()))
    return res.leg_m / ratio if ratio else None


def _spool_words(res: Resonance, f: float, kit: Kit) -> list[str]:
    """A warning when the spool covers the cut list but not the spare.

    Raises
    ------
    Refusal
        When the spool does not hold the cut list.
    """
    spool = kit.wire.spool_m
    if spool is None:
        return []
    need, spare_need = wire_needed_m(leg_m=res.leg_m, wrap_allowance_m=kit.wrap_allowance_m)
    if need > spool:
        raise Refusal(
            f"wire spool too short: the {f / 1e6:g} MHz dipole needs {length_both(need)} of wire, "
            f"{length_both(spare_need)} cut long, but the spool holds {given_both(spool)}"
        )
    if spare_need > spool:
        return [
            f"the spool of {given_both(spool)} holds both legs but not the full cut-long spare: the cut "
            "instruction keeps the spare the spool leaves; trim carefully"
        ]
    return []


def _rope_words(layout: Layout, hung: HungDipole, chosen: dict[str, float], kit: Kit) -> list[str]:
    need = round(rope_needed_m(layout, hung, chosen), 1)
    if not need or kit.rope_length_m is None or need <= kit.rope_length_m:
        return []
    shown = f"{need:.1f}" if need - kit.rope_length_m < 2.0 else f"{need:.0f}"
    return [
        f"rope short: this hang needs about {shown} m ({feet_text(need)}) of rope "
        f"({'halyards' if layout.mast is None else 'stake ropes'}), the kit has "
        f"{kit.rope_length_m:g} m ({feet_text(kit.rope_length_m)}): use the throw lines for the "
        "tie-offs or add rope"
    ]


def _droop_words(layout: Layout, res: Resonance, f: float) -> list[str]:
    if layout.span_m is None or res.hung.tail_m <= 0:
        return []
    a, b = layout.supports_used
    return [
        f"{whole_both(layout.span_m)} between {a} and {b}; a "
        f"{f / 1e6:g} MHz dipole needs about {whole_both(2 * res.leg_m)}: the ends droop toward stakes as modelled, "
        "or use an inverted-V on a mast, or choose a higher channel"
    ]


def _mast_load(layout: Layout, hung: HungDipole, loads: Loads | None) -> MastLoad | None:
    """The centre mast's load.

    Raises
    ------
    Refusal
        When the mast cannot carry it.
    """
    if layout.mast is None:
        return None
    guys = () if loads is None else loads.guys_n
    load = MastLoad(layout.mast, hung.feedpoint_height_m, hung.top_load_n, guys_n=guys)
    if not load.ok:
        raise Refusal(load.why)
    return load


def option_loads(layout: Layout, hung: HungDipole, kit: Kit, setting) -> Loads | None:
    """What the supports, wire, ropes and guys carry (None when the kit has no strength figures)."""
    if kit.strength is None:
        return None
    if layout.form == "inverted-v":
        stake = end_rope_m(hung, setting)
        return vee_loads(layout, hung, kit.mech, kit.strength, stake_rope_m=stake)
    return span_loads(layout, hung, kit.mech, kit.strength, setting)


def strength_words(layout: Layout, loads: Loads | None, kit: Kit) -> list[str]:
    """Plain-words findings of the strength checks (wire, rope and weak link, branches, guys)."""
    if loads is None or kit.strength is None:
        return []
    st = kit.strength
    ropes = "stake ropes" if layout.form == "inverted-v" else "halyards"
    if layout.form == "inverted-v" and layout.mast is None:
        ropes = "stake ropes and the apex halyard"
    return [
        *wire_words(loads, st),
        *rope_words(loads, st, ropes=ropes),
        *support_words(loads, st),
        *guy_words(loads, layout.mast, st),
    ]


def finish(sc: Screened, *, kit: Kit, engine: EngineCounter, warm: Warm) -> RiggedOption:
    """The option (without its safety findings): exact resonance at the chosen heights, cut list,
    SWR curve, mast, feedline, loads and warnings.

    Raises
    ------
    Refusal
        When the spool is short or the mast is too weak.
    """
    layout, f = sc.layout, sc.frequency_hz
    res = _resonate_at(layout, sc.chosen, f, kit, engine, warm, leg_guess_m=_leg_guess(sc, warm))
    curve = swr_sweep(res, engine=engine, wire=kit.wire, ground=kit.ground)
    bare_leg = _bare_leg_m(res, kit=kit, engine=engine, warm=warm)
    hung = res.hung
    warnings = [*hung.notes, *layout.notes, *_spool_words(res, f, kit)]
    if layout.advice is not None:
        warnings += layout.advice(hung)
    warnings += _rope_words(layout, hung, sc.chosen, kit)
    warnings = _droop_words(layout, res, f) + warnings
    loads = option_loads(layout, hung, kit, sc.chosen)
    warnings += strength_words(layout, loads, kit)
    mast = _mast_load(layout, hung, loads)
    swr = float(res.solution.swr)
    loss = total_loss_db(matched_loss_db=kit.coax.matched_loss_db(f), swr=swr)
    warnings += feedline_words(kit.coax, frequency_hz=f, swr=swr)
    if curve.width_khz == 0.0:
        warnings.append(
            "SWR stays above 2 near the channel: use a tuner or matching at the feedpoint"
        )
    return RiggedOption(
        layout=layout,
        frequency_hz=f,
        points=sc.points,
        pick=sc.pick,
        why=sc.why,
        resonance=res,
        bare_leg_m=bare_leg,
        swr_curve=curve,
        mast=mast,
        feed_loss_db=loss,
        warnings=tuple(warnings),
        loads=loads,
    )
