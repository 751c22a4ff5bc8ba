"""The engine keeps freed memory in the heap (glibc): new arrays in memory freed before do not
page-fault it in again (heap.py). Measured in fresh interpreters, with and without the engine.
"""

from __future__ import annotations

import json
import platform
import subprocess
import sys

import pytest

PROBE = """
import json, resource, sys
import numpy as np
if sys.argv[1] == "engine":
    import fieldkit.antenna
before = resource.getrusage(resource.RUSAGE_SELF).ru_minflt
for _ in range(50):
    held = [np.ones(1 << 18, dtype=complex) for _ in range(4)]  # 4 MB each, held together
    del held
print(json.dumps(resource.getrusage(resource.RUSAGE_SELF).ru_minflt - before))
"""


def _faults(mode: str) -> int:
    run = subprocess.run(
        [sys.executable, "-c", PROBE, mode], capture_output=True, text=True, timeout=120, check=True
    )
    return json.loads(run.stdout)


@pytest.mark.skipif(
    platform.system() != "Linux" or platform.libc_ver()[0] != "glibc", reason="glibc's mallopt"
)
def test_freed_arrays_are_reused_without_page_faults():
    from fieldkit.antenna.heap import retain_freed_memory

    assert retain_freed_memory()
    # glibc's defaults trim the 16 MB freed at the heap top each round: 50 × 4 096 pages of 4 kB
    # faulted in again (computed; measured 101 000)
    assert _faults("plain") > 50_000
    assert _faults("engine") < 10_000  # the first round's 4 096 pages, then none (measured 2 000)
