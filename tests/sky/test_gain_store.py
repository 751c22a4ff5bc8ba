"""Default-dipole gains kept across processes: a stored gain is the engine's result, to the bit.

The reference is the engine's own solve of the default dipole (its patterns are checked against
NEC-2 in tests/antenna); storing it must change nothing but the time. The store is named by the
source of the engine, so an edited engine never reads a gain of the old one.
"""

from __future__ import annotations

import json

import numpy as np
import pytest

from fieldkit import disk_cache
from fieldkit.disk_cache import ArrayDir
from fieldkit.sky import gain

CHANNEL_MHZ = 5.3715  # a demo channel
GROUND = json.dumps("poor")


@pytest.fixture()
def store(tmp_path):
    gain._default_gain.cache_clear()
    s = ArrayDir(tmp_path / "gains")
    gain.keep_default_gains_in(s)
    yield s
    gain.keep_default_gains_in(None)
    gain._default_gain.cache_clear()


def _same(a: gain.ElevationGain, b: gain.ElevationGain) -> None:
    assert np.array_equal(a.gain_dbi, b.gain_dbi) and np.array_equal(
        a.elevation_deg, b.elevation_deg
    )
    assert (a.zenith_gain_dbi, a.swr, a.radiation_efficiency, a.frequency_mhz) == (
        b.zenith_gain_dbi,
        b.swr,
        b.radiation_efficiency,
        b.frequency_mhz,
    )


def test_a_stored_gain_equals_the_solved_one(store):
    solved = gain._default_gain(CHANNEL_MHZ, GROUND)
    assert len(list(store.path.glob("*.npy"))) == 1
    gain._default_gain.cache_clear()
    loaded = gain._default_gain(CHANNEL_MHZ, GROUND)
    assert loaded is not solved
    _same(loaded, solved)
    gain.keep_default_gains_in(None)
    gain._default_gain.cache_clear()
    _same(gain._default_gain(CHANNEL_MHZ, GROUND), solved)  # without any store


def test_a_damaged_gain_is_solved_again(store):
    solved = gain._default_gain(CHANNEL_MHZ, GROUND)
    (path,) = store.path.glob("*.npy")
    np.save(path, np.full(5, np.nan))  # wrong length and not finite
    gain._default_gain.cache_clear()
    _same(gain._default_gain(CHANNEL_MHZ, GROUND), solved)
    path.write_bytes(b"not an array")
    gain._default_gain.cache_clear()
    _same(gain._default_gain(CHANNEL_MHZ, GROUND), solved)


def test_the_store_is_named_by_the_engine_source(tmp_path, monkeypatch):
    here = disk_cache.source_fingerprint("fieldkit.antenna", "fieldkit.sky.gain")
    assert len(here) == 16 and here != "unknown"
    assert here == disk_cache.source_fingerprint("fieldkit.antenna", "fieldkit.sky.gain")
    assert here != disk_cache.source_fingerprint("fieldkit.antenna")
    pkg = tmp_path / "fk_probe_pkg"
    pkg.mkdir()
    (pkg / "__init__.py").write_text("X = 1\n")
    monkeypatch.syspath_prepend(str(tmp_path))
    before = disk_cache.source_fingerprint("fk_probe_pkg")
    (pkg / "__init__.py").write_text("X = 2\n")  # an edited module: another store
    assert disk_cache.source_fingerprint("fk_probe_pkg") != before
