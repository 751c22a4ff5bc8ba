"""Fixtures for the robustness tests: a service on a temporary data directory (real SQLite)."""

from __future__ import annotations

import pytest

from fieldkit.service import create_app
from fieldkit.service.plan_jobs import PlanBoard
from tests.robustness.helpers import checklist_export, store_export


@pytest.fixture(scope="session")
def plan_board():
    """One pool of plan worker processes for the session's in-process apps."""
    board = PlanBoard()
    yield board
    board.close()


@pytest.fixture
def app(tmp_path, plan_board):
    return create_app(
        {"DATA_DIR": tmp_path / "data", "DEMO": False, "TESTING": True, "PLAN_BOARD": plan_board}
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
def deployment_id(app) -> str:
    """A stored deployment with :data:`helpers.CHECKLIST` (written to the store, no plan run)."""
    return store_export(app.config["DATABASE"], checklist_export())
