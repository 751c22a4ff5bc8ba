"""Shared test data for the service tests (a module name of its own, unlike conftest)."""

from __future__ import annotations

import copy
import uuid

from tests.robustness.helpers import SMALL_PLAN

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
    """An export-format document of :data:`SMALL_PLAN` holding :data:`RESULT`.

    Imported through the API its result is recomputed (the import trusts no derived state); tests
    of the checklist mechanics store it as it is with :func:`tests.robustness.helpers.store_export`.
    """
    result = copy.deepcopy(RESULT)
    result["options"][0]["safety"]["raise_ok"] = raise_ok
    return {
        "format": "fieldkit-deployment",
        "format_version": 1,
        "deployment": {
            "id": deployment_id or str(uuid.uuid4()),
            "name": "Checklist fixture",
            "input": copy.deepcopy(SMALL_PLAN),
            "result": result,
            "plan_error": None,
            "created_at": "2026-12-01T12:00:00.000000Z",
            "updated_at": "2026-12-01T12:00:00.000000Z",
            "revision": 1,
        },
        "acknowledgements": list(acks),
    }


def ack(done=True, by="AB", at="2026-12-01T14:05:00Z", client_id=None) -> dict:
    return {"done": done, "by": by, "at": at, "client_id": client_id or str(uuid.uuid4())}
