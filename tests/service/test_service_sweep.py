"""POST /api/plan with an analyser file (retrim.sweep): the answer, and the bounds (413/422)."""

from __future__ import annotations

import numpy as np
import pytest

from fieldkit.rigging.analyser import MAX_POINTS, MAX_TEXT_BYTES
from tests.rigging.sweep_cases import csv_text, sweep_site

F_MHZ = np.linspace(3.55, 3.75, 21)


def _z(f_mhz):
    # a series RLC at 3.62 MHz, R = 45 Ω, L = 20 µH (circuit theory: X = ωL − 1/(ωC))
    w, l_h = 2 * np.pi * f_mhz * 1e6, 20e-6
    c = 1 / ((2 * np.pi * 3.62e6) ** 2 * l_h)
    return 45 + 1j * (w * l_h - 1 / (w * c))


def _body(text: str, **kw) -> dict:
    s = sweep_site()
    s["retrim"] = {"frequency_mhz": 3.65, "sweep": {"format": "csv", "text": text}, **kw}
    return s


def test_plan_with_a_sweep(client):
    response = client.post("/api/plan", json=_body(csv_text(F_MHZ, _z(F_MHZ)), at="radio"))
    assert response.status_code == 200, response.json
    retrim = response.json["options"][0]["retrim"]
    assert retrim["measured_at"] == "radio" and retrim["sweep"]["source"] == "csv"
    assert len(retrim["sweep"]["curve"]) == len(F_MHZ)
    assert "ground_fit" in retrim and retrim["ground_fit"]["best"]


def test_too_large_a_sweep_is_413(client):
    text = "#" + " " * MAX_TEXT_BYTES
    response = client.post("/api/plan", json=_body(text))
    assert response.status_code == 413, response.json
    # the same error word as a body over the service's limit (RFC 9110 §15.5.14: content too large)
    assert response.json["error"] == "request too large"
    assert response.json["field"] == "retrim.sweep.text"
    assert str(MAX_TEXT_BYTES) in response.json["detail"]


@pytest.mark.parametrize(
    ("text", "field", "words"),
    [
        (
            "frequency_mhz,r_ohm,x_ohm\n3.6,40,0\n3.7,4x,0\n3.8,40,0\n",
            "retrim.sweep.text",
            "line 3",
        ),
        (
            "frequency_mhz,swr\n"
            + "".join(f"{3 + i * 1e-4:.4f},2\n" for i in range(MAX_POINTS + 1)),
            "retrim.sweep.text",
            f"more than {MAX_POINTS} points",
        ),
    ],
)
def test_bad_sweeps_are_422_naming_the_line(client, text, field, words):
    response = client.post("/api/plan", json=_body(text))
    assert response.status_code == 422, response.json
    assert response.json["field"] == field and words in response.json["detail"]


def test_sweep_with_a_dip_is_refused(client):
    body = _body(csv_text(F_MHZ, _z(F_MHZ)), dip_mhz=3.6)
    response = client.post("/api/plan", json=body)
    assert response.status_code == 422 and response.json["field"] == "retrim.dip_mhz"
