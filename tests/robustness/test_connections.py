"""Connections at a real waitress socket on loopback: shares per address, deadlines, JSON answers.

"Another phone" is another loopback address (127.0.0.2 binds as a source address on Linux); no
traffic leaves the machine. Issue 15, items 2 and 6: one peer made the service unreachable with 101
slow connections; the server's own 400/413/431 answers were plain text without the security headers;
a 10 MB body ended in a connection reset.
"""

from __future__ import annotations

import contextlib
import http.client
import json
import socket
import threading
import time

import pytest

from fieldkit.service import create_app
from fieldkit.service.connections import CONNECTION_LIMIT, PER_ADDRESS_LIMIT
from fieldkit.service.security import SECURITY_HEADERS
from fieldkit.service.server import start_in_thread
from tests.robustness.helpers import stop_server

ATTACKER = "127.0.0.2"
DEADLINE_S = 2.0  # a short header deadline for these tests (the service's own is 10 s)


@pytest.fixture
def server(tmp_path):
    app = create_app({"DATA_DIR": tmp_path / "data", "DEMO": False})
    running = start_in_thread(app, header_deadline_s=DEADLINE_S, request_deadline_s=2 * DEADLINE_S)
    yield running
    stop_server(running)


def _connect(port: int, source: str = "127.0.0.1") -> socket.socket:
    return socket.create_connection(("127.0.0.1", port), timeout=10, source_address=(source, 0))


def _read_all(sock: socket.socket) -> bytes:
    data = b""
    try:
        while chunk := sock.recv(65536):
            data += chunk
    except (ConnectionResetError, TimeoutError):
        pass
    return data


def _get(port: int, path: str) -> tuple[int, dict]:
    conn = http.client.HTTPConnection("127.0.0.1", port, timeout=10)
    try:
        conn.request("GET", path)
        response = conn.getresponse()
        return response.status, json.loads(response.read())
    finally:
        conn.close()


def test_150_slow_connections_from_one_address_leave_the_service_to_the_others(server):
    slow: list[socket.socket] = []
    refused = 0
    for _ in range(150):
        sock = _connect(server.port, ATTACKER)
        sock.sendall(b"GET /api/health HTTP/1.1\r\nHost: 127.0.0.1\r\n")  # and never the end
        slow.append(sock)
    stop = threading.Event()

    def trickle() -> None:  # one header line now and then, the way the probe kept them open
        while not stop.wait(0.3):
            for sock in slow:
                with contextlib.suppress(OSError):  # closed by the server already
                    sock.sendall(b"X-Slow: 1\r\n")

    feeder = threading.Thread(target=trickle, daemon=True)
    feeder.start()
    try:
        time.sleep(0.5)
        answers = [_get(server.port, "/api/health") for _ in range(20)]
        answers += [_get(server.port, "/api/deployments") for _ in range(10)]
        assert all(status == 200 for status, _ in answers), answers[:3]
        # beyond its share the attacker was answered 503 at once and closed
        for sock in slow[PER_ADDRESS_LIMIT:]:
            sock.settimeout(5)
            data = _read_all(sock)
            if data.startswith(b"HTTP/1.1 503"):
                refused += 1
                assert b"Retry-After: " in data and b'"too many connections"' in data
        assert refused == 150 - PER_ADDRESS_LIMIT
        # the rest is closed by the header deadline, trickle or not
        time.sleep(DEADLINE_S + 2.5)
        for sock in slow[:PER_ADDRESS_LIMIT]:
            sock.settimeout(5)
            assert _read_all(sock) == b""  # closed, nothing answered
        assert _get(server.port, "/api/health")[0] == 200
    finally:
        stop.set()
        feeder.join(5)
        for sock in slow:
            sock.close()


def test_a_share_is_a_quarter_of_the_limit():
    assert PER_ADDRESS_LIMIT * 4 == CONNECTION_LIMIT


def test_a_connection_that_sends_nothing_is_closed_at_the_deadline(server):
    with _connect(server.port, ATTACKER) as sock:
        started = time.monotonic()
        assert _read_all(sock) == b""
        assert DEADLINE_S - 0.5 < time.monotonic() - started < DEADLINE_S + 5


def test_a_body_sent_a_byte_at_a_time_is_cut_off(server):
    with _connect(server.port, ATTACKER) as sock:
        sock.sendall(
            b"PUT /api/kit HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Type: application/json\r\n"
            b"Content-Length: 1000\r\n\r\n"
        )
        started = time.monotonic()
        closed = False
        while time.monotonic() - started < 4 * DEADLINE_S + 5:
            try:
                sock.sendall(b" ")
            except OSError:
                closed = True
                break
            sock.settimeout(0.4)
            try:
                if sock.recv(100) == b"":
                    closed = True
                    break
            except TimeoutError:
                pass
        assert closed


def _headers(raw: bytes) -> dict[str, str]:
    head = raw.split(b"\r\n\r\n", 1)[0].decode("latin-1").split("\r\n")[1:]
    return {k.lower(): v.strip() for k, v in (line.split(":", 1) for line in head)}


@pytest.mark.parametrize(
    ("raw", "status"),
    [
        (b"\x16\x03\x01garbage\r\n\r\n", 400),
        (
            b"GET /api/health HTTP/1.1\r\nHost: 127.0.0.1\r\nX-Big: "
            + b"a" * 300_000
            + b"\r\n\r\n",
            431,
        ),
        (
            b"PUT /api/kit HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Type: application/json\r\n"
            b"Content-Length: 10485760\r\n\r\n{",
            413,
        ),
    ],
    ids=["bad request line", "headers too large", "body over the limit"],
)
def test_the_servers_own_answers_are_error_json_with_the_security_headers(server, raw, status):
    with _connect(server.port) as sock:
        sock.sendall(raw)
        data = _read_all(sock)
    assert data[:5] == b"HTTP/" and data[9:13] == f"{status} ".encode(), data[:200]
    headers = _headers(data)
    for name, value in SECURITY_HEADERS.items():
        assert headers[name.lower()] == value, name
    assert headers["content-type"] == "application/json"
    body = json.loads(data.split(b"\r\n\r\n", 1)[1])
    assert set(body) == {"error", "field", "detail"} and body["detail"]


def test_a_10_mb_body_gets_the_413_json_not_a_reset(server):
    conn = http.client.HTTPConnection("127.0.0.1", server.port, timeout=30)
    try:
        body = b'{"note": "' + b"x" * (10 * 1024 * 1024) + b'"}'
        conn.request("PUT", "/api/kit", body=body, headers={"Content-Type": "application/json"})
        response = conn.getresponse()
        answer = json.loads(response.read())
    finally:
        conn.close()
    assert response.status == 413
    assert answer["error"] and answer["field"] == "(body)"
    assert response.getheader("X-Content-Type-Options") == "nosniff"
    assert _get(server.port, "/api/health")[0] == 200
