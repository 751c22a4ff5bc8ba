"""Checklist items of a deployment, their acknowledgements, and the CSV export."""

from __future__ import annotations

import uuid
from typing import Any

from flask import Blueprint, Response, jsonify

from fieldkit.errors import InputError, check_keys, text
from fieldkit.service.http import json_body
from fieldkit.service.readiness import CONFLICT_RULE, checklist_state
from fieldkit.service.request_db import get_db
from fieldkit.store import acknowledgements, deployments, transaction, transfer
from fieldkit.store.store_errors import NotFound

bp = Blueprint("checks", __name__, url_prefix="/api/deployments/<deployment_id>")

MAX_BY_LENGTH = 40


def _client_id(value: Any) -> str:
    if not isinstance(value, str) or len(value) > 64:
        raise InputError("client_id", f"expected a UUID string, got {value!r}"[:200])
    try:
        return str(uuid.UUID(value))
    except ValueError:
        raise InputError("client_id", f"expected a UUID string, got {value!r}"[:200]) from None


def acknowledgement_body(body: dict[str, Any]) -> dict[str, Any]:
    check_keys(body, "", ("done", "by", "at", "client_id"))
    for key in ("done", "by", "at", "client_id"):
        if key not in body:
            raise InputError(key, "missing; expected done, by, at and client_id")
    if not isinstance(body["done"], bool):
        raise InputError("done", f"expected true or false, got {body['done']!r}"[:200])
    by = text(body["by"], "by", max_length=MAX_BY_LENGTH).strip()
    acknowledgements.instant_utc(body["at"], "at")
    return {
        "done": body["done"],
        "by": by,
        "at": body["at"],
        "client_id": _client_id(body["client_id"]),
    }


def _state(conn, deployment_id: str) -> tuple[int, list[dict], dict]:
    revision, result = deployments.safety_view(conn, deployment_id)
    return revision, *checklist_state(conn, deployment_id, result)


@bp.get("/checks")
def list_checks(deployment_id: str):
    revision, items, ready = _state(get_db(), deployment_id)
    return jsonify(
        {
            "deployment_id": deployment_id,
            "revision": revision,
            "rule": CONFLICT_RULE,
            "items": items,
            **ready,
        }
    )


@bp.get("/checks.csv")
def checks_csv(deployment_id: str):
    _revision, items, _ready = _state(get_db(), deployment_id)
    response = Response(transfer.checklist_csv(items), mimetype="text/csv")
    response.headers["Content-Disposition"] = (
        f'attachment; filename="fieldkit-checks-{deployment_id}.csv"'
    )
    return response


def _item(items: list[dict], item_id: str) -> dict:
    for item in items:
        if item["id"] == item_id:
            return item
    raise NotFound("item_id", f"the deployment's checklist has no item {item_id!r}", value=item_id)


@bp.get("/checks/<item_id>")
def read_check(deployment_id: str, item_id: str):
    conn = get_db()
    _revision, items, _ready = _state(conn, deployment_id)
    item = _item(items, item_id)
    history = [ack.to_json() for ack in acknowledgements.history(conn, deployment_id, item_id)]
    return jsonify({"item": item, "history": history, "rule": CONFLICT_RULE})


@bp.put("/checks/<item_id>")
def acknowledge(deployment_id: str, item_id: str):
    fields = acknowledgement_body(json_body())
    conn = get_db()
    with transaction(conn):
        _revision, result = deployments.safety_view(conn, deployment_id)
        item = _item(checklist_state(conn, deployment_id, result)[0], item_id)
        ack, replayed = acknowledgements.insert(
            conn,
            deployment_id=deployment_id,
            item_id=item_id,
            item_text_sha256=acknowledgements.text_sha256(item.get("text", "")),
            **fields,
        )
    items, ready = checklist_state(conn, deployment_id, result)
    return jsonify(
        {
            "acknowledgement": ack.to_json(),
            "replayed": replayed,
            "item": _item(items, item_id),
            **ready,
        }
    )
