"""Deployments: create (and plan), list, read, re-plan, delete, export and import."""

from __future__ import annotations

from typing import Any

from flask import Blueprint, current_app, jsonify

from fieldkit.errors import text
from fieldkit.fields import Record, string
from fieldkit.service.http import json_body
from fieldkit.service.readiness import checklist_state, plan_cache, run_plan
from fieldkit.service.request_db import get_db
from fieldkit.store import acknowledgements, deployments, transaction, transfer
from fieldkit.store.store_errors import Conflict

bp = Blueprint("deployments", __name__, url_prefix="/api/deployments")

MAX_NAME_LENGTH = 200
SERVICE_FIELDS = ("name", "client_id")
DEPLOYMENT_FIELDS = Record(
    "DeploymentFields",
    (
        string(
            "name",
            required=True,
            missing="missing; expected the deployment's name (1-200 characters)",
            schema={"minLength": 1, "maxLength": MAX_NAME_LENGTH},
        ),
        string("client_id", description="client-made id: replays are idempotent"),
    ),
    "what a deployment adds to its plan input",
)


def deployment_input() -> Record:
    """The deployment body's table: the service's fields, then the plan input's (but its name)."""
    from fieldkit.planning.inputs import PLAN

    plan_fields = tuple(f for f in PLAN.fields if f.name not in DEPLOYMENT_FIELDS.names)
    return Record(
        "DeploymentInput",
        DEPLOYMENT_FIELDS.fields + plan_fields,
        "a plan input plus the deployment's name",
    )


def split_body(body: dict[str, Any]) -> tuple[str, str | None, dict[str, Any]]:
    """``(name, client_id, plan input)`` from a deployment body: a plan input plus ``name``."""
    DEPLOYMENT_FIELDS.require(body, "")
    name = text(body["name"], "name", max_length=MAX_NAME_LENGTH)
    client_id = body.get("client_id")
    if client_id is not None:
        client_id = transfer.identifier(client_id, "client_id")
    plan_input = {key: value for key, value in body.items() if key not in SERVICE_FIELDS}
    return name.strip(), client_id, plan_input


def describe(conn, found: deployments.Deployment) -> dict[str, Any]:
    _items, ready = checklist_state(conn, found.id, found.plan_result)
    return {
        **deployments.as_json(found),
        "planning": found.id in current_app.extensions["fieldkit_planning"],
        **ready,
    }


@bp.post("")
def create():
    name, client_id, plan_input = split_body(json_body())
    conn = get_db()
    if client_id is not None:
        held = deployments.find(conn, client_id)
        if held is not None:
            if (held.name, held.plan_input) == (name, plan_input):
                return jsonify({"id": held.id, "replayed": True}), 200
            raise Conflict("client_id", f"a different deployment with id {client_id!r} exists")
    result, plan_error = run_plan(plan_input, plan_cache())
    with transaction(conn):
        if client_id is not None and deployments.find(conn, client_id) is not None:
            return jsonify({"id": client_id, "replayed": True}), 200
        new_id = deployments.insert(
            conn,
            deployment_id=client_id,
            name=name,
            plan_input=plan_input,
            plan_result=result,
            plan_error=plan_error,
        )
    response = jsonify({"id": new_id, "planned": result is not None})
    response.status_code = 201
    response.headers["Location"] = f"/api/deployments/{new_id}"
    return response


@bp.get("")
def list_deployments():
    conn = get_db()
    out = []
    planning = current_app.extensions["fieldkit_planning"]
    histories = acknowledgements.histories(conn)
    for summary in deployments.summaries(conn):
        safety = summary.pop("safety")
        # Readiness needs only the chosen option's safety block: a result holding just that.
        result = {"options": [{"safety": safety}]} if summary["has_result"] else None
        history = histories.get(summary["id"], [])
        _items, ready = checklist_state(conn, summary["id"], result, history)
        out.append({**summary, "planning": summary["id"] in planning, **ready})
    return jsonify({"deployments": out})


@bp.get("/<deployment_id>")
def read(deployment_id: str):
    conn = get_db()
    return jsonify(describe(conn, deployments.get(conn, deployment_id)))


@bp.put("/<deployment_id>")
def replace(deployment_id: str):
    name, _client_id, plan_input = split_body(json_body())
    conn = get_db()
    deployments.get(conn, deployment_id)  # 404 before spending time on a plan
    result, plan_error = run_plan(plan_input, plan_cache())
    updated = deployments.update(
        conn,
        deployment_id,
        name=name,
        plan_input=plan_input,
        plan_result=result,
        plan_error=plan_error,
    )
    return jsonify(describe(conn, updated))


@bp.delete("/<deployment_id>")
def remove(deployment_id: str):
    deployments.delete(get_db(), deployment_id)
    return jsonify({"id": deployment_id, "deleted": True})


@bp.get("/<deployment_id>/export")
def export(deployment_id: str):
    doc = transfer.export_deployment(get_db(), deployment_id)
    response = jsonify(doc)
    response.headers["Content-Disposition"] = (
        f'attachment; filename="fieldkit-deployment-{deployment_id}.json"'
    )
    return response


@bp.post("/import")
def import_():
    new_id, created = transfer.import_deployment(get_db(), json_body())
    response = jsonify({"id": new_id, "replayed": not created})
    response.status_code = 201 if created else 200
    if created:
        response.headers["Location"] = f"/api/deployments/{new_id}"
    return response
