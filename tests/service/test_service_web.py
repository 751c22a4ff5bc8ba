"""Static files from web/: cache headers for the service worker, nothing outside web/ readable."""

from __future__ import annotations

import socket

import pytest

from fieldkit.service import create_app
from fieldkit.service.server import start_in_thread

SECRET = "fieldkit-secret-outside-web"


@pytest.fixture
def site(tmp_path):
    """A web dir with the files a service-worker app has, and a secret file beside it."""
    web = tmp_path / "web"
    (web / "js").mkdir(parents=True)
    (web / "index.html").write_text("<!doctype html><title>probe</title>", encoding="utf-8")
    (web / "sw.js").write_text("self.addEventListener('fetch', () => {});", encoding="utf-8")
    (web / "js" / "app.js").write_text("export const x = 1;", encoding="utf-8")
    (web / "app.webmanifest").write_text('{"name": "fieldkit"}', encoding="utf-8")
    (web / ".env").write_text(SECRET, encoding="utf-8")
    (tmp_path / "secret.txt").write_text(SECRET, encoding="utf-8")
    app = create_app({"DATA_DIR": tmp_path / "data", "WEB_DIR": web, "DEMO": False})
    return app, tmp_path


def get(client, path):
    response = client.get(path)
    body = response.get_data(as_text=True)
    response.close()
    return response, body


def test_index_and_files(site):
    client = site[0].test_client()
    response, body = get(client, "/")
    assert response.status_code == 200
    assert "<title>probe</title>" in body
    assert response.mimetype == "text/html"
    response, _ = get(client, "/js/app.js")
    assert response.mimetype == "text/javascript"  # ES modules need a JavaScript type (HTML spec)
    response, _ = get(client, "/app.webmanifest")
    assert response.mimetype == "application/manifest+json"


@pytest.mark.parametrize(
    ("path", "cache"),
    [
        ("/sw.js", "no-cache"),
        ("/", "no-cache"),
        ("/index.html", "no-cache"),
        ("/app.webmanifest", "no-cache"),
        ("/js/app.js", "max-age=300, must-revalidate"),
    ],
)
def test_cache_headers(site, path, cache):
    response, _ = get(site[0].test_client(), path)
    assert response.headers["Cache-Control"] == cache
    assert response.headers["ETag"]


def test_revalidation_answers_304(site):
    client = site[0].test_client()
    first, _ = get(client, "/js/app.js")
    again = client.get("/js/app.js", headers={"If-None-Match": first.headers["ETag"]})
    again.close()
    assert again.status_code == 304


TRAVERSALS = [
    "/../secret.txt",
    "/%2e%2e/secret.txt",
    "/..%2fsecret.txt",
    "/%2e%2e%2fsecret.txt",
    "/js/../../secret.txt",
    "/js/..%2f..%2fsecret.txt",
    "/js%2f..%2f..%2fsecret.txt",
    "/..\\secret.txt",
    "/.env",
    "/js/../.env",
    "//etc/passwd",
    "/%2fetc%2fpasswd",
    "/etc/passwd",
    "/%00index.html",
    "/index.html%00.js",
]


@pytest.mark.parametrize("path", TRAVERSALS)
def test_no_path_outside_web_through_the_test_client(site, path):
    response, body = get(site[0].test_client(), path)
    assert response.status_code in (400, 404), (path, response.status_code)
    assert SECRET not in body
    assert "root:" not in body


def raw_get(port: int, target: str) -> bytes:
    """Send the request line exactly as given: no client-side normalisation of the path."""
    with socket.create_connection(("127.0.0.1", port), timeout=5) as conn:
        conn.sendall(
            f"GET {target} HTTP/1.1\r\nHost: 127.0.0.1\r\nConnection: close\r\n\r\n".encode()
        )
        chunks = []
        while chunk := conn.recv(65536):
            chunks.append(chunk)
    return b"".join(chunks)


def test_no_path_outside_web_through_real_waitress(site, tmp_path):
    app, root = site
    running = start_in_thread(app)
    absolute = str(root / "secret.txt")
    try:
        for target in [*TRAVERSALS, absolute, "/" + absolute, "/%2F" + absolute.lstrip("/")]:
            reply = raw_get(running.port, target)
            status = int(reply.split(b" ", 2)[1])
            assert status in (400, 404), (target, reply[:200])
            assert SECRET.encode() not in reply
            assert b"root:" not in reply
        assert raw_get(running.port, "/sw.js").startswith(b"HTTP/1.1 200")
    finally:
        running.stop()


def send_chunked(port: int, body: bytes) -> bytes:
    """PUT a chunked body; the reply, or b"reset" when the server cut the connection."""
    chunked = f"{len(body):x}\r\n".encode() + body + b"\r\n0\r\n\r\n"
    reply = b""
    try:
        with socket.create_connection(("127.0.0.1", port), timeout=30) as conn:
            conn.sendall(
                b"PUT /api/kit HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Type: application/json\r\n"
                b"Transfer-Encoding: chunked\r\nConnection: close\r\n\r\n" + chunked
            )
            while chunk := conn.recv(65536):
                reply += chunk
    except (ConnectionResetError, BrokenPipeError):
        return reply or b"reset"
    return reply


def test_oversized_bodies_stop_at_the_server(site):
    # Chunked bodies have no Content-Length to refuse early: Flask's limit (1 MiB) answers 413 JSON,
    # and waitress refuses anything past its own bound (4 MiB) before buffering it.
    app, _ = site
    running = start_in_thread(app)
    try:
        reply = send_chunked(running.port, b'{"note": "' + b"x" * (2 * 1024 * 1024) + b'"}')
        assert reply.split(b" ", 2)[1] == b"413", reply[:200]
        assert b'"error":"request too large"' in reply
        reply = send_chunked(running.port, b'{"note": "' + b"x" * (6 * 1024 * 1024) + b'"}')
        assert reply == b"reset" or reply.split(b" ", 2)[1] == b"413", reply[:200]
        # The server is still there for the next request.
        assert raw_get(running.port, "/sw.js").startswith(b"HTTP/1.1 200")
    finally:
        running.stop()
