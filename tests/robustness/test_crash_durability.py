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

from tests.robustness.helpers import CHECKLIST, ServerProcess, request_json, seed_data_dir

ROUNDS = 5  # kills per run (each with its own seed)
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


def _one_round(tmp_path, rng: random.Random) -> dict:
    data_dir = tmp_path / f"round-{rng.random():.6f}"
    deployment_id = seed_data_dir(data_dir)
    server = ServerProcess(data_dir).start()
    confirmed: list[tuple[str, str]] = []
    in_flight: list[str] = []
    stop = threading.Event()
    failures: list[str] = []
    streamer = threading.Thread(
        target=_stream,
        args=(server.port, deployment_id, confirmed, in_flight, stop, failures),
        daemon=True,
    )
    streamer.start()
    warm_up = time.monotonic() + 20
    while not confirmed and not failures and time.monotonic() < warm_up:
        time.sleep(0.01)  # the first answer loads the checklist rule; start the clock after it
    time.sleep(rng.uniform(0.05, 1.5))  # a random moment, seeded
    server.kill()
    stop.set()
    streamer.join(15)
    assert not streamer.is_alive()
    assert not failures, failures
    assert confirmed, "no acknowledgement was confirmed before the kill; lengthen the window"

    with ServerProcess(data_dir) as again:  # restart on the same data directory
        stored: list[str] = []
        status, listing = request_json(again.url(f"/api/deployments/{deployment_id}/checks"))
        assert status == 200, listing
        for item in ITEMS:
            status, body = request_json(
                again.url(f"/api/deployments/{deployment_id}/checks/{item}")
            )
            assert status == 200, body
            stored += [(a["client_id"], a["item_id"], a["received_at"]) for a in body["history"]]
        with sqlite3.connect(data_dir / "fieldkit.sqlite3") as db:
            arrival = [
                row[0] for row in db.execute("SELECT client_id FROM acknowledgements ORDER BY seq")
            ]
            integrity = db.execute("PRAGMA integrity_check").fetchall()
        for client_id, item, body in in_flight:  # the phone replays what got no answer
            status, replay = request_json(
                again.url(f"/api/deployments/{deployment_id}/checks/{item}"),
                method="PUT",
                body=json.loads(body),
            )
            assert status == 200, replay
            assert replay["replayed"] == (client_id in arrival)
    assert integrity == [("ok",)]
    confirmed_ids = [cid for cid, _item in confirmed]
    # every confirmed acknowledgement is there, in the order the 200s came; at most the one that
    # was in flight at the kill may follow them (committed, but its answer was lost)
    assert arrival[: len(confirmed_ids)] == confirmed_ids
    extra = arrival[len(confirmed_ids) :]
    assert extra in ([], [cid for cid, _item, _body in in_flight]), extra
    assert sorted(cid for cid, _i, _r in stored) == sorted(arrival)
    # the per-item history agrees with the arrival order too
    for item in ITEMS:
        per_item = [cid for cid, it, _r in stored if it == item]
        assert per_item == [cid for cid in arrival if cid in set(per_item)]
    return {"confirmed": len(confirmed_ids), "extra": len(extra)}


@pytest.mark.slow
def test_sigkill_loses_no_confirmed_acknowledgement(tmp_path):
    rng = random.Random(SEED)
    rounds = [_one_round(tmp_path, rng) for _ in range(ROUNDS)]
    total = sum(r["confirmed"] for r in rounds)
    print(f"\nSIGKILL rounds: {ROUNDS}, confirmed acknowledgements: {total}, lost: 0, {rounds}")
    assert total >= ROUNDS
