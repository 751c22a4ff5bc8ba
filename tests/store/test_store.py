"""The SQLite store: migrations (from empty, from the previous schema), transactions, append-only."""

from __future__ import annotations

import json
import sqlite3
import threading

import pytest

from fieldkit import store
from fieldkit.errors import InputError
from fieldkit.store import acknowledgements, deployments, kit, transfer
from fieldkit.store.schema import MIGRATIONS, SCHEMA_VERSION, SchemaTooNew, migrate, schema_version

PLAN_INPUT = {
    "site": {"ground": "poor", "supports": [{"id": "T1", "kind": "tree", "height_m": 13.5}]},
    "kit": {"wire": {"diameter_mm": 1.6}},
    "channels_mhz": [3.605, 3.79],
}


@pytest.fixture
def db(tmp_path):
    path = store.database_path(tmp_path)
    migrate(path)
    conn = store.connect(path)
    yield conn
    conn.close()


def test_migrate_from_empty(tmp_path):
    path = store.database_path(tmp_path)
    assert migrate(path) == SCHEMA_VERSION
    conn = store.connect(path)
    try:
        assert schema_version(conn) == SCHEMA_VERSION
        assert conn.execute("PRAGMA journal_mode").fetchone()[0] == "wal"
        assert conn.execute("PRAGMA foreign_keys").fetchone()[0] == 1
        tables = {r[0] for r in conn.execute("SELECT name FROM sqlite_master WHERE type='table'")}
        assert {"meta", "deployments", "kit", "acknowledgements"} <= tables
    finally:
        conn.close()
    assert migrate(path) == SCHEMA_VERSION  # running again changes nothing


def test_migrate_from_version_1_keeps_and_fills_data(tmp_path):
    path = store.database_path(tmp_path)
    assert migrate(path, target=1) == 1
    conn = store.connect(path)
    # A database as the first fieldkit wrote it: version-1 columns only.
    conn.execute(
        "INSERT INTO deployments (id, name, plan_input, plan_result, created_at, updated_at)"
        " VALUES ('d1', 'Old one', ?, NULL, '2026-11-30T10:00:00.000000Z', '2026-11-30T10:00:00.000000Z')",
        (json.dumps(PLAN_INPUT),),
    )
    conn.execute(
        "INSERT INTO acknowledgements (client_id, deployment_id, item_id, done, by, at, at_utc,"
        " received_at) VALUES ('c1', 'd1', 'pre-weather', 1, 'AB', '2026-11-30T10:05:00Z',"
        " '2026-11-30T10:05:00.000000Z', '2026-11-30T10:05:01.000000Z')"
    )
    conn.close()

    assert migrate(path) == SCHEMA_VERSION
    conn = store.connect(path)
    try:
        found = deployments.get(conn, "d1")
        assert (found.name, found.plan_input, found.revision) == ("Old one", PLAN_INPUT, 1)
        row = conn.execute("SELECT site, kit, channels FROM deployments WHERE id = 'd1'").fetchone()
        assert json.loads(row["site"]) == PLAN_INPUT["site"]
        assert json.loads(row["kit"]) == PLAN_INPUT["kit"]
        assert json.loads(row["channels"]) == PLAN_INPUT["channels_mhz"]
        assert [a.client_id for a in acknowledgements.history(conn, "d1")] == ["c1"]
        with pytest.raises(sqlite3.IntegrityError, match="append-only"):
            conn.execute("UPDATE acknowledgements SET done = 0")
    finally:
        conn.close()


def test_migrate_from_version_2_fills_the_safety_column(tmp_path):
    path = store.database_path(tmp_path)
    previous = 2
    assert migrate(path, target=previous) == previous
    conn = store.connect(path)
    safety = {
        "raise_ok": True,
        "checklist": [{"id": "pre-x", "stage": "pre-raise", "required": True}],
    }
    result = {"options": [{"form": "flat", "safety": safety}, {"form": "inverted-v"}]}
    conn.execute(
        "INSERT INTO deployments (id, name, plan_input, plan_result, created_at, updated_at, site,"
        " kit, channels, revision) VALUES ('d2', 'Previous', ?, ?, '2026-11-30T10:00:00.000000Z',"
        " '2026-11-30T10:00:00.000000Z', ?, NULL, '[3.79]', 4)",
        (json.dumps(PLAN_INPUT), json.dumps(result), json.dumps(PLAN_INPUT["site"])),
    )
    conn.close()
    assert migrate(path) == SCHEMA_VERSION
    conn = store.connect(path)
    try:
        assert deployments.safety_view(conn, "d2") == (4, {"options": [{"safety": safety}]})
        assert deployments.get(conn, "d2").plan_result == result
        [summary] = deployments.summaries(conn)
        assert summary["safety"] == safety and summary["revision"] == 4
    finally:
        conn.close()


def test_migrate_from_previous_schema_keeps_ticks_counting(tmp_path):
    path = store.database_path(tmp_path)
    previous = SCHEMA_VERSION - 1
    assert migrate(path, target=previous) == previous
    conn = store.connect(path)
    new_id = deployments.create(conn, name="A", plan_input=PLAN_INPUT, plan_result=None)
    conn.execute(
        "INSERT INTO acknowledgements (client_id, deployment_id, item_id, done, by, at, at_utc,"
        " received_at) VALUES ('c1', ?, 'pre-x', 1, 'AB', '2026-11-30T10:05:00Z',"
        " '2026-11-30T10:05:00.000000Z', '2026-11-30T10:05:01.000000Z')",
        (new_id,),
    )
    conn.close()
    assert migrate(path) == SCHEMA_VERSION
    conn = store.connect(path)
    try:
        [ack] = acknowledgements.history(conn, new_id)
        assert ack.item_text_sha256 is None
        assert acknowledgements.counts_for(
            ack, "any wording"
        )  # a tick from before the wording was kept
    finally:
        conn.close()


def test_migrate_from_version_4_records_clock_offsets_and_orders_by_receipt(tmp_path):
    """Ticks stored under the old rule (latest device time wins) keep every record; after v5 the
    receipt order decides, the 9999 tick is flagged, and the history stays append-only."""
    path = store.database_path(tmp_path)
    assert migrate(path, target=4) == 4
    conn = store.connect(path)
    new_id = deployments.create(conn, name="A", plan_input=PLAN_INPUT, plan_result=None)
    rows = [
        (
            "c1",
            1,
            "9999-12-31T23:59:59Z",
            "9999-12-31T23:59:59.000000Z",
            "2026-11-30T10:05:01.000000Z",
        ),
        (
            "c2",
            0,
            "2026-11-30T10:06:00Z",
            "2026-11-30T10:06:00.000000Z",
            "2026-11-30T10:06:00.500000Z",
        ),
    ]
    for client_id, done, at, at_utc, received in rows:
        conn.execute(
            "INSERT INTO acknowledgements (client_id, deployment_id, item_id, done, by, at, at_utc,"
            " received_at) VALUES (?, ?, 'pre-x', ?, 'AB', ?, ?, ?)",
            (client_id, new_id, done, at, at_utc, received),
        )
    conn.close()
    assert migrate(path) == SCHEMA_VERSION
    conn = store.connect(path)
    try:
        first, second = acknowledgements.history(conn, new_id)
        assert first.clock_ahead is True and first.device_ahead_s > 2.5e11  # about 7 973 years
        assert second.clock_ahead is False and second.device_ahead_s == pytest.approx(-0.5)
        # under the old rule c1 (year 9999) could never be undone; now the later receipt decides
        assert acknowledgements.current_state(conn, new_id)["pre-x"].client_id == "c2"
        with pytest.raises(sqlite3.IntegrityError, match="append-only"):
            conn.execute("UPDATE acknowledgements SET done = 1")
    finally:
        conn.close()


def test_set_result_only_for_the_revision_it_was_planned_for(db):
    new_id = deployments.create(db, name="A", plan_input=PLAN_INPUT, plan_result=None)
    deployments.update(db, new_id, name="edited", plan_input=PLAN_INPUT, plan_result=None)
    # A background plan of revision 1 arrives after the edit: the edit wins.
    assert not deployments.set_result(
        db, new_id, plan_result={"options": []}, plan_error=None, revision=1
    )
    assert deployments.get(db, new_id).plan_result is None
    assert deployments.set_result(
        db, new_id, plan_result={"options": []}, plan_error=None, revision=2
    )
    assert deployments.get(db, new_id).plan_result == {"options": []}


def test_a_failed_migration_leaves_the_old_version(tmp_path, monkeypatch):
    path = store.database_path(tmp_path)
    migrate(path, target=1)
    broken = (*MIGRATIONS[:1], (*MIGRATIONS[1][:2], "THIS IS NOT SQL"))
    monkeypatch.setattr("fieldkit.store.schema.MIGRATIONS", broken)
    with pytest.raises(sqlite3.OperationalError):
        migrate(path, target=2)
    conn = store.connect(path)
    try:
        assert schema_version(conn) == 1
        columns = {r[1] for r in conn.execute("PRAGMA table_info(deployments)")}
        assert "site" not in columns  # the half-done migration was rolled back
    finally:
        conn.close()


def test_newer_database_is_refused(tmp_path):
    path = store.database_path(tmp_path)
    migrate(path)
    conn = sqlite3.connect(path)
    conn.execute(f"PRAGMA user_version = {SCHEMA_VERSION + 1}")
    conn.close()
    with pytest.raises(SchemaTooNew, match="newer fieldkit"):
        migrate(path)


def test_transaction_rolls_back_on_error(db):
    with pytest.raises(RuntimeError), store.transaction(db):
        deployments.insert(db, name="gone", plan_input=PLAN_INPUT, plan_result=None)
        raise RuntimeError("power cut")
    assert deployments.count(db) == 0


def test_deployment_crud(db):
    new_id = deployments.create(db, name="A", plan_input=PLAN_INPUT, plan_result=None)
    found = deployments.get(db, new_id)
    assert found.plan_input == PLAN_INPUT and found.plan_result is None and found.revision == 1
    updated = deployments.update(
        db, new_id, name="B", plan_input=PLAN_INPUT, plan_result={"options": []}
    )
    assert (updated.name, updated.revision, updated.plan_result) == ("B", 2, {"options": []})
    assert updated.updated_at >= found.updated_at
    deployments.delete(db, new_id)
    with pytest.raises(store.NotFound):
        deployments.get(db, new_id)
    with pytest.raises(store.NotFound):
        deployments.delete(db, new_id)


def test_deleting_a_deployment_removes_its_history(db):
    new_id = deployments.create(db, name="A", plan_input=PLAN_INPUT, plan_result=None)
    acknowledgements.acknowledge(
        db,
        deployment_id=new_id,
        item_id="pre-x",
        done=True,
        by="AB",
        at="2026-12-01T10:00:00Z",
        client_id="c-1",
    )
    deployments.delete(db, new_id)
    assert db.execute("SELECT count(*) FROM acknowledgements").fetchone()[0] == 0


@pytest.mark.parametrize(
    ("value", "utc"),
    [
        ("2026-12-01T14:05:00Z", "2026-12-01T14:05:00.000000Z"),
        ("2026-12-01T15:05:00+01:00", "2026-12-01T14:05:00.000000Z"),
        ("2026-12-01T09:05:00.250-05:00", "2026-12-01T14:05:00.250000Z"),
        ("2026-12-01T14:05:00.123Z", "2026-12-01T14:05:00.123000Z"),  # JavaScript toISOString()
    ],
)
def test_instant_utc(value, utc):
    # ISO 8601 / RFC 3339 date-times with offsets, normalised to UTC.
    assert acknowledgements.instant_utc(value, "at") == utc


@pytest.mark.parametrize(
    "value", ["2026-12-01T14:05:00", "2026-12-01", "noon", "", None, 17, "9" * 50]
)
def test_instant_utc_refuses(value):
    with pytest.raises(InputError) as caught:
        acknowledgements.instant_utc(value, "at")
    assert caught.value.field == "at"


def test_current_state_is_the_last_receipt_and_history_keeps_all(db):
    new_id = deployments.create(db, name="A", plan_input=PLAN_INPUT, plan_result=None)

    def tick(client_id, done, at, received_at=None):
        return acknowledgements.acknowledge(
            db,
            deployment_id=new_id,
            item_id="pre-x",
            done=done,
            by="AB",
            at=at,
            client_id=client_id,
            received_at=received_at,
        )

    tick("c1", True, "2026-12-01T14:00:00Z")
    tick("c2", False, "2026-12-01T13:59:00Z")  # arrives later, its device says earlier: it decides
    assert acknowledgements.current_state(db, new_id)["pre-x"].client_id == "c2"
    tick("c3", True, "9999-12-31T23:59:59Z")  # a clock far ahead: recorded, flagged ...
    held = acknowledgements.current_state(db, new_id)["pre-x"]
    assert held.client_id == "c3" and held.clock_ahead is True
    tick("c4", False, "2026-12-01T14:01:00Z")  # ... and outranked by the next tick to arrive
    assert acknowledgements.current_state(db, new_id)["pre-x"].client_id == "c4"
    _, replayed = tick("c1", True, "2026-12-01T14:00:00Z")
    assert replayed
    assert [a.client_id for a in acknowledgements.history(db, new_id)] == ["c1", "c2", "c3", "c4"]
    with pytest.raises(store.Conflict):
        tick("c1", False, "2026-12-01T14:00:00Z")


def test_a_device_clock_ahead_is_flagged_beyond_the_tolerance(db):
    from datetime import UTC, datetime, timedelta

    new_id = deployments.create(db, name="A", plan_input=PLAN_INPUT, plan_result=None)
    received = datetime(2026, 12, 1, 14, 0, tzinfo=UTC)
    tolerance = acknowledgements.CLOCK_AHEAD_TOLERANCE_S
    cases = {"drift": 60, "edge": tolerance, "ahead": tolerance + 1, "behind": -7200}
    for client_id, ahead_s in cases.items():
        ack, _ = acknowledgements.acknowledge(
            db,
            deployment_id=new_id,
            item_id=f"pre-{client_id}",
            done=True,
            by="AB",
            at=(received + timedelta(seconds=ahead_s)).isoformat(),
            client_id=client_id,
            received_at=received.strftime("%Y-%m-%dT%H:%M:%S.%fZ"),
        )
        assert ack.device_ahead_s == pytest.approx(ahead_s), client_id
        assert ack.clock_ahead is (ahead_s > tolerance), client_id
        assert ack.to_json()["clock_ahead"] is ack.clock_ahead


def test_acknowledging_a_missing_deployment_is_not_found(db):
    with pytest.raises(store.NotFound):
        acknowledgements.acknowledge(
            db,
            deployment_id="nope",
            item_id="x",
            done=True,
            by="AB",
            at="2026-12-01T10:00:00Z",
            client_id="c",
        )


def test_parallel_writers_on_separate_connections(tmp_path):
    # WAL with BEGIN IMMEDIATE and a busy timeout: concurrent writers wait, none fails.
    path = store.database_path(tmp_path)
    migrate(path)
    setup = store.connect(path)
    new_id = deployments.create(setup, name="A", plan_input=PLAN_INPUT, plan_result=None)
    setup.close()
    errors: list[BaseException] = []

    def writer(n):
        conn = store.connect(path)
        try:
            for i in range(25):
                acknowledgements.acknowledge(
                    conn,
                    deployment_id=new_id,
                    item_id="pre-x",
                    done=True,
                    by="AB",
                    at=f"2026-12-01T10:{i:02d}:00Z",
                    client_id=f"w{n}-{i}",
                )
        except BaseException as exc:  # collected and asserted below
            errors.append(exc)
        finally:
            conn.close()

    threads = [threading.Thread(target=writer, args=(n,)) for n in range(6)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert errors == []
    conn = store.connect(path)
    try:
        assert len(acknowledgements.history(conn, new_id)) == 150
    finally:
        conn.close()


def test_kit_put_get(db):
    assert kit.get(db) == (None, None)
    kit.put(db, {"wire": {"diameter_mm": 1.6}})
    kit.put(db, {"wire": {"diameter_mm": 2.0}})
    body, updated = kit.get(db)
    assert body == {"wire": {"diameter_mm": 2.0}} and updated


def test_export_import_round_trip(db, tmp_path):
    new_id = deployments.create(
        db, name="Ünïcode ☂", plan_input=PLAN_INPUT, plan_result={"options": [{"x": 1.5}]}
    )
    for i, done in enumerate((True, False, True)):
        acknowledgements.acknowledge(
            db,
            deployment_id=new_id,
            item_id=f"pre-{i % 2}",
            done=done,
            by="AB",
            at=f"2026-12-01T10:0{i}:00+02:00",
            client_id=f"c{i}",
        )
    doc = transfer.export_deployment(db, new_id)
    text = json.dumps(doc)  # through a file, as between laptops

    other_path = store.database_path(tmp_path / "other")
    (tmp_path / "other").mkdir()
    migrate(other_path)
    other = store.connect(other_path)
    # the importing side recomputes the plan from the input (here: the same plan, other timings)
    recomputed = {"options": [{"x": 1.5}], "engine": {"solve_s": 0.25}}
    try:
        imported = transfer.import_deployment(other, json.loads(text), plan_result=recomputed)
        assert imported == (new_id, True)
        assert transfer.export_deployment(other, new_id) == doc
        assert acknowledgements.current_state(other, new_id) == acknowledgements.current_state(
            db, new_id
        )
        again = transfer.import_deployment(other, json.loads(text), plan_result=recomputed)
        assert again == (new_id, False)
    finally:
        other.close()


def test_an_import_keeps_only_a_result_its_recomputation_confirms(db):
    new_id = deployments.create(
        db,
        name="forged",
        plan_input=PLAN_INPUT,
        plan_result={"options": [{"safety": {"raise_ok": True, "checklist": []}}]},
    )
    doc = transfer.export_deployment(db, new_id)
    deployments.delete(db, new_id)
    honest = {"options": [{"safety": {"raise_ok": False, "checklist": [{"id": "pre-a"}]}}]}
    transfer.import_deployment(db, doc, plan_result=honest)
    assert deployments.get(db, new_id).plan_result == honest


def test_csv_defuses_formulas():
    # OWASP "CSV Injection": cells starting with = + - @ are prefixed so spreadsheets show text.
    out = transfer.checklist_csv(
        [{"id": "a", "text": "=1+1", "by": "@x", "done": True, "required": False}]
    )
    lines = out.splitlines()
    assert lines[0] == ",".join(transfer.CSV_COLUMNS)
    assert lines[1].split(",")[3] == "'=1+1"
    assert "'@x" in lines[1]
