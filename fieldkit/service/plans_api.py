"""Plan jobs over HTTP: ``POST /api/plans`` starts one, ``GET /api/plans/<id>`` tells how far it is.

``POST /api/plan`` (the CLI's contract) and the deployment writes plan through the same jobs and wait
for theirs in the request: :func:`plan_text`. A client that wants to show progress meanwhile names the
job itself with the ``X-Fieldkit-Job`` header (a UUID) and polls ``GET /api/plans/<that id>`` from
another connection, or starts the job with ``POST /api/plans`` and polls until ``state`` is ``done``
and fetches ``GET /api/plans/<id>/result``.
"""

from __future__ import annotations

import json
import uuid
from typing import Any

from flask import Blueprint, Response, current_app, jsonify, request

from fieldkit.errors import InputError
from fieldkit.service.http import json_body
from fieldkit.service.plan_jobs import PlanBoard, PlanCancelled
from fieldkit.store.store_errors import Conflict, NotFound

bp = Blueprint("plans", __name__, url_prefix="/api")

JOB_HEADER = "X-Fieldkit-Job"


def board() -> PlanBoard:
    return current_app.extensions["fieldkit_plan_board"]


def job_alias() -> str | None:
    """The client's own id for the job of this request (``X-Fieldkit-Job``), checked to be a UUID."""
    value = request.headers.get(JOB_HEADER)
    if value is None:
        return None
    try:
        return str(uuid.UUID(value[:64]))
    except ValueError:
        raise InputError(JOB_HEADER, f"expected a UUID, got {value[:60]!r}", status=400) from None


def plan_text(spec: Any) -> str:
    """Plan ``spec`` as a job and wait for it; the plan's JSON text (errors raised as the API answers).

    The wait ends early when the client hangs up (waitress tells through the environ), and the job is
    cancelled when no one else waits for it.
    """
    disconnected = request.environ.get("waitress.client_disconnected")
    return board().plan(spec, alias=job_alias(), disconnected=disconnected)


def plan_result(spec: Any) -> dict[str, Any]:
    return json.loads(plan_text(spec))


def _found(job_id: str):
    job = board().find(job_id)
    if job is None:
        raise NotFound("job_id", f"no plan job {job_id[:64]!r} (finished jobs are kept a while)")
    return job


@bp.post("/plans")
def start():
    job = board().submit(json_body(), alias=job_alias(), keep=True)
    response = jsonify(board().status(job))
    response.status_code = 202
    response.headers["Location"] = f"/api/plans/{job.id}"
    return response


@bp.get("/plans/<job_id>")
def progress(job_id: str):
    return jsonify(board().status(_found(job_id)))


@bp.get("/plans/<job_id>/result")
def result(job_id: str):
    job = _found(job_id)
    if job.state == "done":
        return Response(job.result_text, mimetype="application/json")
    if job.error is not None:
        raise job.error
    if job.state == "cancelled":
        raise PlanCancelled()
    raise Conflict("job_id", f"the plan is {job.state} ({job.stage}); poll GET /api/plans/{job.id}")


@bp.delete("/plans/<job_id>")
def cancel(job_id: str):
    job = _found(job_id)
    board().cancel(job)
    return jsonify(board().status(job))
