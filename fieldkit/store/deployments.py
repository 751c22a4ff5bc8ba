"""Deployments: one planned raising at one site — its name, plan input and last plan result."""

from __future__ import annotations

import json
import sqlite3
import uuid
from dataclasses import dataclass
from datetime import UTC, datetime
from typing import Any

from fieldkit.store.sqlite import transaction
from fieldkit.store.store_errors import NotFound


def utc_now() -> str:
    """Now, as ISO-8601 UTC with microseconds (sorts as text)."""
    return datetime.now(UTC).strftime("%Y-%m-%dT%H:%M:%S.%fZ")


def dumps(value: Any) -> str:
    """Canonical JSON text for storage (finite numbers only, stable key order)."""
    return json.dumps(value, allow_nan=False, sort_keys=True, separators=(",", ":"))


@dataclass(frozen=True)
class Deployment:
    id: str
    name: str
    plan_input: dict[str, Any]
    plan_result: dict[str, Any] | None
    plan_error: dict[str, Any] | None
    created_at: str
    updated_at: str
    revision: int


def as_json(found: Deployment) -> dict[str, Any]:
    """The stored deployment as JSON: what the API shows and what an export carries."""
    return {
        "id": found.id,
        "name": found.name,
        "input": found.plan_input,
        "result": found.plan_result,
        "plan_error": found.plan_error,
        "created_at": found.created_at,
        "updated_at": found.updated_at,
        "revision": found.revision,
    }


def _row(row: sqlite3.Row) -> Deployment:
    return Deployment(
        id=row["id"],
        name=row["name"],
        plan_input=json.loads(row["plan_input"]),
        plan_result=None if row["plan_result"] is None else json.loads(row["plan_result"]),
        plan_error=None if row["plan_error"] is None else json.loads(row["plan_error"]),
        created_at=row["created_at"],
        updated_at=row["updated_at"],
        revision=row["revision"],
    )


def _safety(plan_result: dict[str, Any] | None) -> str | None:
    """The chosen (first) option's safety block as JSON text, kept beside the full result."""
    try:
        block = plan_result["options"][0]["safety"]  # type: ignore[index]
    except (TypeError, KeyError, IndexError):
        return None
    return dumps(block)


def _columns(plan_input: dict[str, Any]) -> tuple[str | None, str | None, str | None]:
    def part(key: str) -> str | None:
        return None if plan_input.get(key) is None else dumps(plan_input[key])

    return part("site"), part("kit"), part("channels_mhz")


def new_id() -> str:
    return str(uuid.uuid4())


def insert(
    conn: sqlite3.Connection,
    *,
    name: str,
    plan_input: dict[str, Any],
    plan_result: dict[str, Any] | None,
    plan_error: dict[str, Any] | None = None,
    deployment_id: str | None = None,
    created_at: str | None = None,
    updated_at: str | None = None,
    revision: int = 1,
) -> str:
    """Store a new deployment (inside the caller's transaction) and return its id."""
    deployment_id = deployment_id or new_id()
    now = utc_now()
    site, kit, channels = _columns(plan_input)
    conn.execute(
        "INSERT INTO deployments (id, name, plan_input, plan_result, plan_error, site, kit, channels,"
        " created_at, updated_at, revision, safety) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
        (
            deployment_id,
            name,
            dumps(plan_input),
            None if plan_result is None else dumps(plan_result),
            None if plan_error is None else dumps(plan_error),
            site,
            kit,
            channels,
            created_at or now,
            updated_at or created_at or now,
            revision,
            _safety(plan_result),
        ),
    )
    return deployment_id


def create(conn: sqlite3.Connection, **fields: Any) -> str:
    """:func:`insert` in its own transaction."""
    with transaction(conn):
        return insert(conn, **fields)


def find(conn: sqlite3.Connection, deployment_id: str) -> Deployment | None:
    row = conn.execute("SELECT * FROM deployments WHERE id = ?", (deployment_id,)).fetchone()
    return None if row is None else _row(row)


def get(conn: sqlite3.Connection, deployment_id: str) -> Deployment:
    found = find(conn, deployment_id)
    if found is None:
        raise NotFound("id", f"no deployment with id {deployment_id!r}", value=deployment_id)
    return found


def list_all(conn: sqlite3.Connection) -> list[Deployment]:
    rows = conn.execute("SELECT * FROM deployments ORDER BY created_at, id").fetchall()
    return [_row(row) for row in rows]


def count(conn: sqlite3.Connection) -> int:
    return int(conn.execute("SELECT count(*) FROM deployments").fetchone()[0])


def update(
    conn: sqlite3.Connection,
    deployment_id: str,
    *,
    name: str,
    plan_input: dict[str, Any],
    plan_result: dict[str, Any] | None,
    plan_error: dict[str, Any] | None = None,
) -> Deployment:
    """Replace a deployment's name, input and result; bump its revision. Acknowledgements stay."""
    site, kit, channels = _columns(plan_input)
    with transaction(conn):
        cursor = conn.execute(
            "UPDATE deployments SET name = ?, plan_input = ?, plan_result = ?, plan_error = ?,"
            " site = ?, kit = ?, channels = ?, safety = ?, updated_at = ?, revision = revision + 1"
            " WHERE id = ?",
            (
                name,
                dumps(plan_input),
                None if plan_result is None else dumps(plan_result),
                None if plan_error is None else dumps(plan_error),
                site,
                kit,
                channels,
                _safety(plan_result),
                utc_now(),
                deployment_id,
            ),
        )
        if cursor.rowcount == 0:
            raise NotFound("id", f"no deployment with id {deployment_id!r}", value=deployment_id)
    return get(conn, deployment_id)


def delete(conn: sqlite3.Connection, deployment_id: str) -> None:
    """Delete a deployment and, with it, its acknowledgement history."""
    with transaction(conn):
        cursor = conn.execute("DELETE FROM deployments WHERE id = ?", (deployment_id,))
        if cursor.rowcount == 0:
            raise NotFound("id", f"no deployment with id {deployment_id!r}", value=deployment_id)


def set_result(
    conn: sqlite3.Connection,
    deployment_id: str,
    *,
    plan_result: dict[str, Any] | None,
    plan_error: dict[str, Any] | None,
    revision: int,
) -> bool:
    """Store a plan computed in the background, only if the deployment is still at ``revision``.

    Returns whether it was stored (an edit in the meantime wins; its own plan is already stored).
    """
    with transaction(conn):
        cursor = conn.execute(
            "UPDATE deployments SET plan_result = ?, plan_error = ?, safety = ?, updated_at = ?"
            " WHERE id = ? AND revision = ?",
            (
                None if plan_result is None else dumps(plan_result),
                None if plan_error is None else dumps(plan_error),
                _safety(plan_result),
                utc_now(),
                deployment_id,
                revision,
            ),
        )
    return cursor.rowcount == 1


def summaries(conn: sqlite3.Connection) -> list[dict[str, Any]]:
    """Every deployment for a list: its summary and the chosen option's safety block only.

    The full plan result (hundreds of kB) stays in SQLite; the safety block has its own column.
    """
    rows = conn.execute(
        "SELECT id, name, created_at, updated_at, revision, plan_result IS NOT NULL AS has_result,"
        " json_extract(site, '$.name') AS site_name, channels,"
        " safety FROM deployments ORDER BY created_at, id"
    ).fetchall()
    out = []
    for row in rows:
        safety = row["safety"]
        try:
            safety = json.loads(safety) if isinstance(safety, str) else None
        except ValueError:
            safety = None
        out.append(
            {
                "id": row["id"],
                "name": row["name"],
                "site_name": row["site_name"] if isinstance(row["site_name"], str) else None,
                "channels_mhz": None if row["channels"] is None else json.loads(row["channels"]),
                "has_result": bool(row["has_result"]),
                "created_at": row["created_at"],
                "updated_at": row["updated_at"],
                "revision": row["revision"],
                "safety": safety,
            }
        )
    return out


def safety_view(conn: sqlite3.Connection, deployment_id: str) -> tuple[int, dict[str, Any] | None]:
    """``(revision, result)`` where result holds only the chosen option's safety block (or None).

    The checklist endpoints need nothing else, and a write transaction should not spend its lock
    parsing a whole plan result.
    """
    row = conn.execute(
        "SELECT revision, plan_result IS NOT NULL AS has_result, safety FROM deployments"
        " WHERE id = ?",
        (deployment_id,),
    ).fetchone()
    if row is None:
        raise NotFound("id", f"no deployment with id {deployment_id!r}", value=deployment_id)
    if not row["has_result"]:
        return row["revision"], None
    safety = row["safety"]
    return row["revision"], {"options": [{"safety": json.loads(safety) if safety else None}]}
