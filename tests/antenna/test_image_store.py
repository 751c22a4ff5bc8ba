"""Fitted complex images kept across processes: the stored fit is the fit, to the bit.

The reference is the engine's own fit (checked against direct numerical Sommerfeld integrals in
test_sommerfeld.py); storing it must change nothing but the time.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from fieldkit.antenna import sommerfeld
from fieldkit.disk_cache import ArrayDir

ROOT = Path(__file__).resolve().parents[2]
GROUND = (3.79e6, 13.0, 0.002)  # the demo's poor ground at its first channel


@pytest.fixture()
def store(tmp_path):
    sommerfeld.complex_images.cache_clear()
    s = ArrayDir(tmp_path / "images")
    sommerfeld.keep_images_in(s)
    yield s
    sommerfeld.keep_images_in(None)
    sommerfeld.complex_images.cache_clear()


def _fresh_fit():
    k0 = 2 * np.pi * GROUND[0] / sommerfeld.SPEED_OF_LIGHT_M_S
    eps = complex(GROUND[1], -GROUND[2] / (2 * np.pi * GROUND[0] * sommerfeld.EPS0))
    return sommerfeld._fit(k0, eps)


def _arrays(im):
    return (im.beta, im.a_h, im.a_v, im.a_d, im.a_c)


def test_a_stored_fit_equals_the_fit(store):
    fitted = sommerfeld.complex_images(*GROUND)
    (saved,) = store.path.glob("*.npy")
    sommerfeld.complex_images.cache_clear()
    loaded = sommerfeld.complex_images(*GROUND)
    assert loaded is not fitted
    for a, b, c in zip(_arrays(loaded), _arrays(fitted), _fresh_fit(), strict=True):
        np.testing.assert_array_equal(a, b)
        np.testing.assert_array_equal(a, c)
    assert saved.stat().st_size < 4096


def test_a_damaged_fit_is_fitted_again(store):
    sommerfeld.complex_images(*GROUND)
    (saved,) = store.path.glob("*.npy")
    np.save(saved, np.full((5, 3), np.nan + 0j))  # readable, but not a fit
    sommerfeld.complex_images.cache_clear()
    again = sommerfeld.complex_images(*GROUND)
    for a, c in zip(_arrays(again), _fresh_fit(), strict=True):
        np.testing.assert_array_equal(a, c)
    assert np.isfinite(np.load(saved)).all()  # and stored properly this time


def test_the_directory_stays_bounded(tmp_path):
    d = ArrayDir(tmp_path, max_files=5)
    for i in range(12):
        d.save(f"k{i}", np.arange(3.0) + i)
        os.utime(d._file(f"k{i}"), ns=(i * 10**9, i * 10**9))
    names = sorted(p.stem for p in tmp_path.glob("*.npy"))
    assert len(names) <= 5
    assert "k11" in names and "k0" not in names
    np.testing.assert_array_equal(d.load("k11"), np.arange(3.0) + 11)
    assert d.load("never saved") is None


def test_the_cli_fits_once_across_runs(tmp_path):
    spec = ROOT / "assets" / "demo" / "dipole-model.json"
    env = {**os.environ, "FIELDKIT_CACHE_DIR": str(tmp_path)}

    def run():
        out = subprocess.run(
            [sys.executable, "-m", "fieldkit", "model", str(spec)],
            capture_output=True,
            text=True,
            check=True,
            env=env,
            cwd=ROOT,
            timeout=120,
        )
        return json.loads(out.stdout), sorted(tmp_path.rglob("*.npy"))

    first, files = run()
    assert len(files) == 1 and files[0].parent.name == f"complex-images-{sommerfeld.IMAGE_FIT_ID}"
    stamp = files[0].stat().st_mtime_ns
    second, files_again = run()
    assert second == first
    assert files_again == files and files[0].stat().st_mtime_ns == stamp  # read, not refitted
