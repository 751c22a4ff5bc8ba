"""Compile the engine's C kernels into a shared library beside this file (standard library only).

Run by the package build (``hatch_build.py`` at the repository's root, on ``pip install``) and by
hand with ``python fieldkit/antenna/native/build.py``. The library is built for the machine it is
built on (``-march=native`` where the compiler takes it) and carries the sha256 of its source, so
the loader can refuse a library left over from another version of the source.

Flags: ``-O3`` so that gcc vectorises the loop over points; ``-fno-math-errno`` and
``-fno-trapping-math`` so that it may call glibc's vector maths library; ``-fno-builtin-sin`` and
``-fno-builtin-cos`` so that it does not fuse them into a scalar ``sincos`` first. No
``-ffast-math``: it would reorder sums and, linked into a shared library, switch the whole process
to flush-to-zero (gcc manual, "Optimize Options", -ffast-math).
"""

from __future__ import annotations

import hashlib
import os
import shutil
import subprocess
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
SOURCE = HERE / "kernels.c"
LIBRARY = HERE / "_kernels.so"
FLAGS = (
    "-O3",
    "-fPIC",
    "-shared",
    "-fno-math-errno",
    "-fno-trapping-math",
    "-fno-builtin-sin",
    "-fno-builtin-cos",
)
MACHINE_FLAGS = (("-march=native",), ())  # tried in this order
TIMEOUT_S = 120


def source_sha256(source: Path = SOURCE) -> str:
    """Hex sha256 of the C source: what the library carries and the loader compares."""
    return hashlib.sha256(source.read_bytes()).hexdigest()


def compiler() -> str | None:
    """The C compiler to use: $CC, else cc or gcc on the path; None when there is none."""
    for name in (os.environ.get("CC"), "cc", "gcc"):
        if name and shutil.which(name):
            return name
    return None


def build(out: Path = LIBRARY, *, source: Path = SOURCE) -> Path:
    """Compile ``source`` into the shared library ``out``; raises RuntimeError with the reason."""
    cc = compiler()
    if cc is None:
        raise RuntimeError("no C compiler found (set CC, or install gcc)")
    define = f'-DFK_SOURCE_SHA256="{source_sha256(source)}"'
    tmp = out.with_name(out.name + ".part")
    errors = []
    for machine in MACHINE_FLAGS:
        cmd = [cc, *FLAGS, *machine, define, "-o", str(tmp), str(source), "-lm"]
        proc = subprocess.run(cmd, capture_output=True, text=True, timeout=TIMEOUT_S)
        if proc.returncode == 0:
            tmp.replace(out)  # atomic: a running process keeps the library it loaded
            return out
        errors.append(f"{' '.join(cmd)}: {proc.stderr.strip()[-400:]}")
    tmp.unlink(missing_ok=True)
    raise RuntimeError("the C kernel did not compile: " + " | ".join(errors))


if __name__ == "__main__":
    try:
        print(build())
    except RuntimeError as exc:
        sys.exit(str(exc))
