"""The checklist of a deployment's plan: its items with their state, and readiness to raise."""

from __future__ import annotations

import sqlite3
from collections.abc import Mapping
from typing import Any

from fieldkit.store import acknowledgements

PRE_RAISE = "pre-raise"
CONFLICT_RULE = (
    "per item, the acknowledgement the service received last is the current state (its own receipt "
    "order, never a device's clock); the device's time is kept beside the receipt time, and one more "
    "than five minutes ahead is flagged clock_ahead; the history keeps every acknowledgement; a "
    "repeated client_id is one record"
)


def chosen_option(result: Mapping[str, Any] | None) -> Mapping[str, Any] | None:
    """The option the deployment follows: the plan's best (first) one."""
    if not isinstance(result, Mapping):
        return None
    options = result.get("options")
    if isinstance(options, list) and options and isinstance(options[0], Mapping):
        return options[0]
    return None


def checklist(result: Mapping[str, Any] | None) -> list[Mapping[str, Any]]:
    """The checklist items of the chosen option's safety block (empty without a plan result)."""
    option = chosen_option(result)
    safety = option.get("safety") if option else None
    items = safety.get("checklist") if isinstance(safety, Mapping) else None
    if not isinstance(items, list):
        return []
    return [item for item in items if isinstance(item, Mapping) and isinstance(item.get("id"), str)]


def raise_ok(result: Mapping[str, Any] | None) -> bool | None:
    option = chosen_option(result)
    safety = option.get("safety") if option else None
    value = safety.get("raise_ok") if isinstance(safety, Mapping) else None
    return value if isinstance(value, bool) else None


def checklist_state(
    conn: sqlite3.Connection,
    deployment_id: str,
    result: Any,
    history: list[acknowledgements.Acknowledgement] | None = None,
) -> tuple[list[dict], dict[str, Any]]:
    """Each checklist item with its current state, and the deployment's readiness to raise.

    Items carry ``done``, ``by``, ``at`` (the device's time), ``received_at`` and ``clock_ahead`` (from
    the deciding acknowledgement, the one received last), ``acknowledgements``
    (how many the history holds for the item) and ``stale_acknowledgements`` (how many were given for
    an earlier wording of the item and no longer count: the plan changed what the item says).
    """
    if history is None:
        history = acknowledgements.history(conn, deployment_id)
    items_in = checklist(result)
    texts = {item["id"]: item.get("text", "") for item in items_in}
    valid = [
        a
        for a in history
        if a.item_id in texts and acknowledgements.counts_for(a, texts[a.item_id])
    ]
    state = acknowledgements.decide(valid)
    counts: dict[str, int] = {}
    for ack in history:
        counts[ack.item_id] = counts.get(ack.item_id, 0) + 1
    counting: dict[str, int] = {}
    for ack in valid:
        counting[ack.item_id] = counting.get(ack.item_id, 0) + 1
    items = []
    for item in items_in:
        held = state.get(item["id"])
        items.append(
            {
                **item,
                # A missing flag counts as required: the safe reading of an incomplete item.
                "required": bool(item.get("required", True)),
                "done": bool(held.done) if held else False,
                "by": held.by if held else None,
                "at": held.at if held else None,
                "received_at": held.received_at if held else None,
                "clock_ahead": held.clock_ahead if held else False,
                "acknowledgements": counts.get(item["id"], 0),
                "stale_acknowledgements": counts.get(item["id"], 0) - counting.get(item["id"], 0),
            }
        )
    return items, readiness(result, items, list(state.values()))


def _checks_done(items: list[dict], deciding: list[acknowledgements.Acknowledgement]) -> bool:
    """The safety layer's rule over the deciding acknowledgement of each item.

    One acknowledgement per item: which one decides is the service's rule (receipt order), so the
    safety layer's own ordering of several cannot bring a device's clock back into it.
    """
    from fieldkit.safety import ready_to_raise

    return bool(ready_to_raise(items, [ack.to_json() for ack in deciding]))


def _missing(items: list[dict]) -> list[str]:
    return [
        item["id"]
        for item in items
        if item.get("stage") == PRE_RAISE and item["required"] and not item["done"]
    ]


def readiness(
    result: Any, items: list[dict], deciding: list[acknowledgements.Acknowledgement]
) -> dict:
    """Ready to raise: a plan exists, its safety block does not forbid raising (``raise_ok`` is not
    false), and every required pre-raise item is acknowledged done. Without a plan nothing is ready."""
    ok = raise_ok(result)
    ready = chosen_option(result) is not None and ok is not False and _checks_done(items, deciding)
    return {"ready_to_raise": ready, "raise_ok": ok, "missing_checks": _missing(items)}
