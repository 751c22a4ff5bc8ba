"""The engine's compiled kernels: C loaded with ctypes, the numpy code beside it as reference.

Two loops are compiled, the ones where a plan spent most of its engine time at numpy's speed
(figures in docs/engine.md), each ~10× faster, vectorised with glibc's vector maths library, and
within ~5e-15 relative of numpy (``tests/antenna/test_native.py``):

- :func:`image_sums`: the complex square root and exponential of every complex image and point
  pair of the lossy-ground field, summed over the images for the matrix
  (``sommerfeld._image_sums_numpy``) and the near field (``sommerfeld._field_sums_numpy``);
- :func:`smooth_potentials`: the smooth part (e^{−jkR} − 1)/R of the free-space potential integrals
  over the source Gauss points (``kernel._smooth_sums_numpy``).

The library is built on install (``hatch_build.py``; by hand: ``python
fieldkit/antenna/native/build.py``). When it is missing, cannot be loaded, was built from another
version of ``kernels.c``, or ``FIELDKIT_NUMPY_KERNELS=1`` is set, both functions return None and
the engine uses the numpy references; :func:`status` says which and why.
"""

from __future__ import annotations

import ctypes
import hashlib
import os
from functools import lru_cache
from pathlib import Path
from typing import NamedTuple

import numpy as np

HERE = Path(__file__).resolve().parent
SOURCE = HERE / "kernels.c"
LIBRARY = HERE / "_kernels.so"
DISABLE_ENV = "FIELDKIT_NUMPY_KERNELS"
_SIZE, _REAL, _PTR = ctypes.c_ssize_t, ctypes.c_double, ctypes.c_void_p


class Kernels(NamedTuple):
    """The library's C functions (ctypes)."""

    image_sums: object
    field_sums: object
    smooth_potentials: object


@lru_cache(maxsize=1)
def _load() -> tuple[Kernels | None, str]:
    """(the C function or None, a sentence saying which kernel runs and why), once per process."""
    if os.environ.get(DISABLE_ENV) == "1":
        return None, f"numpy kernels ({DISABLE_ENV}=1)"
    return load_library(LIBRARY, SOURCE)


def load_library(library: Path, source: Path) -> tuple[Kernels | None, str]:
    """The kernels in ``library`` if it was built from ``source`` as it is now, else why not."""
    if not library.exists():
        return None, f"numpy kernels (no compiled library at {library}; build it with build.py)"
    try:
        lib = ctypes.CDLL(str(library))
    except OSError as exc:
        return None, f"numpy kernels (the compiled library does not load: {exc})"
    lib.fk_source_sha256.restype = ctypes.c_char_p
    lib.fk_source_sha256.argtypes = []
    built_from = lib.fk_source_sha256().decode()
    if built_from != hashlib.sha256(source.read_bytes()).hexdigest():
        return None, f"numpy kernels ({library.name} was built from another {source.name}; rebuild)"
    sums, fields, smooth = lib.fk_image_sums, lib.fk_field_sums, lib.fk_smooth_potentials
    for fn in (sums, fields):
        fn.restype = None
        fn.argtypes = [_SIZE, _SIZE, _REAL] + [_PTR] * 5
    smooth.restype = ctypes.c_int
    smooth.argtypes = [_SIZE, _SIZE, _SIZE, _REAL] + [_PTR] * 5
    return Kernels(sums, fields, smooth), f"compiled kernels ({library.name})"


def status() -> str:
    """Which image kernels the engine runs, and why (for ``fieldkit`` diagnostics and tests)."""
    return _load()[1]


def compiled() -> bool:
    """True when the compiled image kernels are in use."""
    return _load()[0] is not None


MATRIX_ROWS = 8  # rows of the matrix's image sums; the near field's are these and four more
FIELD_ROWS = 12


def image_sums(k: float, rho2, zeta, beta, weights: np.ndarray, *, lib=None):
    """Image sums Σ_i w[r, i] K_r (rows, n), or None when not compiled.

    The kernel quantity of row r is, in order, kg, kg, G1, G1, G2, G2·z, G2·z, G2·z² (the
    matrix's eight rows, ``sommerfeld._image_sums_numpy``) and, with twelve rows, G1, G1, G2, G1·z
    (the near field's, ``sommerfeld._field_sums_numpy``).

    Parameters
    ----------
    k : wavenumber [1/m]
    rho2, zeta : (n,) squared horizontal distance [m²] and z + z' [m] of the point pairs
    beta : (I,) complex image depths [m]
    weights : (8 or 12, I) complex residues per row and image
    lib : kernels from :func:`load_library`; default: this package's library
    """
    lib = lib or _load()[0]
    if lib is None:
        return None
    arrays, head = _image_args(k, rho2, zeta, beta)
    weights = np.ascontiguousarray(weights, dtype=np.complex128)
    rows = len(weights)
    if weights.shape != (rows, len(arrays[2])) or rows not in (MATRIX_ROWS, FIELD_ROWS):
        raise ValueError("weights must be (8 or 12, number of images)")
    out = np.empty((rows, len(arrays[0])), dtype=np.complex128)
    fn = lib.image_sums if rows == MATRIX_ROWS else lib.field_sums
    fn(*head, weights.ctypes.data, out.ctypes.data)
    return out


def _image_args(k, rho2, zeta, beta):
    """(ρ², ζ, β) as the C kernels read them (contiguous float64, complex128), and the leading
    arguments of the image sums: n_img, n_pts, k and the three pointers (the arrays must stay
    referenced while the call runs)."""
    rho2 = np.ascontiguousarray(rho2, dtype=np.float64)
    zeta = np.ascontiguousarray(zeta, dtype=np.float64)
    beta = np.ascontiguousarray(beta, dtype=np.complex128)
    if rho2.shape != zeta.shape or rho2.ndim != 1 or beta.ndim != 1:
        raise ValueError("rho2 and zeta must be 1-D of one length, beta 1-D")
    head = (len(beta), len(rho2), float(k), rho2.ctypes.data, zeta.ctypes.data, beta.ctypes.data)
    return (rho2, zeta, beta), head


def smooth_potentials(k: float, r: np.ndarray, wl: np.ndarray, u: np.ndarray, *, lib=None):
    """(S0, S1), complex (P, S), as ``kernel._smooth_sums_numpy``, or None when not compiled.

    Parameters
    ----------
    k : wavenumber [1/m]
    r : (P, S, Q) distances from observation points to source Gauss points [m]
    wl : (S, Q) Gauss weight × segment length [m]
    u : (Q,) Gauss nodes on [0, 1]
    lib : kernels from :func:`load_library`; default: this package's library
    """
    lib = lib or _load()[0]
    if lib is None:
        return None
    r = np.ascontiguousarray(r, dtype=np.float64)
    wl = np.ascontiguousarray(wl, dtype=np.float64)
    u = np.ascontiguousarray(u, dtype=np.float64)
    n_obs, n_src, n_q = r.shape
    if wl.shape != (n_src, n_q) or u.shape != (n_q,):
        raise ValueError("r must be (P, S, Q), wl (S, Q) and u (Q,)")
    out = np.empty((2, n_obs, n_src), dtype=np.complex128)
    rc = lib.smooth_potentials(
        n_obs,
        n_src,
        n_q,
        float(k),
        r.ctypes.data,
        wl.ctypes.data,
        u.ctypes.data,
        out[0].ctypes.data,
        out[1].ctypes.data,
    )
    if rc != 0:
        raise MemoryError("the compiled kernel could not allocate its work buffer")
    return out[0], out[1]
