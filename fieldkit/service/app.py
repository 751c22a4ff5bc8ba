"""The Flask application factory: defaults, then the caller's mapping; one blueprint per area."""

from __future__ import annotations

import json
import logging
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from flask import Flask

from fieldkit import paths, store
from fieldkit.errors import InputError
from fieldkit.service import db, http, security, web
from fieldkit.service.planning import run_plan
from fieldkit.store import deployments
from fieldkit.store.db import get_meta, set_meta

log = logging.getLogger("fieldkit.service")

# Largest request body [bytes]. The demo plan input is about 3 KiB; a model spec with a few hundred
# wires stays far below; anything bigger is a mistake or an attack.
MAX_CONTENT_LENGTH = 1024 * 1024
DEMO_MARKER = "demo_loaded"

DEFAULTS: dict[str, Any] = {
    "DATA_DIR": None,  # None: fieldkit.paths.data_dir() (FIELDKIT_HOME overrides)
    "WEB_DIR": None,  # None: fieldkit.paths.web_dir()
    "LAN": False,
    "KEY": None,  # LAN mode without a key: a new one is made
    "PUBLIC_URL": None,  # the address phones use, set by serve(); else the request's host
    "DEMO": True,  # load the demo deployment into an empty database on first start
    "MAX_CONTENT_LENGTH": MAX_CONTENT_LENGTH,
    "JSON_SORT_KEYS": False,
}


def create_app(config: Mapping[str, Any] | None = None) -> Flask:
    """Build the service.

    Parameters
    ----------
    config : mapping, optional
        Overrides of :data:`DEFAULTS` (``DATA_DIR``, ``WEB_DIR``, ``LAN``, ``KEY``, ``PUBLIC_URL``,
        ``DEMO``, ``MAX_CONTENT_LENGTH``, or any Flask setting). Tests pass their own.
    """
    app = Flask("fieldkit.service", static_folder=None)
    app.json = http.StrictJSONProvider(app)
    app.json.sort_keys = False
    app.config.from_mapping(DEFAULTS)
    if config:
        app.config.from_mapping(config)
    data_dir = Path(app.config["DATA_DIR"] or paths.data_dir())
    data_dir.mkdir(parents=True, exist_ok=True)
    app.config["DATA_DIR"] = data_dir
    app.config["WEB_DIR"] = Path(app.config["WEB_DIR"] or paths.web_dir())
    app.config["DATABASE"] = store.database_path(data_dir)
    if app.config["LAN"] and not app.config["KEY"]:
        app.config["KEY"] = security.new_key()

    store.migrate(app.config["DATABASE"])
    http.register_errors(app)
    security.install(app)
    db.install(app)
    web.install(app)

    from fieldkit.service import calc, checks, health, kit, lan, openapi
    from fieldkit.service import deployments as deployments_bp

    for blueprint in (health.bp, calc.bp, deployments_bp.bp, checks.bp, kit.bp, lan.bp, openapi.bp):
        app.register_blueprint(blueprint)
    app.register_blueprint(web.bp)

    if app.config["DEMO"]:
        load_demo(app.config["DATABASE"])
    return app


def load_demo(database: Path) -> str | None:
    """On first start with an empty database, store the demo deployment (planned when possible).

    Returns the new id, or None when the database already had deployments or had the demo once.
    """
    conn = store.connect(database)
    try:
        if deployments.count(conn) or get_meta(conn, DEMO_MARKER):
            return None
        doc = json.loads(paths.demo_plan_path().read_text(encoding="utf-8"))
        name = doc.pop("name", "Demo deployment")
        try:
            result, plan_error = run_plan(doc)
        except InputError as exc:  # the demo must never keep the service from starting
            log.warning("demo plan refused by the plan layer: %s", exc)
            result, plan_error = None, exc.to_json()
        except Exception:
            log.exception("demo plan failed; stored without a result")
            result, plan_error = None, {"error": "plan failed", "field": None, "detail": "see log"}
        with store.transaction(conn):
            if deployments.count(conn) or get_meta(conn, DEMO_MARKER):
                return None
            new_id = deployments.insert(
                conn, name=name, plan_input=doc, plan_result=result, plan_error=plan_error
            )
            set_meta(conn, DEMO_MARKER, new_id)
        return new_id
    finally:
        conn.close()
