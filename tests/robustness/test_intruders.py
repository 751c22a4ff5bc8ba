"""Intruders on the hotspot: the LAN key on every route and method, keys in the wrong place, old keys,
static path traversal over a real waitress socket, and no key in any log line.

The rules under test are the service contract of ARCHITECTURE.md (LAN mode: every ``/api/`` route
except health needs the ``X-Fieldkit-Key`` header or the cookie; otherwise 401) and issue 7 (no path
outside ``web/`` can be read). Traversal forms follow the usual checklist of encodings: plain
``..``, percent-encoded (RFC 3986 §2.1) once and twice, backslashes, absolute paths, NUL bytes.
"""

from __future__ import annotations

import logging
import re
import socket
import uuid
from pathlib import Path

import pytest

from fieldkit import paths
from fieldkit.service import create_app
from fieldkit.service.security import KEY_COOKIE, KEY_HEADER, keyring
from fieldkit.service.server import start_in_thread
from tests.robustness.helpers import checklist_export, stop_server, store_export

SAMPLE = {"deployment_id": "dep-1", "item_id": "pre-item-0", "job_id": "job-1"}
METHODS = ("GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS")


def api_paths(app) -> list[str]:
    """Every path of the URL map under /api/, with sample values for its parameters."""
    out = set()
    for rule in app.url_map.iter_rules():
        if rule.rule.startswith("/api"):
            out.add(re.sub(r"<(?:[^:>]+:)?([^>]+)>", lambda m: SAMPLE[m.group(1)], rule.rule))
    return sorted(out)


def test_every_route_and_every_method_without_a_valid_key_is_401(lan_app):
    client = lan_app.test_client(use_cookies=False)
    key = keyring(lan_app).key
    # a real deployment behind the sample id, so a leak would show data, not a 404
    store_export(lan_app.config["DATABASE"], checklist_export("dep-1"))
    wrong_places = [
        {},
        {"headers": {KEY_HEADER: "x" * len(key)}},  # wrong key of the right length
        {"headers": {KEY_HEADER: key[:-1]}},  # a prefix of the key
        {"headers": {KEY_HEADER: key + "x"}},
        {"headers": {KEY_HEADER: f" {key} "}},  # padded
        {"headers": {KEY_HEADER: key.upper()}},
        {"headers": {"X-Fieldkit-Token": key}},  # wrong header name
        {"headers": {"Authorization": f"Bearer {key}"}},
        {"headers": {"Cookie": f"fieldkit_key_x={key}"}},  # wrong cookie name
        {"headers": {"Cookie": f"{KEY_COOKIE}={key[:8]}"}},
        {"query_string": {"key": key}},  # key in the query string of an API call
        {"json": {"key": key}},  # key in the body
    ]
    checked = 0
    for path in api_paths(lan_app):
        for method in METHODS:
            for extra in wrong_places:
                kwargs = dict(extra)
                kwargs.setdefault("json", {})
                response = client.open(path, method=method, **kwargs)
                if path == "/api/health":
                    assert response.status_code in (200, 405), (method, path)
                    continue
                assert response.status_code == 401, (method, path, extra, response.status_code)
                if method != "HEAD":
                    body = response.get_json()
                    assert body["field"] == "key" and key not in response.get_data(as_text=True)
                checked += 1
    assert checked >= 12 * len(METHODS) * len(wrong_places)  # 14 API paths today
    # the key opens them: the same walk with the right header never says 401
    for path in api_paths(lan_app):
        if path.endswith("/lan/key"):
            continue  # rotating would change the key under the walk
        for method in METHODS:
            response = client.open(path, method=method, json={}, headers={KEY_HEADER: key})
            assert response.status_code != 401, (method, path)
            assert response.status_code < 500, (method, path, response.get_data()[:200])


def test_lowercase_header_name_is_the_same_header(lan_app):
    # HTTP field names are case-insensitive (RFC 9110 §5.1): this is the right place, not a wrong one
    client = lan_app.test_client(use_cookies=False)
    key = keyring(lan_app).key
    assert client.get("/api/kit", headers={KEY_HEADER.lower(): key}).status_code == 200


def test_old_key_and_old_cookie_stop_working_after_rotation(lan_app):
    client = lan_app.test_client(use_cookies=False)
    old = keyring(lan_app).key
    rotated = client.post("/api/lan/key", json={}, headers={KEY_HEADER: old})
    assert rotated.status_code == 200
    new = keyring(lan_app).key
    assert new != old
    for path in api_paths(lan_app):
        if path == "/api/health":
            continue
        for headers in ({KEY_HEADER: old}, {"Cookie": f"{KEY_COOKIE}={old}"}):
            assert client.get(path, headers=headers).status_code == 401, path
    assert client.get(f"/?key={old}").status_code == 401  # an old QR code on a phone
    assert client.get("/api/kit", headers={KEY_HEADER: new}).status_code == 200
    # a second rotation retires the first new key too
    client.post("/api/lan/key", json={}, headers={KEY_HEADER: new})
    assert client.get("/api/kit", headers={KEY_HEADER: new}).status_code == 401


def test_guessing_does_not_find_the_key(lan_app):
    """200 random wrong keys: every one 401, none sets a cookie."""
    client = lan_app.test_client(use_cookies=False)
    for _ in range(100):
        guess = uuid.uuid4().hex
        assert client.get("/api/deployments", headers={KEY_HEADER: guess}).status_code == 401
        page = client.get(f"/?key={guess}")
        assert page.status_code == 401 and "Set-Cookie" not in page.headers


# -- static path traversal over a real socket --------------------------------------------------
SECRET = "fieldkit-robustness-secret-" + uuid.uuid4().hex


def _raw_get(port: int, target: str) -> tuple[int, bytes]:
    """One GET with the request target sent byte for byte (no client-side normalisation)."""
    with socket.create_connection(("127.0.0.1", port), timeout=10) as sock:
        sock.sendall(
            f"GET {target} HTTP/1.1\r\nHost: 127.0.0.1\r\nConnection: close\r\n\r\n".encode(
                "latin-1"
            )
        )
        data = b""
        while chunk := sock.recv(65536):
            data += chunk
    head, _, body = data.partition(b"\r\n\r\n")
    status = int(head.split(b" ", 2)[1]) if head.startswith(b"HTTP/") else 0
    return status, body


def _traversal_targets(secret_abs: str) -> list[str]:
    names = ["secret.txt", "web-private/secret.txt"]
    targets = []
    for name in names:
        targets += [
            f"/../{name}",
            f"/./../{name}",
            f"/js/../../{name}",
            f"/%2e%2e/{name}",
            f"/%2E%2E/{name}",
            f"/%2e%2e%2f{name}",
            f"/..%2f{name}",
            f"/%252e%252e/{name}",
            f"/%252e%252e%252f{name}",
            f"/..%5c{name}",
            f"/..\\{name}",
            f"/js\\..\\..\\{name}",
            f"/%c0%ae%c0%ae/{name}",  # overlong UTF-8 dots
            f"/.%2e/{name}",
            f"/..;/{name}",
            f"/....//{name}",
        ]
    targets += [
        secret_abs,
        "/" + secret_abs,
        "//" + secret_abs.lstrip("/"),
        "/%2f" + secret_abs.lstrip("/").replace("/", "%2f"),
        "/file:" + secret_abs,
        "/C:" + secret_abs,
        "/index.html%00../secret.txt",
        "/%00",
        "/../../../../../../../../etc/passwd",
        "/%2e%2e/%2e%2e/%2e%2e/%2e%2e/etc/passwd",
        "/etc/passwd",
        "//etc/passwd",
        "/.hidden",
        "/js/.hidden",
        "http://127.0.0.1/../secret.txt",  # absolute-form request target (RFC 9112 §3.2.2)
    ]
    return targets


@pytest.fixture
def traversal_server(tmp_path):
    web = tmp_path / "web"
    (web / "js").mkdir(parents=True)
    (web / "index.html").write_text("<!doctype html><title>t</title>", encoding="utf-8")
    (web / "js" / "app.js").write_text("export {};", encoding="utf-8")
    (web / ".hidden").write_text(SECRET, encoding="utf-8")
    (web / "js" / ".hidden").write_text(SECRET, encoding="utf-8")
    (tmp_path / "secret.txt").write_text(SECRET, encoding="utf-8")
    (tmp_path / "web-private").mkdir()  # a sibling whose name starts like web/
    (tmp_path / "web-private" / "secret.txt").write_text(SECRET, encoding="utf-8")
    app = create_app({"DATA_DIR": tmp_path / "data", "DEMO": False, "WEB_DIR": web})
    server = start_in_thread(app)
    yield server, tmp_path / "secret.txt"
    stop_server(server)


def test_static_route_never_reads_outside_web(traversal_server):
    server, secret_file = traversal_server
    status, body = _raw_get(server.port, "/js/app.js")
    assert status == 200 and body == b"export {};"  # the route works at all
    passwd = Path("/etc/passwd").read_bytes()[:40] if Path("/etc/passwd").exists() else b"root:"
    tried = 0
    for target in _traversal_targets(str(secret_file)):
        status, body = _raw_get(server.port, target)
        assert SECRET.encode() not in body, (target, status)
        assert passwd not in body, (target, status)
        assert status != 200 or body.startswith(b"<!doctype html>"), (target, status, body[:80])
        assert status < 500, (target, status)
        tried += 1
    assert tried >= 40


def test_real_web_dir_keeps_the_source_tree_closed(tmp_path):
    """Against the real web/: nothing from the repository next to it (pyproject, the package)."""
    app = create_app({"DATA_DIR": tmp_path / "data", "DEMO": False})
    server = start_in_thread(app)
    root = paths.project_root()
    markers = {
        "pyproject.toml": b"[build-system]",
        "fieldkit/paths.py": b"FIELDKIT_HOME",
        "fieldkit/service/security.py": b"KEY_BYTES",
    }
    try:
        for name, marker in markers.items():
            assert marker in (root / name).read_bytes()
            for target in (
                f"/../{name}",
                f"/%2e%2e/{name}",
                f"/%252e%252e/{name}",
                f"/..%2f{name}",
                f"/js/..%5c..%5c{name}",
                str(root / name),
                "/" + str(root / name),
            ):
                status, body = _raw_get(server.port, target)
                assert marker not in body, (target, status)
                assert status < 500, (target, status)
    finally:
        stop_server(server)


# -- no secret in any log ------------------------------------------------------------------------
class _Collect(logging.Handler):
    def __init__(self) -> None:
        super().__init__(logging.DEBUG)
        self.lines: list[str] = []

    def emit(self, record: logging.LogRecord) -> None:
        text = record.getMessage()
        if record.exc_info and not record.exc_text:
            text += logging.Formatter().formatException(record.exc_info)
        self.lines.append(f"{record.name}: {text} {record.exc_text or ''}")


def test_no_key_in_any_log_over_waitress(tmp_path):
    """Every logger (waitress, Flask, fieldkit, root) at DEBUG while keys travel every way."""
    app = create_app({"DATA_DIR": tmp_path / "data", "DEMO": False, "LAN": True})
    collect = _Collect()
    root = logging.getLogger()
    old_level = root.level
    root.addHandler(collect)
    root.setLevel(logging.DEBUG)
    for name in ("waitress", "waitress.queue", "fieldkit", "fieldkit.service", app.logger.name):
        logging.getLogger(name).setLevel(logging.DEBUG)
    server = start_in_thread(app)
    keys = [keyring(app).key]
    try:
        port = server.port
        key = keys[0]
        for target in (
            f"/?key={key}",
            f"/?key={key}x",
            f"/api/kit?key={key}",
            f"/api/deployments/{key}",
            f"/{key}",
            f"/%2e%2e/{key}",
        ):
            _raw_get(port, target)
        with socket.create_connection(("127.0.0.1", port), timeout=10) as sock:
            sock.sendall(
                (
                    f"PUT /api/kit HTTP/1.1\r\nHost: 127.0.0.1\r\n{KEY_HEADER}: {key}\r\n"
                    "Content-Type: application/json\r\nContent-Length: 9\r\n"
                    "Connection: close\r\n\r\n{not json"
                ).encode()
            )
            sock.recv(65536)
        with socket.create_connection(("127.0.0.1", port), timeout=10) as sock:
            sock.sendall(f"GARBAGE {key} HTTP/9.9\r\n\r\n".encode())  # a broken request line
            sock.recv(65536)
        with socket.create_connection(("127.0.0.1", port), timeout=10) as sock:
            sock.sendall(
                (
                    f"POST /api/lan/key HTTP/1.1\r\nHost: 127.0.0.1\r\nCookie: {KEY_COOKIE}={key}\r\n"
                    "Content-Type: application/json\r\nContent-Length: 2\r\n"
                    "Connection: close\r\n\r\n{}"
                ).encode()
            )
            sock.recv(65536)
        keys.append(keyring(app).key)
        assert keys[1] != keys[0]
    finally:
        stop_server(server)
        root.removeHandler(collect)
        root.setLevel(old_level)
    text = "\n".join(collect.lines)
    for key in keys:
        assert key not in text
