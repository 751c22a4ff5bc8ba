"""The Flask application factory: defaults, then the caller's mapping; one blueprint per area."""

from __future__ import annotations

import contextlib
import json
import logging
import threading
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from flask import Flask

from fieldkit import paths, store
from fieldkit.errors import InputError
from fieldkit.service import http, plan_jobs, request_db, security, static_files
from fieldkit.service.plancache import DEFAULT_ENTRIES, PlanCache
from fieldkit.store import deployments
from fieldkit.store.sqlite import get_meta, set_meta

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
    "LAN_SWITCH": False,  # the desktop window may share on the LAN (POST /api/lan)
    "LAN_PORT": 8765,  # where the share listens (a free port if taken)
    "ON_KEY_ROTATED": None,  # called with the new address after POST /api/lan/key (serve prints it)
    "DEMO": True,  # load the demo deployment into an empty database on first start
    "DEMO_PLAN": True,  # and plan it in the background
    "PLAN_CACHE_ENTRIES": DEFAULT_ENTRIES,  # 0 turns the plan cache off
    "PLAN_CACHE": None,  # a PlanCache to share between apps (tests share one per session)
    "PLAN_BOARD": None,  # a plan_jobs.PlanBoard to share (the desktop's LAN share, the tests)
    "PLAN_WORKERS": plan_jobs.DEFAULT_WORKERS,  # worker processes running plans
    "PLAN_QUEUE": plan_jobs.DEFAULT_QUEUE,  # plans that may wait for a worker; then 503
    "PLAN_DEADLINE_S": plan_jobs.DEFAULT_DEADLINE_S,  # the longest one plan may run [s]
    "PLAN_NICENESS": plan_jobs.DEFAULT_NICENESS,  # how much lower the plan workers run (POSIX)
    "MAX_CONTENT_LENGTH": MAX_CONTENT_LENGTH,
    "JSON_SORT_KEYS": False,
}


def create_app(config: Mapping[str, Any] | None = None) -> Flask:
    """Build the service.

    Parameters
    ----------
    config : mapping, optional
        Overrides of :data:`DEFAULTS` (``DATA_DIR``, ``WEB_DIR``, ``LAN``, ``KEY``, ``PUBLIC_URL``,
        ``DEMO``, ``PLAN_WORKERS``, ``PLAN_QUEUE``, ``PLAN_DEADLINE_S``, ``MAX_CONTENT_LENGTH``,
        or any Flask setting). Tests pass their own.
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
    request_db.install(app)
    static_files.install(app)

    from fieldkit.service import (
        calc_api,
        checks_api,
        deployments_api,
        health_api,
        kit_api,
        lan_api,
        openapi,
        plans_api,
    )

    for blueprint in (
        health_api.bp,
        calc_api.bp,
        plans_api.bp,
        deployments_api.bp,
        checks_api.bp,
        kit_api.bp,
        lan_api.bp,
        openapi.bp,
    ):
        app.register_blueprint(blueprint)
    app.register_blueprint(static_files.bp)

    cache = app.config.get("PLAN_CACHE") or PlanCache(entries=app.config["PLAN_CACHE_ENTRIES"])
    app.extensions["fieldkit_plan_cache"] = cache
    app.extensions["fieldkit_plan_board"] = app.config.get("PLAN_BOARD") or plan_jobs.PlanBoard(
        cache=cache,
        workers=app.config["PLAN_WORKERS"],
        queue_limit=app.config["PLAN_QUEUE"],
        deadline_s=app.config["PLAN_DEADLINE_S"],
        niceness=app.config["PLAN_NICENESS"],
    )
    app.extensions["fieldkit_planning"] = set()
    if app.config["DEMO"]:
        load_demo(app)
    return app


def load_demo(app: Flask) -> str | None:
    """On first start with an empty database, store the demo deployment and plan it in the background.

    The demo is stored at once (a newcomer sees it immediately); its plan takes a while, so it runs as
    a plan job that a daemon thread waits for and stores when done (``"planning": true`` until
    then). Returns the new id, or None when the database already had deployments or had the demo once.
    """
    database = app.config["DATABASE"]
    doc = json.loads(paths.demo_plan_path().read_text(encoding="utf-8"))
    name = doc.pop("name", "Demo deployment")
    conn = store.connect(database)
    try:
        with store.transaction(conn):
            if deployments.count(conn) or get_meta(conn, DEMO_MARKER):
                return None
            new_id = deployments.insert(conn, name=name, plan_input=doc, plan_result=None)
            set_meta(conn, DEMO_MARKER, new_id)
    finally:
        conn.close()
    if app.config["DEMO_PLAN"]:
        planning = app.extensions["fieldkit_planning"]
        planning.add(new_id)
        board = app.extensions["fieldkit_plan_board"]
        worker = threading.Thread(
            target=_plan_in_background,
            args=(database, new_id, doc, board, planning),
            name="fieldkit-demo-plan",
            daemon=True,
        )
        worker.start()
    return new_id


def _plan_in_background(
    database: Path, deployment_id: str, doc: dict, board: plan_jobs.PlanBoard, planning: set
) -> None:
    try:
        try:
            result, plan_error = board.result(_finished(board, doc)), None
        except plan_jobs.PlanCancelled:  # the service is stopping: write nothing after it closed
            return
        except InputError as exc:  # the demo must never keep the service from working
            log.warning("demo plan refused by the plan layer: %s", exc)
            result, plan_error = None, exc.to_json()
        except Exception:
            log.exception("demo plan failed; the demo stays without a result")
            result = None
            plan_error = {"error": "plan failed", "field": None, "detail": "see the service log"}
        conn = store.connect(database)
        try:
            deployments.set_result(
                conn, deployment_id, plan_result=result, plan_error=plan_error, revision=1
            )
        finally:
            conn.close()
    except Exception:  # e.g. the data directory vanished while planning (a test's temporary dir)
        log.exception("could not store the demo plan")
    finally:
        planning.discard(deployment_id)


def _finished(board: plan_jobs.PlanBoard, doc: dict) -> plan_jobs.Job:
    job = board.submit(doc, keep=True)
    with contextlib.suppress(InputError):  # board.result raises the job's own error
        board.wait(job)
    return job
