"""The compact IRI tables: what PyIRI reads from its coefficient files, kept in one binary file.

The sky estimate needs the CCIR foF2 and M(3000)F2 coefficient maps of the twelve months and the
IGRF-13 coefficients. PyIRI ships them as Fortran-formatted text and parses two months on every
call, and importing PyIRI costs about 0.6 s (its package imports matplotlib and scipy). So the
first use reads all twelve months once through PyIRI's own reader
(``PyIRI.main_library.read_ccir_ursi_coeff``; the IGRF file as PyIRI's ``inclination`` reads it)
and writes them, unchanged to the bit (PyIRI holds them as Python floats), as one ~0.3 MB ``.npy`` file in the user cache directory
(:func:`fieldkit.paths.cache_dir`, overridden by ``FIELDKIT_CACHE_DIR``). Every later process loads
that in about a millisecond with numpy alone, and :mod:`fieldkit.sky.iri_maps` evaluates the maps.

The file name carries a checksum of the source files' paths, sizes and modification times and of
this format, so another PyIRI installation builds its own table; a damaged file is rebuilt.
"""

from __future__ import annotations

import importlib.util
import threading
import zlib
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from fieldkit import disk_cache, paths

FORMAT = "iri-tables-1"  # change when the layout below changes
MONTHS = 12
FOF2_SHAPE = (13, 76, 2)  # diurnal terms × geographic functions × solar levels (CCIR)
M3000_SHAPE = (9, 49, 2)
IGRF_SHAPE = (195, 26)  # Gauss coefficients to degree 13 × epochs 1900-2025
IGRF_HEADER_LINES = 5  # as PyIRI's igrf_library.inclination skips them
DTYPE = np.dtype(
    [
        ("fof2", "<f8", (MONTHS, *FOF2_SHAPE)),
        ("m3000", "<f8", (MONTHS, *M3000_SHAPE)),
        ("igrf", "<f8", IGRF_SHAPE),
    ]
)


@dataclass(frozen=True)
class IriTables:
    """CCIR maps per month (index month − 1) and the IGRF-13 coefficients."""

    fof2: tuple[np.ndarray, ...]  # 12 × (13, 76, 2)
    m3000: tuple[np.ndarray, ...]  # 12 × (9, 49, 2)
    igrf: np.ndarray  # (195, 26) [nT]


_lock = threading.Lock()
_tables: IriTables | None = None


def pyiri_coefficient_dir() -> Path:
    """PyIRI's shipped ``coefficients`` directory, found without importing PyIRI."""
    spec = importlib.util.find_spec("PyIRI")
    if spec is None or not spec.submodule_search_locations:
        raise RuntimeError(
            "PyIRI is not installed; it is a dependency of fieldkit (pyproject.toml)"
        )
    return Path(next(iter(spec.submodule_search_locations))) / "coefficients"


def _sources(coeff_dir: Path) -> list[Path]:
    ccir = [coeff_dir / "CCIR" / f"ccir{m + 10}.asc" for m in range(1, MONTHS + 1)]
    return [*ccir, coeff_dir / "IGRF" / "IGRF13.shc"]


def table_path(coeff_dir: Path | None = None) -> Path:
    """Where the table of this PyIRI installation lives (the name depends on its source files)."""
    coeff_dir = coeff_dir or pyiri_coefficient_dir()
    stamp = FORMAT
    for f in _sources(coeff_dir):
        st = f.stat()
        stamp += f"|{f}:{st.st_size}:{st.st_mtime_ns}"
    return paths.cache_dir() / f"iri-tables-{zlib.crc32(stamp.encode()):08x}.npy"


def read_with_pyiri(coeff_dir: Path | None = None) -> np.ndarray:
    """Read every table through PyIRI (slow: imports PyIRI and parses 13 text files), one record."""
    import PyIRI.main_library as ml

    coeff_dir = coeff_dir or pyiri_coefficient_dir()
    rec = np.zeros((), dtype=DTYPE)
    for m in range(1, MONTHS + 1):
        fof2_ccir, _ursi, m3000, _es = ml.read_ccir_ursi_coeff(m, str(coeff_dir))
        rec["fof2"][m - 1] = fof2_ccir
        rec["m3000"][m - 1] = m3000
    with open(coeff_dir / "IGRF" / "IGRF13.shc") as fh:
        rec["igrf"] = np.genfromtxt(fh, delimiter="", skip_header=IGRF_HEADER_LINES)[:, 2:]
    return rec


def _read(path: Path) -> np.ndarray | None:
    rec = disk_cache.read_array(path)
    return rec if rec is not None and rec.dtype == DTYPE and rec.shape == () else None


def _unpack(rec: np.ndarray) -> IriTables:
    def months(name: str) -> tuple[np.ndarray, ...]:
        out = tuple(np.array(a) for a in rec[name])
        for a in out:
            a.setflags(write=False)
        return out

    igrf = np.array(rec["igrf"])
    igrf.setflags(write=False)
    return IriTables(fof2=months("fof2"), m3000=months("m3000"), igrf=igrf)


def load() -> IriTables:
    """The tables: from the cache file, or read through PyIRI and cached on first use."""
    global _tables
    with _lock:
        if _tables is None:
            path = table_path()
            rec = _read(path) if path.exists() else None
            if rec is None:
                rec = read_with_pyiri()
                disk_cache.write_array(path, rec)
            _tables = _unpack(rec)
        return _tables
