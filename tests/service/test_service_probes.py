"""The smaller holes an attacker and a heavy user found by probing (issue 15, item 6), one test each.

In-process requests through the Flask test client on a real SQLite database; "a phone" is a request
with a test REMOTE_ADDR from the documentation range 192.0.2.0/24 (RFC 5737), never a real address.
"""

from __future__ import annotations

import json
import logging
import subprocess
import sys
from urllib.parse import urljoin

import pytest

from fieldkit.errors import MAX_EXACT_INTEGER
from fieldkit.safety.duty import MAX_POWER_W
from fieldkit.service.security import KEY_HEADER, keyring

from .service_fixtures import export_doc

HUGE = "1" + "0" * 320  # an integer literal of 321 digits: beyond any double (RFC 8259 §6)


def _body(text: str):
    """Raw JSON text (HUGE stands for the literal): json.dumps would not write such a number."""
    return {"data": text.replace("HUGE", HUGE), "content_type": "application/json"}


@pytest.mark.parametrize(
    ("method", "path", "text", "field"),
    [
        ("PUT", "/api/kit", '{"tension_n": HUGE}', "tension_n"),
        (
            "PUT",
            "/api/kit",
            '{"masts": [{"id": "M1", "height_m": -HUGE}]}',
            "masts[0].height_m",
        ),
        ("POST", "/api/model", '{"frequency_mhz": HUGE}', "frequency_mhz"),
        ("POST", "/api/plan", '{"radio": {"power_w": HUGE, "mode": "ssb"}}', "radio.power_w"),
        ("POST", "/api/model", '[{"frequency_mhz": 3.6}, {"power_w": HUGE}]', "[1].power_w"),
    ],
)
def test_a_huge_integer_literal_is_refused_by_name_not_500(client, method, path, text, field):
    response = client.open(path, method=method, **_body(text))
    assert response.status_code == 422, response.get_data(as_text=True)
    assert response.json["field"] == field
    assert "321 digits" in response.json["detail"]


def test_the_largest_exact_integer_still_reaches_the_validator(client):
    # 2**53 - 1 is a number JSON carries exactly (RFC 7493 §2.2): the kit validator, not the JSON
    # edge, refuses it as a tension far too large.
    response = client.put("/api/kit", **_body(f'{{"tension_n": {MAX_EXACT_INTEGER}}}'))
    assert response.status_code == 422
    assert response.json["field"] == "tension_n"
    assert "digits" not in response.json["detail"]


def test_the_cli_refuses_a_huge_integer_with_one_line(tmp_path):
    spec = tmp_path / "huge.json"
    spec.write_text(f'{{"frequency_mhz": {HUGE}}}')
    done = subprocess.run(
        [sys.executable, "-m", "fieldkit.cli", "model", str(spec)],
        capture_output=True,
        text=True,
        timeout=60,
    )
    assert done.returncode == 2, done.stderr
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1 and "frequency_mhz" in lines[0] and "321 digits" in lines[0]


def test_a_huge_revision_in_an_import_is_refused_by_name(client):
    for revision in (2**62, 2**31):
        doc = export_doc()
        doc["deployment"]["revision"] = revision
        response = client.post("/api/deployments/import", json=doc)
        assert response.status_code == 422, response.json
        assert response.json["field"] == "deployment.revision"
    doc = export_doc()
    response = client.post(
        "/api/deployments/import",
        **_body(json.dumps(doc).replace('"revision": 1', '"revision": HUGE')),
    )
    assert response.status_code == 422 and response.json["field"] == "deployment.revision"


@pytest.mark.parametrize("version", [True, 1.0, "1"])
def test_format_version_must_be_the_integer_1(client, version):
    doc = export_doc()
    doc["format_version"] = version
    response = client.post("/api/deployments/import", json=doc)
    assert response.status_code == 422, response.json
    assert response.json["field"] == "format_version"


def test_transmit_power_has_a_stated_maximum(client, demo_input):
    spec = {k: v for k, v in demo_input.items() if k != "name"}
    for power in (1e9, MAX_POWER_W * 1.001):
        response = client.post(
            "/api/plan", json={**spec, "radio": {"power_w": power, "mode": "ssb"}}
        )
        assert response.status_code == 422, response.json
        assert response.json["field"] == "radio.power_w"
        assert "47 CFR §97.313" in response.json["detail"]  # the reason, beside the number


@pytest.mark.parametrize("path", ["/%09/evil.example", "/%09%09/evil.example", "/%5C/evil.example"])
def test_the_key_redirect_never_leaves_the_laptop(lan_app, path):
    client = lan_app.test_client()
    key = keyring(lan_app).key
    response = client.get(f"{path}?key={key}")
    assert response.status_code == 303
    location = response.headers["Location"]
    # A browser drops tabs and newlines from a URL; what remains must still be this host.
    cleaned = location.replace("\t", "").replace("\n", "").replace("\r", "")
    assert urljoin("http://10.0.0.1:8765/", cleaned).startswith("http://10.0.0.1:8765/")
    assert not cleaned.startswith(("//", "/\\"))


def test_a_newline_in_the_path_is_no_500_and_no_forged_log_line(lan_app, caplog):
    client = lan_app.test_client()
    key = keyring(lan_app).key
    with caplog.at_level(logging.INFO):
        response = client.get(f"/%0a?key={key}")
        forged = client.get("/%0aINFO%20fake%20entry", headers={KEY_HEADER: key})
    assert response.status_code == 303
    assert "\n" not in response.headers["Location"]
    assert forged.status_code == 404
    assert not any("\n" in record.getMessage() for record in caplog.records)


def test_a_long_static_name_is_404_without_the_key(lan_app):
    response = lan_app.test_client().get("/" + "a" * 300)
    assert response.status_code == 404
    assert response.json["error"] and response.json["detail"]


PHONE = {"REMOTE_ADDR": "192.0.2.10"}  # RFC 5737 documentation address: an in-process "phone"


def test_a_phone_with_the_key_cannot_rotate_it(lan_app):
    client = lan_app.test_client()
    key = keyring(lan_app).key
    response = client.post("/api/lan/key", json={}, headers={KEY_HEADER: key}, environ_base=PHONE)
    assert response.status_code == 403
    assert response.json["error"] == "forbidden" and response.json["field"] == "key"
    assert "only on the laptop" in response.json["detail"]
    assert keyring(lan_app).key == key  # nobody was locked out
    lan = client.get("/api/lan", headers={KEY_HEADER: key}, environ_base=PHONE).json
    assert lan["can_rotate_key"] is False


def test_the_laptop_rotates_the_key_and_is_shown_the_new_address(lan_app):
    shown = []
    lan_app.config["ON_KEY_ROTATED"] = shown.append
    client = lan_app.test_client()
    old = keyring(lan_app).key
    response = client.post("/api/lan/key", json={}, headers={KEY_HEADER: old})  # from 127.0.0.1
    assert response.status_code == 200
    new = keyring(lan_app).key
    assert new != old and response.json["url"].endswith(f"?key={new}")
    assert response.json["qr_svg"].startswith("<svg")
    assert shown == [response.json["url"]]


@pytest.mark.parametrize("host", ["evil.example", "evil.example:8765", "192.0.2.99:8765"])
def test_lan_mode_refuses_a_host_that_is_not_the_laptop(lan_app, host):
    key = keyring(lan_app).key
    environ = {**PHONE, "fieldkit.local_address": "192.0.2.1"}
    response = lan_app.test_client().get(
        "/api/kit", headers={KEY_HEADER: key, "Host": host}, environ_base=environ
    )
    assert response.status_code == 400 and response.json["field"] == "Host"


@pytest.mark.parametrize("host", ["192.0.2.1:8765", "192.0.2.1", "127.0.0.1:8765", "localhost"])
def test_lan_mode_answers_the_laptops_own_addresses(lan_app, host):
    key = keyring(lan_app).key
    environ = {**PHONE, "fieldkit.local_address": "192.0.2.1"}
    response = lan_app.test_client().get(
        "/api/kit", headers={KEY_HEADER: key, "Host": host}, environ_base=environ
    )
    assert response.status_code == 200, response.json


def test_lan_mode_answers_the_published_address(lan_app):
    lan_app.config["PUBLIC_URL"] = "http://192.0.2.7:8765/"
    key = keyring(lan_app).key
    response = lan_app.test_client().get(
        "/api/kit", headers={KEY_HEADER: key, "Host": "192.0.2.7:8765"}, environ_base=PHONE
    )
    assert response.status_code == 200


@pytest.mark.parametrize(
    "origin", ["http://evil.example", "null", "http://192.0.2.1:9999", "https://192.0.2.1:8765"]
)
def test_lan_writes_from_another_origin_are_refused(lan_app, origin):
    key = keyring(lan_app).key
    environ = {**PHONE, "fieldkit.local_address": "192.0.2.1"}
    headers = {KEY_HEADER: key, "Host": "192.0.2.1:8765", "Origin": origin}
    client = lan_app.test_client()
    response = client.put("/api/kit", json={}, headers=headers, environ_base=environ)
    assert response.status_code == 403 and response.json["field"] == "Origin"
    assert (
        client.delete("/api/deployments/x", headers=headers, environ_base=environ).status_code
        == 403
    )
    same = {**headers, "Origin": "http://192.0.2.1:8765"}
    assert client.put("/api/kit", json={}, headers=same, environ_base=environ).status_code == 200


def test_loopback_writes_from_another_origin_are_refused_too(client):
    response = client.put("/api/kit", json={}, headers={"Origin": "http://evil.example"})
    assert response.status_code == 403
    ok = client.put("/api/kit", json={}, headers={"Origin": "http://localhost"})
    assert ok.status_code == 200


def test_a_write_that_cannot_get_the_database_is_503_not_500(app, client, planned, monkeypatch):
    """Twenty phones ticking at once on a loaded laptop: a writer that waits past the busy timeout
    is told to send again (503, Retry-After), the phone keeps the tick queued; nothing is written."""
    import threading

    from fieldkit import store
    from fieldkit.store import sqlite as store_sqlite

    from .service_fixtures import ack

    monkeypatch.setattr(store_sqlite, "BUSY_TIMEOUT_MS", 300)
    holding, release = threading.Event(), threading.Event()

    def hold_the_write_lock() -> None:
        conn = store.connect(app.config["DATABASE"])
        try:
            with store.transaction(conn):
                holding.set()
                release.wait(10)
        finally:
            conn.close()

    holder = threading.Thread(target=hold_the_write_lock)
    holder.start()
    try:
        assert holding.wait(10)
        response = client.put(f"/api/deployments/{planned}/checks/pre-weather", json=ack())
    finally:
        release.set()
        holder.join(10)
    assert response.status_code == 503, response.json
    assert response.json["error"] == "busy" and int(response.headers["Retry-After"]) >= 1
    history = client.get(f"/api/deployments/{planned}/checks/pre-weather").json["history"]
    assert history == []
