"""The demo plan's first option is unchanged, number by number, at the precision it is printed.

Reference: tests/plan/reference/demo_first_option.json (regenerate on purpose only, with
``.venv/bin/python -m tests.plan.first_option``; see tests/plan/first_option.py).
"""

from __future__ import annotations

import json

import pytest

from tests.plan.first_option import REFERENCE, demo_first_option, differences, last_digit


def test_last_digit():
    assert last_digit(12.737) == pytest.approx(0.001)
    assert last_digit(10.0) == pytest.approx(0.1)
    assert last_digit(3.605) == pytest.approx(0.001)
    assert last_digit(1e-05) == pytest.approx(1e-05)


def test_comparison_catches_a_change_beyond_the_printed_digit():
    want = {"leg_m": [18.52, 18.52], "form": "flat", "n": 41, "ok": True}
    assert differences({"leg_m": [18.53, 18.52], "form": "flat", "n": 41, "ok": True}, want) == []
    assert differences({"leg_m": [18.54, 18.52], "form": "flat", "n": 41, "ok": True}, want)
    assert differences({"leg_m": [18.52, 18.52], "form": "sloping", "n": 41, "ok": True}, want)
    assert differences({"leg_m": [18.52, 18.52], "form": "flat", "n": 42, "ok": True}, want)
    assert differences({"leg_m": [18.52], "form": "flat", "n": 41, "ok": True}, want)
    assert differences({"h": 10.0}, {"h": 10.01}) == []  # a flip of the last digit printed
    assert differences({"h": 10.05}, {"h": 10.0})


@pytest.mark.slow
def test_demo_first_option_is_unchanged():
    want = json.loads(REFERENCE.read_text())
    assert differences(demo_first_option(), want) == []
