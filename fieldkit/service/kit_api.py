"""``GET|PUT /api/kit``: the operator's inventory (what is in the car), validated at the edge."""

from __future__ import annotations

from typing import Any

from flask import Blueprint, jsonify

from fieldkit.errors import InputError, array, check_keys, join, number, require_mapping, text
from fieldkit.service.http import json_body
from fieldkit.service.request_db import get_db
from fieldkit.store import kit

bp = Blueprint("kit", __name__, url_prefix="/api")

MAX_ITEMS = 100
# Plausible bounds for field kit; wider than any real item, narrow enough to catch unit mistakes.
_NUMBERS = {
    "diameter_mm": (0.1, 30.0),
    "thickness_mm": (0.0, 10.0),
    "relative_permittivity": (1.0, 20.0),
    "length_m": (0.0, 2000.0),
    "spool_m": (0.0, 2000.0),
    "height_m": (0.0, 60.0),
    "top_load_kg": (0.0, 200.0),
    "mass_kg": (0.0, 200.0),
    "feedpoint_mass_kg": (0.0, 20.0),
    "tension_n": (0.0, 5000.0),
    "guys": (0, 12),
    "count": (0, 1000),
    "loss_db_per_100m": (0.0, 100.0),
    "mass_kg_per_m": (0.0, 5.0),
    # strength (issue 14): as the plan's kit table bounds them
    "working_load_n": (1.0, 100000.0),
    "weak_link_n": (1.0, 100000.0),
    "design_wind_m_s": (0.0, 60.0),
    "wind_limit_m_s": (1.0, 60.0),
    "ice_mm": (0.0, 50.0),
}
TOP_LEVEL = (
    "wire",
    "coax",
    "feedpoint_mass_kg",
    "masts",
    "rope",
    "throw_lines",
    "tension_n",
    "weak_link_n",
    "design_wind_m_s",
    "ice_mm",
    "wrap_allowance_m",
    "balun",
    "insulators",
    "stakes",
    "note",
)


def _check(value: Any, field: str) -> None:
    """Numbers with known unit suffixes within bounds, strings bounded, nesting bounded by the edge."""
    if isinstance(value, dict):
        for key, child in value.items():
            name = join(field, key)
            if key in _NUMBERS:
                low, high = _NUMBERS[key]
                number(child, name, minimum=low, maximum=high, integer=isinstance(low, int))
            else:
                _check(child, name)
    elif isinstance(value, list):
        for i, child in enumerate(array(value, field, max_items=MAX_ITEMS)):
            _check(child, join(field, i))
    elif isinstance(value, str) and value:
        text(value, field, max_length=500)
    elif isinstance(value, float | int) and not isinstance(value, bool):
        number(value, field)


def validate_kit(body: Any) -> dict[str, Any]:
    body = require_mapping(body, "")
    check_keys(body, "", TOP_LEVEL)
    for key in ("wire", "coax", "rope", "balun"):
        if key in body and body[key] is not None:
            require_mapping(body[key], key)
    for key in ("masts", "throw_lines", "insulators", "stakes"):
        if key in body:
            for i, entry in enumerate(array(body[key], key, max_items=MAX_ITEMS)):
                require_mapping(entry, join(key, i))
    for i, mast in enumerate(body.get("masts", [])):
        if "height_m" not in mast:
            raise InputError(
                join(join("masts", i), "height_m"), "missing; expected the mast height in m"
            )
    _check(body, "")
    return dict(body)


@bp.get("/kit")
def read_kit():
    body, updated_at = kit.get(get_db())
    return jsonify({"kit": body if body is not None else {}, "updated_at": updated_at})


@bp.put("/kit")
def write_kit():
    body = validate_kit(json_body())
    updated_at = kit.put(get_db(), body)
    return jsonify({"kit": body, "updated_at": updated_at})
