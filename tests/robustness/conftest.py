"""Fixtures for the robustness tests: a service on a temporary data directory (real SQLite)."""

from __future__ import annotations

import pytest

from fieldkit.service import create_app
from tests.robustness.helpers import checklist_export


@pytest.fixture
def app(tmp_path):
    return create_app({"DATA_DIR": tmp_path / "data", "DEMO": False, "TESTING": True})


@pytest.fixture
def client(app):
    return app.test_client()


@pytest.fixture
def lan_app(tmp_path):
    return create_app({"DATA_DIR": tmp_path / "data", "DEMO": False, "LAN": True, "TESTING": True})


@pytest.fixture
def deployment_id(client) -> str:
    """A stored deployment with :data:`helpers.CHECKLIST` (imported, no plan run)."""
    response = client.post("/api/deployments/import", json=checklist_export())
    assert response.status_code == 201, response.get_json()
    return response.get_json()["id"]
