"""Checklist items generated from one plan option and its safety results, carrying the plan's numbers.

Each item's id comes from its rule and the object it is about (see
:func:`fieldkit.safety.checklists.item_id`), so it stays the same when the plan is recomputed.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fieldkit.readable import (
    distance_both,
    given_both,
    height_both,
    length_both,
    power_text,
    tape_both,
)
from fieldkit.safety.checked_option import CheckedOption
from fieldkit.safety.checklists import ChecklistItem, item_id, order_items, template_items
from fieldkit.safety.duty import Radio
from fieldkit.safety.exposure import PERSON_HEIGHT_M, KeepOut
from fieldkit.safety.hazards import Path, PowerLine, hazard_names
from fieldkit.safety.limits import LIMIT_SET_WORDS, ExposureLimit
from fieldkit.safety.low_wire import LOW_WIRE_HEIGHT_M
from fieldkit.safety.plan_view import densify
from fieldkit.safety.powerlines import Clearance, Rig, line_summary
from fieldkit.safety.weather import DEFAULT_MAST_WIND_LIMIT_M_S
from fieldkit.site import Support

#: Height a standing adult reaches with a raised hand [m] (common practice, from memory: ~2.1–2.4 m).
REACH_HEIGHT_M = 2.4


@dataclass(frozen=True)
class OptionFindings:
    """What the safety rules found for one option: the inputs of its checklist."""

    option: CheckedOption
    radio: Radio
    limit: ExposureLimit
    rig: Rig
    hazards: list
    clearances: list[Clearance]
    supports: list[Support]
    keep_out: KeepOut
    power_for_no_zone_w: float | None


def _item(
    stage: str, rule: str, obj, text: str, required: bool = True, *, title: str = ""
) -> ChecklistItem:
    return ChecklistItem(item_id(stage, rule, obj), stage, text, required, rule, title)


def _point_in_polygon(pts: np.ndarray, poly: np.ndarray) -> np.ndarray:
    """Even-odd rule, vectorised over points."""
    x, y = pts[:, 0][:, None], pts[:, 1][:, None]
    x0, y0 = poly[:, 0][None], poly[:, 1][None]
    x1, y1 = np.roll(poly[:, 0], -1)[None], np.roll(poly[:, 1], -1)[None]
    with np.errstate(divide="ignore", invalid="ignore"):
        xc = (x1 - x0) * (y - y0) / (y1 - y0) + x0
    return ((((y0 > y) != (y1 > y)) & (x < xc)).sum(axis=1) % 2) == 1


def _cap(name: str) -> str:
    """A name at the start of a sentence: "power line 1" → "Power line 1" ("T3" stays)."""
    return name[:1].upper() + name[1:]


def _and(names: list[str]) -> str:
    return names[0] if len(names) == 1 else ", ".join(names[:-1]) + " and " + names[-1]


def _power_line_items(f: OptionFindings) -> list[ChecklistItem]:
    out = []
    names = hazard_names(f.hazards)
    for i, hz in enumerate(f.hazards):
        if not isinstance(hz, PowerLine):
            continue
        mine = [c for c in f.clearances if c.hazard == i]
        verdict = "clear" if all(c.ok for c in mine) else "TOO CLOSE, do not raise"
        out.append(
            _item(
                "pre-raise",
                "power-line",
                i,
                line_summary(i, hz, f.rig, mine, name=names[i]),
                title=f"{_cap(names[i])}: {verdict}",
            )
        )
        out.append(
            _item(
                "raise",
                "power-line-watch",
                i,
                f"A spotter watches {names[i]} while throw lines, ropes and wire go up; stop if "
                "anything drifts toward it.",
                title=f"Spotter on {names[i]}",
            )
        )
    return out


def _wire_items(f: OptionFindings) -> list[ChecklistItem]:
    """Cutting and marking the wire, in the words of the option's one cut instruction."""
    text = f.option.cut_text
    if text is None:
        return []
    return [
        _item(
            "pre-raise",
            "cut-wire",
            None,
            f"{text} Fold each spare back along the wire and tape it; cut it off only after the SWR "
            "check.",
            required=False,
            title="Wire cut and marked as the cut instruction says",
        )
    ]


def _support_items(f: OptionFindings) -> list[ChecklistItem]:
    out = []
    used = {r.id for r in f.rig.supports}
    for s in f.supports:
        if s.unsafe:
            how = " but this option uses it: do not raise" if s.id in used else " and is not used"
            out.append(
                _item(
                    "pre-raise",
                    "unsafe-support",
                    s.id,
                    f"{s.id} is marked unsafe{how}; keep people and vehicles out from under it.",
                    title=f"{s.id} unsafe: nobody under it",
                )
            )
    trees = [r.id for r in f.rig.supports if r.kind == "tree"]
    if trees:
        out.append(
            _item(
                "pre-raise",
                "weak-link",
                None,
                f"Halyards on {_and(trees)} have a weak link or breakaway, so a storm breaks the "
                "rope, not the tree or the wire.",
                title=f"Weak links on the halyards of {_and(trees)}",
            )
        )
    mast = f.option.mast
    if mast is not None:
        wind_limit, rating = mast.wind_limit_m_s, "the maker's rating"
        if wind_limit is None:
            wind_limit = DEFAULT_MAST_WIND_LIMIT_M_S
            rating = "Beaufort 6, common practice; use the maker's rating if lower"
        guys = mast.guys
        reach = mast.height_m if mast.height_m is not None else float(f.rig.feed_m[2])
        out += [
            _item(
                "pre-raise",
                "mast-wind",
                mast.id,
                f"Wind at {mast.id}: lower it if gusts exceed {wind_limit:.1f} m/s ({rating}).",
                title=f"{mast.id} comes down above {wind_limit:.0f} m/s gusts",
            ),
            _item(
                "pre-raise",
                "guys-flagged",
                mast.id,
                f"{f'All {guys} guys' if guys else 'Guys'} of {mast.id} staked and flagged so nobody "
                "walks into them.",
                title=f"Guys of {mast.id} staked and flagged",
            ),
            _item(
                "raise",
                "mast-walk-up",
                mast.id,
                f"Walk {mast.id} up with every guy attached and one person per guy; nobody within its "
                f"falling reach ({length_both(reach)}).",
                title=f"{mast.id} walked up, one person per guy",
            ),
        ]
    heights = ", ".join(f"{r.id} {height_both(r.rope_height_m)}" for r in f.rig.supports)
    if heights:
        out.append(
            _item(
                "raise",
                "rope-heights",
                None,
                f"Hoist to the planned rope heights: {heights}; the feedpoint should hang at about "
                f"{height_both(f.rig.feed_m[2])}.",
                title="Hoisted to the planned rope heights",
            )
        )
    return out


def _exposure_items(f: OptionFindings) -> list[ChecklistItem]:
    ko, label = f.keep_out, f.radio.label()
    limit = LIMIT_SET_WORDS[f.limit.limit_set]
    out = []
    zones = [(lm.key, lm.name, d) for lm, d in ko.by_landmark if d > 0]
    for key, name, d in zones:
        out.append(
            _item(
                "pre-raise",
                "keep-out",
                key,
                f"Keep people {distance_both(d)} from the {name} while transmitting {label} "
                f"(under the {limit}); mark the zone with tape or flags.",
                title=f"Keep-out zone around the {name} marked",
            )
        )
    if zones:
        out.append(
            _item(
                "after-raise",
                "keep-out-clear",
                None,
                "Before each transmission: nobody inside the keep-out zone (up to "
                f"{distance_both(ko.keep_out_m)} from the wire).",
                title="Nobody in the keep-out zone when sending",
            )
        )
    else:
        p = f.power_for_no_zone_w
        share = 100 * ko.max_ratio
        pct = f"{share:.0f} %" if share >= 1 else "less than 1 %"
        more = (
            f" (the time-averaged fields reach {pct} of the limit; a zone would start above "
            f"about {power_text(p)})"
            if p
            else ""
        )
        out.append(
            _item(
                "pre-raise",
                "keep-out",
                "none",
                f"No keep-out zone at {label} under the {limit} for a person up to "
                f"{given_both(PERSON_HEIGHT_M)} tall{more}; still keep hands off the wire while "
                "transmitting.",
                required=False,
                title=f"No keep-out zone at {label}",
            )
        )
    low = float(f.rig.wire_m[:, 2].min())
    if low < max(REACH_HEIGHT_M, LOW_WIRE_HEIGHT_M) or ko.touching:  # below 3 m: low_wire.py
        out.append(
            _item(
                "pre-raise",
                "wire-in-reach",
                None,
                f"The wire comes down to {height_both(low)}, within reach of a standing person: fence or flag "
                "that part, and never transmit while anyone is near it.",
                title="Low part of the wire fenced or flagged",
            )
        )
    names = hazard_names(f.hazards)
    for i, hz in enumerate(f.hazards):
        if isinstance(hz, Path) and any(
            len(z) >= 3 and _point_in_polygon(densify(hz.points_m, step_m=0.25), np.array(z)).any()
            for z in ko.zones_m
        ):
            out.append(
                _item(
                    "pre-raise",
                    "path-in-zone",
                    i,
                    f"{_cap(names[i])} runs through the keep-out zone: post a guard or a sign, and stop "
                    "transmitting while anyone passes.",
                    title=f"Guard on {names[i]} where it crosses the zone",
                )
            )
    return out


def _after_raise_items(f: OptionFindings) -> list[ChecklistItem]:
    fmhz = f.option.frequency_hz / 1e6
    swr = f.option.swr
    swr_text = f" with SWR about {swr:.1f}" if swr is not None else ""
    out = [
        _item(
            "after-raise",
            "swr-check",
            None,
            f"Transmit at low power and check the SWR around {fmhz:g} MHz: the dip should be near "
            f"{fmhz:g} MHz{swr_text}; note the dip frequency.",
            title="SWR dip checked at low power",
        )
    ]
    cm = f.option.trim_cm_per_100khz
    text = (
        "If the dip is off, re-trim both legs equally with the re-trim tool and the measured dip."
    )
    if cm is not None:
        text = (
            f"If the dip is off, re-trim both legs equally: about {tape_both(cm / 100)} per leg moves it "
            "100 kHz (shorten to move up, let out spare to move down); the re-trim tool in Wire gives "
            "the exact amount."
        )
    out.append(
        _item(
            "after-raise",
            "retrim",
            None,
            text,
            required=False,
            title="Re-trimmed if the dip is off",
        )
    )
    return out


def option_items(findings: OptionFindings) -> list[ChecklistItem]:
    """The whole checklist of an option: generated items with its numbers plus every stage's
    template items, in the order of the job."""
    generated = (
        _power_line_items(findings)
        + _wire_items(findings)
        + _support_items(findings)
        + _exposure_items(findings)
        + _after_raise_items(findings)
    )
    return order_items([*generated, *template_items()])
