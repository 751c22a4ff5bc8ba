"""The plan of a deployment and its checklist: run the plan layer, derive items and readiness."""

from __future__ import annotations

import sqlite3
from collections.abc import Mapping
from typing import Any

from flask import current_app

from fieldkit.service.layers import LayerUnavailable, call_layer, layer_function
from fieldkit.service.plancache import PlanCache
from fieldkit.store import acknowledgements

PRE_RAISE = "pre-raise"
CONFLICT_RULE = (
    "per item, the acknowledgement with the latest 'at' (UTC) is the current state; equal times go "
    "to the later arrival; the history keeps every acknowledgement; a repeated client_id is one record"
)


def plan_cache() -> PlanCache | None:
    return current_app.extensions.get("fieldkit_plan_cache")


def compute_plan(spec: Any, cache: PlanCache | None = None) -> Any:
    """``fieldkit.planning.plan(spec)``, through the cache when one is given."""

    def compute(value: Any) -> Any:
        return call_layer("fieldkit.planning", "plan", value)

    return cache.get_or_compute(spec, compute) if cache is not None else compute(spec)


def run_plan(
    plan_input: Mapping[str, Any], cache: PlanCache | None = None
) -> tuple[dict[str, Any] | None, dict[str, Any] | None]:
    """The plan result, or ``(None, error)`` when the plan layer is not in this build.

    Bad input raises :class:`fieldkit.errors.InputError` from the plan layer itself.
    """
    try:
        return compute_plan(dict(plan_input), cache), None
    except LayerUnavailable as exc:
        return None, exc.to_json()


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

    Items carry ``done``, ``by``, ``at`` (from the deciding acknowledgement), ``acknowledgements``
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
                "acknowledgements": counts.get(item["id"], 0),
                "stale_acknowledgements": counts.get(item["id"], 0) - counting.get(item["id"], 0),
            }
        )
    return items, readiness(result, items, valid)


def _checks_done(items: list[dict], history: list[acknowledgements.Acknowledgement]) -> bool:
    """The safety layer's rule when it is in this build, else the same rule computed here."""
    try:
        rule = layer_function("fieldkit.safety", "ready_to_raise")
    except LayerUnavailable:
        return not _missing(items)
    return bool(rule(items, [ack.to_json() for ack in history]))


def _missing(items: list[dict]) -> list[str]:
    return [
        item["id"]
        for item in items
        if item.get("stage") == PRE_RAISE and item["required"] and not item["done"]
    ]


def readiness(
    result: Any, items: list[dict], history: list[acknowledgements.Acknowledgement]
) -> dict:
    """Ready to raise: a plan exists, its safety block does not forbid raising (``raise_ok`` is not
    false), and every required pre-raise item is acknowledged done. Without a plan nothing is ready."""
    ok = raise_ok(result)
    ready = chosen_option(result) is not None and ok is not False and _checks_done(items, history)
    return {"ready_to_raise": ready, "raise_ok": ok, "missing_checks": _missing(items)}
