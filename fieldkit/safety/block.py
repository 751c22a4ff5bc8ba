"""The `safety` block of a plan option: exposure, clearances, rules, checklist and cautions in one call."""

from __future__ import annotations

import time
from collections.abc import Mapping
from typing import Any

import numpy as np

from fieldkit.errors import InputError, array, join, number, require_mapping
from fieldkit.safety.checklists import ChecklistItem, item_id, order_items, slug, template_items
from fieldkit.safety.duty import Radio, parse_radio
from fieldkit.safety.exposure import PERSON_HEIGHT_M, KeepOut, Landmark, keep_out
from fieldkit.safety.geometry import compass_word, densify, polyline_length
from fieldkit.safety.hazards import Path, PowerLine, Support, parse_hazards, parse_supports
from fieldkit.safety.limits import ExposureLimit, exposure_limit, parse_limit_set
from fieldkit.safety.oet65 import oet65_estimate
from fieldkit.safety.powerlines import Clearance, Rig, RiggedSupport, line_clearances, line_summary
from fieldkit.safety.weather import mast_wind_limits

#: Height a standing adult reaches with a raised hand [m] (common practice, from memory: ~2.1–2.4 m).
REACH_HEIGHT_M = 2.4

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
    pts = array(value, field, min_items=2)
    out = []
    for i, p in enumerate(pts):
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
    by_id = {s.id: s for s in supports}
    mast = option.get("mast") if isinstance(option.get("mast"), Mapping) else None
    heights = option.get("rope_heights_m") or {}
    if not isinstance(heights, Mapping):
        raise InputError(
            "option.rope_heights_m", "expected an object of support id → rope height in m"
        )
    used = array(option.get("supports_used", []), "option.supports_used")
    rigged = []
    for i, sid in enumerate(used):
        f = join("option.supports_used", i)
        if sid in by_id:
            s = by_id[sid]
            kind, x, y, top = s.kind, s.x_m, s.y_m, s.height_m
        elif mast is not None and mast.get("id") == sid:
            kind = "mast"
            x = float(mast.get("x_m", feed[0]))
            y = float(mast.get("y_m", feed[1]))
            top = float(mast.get("height_m", feed[2]))
        else:
            raise InputError(
                f, f"no support {sid!r} on the site and no mast of that id in the option"
            )
        rope = heights.get(sid, top)
        rope = number(rope, join("option.rope_heights_m", str(sid)), unit="m", minimum=0.0)
        top = max(top, rope)
        near = wire[np.argmin(np.linalg.norm(wire - np.array([x, y, rope]), axis=1))]
        rigged.append(RiggedSupport(str(sid), kind, x, y, top, rope, near))
    return Rig(wire_m=wire, feed_m=feed, supports=tuple(rigged))


def _landmarks(wire: np.ndarray, feed: np.ndarray, rig: Rig) -> list[Landmark]:
    out = []
    for end in (wire[0], wire[-1]):
        word = (
            compass_word(*(end[:2] - feed[:2]))
            if np.linalg.norm(end[:2] - feed[:2]) > 0.5
            else "lower"
        )
        near = [s for s in rig.supports if np.linalg.norm(np.array([s.x_m, s.y_m]) - end[:2]) < 3.0]
        name = f"{word} end" + (f" ({near[0].id})" if near else "")
        out.append(Landmark(name, end))
    out.append(Landmark("feedpoint", feed))
    return out


def _solve_fields(option: Mapping[str, Any], wire: np.ndarray, ground, radio: Radio, f_hz: float):
    """One engine solve of the hung wire at the radio's power; the near-field function and solution."""
    from fieldkit.antenna import Antenna, Feed, Insulation, Wire, solve

    kit = require_mapping(option.get("wire"), "option.wire")
    diameter = number(
        kit.get("diameter_mm"),
        "option.wire.diameter_mm",
        unit="mm",
        minimum=0.0,
        exclusive_minimum=True,
    )
    ins = kit.get("insulation")
    insulation = None
    if ins:
        ins = require_mapping(ins, "option.wire.insulation")
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
        conductor=kit.get("conductor", "copper"),
        insulation=insulation,
    )
    feed_d = number(option.get("feed_distance_m"), "option.feed_distance_m", unit="m", minimum=0.0)
    sol = solve(
        Antenna(wires=(w,), feed=Feed(wire=0, distance_m=feed_d)),
        frequencies_hz=[f_hz],
        ground=ground,
        power_w=radio.power_w,
    )[0]
    return sol.near_field, sol


def _point_in_polygon(pts: np.ndarray, poly: np.ndarray) -> np.ndarray:
    x, y = pts[:, 0][:, None], pts[:, 1][:, None]
    x0, y0 = poly[:, 0][None], poly[:, 1][None]
    x1, y1 = np.roll(poly[:, 0], -1)[None], np.roll(poly[:, 1], -1)[None]
    cross = ((y0 > y) != (y1 > y)) & (
        x < (x1 - x0) * (y - y0) / np.where(y1 != y0, y1 - y0, 1e-300) + x0
    )
    return (cross.sum(axis=1) % 2) == 1


def _exposure_items(
    ko: KeepOut, radio: Radio, limit: ExposureLimit, power_no_zone: float | None
) -> list[ChecklistItem]:
    items = []
    label = radio.label()
    zones = [(n, p, d) for n, p, d in ko.by_landmark if d > 0]
    for name, _p, d in zones:
        obj = (
            "feedpoint"
            if name == "feedpoint"
            else f"end-{slug(name.split('(')[-1]) if '(' in name else slug(name)}"
        )
        items.append(
            ChecklistItem(
                item_id("pre-raise", "keep-out", obj),
                "pre-raise",
                f"Keep people {d:.1f} m from the {name} while transmitting {label} "
                f"({limit.limit_set} limits); mark the zone with tape or flags.",
                True,
                "keep-out",
            )
        )
    if not zones:
        more = f" (a zone starts above about {power_no_zone:.0f} W)" if power_no_zone else ""
        items.append(
            ChecklistItem(
                item_id("pre-raise", "keep-out", "none"),
                "pre-raise",
                f"No keep-out zone at {label} under {limit.limit_set} limits for a person up to "
                f"{PERSON_HEIGHT_M:g} m tall{more}; still keep hands off the wire while transmitting.",
                False,
                "keep-out",
            )
        )
    else:
        items.append(
            ChecklistItem(
                item_id("after-raise", "keep-out-clear"),
                "after-raise",
                f"Before each transmission: nobody inside the keep-out zone (up to {ko.keep_out_m:.1f} m "
                "from the wire).",
                True,
                "keep-out",
            )
        )
    if ko.touching:
        items.append(
            ChecklistItem(
                item_id("pre-raise", "wire-in-reach"),
                "pre-raise",
                "Part of the wire hangs within reach of a standing person: fence or flag it, and never "
                "transmit while anyone is near it.",
                True,
                "keep-out",
            )
        )
    return items


def safety_block(
    *, option: dict, site: dict, radio: dict, ground, limit_set: str = "fcc-uncontrolled"
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
        ``{"power_w", "mode", "transmit_fraction"?}``.
    ground : fieldkit.antenna.Ground
        The ground the engine solves over.
    limit_set : str
        ``fcc-uncontrolled`` | ``fcc-controlled`` | ``icnirp-public`` | ``icnirp-occupational``.

    Returns
    -------
    dict
        ``limit_set``, ``keep_out_m``, ``keep_out_outline_m``, ``min_end_height_m``, ``clearances``,
        ``raise_ok``, ``checklist``, ``cautions``, and ``reasons``, ``exposure`` (details, OET 65 estimate,
        cost).
    """
    t0 = time.perf_counter()
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
    limit = exposure_limit(limit_name, frequency_hz=f_mhz * 1e6)
    wire = _wire_points(option.get("hung_wire_m"), "option.hung_wire_m")
    feed_d = number(option.get("feed_distance_m"), "option.feed_distance_m", unit="m", minimum=0.0)
    if feed_d > polyline_length(wire) + 1e-9:
        raise InputError(
            "option.feed_distance_m",
            f"{feed_d:g} m is beyond the wire's length {polyline_length(wire):.3f} m",
        )
    feed = _feed_point(wire, feed_d)
    rig = _rig(option, supports, wire, feed)

    # RF exposure from the engine's near field
    fields, sol = _solve_fields(option, wire, ground, rad, f_mhz * 1e6)
    landmarks = _landmarks(wire, feed, rig)
    ko = keep_out(
        fields,
        wire_m=wire,
        feed_m=feed,
        e_limit=limit.e_v_per_m,
        h_limit=limit.h_a_per_m,
        averaging_factor=rad.averaging_factor,
        landmarks=landmarks,
    )
    power_no_zone = rad.power_w / ko.max_ratio if ko.max_ratio > 0 else None
    oet = oet65_estimate(average_power_w=rad.average_power_w, s_limit_w_m2=limit.s_w_per_m2)

    # power lines
    clearances: list[Clearance] = []
    items: list[ChecklistItem] = []
    for i, hz in enumerate(hazards):
        if isinstance(hz, PowerLine):
            mine = line_clearances(i, hz, rig)
            clearances += mine
            items.append(
                ChecklistItem(
                    item_id("pre-raise", "power-line", i),
                    "pre-raise",
                    line_summary(i, hz, rig, mine),
                    True,
                    "power-line",
                )
            )
            items.append(
                ChecklistItem(
                    item_id("raise", "power-line-watch", i),
                    "raise",
                    f"A spotter watches power line {i} while throw lines, ropes and wire go up; stop if "
                    "anything drifts toward it.",
                    True,
                    "power-line",
                )
            )
    reasons = [f"power line {c.hazard}: {c.why}" for c in clearances if not c.ok]

    # supports and rigging rules
    for s in supports:
        if s.unsafe:
            in_use = any(r.id == s.id for r in rig.supports)
            if in_use:
                reasons.append(f"support {s.id} is marked unsafe and must not be used")
            items.append(
                ChecklistItem(
                    item_id("pre-raise", "unsafe-support", s.id),
                    "pre-raise",
                    f"{s.id} is marked unsafe{' but this option uses it: do not raise' if in_use else ' and is not used'}; "
                    "keep people and vehicles out from under it.",
                    True,
                    "unsafe-support",
                )
            )
    trees = [r.id for r in rig.supports if r.kind == "tree"]
    if trees:
        items.append(
            ChecklistItem(
                item_id("pre-raise", "weak-link"),
                "pre-raise",
                f"Halyards on {', '.join(trees)} have a weak link or breakaway, so a storm breaks the rope, "
                "not the tree or the wire.",
                True,
                "weak-link",
            )
        )
    mast = option.get("mast") if isinstance(option.get("mast"), Mapping) else None
    if mast is not None and "id" in mast:
        (wind,) = mast_wind_limits([dict(mast)])
        guys = mast.get("guys")
        rating = (
            "the maker's rating"
            if wind.rated
            else "Beaufort 6, common practice; use the maker's rating if lower"
        )
        items.append(
            ChecklistItem(
                item_id("pre-raise", "mast-wind", wind.id),
                "pre-raise",
                f"Wind at {wind.id}: lower it if gusts exceed {wind.limit_m_s:.1f} m/s ({rating}).",
                True,
                "mast-wind",
            )
        )
        items.append(
            ChecklistItem(
                item_id("pre-raise", "guys-flagged", wind.id),
                "pre-raise",
                f"{f'All {guys} guys' if guys else 'Guys'} of {wind.id} staked and flagged so nobody walks into them.",
                True,
                "guys",
            )
        )
        items.append(
            ChecklistItem(
                item_id("raise", "mast-walk-up", wind.id),
                "raise",
                f"Walk {wind.id} up with every guy attached and one person per guy; nobody in its falling "
                f"reach ({float(mast.get('height_m', feed[2])):.1f} m).",
                True,
                "mast",
            )
        )
    heights = ", ".join(f"{r.id} {r.rope_height_m:.1f} m" for r in rig.supports)
    if heights:
        items.append(
            ChecklistItem(
                item_id("raise", "rope-heights"),
                "raise",
                f"Hoist to the planned rope heights: {heights}; the feedpoint should hang at about {feed[2]:.1f} m.",
                True,
                "rope-heights",
            )
        )
    low = float(wire[:, 2].min())
    if low < REACH_HEIGHT_M:
        items.append(
            ChecklistItem(
                item_id("pre-raise", "low-wire"),
                "pre-raise",
                f"The wire comes down to {low:.1f} m, within reach: flag that part and keep people from touching it.",
                True,
                "low-wire",
            )
        )
    items += _exposure_items(ko, rad, limit, power_no_zone)
    for i, hz in enumerate(hazards):
        if isinstance(hz, Path) and ko.zones_m:
            crossing = any(
                _point_in_polygon(densify(hz.points_m, step_m=0.5), np.array(z)).any()
                for z in ko.zones_m
                if len(z) >= 3
            )
            if crossing:
                items.append(
                    ChecklistItem(
                        item_id("pre-raise", "path-in-zone", i),
                        "pre-raise",
                        f"Path {i} runs through the keep-out zone: post a guard or a sign, and stop "
                        "transmitting while anyone passes.",
                        True,
                        "keep-out",
                    )
                )
    f = f_mhz
    swr = option.get("swr")
    items.append(
        ChecklistItem(
            item_id("after-raise", "swr-check"),
            "after-raise",
            f"Transmit low power and check the SWR around {f:g} MHz: the dip should be near {f:g} MHz"
            + (f" with SWR about {float(swr):.1f}" if isinstance(swr, int | float) else "")
            + "; note the dip frequency.",
            True,
            "swr",
        )
    )
    items.append(
        ChecklistItem(
            item_id("after-raise", "retrim"), "after-raise", _retrim_text(option), False, "retrim"
        )
    )
    checklist = order_items([*items, *template_items()])

    raise_ok = not reasons
    by_end = [
        {"name": n, "point_m": [round(float(v), 2) for v in p], "keep_out_m": round(d, 2)}
        for n, p, d in ko.by_landmark
    ]
    seconds = time.perf_counter() - t0
    exposure = {
        "radio": rad.to_json(),
        "limit": limit.to_json(),
        "person_heights_m": [h for h, _ in ko.by_height],
        "keep_out_by_height": [{"height_m": h, "keep_out_m": round(d, 2)} for h, d in ko.by_height],
        "keep_out_by_end": by_end,
        "keep_out_zones_m": ko.zones_m,
        "end_separation_m": [
            {"name": n, "separation_m": round(s, 2)} for n, s in ko.end_separation_m
        ],
        "max_ratio": round(ko.max_ratio, 4),
        "max_ratio_point_m": [round(float(v), 2) for v in ko.max_ratio_point_m],
        "power_for_no_zone_w": None if power_no_zone is None else round(power_no_zone, 1),
        "touching": ko.touching,
        "coax_drop": [{"height_m": h, "ratio": round(r, 4)} for h, r in ko.coax_drop],
        "zone_beyond_sampled_reach": ko.beyond_reach,
        "oet65": oet.to_json(),
        "input_impedance_ohm": {
            "r": round(sol.impedance_ohm.real, 2),
            "x": round(sol.impedance_ohm.imag, 2),
        },
        "near_field_points": ko.n_points,
        "seconds": round(seconds, 3),
        "method": (
            "engine near field (E and H, ground included) of the hung wire at the radio's power, "
            "time-averaged by duty factor × transmit fraction; worst of 0.5, 1.0 and 1.8 m above ground"
        ),
    }
    return {
        "limit_set": limit_name,
        "keep_out_m": round(ko.keep_out_m, 2),
        "keep_out_outline_m": ko.outline_m,
        "min_end_height_m": round(ko.min_end_height_m, 2),
        "clearances": [c.to_json() for c in clearances],
        "raise_ok": raise_ok,
        "reasons": reasons,
        "checklist": [it.to_json() for it in checklist],
        "cautions": list(CAUTIONS),
        "exposure": exposure,
    }


def _retrim_text(option: Mapping[str, Any]) -> str:
    cut = option.get("cut") if isinstance(option.get("cut"), Mapping) else {}
    for step in cut.get("trim_steps", []) if isinstance(cut.get("trim_steps"), list) else []:
        if (
            isinstance(step, Mapping)
            and step.get("shift_khz") == 100
            and isinstance(step.get("cut_cm_per_leg_to_raise"), int | float)
        ):
            cm = step["cut_cm_per_leg_to_raise"]
            return (
                f"If the dip is off, re-trim both legs equally: about {cm:g} cm per leg moves it 100 kHz "
                "(shorten to move up, add to move down); use the re-trim tool with the measured dip."
            )
    return (
        "If the dip is off, re-trim both legs equally with the re-trim tool and the measured dip."
    )
