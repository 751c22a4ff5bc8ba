"""The versioned schema of the store and the migrations that bring any older database up to date.

The version lives in SQLite's ``PRAGMA user_version``. Each migration runs in one transaction together
with the version bump, so a crash leaves the database at the old version or the new one, never between.
Migrations are only ever appended; a shipped migration is never edited.
"""

from __future__ import annotations

import sqlite3
from pathlib import Path

from fieldkit.store.sqlite import connect, transaction

# Version 1: deployments (name, plan input, last result), the kit inventory, and the append-only
# acknowledgements of checklist items (client_id unique: a replayed acknowledgement is one record).
_V1 = (
    "CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL)",
    """CREATE TABLE deployments (
        id TEXT PRIMARY KEY,
        name TEXT NOT NULL,
        plan_input TEXT NOT NULL,
        plan_result TEXT,
        created_at TEXT NOT NULL,
        updated_at TEXT NOT NULL)""",
    """CREATE TABLE kit (
        id INTEGER PRIMARY KEY CHECK (id = 1),
        body TEXT NOT NULL,
        updated_at TEXT NOT NULL)""",
    """CREATE TABLE acknowledgements (
        seq INTEGER PRIMARY KEY AUTOINCREMENT,
        client_id TEXT NOT NULL UNIQUE,
        deployment_id TEXT NOT NULL REFERENCES deployments(id) ON DELETE CASCADE,
        item_id TEXT NOT NULL,
        done INTEGER NOT NULL CHECK (done IN (0, 1)),
        by TEXT NOT NULL,
        at TEXT NOT NULL,
        at_utc TEXT NOT NULL,
        received_at TEXT NOT NULL)""",
    "CREATE INDEX acknowledgements_by_item ON acknowledgements (deployment_id, item_id, at_utc, seq)",
)

# Version 2: the site, kit and channels of a deployment as their own columns (listing without
# parsing the whole input), a revision counter bumped by every edit, the last plan error, and a
# trigger that makes the acknowledgement history append-only inside the database itself.
_V2 = (
    "ALTER TABLE deployments ADD COLUMN site TEXT",
    "ALTER TABLE deployments ADD COLUMN kit TEXT",
    "ALTER TABLE deployments ADD COLUMN channels TEXT",
    "ALTER TABLE deployments ADD COLUMN revision INTEGER NOT NULL DEFAULT 1",
    "ALTER TABLE deployments ADD COLUMN plan_error TEXT",
    """UPDATE deployments SET
        site = json_extract(plan_input, '$.site'),
        kit = json_extract(plan_input, '$.kit'),
        channels = json_extract(plan_input, '$.channels_mhz')""",
    """CREATE TRIGGER acknowledgements_append_only BEFORE UPDATE ON acknowledgements
        BEGIN SELECT RAISE(ABORT, 'acknowledgements are append-only'); END""",
)

# Version 3: the chosen option's safety block in its own column, so that a list of deployments and
# the checklist endpoints read a few kB instead of parsing every plan result (hundreds of kB each).
_V3 = (
    "ALTER TABLE deployments ADD COLUMN safety TEXT",
    "UPDATE deployments SET safety = json_extract(plan_result, '$.options[0].safety')"
    " WHERE plan_result IS NOT NULL",
)

# Version 4: each acknowledgement remembers the wording of the item it was given for (SHA-256 of
# the item's text). A re-plan that changes an item's text (another distance, another support) makes
# the old tick stale: the item must be checked again. Older rows (NULL) keep counting.
_V4 = ("ALTER TABLE acknowledgements ADD COLUMN item_text_sha256 TEXT",)

# Version 5: acknowledgements are ordered by the service's own receipt order (seq), not by the device's
# clock; each one records how far the device's time ran ahead of its receipt [s] (negative: behind,
# e.g. a tick queued offline), so a clock far ahead is flagged in the history. Existing rows get the
# figure from their stored times; the append-only trigger is lifted for that one update only.
_V5 = (
    "DROP TRIGGER acknowledgements_append_only",
    "ALTER TABLE acknowledgements ADD COLUMN device_ahead_s REAL",
    "UPDATE acknowledgements SET device_ahead_s ="
    " round((julianday(at_utc) - julianday(received_at)) * 86400.0, 3)",
    """CREATE TRIGGER acknowledgements_append_only BEFORE UPDATE ON acknowledgements
        BEGIN SELECT RAISE(ABORT, 'acknowledgements are append-only'); END""",
    "CREATE INDEX acknowledgements_by_receipt ON acknowledgements (deployment_id, item_id, seq)",
)

MIGRATIONS: tuple[tuple[str, ...], ...] = (_V1, _V2, _V3, _V4, _V5)
SCHEMA_VERSION = len(MIGRATIONS)


class SchemaTooNew(RuntimeError):
    """The database was written by a newer fieldkit than this one."""


def schema_version(conn: sqlite3.Connection) -> int:
    return int(conn.execute("PRAGMA user_version").fetchone()[0])


def migrate(path: Path, *, target: int = SCHEMA_VERSION) -> int:
    """Bring the database at ``path`` (created if missing) to ``target``; return the version reached.

    ``target`` below the latest exists for the migration tests, which build an old database first.
    """
    conn = connect(path)
    try:
        current = schema_version(conn)
        if current > SCHEMA_VERSION:
            raise SchemaTooNew(
                f"{path} has schema version {current}; this fieldkit knows up to {SCHEMA_VERSION}. "
                "Use a newer fieldkit or another data directory."
            )
        for version in range(current + 1, target + 1):
            with transaction(conn):
                for statement in MIGRATIONS[version - 1]:
                    conn.execute(statement)
                conn.execute(f"PRAGMA user_version = {version}")
        return schema_version(conn)
    finally:
        conn.close()
