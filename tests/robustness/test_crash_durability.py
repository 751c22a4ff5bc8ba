"""Crash durability: SIGKILL the real service while phones stream checklist acknowledgements.

Every acknowledgement that was answered 200 must be there after a restart, in the order the
answers came, and SQLite must report ``PRAGMA integrity_check`` = ok. The store commits each write
in its own ``BEGIN IMMEDIATE`` transaction with ``synchronous=FULL`` in WAL mode (SQLite docs,
"Write-Ahead Logging" and "PRAGMA synchronous": a committed WAL transaction survives a crash of
the process); this test checks that promise end to end with a real kill, not a mock.
"""

from __future__ import annotations

import http.client
import json
import random
import sqlite3
import threading
import time
import uuid

import pytest

from tests.robustness.helpers import (
    CHECKLIST,
    ServerProcess,
    checklist_export,
    request_json,
    seed_data_dir,
)

ROUNDS = 6  # kills per run (seeded); odd rounds one phone, even rounds three at once
SEED = 20261202
ITEMS = [item["id"] for item in CHECKLIST]


def _stream(port, deployment_id, confirmed, in_flight, stop, failures):
    """Send acknowledgements one after another on one keep-alive connection, as a phone would."""
    conn = http.client.HTTPConnection("127.0.0.1", port, timeout=10)
    n = 0
    try:
        while not stop.is_set():
            client_id = str(uuid.uuid4())
            item = ITEMS[n % len(ITEMS)]
            body = json.dumps(
                {
                    "done": n % 3 != 2,
                    "by": f"K{n % 7}",
                    "at": f"2026-12-01T14:{n // 60 % 60:02d}:{n % 60:02d}Z",
                    "client_id": client_id,
                }
            )
            in_flight[:] = [(client_id, item, body)]
            conn.request(
                "PUT",
                f"/api/deployments/{deployment_id}/checks/{item}",
                body=body,
                headers={"Content-Type": "application/json"},
            )
            response = conn.getresponse()
            payload = response.read()
            if response.status != 200:
                raise AssertionError(f"ack {n} answered {response.status}: {payload[:200]!r}")
            confirmed.append((client_id, item))
            in_flight[:] = []
            n += 1
    except (ConnectionError, http.client.HTTPException, OSError):
        pass  # the server was killed under us: expected
    except AssertionError as exc:
        failures.append(str(exc))
    finally:
        conn.close()


def _one_round(tmp_path, rng: random.Random, phones: int) -> dict:
    data_dir = tmp_path / f"round-{rng.random():.6f}"
    deployment_id = seed_data_dir(data_dir)
    server = ServerProcess(data_dir).start()
    confirmed = [[] for _ in range(phones)]  # per phone: (client_id, item) in the order of the 200s
    in_flight = [[] for _ in range(phones)]
    stop = threading.Event()
    failures: list[str] = []
    streamers = [
        threading.Thread(
            target=_stream,
            args=(server.port, deployment_id, confirmed[i], in_flight[i], stop, failures),
            daemon=True,
        )
        for i in range(phones)
    ]
    for t in streamers:
        t.start()
    warm_up = time.monotonic() + 20
    while not all(confirmed) and not failures and time.monotonic() < warm_up:
        time.sleep(0.01)  # the first answer loads the checklist rule; start the clock after it
    time.sleep(rng.uniform(0.05, 1.5))  # a random moment, seeded
    server.kill()
    stop.set()
    for t in streamers:
        t.join(15)
        assert not t.is_alive()
    assert not failures, failures
    assert all(confirmed), "a phone had no acknowledgement confirmed before the kill"
    pending = [entry for phone in in_flight for entry in phone]

    with ServerProcess(data_dir) as again:  # restart on the same data directory
        stored: list[tuple[str, str]] = []
        status, listing = request_json(again.url(f"/api/deployments/{deployment_id}/checks"))
        assert status == 200, listing
        for item in ITEMS:
            status, body = request_json(
                again.url(f"/api/deployments/{deployment_id}/checks/{item}")
            )
            assert status == 200, body
            stored += [(a["client_id"], a["item_id"]) for a in body["history"]]
        with sqlite3.connect(data_dir / "fieldkit.sqlite3") as db:
            arrival = [
                row[0] for row in db.execute("SELECT client_id FROM acknowledgements ORDER BY seq")
            ]
            integrity = db.execute("PRAGMA integrity_check").fetchall()
        for client_id, item, body in pending:  # each phone replays what got no answer
            status, replay = request_json(
                again.url(f"/api/deployments/{deployment_id}/checks/{item}"),
                method="PUT",
                body=json.loads(body),
            )
            assert status == 200, replay
            assert replay["replayed"] == (client_id in arrival)
    assert integrity == [("ok",)]
    position = {cid: i for i, cid in enumerate(arrival)}
    extra = set(arrival)
    for phone in range(phones):
        ids = [cid for cid, _item in confirmed[phone]]
        # every confirmed acknowledgement is there, in the order that phone got its 200s
        assert all(cid in position for cid in ids), "a confirmed acknowledgement was lost"
        assert [position[cid] for cid in ids] == sorted(position[cid] for cid in ids)
        extra -= set(ids)
    # beyond the confirmed ones, only what was in flight at the kill (committed, answer lost)
    assert extra <= {cid for cid, _item, _body in pending}, extra
    assert sorted(cid for cid, _item in stored) == sorted(arrival)
    for item in ITEMS:  # the per-item history agrees with the arrival order
        per_item = [cid for cid, it in stored if it == item]
        assert per_item == [cid for cid in arrival if cid in set(per_item)]
    return {"phones": phones, "confirmed": sum(map(len, confirmed)), "in_flight_kept": len(extra)}


@pytest.mark.slow
def test_sigkill_loses_no_confirmed_acknowledgement(tmp_path):
    rng = random.Random(SEED)
    rounds = [_one_round(tmp_path, rng, phones=1 + 2 * (i % 2)) for i in range(ROUNDS)]
    total = sum(r["confirmed"] for r in rounds)
    print(f"\nSIGKILL rounds: {ROUNDS}, confirmed acknowledgements: {total}, lost: 0, {rounds}")
    assert total >= ROUNDS


def _big_import(n: int) -> dict:
    doc = checklist_export("big-import")
    doc["acknowledgements"] = [
        {
            "client_id": str(uuid.uuid4()),
            "item_id": ITEMS[i % len(ITEMS)],
            "done": True,
            "by": "AB",
            "at": f"2026-12-01T14:{i // 60 % 60:02d}:{i % 60:02d}Z",
            "received_at": "2026-12-01T15:00:00.000000Z",
        }
        for i in range(n)
    ]
    return doc


@pytest.mark.slow
def test_sigkill_during_a_large_import_is_all_or_nothing(tmp_path):
    """An import (one transaction, SQLite docs "Atomic Commit") killed mid-way: all of it or none."""
    rng = random.Random(SEED + 1)
    doc = _big_import(5000)
    body = json.dumps(doc)
    outcomes = []
    for round_no in range(5):
        data_dir = tmp_path / f"import-{round_no}"
        seed_data_dir(data_dir)
        server = ServerProcess(data_dir).start()

        def send(port=server.port):
            conn = http.client.HTTPConnection("127.0.0.1", port, timeout=30)
            try:
                conn.request(
                    "POST",
                    "/api/deployments/import",
                    body=body,
                    headers={"Content-Type": "application/json"},
                )
                conn.getresponse().read()
            except (ConnectionError, http.client.HTTPException, OSError):
                pass
            finally:
                conn.close()

        sender = threading.Thread(target=send, daemon=True)
        sender.start()
        # from mid-upload to after the commit (the import re-plans the input first: a plan worker
        # starts with the server, 2-4 s, then the small plan)
        time.sleep(rng.uniform(0.05, 6.0))
        server.kill()
        sender.join(15)
        with sqlite3.connect(data_dir / "fieldkit.sqlite3") as db:
            count = db.execute(
                "SELECT COUNT(*) FROM acknowledgements WHERE deployment_id = 'big-import'"
            ).fetchone()[0]
            present = db.execute(
                "SELECT COUNT(*) FROM deployments WHERE id = 'big-import'"
            ).fetchone()[0]
            assert db.execute("PRAGMA integrity_check").fetchall() == [("ok",)]
        assert (present, count) in ((0, 0), (1, 5000)), (present, count)
        outcomes.append(present)
        with ServerProcess(data_dir) as again:  # the laptop imports the file again: a replay
            status, answer = request_json(
                again.url("/api/deployments/import"), method="POST", body=doc, timeout=30
            )
            assert status == (200 if present else 201), answer
            # every acknowledgement came along (its items are those of the file's checklist; the
            # checklist itself is the re-planned one)
            status, exported = request_json(again.url("/api/deployments/big-import/export"))
            assert status == 200 and len(exported["acknowledgements"]) == 5000
    print(f"\nimport kills: {len(outcomes)}, committed before the kill: {sum(outcomes)}")
