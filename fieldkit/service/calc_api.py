"""``POST /api/model``, ``/api/sky``, ``/api/plan``: the same functions as the CLI, same JSON."""

from __future__ import annotations

import threading

from flask import Blueprint, Response, jsonify

from fieldkit.service.http import json_body
from fieldkit.service.plans_api import plan_text

bp = Blueprint("calc", __name__, url_prefix="/api")


@bp.post("/model")
def model():
    spec = json_body(allow_array=True)
    from fieldkit.antenna import model_json  # the engine's import cost is paid by its first use

    return jsonify(model_json(spec))


@bp.post("/sky")
def sky():
    spec = json_body()
    from fieldkit.sky import sky_json

    return jsonify(sky_json(spec))


@bp.post("/plan")
def plan():
    """The plan JSON, as ``fieldkit plan`` prints it; the request waits for its plan job."""
    return Response(plan_text(json_body()), mimetype="application/json")


def warm_up() -> None:
    """Load the calculators in a background thread, so the first request after a start is not slow.

    Importing the engine and reading the IRI tables costs a few hundred ms of CPU; done at start, the first
    model or sky request from the window or a phone does not pay it (plans run in worker processes,
    which load the planner themselves). Failures are left for the request itself to report.
    """

    def load() -> None:
        try:
            import fieldkit.antenna  # noqa: F401
            from fieldkit.sky import iri_tables

            iri_tables.load()
        except Exception:  # noqa: BLE001 - the request that needs the layer reports it properly
            pass

    threading.Thread(target=load, name="fieldkit-warm-up", daemon=True).start()
