"""Malformed HTTP at a real waitress socket: the service answers 4xx (or closes) and stays up.

Cases follow the message syntax of RFC 9112 (request line, Content-Length, chunked transfer coding)
and the usual smuggling and resource-exhaustion probes; after each the server must still answer
``GET /api/health`` with 200.
"""

from __future__ import annotations

import json
import socket

import pytest

from fieldkit.service import create_app
from fieldkit.service.server import start_in_thread
from tests.robustness.helpers import ack, checklist_export, request_json, stop_server, store_export

BODY = json.dumps({"done": True, "by": "AB", "at": "2026-12-01T14:05:00Z"})


def _exchange(port: int, raw: bytes, timeout: float = 10.0) -> bytes:
    with socket.create_connection(("127.0.0.1", port), timeout=timeout) as sock:
        sock.sendall(raw)
        sock.shutdown(socket.SHUT_WR)
        data = b""
        try:
            while chunk := sock.recv(65536):
                data += chunk
        except (ConnectionResetError, TimeoutError):
            pass
    return data


@pytest.fixture
def server(tmp_path):
    app = create_app({"DATA_DIR": tmp_path / "data", "DEMO": False})
    store_export(app.config["DATABASE"], checklist_export("raw-dep"))
    running = start_in_thread(app)
    yield running
    stop_server(running)


def _statuses(data: bytes) -> list[int]:
    out = []
    for part in data.split(b"HTTP/1.")[1:]:
        fields = part.split(b" ", 2)
        if len(fields) > 1 and fields[1][:3].isdigit():
            out.append(int(fields[1][:3]))
    return out


CASES = {
    "content-length larger than the body": (
        b"PUT /api/kit HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Type: application/json\r\n"
        b"Content-Length: 1000\r\n\r\n{}"
    ),
    "negative content-length": (
        b"PUT /api/kit HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Type: application/json\r\n"
        b"Content-Length: -5\r\n\r\n{}"
    ),
    "two content-lengths": (
        b"PUT /api/kit HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Type: application/json\r\n"
        b"Content-Length: 2\r\nContent-Length: 3\r\n\r\n{}x"
    ),
    "chunked and content-length": (
        b"PUT /api/kit HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Type: application/json\r\n"
        b"Content-Length: 4\r\nTransfer-Encoding: chunked\r\n\r\n2\r\n{}\r\n0\r\n\r\n"
    ),
    "bad chunk size": (
        b"PUT /api/kit HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Type: application/json\r\n"
        b"Transfer-Encoding: chunked\r\n\r\nzz\r\n{}\r\n0\r\n\r\n"
    ),
    "huge header": b"GET /api/health HTTP/1.1\r\nHost: 127.0.0.1\r\nX-Big: "
    + b"a" * 300_000
    + b"\r\n\r\n",
    "no host, HTTP/1.0": b"GET /api/deployments HTTP/1.0\r\n\r\n",
    "garbage request line": b"\x16\x03\x01\x02\x00\x01\x00\x01\xfc\x03\x03" + b"\x00" * 64,
    "unknown method": b"BREW /api/kit HTTP/1.1\r\nHost: 127.0.0.1\r\n\r\n",
    "pipelined smuggle attempt": (
        b"PUT /api/kit HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Type: application/json\r\n"
        b"Content-Length: 2\r\n\r\n{}GET /api/deployments HTTP/1.1\r\nHost: 127.0.0.1\r\n\r\n"
    ),
    "nul in path": b"GET /api/deployments/\x00 HTTP/1.1\r\nHost: 127.0.0.1\r\n\r\n",
    "very long path": b"GET /api/deployments/"
    + b"a" * 100_000
    + b" HTTP/1.1\r\nHost: 127.0.0.1\r\n\r\n",
}


@pytest.mark.parametrize("name", list(CASES))
def test_malformed_http_is_refused_and_the_server_stays_up(server, name):
    data = _exchange(server.port, CASES[name])
    assert all(status < 500 for status in _statuses(data)), (name, data[:300])
    assert b"Traceback" not in data
    status, health = request_json(f"{server.url}api/health")
    assert status == 200 and health["ok"] is True


def test_chunked_json_body_is_read_as_json(server):
    payload = json.dumps(ack()).encode()
    raw = (
        b"PUT /api/deployments/raw-dep/checks/pre-item-0 HTTP/1.1\r\nHost: 127.0.0.1\r\n"
        b"Content-Type: application/json\r\nTransfer-Encoding: chunked\r\nConnection: close\r\n\r\n"
        + f"{len(payload):x}\r\n".encode()
        + payload
        + b"\r\n0\r\n\r\n"
    )
    assert _statuses(_exchange(server.port, raw)) == [200]


def test_a_half_sent_body_then_hang_up_writes_nothing(server):
    """A phone that loses the hotspot mid-request: no partial acknowledgement is stored."""
    raw = (
        b"PUT /api/deployments/raw-dep/checks/pre-item-1 HTTP/1.1\r\nHost: 127.0.0.1\r\n"
        b"Content-Type: application/json\r\nContent-Length: 400\r\n\r\n" + BODY.encode()[:20]
    )
    _exchange(server.port, raw, timeout=3)
    status, detail = request_json(f"{server.url}api/deployments/raw-dep/checks/pre-item-1")
    assert status == 200 and detail["history"] == []


@pytest.mark.parametrize("host", ["evil.example", "evil.example:80", "127.0.0.1.evil.example", ""])
def test_a_foreign_host_header_reaches_no_data(server, host):
    """DNS rebinding: a page on another name that resolves to the laptop must not read the API."""
    raw = f"GET /api/deployments HTTP/1.1\r\nHost: {host}\r\nConnection: close\r\n\r\n".encode()
    data = _exchange(server.port, raw)
    statuses = _statuses(data)
    assert statuses and all(400 <= s < 500 for s in statuses), (host, data[:300])
    assert b"raw-dep" not in data
