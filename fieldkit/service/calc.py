"""``POST /api/model``, ``/api/sky``, ``/api/plan``: the same functions as the CLI, same JSON."""

from __future__ import annotations

from flask import Blueprint, jsonify

from fieldkit.service.http import json_body
from fieldkit.service.layers import layer_function

bp = Blueprint("calc", __name__, url_prefix="/api")


@bp.post("/model")
def model():
    spec = json_body(allow_array=True)
    return jsonify(layer_function("fieldkit.antenna", "model_json")(spec))


@bp.post("/sky")
def sky():
    spec = json_body()
    return jsonify(layer_function("fieldkit.sky", "sky_json")(spec))


@bp.post("/plan")
def plan():
    spec = json_body()
    return jsonify(layer_function("fieldkit.plan", "plan")(spec))
