"""``GET /api/health``: is the service up, which version (no key needed, even in LAN mode)."""

from __future__ import annotations

from flask import Blueprint, current_app, jsonify

import fieldkit

bp = Blueprint("health", __name__, url_prefix="/api")


@bp.get("/health")
def health():
    return jsonify({"ok": True, "version": fieldkit.__version__, "lan": current_app.config["LAN"]})
