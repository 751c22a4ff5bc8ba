"""Keep numpy's bundled OpenBLAS single-threaded while the engine runs.

The engine's dense systems are small (≤ 600 unknowns, usually 40–80). OpenBLAS worker threads only
spin and contend there: on the shared 2-core machine a 47-height sweep took 6× the CPU time with the
default thread count (docs/engine.md). The switch uses the thread-count entry points exported by the
OpenBLAS build that numpy wheels bundle; where they are absent (another BLAS) it does nothing.
"""

from __future__ import annotations

import ctypes
import glob
import os
from collections.abc import Iterator
from contextlib import contextmanager
from functools import lru_cache


@lru_cache(maxsize=1)
def _openblas():
    import numpy

    base = os.path.dirname(numpy.__file__)
    for path in glob.glob(os.path.join(base, os.pardir, "numpy.libs", "*openblas*")):
        try:
            lib = ctypes.CDLL(path)
        except OSError:
            continue
        for get, set_ in (
            ("scipy_openblas_get_num_threads64_", "scipy_openblas_set_num_threads64_"),
            ("openblas_get_num_threads64_", "openblas_set_num_threads64_"),
            ("openblas_get_num_threads", "openblas_set_num_threads"),
        ):
            if hasattr(lib, get) and hasattr(lib, set_):
                getter, setter = getattr(lib, get), getattr(lib, set_)
                getter.restype = ctypes.c_int
                setter.argtypes = [ctypes.c_int]
                return getter, setter
    return None


@contextmanager
def single_threaded() -> Iterator[None]:
    """Run the enclosed block with one BLAS thread, restoring the previous count afterwards."""
    api = _openblas()
    if api is None:
        yield
        return
    getter, setter = api
    before = getter()
    if before != 1:
        setter(1)
    try:
        yield
    finally:
        if before != 1:
            setter(before)
