"""The `safety` block of a plan option: exposure, clearances, rules, checklist and cautions in one call."""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any

import numpy as np

from fieldkit.errors import InputError, array, choice, join, number, require_mapping
from fieldkit.safety.checklists import slug
from fieldkit.safety.duty import Radio, parse_radio
from fieldkit.safety.exposure import Landmark, keep_out
from fieldkit.safety.hazards import PowerLine, Support, hazard_names, parse_hazards, parse_supports
from fieldkit.safety.items import OptionFindings, option_items
from fieldkit.safety.limits import LIMIT_SET_WORDS, exposure_limit, parse_limit_set
from fieldkit.safety.oet65 import oet65_estimate
from fieldkit.safety.plan_view import compass_word, polyline_length
from fieldkit.safety.powerlines import Rig, RiggedSupport, line_clearances

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


def _feed_point(wire: np.ndarray, distance_m: float) -> np.ndarray:
    seg = np.diff(wire, axis=0)
    lengths = np.linalg.norm(seg, axis=1)
    cum = np.concatenate([[0.0], np.cumsum(lengths)])
    k = int(np.clip(np.searchsorted(cum, distance_m, side="right") - 1, 0, len(seg) - 1))
    t = 0.0 if lengths[k] == 0 else (distance_m - cum[k]) / lengths[k]
    return wire[k] + t * seg[k]


def _wire_points(value: Any, field: str) -> np.ndarray:
    out = []
    for i, p in enumerate(array(value, field, min_items=2)):
        f = join(field, i)
        xyz = array(p, f)
        if len(xyz) != 3:
            raise InputError(f, f"expected [x_m, y_m, z_m], got {len(xyz)} number(s)")
        out.append([number(v, join(f, j), unit="m") for j, v in enumerate(xyz)])
        if out[-1][2] <= 0:
            raise InputError(
                join(f, 2), f"expected a height above ground (> 0 m), got {out[-1][2]:g}"
            )
    return np.array(out)


def _rig(
    option: Mapping[str, Any], supports: list[Support], wire: np.ndarray, feed: np.ndarray
) -> Rig:
    """Supports in use with their positions, falling reach and the wire point each rope goes to."""
    by_id = {s.id: s for s in supports}
    mast = option.get("mast") if isinstance(option.get("mast"), Mapping) else None
    heights = option.get("rope_heights_m") or {}
    if not isinstance(heights, Mapping):
        raise InputError(
            "option.rope_heights_m", "expected an object: support id → rope height in m"
        )
    rigged = []
    for i, sid in enumerate(array(option.get("supports_used", []), "option.supports_used")):
        if not isinstance(sid, str):
            raise InputError(join("option.supports_used", i), f"expected a support id, got {sid!r}")
        if sid in by_id:
            s = by_id[sid]
            kind, x, y, top = s.kind, s.x_m, s.y_m, s.height_m
        elif mast is not None and mast.get("id") == sid:
            # a centre mast stands under the feedpoint unless the option places it
            kind = "mast"
            x = number(mast.get("x_m", float(feed[0])), "option.mast.x_m", unit="m")
            y = number(mast.get("y_m", float(feed[1])), "option.mast.y_m", unit="m")
            top = number(
                mast.get("height_m", float(feed[2])), "option.mast.height_m", unit="m", minimum=0.0
            )
        else:
            raise InputError(
                join("option.supports_used", i),
                f"no support {sid!r} on the site and no mast of that id in the option",
            )
        rope = number(
            heights.get(sid, top), join("option.rope_heights_m", str(sid)), unit="m", minimum=0.0
        )
        near = wire[np.argmin(np.linalg.norm(wire - np.array([x, y, rope]), axis=1))]
        rigged.append(RiggedSupport(str(sid), kind, x, y, max(top, rope), rope, near))
    return Rig(wire_m=wire, feed_m=feed, supports=tuple(rigged))


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


def _engine_fields(
    option: Mapping[str, Any],
    wire: np.ndarray,
    feed_d: float,
    ground,
    radio: Radio,
    f_hz: float,
    solution,
):
    """Near-field function of the hung wire at the radio's power, and the solution (one solve)."""
    if solution is None:
        from fieldkit.antenna import Antenna, Feed, Insulation, Wire, solve
        from fieldkit.antenna.materials import CONDUCTORS

        kit = require_mapping(option.get("wire"), "option.wire")
        diameter = number(
            kit.get("diameter_mm"),
            "option.wire.diameter_mm",
            unit="mm",
            minimum=0.0,
            exclusive_minimum=True,
        )
        insulation = None
        if kit.get("insulation"):
            ins = require_mapping(kit["insulation"], "option.wire.insulation")
            insulation = Insulation(
                thickness_m=number(
                    ins.get("thickness_mm"),
                    "option.wire.insulation.thickness_mm",
                    unit="mm",
                    minimum=0.0,
                )
                / 1000,
                relative_permittivity=number(
                    ins.get("relative_permittivity"),
                    "option.wire.insulation.relative_permittivity",
                    minimum=1.0,
                ),
            )
        w = Wire(
            points_m=wire,
            radius_m=diameter / 2000,
            conductor=choice(kit.get("conductor", "copper"), "option.wire.conductor", CONDUCTORS),
            insulation=insulation,
        )
        solution = solve(
            Antenna(wires=(w,), feed=Feed(wire=0, distance_m=feed_d)),
            frequencies_hz=[f_hz],
            ground=ground,
            power_w=radio.power_w,
        )[0]
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


def safety_block(
    *,
    option: dict,
    site: dict,
    radio: dict,
    ground,
    limit_set: str = "fcc-uncontrolled",
    solution=None,
) -> dict:
    """The `safety` block of one plan option (contract in ARCHITECTURE.md).

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
        ``raise_ok``, ``checklist``, ``cautions``; and ``reasons`` (why not to raise) and ``exposure``
        (per end and height, OET 65 estimate, power for no zone, near-field points used).
    """
    limit_name = parse_limit_set(limit_set)
    rad = parse_radio(radio)
    site = require_mapping(site, "site")
    option = require_mapping(option, "option")
    hazards = parse_hazards(site.get("hazards"), "site.hazards")
    supports = parse_supports(site.get("supports", []), "site.supports")
    f_mhz = number(
        option.get("frequency_mhz"),
        "option.frequency_mhz",
        unit="MHz",
        minimum=0.0,
        exclusive_minimum=True,
    )
    limit = exposure_limit(
        limit_name, frequency_hz=f_mhz * 1e6, frequency_field="option.frequency_mhz"
    )
    wire = _wire_points(option.get("hung_wire_m"), "option.hung_wire_m")
    feed_d = number(option.get("feed_distance_m"), "option.feed_distance_m", unit="m", minimum=0.0)
    length = polyline_length(wire)
    if feed_d > length + 1e-9:
        raise InputError(
            "option.feed_distance_m", f"{feed_d:g} m is beyond the wire's length {length:.3f} m"
        )
    feed = _feed_point(wire, feed_d)
    rig = _rig(option, supports, wire, feed)

    fields, sol = _engine_fields(option, wire, feed_d, ground, rad, f_mhz * 1e6, solution)
    ko = keep_out(
        fields,
        wire_m=wire,
        feed_m=feed,
        e_limit=limit.e_v_per_m,
        h_limit=limit.h_a_per_m,
        averaging_factor=rad.averaging_factor,
        landmarks=_landmarks(wire, feed, rig),
    )
    power_no_zone = rad.power_w / ko.max_ratio if ko.max_ratio > 0 else None
    oet = oet65_estimate(average_power_w=rad.average_power_w, s_limit_w_m2=limit.s_w_per_m2)

    clearances = [
        c
        for i, hz in enumerate(hazards)
        if isinstance(hz, PowerLine)
        for c in line_clearances(i, hz, rig)
    ]
    names = hazard_names(hazards)
    reasons = [f"{names[c.hazard]}: {c.why}" for c in clearances if not c.ok]
    used = {r.id for r in rig.supports}
    reasons += [
        f"support {s.id} is marked unsafe and must not be used"
        for s in supports
        if s.unsafe and s.id in used
    ]
    findings = OptionFindings(
        option=option,
        radio=rad,
        limit=limit,
        rig=rig,
        hazards=hazards,
        clearances=clearances,
        supports=supports,
        keep_out=ko,
        power_for_no_zone_w=power_no_zone,
    )
    checklist = option_items(findings)

    def pt(p) -> list[float]:
        return [round(float(v), 2) for v in p]

    exposure = {
        "radio": rad.to_json(),
        "limit": limit.to_json(),
        "keep_out_by_end": [
            {"id": lm.key, "name": lm.name, "point_m": pt(lm.point_m), "keep_out_m": round(d, 2)}
            for lm, d in ko.by_landmark
        ],
        "keep_out_by_height": [{"height_m": h, "keep_out_m": round(d, 2)} for h, d in ko.by_height],
        "keep_out_zones_m": ko.zones_m,
        "end_separation_m": [
            {"name": n, "separation_m": round(s, 2)} for n, s in ko.end_separation_m
        ],
        "end_separation_extrapolated": ko.end_extrapolated,
        "max_ratio": round(ko.max_ratio, 4),
        "max_ratio_point_m": pt(ko.max_ratio_point_m),
        "power_for_no_zone_w": None if power_no_zone is None else round(power_no_zone, 1),
        "wire_within_reach": ko.touching,
        "coax_drop": [{"height_m": h, "ratio": round(r, 4)} for h, r in ko.coax_drop],
        "zone_beyond_sampled_reach": ko.beyond_reach,
        "oet65": oet.to_json(),
        "input_impedance_ohm": {
            "r": round(sol.impedance_ohm.real, 2),
            "x": round(sol.impedance_ohm.imag, 2),
        },
        "near_field_points": ko.n_points,
        "method": (
            "engine near field (E and H, ground included) of the hung wire at the radio's power, "
            "time-averaged by duty factor × transmit fraction; the worst of 0.5, 1.0 and 1.8 m above "
            "ground; ratio = averaged field² / limit²"
        ),
    }
    return {
        "limit_set": limit_name,
        "limit_set_name": LIMIT_SET_WORDS[limit_name],
        "keep_out_m": round(ko.keep_out_m, 2),
        "keep_out_outline_m": ko.outline_m,
        "min_end_height_m": round(ko.min_end_height_m, 2),
        "clearances": [{**c.to_json(), "hazard_name": names[c.hazard]} for c in clearances],
        "raise_ok": not reasons,
        "reasons": reasons,
        "checklist": [it.to_json() for it in checklist],
        "cautions": list(CAUTIONS),
        "exposure": exposure,
    }
