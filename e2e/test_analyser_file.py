"""The analyser file in the Wire section, in Debian's chromium at phone size and on a laptop: pick a
CSV sweep, read the re-trim, see the measured curve drawn over the model's SWR curve, keep the ground
class it fits; a bad file is refused naming its line. Screenshots go to e2e/artifacts/."""

from __future__ import annotations

import math
import re

import pytest

from e2e.conftest import shot
from e2e.test_card_and_words import go
from e2e.test_field_app import assert_fits
from tests.words import problems

pytestmark = [pytest.mark.browser, pytest.mark.slow]


def _sweep_csv(f0_mhz: float, r_ohm: float = 45.0, points: int = 41) -> str:
    """A series RLC resonating at f0 (X = ωL − 1/(ωC), C = 1/((2π f0)² L); circuit theory)."""
    l_h = 20e-6
    c = 1 / ((2 * math.pi * f0_mhz * 1e6) ** 2 * l_h)
    rows = ["Frequency (MHz), R (Ω), X (Ω)"]
    for i in range(points):
        f = f0_mhz * (0.96 + 0.08 * i / (points - 1))
        w = 2 * math.pi * f * 1e6
        rows.append(f"{f:.5f},{r_ohm:.2f},{w * l_h - 1 / (w * c):.3f}")
    return "\n".join(rows) + "\n"


@pytest.mark.parametrize("kind", ["phone", "laptop"])
def test_analyser_file_draws_the_measured_curve(open_app, service, demo_planned, kind):
    page = open_app(kind, f"?deployment={demo_planned['id']}#wire")
    go(page, "wire")
    page.get_by_test_id("swr-plot").wait_for(timeout=120_000)
    f_mhz = float(
        re.search(r"(\d+\.\d+) MHz", page.get_by_test_id("option-0").inner_text()).group(1)
    )
    # resonating 1 % below the channel: the wire is long, cut (length goes as 1/f, common practice)
    page.get_by_test_id("sweep-file").set_input_files(
        files=[
            {
                "name": "after-raising.csv",
                "mimeType": "text/csv",
                "buffer": _sweep_csv(f_mhz * 0.99).encode(),
            }
        ]
    )
    result = page.get_by_test_id("sweep-result")
    result.wait_for(timeout=300_000)
    assert result.inner_text().startswith("Cut "), result.inner_text()
    facts = page.get_by_test_id("sweep-facts").inner_text()
    assert f"{f_mhz * 0.99:.3f}"[:4] in facts and "0.99" in facts, facts
    # the measured curve over the model's, and the legend that says which is which
    page.locator("[data-testid=swr-plot] polyline.measured-curve").wait_for()
    assert page.locator("[data-testid=swr-plot] polyline").count() == 2
    assert "dashed line: the analyser file" in page.get_by_test_id("swr-legend").inner_text()
    page.get_by_test_id("ground-fit").wait_for()
    text = page.locator("#sec-wire").inner_text()
    channels = service.get(f"/api/deployments/{demo_planned['id']}")["input"]["channels_mhz"]
    exempt = tuple(f"{c:g}" for c in channels)  # a channel is dialled as given (5.3715 MHz)
    assert not problems(text, exempt_numbers=exempt), problems(text, exempt_numbers=exempt)
    shot(page, f"{kind}-wire-analyser-file")
    assert_fits(page)
    keep = page.get_by_test_id("keep-ground")
    if keep.count():
        keep.click()
        assert "next plan at this site uses" in page.get_by_test_id("ground-kept").inner_text()


def test_a_bad_file_is_refused_naming_its_line(open_app, demo_planned):
    page = open_app("phone", f"?deployment={demo_planned['id']}#wire")
    go(page, "wire")
    page.get_by_test_id("sweep-file").set_input_files(
        files=[
            {
                "name": "sweep.csv",
                "mimeType": "text/csv",
                "buffer": b"Frequency (MHz), R (ohm), X (ohm)\n3.6,40,0\n3.7,4O,1\n3.8,41,2\n",
            }
        ]
    )
    error = page.get_by_test_id("sweep-error")
    error.wait_for(timeout=300_000)
    assert "line 3, column 2" in error.inner_text(), error.inner_text()
