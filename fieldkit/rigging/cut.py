"""Cut list: the leg length that makes the HUNG dipole resonate at the channel, found with the engine.

Resonance is found on the wire as it will hang (sag, droop, apex), with the kit wire (diameter,
conductor, jacket) over the site's ground: the engine gives X(f) at the channel and just above it; a
Newton step on log length (X(f) slope → shift of resonance) and then secant steps on the resonant
frequency versus leg length converge in two or three engine calls. The same secant gives the trim
step (how far resonance moves per centimetre of leg).

References
----------
.. [1] The half-wave rule of thumb 143/f (m, f in MHz) — 468/f in feet — is common practice in amateur
   handbooks; it assumes a bare wire far from ground. It is shown beside the engine's answer only.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

import numpy as np

from fieldkit.rigging.hung import HungDipole
from fieldkit.rigging.instruction import CutInstruction, cut_instruction
from fieldkit.rigging.wire import KitWire

RULE_OF_THUMB_M_MHZ = 143.0  # half-wave ≈ 143/f m (468/f ft): common practice, not a physical law
# Wrap allowance: wire folded back and twisted at each end insulator and at the feedpoint, per end of
# each leg; 15 cm (about 6 in) is the usual figure (common practice, no single source).
WRAP_ALLOWANCE_M = 0.15
# Cut long by the length that moves resonance down by about 3 %: nearby trees, the real ground and
# the coax usually lower resonance by a percent or two against a model, and wire cannot be added back
# in the field; fold the spare back at the end insulator until the SWR dip is measured (common practice).
CUT_LONG_FRACTION = 0.03
STEP_FRACTION = 0.01  # second frequency 1 % above the channel, for the slope of X(f)
REFERENCE_IMPEDANCE_OHM = 50.0  # SWR reference: 50 Ω coax (RG-58/RG-8X/RG-213/LMR-400 are all 50 Ω)
RESONANCE_TOLERANCE = 2e-4  # converge the model resonance to 0.02 % of the channel


class ResonanceError(ValueError):
    """No half-wave resonance near the channel for this hang."""


Builder = Callable[[float], HungDipole]  # leg length [m] -> hung dipole


def antenna_for(hung: HungDipole, wire: KitWire):
    """Engine antenna for a hung dipole: one polyline wire, fed at the feedpoint vertex."""
    from fieldkit.antenna import Antenna, Feed, Insulation, Wire

    insulation = None
    if wire.insulation_thickness_m > 0:
        insulation = Insulation(
            thickness_m=wire.insulation_thickness_m,
            relative_permittivity=wire.insulation_permittivity,
        )
    w = Wire(
        points_m=np.asarray(hung.points_m, dtype=float),
        radius_m=wire.diameter_m / 2,
        conductor=wire.conductor,
        insulation=insulation,
    )
    return Antenna(wires=(w,), feed=Feed(wire=0, distance_m=hung.feed_distance_m))


class EngineCounter:
    """Counts engine frequency-solves (the plan's cost budget) and keeps every solution of the plan.

    Layouts that hang the wire the same way (a flat and a sloping layout on one pair of supports at
    equal rope heights, a channel's settings met again in the finish) give the very same polyline:
    the solution is then taken from the plan's own store instead of solving again. Only real solves
    are counted.
    """

    def __init__(self, on_solve: Callable[[], None] | None = None) -> None:
        self.calls = 0
        self.frequencies = 0
        self.reused = 0
        self._store: dict[tuple, Any] = {}
        #: called before every real solve (the plan's progress report; it may raise to stop)
        self.on_solve = on_solve

    @staticmethod
    def _key(hung: HungDipole, wire: KitWire, ground) -> tuple:
        pts = np.ascontiguousarray(np.asarray(hung.points_m, dtype=float))
        return (pts.shape, pts.tobytes(), float(hung.feed_distance_m), wire, repr(ground))

    def solve(self, hung: HungDipole, wire: KitWire, *, frequencies_hz, ground) -> list:
        from fieldkit.antenna import solve
        from fieldkit.errors import InputError

        freqs = [float(f) for f in frequencies_hz]
        key = self._key(hung, wire, ground)
        todo = [f for f in dict.fromkeys(freqs) if (key, f) not in self._store]
        self.reused += len(freqs) - len(todo)
        if todo:
            if self.on_solve is not None:
                self.on_solve()
            self.calls += 1
            self.frequencies += len(todo)
            try:
                sols = solve(
                    antenna_for(hung, wire),
                    frequencies_hz=todo,
                    ground=ground,
                    reference_impedance_ohm=REFERENCE_IMPEDANCE_OHM,
                )
            except (
                InputError
            ) as e:  # a hang the engine refuses is a layout problem, not the user's input
                raise ResonanceError(f"the engine cannot solve this hang ({e.detail})") from None
            for f, sol in zip(todo, sols, strict=True):
                self._store[key, f] = sol
        return [self._store[key, f] for f in freqs]


@dataclass(frozen=True)
class Resonance:
    """A leg length that resonates the hung dipole at the channel.

    Attributes
    ----------
    leg_m : electrical leg length [m]
    hung : the hung dipole at that length
    solution : engine solution at the channel
    resonant_frequency_hz : the model's resonance at ``leg_m`` [Hz]
    dfres_dleg_hz_per_m : how resonance moves per metre added to each leg (negative) [Hz/m]
    dx_df_ohm_per_hz : slope of the feed reactance at the channel [Ω/Hz]
    iterations : engine calls used
    """

    leg_m: float
    hung: HungDipole
    solution: Any
    resonant_frequency_hz: float
    dfres_dleg_hz_per_m: float
    dx_df_ohm_per_hz: float
    iterations: int
    step_solution: Any = None


def _resonance_at(
    engine: EngineCounter, hung: HungDipole, wire: KitWire, f: float, ground
) -> tuple[float, float, tuple[Any, Any]]:
    sols = engine.solve(hung, wire, frequencies_hz=[f, f * (1 + STEP_FRACTION)], ground=ground)
    x0, x1 = sols[0].impedance_ohm.imag, sols[1].impedance_ohm.imag
    slope = (x1 - x0) / (f * STEP_FRACTION)
    if slope <= 0:
        raise ResonanceError(
            "reactance does not rise with frequency here: not near a half-wave resonance"
        )
    return f - x0 / slope, slope, (sols[0], sols[1])


def resonate(
    build: Builder,
    *,
    engine: EngineCounter,
    wire: KitWire,
    ground,
    frequency_hz: float,
    leg_guess_m: float,
    sensitivity_guess_hz_per_m: float | None = None,
    max_iterations: int = 6,
    tolerance: float = RESONANCE_TOLERANCE,
    exact_slope: bool = True,
) -> Resonance:
    """Find the leg length whose hung dipole resonates (X = 0) at ``frequency_hz``.

    Parameters
    ----------
    build : leg length [m] -> hung dipole (the shape depends on the length)
    engine : the counted engine
    wire : kit wire
    ground : engine ground
    frequency_hz : the channel [Hz]
    leg_guess_m : first guess [m]
    sensitivity_guess_hz_per_m : df_res/dL from a similar solve, to skip the first Newton step [Hz/m]
    max_iterations : engine calls before giving up
    tolerance : relative distance of the model resonance from the channel that ends the search
    exact_slope : solve +1 % at the final length for the exact dX/df (the SWR curve and re-trim use
        it); without, a later step may end on the channel solve alone, with the previous step's slope
    """
    f = frequency_hz
    leg0 = leg_guess_m
    hung0 = build(leg0)
    fr0, slope0, sol0 = _resonance_at(engine, hung0, wire, f, ground)
    if abs(fr0 - f) / f < tolerance and sensitivity_guess_hz_per_m is not None:
        return Resonance(leg0, hung0, sol0[0], fr0, sensitivity_guess_hz_per_m, slope0, 1, sol0[1])
    # first step: resonance scales about inversely with length (f·L ≈ const for a thin dipole)
    leg1 = leg0 * fr0 / f
    if sensitivity_guess_hz_per_m is not None:
        leg1 = leg0 + (f - fr0) / sensitivity_guess_hz_per_m
    hist = [(leg0, fr0, slope0, sol0, hung0)]
    for it in range(2, max_iterations + 1):
        hung1 = build(leg1)
        # the channel alone first, with the slope of X(f) from the last step (the leg moved by a
        # percent or less, the slope by about as much); the +1 % solve only once that looks converged,
        # and the convergence is then checked again with the exact slope
        (only,) = engine.solve(hung1, wire, frequencies_hz=[f], ground=ground)
        fr1 = f - only.impedance_ohm.imag / hist[-1][2]
        if abs(fr1 - f) / f < tolerance and exact_slope:
            fr1, slope1, sol1 = _resonance_at(engine, hung1, wire, f, ground)
        else:
            slope1, sol1 = hist[-1][2], (only, None)
        hist.append((leg1, fr1, slope1, sol1, hung1))
        (la, fa, *_), (lb, fb, *_) = hist[-2], hist[-1]
        sens = (fb - fa) / (lb - la) if lb != la else -fb / lb
        if sens >= 0:
            sens = -fb / lb  # fall back to the thin-dipole scaling
        if abs(fr1 - f) / f < tolerance:
            return Resonance(leg1, hung1, sol1[0], fr1, sens, slope1, it, sol1[1])
        leg1 = lb + (f - fb) / sens
    raise ResonanceError(
        f"resonance at {f / 1e6:.4f} MHz not found in {max_iterations} engine calls "
        f"(last {hist[-1][1] / 1e6:.4f} MHz at {hist[-1][0]:.2f} m per leg)"
    )


def rule_of_thumb_leg_m(frequency_hz: float) -> float:
    """Leg from the common 143/f half-wave rule (common practice, marked as such) [m]."""
    return RULE_OF_THUMB_M_MHZ / (frequency_hz / 1e6) / 2


# The SWR curve: the engine at −4 % and +4 % of the channel, beside the channel and +1 % that the
# resonance search solved. R(f) and X(f) of a half-wave dipole are smooth across ±4 %: a cubic through
# these four solves reproduces the engine's impedance to 1 mΩ everywhere in between (measured on the
# demo's hung wires, 3.6–7.1 MHz over poor ground, against 17 direct solves), so the curve and the 2:1
# bandwidth come from that cubic instead of from more solves.
CURVE_OFFSETS = (-0.04, 0.04)
CURVE_STEP_FRACTION = 0.005  # spacing of the reported curve points


@dataclass(frozen=True)
class SwrCurve:
    """SWR around the channel at the cut length and its 2:1 band.

    Attributes
    ----------
    points : (frequency [Hz], SWR, solved by the engine) from −4 % to +4 %
    band_hz : (low, high) edges where SWR ≤ 2 [Hz], or None when it never falls to 2
    band_at_edge : the band reaches the end of the curve (it is at least this wide)
    span_fraction : half-width of the curve as a fraction of the channel
    """

    points: tuple[tuple[float, float, bool], ...]
    band_hz: tuple[float, float] | None
    band_at_edge: bool
    span_fraction: float

    @property
    def width_khz(self) -> float:
        """The 2:1 bandwidth as shown (0.1 kHz) [kHz]."""
        if self.band_hz is None:
            return 0.0
        return round((self.band_hz[1] - self.band_hz[0]) / 1e3, 1)

    def to_json(self) -> dict[str, Any]:
        points = [
            {"frequency_mhz": round(f / 1e6, 5), "swr": round(v, 3), "solved": solved}
            for f, v, solved in self.points
        ]
        return {"points": points, "bandwidth_2to1": self._band_json()}

    def _band_json(self) -> dict[str, Any]:
        if self.band_hz is None:
            return {
                "low_mhz": None,
                "high_mhz": None,
                "width_khz": 0.0,
                "note": "SWR never falls to 2 near the channel",
            }
        lo, hi = self.band_hz
        bw: dict[str, Any] = {
            "low_mhz": round(lo / 1e6, 4),
            "high_mhz": round(hi / 1e6, 4),
            "width_khz": self.width_khz,
        }
        if self.band_at_edge:
            bw["note"] = (
                f"SWR stays under 2 beyond ±{self.span_fraction * 100:.0f} %: the width is at least this"
            )
        return bw


def _curve_solutions(res: Resonance, *, engine: EngineCounter, wire: KitWire, ground) -> list:
    """The four solves of the curve: the resonance's two (channel, +1 %) and −4 %, +4 %."""
    f0 = res.solution.frequency_hz
    have = [res.solution] + ([res.step_solution] if res.step_solution is not None else [])
    want = [f0 * (1 + o) for o in CURVE_OFFSETS]
    if res.step_solution is None:
        want.append(f0 * (1 + STEP_FRACTION))
    new = engine.solve(res.hung, wire, frequencies_hz=want, ground=ground)
    return sorted([*new, *have], key=lambda s: s.frequency_hz)


def swr_sweep(res: Resonance, *, engine: EngineCounter, wire: KitWire, ground) -> SwrCurve:
    """SWR from −4 % to +4 % around the channel at the cut length, and the 2:1 band.

    Two engine solves (−4 %, +4 %) besides the two of the resonance search; the impedance in between
    is the cubic through the four (see ``CURVE_OFFSETS``). Points the engine solved say ``solved``.
    """
    f0 = res.solution.frequency_hz
    span_fraction = max(abs(o) for o in CURVE_OFFSETS)
    sols = _curve_solutions(res, engine=engine, wire=wire, ground=ground)
    freqs = np.array([s.frequency_hz for s in sols])
    z = np.array([s.impedance_ohm for s in sols])
    x = freqs / f0 - 1
    deg = min(3, len(sols) - 1)
    fit_r, fit_x = np.polyfit(x, z.real, deg), np.polyfit(x, z.imag, deg)

    def swr_at(f: np.ndarray) -> np.ndarray:
        zf = np.polyval(fit_r, f / f0 - 1) + 1j * np.polyval(fit_x, f / f0 - 1)
        g = np.abs((zf - REFERENCE_IMPEDANCE_OHM) / (zf + REFERENCE_IMPEDANCE_OHM))
        return (1 + g) / np.maximum(1 - g, 1e-12)

    fine = np.linspace(freqs[0], freqs[-1], 401)
    inside = swr_at(fine) <= 2.0
    band, edge = None, False
    if inside.any():
        idx = np.flatnonzero(inside)
        band = (float(fine[idx[0]]), float(fine[idx[-1]]))
        edge = bool(idx[0] == 0 or idx[-1] == len(fine) - 1)
    grid = f0 * (1 + np.arange(-span_fraction, span_fraction + 1e-9, CURVE_STEP_FRACTION))
    solved = {round(float(f), 3): float(sol.swr) for f, sol in zip(freqs, sols, strict=True)}
    between = [f for f in grid if min(abs(f - g) for g in solved) > 1.0]
    points = []
    for f in sorted([*(float(f) for f in between), *solved]):
        engine_swr = solved.get(f)
        value = engine_swr if engine_swr is not None else float(swr_at(np.array(f)))
        points.append((f, value, engine_swr is not None))
    return SwrCurve(tuple(points), band, edge, span_fraction)


def swr_curve(res: Resonance, *, engine: EngineCounter, wire: KitWire, ground) -> dict[str, Any]:
    """:func:`swr_sweep` as the option's ``swr_curve`` JSON block."""
    return swr_sweep(res, engine=engine, wire=wire, ground=ground).to_json()


def bare_wire_leg_m(res: Resonance, *, engine: EngineCounter, wire: KitWire, ground) -> float:
    """Leg a bare wire of the same size would need in the same hang (one engine solve) [m].

    The bare wire's X at the channel with the jacketed wire's dX/df: the slopes differ by a few
    percent, which moves this figure (only used to explain the 143/f difference) by about 0.1 %.
    """
    bare = KitWire(wire.diameter_m, wire.conductor, 0.0, 1.0, wire.spool_m)
    f = res.solution.frequency_hz
    (sol,) = engine.solve(res.hung, bare, frequencies_hz=[f], ground=ground)
    fr_bare = f - sol.impedance_ohm.imag / res.dx_df_ohm_per_hz
    if not abs(fr_bare / f - 1) < 0.25:
        raise ResonanceError("the bare wire is not near a half-wave resonance in this hang")
    return res.leg_m + (f - fr_bare) / res.dfres_dleg_hz_per_m


def _rule_words(rule: float, leg: float, bare_leg: float | None) -> str:
    """Why the engine's leg differs from 143/f, with the share of each cause."""
    total = (leg - rule) / rule * 100
    if bare_leg is None:
        return (
            f"the engine's leg is {total:+.1f} % against the rule: the rule assumes a thin bare wire in free "
            "space; this one hangs low over real ground with sag, which the engine includes"
        )
    site = (bare_leg - rule) / rule * 100
    jacket = (leg - bare_leg) / bare_leg * 100
    return (
        f"the engine's leg is {total:+.1f} % against the rule: hanging here (height over this ground, sag, "
        f"wire thickness) accounts for {site:+.1f} % — a bare wire would need {bare_leg:.2f} m — and the "
        f"jacket for {jacket:+.1f} % (it slows the wave along the wire, so the wire resonates shorter)"
    )


def wire_needed_m(*, leg_m: float, wrap_allowance_m: float) -> tuple[float, float]:
    """Wire for the cut list, and with the cut-long spare, both legs, as shown (mm) [m]."""
    spare = CUT_LONG_FRACTION * leg_m
    return (
        round(2 * (leg_m + 2 * wrap_allowance_m), 3),
        round(2 * (leg_m + 2 * wrap_allowance_m + spare), 3),
    )


def spare_m(*, leg_m: float, wrap_allowance_m: float, spool_m: float | None) -> float:
    """The deliberate spare per leg: ``CUT_LONG_FRACTION`` of the leg, or what the spool leaves once
    both legs and their wraps are cut (never below 0) [m]. The cut instruction uses it, so a spool
    that cannot hold the full spare gives one length to cut, not a second competing one."""
    spare = CUT_LONG_FRACTION * leg_m
    if spool_m is None:
        return spare
    left = (spool_m - 2 * (leg_m + 2 * wrap_allowance_m)) / 2
    return max(0.0, min(spare, left))


def trim_cm_per_leg(res: Resonance, shift_hz: float) -> float:
    """Leg change that moves the resonance by ``shift_hz``, as shown (mm) [cm]."""
    return round(-shift_hz / res.dfres_dleg_hz_per_m * 100, 1)


def cut_json(
    res: Resonance,
    *,
    frequency_hz: float,
    wire: KitWire,
    wrap_allowance_m: float = WRAP_ALLOWANCE_M,
    bare_leg_m: float | None = None,
    instruction: CutInstruction | None = None,
) -> dict[str, Any]:
    """The option's cut block: per-leg lengths, wrap, cut-long spare, the one cut instruction (made
    here for a plain dipole when the caller does not pass it), rule of thumb, trim steps."""
    leg = res.leg_m
    wrap = wrap_allowance_m
    spare = CUT_LONG_FRACTION * leg
    rule = rule_of_thumb_leg_m(frequency_hz)
    diff = (leg - rule) / rule * 100
    sens = res.dfres_dleg_hz_per_m  # Hz per metre, negative
    total, with_spare = wire_needed_m(leg_m=leg, wrap_allowance_m=wrap)

    if instruction is None:
        instruction = cut_instruction(legs_m=[leg, leg], wrap_allowance_m=wrap, spare_m=spare)
    spare_read = instruction.pieces[-1].spare  # the spare as the marks give it, in both units
    spare_words = (
        f"the length to cut includes {spare_read.both} of spare at the outer end of each leg: fold "
        "it back at the end insulator, because"
        if spare_read is not None and spare_read.m > 0
        else "the spool leaves no spare: cut to the marks and trim carefully, because"
    )

    def step_cm(shift_hz: float) -> float:
        return round(-shift_hz / sens * 100, 1)

    return {
        "leg_m": [round(leg, 3), round(leg, 3)],
        "wrap_allowance_m": wrap,
        "wrap_note": "per end of each leg: at the end insulator and at the feedpoint (common practice)",
        "cut_each_leg_m": round(leg + 2 * wrap, 3),
        "total_wire_m": total,
        "cut_long_m": round(spare, 3),
        "cut_long_advice": (
            f"{spare_words} nearby trees, the real soil and the coax usually pull resonance a percent "
            "or two below any model, and wire cannot be added back in the field; trim after the first "
            "SWR check"
        ),
        "instruction": instruction.to_json(),
        "cut_with_spare_total_m": with_spare,
        "rule_of_thumb": {
            "leg_m": round(rule, 3),
            "rule": "143/f MHz metres per half-wave (468/f feet), common practice",
            "difference_percent": round(diff, 2),
            "why": _rule_words(rule, leg, bare_leg_m),
        },
        "model_resonance_mhz": round(res.resonant_frequency_hz / 1e6, 5),
        "trim_steps": [
            {
                "shift_khz": 10,
                "cut_cm_per_leg_to_raise": step_cm(10e3),
                "add_cm_per_leg_to_lower": step_cm(10e3),
            },
            {
                "shift_khz": 100,
                "cut_cm_per_leg_to_raise": step_cm(100e3),
                "add_cm_per_leg_to_lower": step_cm(100e3),
            },
        ],
        "sensitivity_khz_per_cm": round(-sens / 1e5, 3),
    }


def retrim(
    res: Resonance,
    *,
    target_hz: float,
    leg_now_m: float | None = None,
    dip_hz: float | None = None,
    measured_at_hz: float | None = None,
    measured_r_ohm: float | None = None,
    measured_x_ohm: float | None = None,
) -> dict[str, Any]:
    """How much to cut (or add) per leg after raising, from a measured SWR dip or R+jX.

    The real antenna's resonance differs from the model by a factor k = f_dip / f_model(leg now); the
    new leg makes the model resonate at target/k, moved along the engine's sensitivity.
    With R+jX measured at f_a, the dip is estimated as f_a − X/(dX/df) with the engine's slope.
    """
    leg_now = res.leg_m if leg_now_m is None else leg_now_m
    sens = res.dfres_dleg_hz_per_m
    f_model_now = res.resonant_frequency_hz + (leg_now - res.leg_m) * sens
    if dip_hz is None:
        if measured_at_hz is None or measured_x_ohm is None:
            raise ValueError("give the dip frequency, or R and X at a frequency")
        dip_hz = measured_at_hz - measured_x_ohm / res.dx_df_ohm_per_hz
    k = dip_hz / f_model_now
    new_leg = leg_now + (target_hz / k - f_model_now) / sens
    change = new_leg - leg_now
    verb = "cut" if change < 0 else "add"
    out = {
        "measured_dip_mhz": round(dip_hz / 1e6, 5),
        "model_resonance_now_mhz": round(f_model_now / 1e6, 5),
        "correction_factor": round(k, 5),
        "target_mhz": round(target_hz / 1e6, 5),
        "leg_now_m": round(leg_now, 3),
        "new_leg_m": round(new_leg, 3),
        "change_cm_per_leg": round(change * 100, 1),
        "advice": f"{verb} {abs(change) * 100:.0f} cm from each leg (both legs the same)",
    }
    if measured_r_ohm is not None:
        out["measured_r_ohm"] = measured_r_ohm
    if change > 0:
        out["advice"] += "; unfold spare wire at the end insulators, or splice in wire and re-check"
    return out
