"""The compact IRI tables and the numpy evaluation against PyIRI itself (the reference).

PyIRI 0.1.7 (Forsythe et al. 2024, doi:10.1029/2023SW003739) is called directly here; fieldkit's
sky layer no longer imports it at run time, only to build the cached tables once.
"""

from __future__ import annotations

import datetime as dt
import json
import os
import subprocess
import sys
import warnings
from pathlib import Path

import numpy as np
import pytest

from fieldkit.sky import igrf, iri_maps, iri_tables

ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture(scope="module")
def pyiri():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        import PyIRI
        import PyIRI.igrf_library as ig
        import PyIRI.main_library as ml
    return PyIRI, ml, ig


@pytest.fixture()
def fresh_cache(tmp_path, monkeypatch):
    """An empty cache directory and no tables loaded in this process."""
    monkeypatch.setenv("FIELDKIT_CACHE_DIR", str(tmp_path))
    monkeypatch.setattr(iri_tables, "_tables", None)
    return tmp_path


def test_tables_hold_what_pyiri_reads(pyiri):
    PyIRI, ml, _ = pyiri
    t = iri_tables.load()
    for m in range(1, 13):
        ccir, _ursi, m3000, _es = ml.read_ccir_ursi_coeff(m, PyIRI.coeff_dir)
        np.testing.assert_array_equal(t.fof2[m - 1], np.asarray(ccir, dtype=float))
        np.testing.assert_array_equal(t.m3000[m - 1], np.asarray(m3000, dtype=float))
    raw = np.genfromtxt(Path(PyIRI.coeff_dir) / "IGRF" / "IGRF13.shc", skip_header=5)
    np.testing.assert_array_equal(t.igrf, raw[:, 2:])


def test_table_is_built_once_in_the_cache_dir_and_then_read_without_pyiri(fresh_cache):
    first = iri_tables.load()
    files = list(fresh_cache.glob("iri-tables-*.npy"))
    assert len(files) == 1 and files[0] == iri_tables.table_path()
    assert files[0].stat().st_size < 400_000  # compact: ~0.3 MB for 12 months and IGRF-13
    probe = (
        "import sys, json, numpy as np\n"
        "from fieldkit.sky import iri_tables\n"
        "t = iri_tables.load()\n"
        "print(json.dumps({'pyiri': 'PyIRI' in sys.modules, 'scipy': 'scipy' in sys.modules,"
        " 'sum': float(np.sum(t.fof2[5])) + float(np.sum(t.igrf))}))\n"
    )
    run = subprocess.run(
        [sys.executable, "-c", probe],
        capture_output=True,
        text=True,
        check=True,
        cwd=ROOT,
        env={**os.environ, "FIELDKIT_CACHE_DIR": str(fresh_cache)},
        timeout=120,
    )
    got = json.loads(run.stdout)
    assert not got["pyiri"] and not got["scipy"]
    assert got["sum"] == float(np.sum(first.fof2[5])) + float(np.sum(first.igrf))


def test_a_damaged_table_is_rebuilt(fresh_cache):
    path = iri_tables.table_path()
    path.write_bytes(b"\x93NUMPY not really")
    t = iri_tables.load()
    assert t.fof2[0].shape == iri_tables.FOF2_SHAPE
    assert np.load(path, allow_pickle=False).dtype == iri_tables.DTYPE


CASES = [  # (lat, lon, date, F10.7): both hemispheres, the equator, the poles' edge, months round
    (46.8, 8.2, "2026-12-01", 120.0),  # the demo
    (46.8, 8.2, "2026-12-20", 120.0),
    (-33.9, 151.2, "2027-03-10", 80.0),
    (0.5, -78.5, "2025-06-15", 200.0),
    (78.2, 15.6, "2028-01-02", 70.0),
    (-54.8, -68.3, "2024-09-30", 150.0),
    (35.0, 139.0, "2026-07-14", 95.0),
]


@pytest.mark.parametrize(("lat", "lon", "date", "f107"), CASES)
def test_peak_parameters_equal_pyiri_to_the_bit(pyiri, lat, lon, date, f107):
    PyIRI, ml, _ = pyiri
    day = dt.date.fromisoformat(date)
    hours = np.arange(0.0, 24.0, 0.5)
    f2, _f1, e, *_ = ml.IRI_density_1day(
        day.year, day.month, day.day, hours, np.array([lon]), np.array([lat]),
        np.array([300.0]), f107, PyIRI.coeff_dir, 0,
    )  # fmt: skip
    got = iri_maps.peak_parameters(
        iri_tables.load(), day=day, hours_utc=hours, lat_deg=lat, lon_deg=lon, f107=f107
    )
    np.testing.assert_array_equal(got.fof2_mhz, f2["fo"][:, 0])
    np.testing.assert_array_equal(got.hmf2_km, f2["hm"][:, 0])
    np.testing.assert_array_equal(got.m3000, f2["M3000"][:, 0])
    np.testing.assert_array_equal(got.foe_mhz, e["fo"][:, 0])


@pytest.mark.parametrize(("lat", "lon", "year", "height_km"), [
    (46.8, 8.2, 2026.9, 100.0), (-33.9, 151.2, 2021.3, 300.0), (89.0, 0.0, 1990.0, 100.0),
    (-70.0, 120.0, 2030.5, 300.0),
])  # fmt: skip
def test_igrf_field_equals_pyiri(pyiri, lat, lon, year, height_km):
    PyIRI, _, ig = pyiri
    out = ig.inclination(
        PyIRI.coeff_dir, year, np.array([lon]), np.array([lat]), height_km, only_inc=False
    )
    inc, total = igrf.field(
        iri_tables.load().igrf,
        decimal_year=year,
        lat_deg=np.array([lat]),
        lon_deg=np.array([lon]),
        height_km=height_km,
    )
    np.testing.assert_array_equal(inc, out[0])
    np.testing.assert_array_equal(total, out[6])
    np.testing.assert_array_equal(igrf.modip_deg(inc, np.array([lat])), ig.inc2modip(out[0], lat))
