"""Moving a deployment between laptops: JSON export/import and the checklist as CSV.

An import stores what a person decided (name, plan input, acknowledgements with their times) as the
file has it, but never what was derived from it: the caller recomputes the plan from the input and
passes it in (:func:`import_deployment`), so a file with a forged result — ``raise_ok: true`` and an
empty checklist — cannot make anything ready to raise. When the recomputed plan agrees with the
file's (all but the solver's own timings) the file's copy is kept, and export → import → export gives
the same document.
"""

from __future__ import annotations

import csv
import io
import re
import sqlite3
from collections.abc import Iterable, Mapping
from typing import Any

from fieldkit.errors import InputError, array, check_keys, join, number, require_mapping, text
from fieldkit.store import acknowledgements, deployments
from fieldkit.store.sqlite import transaction
from fieldkit.store.store_errors import Conflict

FORMAT = "fieldkit-deployment"
FORMAT_VERSION = 1
MAX_IMPORTED_ACKNOWLEDGEMENTS = 20_000
# A revision is bumped by each edit: two thousand million edits is beyond any deployment, and the bound
# keeps every later revision + 1 far inside SQLite's 64-bit INTEGER.
MAX_REVISION = 2**31 - 1
_ID = re.compile(r"^[A-Za-z0-9_.:-]{1,64}$")
_SHA256 = re.compile(r"^[0-9a-f]{64}$")


def identifier(value: Any, field: str) -> str:
    """An id made by a client or the store: 1–64 characters of letters, digits and ``_.:-``."""
    if not isinstance(value, str) or not _ID.match(value):
        raise InputError(
            field,
            f"expected an id of 1-64 letters, digits, '_', '.', ':' or '-', got {value!r}"[:200],
        )
    return value


def export_deployment(conn: sqlite3.Connection, deployment_id: str) -> dict[str, Any]:
    """The deployment with its input, last result and the full acknowledgement history."""
    found = deployments.get(conn, deployment_id)
    return {
        "format": FORMAT,
        "format_version": FORMAT_VERSION,
        "deployment": deployments.as_json(found),
        "acknowledgements": [
            {
                "client_id": ack.client_id,
                "item_id": ack.item_id,
                "done": ack.done,
                "by": ack.by,
                "at": ack.at,
                "received_at": ack.received_at,
                "item_text_sha256": ack.item_text_sha256,
            }
            for ack in acknowledgements.history(conn, deployment_id)
        ],
    }


def _optional_mapping(value: Any, field: str) -> dict[str, Any] | None:
    return None if value is None else dict(require_mapping(value, field))


def validated(doc: Any) -> dict[str, Any]:
    """The export document checked field by field: ``{"deployment": {...}, "acknowledgements": [...]}``."""
    return _validated(doc)


def _validated(doc: Any) -> dict[str, Any]:
    doc = require_mapping(doc, "")
    check_keys(doc, "", ("format", "format_version", "deployment", "acknowledgements"))
    if doc.get("format") != FORMAT:
        raise InputError("format", f"expected {FORMAT!r}, got {doc.get('format')!r}"[:200])
    version = doc.get("format_version")
    if type(version) is not int or version != FORMAT_VERSION:  # true == 1 in Python: not here
        raise InputError(
            "format_version", f"expected {FORMAT_VERSION}, got {doc.get('format_version')!r}"[:200]
        )
    dep = require_mapping(doc.get("deployment"), "deployment")
    keys = ("id", "name", "input", "result", "plan_error", "created_at", "updated_at", "revision")
    check_keys(dep, "deployment", keys)
    for key in ("id", "name", "input", "created_at", "updated_at", "revision"):
        if key not in dep:
            raise InputError(join("deployment", key), "missing; expected by the export format")
    clean = {
        "id": identifier(dep["id"], "deployment.id"),
        "name": text(dep["name"], "deployment.name"),
        "input": dict(require_mapping(dep["input"], "deployment.input")),
        "result": _optional_mapping(dep.get("result"), "deployment.result"),
        "plan_error": _optional_mapping(dep.get("plan_error"), "deployment.plan_error"),
        "created_at": text(dep["created_at"], "deployment.created_at", max_length=40),
        "updated_at": text(dep["updated_at"], "deployment.updated_at", max_length=40),
        "revision": number(
            dep["revision"], "deployment.revision", minimum=1, maximum=MAX_REVISION, integer=True
        ),
    }
    acknowledgements.instant_utc(clean["created_at"], "deployment.created_at")
    acknowledgements.instant_utc(clean["updated_at"], "deployment.updated_at")
    acks = array(
        doc.get("acknowledgements", []), "acknowledgements", max_items=MAX_IMPORTED_ACKNOWLEDGEMENTS
    )
    clean_acks = []
    for i, ack in enumerate(acks):
        field = join("acknowledgements", i)
        ack = require_mapping(ack, field)
        check_keys(
            ack,
            field,
            ("client_id", "item_id", "done", "by", "at", "received_at", "item_text_sha256"),
        )
        sha = ack.get("item_text_sha256")
        if sha is not None and not (isinstance(sha, str) and _SHA256.match(sha)):
            raise InputError(join(field, "item_text_sha256"), "expected 64 hex digits or null")
        if not isinstance(ack.get("done"), bool):
            raise InputError(
                join(field, "done"), f"expected true or false, got {ack.get('done')!r}"[:200]
            )
        item = {
            "client_id": identifier(ack.get("client_id"), join(field, "client_id")),
            "item_id": identifier(ack.get("item_id"), join(field, "item_id")),
            "done": ack["done"],
            "by": text(ack.get("by"), join(field, "by"), max_length=40),
            "at": ack.get("at"),
            "received_at": text(ack.get("received_at"), join(field, "received_at"), max_length=40),
            "item_text_sha256": sha,
        }
        acknowledgements.instant_utc(item["at"], join(field, "at"))
        acknowledgements.instant_utc(item["received_at"], join(field, "received_at"))
        clean_acks.append(item)
    return {"deployment": clean, "acknowledgements": clean_acks}


# What an export holds that was derived from the rest (recomputed on import, never compared).
DERIVED = ("result", "plan_error")
# The part of a plan result that is the solver's own cost figures (timings), not the plan.
COST_FIGURES = ("engine",)


def _comparable(doc: Mapping[str, Any]) -> dict[str, Any]:
    return {
        "deployment": {k: v for k, v in doc["deployment"].items() if k not in DERIVED},
        "acknowledgements": list(doc["acknowledgements"]),
    }


def same_plan(stored: Mapping[str, Any] | None, recomputed: Mapping[str, Any] | None) -> bool:
    """Whether two plan results agree in everything but the solver's timings."""
    if not isinstance(stored, Mapping) or not isinstance(recomputed, Mapping):
        return False

    def plan_part(result: Mapping[str, Any]) -> dict[str, Any]:
        return {k: v for k, v in result.items() if k not in COST_FIGURES}

    return plan_part(stored) == plan_part(recomputed)


def replay_of(conn: sqlite3.Connection, clean: Mapping[str, Any]) -> bool:
    """True when this export is already stored here (a replay); 409 when its id holds another one."""
    dep_id = clean["deployment"]["id"]
    if deployments.find(conn, dep_id) is None:
        return False
    if _comparable(_validated(export_deployment(conn, dep_id))) == _comparable(clean):
        return True
    raise Conflict(
        "deployment.id",
        f"a different deployment with id {dep_id!r} is already stored",
        value=dep_id,
    )


def import_deployment(
    conn: sqlite3.Connection, doc: Any, *, plan_result: dict[str, Any]
) -> tuple[str, bool]:
    """Store an exported deployment with ``plan_result``, the plan recomputed from its input by the
    caller; return its id and whether it was newly created.

    The file's own result is kept only where it agrees with ``plan_result`` (:func:`same_plan`); its
    ``plan_error`` is dropped (the recomputation succeeded). Importing the same export twice is a
    replay (nothing changes). An export whose id exists here with other content is refused with
    409: delete the local copy first, or edit the id in the file.
    """
    clean = _validated(doc)
    dep = clean["deployment"]
    kept = dep["result"] if same_plan(dep["result"], plan_result) else plan_result
    with transaction(conn):
        if replay_of(conn, clean):
            return dep["id"], False
        deployments.insert(
            conn,
            deployment_id=dep["id"],
            name=dep["name"],
            plan_input=dep["input"],
            plan_result=kept,
            plan_error=None,
            created_at=dep["created_at"],
            updated_at=dep["updated_at"],
            revision=dep["revision"],
        )
        for i, ack in enumerate(clean["acknowledgements"]):
            _, replayed = acknowledgements.insert(conn, deployment_id=dep["id"], **ack)
            if replayed:
                raise Conflict(
                    join(join("acknowledgements", i), "client_id"),
                    f"client_id {ack['client_id']!r} appears twice in the file",
                )
    return dep["id"], True


# A cell starting with one of these is read as a formula by spreadsheet programs (CSV injection).
_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")
CSV_COLUMNS = (
    "item_id",
    "stage",
    "required",
    "text",
    "done",
    "by",
    "at",
    "received_at",
    "clock_ahead",
    "acknowledgements",
)


def _cell(value: Any) -> str:
    if value is None:
        return ""
    if isinstance(value, bool):
        return "yes" if value else "no"
    out = str(value)
    return "'" + out if out.startswith(_FORMULA_START) else out


def checklist_csv(items: Iterable[Mapping[str, Any]]) -> str:
    """The checklist with its current state, one row per item, for print or a spreadsheet."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\r\n")
    writer.writerow(CSV_COLUMNS)
    for item in items:
        row = {**item, "item_id": item.get("id")}
        writer.writerow([_cell(row.get(column)) for column in CSV_COLUMNS])
    return buffer.getvalue()
