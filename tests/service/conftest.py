"""Fixtures for the service tests: an app on a temporary data directory, its client, a LAN app.

A real SQLite database is used throughout; a real waitress server where the test says so.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from fieldkit import paths
from fieldkit.service import create_app
from fieldkit.service.plan_jobs import PlanBoard
from fieldkit.service.plancache import PlanCache
from tests.robustness.helpers import store_export

from .service_fixtures import export_doc


@pytest.fixture(scope="session")
def plan_cache():
    """One plan cache for the session: the demo plan costs tens of CPU seconds; compute it once."""
    return PlanCache()


@pytest.fixture(scope="session")
def plan_board(plan_cache):
    """One pool of plan worker processes for the session (each costs a start of 1-2 s)."""
    board = PlanBoard(cache=plan_cache)
    yield board
    board.close()


@pytest.fixture
def app(tmp_path, plan_cache, plan_board):
    return create_app(
        {
            "DATA_DIR": tmp_path / "data",
            "DEMO": False,
            "TESTING": True,
            "PLAN_CACHE": plan_cache,
            "PLAN_BOARD": plan_board,
        }
    )


@pytest.fixture
def client(app):
    return app.test_client()


@pytest.fixture
def lan_app(tmp_path, plan_board):
    return create_app(
        {
            "DATA_DIR": tmp_path / "data",
            "DEMO": False,
            "LAN": True,
            "TESTING": True,
            "PLAN_BOARD": plan_board,
        }
    )


@pytest.fixture
def demo_input() -> dict:
    """The demo deployment body (plan input plus name), from assets/demo (invented scenario)."""
    return json.loads(Path(paths.demo_plan_path()).read_text(encoding="utf-8"))


@pytest.fixture
def planned(app) -> str:
    """The id of a stored deployment with :data:`CHECKLIST` (:func:`export_doc` written to the store)."""
    return store_export(app.config["DATABASE"], export_doc())
