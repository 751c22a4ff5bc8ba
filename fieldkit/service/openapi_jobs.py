"""The OpenAPI parts of plans as jobs, the limits and the laptop-only routes (issue 15).

:func:`extend` adds them to the document :mod:`fieldkit.service.openapi` builds: the plan-job routes,
the ``X-Fieldkit-Job`` header, the 503 of a full plan queue with ``Retry-After``, the 403 answers, and
the bounds the import parser enforces (integers, the export's version and revision). The plan
input's own bounds (the transmit power among them) come from its field tables (:mod:`fieldkit.fields`).
"""

from __future__ import annotations

import copy
from typing import Any

from fieldkit.errors import MAX_EXACT_INTEGER
from fieldkit.planning.records import STAGES
from fieldkit.service.plan_jobs import DEFAULT_DEADLINE_S, DEFAULT_QUEUE
from fieldkit.service.plans_api import JOB_HEADER
from fieldkit.store.transfer import FORMAT_VERSION, MAX_REVISION

WAITING = (
    "The request waits for its plan job: at most a bounded number of requests wait at once (503 "
    "beyond), in threads of their own, so health, ticks, reads and static files are never queued "
    "behind plans. To show progress meanwhile, send your own UUID in the X-Fieldkit-Job header and "
    "poll GET /api/plans/{that id} from another connection; or start the job with POST /api/plans "
    f"and poll. A plan runs at most {DEFAULT_DEADLINE_S:g} s (then 422 'plan too long'); at most "
    f"{DEFAULT_QUEUE} plans wait for a worker (then 503 with Retry-After)."
)
_JOB_ID = {"name": "job_id", "in": "path", "required": True, "schema": {"type": "string"}}
_JOB_HEADER = {
    "name": JOB_HEADER,
    "in": "header",
    "required": False,
    "description": "your own UUID for this request's plan job, to poll GET /api/plans/{id}",
    "schema": {"type": "string", "format": "uuid"},
}
_BUSY = {"$ref": "#/components/responses/Busy"}
_FORBIDDEN = {"$ref": "#/components/responses/Forbidden"}
PLANNING_ROUTES = (
    ("/api/plan", "post"),
    ("/api/deployments", "post"),
    ("/api/deployments/{deployment_id}", "put"),
    ("/api/deployments/import", "post"),
)
_STATES = ["queued", "running", "done", "failed", "cancelled"]
_STAGES = f"queued, starting, then the planner's: {', '.join(STAGES)}"


def _json(schema: dict[str, Any], description: str) -> dict[str, Any]:
    return {"description": description, "content": {"application/json": {"schema": schema}}}


def _op(summary: str, responses: dict[str, Any], errors: dict[str, Any], **extra) -> dict[str, Any]:
    return {"summary": summary, "tags": ["plans"], "responses": {**responses, **errors}, **extra}


def _paths(errors: dict[str, Any]) -> dict[str, Any]:
    job = _json({"$ref": "#/components/schemas/PlanJob"}, "the job")
    reads = {"401": errors["401"], "404": errors["404"]}
    return {
        "/api/plans": {
            "post": _op(
                "Start a plan job (the plan input of POST /api/plan); poll its progress.",
                {"202": {**job, "headers": {"Location": {"schema": {"type": "string"}}}}},
                {**errors, "503": _BUSY},
                parameters=[_JOB_HEADER],
                requestBody={
                    "required": True,
                    "content": {
                        "application/json": {"schema": {"$ref": "#/components/schemas/PlanInput"}}
                    },
                },
            )
        },
        "/api/plans/{job_id}": {
            "parameters": [_JOB_ID],
            "get": _op("How far the plan job is (id or your X-Fieldkit-Job).", {"200": job}, reads),
            "delete": _op("Cancel the plan job (stops its plan).", {"200": job}, reads),
        },
        "/api/plans/{job_id}/result": {
            "parameters": [_JOB_ID],
            "get": _op(
                "The finished job's plan; its error when it failed; 409 while it runs.",
                {"200": _json({"$ref": "#/components/schemas/PlanResult"}, "plan")},
                {**reads, "409": {"$ref": "#/components/responses/Conflict"}, "422": errors["422"]},
            ),
        },
    }


SCHEMAS: dict[str, Any] = {
    "PlanJob": {
        "type": "object",
        "required": ["id", "state", "stage", "done", "total", "deadline_s"],
        "properties": {
            "id": {"type": "string"},
            "state": {"enum": _STATES},
            "stage": {"type": "string", "description": _STAGES},
            "done": {"type": "integer", "minimum": 0},
            "total": {"type": "integer", "minimum": 0},
            "queue_position": {"type": ["integer", "null"], "minimum": 1},
            "elapsed_s": {"type": "number", "minimum": 0},
            "deadline_s": {"type": "number", "exclusiveMinimum": 0},
            "result_url": {"type": "string"},
            "error": {"$ref": "#/components/schemas/Error"},
        },
    },
}
RESPONSES = {
    "Busy": {
        **_json({"$ref": "#/components/schemas/Error"}, "the plan queue is full; try again later"),
        "headers": {
            "Retry-After": {
                "description": "seconds until a plan is likely to be taken",
                "schema": {"type": "integer", "minimum": 1},
            }
        },
    },
    "Forbidden": _json(
        {"$ref": "#/components/schemas/Error"},
        "refused for where it comes from: a change from another site's page (Origin), or a key "
        "rotation from a phone (only the laptop may)",
    ),
}


def extend(doc: dict[str, Any], errors: dict[str, Any]) -> dict[str, Any]:
    """``doc`` with the plan jobs, the 503/403 answers and the input bounds added (a copy)."""
    doc = copy.deepcopy(doc)
    paths, components = doc["paths"], doc["components"]
    paths.update(_paths(errors))
    components["schemas"].update(copy.deepcopy(SCHEMAS))
    components["responses"].update(copy.deepcopy(RESPONSES))
    for path, method in PLANNING_ROUTES:
        op = paths[path][method]
        op["responses"]["503"] = _BUSY
        op.setdefault("parameters", []).append(_JOB_HEADER)
        op["description"] = WAITING
    for item in paths.values():
        for method, op in item.items():
            if method in ("post", "put", "delete"):
                op["responses"].setdefault("403", _FORBIDDEN)
    export = components["schemas"]["DeploymentExport"]["properties"]
    export["format_version"] = {"type": "integer", "const": FORMAT_VERSION}
    export["deployment"] = {
        "type": "object",
        "properties": {"revision": {"type": "integer", "minimum": 1, "maximum": MAX_REVISION}},
    }
    components["schemas"]["Error"]["description"] = (
        f"every JSON integer is at most ±{MAX_EXACT_INTEGER} (RFC 8259 §6); larger ones are refused "
        "by field path before conversion"
    )
    return doc
