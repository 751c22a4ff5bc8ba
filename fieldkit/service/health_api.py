"""``GET /api/health``: is the service up, which version (no key needed, even in LAN mode)."""

from __future__ import annotations

from flask import Blueprint, current_app, jsonify

import fieldkit

bp = Blueprint("health", __name__, url_prefix="/api")


@bp.get("/health")
def health():
    """Up, its version, LAN mode, and how busy the plan workers are (counts only: no key needed)."""
    plans = current_app.extensions["fieldkit_plan_board"].load()
    return jsonify(
        {
            "ok": True,
            "version": fieldkit.__version__,
            "lan": current_app.config["LAN"],
            "plans": plans,
        }
    )
