"""Evaluate a layout at a channel with the engine: resonance, height sweep, cut list, SWR, loads.

Engine budget per layout and channel: one resonance at the highest setting (2–3 calls of 2
frequencies; warm-started from a neighbouring channel), one single-frequency solve per other swept
height at that leg length (the gain pattern hardly changes with a few kHz of detuning), a second
resonance at the recommended height (usually 1–2 calls, warm-started) and one SWR curve.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from fieldkit.constants import SPEED_OF_LIGHT_M_S, STANDARD_GRAVITY_M_S2
from fieldkit.rigging.catenary import HangError
from fieldkit.rigging.cut import (
    CURVE_OFFSETS,
    EngineCounter,
    Resonance,
    ResonanceError,
    bare_wire_leg_m,
    cut_json,
    resonate,
    rule_of_thumb_leg_m,
    swr_curve,
)
from fieldkit.rigging.feedline import Coax, feedline_json, total_loss_db
from fieldkit.rigging.heights import (
    MIN_END_HEIGHT_M,
    WITHIN_BEST_DB,
    HeightPoint,
    nvis_figure_dbi,
    recommend,
    sweep_json,
)
from fieldkit.rigging.hung import HungDipole, recut
from fieldkit.rigging.layouts import Layout, Mechanics
from fieldkit.rigging.mast import mast_json
from fieldkit.rigging.supports import halyard_rope_m
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
class Kit:
    """What the evaluation needs from the plan input."""

    wire: KitWire
    mech: Mechanics
    coax: Coax
    rope_length_m: float | None
    wrap_allowance_m: float
    ground: Any
    ground_name: str


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


def max_chord_m(frequency_hz: float) -> float | None:
    """Longest polyline piece that the engine cuts into one segment at the highest frequency solved
    for a channel (the top of the SWR curve) [m]; None when the engine does not say its segment rule."""
    try:
        from fieldkit.antenna.mesh import SEGMENTS_PER_WAVELENGTH
    except ImportError:
        return None
    f_top = frequency_hz * (1 + max(CURVE_OFFSETS))
    return SPEED_OF_LIGHT_M_S / f_top / SEGMENTS_PER_WAVELENGTH * (1 - 1e-3)


def _build(layout: Layout, setting: dict[str, float], leg_m: float, f: float) -> HungDipole:
    """The layout hung at this leg, its polyline cut to the engine's segment length at channel f."""
    hung = layout.build(setting, leg_m)
    chord = max_chord_m(f)
    return hung if chord is None else recut(hung, max_chord_m=chord)


def _points(hung: HungDipole) -> list[list[float]]:
    return [[round(float(v), 3) for v in p] for p in hung.points_m]


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
            lambda L: _build(layout, setting, L, f),
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

    The leg comes from the nearest resonance already found (same channel on another layout, or another
    channel scaled by f·L ≈ const, within a percent or two); only the very first screen solves a
    resonance. The gain
    pattern of a dipole a percent off resonance is the same to a few hundredths of a dB.

    ``only`` restricts the sweep to one setting: a channel within a few percent of one already swept on
    this layout keeps that channel's chosen heights (heights in wavelengths differ by that few percent;
    the figure of merit by a few hundredths of a dB) — ``swept_at_hz`` records which.

    Raises
    ------
    Refusal
        When the wire cannot hang here at any setting or the spool is clearly short.
    """
    f = frequency_hz
    settings = list(layout.settings) if only is None else [dict(only)]
    spool = kit.wire.spool_m
    rough = 2 * (FIRST_GUESS_FRACTION * rule_of_thumb_leg_m(f) * 0.95 + 2 * kit.wrap_allowance_m)
    if spool is not None and rough > spool:  # clearly short: say so before any engine work
        raise Refusal(
            f"wire spool too short: a {f / 1e6:g} MHz dipole needs about {rough:.0f} m of wire, "
            f"the spool holds {spool:g} m"
        )
    seeded: dict[int, Any] = {}
    if not warm.by_frequency:  # nothing to scale from yet: one resonance to start the chain
        last = "cannot hang"
        for i in reversed(range(len(settings))):
            try:
                seeded[i] = _resonate_at(
                    layout, settings[i], f, kit, engine, warm, screening=True
                ).solution
                break
            except Refusal as e:
                last = str(e)
        if not seeded:
            raise Refusal(_short_span_words(layout, f, warm) or last)
    leg = warm.guess(f)[0]
    points: list[HeightPoint] = []
    seen_shapes: set[tuple[float, ...]] = set()
    last = "cannot hang"
    # from the top down; stop once the figure falls, and is already more than 0.3 dB below the best:
    # between 0.03 and 0.3 wavelength the NVIS figure has one peak in height, so nothing lower can
    # come back within 0.3 dB (REFERENCES.md, NEC-2 zenith gains versus height)
    for i in reversed(range(len(settings))):
        s = settings[i]
        if (
            len(points) >= 2
            and points[-1].nvis_dbi < points[-2].nvis_dbi
            and points[-1].nvis_dbi < max(p.nvis_dbi for p in points) - WITHIN_BEST_DB
        ):
            break
        try:
            hung = _build(layout, s, leg, f)
        except HangError as e:
            last = str(e)
            continue
        shape_key = (round(hung.feedpoint_height_m, 2), *(round(h, 2) for h in hung.end_heights_m))
        if shape_key in seen_shapes:  # two settings that hang the same way (e.g. ends clamped)
            continue
        seen_shapes.add(shape_key)
        sol = (
            seeded.get(i) or engine.solve(hung, kit.wire, frequencies_hz=[f], ground=kit.ground)[0]
        )
        points.append(
            HeightPoint(
                rope_heights_m=dict(s),
                feedpoint_height_m=hung.feedpoint_height_m,
                nvis_dbi=nvis_figure_dbi(sol),
                zenith_dbi=float(sol.zenith_gain_dbi),
                efficiency=float(sol.radiation_efficiency),
                resistance_ohm=float(sol.impedance_ohm.real),
                reactance_ohm=float(sol.impedance_ohm.imag),
            )
        )
    if not points:
        raise Refusal(_short_span_words(layout, f, warm) or last)
    points.sort(key=lambda p: p.feedpoint_height_m)
    pick, why = recommend(points, ground_name=kit.ground_name)
    if only is not None and swept_at_hz is not None:
        why = f"heights as swept at {swept_at_hz / 1e6:g} MHz on this layout (within a few percent of this channel)"
    # rank by the NVIS figure less the feedline loss at the resistance the dipole shows at resonance
    r = points[pick].resistance_ohm
    swr_est = max(r / 50.0, 50.0 / r)
    loss = total_loss_db(matched_loss_db=kit.coax.matched_loss_db(f), swr=swr_est)
    return Screened(layout, f, tuple(points), pick, why, leg, points[pick].nvis_dbi - loss)


def _short_span_words(layout: Layout, f: float, warm: Warm) -> str | None:
    """The plain answer when two supports are too close for the channel, else None."""
    if layout.span_m is None:
        return None
    need = 2 * warm.guess(f)[0]
    if layout.span_m >= need:
        return None
    a, b = layout.supports_used
    return (
        f"{layout.span_m:.0f} m between {a} and {b}; a {f / 1e6:g} MHz dipole needs about {need:.0f} m: "
        f"drooping the ends would bring them below {MIN_END_HEIGHT_M:g} m here, so use an inverted-V on "
        "a mast, or choose a higher channel"
    )


def evaluate(
    layout: Layout, *, frequency_hz: float, kit: Kit, engine: EngineCounter, warm: Warm
) -> dict[str, Any]:
    """Screen and finish in one step (see :func:`screen` and :func:`finish`)."""
    return finish(
        screen(layout, frequency_hz=frequency_hz, kit=kit, engine=engine, warm=warm),
        kit=kit,
        engine=engine,
        warm=warm,
    )


def finish(sc: Screened, *, kit: Kit, engine: EngineCounter, warm: Warm) -> dict[str, Any]:
    """The option (without its safety block): exact resonance at the chosen heights, cut list, SWR curve,
    mast, feedline, loads and warnings.

    Raises
    ------
    Refusal
        When the spool is short or the mast is too weak.
    """
    layout, f, chosen, points, pick, why = (
        sc.layout,
        sc.frequency_hz,
        sc.chosen,
        sc.points,
        sc.pick,
        sc.why,
    )
    spool = kit.wire.spool_m
    # Newton step from the screening solve at the chosen heights (its X and the known slopes), so
    # that the first engine call of the search usually lands within tolerance
    guess = sc.leg_m
    p = points[pick]
    slope, (_, sens) = warm.slope(f), warm.guess(f)
    if slope and sens and np.isfinite(p.reactance_ohm):
        fr = f - p.reactance_ohm / slope
        step = (f - fr) / sens
        if abs(step) < 0.05 * guess:
            guess = sc.leg_m + step
    res = _resonate_at(layout, chosen, f, kit, engine, warm, leg_guess_m=guess)
    sol, hung = res.solution, res.hung
    curve = swr_curve(res, engine=engine, wire=kit.wire, ground=kit.ground)
    bare_leg = None
    if kit.wire.insulation_thickness_m > 0:
        # the jacket's share of the length hardly depends on the hang or the channel (it goes with
        # ln(b/a) against ln(wavelength/a)): one bare-wire solve, on the first option worked out
        if not warm.jacket_ratio:
            try:
                bare = bare_wire_leg_m(res, engine=engine, wire=kit.wire, ground=kit.ground)
                warm.jacket_ratio[f] = res.leg_m / bare
            except ResonanceError:
                warm.jacket_ratio[f] = None
        ratio = next(iter(warm.jacket_ratio.values()))
        if ratio:
            bare_leg = res.leg_m / ratio
    cut = cut_json(
        res,
        frequency_hz=f,
        wire=kit.wire,
        wrap_allowance_m=kit.wrap_allowance_m,
        bare_leg_m=bare_leg,
    )
    warnings: list[str] = list(hung.notes) + list(layout.notes)
    if spool is not None:
        need, spare_need = cut["total_wire_m"], cut["cut_with_spare_total_m"]
        if need > spool:
            raise Refusal(
                f"wire spool too short: the {f / 1e6:g} MHz dipole needs {need:.1f} m of wire "
                f"({spare_need:.1f} m cut long) but the spool holds {spool:g} m"
            )
        if spare_need > spool:
            warnings.append(
                f"the spool ({spool:g} m) covers the cut list ({need:.1f} m) but not the cut-long spare "
                f"({spare_need:.1f} m): cut to the list and trim carefully"
            )
    rig = _rigging_json(layout, hung, chosen, kit)
    if (
        rig.get("rope_needed_m")
        and kit.rope_length_m is not None
        and rig["rope_needed_m"] > kit.rope_length_m
    ):
        warnings.append(
            f"rope short: this hang needs about {rig['rope_needed_m']:.0f} m of rope "
            f"({'halyards' if layout.mast is None else 'stake ropes'}), the kit has {kit.rope_length_m:g} m: "
            "use the throw lines for the tie-offs or add rope"
        )
    if layout.span_m is not None and hung.tail_m > 0:
        need = 2 * res.leg_m
        warnings.insert(
            0,
            f"{layout.span_m:.0f} m between {layout.supports_used[0]} and {layout.supports_used[1]}; a "
            f"{f / 1e6:g} MHz dipole needs about {need:.0f} m: the ends droop toward stakes as modelled, "
            "or use an inverted-V on a mast, or choose a higher channel",
        )
    mast = None
    if layout.mast is not None:
        mast = mast_json(
            layout.mast, apex_height_m=hung.feedpoint_height_m, top_load_n=hung.top_load_n
        )
        mast["x_m"], mast["y_m"] = layout.mast_xy
        if not mast["ok"]:
            raise Refusal(mast["why"])
    swr = float(sol.swr)
    feed = feedline_json(kit.coax, frequency_hz=f, swr=swr)
    nvis = points[pick].nvis_dbi
    if curve["bandwidth_2to1"]["width_khz"] == 0.0:
        warnings.append(
            "SWR stays above 2 near the channel: use a tuner or matching at the feedpoint"
        )
    lam = SPEED_OF_LIGHT_M_S / f
    option = {
        "form": layout.form,
        "frequency_mhz": round(f / 1e6, 6),
        "supports_used": list(layout.supports_used),
        "rope_heights_m": {k: round(v, 2) for k, v in chosen.items() if k != "ends"},
        "end_heights_m": [round(h, 2) for h in hung.end_heights_m],
        "hung_wire_m": _points(hung),
        "feed_distance_m": round(hung.feed_distance_m, 3),
        "wire": kit.wire.to_json(),
        "cut": cut,
        "feedpoint_height_m": round(hung.feedpoint_height_m, 2),
        "feedpoint_height_wavelengths": round(hung.feedpoint_height_m / lam, 3),
        "sag_m": round(hung.sag_m, 2),
        "impedance_ohm": {
            "r": round(sol.impedance_ohm.real, 2),
            "x": round(sol.impedance_ohm.imag, 2),
        },
        "swr": round(swr, 3),
        "swr_curve": curve,
        "nvis": {
            "mean_gain_dbi": round(nvis, 2),
            "zenith_gain_dbi": round(float(sol.zenith_gain_dbi), 2),
            "max_gain_dbi": round(float(sol.max_gain_dbi), 2),
            "max_gain_elevation_deg": round(float(sol.max_gain_elevation_deg), 1),
            "beamwidth_deg": {k: round(float(v), 1) for k, v in sol.beamwidth_deg().items()},
            "radiation_efficiency": round(float(sol.radiation_efficiency), 3),
            "figure": "mean gain over the elevations that serve 0–300 km (take-off angle to zenith)",
        },
        "height_sweep": sweep_json(points),
        "height_choice": why,
        "mast": mast,
        "feedline": feed,
        "rigging": rig,
        "warnings": warnings,
        "score_db": round(nvis - feed["total_loss_db"], 2),
    }
    if layout.form == "inverted-v":
        option["apex_angle_deg"] = round(hung.apex_angle_deg, 1)
    option["_resonance"] = res
    return option


def _rigging_json(
    layout: Layout, hung: HungDipole, setting: dict[str, float], kit: Kit
) -> dict[str, Any]:
    """Loads and rope: tension, support loads, halyard rope per support, stakes."""
    g = STANDARD_GRAVITY_M_S2
    out: dict[str, Any] = {
        "tension_n": round(max(hung.end_tension_n), 1),
        "horizontal_tension_n": round(hung.horizontal_tension_n, 1),
        "feedpoint_load_kg": round(kit.mech.feed_load_n(hung.feedpoint_height_m) / g, 3),
    }
    if layout.form == "inverted-v":
        end = setting["ends"]
        rope_each = math.hypot(hung.stake_distance_m - _reach(hung), end) + 1.5
        out.update(
            {
                "stake_distance_m": round(hung.stake_distance_m, 1),
                "end_rope_m": round(rope_each, 1),
                "rope_needed_m": round(2 * rope_each, 1),
                "top_load_kg": round(hung.top_load_n / g, 3),
            }
        )
        if layout.mast is None:  # apex hauled up over a branch on its own halyard
            apex_rope = halyard_rope_m(rope_height_m=hung.feedpoint_height_m, span_rope_m=0.0)
            out["apex_halyard_rope_m"] = round(apex_rope, 1)
            out["rope_needed_m"] = round(2 * rope_each + apex_rope, 1)
        if hung.end_tension_n[0] < kit.mech.tension_n - 1e-6:
            out["note"] = (
                f"pull the ends to only {hung.end_tension_n[0]:.0f} N (not {kit.mech.tension_n:g} N) so the "
                "mast head stays within its rating"
            )
        return out
    supports = {}
    total = 0.0
    for i, sid in enumerate(layout.supports_used):
        t = hung.end_tension_n[i]
        v = hung.support_vertical_n[i]
        rope = halyard_rope_m(rope_height_m=setting[sid], span_rope_m=hung.span_rope_m[i])
        total += rope
        # the branch carries the span pull and the downhaul along the trunk (tension t both ways)
        branch = math.hypot(hung.horizontal_tension_n, v + t)
        supports[sid] = {
            "rope_tension_n": round(t, 1),
            "branch_load_n": round(branch, 1),
            "span_rope_m": round(hung.span_rope_m[i], 2),
            "halyard_rope_m": round(rope, 1),
        }
    out["supports"] = supports
    out["rope_needed_m"] = round(total, 1)
    if hung.tail_m > 0:
        out["droop_tail_m"] = round(hung.tail_m, 2)
    return out


def _reach(hung: HungDipole) -> float:
    p = np.asarray(hung.points_m)
    c = p[len(p) // 2]
    return float(np.hypot(*(p[-1, :2] - c[:2])))
