"""`fieldkit plan FILE --sweep ANALYSER_FILE [--at radio]`: the analyser file as retrim.sweep."""

from __future__ import annotations

import json

import numpy as np
import pytest

from tests.cli.test_frame import run
from tests.rigging.sweep_cases import csv_text, sweep_site

F_MHZ = np.linspace(3.55, 3.75, 9)


def _series_rlc(f_mhz, f0_mhz=3.62, r=45.0, l_h=20e-6):
    # a series RLC resonating at f0: X = ωL − 1/(ωC), C = 1/((2π f0)² L) (circuit theory)
    w = 2 * np.pi * f_mhz * 1e6
    c = 1 / ((2 * np.pi * f0_mhz * 1e6) ** 2 * l_h)
    return r + 1j * (w * l_h - 1 / (w * c))


@pytest.fixture()
def files(tmp_path):
    plan_file = tmp_path / "site.json"
    plan_file.write_text(json.dumps(sweep_site()))
    sweep = tmp_path / "after raising.csv"
    sweep.write_text(csv_text(F_MHZ, _series_rlc(F_MHZ)))
    return plan_file, sweep


def test_plan_with_a_sweep_file(files):
    plan_file, sweep = files
    r = run("plan", str(plan_file), "--sweep", str(sweep))
    assert r.returncode == 0, r.stderr
    retrim = json.loads(r.stdout)["options"][0]["retrim"]
    assert retrim["sweep"]["resonance_mhz"] == pytest.approx(3.62, abs=1e-3)  # the RLC's f0
    assert retrim["sweep"]["name"] == "after raising.csv" and retrim["measured_at"] == "feedpoint"
    assert retrim["change_cm_per_leg"] < 0  # low: cut
    r = run("plan", str(plan_file), "--sweep", str(sweep), "--at", "radio")
    assert r.returncode == 0, r.stderr
    radio = json.loads(r.stdout)["options"][0]["retrim"]
    assert radio["measured_at"] == "radio" and radio["sweep"]["resonance_mhz"] != pytest.approx(
        3.62, abs=1e-3
    )


@pytest.mark.parametrize(
    "content, name, words",
    [
        ("frequency_mhz,r_ohm,x_ohm\n3.6,40,x\n", "s.csv", "line 2, column 3 (x_ohm)"),
        ("anything", "s.xlsx", "--sweep: expected a .s1p or .csv file"),
        ("# MHz S RI R 50\n3.6 0.1\n", "s.s1p", "retrim.sweep.text: not a readable Touchstone"),
    ],
)
def test_bad_sweep_file_is_one_line_and_exit_2(files, content, name, words):
    plan_file, sweep = files
    bad = sweep.with_name(name)
    bad.write_text(content)
    r = run("plan", str(plan_file), "--sweep", str(bad))
    assert r.returncode == 2
    assert len(r.stderr.strip().splitlines()) == 1 and words in r.stderr, r.stderr


def test_at_without_a_sweep_is_refused(files):
    r = run("plan", str(files[0]), "--at", "radio")
    assert r.returncode == 2 and "--at: only with --sweep" in r.stderr
