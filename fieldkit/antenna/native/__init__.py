"""The engine's compiled kernels: C loaded with ctypes, the numpy code beside it as reference.

Only the lossy-ground image kernels are compiled (:func:`image_kernels`): the complex square root
and exponential of every image and point pair were ~35 % of a plan at numpy's speed, and the C
loop, vectorised with glibc's vector maths library, does them ~12× faster to within ~5e-15
relative (``tests/antenna/test_native.py``; figures in docs/engine.md).

The library is built on install (``hatch_build.py``; by hand: ``python
fieldkit/antenna/native/build.py``). When it is missing, cannot be loaded, was built from another
version of ``image_kernels.c``, or ``FIELDKIT_NUMPY_KERNELS=1`` is set, :func:`image_kernels`
returns None and the engine uses the numpy reference; :func:`status` says which and why.
"""

from __future__ import annotations

import ctypes
import hashlib
import os
from functools import lru_cache
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
SOURCE = HERE / "image_kernels.c"
LIBRARY = HERE / "_image_kernels.so"
DISABLE_ENV = "FIELDKIT_NUMPY_KERNELS"


@lru_cache(maxsize=1)
def _load() -> tuple[object | None, str]:
    """(the C function or None, a sentence saying which kernel runs and why), once per process."""
    if os.environ.get(DISABLE_ENV) == "1":
        return None, f"numpy kernels ({DISABLE_ENV}=1)"
    return load_library(LIBRARY, SOURCE)


def load_library(library: Path, source: Path) -> tuple[object | None, str]:
    """``fk_image_kernels`` from ``library`` if it was built from ``source`` as it is now."""
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
    fn = lib.fk_image_kernels
    fn.restype = None
    fn.argtypes = [ctypes.c_ssize_t, ctypes.c_ssize_t, ctypes.c_double] + [ctypes.c_void_p] * 7
    return fn, f"compiled kernels ({library.name})"


def status() -> str:
    """Which image kernels the engine runs, and why (for ``fieldkit`` diagnostics and tests)."""
    return _load()[1]


def compiled() -> bool:
    """True when the compiled image kernels are in use."""
    return _load()[0] is not None


def image_kernels(k: float, rho2: np.ndarray, zeta: np.ndarray, beta: np.ndarray, *, fn=None):
    """z, kg, g1, g2 (each complex (I, n)) as ``sommerfeld._image_kernels``, or None when not compiled.

    Parameters
    ----------
    k : wavenumber [1/m]
    rho2, zeta : (n,) squared horizontal distance [m²] and z + z' [m] of the point pairs
    beta : (I,) complex image depths [m]
    fn : a loaded ``fk_image_kernels`` (:func:`load_library`); default: this package's library
    """
    fn = fn or _load()[0]
    if fn is None:
        return None
    rho2 = np.ascontiguousarray(rho2, dtype=np.float64)
    zeta = np.ascontiguousarray(zeta, dtype=np.float64)
    beta = np.ascontiguousarray(beta, dtype=np.complex128)
    if rho2.shape != zeta.shape or rho2.ndim != 1 or beta.ndim != 1:
        raise ValueError("rho2 and zeta must be 1-D of one length, beta 1-D")
    out = np.empty((4, len(beta), len(rho2)), dtype=np.complex128)
    fn(
        len(beta),
        len(rho2),
        float(k),
        rho2.ctypes.data,
        zeta.ctypes.data,
        beta.ctypes.data,
        *(out[i].ctypes.data for i in range(4)),
    )
    return out[0], out[1], out[2], out[3]
