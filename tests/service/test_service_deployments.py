"""Deployments, checklist acknowledgements, export/import and kit, through the Flask test client."""

from __future__ import annotations

import csv
import io
import uuid

import pytest

from tests.robustness.helpers import SMALL_PLAN, store_export

from .service_fixtures import CHECKLIST, ack, export_doc


def create(client, body):
    return client.post("/api/deployments", json=body)


@pytest.mark.slow
def test_create_read_list_replace_delete(client, demo_input):
    response = create(client, demo_input)
    assert response.status_code == 201, response.json
    new_id = response.json["id"]
    assert response.headers["Location"] == f"/api/deployments/{new_id}"

    got = client.get(f"/api/deployments/{new_id}").json
    assert got["name"] == demo_input["name"]
    assert got["input"] == {k: v for k, v in demo_input.items() if k != "name"}
    assert got["revision"] == 1
    assert got["result"]["options"]
    assert got["plan_error"] is None
    assert got["ready_to_raise"] is False  # nothing is acknowledged yet

    listed = client.get("/api/deployments").json["deployments"]
    assert [d["id"] for d in listed] == [new_id]
    assert listed[0]["site_name"] == demo_input["site"]["name"]

    # Re-planned with the same plan input: the session's plan cache answers, the revision moves on.
    edited = {**demo_input, "name": "Larch Basin, second try"}
    replaced = client.put(f"/api/deployments/{new_id}", json=edited)
    assert replaced.status_code == 200, replaced.json
    assert replaced.json["revision"] == 2
    assert replaced.json["name"] == "Larch Basin, second try"
    assert replaced.json["result"] == got["result"]

    assert client.delete(f"/api/deployments/{new_id}").status_code == 200
    assert client.get(f"/api/deployments/{new_id}").status_code == 404
    assert client.get("/api/deployments").json["deployments"] == []


@pytest.mark.slow
def test_created_deployment_has_the_plan_layers_checklist(client, demo_input):
    new_id = create(client, demo_input).json["id"]
    got = client.get(f"/api/deployments/{new_id}").json
    items = client.get(f"/api/deployments/{new_id}/checks").json["items"]
    expected = got["result"]["options"][0]["safety"]["checklist"]
    assert [i["id"] for i in items] == [i["id"] for i in expected]
    assert all(i["done"] is False for i in items)
    # Tick every required pre-raise item of the real plan: ready exactly when the last one lands,
    # unless the plan's own safety verdict forbids raising.
    required = [i["id"] for i in items if i["stage"] == "pre-raise" and i["required"]]
    assert required, "a real plan has pre-raise checks"
    sent = []
    for n, item_id in enumerate(required, start=1):
        sent.append(ack())
        put = client.put(f"/api/deployments/{new_id}/checks/{item_id}", json=sent[-1])
        assert put.status_code == 200, put.json
        raise_ok = got["result"]["options"][0]["safety"]["raise_ok"]
        assert put.json["ready_to_raise"] is (raise_ok and n == len(required))
    # The deployment is edited (re-planned, stable item ids); a phone then replays its queue:
    # exactly one record per acknowledgement, the state unchanged.
    edited = client.put(f"/api/deployments/{new_id}", json={**demo_input, "name": "renamed"})
    assert edited.status_code == 200 and edited.json["revision"] == 2
    for item_id, body in zip(required, sent, strict=True):
        replay = client.put(f"/api/deployments/{new_id}/checks/{item_id}", json=body)
        assert replay.json["replayed"] is True
    after = client.get(f"/api/deployments/{new_id}/checks").json
    assert sum(i["acknowledgements"] for i in after["items"]) == len(required)
    # The same plan input re-planned gives the same wording: the ticks still count.
    assert all(i["stale_acknowledgements"] == 0 for i in after["items"])
    assert after["ready_to_raise"] is raise_ok


@pytest.mark.parametrize(
    ("body", "field"),
    [
        ({"site": {}}, "name"),
        ({"name": "", "site": {}}, "name"),
        ({"name": "   ", "site": {}}, "name"),
        ({"name": 7, "site": {}}, "name"),
        ({"name": "x" * 201, "site": {}}, "name"),
        ({"name": "ok", "client_id": "has spaces", "site": {}}, "client_id"),
        ({"name": "ok", "client_id": 12, "site": {}}, "client_id"),
    ],
)
def test_create_refuses_bad_fields(client, body, field):
    response = create(client, body)
    assert response.status_code == 422
    assert response.json["field"] == field
    assert client.get("/api/deployments").json["deployments"] == []


def test_create_with_bad_plan_input_is_422_and_not_stored(client, demo_input):
    bad = {**demo_input, "channels_mhz": [-3.0]}
    response = create(client, bad)
    assert response.status_code == 422
    assert response.json["field"].startswith("channels_mhz")
    assert client.get("/api/deployments").json["deployments"] == []


@pytest.mark.slow
def test_create_with_client_id_is_idempotent(client, demo_input):
    body = {**demo_input, "name": "Offline-made", "client_id": str(uuid.uuid4())}
    first = create(client, body)
    assert first.status_code == 201, first.json
    again = create(client, body)
    assert again.status_code == 200
    assert again.json == {"id": first.json["id"], "replayed": True}
    assert len(client.get("/api/deployments").json["deployments"]) == 1
    clash = create(client, {**body, "name": "Another"})
    assert clash.status_code == 409
    assert clash.json["field"] == "client_id"


def test_checks_state_replay_and_conflict_rule(client, planned):
    base = f"/api/deployments/{planned}/checks"
    items = client.get(base).json
    assert [i["id"] for i in items["items"]] == [i["id"] for i in CHECKLIST]
    assert items["ready_to_raise"] is False
    assert items["missing_checks"] == ["pre-power-line-0", "pre-weather"]

    first = ack(done=True, by="AB", at="2026-12-01T14:05:00Z")
    response = client.put(f"{base}/pre-power-line-0", json=first)
    assert response.status_code == 200, response.json
    assert response.json["replayed"] is False
    assert response.json["item"]["done"] is True

    # The phone replays its queue: same client_id, nothing changes, still 200.
    replay = client.put(f"{base}/pre-power-line-0", json=first)
    assert replay.status_code == 200
    assert replay.json["replayed"] is True
    history = client.get(f"{base}/pre-power-line-0").json["history"]
    assert len(history) == 1

    # The service's own receipt order decides (issue 15, item 4): an un-tick that arrives later
    # wins whatever time its device put on it (13:00 UTC, before 14:05 UTC) ...
    late = ack(done=False, by="CD", at="2026-12-01T15:00:00+02:00")
    assert client.put(f"{base}/pre-power-line-0", json=late).json["item"]["done"] is False
    # ... and the history keeps both, each with the device's time and the time of receipt.
    history = client.get(f"{base}/pre-power-line-0").json["history"]
    assert [h["by"] for h in history] == ["AB", "CD"]
    assert all(h["at"] and h["received_at"] for h in history)

    # The next tick to arrive changes it again.
    newer = ack(done=True, by="EF", at="2026-12-01T14:30:00Z")
    assert client.put(f"{base}/pre-power-line-0", json=newer).json["item"]["done"] is True

    # The same client_id with other content is refused.
    clash = client.put(f"{base}/pre-weather", json={**first, "by": "ZZ"})
    assert clash.status_code == 409
    assert clash.json["field"] == "client_id"


def test_ready_to_raise_needs_every_required_pre_raise_item(client, planned):
    base = f"/api/deployments/{planned}/checks"
    client.put(f"{base}/pre-power-line-0", json=ack())
    assert client.get(base).json["ready_to_raise"] is False
    final = client.put(f"{base}/pre-weather", json=ack())
    # pre-gloves is optional and after-swr is not a pre-raise item: ready now.
    assert final.json["ready_to_raise"] is True
    assert final.json["missing_checks"] == []
    assert client.get(f"/api/deployments/{planned}").json["ready_to_raise"] is True


def test_raise_not_ok_blocks_ready_even_when_all_ticked(app, client):
    new_id = store_export(app.config["DATABASE"], export_doc(raise_ok=False))
    base = f"/api/deployments/{new_id}/checks"
    for item in CHECKLIST:
        client.put(f"{base}/{item['id']}", json=ack())
    state = client.get(base).json
    assert state["raise_ok"] is False
    assert state["ready_to_raise"] is False


def test_unknown_item_or_deployment_is_404(client, planned):
    assert (
        client.put(f"/api/deployments/{planned}/checks/nope", json=ack()).json["field"] == "item_id"
    )
    response = client.put("/api/deployments/missing/checks/pre-weather", json=ack())
    assert response.status_code == 404
    assert client.get(f"/api/deployments/{planned}/checks/nope").status_code == 404


@pytest.mark.parametrize(
    ("change", "field"),
    [
        ({"done": "yes"}, "done"),
        ({"done": 1}, "done"),
        ({"by": ""}, "by"),
        ({"by": "x" * 41}, "by"),
        ({"by": None}, "by"),
        ({"at": "yesterday"}, "at"),
        ({"at": "2026-12-01T14:05:00"}, "at"),  # no time zone
        ({"at": 1733061900}, "at"),
        ({"client_id": "not-a-uuid"}, "client_id"),
        ({"client_id": None}, "client_id"),
        ({"extra": 1}, "extra"),
    ],
)
def test_acknowledgement_validation(client, planned, change, field):
    body = {**ack(), **change}
    response = client.put(f"/api/deployments/{planned}/checks/pre-weather", json=body)
    assert response.status_code == 422, response.json
    assert response.json["field"] == field


@pytest.mark.parametrize("missing", ["done", "by", "at", "client_id"])
def test_acknowledgement_fields_are_required(client, planned, missing):
    body = ack()
    del body[missing]
    response = client.put(f"/api/deployments/{planned}/checks/pre-weather", json=body)
    assert response.status_code == 422
    assert response.json["field"] == missing


def test_checklist_csv(client, planned):
    client.put(f"/api/deployments/{planned}/checks/pre-weather", json=ack(by="=cmd"))
    response = client.get(f"/api/deployments/{planned}/checks.csv")
    assert response.status_code == 200
    assert response.mimetype == "text/csv"
    rows = list(csv.DictReader(io.StringIO(response.get_data(as_text=True))))
    assert [r["item_id"] for r in rows] == [i["id"] for i in CHECKLIST]
    weather = rows[1]
    assert (weather["done"], weather["by"], weather["acknowledgements"]) == ("yes", "'=cmd", "1")
    # Text that a spreadsheet would run as a formula is defused (OWASP "CSV Injection").
    assert rows[2]["text"].startswith("'=")


def test_export_import_round_trip_loses_nothing(client, plan_board, tmp_path):
    from fieldkit.service import create_app

    # a deployment planned here (a real plan of the small two-tree site), its real items ticked
    planned = create(client, {**SMALL_PLAN, "name": "Round trip"}).json["id"]
    base = f"/api/deployments/{planned}/checks"
    first, second = [i["id"] for i in client.get(base).json["items"]][:2]
    client.put(f"{base}/{first}", json=ack(by="AB", at="2026-12-01T14:05:00Z"))
    client.put(f"{base}/{first}", json=ack(done=False, by="CD", at="2026-12-01T14:06:00+01:00"))
    client.put(f"{base}/{second}", json=ack(by="ÉÑ 🙂"))
    exported = client.get(f"/api/deployments/{planned}/export")
    assert exported.status_code == 200
    assert "attachment" in exported.headers["Content-Disposition"]
    doc = exported.json
    assert len(doc["acknowledgements"]) == 3

    other = create_app(
        {"DATA_DIR": tmp_path / "other", "DEMO": False, "PLAN_BOARD": plan_board}
    ).test_client()
    imported = other.post("/api/deployments/import", json=doc)
    assert imported.status_code == 201, imported.json
    assert imported.json["id"] == planned
    # the other laptop re-planned the input and found the file's plan: nothing changed on the way
    assert imported.json["recomputed"] is True and imported.json["stored_result_matched"] is True
    assert other.get(f"/api/deployments/{planned}/export").json == doc
    assert other.get(base).json["items"] == client.get(base).json["items"]

    # Importing the same file again is a replay; a different file with the same id is a conflict.
    assert other.post("/api/deployments/import", json=doc).status_code == 200
    changed = {**doc, "deployment": {**doc["deployment"], "name": "Changed"}}
    assert other.post("/api/deployments/import", json=changed).status_code == 409


@pytest.mark.parametrize(
    ("change", "field"),
    [
        ({"format": "something-else"}, "format"),
        ({"format_version": 2}, "format_version"),
        ({"deployment": "x"}, "deployment"),
        ({"surprise": 1}, "surprise"),
        ({"acknowledgements": {}}, "acknowledgements"),
        (
            {"acknowledgements": [{"client_id": "a", "item_id": "b", "done": "no"}]},
            "acknowledgements[0].done",
        ),
    ],
)
def test_import_validation(client, change, field):
    response = client.post("/api/deployments/import", json={**export_doc(), **change})
    assert response.status_code == 422, response.json
    assert response.json["field"] == field


def test_import_refuses_bad_deployment_fields(client):
    doc = export_doc(deployment_id="../../etc")
    assert client.post("/api/deployments/import", json=doc).json["field"] == "deployment.id"
    doc = export_doc()
    doc["deployment"]["created_at"] = "not a time"
    assert client.post("/api/deployments/import", json=doc).json["field"] == "deployment.created_at"


def test_import_refuses_duplicate_client_ids_in_one_file(client):
    one = {**ack(), "item_id": "pre-weather", "received_at": "2026-12-01T14:05:01Z"}
    # (its input is the small real site: the re-plan succeeds, the duplicate is what is refused)
    response = client.post("/api/deployments/import", json=export_doc(acks=[one, one]))
    assert response.status_code == 409
    assert client.get("/api/deployments").json["deployments"] == []  # the transaction rolled back


KIT = {
    "wire": {"diameter_mm": 1.6, "conductor": "copper", "spool_m": 70},
    "coax": {"class": "rg-58", "length_m": 25},
    "masts": [{"id": "M1", "height_m": 9.0, "top_load_kg": 2.0, "guys": 3}],
    "rope": {"length_m": 60},
    "tension_n": 60,
}


def test_kit_round_trip(client):
    assert client.get("/api/kit").json == {"kit": {}, "updated_at": None}
    saved = client.put("/api/kit", json=KIT)
    assert saved.status_code == 200
    got = client.get("/api/kit").json
    assert got["kit"] == KIT
    assert got["updated_at"] == saved.json["updated_at"]


def test_kit_keeps_the_strength_figures(client):
    # issue 14: what the kit editor stores for the strength checks comes back as it went in
    body = {
        **KIT,
        "weak_link_n": 300,
        "design_wind_m_s": 15,
        "ice_mm": 5,
        "rope": {"length_m": 60, "working_load_n": 400},
        "masts": [
            {"id": "M1", "height_m": 9, "wind_limit_m_s": 12, "guy_rope": {"working_load_n": 200}}
        ],
    }
    assert client.put("/api/kit", json=body).status_code == 200
    assert client.get("/api/kit").json["kit"] == body
    bad = client.put("/api/kit", json={**body, "design_wind_m_s": 90})
    assert bad.status_code == 422 and bad.json["field"] == "design_wind_m_s"


@pytest.mark.parametrize(
    ("body", "field"),
    [
        ({"wires": []}, "wires"),
        ({"wire": "copper"}, "wire"),
        ({"wire": {"diameter_mm": -1}}, "wire.diameter_mm"),
        ({"wire": {"diameter_mm": "1.6"}}, "wire.diameter_mm"),
        ({"masts": [{"id": "M1"}]}, "masts[0].height_m"),
        ({"masts": [{"id": "M1", "height_m": 900}]}, "masts[0].height_m"),
        ({"masts": [{"id": "M1", "height_m": 9, "guys": 2.5}]}, "masts[0].guys"),
        ({"masts": "M1"}, "masts"),
        ({"masts": [{"height_m": 9}] * 101}, "masts"),
        ({"tension_n": True}, "tension_n"),
        ({"note": "x" * 501}, "note"),
    ],
)
def test_kit_validation(client, body, field):
    response = client.put("/api/kit", json=body)
    assert response.status_code == 422, response.json
    assert response.json["field"] == field


def test_demo_loads_once_into_an_empty_database(tmp_path, demo_input):
    from fieldkit.service import create_app

    config = {"DATA_DIR": tmp_path / "d", "DEMO_PLAN": False}  # its plan is tested through POST
    client = create_app(config).test_client()
    listed = client.get("/api/deployments").json["deployments"]
    assert [d["name"] for d in listed] == [demo_input["name"]]
    got = client.get(f"/api/deployments/{listed[0]['id']}").json
    assert got["input"] == {k: v for k, v in demo_input.items() if k != "name"}
    client.delete(f"/api/deployments/{listed[0]['id']}")
    again = create_app(config).test_client()  # a restart
    assert again.get("/api/deployments").json["deployments"] == []


def test_a_tick_counts_only_for_the_wording_it_was_given_for(app, client, planned):
    from fieldkit import store
    from fieldkit.store import deployments

    base = f"/api/deployments/{planned}/checks"
    first = ack()
    client.put(f"{base}/pre-weather", json=first)
    client.put(f"{base}/pre-power-line-0", json=ack())
    assert client.get(base).json["ready_to_raise"] is True

    # A re-plan moves the wire: the power-line item now says something else; the weather one does not.
    conn = store.connect(app.config["DATABASE"])
    try:
        found = deployments.get(conn, planned)
        result = found.plan_result
        result["options"][0]["safety"]["checklist"][0]["text"] = "Line 0 is 12 m away."
        deployments.update(
            conn, planned, name=found.name, plan_input=found.plan_input, plan_result=result
        )
    finally:
        conn.close()
    state = client.get(base).json
    items = {i["id"]: i for i in state["items"]}
    assert items["pre-power-line-0"]["done"] is False
    assert items["pre-power-line-0"]["stale_acknowledgements"] == 1
    assert (
        items["pre-weather"]["done"] is True and items["pre-weather"]["stale_acknowledgements"] == 0
    )
    assert state["ready_to_raise"] is False
    assert state["missing_checks"] == ["pre-power-line-0"]

    # A late replay of the old tick is still one record and still does not count.
    assert client.put(f"{base}/pre-weather", json=first).json["replayed"] is True
    again = client.put(f"{base}/pre-power-line-0", json=ack(at="2026-12-01T15:00:00Z"))
    assert again.json["ready_to_raise"] is True
    history = client.get(f"{base}/pre-power-line-0").json["history"]
    assert len(history) == 2 and history[0]["item_text_sha256"] != history[1]["item_text_sha256"]


def test_an_import_with_a_forged_result_makes_nothing_ready_to_raise(client):
    """Issue 15, item 6: a stored result with raise_ok true and an empty checklist, imported, was
    ready to raise with no ticks at all. The import re-plans its input instead."""
    doc = export_doc()
    doc["deployment"]["result"]["options"][0]["safety"] = {"raise_ok": True, "checklist": []}
    response = client.post("/api/deployments/import", json=doc)
    assert response.status_code == 201, response.json
    assert response.json["recomputed"] is True and response.json["stored_result_matched"] is False
    new_id = response.json["id"]
    state = client.get(f"/api/deployments/{new_id}/checks").json
    assert state["ready_to_raise"] is False
    assert state["items"] and state["missing_checks"]  # the real plan's pre-raise checks
    stored = client.get(f"/api/deployments/{new_id}").json
    assert stored["ready_to_raise"] is False
    checklist = stored["result"]["options"][0]["safety"]["checklist"]
    assert [i["id"] for i in checklist] == [i["id"] for i in state["items"]] != []
    listed = client.get("/api/deployments").json["deployments"]
    assert [d["ready_to_raise"] for d in listed if d["id"] == new_id] == [False]


def test_an_imported_input_the_planner_refuses_is_422_naming_it_inside_the_export(client):
    doc = export_doc()
    doc["deployment"]["input"]["form"] = "spiral"
    response = client.post("/api/deployments/import", json=doc)
    assert response.status_code == 422, response.json
    assert response.json["field"] == "deployment.input.form"
    assert client.get("/api/deployments").json["deployments"] == []
