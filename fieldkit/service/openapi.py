"""``GET /api/openapi.json``: the API as OpenAPI 3.1 (a test checks it against the URL map).

The calculators' request and result schemas (model, sky, plan, deployment input) are written from
the field tables their parsers and writers use (:mod:`fieldkit.fields`); a test posts every
documented top-level field and checks that the parser and the schema require the same ones.
"""

from __future__ import annotations

from typing import Any

from flask import Blueprint, jsonify

import fieldkit

bp = Blueprint("openapi", __name__, url_prefix="/api")


def _ref(name: str) -> dict[str, str]:
    return {"$ref": f"#/components/schemas/{name}"}


def _json(schema: dict[str, Any], description: str) -> dict[str, Any]:
    return {"description": description, "content": {"application/json": {"schema": schema}}}


_ERRORS = {
    "400": {"$ref": "#/components/responses/Malformed"},
    "401": {"$ref": "#/components/responses/Unauthorized"},
    "404": {"$ref": "#/components/responses/NotFound"},
    "413": {"$ref": "#/components/responses/TooLarge"},
    "415": {"$ref": "#/components/responses/UnsupportedMedia"},
    "422": {"$ref": "#/components/responses/Invalid"},
}
_READ_ERRORS = {"401": _ERRORS["401"], "404": _ERRORS["404"]}
_LAYER = {"503": {"$ref": "#/components/responses/LayerUnavailable"}}


def _op(
    summary: str,
    responses: dict[str, Any],
    *,
    body: dict[str, Any] | None = None,
    tag: str,
    errors: dict[str, Any] | None = None,
    secured: bool = True,
) -> dict[str, Any]:
    op: dict[str, Any] = {
        "summary": summary,
        "tags": [tag],
        "responses": {**responses, **(errors or {})},
    }
    if body is not None:
        op["requestBody"] = {"required": True, "content": {"application/json": {"schema": body}}}
    if not secured:
        op["security"] = []
    return op


_ID = {"name": "deployment_id", "in": "path", "required": True, "schema": {"type": "string"}}
_ITEM = {"name": "item_id", "in": "path", "required": True, "schema": {"type": "string"}}
_OBJECT = {"type": "object"}

PATHS: dict[str, Any] = {
    "/api/health": {
        "get": _op(
            "Is the service up; its version (no key needed).",
            {"200": _json(_ref("Health"), "up")},
            tag="health",
            secured=False,
        )
    },
    "/api/model": {
        "post": _op(
            "Solve wire antennas over ground (the `fieldkit model` contract).",
            {
                "200": _json(
                    {
                        "oneOf": [
                            _ref("ModelResult"),
                            {"type": "array", "items": _ref("ModelResult")},
                        ]
                    },
                    "model results (an array for an array of specs)",
                )
            },
            body={"oneOf": [_ref("ModelSpec"), {"type": "array", "items": _ref("ModelSpec")}]},
            tag="calc",
            errors={**_ERRORS, **_LAYER},
        )
    },
    "/api/sky": {
        "post": _op(
            "The channel day: foF2, hmF2 and reach per channel and hour (`fieldkit sky`).",
            {"200": _json(_ref("SkyResult"), "sky estimate")},
            body=_ref("SkySpec"),
            tag="calc",
            errors={**_ERRORS, **_LAYER},
        )
    },
    "/api/plan": {
        "post": _op(
            "Plan a deployment: options best first (`fieldkit plan`).",
            {"200": _json(_ref("PlanResult"), "plan")},
            body=_ref("PlanInput"),
            tag="calc",
            errors={**_ERRORS, **_LAYER},
        )
    },
    "/api/deployments": {
        "get": _op(
            "All deployments, with their readiness.",
            {"200": _json(_ref("DeploymentList"), "deployments")},
            tag="deployments",
            errors={"401": _ERRORS["401"]},
        ),
        "post": _op(
            "Store a deployment (a plan input plus name) and plan it.",
            {
                "201": _json(_ref("Created"), "stored"),
                "200": _json(_ref("Created"), "replay of an existing client_id: nothing changed"),
                "409": {"$ref": "#/components/responses/Conflict"},
            },
            body=_ref("DeploymentInput"),
            tag="deployments",
            errors=_ERRORS,
        ),
    },
    "/api/deployments/import": {
        "post": _op(
            "Import a deployment exported by GET …/export (idempotent).",
            {
                "201": _json(_ref("Created"), "imported"),
                "200": _json(_ref("Created"), "the same export was already imported"),
                "409": {"$ref": "#/components/responses/Conflict"},
            },
            body=_ref("DeploymentExport"),
            tag="deployments",
            errors=_ERRORS,
        )
    },
    "/api/deployments/{deployment_id}": {
        "parameters": [_ID],
        "get": _op(
            "One deployment: input, last plan result, ready-to-raise state.",
            {"200": _json(_ref("Deployment"), "deployment")},
            tag="deployments",
            errors=_READ_ERRORS,
        ),
        "put": _op(
            "Replace the deployment's input and plan it again (acknowledgements stay).",
            {"200": _json(_ref("Deployment"), "re-planned deployment")},
            body=_ref("DeploymentInput"),
            tag="deployments",
            errors=_ERRORS,
        ),
        "delete": _op(
            "Delete the deployment and its acknowledgement history.",
            {"200": _json(_OBJECT, "deleted")},
            tag="deployments",
            errors=_READ_ERRORS,
        ),
    },
    "/api/deployments/{deployment_id}/export": {
        "parameters": [_ID],
        "get": _op(
            "The deployment as one JSON file, acknowledgements included (lossless).",
            {"200": _json(_ref("DeploymentExport"), "export")},
            tag="deployments",
            errors=_READ_ERRORS,
        ),
    },
    "/api/deployments/{deployment_id}/checks": {
        "parameters": [_ID],
        "get": _op(
            "The checklist items of the plan with their current state.",
            {"200": _json(_ref("Checklist"), "checklist")},
            tag="checks",
            errors=_READ_ERRORS,
        ),
    },
    "/api/deployments/{deployment_id}/checks.csv": {
        "parameters": [_ID],
        "get": _op(
            "The checklist with its state as CSV.",
            {
                "200": {
                    "description": "CSV",
                    "content": {"text/csv": {"schema": {"type": "string"}}},
                }
            },
            tag="checks",
            errors=_READ_ERRORS,
        ),
    },
    "/api/deployments/{deployment_id}/checks/{item_id}": {
        "parameters": [_ID, _ITEM],
        "get": _op(
            "One checklist item with its full acknowledgement history.",
            {"200": _json(_OBJECT, "item and history")},
            tag="checks",
            errors=_READ_ERRORS,
        ),
        "put": _op(
            "Acknowledge an item; repeating a client_id changes nothing.",
            {
                "200": _json(_ref("AcknowledgementResult"), "stored or replayed"),
                "409": {"$ref": "#/components/responses/Conflict"},
            },
            body=_ref("Acknowledgement"),
            tag="checks",
            errors=_ERRORS,
        ),
    },
    "/api/kit": {
        "get": _op(
            "The operator's kit inventory.",
            {"200": _json(_ref("KitDocument"), "kit")},
            tag="kit",
            errors={"401": _ERRORS["401"]},
        ),
        "put": _op(
            "Replace the kit inventory.",
            {"200": _json(_ref("KitDocument"), "saved")},
            body=_ref("Kit"),
            tag="kit",
            errors=_ERRORS,
        ),
    },
    "/api/lan": {
        "get": _op(
            "The address phones open (with the key in LAN mode) and its QR code as SVG.",
            {"200": _json(_ref("Lan"), "address")},
            tag="lan",
            errors={"401": _ERRORS["401"]},
        ),
        "post": _op(
            "Desktop window only: share on the local network (a second server, key required) or stop.",
            {
                "200": _json(_ref("Lan"), "sharing state"),
                "409": {"$ref": "#/components/responses/Conflict"},
            },
            body={
                "type": "object",
                "required": ["enabled"],
                "additionalProperties": False,
                "properties": {"enabled": {"type": "boolean"}},
            },
            tag="lan",
            errors=_ERRORS,
        ),
    },
    "/api/lan/key": {
        "post": _op(
            "Replace the access key; the old key stops working at once.",
            {
                "200": _json(_ref("Lan"), "new address"),
                "409": {"$ref": "#/components/responses/Conflict"},
            },
            tag="lan",
            errors={"401": _ERRORS["401"], "415": _ERRORS["415"]},
        )
    },
    "/api/openapi.json": {
        "get": _op(
            "This description.",
            {"200": _json(_OBJECT, "OpenAPI 3.1 document")},
            tag="openapi",
            errors={"401": _ERRORS["401"]},
        )
    },
}

_STRING = {"type": "string"}
_NUMBER = {"type": "number"}
SCHEMAS: dict[str, Any] = {
    "Error": {
        "type": "object",
        "required": ["error", "field", "detail"],
        "properties": {
            "error": _STRING,
            "field": {"type": ["string", "null"]},
            "detail": _STRING,
        },
    },
    "Health": {
        "type": "object",
        "required": ["ok", "version"],
        "properties": {"ok": {"type": "boolean"}, "version": _STRING, "lan": {"type": "boolean"}},
    },
    "Created": {
        "type": "object",
        "required": ["id"],
        "properties": {
            "id": _STRING,
            "planned": {"type": "boolean"},
            "replayed": {"type": "boolean"},
        },
    },
    "Readiness": {
        "type": "object",
        "required": ["ready_to_raise", "raise_ok", "missing_checks"],
        "properties": {
            "ready_to_raise": {"type": "boolean"},
            "raise_ok": {"type": ["boolean", "null"]},
            "missing_checks": {"type": "array", "items": _STRING},
        },
    },
    "Deployment": {
        "allOf": [
            _ref("Readiness"),
            {
                "type": "object",
                "required": ["id", "name", "input", "result", "revision"],
                "properties": {
                    "id": _STRING,
                    "name": _STRING,
                    "input": _ref("PlanInput"),
                    "result": {"oneOf": [_ref("PlanResult"), {"type": "null"}]},
                    "plan_error": {"oneOf": [_ref("Error"), {"type": "null"}]},
                    "created_at": {"type": "string", "format": "date-time"},
                    "updated_at": {"type": "string", "format": "date-time"},
                    "revision": {"type": "integer"},
                },
            },
        ]
    },
    "DeploymentList": {
        "type": "object",
        "required": ["deployments"],
        "properties": {"deployments": {"type": "array", "items": _OBJECT}},
    },
    "DeploymentExport": {
        "type": "object",
        "required": ["format", "format_version", "deployment", "acknowledgements"],
        "properties": {
            "format": {"const": "fieldkit-deployment"},
            "format_version": {"const": 1},
            "deployment": _OBJECT,
            "acknowledgements": {"type": "array", "items": _OBJECT},
        },
    },
    "ChecklistItem": {
        "type": "object",
        "required": ["id", "stage", "text", "required", "done"],
        "properties": {
            "id": _STRING,
            "stage": _STRING,
            "text": _STRING,
            "required": {"type": "boolean"},
            "done": {"type": "boolean"},
            "by": {"type": ["string", "null"]},
            "at": {"type": ["string", "null"]},
            "acknowledgements": {"type": "integer"},
            "stale_acknowledgements": {
                "type": "integer",
                "description": "ticks given for an earlier wording of the item; they no longer count",
            },
        },
    },
    "Checklist": {
        "allOf": [
            _ref("Readiness"),
            {
                "type": "object",
                "required": ["items", "rule"],
                "properties": {
                    "items": {"type": "array", "items": _ref("ChecklistItem")},
                    "rule": _STRING,
                },
            },
        ]
    },
    "Acknowledgement": {
        "type": "object",
        "required": ["done", "by", "at", "client_id"],
        "additionalProperties": False,
        "properties": {
            "done": {"type": "boolean"},
            "by": {"type": "string", "minLength": 1, "maxLength": 40},
            "at": {"type": "string", "format": "date-time"},
            "client_id": {"type": "string", "format": "uuid"},
        },
    },
    "AcknowledgementResult": {
        "allOf": [
            _ref("Readiness"),
            {
                "type": "object",
                "required": ["acknowledgement", "replayed", "item"],
                "properties": {
                    "acknowledgement": _OBJECT,
                    "replayed": {"type": "boolean"},
                    "item": _ref("ChecklistItem"),
                },
            },
        ]
    },
    "Kit": {"type": "object"},
    "KitDocument": {
        "type": "object",
        "required": ["kit", "updated_at"],
        "properties": {"kit": _ref("Kit"), "updated_at": {"type": ["string", "null"]}},
    },
    "Lan": {
        "type": "object",
        "required": ["lan", "url", "qr_svg"],
        "properties": {
            "lan": {"type": "boolean"},
            "sharing": {"type": "boolean"},
            "switch": {"type": "boolean"},
            "url": _STRING,
            "qr_svg": _STRING,
        },
    },
}


def _error_response(description: str) -> dict[str, Any]:
    return _json(_ref("Error"), description)


RESPONSES = {
    "Malformed": _error_response("the body is not JSON, not finite, or nested too deep"),
    "Unauthorized": _error_response("LAN mode: the access key is missing or wrong"),
    "NotFound": _error_response("no such deployment or item"),
    "Conflict": _error_response("contradicts what is stored (a reused id with other content)"),
    "TooLarge": _error_response("the body is over the size limit"),
    "UnsupportedMedia": _error_response("writes need Content-Type: application/json"),
    "Invalid": _error_response("a field is wrong: the error names it and what is expected"),
    "LayerUnavailable": _error_response("the layer behind this endpoint is not in this build"),
}


def input_schemas() -> dict[str, Any]:
    """The calculators' request and result schemas, from the field tables their parsers and JSON
    writers use (imported here, at request time, so the service starts without the calculators)."""
    from fieldkit.fields import schemas
    from fieldkit.model_fields import MODEL, MODEL_RESULT
    from fieldkit.planning.inputs import PLAN
    from fieldkit.planning.result import PLAN_RESULT
    from fieldkit.service.deployments_api import deployment_input
    from fieldkit.sky.day import SKY_RESULT
    from fieldkit.sky.inputs import SKY

    return schemas(MODEL, MODEL_RESULT, SKY, SKY_RESULT, PLAN, PLAN_RESULT, deployment_input())


def document() -> dict[str, Any]:
    return {
        "openapi": "3.1.0",
        "info": {
            "title": "fieldkit local service",
            "version": fieldkit.__version__,
            "description": "Plan low wire dipoles for NVIS links; deployments, checks and kit.",
        },
        "servers": [{"url": "/"}],
        "paths": PATHS,
        "components": {
            "schemas": {**SCHEMAS, **input_schemas()},
            "responses": RESPONSES,
            "securitySchemes": {
                "key_header": {"type": "apiKey", "in": "header", "name": "X-Fieldkit-Key"},
                "key_cookie": {"type": "apiKey", "in": "cookie", "name": "fieldkit_key"},
            },
        },
        "security": [{"key_header": []}, {"key_cookie": []}],
    }


@bp.get("/openapi.json")
def openapi():
    return jsonify(document())
