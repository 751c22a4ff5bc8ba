"""Fixtures for the service tests: an app on a temporary data directory, its client, a LAN app.

A real SQLite database is used throughout; a real waitress server where the test says so.
"""

from __future__ import annotations

import copy
import json
import uuid
from pathlib import Path

import pytest

from fieldkit import paths
from fieldkit.service import create_app


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
def demo_input() -> dict:
    """The demo deployment body (plan input plus name), from assets/demo (invented scenario)."""
    return json.loads(Path(paths.demo_plan_path()).read_text(encoding="utf-8"))


# A stored plan result shaped like the plan contract of ARCHITECTURE.md, for tests of the store and the
# checklist endpoints that must not depend on the plan layer's numbers. Its checklist items follow the
# safety block's shape (id, stage, text, required).
CHECKLIST = [
    {
        "id": "pre-power-line-0",
        "stage": "pre-raise",
        "text": "Line 0 is 35 m away.",
        "required": True,
    },
    {"id": "pre-weather", "stage": "pre-raise", "text": "No thunder for 30 min.", "required": True},
    {"id": "pre-gloves", "stage": "pre-raise", "text": '=HYPERLINK("x") gloves', "required": False},
    {"id": "after-swr", "stage": "after-raise", "text": "Measure the SWR dip.", "required": True},
]
RESULT = {
    "options": [
        {
            "form": "flat",
            "frequency_mhz": 3.79,
            "safety": {"raise_ok": True, "checklist": CHECKLIST},
        }
    ]
}


def export_doc(*, deployment_id: str | None = None, raise_ok: bool = True, acks=()) -> dict:
    """An export-format document holding :data:`RESULT`, as a laptop running fieldkit would write."""
    result = copy.deepcopy(RESULT)
    result["options"][0]["safety"]["raise_ok"] = raise_ok
    return {
        "format": "fieldkit-deployment",
        "format_version": 1,
        "deployment": {
            "id": deployment_id or str(uuid.uuid4()),
            "name": "Checklist fixture",
            "input": {"site": {"ground": "poor", "supports": []}, "channels_mhz": [3.79]},
            "result": result,
            "plan_error": None,
            "created_at": "2026-12-01T12:00:00.000000Z",
            "updated_at": "2026-12-01T12:00:00.000000Z",
            "revision": 1,
        },
        "acknowledgements": list(acks),
    }


@pytest.fixture
def planned(client) -> str:
    """The id of a stored deployment with a checklist (imported from :func:`export_doc`)."""
    response = client.post("/api/deployments/import", json=export_doc())
    assert response.status_code == 201, response.json
    return response.json["id"]


def ack(done=True, by="AB", at="2026-12-01T14:05:00Z", client_id=None) -> dict:
    return {"done": done, "by": by, "at": at, "client_id": client_id or str(uuid.uuid4())}
