"""SQLite connections for the store: WAL journal, foreign keys, explicit write transactions.

Every connection is opened in autocommit mode (``isolation_level=None``) so that the only transactions
are the ones :func:`transaction` opens with ``BEGIN IMMEDIATE``: a writer takes the write lock at the
start and a second writer waits (``busy_timeout``) instead of failing half way. Writers of one process
first queue on a lock of their own per database file: SQLite's busy handler polls with growing sleeps,
so under twenty phones ticking at once some writers starved past the timeout (measured, issue 15
benchmark) while others went through; a thread lock hands the write lock on at once. A writer that
still cannot start within the timeout gets :class:`StoreBusy` (HTTP 503, try again), not a 500.

References
----------
SQLite documentation: "Write-Ahead Logging" (https://sqlite.org/wal.html), "PRAGMA synchronous",
"BEGIN TRANSACTION" (https://sqlite.org/lang_transaction.html).
"""

from __future__ import annotations

import sqlite3
import threading
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

from fieldkit.errors import InputError

DATABASE_NAME = "fieldkit.sqlite3"
# How long a writer waits for another writer's lock before giving up [ms]; a plan write is short.
BUSY_TIMEOUT_MS = 10_000


class StoreBusy(InputError):
    """The database stayed locked by other writers past the busy timeout (HTTP 503, try again)."""

    retry_after_s = 1

    def __init__(self) -> None:
        super().__init__(
            "(store)",
            f"the database is busy with other writes (waited {BUSY_TIMEOUT_MS / 1000:g} s); "
            "nothing was written: send it again",
            status=503,
        )

    def to_json(self) -> dict[str, Any]:
        return {"error": "busy", "field": None, "detail": self.detail, "retry_after_s": 1}


class Connection(sqlite3.Connection):
    """A connection that knows the write lock of its database file (:func:`transaction` takes it)."""

    write_lock: threading.Lock | None = None


_WRITE_LOCKS: dict[str, threading.Lock] = {}
_WRITE_LOCKS_GUARD = threading.Lock()


def _write_lock(path: Path) -> threading.Lock:
    key = str(Path(path).resolve())
    with _WRITE_LOCKS_GUARD:
        return _WRITE_LOCKS.setdefault(key, threading.Lock())


def database_path(data_dir: Path) -> Path:
    """The database file inside a data directory."""
    return Path(data_dir) / DATABASE_NAME


def connect(path: Path) -> sqlite3.Connection:
    """Open a connection with the pragmas every fieldkit connection uses.

    ``synchronous=FULL`` in WAL mode makes a committed transaction survive a power cut, not only a
    crash of the process: a laptop in the field runs until its battery dies.
    """
    conn = sqlite3.connect(
        str(path),
        isolation_level=None,
        timeout=BUSY_TIMEOUT_MS / 1000,
        check_same_thread=False,
        factory=Connection,
    )
    conn.write_lock = _write_lock(path)
    conn.row_factory = sqlite3.Row
    conn.execute(f"PRAGMA busy_timeout = {BUSY_TIMEOUT_MS}")
    conn.execute("PRAGMA journal_mode = WAL")
    conn.execute("PRAGMA synchronous = FULL")
    conn.execute("PRAGMA foreign_keys = ON")
    return conn


@contextmanager
def transaction(conn: sqlite3.Connection) -> Iterator[sqlite3.Connection]:
    """One write transaction: ``BEGIN IMMEDIATE`` … ``COMMIT``, rolled back on any exception.

    Raises :class:`StoreBusy` when the write lock cannot be had within the busy timeout.
    """
    lock = getattr(conn, "write_lock", None)
    if lock is not None and not lock.acquire(timeout=BUSY_TIMEOUT_MS / 1000):
        raise StoreBusy()
    try:
        try:
            conn.execute("BEGIN IMMEDIATE")
        except sqlite3.OperationalError as exc:
            if "locked" in str(exc) or "busy" in str(exc):
                raise StoreBusy() from None
            raise
        try:
            yield conn
        except BaseException:
            conn.execute("ROLLBACK")
            raise
        conn.execute("COMMIT")
    finally:
        if lock is not None:
            lock.release()


def checkpoint_and_close(path: Path) -> None:
    """Fold the write-ahead log into the database file and close; used at clean shutdown."""
    conn = sqlite3.connect(str(path), isolation_level=None, timeout=BUSY_TIMEOUT_MS / 1000)
    try:
        conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")
    finally:
        conn.close()


def get_meta(conn: sqlite3.Connection, key: str) -> str | None:
    row = conn.execute("SELECT value FROM meta WHERE key = ?", (key,)).fetchone()
    return None if row is None else row[0]


def set_meta(conn: sqlite3.Connection, key: str, value: str) -> None:
    """Set a meta value inside the caller's transaction."""
    conn.execute(
        "INSERT INTO meta (key, value) VALUES (?, ?)"
        " ON CONFLICT (key) DO UPDATE SET value = excluded.value",
        (key, value),
    )
