"""SQLite connections for the store: WAL journal, foreign keys, explicit write transactions.

Every connection is opened in autocommit mode (``isolation_level=None``) so that the only transactions
are the ones :func:`transaction` opens with ``BEGIN IMMEDIATE``: a writer takes the write lock at the
start and a second writer waits (``busy_timeout``) instead of failing half way.

References
----------
SQLite documentation: "Write-Ahead Logging" (https://sqlite.org/wal.html), "PRAGMA synchronous",
"BEGIN TRANSACTION" (https://sqlite.org/lang_transaction.html).
"""

from __future__ import annotations

import sqlite3
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

DATABASE_NAME = "fieldkit.sqlite3"
# How long a writer waits for another writer's lock before giving up [ms]; a plan write is short.
BUSY_TIMEOUT_MS = 10_000


def database_path(data_dir: Path) -> Path:
    """The database file inside a data directory."""
    return Path(data_dir) / DATABASE_NAME


def connect(path: Path) -> sqlite3.Connection:
    """Open a connection with the pragmas every fieldkit connection uses.

    ``synchronous=FULL`` in WAL mode makes a committed transaction survive a power cut, not only a
    crash of the process: a laptop in the field runs until its battery dies.
    """
    conn = sqlite3.connect(
        str(path), isolation_level=None, timeout=BUSY_TIMEOUT_MS / 1000, check_same_thread=False
    )
    conn.row_factory = sqlite3.Row
    conn.execute(f"PRAGMA busy_timeout = {BUSY_TIMEOUT_MS}")
    conn.execute("PRAGMA journal_mode = WAL")
    conn.execute("PRAGMA synchronous = FULL")
    conn.execute("PRAGMA foreign_keys = ON")
    return conn


@contextmanager
def transaction(conn: sqlite3.Connection) -> Iterator[sqlite3.Connection]:
    """One write transaction: ``BEGIN IMMEDIATE`` … ``COMMIT``, rolled back on any exception."""
    conn.execute("BEGIN IMMEDIATE")
    try:
        yield conn
    except BaseException:
        conn.execute("ROLLBACK")
        raise
    conn.execute("COMMIT")


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
