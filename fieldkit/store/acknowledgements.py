"""Checklist acknowledgements: an append-only history per item; the current state is derived from it.

Rule for conflicts (stated in docs/service.md): for each item the acknowledgement the service received
last is the current state — the service's own receipt order (``seq``), never a device's clock. The
device's time (``at``) is kept beside the receipt time (``received_at``); a device time more than
:data:`CLOCK_AHEAD_TOLERANCE_S` ahead of its receipt is recorded and flagged (``clock_ahead``), and
like any other tick it is outranked by every later one. The history keeps every acknowledgement. The
same ``client_id`` sent again (a phone replaying its offline queue) is the same record: nothing
changes. An acknowledgement counts only for the wording of the item it was given for
(``item_text_sha256``): when a re-plan changes what an item says, it must be checked again.
"""

from __future__ import annotations

import hashlib
import sqlite3
from dataclasses import asdict, dataclass
from datetime import UTC, datetime
from typing import Any

from fieldkit.errors import InputError
from fieldkit.store.deployments import utc_now
from fieldkit.store.sqlite import transaction
from fieldkit.store.store_errors import Conflict, NotFound

# How far a device's clock may run ahead of the service's before its tick is flagged [s]. Phones set
# their clocks from the network and drift by seconds; a laptop off the grid for a week drifts by about
# a minute (quartz, ~20 ppm, common practice). Five minutes separates drift from a wrong date or zone.
CLOCK_AHEAD_TOLERANCE_S = 300.0


@dataclass(frozen=True)
class Acknowledgement:
    seq: int
    client_id: str
    deployment_id: str
    item_id: str
    done: bool
    by: str
    at: str
    at_utc: str
    received_at: str
    item_text_sha256: str | None = None
    device_ahead_s: float | None = None  # at_utc - received_at [s]; None only if unparsable

    @property
    def clock_ahead(self) -> bool:
        """The device's time ran more than :data:`CLOCK_AHEAD_TOLERANCE_S` ahead of the receipt."""
        return self.device_ahead_s is not None and self.device_ahead_s > CLOCK_AHEAD_TOLERANCE_S

    def to_json(self) -> dict[str, Any]:
        out = asdict(self)
        del out["seq"]
        out["clock_ahead"] = self.clock_ahead
        return out


def instant_utc(value: Any, field: str) -> str:
    """An ISO-8601 date-time with a time zone, as sortable UTC text; refuses anything else."""
    if not isinstance(value, str) or len(value) > 40:
        raise InputError(field, f"expected an ISO-8601 date-time string, got {value!r}"[:160])
    try:
        moment = datetime.fromisoformat(value)
    except ValueError:
        raise InputError(
            field, f"expected an ISO-8601 date-time such as 2026-12-01T14:05:00Z, got {value!r}"
        ) from None
    if moment.tzinfo is None or moment.utcoffset() is None:
        raise InputError(field, f"expected a time zone (Z or ±hh:mm) in {value!r}")
    try:
        utc = moment.astimezone(UTC)
    except OverflowError:  # 0001-01-01T00:00+14:00 has no UTC instant in datetime's range
        raise InputError(
            field, f"expected a date-time within the years 1-9999 in UTC, got {value!r}"
        ) from None
    # the year padded by hand: strftime("%Y") gives "999", not "0999", which would sort after 2026
    return f"{utc.year:04d}-" + utc.strftime("%m-%dT%H:%M:%S.%fZ")


def text_sha256(text: object) -> str:
    """The fingerprint of an item's wording that an acknowledgement is tied to."""
    return hashlib.sha256(str(text).encode("utf-8")).hexdigest()


def seconds_between(earlier_utc: str, later_utc: str) -> float | None:
    """``later - earlier`` [s] for two :func:`instant_utc` texts (None when either is not one)."""
    try:
        return round(
            (
                datetime.fromisoformat(later_utc) - datetime.fromisoformat(earlier_utc)
            ).total_seconds(),
            3,
        )
    except (TypeError, ValueError):
        return None


def counts_for(ack: Acknowledgement, item_text: object) -> bool:
    """Whether ``ack`` was given for this wording of its item (rows from before v4 always count)."""
    return ack.item_text_sha256 is None or ack.item_text_sha256 == text_sha256(item_text)


def _row(row: sqlite3.Row) -> Acknowledgement:
    return Acknowledgement(
        seq=row["seq"],
        client_id=row["client_id"],
        deployment_id=row["deployment_id"],
        item_id=row["item_id"],
        done=bool(row["done"]),
        by=row["by"],
        at=row["at"],
        at_utc=row["at_utc"],
        received_at=row["received_at"],
        item_text_sha256=row["item_text_sha256"],
        device_ahead_s=row["device_ahead_s"],
    )


def insert(
    conn: sqlite3.Connection,
    *,
    deployment_id: str,
    item_id: str,
    done: bool,
    by: str,
    at: str,
    client_id: str,
    received_at: str | None = None,
    item_text_sha256: str | None = None,
) -> tuple[Acknowledgement, bool]:
    """Append one acknowledgement inside the caller's transaction; return it and whether it was a replay.

    A replay (same ``client_id``, same content) returns the stored record unchanged, even when the
    item's wording changed since. The same ``client_id`` with different content is refused: a device
    never reuses an id for another tick.
    """
    at_utc = instant_utc(at, "at")
    row = conn.execute(
        "SELECT * FROM acknowledgements WHERE client_id = ?", (client_id,)
    ).fetchone()
    if row is not None:
        stored = _row(row)
        same = (stored.deployment_id, stored.item_id, stored.done, stored.by, stored.at_utc) == (
            deployment_id,
            item_id,
            bool(done),
            by,
            at_utc,
        )
        if not same:
            raise Conflict(
                "client_id",
                f"client_id {client_id!r} was already used for another acknowledgement "
                f"(item {stored.item_id!r}, done={stored.done}, at {stored.at}); use a new id",
                value=client_id,
            )
        return stored, True
    received_at = received_at or utc_now()
    cursor = conn.execute(
        "INSERT INTO acknowledgements (client_id, deployment_id, item_id, done, by, at, at_utc,"
        " received_at, item_text_sha256, device_ahead_s) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
        (
            client_id,
            deployment_id,
            item_id,
            int(bool(done)),
            by,
            at,
            at_utc,
            received_at,
            item_text_sha256,
            seconds_between(instant_utc(received_at, "received_at"), at_utc),
        ),
    )
    stored = conn.execute(
        "SELECT * FROM acknowledgements WHERE seq = ?", (cursor.lastrowid,)
    ).fetchone()
    return _row(stored), False


def acknowledge(conn: sqlite3.Connection, **fields: Any) -> tuple[Acknowledgement, bool]:
    """:func:`insert` in its own transaction, after checking the deployment exists."""
    with transaction(conn):
        deployment_id = fields["deployment_id"]
        if (
            conn.execute("SELECT 1 FROM deployments WHERE id = ?", (deployment_id,)).fetchone()
            is None
        ):
            raise NotFound("id", f"no deployment with id {deployment_id!r}", value=deployment_id)
        return insert(conn, **fields)


def history(
    conn: sqlite3.Connection, deployment_id: str, item_id: str | None = None
) -> list[Acknowledgement]:
    """Every acknowledgement of a deployment (or one item), in order of arrival."""
    if item_id is None:
        rows = conn.execute(
            "SELECT * FROM acknowledgements WHERE deployment_id = ? ORDER BY seq", (deployment_id,)
        )
    else:
        rows = conn.execute(
            "SELECT * FROM acknowledgements WHERE deployment_id = ? AND item_id = ? ORDER BY seq",
            (deployment_id, item_id),
        )
    return [_row(row) for row in rows.fetchall()]


def histories(conn: sqlite3.Connection) -> dict[str, list[Acknowledgement]]:
    """Every deployment's history in one query (for lists), by deployment id, in order of arrival."""
    out: dict[str, list[Acknowledgement]] = {}
    for row in conn.execute("SELECT * FROM acknowledgements ORDER BY seq").fetchall():
        ack = _row(row)
        out.setdefault(ack.deployment_id, []).append(ack)
    return out


def current_state(conn: sqlite3.Connection, deployment_id: str) -> dict[str, Acknowledgement]:
    """The deciding acknowledgement per item: the one the service received last."""
    return decide(history(conn, deployment_id))


def decide(acknowledgements: list[Acknowledgement]) -> dict[str, Acknowledgement]:
    """:func:`current_state` of an already read history: the latest receipt (``seq``) per item.

    The device's ``at`` plays no part: a clock set years ahead cannot make a tick outrank the ones
    that arrive after it.
    """
    state: dict[str, Acknowledgement] = {}
    for ack in acknowledgements:
        held = state.get(ack.item_id)
        if held is None or ack.seq > held.seq:
            state[ack.item_id] = ack
    return state
