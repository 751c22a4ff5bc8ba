"""The plan's progress bar (issue 15): while a long plan runs, the busy strip shows a real bar and
the planner's stage in words, from the plan job (GET /api/plans/<id>), and both go with the answer.

A plan of the demo takes ~0.3 s on a warm service (compiled kernels, issue 17), less than the app's
first progress poll (0.5 s), so the bar is checked on the longest plan a site may ask for: ten
supports (45 pairs) and twelve channels, ~2 s of work, re-planned from the app after one support's
height is edited (a new input: no cache answers it)."""

from __future__ import annotations

import json
import urllib.request
from pathlib import Path

import pytest

from e2e.conftest import PLAN_TIMEOUT_MS, shot
from tests.robustness.helpers import long_variant

pytestmark = [pytest.mark.browser, pytest.mark.slow]

DEMO = Path(__file__).resolve().parents[1] / "assets" / "demo" / "larch-basin-plan.json"


def _long_site() -> dict:
    spec = long_variant(json.loads(DEMO.read_text()), 0)
    return {**spec, "name": "Ten trees, twelve channels (test)"}


def _create(service) -> str:
    req = urllib.request.Request(
        service.url.rstrip("/") + "/api/deployments",
        data=json.dumps(_long_site()).encode(),
        headers={"Content-Type": "application/json"},
        method="POST",
    )
    with urllib.request.urlopen(req, timeout=PLAN_TIMEOUT_MS / 1000) as r:
        return json.loads(r.read())["id"]


def test_a_long_plan_shows_its_progress(open_app, service):
    from e2e.test_field_app import fill, wait_plan

    dep = _create(service)
    page = open_app("phone", f"?deployment={dep}#site")
    page.get_by_test_id("height-X2").wait_for()
    fill(page, "height-X2", "11.3 m")  # a new input: the plan cache cannot answer it
    page.get_by_test_id("save-plan").tap()
    page.get_by_test_id("busy").wait_for(state="visible")
    assert "planning" in page.get_by_test_id("busy").inner_text()
    page.get_by_test_id("plan-progress").wait_for(state="attached", timeout=PLAN_TIMEOUT_MS)
    busy_text = page.get_by_test_id("busy").inner_text()
    assert "Saving and planning: " in busy_text, busy_text
    assert 0 <= float(page.get_by_test_id("plan-progress").get_attribute("value") or 0) <= 1
    shot(page, "phone-plan-progress")
    wait_plan(page)
    assert page.get_by_test_id("plan-progress").count() == 0  # gone with the answer
