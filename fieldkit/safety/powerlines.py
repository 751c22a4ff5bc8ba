"""Power-line clearance: the fall rule, the approach distance and throw-line reach.

Rules (each one a clearance verdict with the distance found and the distance required):

* **Fall rule** — if anything falls (a support, the mast, a rope or the wire), no part may come within
  10 ft (3.05 m) of the line. A part at height z can land anywhere within z of its plan position, so its
  horizontal distance to the line must be at least z + 3.05 m. Source: US amateur licence question pool
  2022–2026 (site antennas so that, if they fall, no part comes within 10 ft of a power line).
* **Approach distance** — people and the conductive objects they handle stay at least 10 ft from lines up
  to 50 kV, plus 4 in for every 10 kV above (29 CFR 1910.333(c)(3)); checked in 3-D between the line at
  its height and everything handled while raising (halyards, ropes, wire, mast).
* **Throw line** — a throw weight flies past the branch; common practice (no single source) takes the
  overshoot as the branch height, so a tree whose throw reach comes within 10 ft of a line fails.

Many utilities ask for more (1.5–2 × the height of antenna plus mast, common practice): that is shown as
advice beside each support verdict, not as a failure. The line's own height does not shorten the fall
rule (a wire draped over a line is the accident this rule exists for).

References
----------
.. [1] 29 CFR 1910.333(c)(3)(i)(A), Occupational Safety and Health Administration.
.. [2] NCVEC question pool, Technician class, 2022–2026, antenna safety questions (T0B).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from fieldkit.readable import (
    distance_both,
    feet_text,
    height_both,
    height_text,
    length_both,
    whole_both,
)
from fieldkit.safety.hazards import ASSUMED_LINE_VOLTAGE_KV, PowerLine
from fieldkit.safety.plan_view import compass_word, densify, distance_to_polyline

FOOT_M = 0.3048  # international foot, exact
INCH_M = 0.0254  # exact
#: 10 ft: fall-rule clearance (question pool) and base approach distance (29 CFR 1910.333(c)(3)).
LINE_CLEARANCE_M = 10 * FOOT_M
#: 29 CFR 1910.333(c)(3)(i)(A): base distance applies up to 50 kV, then +4 in per 10 kV (or part).
APPROACH_BASE_KV = 50.0
APPROACH_STEP_KV = 10.0
APPROACH_STEP_M = 4 * INCH_M
#: Utility advice: 1.5 × the height of antenna plus mast (common practice; leaflets ask 1.5–2 ×).
UTILITY_ADVICE_FACTOR = 1.5
#: Throw-weight overshoot beyond the branch, as a multiple of the branch height (common practice).
THROW_OVERSHOOT_FACTOR = 1.0
#: Geometry step for densifying wires and ropes [m] and the tolerance of "exactly at the limit" [m].
STEP_M = 0.1
TOLERANCE_M = 1e-6


@dataclass(frozen=True)
class RiggedSupport:
    """A support in use: where it stands, how tall it is, the rope height and the wire end it holds."""

    id: str
    kind: str
    x_m: float
    y_m: float
    height_m: float  # top of the support (its falling reach)
    rope_height_m: float
    end_m: np.ndarray | None  # (3,) the wire end its rope goes to, or None (a centre support)


@dataclass(frozen=True)
class Rig:
    """The raised antenna as the safety rules see it."""

    wire_m: np.ndarray  # (n, 3) hung wire polyline
    feed_m: np.ndarray  # (3,) feedpoint
    supports: tuple[RiggedSupport, ...] = field(default_factory=tuple)


@dataclass(frozen=True)
class Clearance:
    hazard: int
    object: str
    rule: str  # "fall" | "approach" | "throw"
    distance_m: float
    required_m: float
    why: str

    @property
    def ok(self) -> bool:
        return self.distance_m >= self.required_m - TOLERANCE_M

    def to_json(self) -> dict:
        return {
            "hazard": self.hazard,
            "object": self.object,
            "rule": self.rule,
            "distance_m": round(self.distance_m, 2),
            "required_m": round(self.required_m, 2),
            "ok": self.ok,
            "why": self.why,
        }


def approach_distance_m(voltage_kv: float | None) -> float:
    """Minimum approach distance for unqualified persons and conductive objects [m].

    10 ft up to 50 kV, plus 4 in for every 10 kV (or part of it) above 50 kV; an unknown voltage is
    taken as 50 kV (29 CFR 1910.333(c)(3)(i)(A)).
    """
    kv = ASSUMED_LINE_VOLTAGE_KV if voltage_kv is None else voltage_kv
    steps = max(0, math.ceil((kv - APPROACH_BASE_KV) / APPROACH_STEP_KV - 1e-9))
    return LINE_CLEARANCE_M + steps * APPROACH_STEP_M


def _fall(index: int, name: str, points: np.ndarray, line: PowerLine) -> Clearance:
    """Fall rule for a set of 3-D points: each needs horizontal distance ≥ its height + 10 ft."""
    d = distance_to_polyline(points[:, :2], line.points_m)
    margin = d - (points[:, 2] + LINE_CLEARANCE_M)
    worst = int(np.argmin(margin))
    reach = float(points[worst, 2])
    required = reach + LINE_CLEARANCE_M
    verdict = "clear" if margin[worst] >= -TOLERANCE_M else "TOO CLOSE"
    why = (
        f"{name} is {length_both(d[worst])} from the line; falling from {height_both(reach)} it needs "
        f"{length_both(required)}, {height_text(reach)} + 3.05 m (10 ft) — {verdict}"
    )
    return Clearance(index, name, "fall", float(d[worst]), required, why)


def _support_points(s: RiggedSupport) -> np.ndarray:
    return np.array([[s.x_m, s.y_m, s.height_m]])


def line_clearances(index: int, line: PowerLine, rig: Rig) -> list[Clearance]:
    """Every clearance verdict of one power line against the rig (fall, throw, approach)."""
    out: list[Clearance] = []
    approach = approach_distance_m(line.voltage_kv)
    for s in rig.supports:
        c = _fall(index, f"support {s.id}", _support_points(s), line)
        advice = UTILITY_ADVICE_FACTOR * s.height_m
        if c.distance_m < advice:
            c = Clearance(
                c.hazard,
                c.object,
                c.rule,
                c.distance_m,
                c.required_m,
                c.why
                + f"; many utilities ask for {whole_both(advice)}, 1.5 × its height — ask the utility",
            )
        out.append(c)
    out.append(_fall(index, "wire", densify(rig.wire_m, step_m=STEP_M), line))
    for s in rig.supports:
        if s.end_m is None:
            continue
        rope = densify(np.array([[s.x_m, s.y_m, s.rope_height_m], s.end_m]), step_m=STEP_M)
        out.append(_fall(index, f"rope to {s.id}", rope, line))
    for s in rig.supports:
        if s.kind != "tree":
            continue
        reach = THROW_OVERSHOOT_FACTOR * s.rope_height_m
        d = float(distance_to_polyline(np.array([[s.x_m, s.y_m]]), line.points_m)[0])
        required = reach + LINE_CLEARANCE_M
        verdict = "clear" if d >= required - TOLERANCE_M else "TOO CLOSE: do not throw here"
        why = (
            f"throw line over {s.id} at {height_both(s.rope_height_m)}: the weight can fly about "
            f"{length_both(reach)} past the branch; the tree is {length_both(d)} from the line, needs "
            f"{length_both(required)} — {verdict}"
        )
        out.append(Clearance(index, f"throw line at {s.id}", "throw", d, required, why))
    out.append(_approach(index, line, rig, approach))
    return out


def _handled_points(rig: Rig) -> np.ndarray:
    parts = [densify(rig.wire_m, step_m=STEP_M)]
    for s in rig.supports:
        parts.append(
            densify(np.array([[s.x_m, s.y_m, 0.0], [s.x_m, s.y_m, s.height_m]]), step_m=STEP_M)
        )
        if s.end_m is not None:
            parts.append(
                densify(np.array([[s.x_m, s.y_m, s.rope_height_m], s.end_m]), step_m=STEP_M)
            )
    return np.vstack(parts)


def _approach(index: int, line: PowerLine, rig: Rig, required: float) -> Clearance:
    line3 = np.column_stack([line.points_m, np.full(len(line.points_m), line.height_m)])
    d = float(distance_to_polyline(_handled_points(rig), line3).min())
    volts = (
        f"{line.voltage_kv:g} kV"
        if line.voltage_kv is not None
        else f"voltage unknown, taken as {ASSUMED_LINE_VOLTAGE_KV:g} kV or less"
    )
    verdict = "clear" if d >= required - TOLERANCE_M else "TOO CLOSE"
    why = (
        f"people, ropes and wire come within {length_both(d)} of the conductor at "
        f"{length_both(line.height_m)}; approach distance {required:.2f} m "
        f"({feet_text(required)}, {volts}; 29 CFR 1910.333(c)(3)) — {verdict}"
    )
    return Clearance(index, "people and handled objects", "approach", d, required, why)


def line_summary(
    index: int, line: PowerLine, rig: Rig, clearances: list[Clearance], *, name: str = ""
) -> str:
    """One sentence for the checklist: the line by its name, where it is, the nearest support and the
    verdict. ``name`` is the line's name in every text (:func:`fieldkit.safety.hazards.hazard_names`)."""
    centre = rig.feed_m[:2]
    d_centre = distance_to_polyline(centre[None], line.points_m)[0]
    nearest_pt = _nearest_point(centre, line.points_m)
    where = f"{distance_both(d_centre)} {compass_word(*(nearest_pt - centre))} of the feedpoint"
    mine = [c for c in clearances if c.hazard == index]
    bad = [c for c in mine if not c.ok]
    sup = [c for c in mine if c.rule == "fall" and c.object.startswith("support ")]
    label = name or f"power line {index + 1}"
    head = f"{label[:1].upper()}{label[1:]}, {where}"  # a sentence starts with a capital
    if sup:
        near = min(sup, key=lambda c: c.distance_m)
        reach = near.required_m - LINE_CLEARANCE_M
        head += (
            f": nearest support {near.object.removeprefix('support ')} is "
            f"{length_both(near.distance_m)} from it and needs {length_both(near.required_m)}: "
            f"its falling reach of {height_both(reach)} plus 3.05 m (10 ft)"
        )
    if bad:
        return head + " — TOO CLOSE, do not raise: " + "; ".join(c.why for c in bad)
    return head + " — clear"


def _nearest_point(p: np.ndarray, polyline: np.ndarray) -> np.ndarray:
    a, b = polyline[:-1], polyline[1:]
    ab = b - a
    ab2 = np.einsum("ij,ij->i", ab, ab)
    t = np.clip(np.einsum("ij,ij->i", p - a, ab) / np.where(ab2 > 0, ab2, 1.0), 0, 1)
    q = a + t[:, None] * ab
    return q[np.argmin(np.linalg.norm(q - p, axis=1))]
