"""``POST /api/model``, ``/api/sky``, ``/api/plan``: the same functions as the CLI, same JSON."""

from __future__ import annotations

from flask import Blueprint, jsonify

from fieldkit.service.http import json_body
from fieldkit.service.layers import call_layer
from fieldkit.service.readiness import compute_plan, plan_cache

bp = Blueprint("calc", __name__, url_prefix="/api")


@bp.post("/model")
def model():
    spec = json_body(allow_array=True)
    return jsonify(call_layer("fieldkit.antenna", "model_json", spec))


@bp.post("/sky")
def sky():
    spec = json_body()
    return jsonify(call_layer("fieldkit.sky", "sky_json", spec))


@bp.post("/plan")
def plan():
    spec = json_body()
    return jsonify(compute_plan(spec, plan_cache()))
