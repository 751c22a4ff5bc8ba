"""Checklists: templates for each stage, items generated from a plan option, and the derived state.

Item ids are stable: built from the rule and the object it is about (``pre-power-line-0``,
``pre-keep-out-end-t1``), never from a counter over the list, so an acknowledgement made on a phone still
matches after the plan is recomputed. The store (``fieldkit.store``) keeps the acknowledgements; this
module only defines the items, the "ready to raise" rule and the export formats.
"""

from __future__ import annotations

import csv
import io
import re
from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from datetime import UTC, datetime
from typing import Any

STAGES = ("pre-raise", "raise", "after-raise", "tear-down")
_PREFIX = {"pre-raise": "pre", "raise": "raise", "after-raise": "after", "tear-down": "down"}


@dataclass(frozen=True)
class ChecklistItem:
    id: str
    stage: str
    text: str
    required: bool
    rule: str = ""
    title: str = ""  # a few words for the field card; the text is the check itself

    def to_json(self) -> dict[str, Any]:
        out = {
            "id": self.id,
            "stage": self.stage,
            "text": self.text,
            "required": self.required,
            "rule": self.rule,
        }
        if self.title:
            out["title"] = self.title
        return out


def slug(value: str) -> str:
    """Lower-case id fragment: letters, digits and hyphens only."""
    s = re.sub(r"[^a-z0-9]+", "-", str(value).lower()).strip("-")
    return s or "x"


def item_id(stage: str, rule: str, obj: str | int | None = None) -> str:
    """Stable id from stage, rule and object: item_id("pre-raise", "power-line", 0) → "pre-power-line-0"."""
    base = f"{_PREFIX[stage]}-{slug(rule)}"
    return base if obj is None else f"{base}-{slug(str(obj))}"


def _t(stage: str, rule: str, text: str, required: bool = True, *, title: str) -> ChecklistItem:
    return ChecklistItem(item_id(stage, rule), stage, text, required, rule, title)


# The fixed items of each stage (fieldkit's own wording). Sources: US NWS lightning guidance; the rest is
# common practice of field rigging (no single source).
_TEMPLATES: tuple[ChecklistItem, ...] = (
    _t(
        "pre-raise",
        "lightning",
        "No thunder heard and no lightning seen for 30 minutes. At the first thunder stop and go to "
        "shelter (US National Weather Service: when thunder roars, go indoors; flash-to-bang 30 s or "
        "less means shelter now).",
        title="No thunder or lightning for 30 minutes",
    ),
    _t(
        "pre-raise",
        "supports-inspected",
        "Every support looked over from all sides: no dead wood, cracked or hanging branches above the "
        "rope, no loose or damaged mast sections. An unsafe support is not used.",
        title="Supports looked over: no dead wood",
    ),
    _t(
        "pre-raise",
        "throw-zone",
        "Throw zone clear of people and vehicles, with nobody downrange; thrower and helpers wear eye "
        "protection.",
        title="Throw zone clear, eye protection on",
    ),
    _t(
        "pre-raise",
        "feedline-route",
        "Feedline routed off paths and walkways (or covered and flagged where it must cross one).",
        title="Feedline off paths, or covered and flagged",
    ),
    _t(
        "pre-raise",
        "choke",
        "A choke (a current balun rated for the power) at the feedpoint, where the coax meets the "
        "wire: without it, current on the outside of the coax shifts the SWR readings used for "
        "trimming and brings RF back to the operating position.",
        required=False,
        title="Choke balun at the feedpoint",
    ),
    _t(
        "pre-raise",
        "briefing",
        "Team briefed: fieldkit is a planning aid; the local codes, the utility's rules, the landowner, "
        "licensed practice and the local regulator's RF exposure rules come first.",
        title="Team briefed: local rules come first",
    ),
    _t(
        "raise",
        "transmitter-off",
        "Transmitter off and the coax unplugged at the radio while anyone handles the antenna.",
        title="Transmitter off, coax unplugged",
    ),
    _t(
        "raise",
        "nobody-under",
        "Nobody stands under a support, rope or mast while it is being hauled; gloves on for the ropes.",
        title="Nobody under a load; gloves on",
    ),
    _t(
        "raise",
        "static-discharge",
        "Before connecting the coax to the radio, discharge static from the antenna to a ground stake.",
        title="Static discharged before connecting",
    ),
    _t(
        "after-raise",
        "no-touch",
        "Wire, end insulators and balun out of reach, or nobody near them while transmitting: RF burns "
        "happen on contact even below the exposure limits.",
        title="Wire and insulators out of reach",
    ),
    _t(
        "after-raise",
        "log-measurement",
        "Measured SWR dip (or R and X) written down for the re-trim and the deployment record.",
        required=False,
        title="SWR dip written down",
    ),
    _t(
        "tear-down",
        "transmitter-off",
        "Transmitter off and the coax unplugged before anyone lowers the antenna.",
        title="Transmitter off before lowering",
    ),
    _t(
        "tear-down",
        "lower-under-control",
        "Lower the wire under control, paying out the halyards slowly, clear of any power line.",
        title="Wire lowered under control",
    ),
    _t(
        "tear-down",
        "recover",
        "Guys, stakes, flags, weak links and all rope recovered; trees left as found.",
        required=False,
        title="Guys, stakes and rope recovered",
    ),
    _t(
        "tear-down",
        "count-kit",
        "Kit counted back: wire, insulators, balun, coax, rope, throw lines and weights.",
        required=False,
        title="Kit counted back",
    ),
)


def checklist_templates() -> list[dict[str, Any]]:
    """The fixed items of every stage (pre-raise, raise, after-raise, tear-down), as JSON dicts."""
    return [item.to_json() for item in _TEMPLATES]


def template_items() -> tuple[ChecklistItem, ...]:
    return _TEMPLATES


def order_items(items: Iterable[ChecklistItem]) -> list[ChecklistItem]:
    """Items by stage (in the order of the job), keeping their order within a stage; ids unique."""
    seen: dict[str, ChecklistItem] = {}
    for it in items:
        seen.setdefault(it.id, it)
    return sorted(seen.values(), key=lambda it: STAGES.index(it.stage))


# --- acknowledgements: derived state and export -------------------------------------------------


def _ack_list(acknowledgements: Any) -> list[Mapping[str, Any]]:
    if acknowledgements is None:
        return []
    if isinstance(acknowledgements, Mapping):
        out = []
        for key, v in acknowledgements.items():
            for a in v if isinstance(v, list) else [v]:
                out.append({**a, "item_id": key})
        return out
    return list(acknowledgements)


def _when(ack: Mapping[str, Any]) -> datetime:
    raw = ack.get("at")
    if isinstance(raw, str):
        try:
            t = datetime.fromisoformat(raw.replace("Z", "+00:00"))
            return t if t.tzinfo else t.replace(tzinfo=UTC)
        except ValueError:
            pass
    return datetime.min.replace(tzinfo=UTC)


def latest_acknowledgements(acknowledgements: Any) -> dict[str, Mapping[str, Any]]:
    """The acknowledgement that decides each item's state: the latest by ``at`` (ties: the later one).

    ``acknowledgements`` is a list of ``{"item_id", "done", "by", "at", "client_id", "device"?}`` or a
    mapping item id → one acknowledgement or a list of them.
    """
    latest: dict[str, tuple[datetime, int, Mapping[str, Any]]] = {}
    for order, ack in enumerate(_ack_list(acknowledgements)):
        key = ack.get("item_id")
        if not isinstance(key, str):
            continue
        stamp = (_when(ack), order)
        if key not in latest or stamp >= latest[key][:2]:
            latest[key] = (*stamp, ack)
    return {k: v[2] for k, v in latest.items()}


def _item_dict(item: ChecklistItem | Mapping[str, Any]) -> Mapping[str, Any]:
    return item.to_json() if isinstance(item, ChecklistItem) else item


def ready_to_raise(
    items: Iterable[ChecklistItem | Mapping[str, Any]], acknowledgements: Any
) -> bool:
    """True when every required pre-raise item's latest acknowledgement says done.

    Parameters
    ----------
    items : iterable of ChecklistItem or dict
        The deployment's checklist (``id``, ``stage``, ``required``).
    acknowledgements : list or mapping
        As :func:`latest_acknowledgements` accepts.
    """
    latest = latest_acknowledgements(acknowledgements)
    for raw in items:
        it = _item_dict(raw)
        if it.get("stage") == "pre-raise" and it.get("required", True):
            ack = latest.get(it.get("id"))
            if ack is None or ack.get("done") is not True:
                return False
    return True


CSV_COLUMNS = ("id", "stage", "required", "done", "by", "at_utc", "device", "client_id", "text")


def _cell(value: Any) -> str:
    s = "" if value is None else str(value)
    # A spreadsheet runs cells starting with these as formulas (CSV injection): quote them.
    return "'" + s if s[:1] in ("=", "+", "-", "@", "\t", "\r") else s


def checklist_rows(items, acknowledgements) -> list[dict[str, Any]]:
    """One row per item with its current state (latest acknowledgement)."""
    latest = latest_acknowledgements(acknowledgements)
    rows = []
    for raw in items:
        it = _item_dict(raw)
        ack = latest.get(it["id"], {})
        rows.append(
            {
                "id": it["id"],
                "stage": it["stage"],
                "required": bool(it.get("required", True)),
                "done": ack.get("done") is True,
                "by": ack.get("by"),
                "at_utc": ack.get("at_utc", ack.get("at")),
                "device": ack.get("device"),
                "client_id": ack.get("client_id"),
                "text": it["text"],
            }
        )
    return rows


def checklist_csv(items, acknowledgements) -> str:
    """The checklist with its state as CSV (header row; cells guarded against formula injection)."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\r\n")
    w.writerow(CSV_COLUMNS)
    for row in checklist_rows(items, acknowledgements):
        w.writerow(
            [
                _cell(row[c]) if c not in ("required", "done") else str(row[c]).lower()
                for c in CSV_COLUMNS
            ]
        )
    return buf.getvalue()


def checklist_json(items, acknowledgements, *, cautions: Iterable[str] = ()) -> dict[str, Any]:
    """The checklist record as JSON: items with state, every acknowledgement kept, ready-to-raise."""
    items = list(items)
    return {
        "ready_to_raise": ready_to_raise(items, acknowledgements),
        "items": checklist_rows(items, acknowledgements),
        "acknowledgements": [dict(a) for a in _ack_list(acknowledgements)],
        "cautions": list(cautions),
    }
