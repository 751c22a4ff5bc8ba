"""The `safety` block of a plan option: exposure, clearances, rules, checklist and cautions in one call.

:func:`check_option` works on typed values (the planner's path); :func:`safety_block` is the thin
dict-taking wrapper of the JSON contract.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from fieldkit.errors import InputError, join, require_mapping
from fieldkit.fields import Record, arr, flag, nested, num, string
from fieldkit.safety.checked_option import CheckedOption, MastAtSite, option_from_json
from fieldkit.safety.checklists import ChecklistItem, slug
from fieldkit.safety.duty import Radio, parse_radio
from fieldkit.safety.exposure import KeepOut, Landmark, keep_out
from fieldkit.safety.hazards import Path, PowerLine, hazard_names, parse_hazards
from fieldkit.safety.items import OptionFindings, option_items
from fieldkit.safety.limits import (
    LIMIT_SET_WORDS,
    LIMIT_SETS,
    ExposureLimit,
    exposure_limit,
    parse_limit_set,
)
from fieldkit.safety.low_wire import low_wire_zones
from fieldkit.safety.oet65 import oet65_estimate
from fieldkit.safety.plan_view import compass_word
from fieldkit.safety.powerlines import Clearance, Rig, RiggedSupport, line_clearances
from fieldkit.site import Support, parse_supports

#: Shown wherever safety results appear (fieldkit's own wording).
CAUTIONS = (
    "fieldkit is a planning aid, not a safety certificate: it claims no compliance with any RF exposure "
    "rule, electrical code or standard.",
    "Follow the local codes, the utility's rules, the landowner's conditions and licensed practice; where "
    "they ask for more distance than fieldkit shows, they win.",
    "RF exposure: the local regulator's rules apply. The keep-out zone is modelled (engine near field over "
    "the stated ground, no coax common-mode current, no nearby metal or trees) and needs a margin.",
    "Power lines: never throw, raise or lower anything near one; treat every line as live and its voltage "
    "as unknown. Call the utility if in doubt.",
    "Lightning: when thunder roars, go indoors; stay in shelter 30 minutes after the last thunder (US "
    "National Weather Service).",
)
SAFETY_BLOCK = Record(
    "SafetyBlock",
    (
        string("limit_set", *LIMIT_SETS, required=True),
        string(
            "limit_set_name",
            required=True,
            description='the limit set in words ("US general public limits (47 CFR 1.1310)")',
        ),
        num(
            "keep_out_m",
            "m",
            0,
            required=True,
            description="largest horizontal distance from the wire at which a 1.8 m person is over the limit",
        ),
        arr(
            "keep_out_outline_m",
            required=True,
            description="the zone at 1.8 m: a polygon [[x, y], ...]",
        ),
        arr(
            "low_wire_zones_m",
            required=True,
            description="the ground under the wire where it hangs below 3 m, to fence: polygons",
        ),
        num(
            "min_end_height_m",
            "m",
            required=True,
            description="end height with no zone under the ends",
        ),
        arr("clearances", required=True, schema={"items": {"type": "object"}}),
        flag(
            "raise_ok", required=True, description="false when any clearance or required rule fails"
        ),
        arr("reasons", required=True, schema={"items": {"type": "string"}}),
        arr("checklist", required=True, schema={"items": {"type": "object"}}),
        arr("cautions", required=True, schema={"items": {"type": "string"}}),
        nested(
            "exposure", required=True, description="per end and height, OET 65 estimate, method"
        ),
    ),
    "the pre-raise safety findings of one option",
)
EXPOSURE_METHOD = (
    "engine near field (E and H, ground included) of the hung wire at the radio's power, "
    "time-averaged by duty factor × transmit fraction; the worst of 0.5, 1.0 and 1.8 m above "
    "ground; ratio = averaged field² / limit²"
)


def _rig(option: CheckedOption, supports: Sequence[Support]) -> Rig:
    """Supports in use with their positions, falling reach and the wire point each rope goes to."""
    by_id = {s.id: s for s in supports}
    wire, feed, mast = option.wire_m, option.feed_m, option.mast
    rigged = []
    for i, sid in enumerate(option.supports_used):
        if sid in by_id:
            s = by_id[sid]
            kind, x, y, top = s.kind, s.x_m, s.y_m, s.height_m
        elif mast is not None and mast.id == sid:
            # a centre mast stands under the feedpoint unless the option places it
            kind, x, y, top = "mast", *_mast_place(mast, feed)
        else:
            raise InputError(
                join("option.supports_used", i),
                f"no support {sid!r} on the site and no mast of that id in the option",
            )
        rope = option.rope_heights_m.get(sid, top)
        near = wire[np.argmin(np.linalg.norm(wire - np.array([x, y, rope]), axis=1))]
        rigged.append(RiggedSupport(str(sid), kind, x, y, max(top, rope), rope, near))
    return Rig(wire_m=wire, feed_m=feed, supports=tuple(rigged))


def _mast_place(mast: MastAtSite, feed: np.ndarray) -> tuple[float, float, float]:
    def given(v: float | None, k: int) -> float:
        return float(feed[k]) if v is None else v

    return given(mast.x_m, 0), given(mast.y_m, 1), given(mast.height_m, 2)


def _landmarks(wire: np.ndarray, feed: np.ndarray, rig: Rig) -> list[Landmark]:
    out = []
    for end in (wire[0], wire[-1]):
        offset = end[:2] - feed[:2]
        word = compass_word(*offset) if np.linalg.norm(offset) > 0.5 else "lower"
        # the support whose rope goes to this end names it
        near = [s for s in rig.supports if s.end_m is not None and np.allclose(s.end_m, end)]
        key = f"end-{slug(near[0].id if near else word)}"
        name = f"{word} end" + (f" ({near[0].id})" if near else "")
        out.append(Landmark(key, name, end))
    if out[0].key == out[1].key:  # both ends by one support or facing one way: keep ids distinct
        out = [Landmark(f"{lm.key}-{i + 1}", lm.name, lm.point_m) for i, lm in enumerate(out)]
    out.append(Landmark("feedpoint", "feedpoint", feed))
    return out


def _solve(option: CheckedOption, ground, radio: Radio):
    """The engine's solution of the hung wire at the channel and the radio's power (one solve)."""
    from fieldkit.antenna import Antenna, Feed, Insulation, Wire, solve

    spec = option.wire
    if spec is None:
        raise InputError("option.wire", "expected the wire (or pass the engine's solution)")
    insulation = None
    if spec.insulation_thickness_m > 0 or spec.insulation_permittivity != 1.0:
        insulation = Insulation(
            thickness_m=spec.insulation_thickness_m,
            relative_permittivity=spec.insulation_permittivity,
        )
    w = Wire(
        points_m=option.wire_m,
        radius_m=spec.diameter_m / 2,
        conductor=spec.conductor,
        insulation=insulation,
    )
    return solve(
        Antenna(wires=(w,), feed=Feed(wire=0, distance_m=option.feed_distance_m)),
        frequencies_hz=[option.frequency_hz],
        ground=ground,
        power_w=radio.power_w,
    )[0]


def _fields(option: CheckedOption, ground, radio: Radio, solution):
    """Near-field function of the hung wire at the radio's power, and the solution used."""
    f_hz = option.frequency_hz
    if solution is None:
        solution = _solve(option, ground, radio)
    elif not math.isclose(solution.frequency_hz, f_hz, rel_tol=1e-6):
        raise InputError(
            "solution",
            f"solved at {solution.frequency_hz / 1e6:g} MHz, the option is at {f_hz / 1e6:g} MHz",
        )
    # fields scale with the square root of the input power
    scale = math.sqrt(radio.power_w / solution.power_w["input"])

    def fields(points: np.ndarray):
        e, h = solution.near_field(points)
        return e * scale, h * scale

    return fields, solution


@dataclass(frozen=True)
class SafetyResult:
    """The safety findings of one option; :meth:`to_json` is its `safety` block."""

    limit: ExposureLimit
    radio: Radio
    keep_out: KeepOut
    power_for_no_zone_w: float | None
    oet65: Any
    input_impedance_ohm: complex
    clearances: tuple[Clearance, ...]
    reasons: tuple[str, ...]
    checklist: tuple[ChecklistItem, ...]
    hazard_names: tuple[str, ...] = ()  # each hazard's name in every text (hazards.hazard_names)
    low_wire_zones_m: tuple = ()  # ground under the wire below 3 m, to fence (low_wire.py)

    @property
    def raise_ok(self) -> bool:
        return not self.reasons

    @property
    def min_end_height_m(self) -> float:
        """End height at which no zone remains under the ends, as shown (cm) [m]."""
        return round(self.keep_out.min_end_height_m, 2)

    def to_json(self) -> dict[str, Any]:
        ko = self.keep_out
        return SAFETY_BLOCK.written(
            {
                "limit_set": self.limit.limit_set,
                "limit_set_name": LIMIT_SET_WORDS[self.limit.limit_set],
                "keep_out_m": round(ko.keep_out_m, 2),
                "keep_out_outline_m": ko.outline_m,
                "low_wire_zones_m": list(self.low_wire_zones_m),
                "min_end_height_m": self.min_end_height_m,
                "clearances": [
                    {**c.to_json(), "hazard_name": self.hazard_names[c.hazard]}
                    for c in self.clearances
                ],
                "raise_ok": self.raise_ok,
                "reasons": list(self.reasons),
                "checklist": [it.to_json() for it in self.checklist],
                "cautions": list(CAUTIONS),
                "exposure": _exposure_json(self),
            }
        )


def _pt(p) -> list[float]:
    return [round(float(v), 2) for v in p]


def _exposure_json(r: SafetyResult) -> dict[str, Any]:
    ko, p = r.keep_out, r.power_for_no_zone_w
    return {
        "radio": r.radio.to_json(),
        "limit": r.limit.to_json(),
        "keep_out_by_end": [
            {"id": lm.key, "name": lm.name, "point_m": _pt(lm.point_m), "keep_out_m": round(d, 2)}
            for lm, d in ko.by_landmark
        ],
        "keep_out_by_height": [{"height_m": h, "keep_out_m": round(d, 2)} for h, d in ko.by_height],
        "keep_out_zones_m": ko.zones_m,
        "end_separation_m": [
            {"name": n, "separation_m": round(s, 2)} for n, s in ko.end_separation_m
        ],
        "end_separation_extrapolated": ko.end_extrapolated,
        "max_ratio": round(ko.max_ratio, 4),
        "max_ratio_point_m": _pt(ko.max_ratio_point_m),
        "power_for_no_zone_w": None if p is None else round(p, 1),
        "wire_within_reach": ko.touching,
        "coax_drop": [{"height_m": h, "ratio": round(x, 4)} for h, x in ko.coax_drop],
        "zone_beyond_sampled_reach": ko.beyond_reach,
        "oet65": r.oet65.to_json(),
        "input_impedance_ohm": {
            "r": round(r.input_impedance_ohm.real, 2),
            "x": round(r.input_impedance_ohm.imag, 2),
        },
        "near_field_points": ko.n_points,
        "method": EXPOSURE_METHOD,
    }


def _reasons(
    clearances: list[Clearance], supports: Sequence[Support], rig: Rig, names: Sequence[str]
) -> tuple[str, ...]:
    """Why the option must not be raised as planned (empty: it may); hazards by their ``names``."""
    reasons = [f"{names[c.hazard]}: {c.why}" for c in clearances if not c.ok]
    used = {r.id for r in rig.supports}
    reasons += [
        f"support {s.id} is marked unsafe and must not be used"
        for s in supports
        if s.unsafe and s.id in used
    ]
    return tuple(reasons)


def check_option(
    option: CheckedOption,
    *,
    supports: Sequence[Support],
    hazards: Sequence[PowerLine | Path],
    radio: Radio,
    ground,
    limit_set: str = "fcc-uncontrolled",
    solution=None,
) -> SafetyResult:
    """The safety findings of one option, from typed values (the planner's entry point).

    Parameters
    ----------
    option : CheckedOption
        The option as the safety rules read it.
    supports, hazards : the site's supports and hazards, decoded.
    radio : Radio
        Power [W], mode and transmit fraction.
    ground : fieldkit.antenna.Ground
        The ground the engine solves over.
    limit_set : str
        A name of :data:`fieldkit.safety.LIMIT_SETS`.
    solution : fieldkit.antenna.Solution, optional
        The engine's solution of this hung wire at this frequency (any power): saves the solve.

    Returns
    -------
    SafetyResult
    """
    limit = exposure_limit(
        limit_set, frequency_hz=option.frequency_hz, frequency_field="option.frequency_mhz"
    )
    rig = _rig(option, supports)
    fields, sol = _fields(option, ground, radio, solution)
    wire, feed = option.wire_m, option.feed_m
    ko = keep_out(
        fields,
        wire_m=wire,
        feed_m=feed,
        e_limit=limit.e_v_per_m,
        h_limit=limit.h_a_per_m,
        averaging_factor=radio.averaging_factor,
        landmarks=_landmarks(wire, feed, rig),
    )
    power_no_zone = radio.power_w / ko.max_ratio if ko.max_ratio > 0 else None
    clearances = [
        c
        for i, hz in enumerate(hazards)
        if isinstance(hz, PowerLine)
        for c in line_clearances(i, hz, rig)
    ]
    names = hazard_names(list(hazards))
    findings = OptionFindings(
        option=option,
        radio=radio,
        limit=limit,
        rig=rig,
        hazards=list(hazards),
        clearances=clearances,
        supports=list(supports),
        keep_out=ko,
        power_for_no_zone_w=power_no_zone,
    )
    return SafetyResult(
        limit=limit,
        radio=radio,
        keep_out=ko,
        power_for_no_zone_w=power_no_zone,
        oet65=oet65_estimate(average_power_w=radio.average_power_w, s_limit_w_m2=limit.s_w_per_m2),
        input_impedance_ohm=complex(sol.impedance_ohm),
        clearances=tuple(clearances),
        reasons=_reasons(clearances, supports, rig, names),
        checklist=tuple(option_items(findings)),
        hazard_names=tuple(names),
        low_wire_zones_m=tuple(low_wire_zones(wire)),
    )


def safety_block(
    *,
    option: dict,
    site: dict,
    radio: dict,
    ground,
    limit_set: str = "fcc-uncontrolled",
    solution=None,
) -> dict:
    """The `safety` block of one plan option from its JSON (contract in ARCHITECTURE.md).

    A thin wrapper: decodes the JSON (every error names its field) and calls :func:`check_option`.

    Parameters
    ----------
    option : dict
        A plan option: ``form``, ``frequency_mhz``, ``supports_used``, ``rope_heights_m``,
        ``hung_wire_m`` (polyline [m]), ``feed_distance_m`` [m], ``wire`` (kit wire JSON),
        ``feedpoint_height_m`` [m]; ``mast`` (or null), ``swr`` and ``cut`` are used when present.
    site : dict
        The plan input's site (supports and hazards).
    radio : dict
        ``{"power_w", "mode", "transmit_fraction"?}`` [W], mode, share of the averaging time on the air.
    ground : fieldkit.antenna.Ground
        The ground the engine solves over.
    limit_set : str
        ``fcc-uncontrolled`` | ``fcc-controlled`` | ``icnirp-public`` | ``icnirp-occupational``.
    solution : fieldkit.antenna.Solution, optional
        The engine's solution of this hung wire at this frequency (any power), if the caller has one:
        saves the solve. Its fields are rescaled to the radio's power.

    Returns
    -------
    dict
        ``limit_set``, ``keep_out_m``, ``keep_out_outline_m``, ``min_end_height_m``, ``clearances``,
        ``raise_ok``, ``checklist``, ``cautions``; ``low_wire_zones_m`` (the ground under the wire
        where it hangs below 3 m, to fence: :mod:`fieldkit.safety.low_wire`); and ``reasons`` (why
        not to raise) and ``exposure`` (per end and height, OET 65 estimate, power for no zone,
        near-field points used).
    """
    limit_name = parse_limit_set(limit_set)
    rad = parse_radio(radio)
    site = require_mapping(site, "site")
    require_mapping(option, "option")
    hazards = parse_hazards(site.get("hazards"), "site.hazards")
    supports = parse_supports(site.get("supports", []), "site.supports")
    checked = option_from_json(option, with_wire=solution is None)
    return check_option(
        checked,
        supports=supports,
        hazards=hazards,
        radio=rad,
        ground=ground,
        limit_set=limit_name,
        solution=solution,
    ).to_json()
