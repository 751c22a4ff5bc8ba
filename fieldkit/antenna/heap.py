"""Keep freed memory in the process heap instead of handing it back to the kernel at every free.

A plan allocates and frees the engine's working arrays thousands of times (matrix fills, image
kernels, far-field blocks: 0.1–10 MB each). With glibc's default settings, blocks above the
(adaptive) mmap threshold are mapped and unmapped per array, and free memory above 128 kB at the
top of the heap is trimmed: every new array then page-faults its memory in again. On the demo plan
that was ~165 000 minor page faults and ~0.3 s of system time of a ~1.4 s process; with the settings
below, ~11 500 and 0.04 s (``benchmarks/bench_coldstart.py``, docs/engine.md). Peak memory is
unchanged: the heap keeps at most what the process already used.

glibc only (``mallopt``); elsewhere (musl, macOS, Windows) this does nothing.

References
----------
.. [1] mallopt(3), Linux man-pages 6.03 (M_MMAP_THRESHOLD, M_TRIM_THRESHOLD; the 32 MiB ceiling
   of M_MMAP_THRESHOLD on 64-bit systems, HEAP_MAX_SIZE / 2).
"""

from __future__ import annotations

import ctypes
from functools import lru_cache

M_TRIM_THRESHOLD = -1  # mallopt parameter numbers, glibc <malloc.h>
M_MMAP_THRESHOLD = -3
# Arrays up to 32 MiB (the most glibc allows on 64-bit [1]_) come from the heap, and up to 128 MiB
# of free heap top is kept: far above the engine's largest temporaries (a 600-segment matrix is
# 5.8 MB), far below the machine's memory.
MMAP_THRESHOLD_BYTES = 32 * 1024 * 1024
TRIM_THRESHOLD_BYTES = 128 * 1024 * 1024


@lru_cache(maxsize=1)
def retain_freed_memory() -> bool:
    """Set glibc's mmap and trim thresholds once per process; True when they were set."""
    try:
        mallopt = ctypes.CDLL(None).mallopt  # the C library the interpreter runs on
    except (OSError, AttributeError, TypeError):
        return False
    mallopt.argtypes = [ctypes.c_int, ctypes.c_int]
    mallopt.restype = ctypes.c_int
    ok = mallopt(M_MMAP_THRESHOLD, MMAP_THRESHOLD_BYTES) == 1
    return mallopt(M_TRIM_THRESHOLD, TRIM_THRESHOLD_BYTES) == 1 and ok
