"""The operator's kit inventory: one JSON document (wire, rope, coax, masts, balun, insulators …)."""

from __future__ import annotations

import json
import sqlite3
from typing import Any

from fieldkit.store.deployments import dumps, utc_now
from fieldkit.store.sqlite import transaction


def get(conn: sqlite3.Connection) -> tuple[dict[str, Any] | None, str | None]:
    """The stored kit and when it was last saved, or ``(None, None)`` before the first save."""
    row = conn.execute("SELECT body, updated_at FROM kit WHERE id = 1").fetchone()
    if row is None:
        return None, None
    return json.loads(row["body"]), row["updated_at"]


def put(conn: sqlite3.Connection, body: dict[str, Any]) -> str:
    """Replace the kit; return the time it was saved."""
    now = utc_now()
    with transaction(conn):
        conn.execute(
            "INSERT INTO kit (id, body, updated_at) VALUES (1, ?, ?)"
            " ON CONFLICT (id) DO UPDATE SET body = excluded.body, updated_at = excluded.updated_at",
            (dumps(body), now),
        )
    return now
