"""Derived arrays kept across processes, in the user cache directory (:func:`fieldkit.paths.cache_dir`).

Only results that can be rebuilt live here (the compact IRI tables, fitted complex images of a
ground): a missing, old or damaged file only costs the rebuild. Writes are atomic (a reader sees
the old file, none, or the whole new one), so processes may share the directory.
"""

from __future__ import annotations

import os
import re
import threading
from pathlib import Path

import numpy as np

SAFE_KEY = re.compile(r"[^A-Za-z0-9._+-]")


def write_array(path: Path, array: np.ndarray) -> None:
    """Save ``array`` as ``.npy`` at ``path`` atomically (no pickles)."""
    tmp = path.with_name(f"{path.name}.{os.getpid()}.{threading.get_ident()}.tmp")
    try:
        with open(tmp, "wb") as fh:
            np.save(fh, array, allow_pickle=False)
        os.replace(tmp, path)
    finally:
        tmp.unlink(missing_ok=True)


def read_array(path: Path) -> np.ndarray | None:
    """The array saved at ``path``, or None when it is missing or unreadable."""
    try:
        return np.load(path, allow_pickle=False)
    except (OSError, ValueError, EOFError):
        return None


class ArrayDir:
    """A directory of arrays by key (one ``.npy`` each), bounded to ``max_files`` files.

    When a save finds more, the oldest fifth (by modification time) is removed.
    """

    def __init__(self, path: Path, *, max_files: int = 4096) -> None:
        self.path = Path(path)
        self.max_files = max_files
        self._lock = threading.Lock()

    def _file(self, key: str) -> Path:
        return self.path / f"{SAFE_KEY.sub('_', key)}.npy"

    def load(self, key: str) -> np.ndarray | None:
        return read_array(self._file(key))

    def save(self, key: str, array: np.ndarray) -> None:
        with self._lock:
            try:
                self.path.mkdir(parents=True, exist_ok=True)
                write_array(self._file(key), array)
                self._prune()
            except OSError:
                pass  # a cache that cannot be written is only slower, never wrong

    def _prune(self) -> None:
        files = [e for e in os.scandir(self.path) if e.name.endswith(".npy")]
        if len(files) <= self.max_files:
            return
        files.sort(key=lambda e: e.stat().st_mtime_ns)
        for e in files[: len(files) - int(self.max_files * 0.8)]:
            Path(e.path).unlink(missing_ok=True)


def keep_image_fits() -> None:
    """Fitted ground images persist in the cache directory: every process (a CLI run, a plan worker)
    pays each fit once. The engine does no file I/O itself; this hands it the store."""
    from fieldkit import paths
    from fieldkit.antenna import sommerfeld

    sommerfeld.keep_images_in(
        ArrayDir(paths.cache_dir() / f"complex-images-{sommerfeld.IMAGE_FIT_ID}")
    )


def source_fingerprint(*packages: str) -> str:
    """A short checksum of the Python source of ``packages`` (dotted names) and of numpy's version:
    results derived by that code are kept under it, so an edited engine never reads old ones.

    CRC-32 and the byte count (zlib, not hashlib: OpenSSL's start-up is ~3 ms and 4 MB of a cold
    command); it tells versions of the source apart, it is no defence against a crafted file.
    """
    import importlib.util
    import zlib

    crc, size = zlib.crc32(np.__version__.encode()), 0
    for name in packages:
        spec = importlib.util.find_spec(name)
        origin = Path(spec.origin) if spec is not None and spec.origin else None
        if origin is None or origin.suffix != ".py":
            return "unknown"
        files = sorted(origin.parent.glob("*.py")) if origin.name == "__init__.py" else [origin]
        for f in files:
            data = f.name.encode() + b"\0" + f.read_bytes()
            crc, size = zlib.crc32(data, crc), size + len(data)
    return f"{crc:08x}{size & 0xFFFFFFFF:08x}"


def keep_default_gains() -> None:
    """The sky layer's default-dipole gains (one engine solve per channel, ~10 ms each) persist in
    the cache directory, named by the source of the engine and of the gain reduction."""
    from fieldkit import paths
    from fieldkit.sky import gain

    tag = source_fingerprint("fieldkit.antenna", "fieldkit.sky.gain")
    if tag == "unknown":
        return
    gain.keep_default_gains_in(ArrayDir(paths.cache_dir() / f"default-gains-{tag}", max_files=512))
