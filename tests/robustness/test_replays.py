"""Replays from phones that were offline: twice, out of order, concurrently, after an edit.

The rule under test is the service's own (fieldkit/store/acknowledgements.py and the ``rule`` field of
``GET /api/deployments/<id>/checks``): per item, the acknowledgement the service received last is the
current state, whatever the device's clock said (issue 15, item 4); the history keeps every
acknowledgement with both times; a device time more than five minutes ahead is flagged; a repeated
``client_id`` is one record, and the same ``client_id`` with different content is a 409 conflict.
"""

from __future__ import annotations

import copy
import threading
import urllib.request
import uuid

import pytest

from fieldkit.service import create_app
from fieldkit.service.server import start_in_thread
from tests.robustness.helpers import (
    SMALL_PLAN,
    ack,
    checklist_export,
    request_json,
    stop_server,
    store_export,
)


def _put(client, deployment_id, item, body):
    return client.put(f"/api/deployments/{deployment_id}/checks/{item}", json=body)


def _history(client, deployment_id, item):
    response = client.get(f"/api/deployments/{deployment_id}/checks/{item}")
    assert response.status_code == 200, response.get_json()
    return response.get_json()


def test_the_rule_is_stated(client, deployment_id):
    rule = client.get(f"/api/deployments/{deployment_id}/checks").get_json()["rule"]
    assert "received last" in rule and "client_id" in rule and "history" in rule


def test_same_acknowledgement_twice_is_one_record(client, deployment_id):
    body = ack(at="2026-12-01T14:05:00Z")
    first = _put(client, deployment_id, "pre-item-0", body)
    again = _put(client, deployment_id, "pre-item-0", body)
    assert (first.status_code, again.status_code) == (200, 200)
    assert first.get_json()["replayed"] is False and again.get_json()["replayed"] is True
    assert again.get_json()["acknowledgement"] == first.get_json()["acknowledgement"]
    assert len(_history(client, deployment_id, "pre-item-0")["history"]) == 1


def test_replay_with_an_equivalent_time_zone_is_the_same_record(client, deployment_id):
    body = ack(at="2026-12-01T14:05:00Z")
    assert _put(client, deployment_id, "pre-item-1", body).status_code == 200
    shifted = {**body, "at": "2026-12-01T15:05:00+01:00"}  # the same instant (ISO 8601 offsets)
    response = _put(client, deployment_id, "pre-item-1", shifted)
    assert response.status_code == 200 and response.get_json()["replayed"] is True
    assert len(_history(client, deployment_id, "pre-item-1")["history"]) == 1


@pytest.mark.parametrize(
    "change",
    [{"done": False}, {"by": "ZZ"}, {"at": "2026-12-01T14:06:00Z"}],
    ids=["done", "by", "at"],
)
def test_reused_client_id_with_other_content_is_a_conflict(client, deployment_id, change):
    body = ack()
    assert _put(client, deployment_id, "pre-item-0", body).status_code == 200
    response = _put(client, deployment_id, "pre-item-0", {**body, **change})
    assert response.status_code == 409
    assert response.get_json()["field"] == "client_id"
    other_item = _put(client, deployment_id, "pre-item-1", body)  # same id on another item
    assert other_item.status_code == 409
    assert len(_history(client, deployment_id, "pre-item-0")["history"]) == 1
    assert _history(client, deployment_id, "pre-item-1")["history"] == []


def test_out_of_order_arrival_the_later_receipt_wins_history_keeps_both(client, deployment_id):
    later = ack(done=True, by="AB", at="2026-12-01T14:10:00Z")
    earlier = ack(done=False, by="CD", at="2026-12-01T14:05:00Z")  # sent from an offline phone
    assert _put(client, deployment_id, "pre-item-2", later).status_code == 200
    response = _put(client, deployment_id, "pre-item-2", earlier)
    assert response.status_code == 200
    item = response.get_json()["item"]
    assert (item["done"], item["by"], item["at"]) == (False, "CD", earlier["at"])
    history = _history(client, deployment_id, "pre-item-2")["history"]
    assert [h["client_id"] for h in history] == [later["client_id"], earlier["client_id"]]
    # the late one replayed once more changes nothing
    assert _put(client, deployment_id, "pre-item-2", earlier).get_json()["replayed"] is True
    assert len(_history(client, deployment_id, "pre-item-2")["history"]) == 2


def test_equal_times_go_to_the_later_arrival(client, deployment_id):
    first = ack(done=True, by="AB", at="2026-12-01T14:05:00Z")
    second = ack(done=False, by="CD", at="2026-12-01T14:05:00Z")
    _put(client, deployment_id, "pre-item-3", first)
    item = _put(client, deployment_id, "pre-item-3", second).get_json()["item"]
    assert (item["done"], item["by"]) == (False, "CD")


def test_replayed_queue_in_reverse_keeps_every_record_and_each_laptops_last_receipt(tmp_path):
    """Two laptops get the same 12 acknowledgements in opposite orders: the same 12 records, and on
    each the state is what it received last (receipt order, not the devices' clocks)."""
    # distinct times (7 and 12 are coprime), so the tie rule plays no part here
    queue = [
        (
            f"pre-item-{i % 2}",
            ack(done=i % 3 == 0, by=f"P{i}", at=f"2026-12-01T14:{10 + (i * 7) % 12:02d}:00Z"),
        )
        for i in range(12)
    ]
    states = []
    for name, order in (("forward", queue), ("reverse", queue[::-1])):
        app = create_app({"DATA_DIR": tmp_path / name, "DEMO": False, "TESTING": True})
        client = app.test_client()
        store_export(app.config["DATABASE"], checklist_export(deployment_id="shared-deployment"))
        for item, body in order:
            assert _put(client, "shared-deployment", item, body).status_code == 200
        for item, body in order:  # the whole queue again: nothing changes
            put = _put(client, "shared-deployment", item, body)
            assert put.status_code == 200 and put.get_json()["replayed"] is True
        items = client.get("/api/deployments/shared-deployment/checks").get_json()["items"]
        states.append({i["id"]: (i["done"], i["by"], i["acknowledgements"]) for i in items})
        last = {item: body for item, body in order}  # the last one each item received
        for item, body in last.items():
            assert states[-1][item][:2] == (body["done"], body["by"]), (name, item)
    assert states[0] != states[1]  # the orders differ, so do the last receipts
    for item in ("pre-item-0", "pre-item-1"):
        assert states[0][item][2] == states[1][item][2] == 6  # every record on both laptops


def test_concurrent_replays_over_waitress_make_one_record(tmp_path):
    """Sixteen threads send the same acknowledgement at once to a real waitress: one record."""
    app = create_app({"DATA_DIR": tmp_path / "data", "DEMO": False})
    server = start_in_thread(app)
    try:
        base = server.url.rstrip("/")
        created = {"id": store_export(app.config["DATABASE"], checklist_export())}
        url = f"{base}/api/deployments/{created['id']}/checks/pre-item-0"
        body = ack()
        results: list[tuple[int, bool]] = []
        barrier = threading.Barrier(16)

        def send():
            barrier.wait()
            status, answer = request_json(url, method="PUT", body=body)
            results.append((status, answer.get("replayed")))

        threads = [threading.Thread(target=send) for _ in range(16)]
        for t in threads:
            t.start()
        for t in threads:
            t.join(30)
        assert sorted(results) == [(200, False)] + [(200, True)] * 15
        status, detail = request_json(url)
        assert status == 200 and len(detail["history"]) == 1
        with urllib.request.urlopen(f"{base}/api/deployments/{created['id']}/export") as r:
            assert r.status == 200
    finally:
        stop_server(server)


@pytest.mark.slow
def test_replay_after_the_deployment_was_edited(client):
    """An acknowledgement replayed after a re-plan is still one record; the edit keeps history."""
    body = {**copy.deepcopy(SMALL_PLAN), "name": "Edit test"}
    created = client.post("/api/deployments", json=body)
    assert created.status_code == 201, created.get_json()
    deployment_id = created.get_json()["id"]
    items = client.get(f"/api/deployments/{deployment_id}/checks").get_json()["items"]
    assert items, "the plan produced no checklist"
    item = items[0]["id"]
    tick = ack(at="2026-12-01T14:05:00Z", client_id=str(uuid.uuid4()))
    assert _put(client, deployment_id, item, tick).status_code == 200

    edited = copy.deepcopy(body)
    edited["name"] = "Edit test, T1 lowered"
    edited["site"]["supports"][0]["height_m"] = 12.0
    replaced = client.put(f"/api/deployments/{deployment_id}", json=edited)
    assert replaced.status_code == 200, replaced.get_json()
    assert replaced.get_json()["revision"] == 2

    again = _put(client, deployment_id, item, tick)
    assert again.status_code in (200, 404), again.get_json()
    if again.status_code == 200:
        assert again.get_json()["replayed"] is True
        assert len(_history(client, deployment_id, item)["history"]) == 1
    else:  # the edit removed the item: the replay is refused by name, nothing is written
        assert again.get_json()["field"] == "item_id"
    exported = client.get(f"/api/deployments/{deployment_id}/export").get_json()
    assert [a["client_id"] for a in exported["acknowledgements"]] == [tick["client_id"]]


@pytest.mark.parametrize("at", ["0001-01-01T00:00:00+14:00", "9999-12-31T23:59:59-14:00"])
def test_instants_outside_the_utc_range_are_refused_by_name(client, deployment_id, at):
    response = _put(client, deployment_id, "pre-item-0", ack(at=at))
    assert response.status_code == 422 and response.get_json()["field"] == "at"


@pytest.mark.parametrize("clock", ["0999-12-01T14:05:00Z", "9999-12-31T23:59:59Z"])
def test_a_phone_with_a_wrong_clock_neither_wins_nor_loses_by_it(client, deployment_id, clock):
    """A clock years behind or ahead plays no part: each tick counts when it arrives, and the
    one after it decides next (the 9999 probe of issue 15: a tick that could never be undone)."""
    now = ack(done=True, by="AB", at="2026-12-01T14:05:00Z")
    odd = ack(done=False, by="CD", at=clock)
    after = ack(done=True, by="EF", at="2026-12-01T14:06:00Z")
    _put(client, deployment_id, "pre-item-0", now)
    item = _put(client, deployment_id, "pre-item-0", odd).get_json()["item"]
    assert (item["done"], item["by"]) == (False, "CD")
    assert item["clock_ahead"] is clock.startswith("9999")  # recorded and flagged when ahead
    item = _put(client, deployment_id, "pre-item-0", after).get_json()["item"]
    assert (item["done"], item["by"]) == (True, "EF")
    history = _history(client, deployment_id, "pre-item-0")["history"]
    assert [(h["by"], h["clock_ahead"]) for h in history] == [
        ("AB", False),
        ("CD", clock.startswith("9999")),
        ("EF", False),
    ]
    assert all(h["at"] and h["received_at"] for h in history)  # both times, always
