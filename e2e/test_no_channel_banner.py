"""The banner on Sky and Wire when no channel of the kit works at some of the scheduled hours (issue 13):
a deployment at 62° N in January with a 21–02 UTC schedule, in Debian's chromium at phone size against
the real service. The words are the sky layer's (its foF2 and FOT, tests/sky/test_what_works.py)."""

from __future__ import annotations

import json
import urllib.request
from pathlib import Path

import pytest

from e2e.conftest import shot

pytestmark = [pytest.mark.browser, pytest.mark.slow]

SITE = Path(__file__).resolve().parents[1] / "tests" / "plan" / "sites" / "north-62-january.json"


def _create(service) -> str:
    body = json.loads(SITE.read_text())
    body["name"] = "North camp (test)"
    req = urllib.request.Request(
        service.url.rstrip("/") + "/api/deployments",
        data=json.dumps(body).encode(),
        headers={"Content-Type": "application/json"},
        method="POST",
    )
    with urllib.request.urlopen(req, timeout=120) as r:
        return json.loads(r.read())["id"]


def test_banner_on_sky_and_wire(open_app, service):
    dep = _create(service)
    for section in ("sky", "wire"):
        page = open_app("phone", f"?deployment={dep}#{section}")
        banner = page.get_by_test_id("no-channel-banner")
        banner.wait_for(timeout=120_000)
        text = banner.inner_text()
        assert text.startswith("No channel of the kit works at 21:00–02:00 UTC"), text
        assert "MHz would cover 0–300 km" in text
        shot(page, f"no-channel-{section}")
