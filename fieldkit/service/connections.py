"""waitress, hardened for the hotspot: connection shares, deadlines, and answers of its own in JSON.

The probe of issue 15 made the service unreachable without the key: 101 connections that send one
header line and never finish held waitress's whole connection limit, one line now and then kept them
open. Here, on top of waitress's own limits:

- **A share per address.** One peer address holds at most :data:`PER_ADDRESS_LIMIT` of the
  :data:`CONNECTION_LIMIT` connections (a quarter); a connection beyond its share is answered 503 at
  once and closed. A phone's browser opens about six per host (common practice), the desktop window
  as many.
- **Deadlines.** A connection must deliver a request's line and headers within
  :data:`HEADER_DEADLINE_S` of connecting (later requests on the same connection: of their first
  byte), and the whole request within :data:`REQUEST_DEADLINE_S`; an idle keep-alive connection
  closes after :data:`IDLE_TIMEOUT_S`. Sending a byte now and then no longer keeps a request open.
- **waitress's own answers** (400 bad request line, 413 body over the limit, 431 headers too large,
  503 beyond the share) are the API's error JSON with the security headers. After a 413 or 431 the
  rest of what the client sends is read and dropped for a while (up to :data:`DRAIN_MAX_BYTES`), so
  the client reads the answer instead of a connection reset.
- **A client that hangs up** while its request runs (its side of the connection closed) is noticed:
  ``waitress.client_disconnected`` says so, and a request waiting for a plan gives the plan up
  (:mod:`fieldkit.service.plan_jobs`). The answer is still written, for a client that only closed its
  sending side.
- The address a connection arrived on goes into the WSGI environ (the LAN Host check uses it).

References
----------
RFC 9110 §15.5.14 (413), §15.6.4 (503, Retry-After §10.2.3); RFC 6585 §5 (431); RFC 9112 §9.6
(closing a connection: read on after an error so that the client sees the response).
"""

from __future__ import annotations

import contextlib
import json
import socket
import time
from typing import Any

from waitress.adjustments import Adjustments
from waitress.channel import HTTPChannel
from waitress.server import TcpWSGIServer
from waitress.task import ErrorTask, WSGITask
from waitress.utilities import RequestEntityTooLarge, RequestHeaderFieldsTooLarge

from fieldkit.service.security import LOCAL_ADDRESS_KEY, SECURITY_HEADERS

# Open connections in all [count]; waitress stops accepting beyond it.
CONNECTION_LIMIT = 256
# Connections one peer address may hold [count]: a quarter, so that no address can take the rest.
PER_ADDRESS_LIMIT = CONNECTION_LIMIT // 4
# A request's line and headers must be in within this [s] (a phone on a weak hotspot needs < 1 s).
HEADER_DEADLINE_S = 10.0
# The whole request, body included [s]: 4 MiB at 1 Mbit/s takes about 34 s.
REQUEST_DEADLINE_S = 60.0
# An idle keep-alive connection closes after this [s].
IDLE_TIMEOUT_S = 30
# After a 413 or 431, read and drop at most this much [bytes] for at most DRAIN_S [s] before closing.
DRAIN_MAX_BYTES = 16 * 1024 * 1024
DRAIN_S = 10.0
# How often the deadlines are checked [s] (waitress's cleanup interval).
CHECK_INTERVAL_S = 1
# How soon a client refused for its share may try again [s].
SHARE_RETRY_AFTER_S = 10


def _json_answer(status: str, error: str, detail: str, field: str | None, extra=()) -> bytes:
    body = json.dumps({"error": error, "field": field, "detail": detail}).encode()
    headers = [
        ("Content-Type", "application/json"),
        ("Content-Length", str(len(body))),
        ("Connection", "close"),
        ("Cache-Control", "no-store"),
        *SECURITY_HEADERS.items(),
        *extra,
    ]
    head = f"HTTP/1.1 {status}\r\n" + "".join(f"{k}: {v}\r\n" for k, v in headers) + "\r\n"
    return head.encode("latin-1") + body


class JsonErrorTask(ErrorTask):
    """waitress's error answer, as the API's error JSON with the security headers."""

    def execute(self) -> None:
        error = self.request.error
        self.status = f"{error.code} {error.reason}"
        field = {413: "(body)", 431: "(headers)"}.get(error.code)
        body = json.dumps(
            {"error": error.reason.lower(), "field": field, "detail": str(error.body)[:300]}
        ).encode()
        self.response_headers.extend(
            [("Content-Type", "application/json"), ("Cache-Control", "no-store")]
        )
        self.response_headers.extend(SECURITY_HEADERS.items())
        self.set_close_on_finish()
        self.content_length = len(body)
        if isinstance(error, RequestEntityTooLarge | RequestHeaderFieldsTooLarge):
            self.channel.drain_budget = DRAIN_MAX_BYTES
        self.write(body)


class AddressedTask(WSGITask):
    """A WSGI task whose environ names the local address the connection arrived on."""

    def get_environment(self) -> dict[str, Any]:
        environ = super().get_environment()
        environ[LOCAL_ADDRESS_KEY] = self.channel.local_address
        return environ


class FieldkitChannel(HTTPChannel):
    """One connection: request deadlines, the client's hang-up noticed, a drain after 413/431."""

    task_class = AddressedTask
    error_task_class = JsonErrorTask

    def __init__(self, server, sock, addr, adj, map=None) -> None:
        super().__init__(server, sock, addr, adj, map=map)
        try:
            self.local_address = sock.getsockname()[0]
        except OSError:
            self.local_address = ""
        self.request_started: float | None = self.creation_time  # the first request: from connect
        self.peer_closed = False
        self.drain_budget: int | None = None
        self.drain_until: float | None = None

    def check_client_disconnected(self) -> bool:
        return self.peer_closed or not self.connected

    def readable(self) -> bool:
        if self.drain_until is not None:
            return not self.will_close
        return not self.peer_closed and super().readable()

    def handle_read(self) -> None:
        try:
            data = self.socket.recv(self.adj.recv_bytes)
        except (BlockingIOError, InterruptedError):
            return
        except OSError:
            self._close_now()
            return
        if self.drain_until is not None:  # after a 413/431: read and drop, then close
            self.drain_budget = (self.drain_budget or 0) - len(data)
            if not data or self.drain_budget <= 0:
                self._close_now()
            return
        if data:
            self.last_activity = time.time()
            if self.request is None and not self.requests and self.request_started is None:
                self.request_started = self.last_activity
            self.received(data)
            if self.request is None:
                self.request_started = None
        elif self.requests:
            self.peer_closed = True  # answer what was asked, then close
        else:
            self._close_now()

    def service(self) -> None:
        super().service()
        if self.peer_closed and not self.requests:
            with self.requests_lock:
                self.close_when_flushed = True
            self.server.pull_trigger()

    def handle_close(self) -> None:
        """Close; after a 413/431 first stop sending and drain what the client still sends."""
        if self.drain_budget and self.drain_until is None and not self.peer_closed:
            try:
                self.socket.shutdown(socket.SHUT_WR)
            except OSError:
                self._close_now()
                return
            self.will_close = self.close_when_flushed = False
            self.drain_until = time.time() + DRAIN_S
            return
        self._close_now()

    def _close_now(self) -> None:
        self.drain_budget = None
        super().handle_close()

    def overdue(self, now: float) -> bool:
        """Past a deadline: headers too slow, request too slow, or a drain that ran its time."""
        if self.drain_until is not None:
            return now > self.drain_until
        if self.request_started is None or self.requests:
            return False
        headers_in = self.request is not None and self.request.headers_finished
        allowed = self.server.request_deadline_s if headers_in else self.server.header_deadline_s
        return now - self.request_started > allowed


class FieldkitServer(TcpWSGIServer):
    """waitress's TCP server with per-address shares and the channel deadlines checked every second."""

    channel_class = FieldkitChannel

    def __init__(
        self,
        application,
        *,
        header_deadline_s: float = HEADER_DEADLINE_S,
        request_deadline_s: float = REQUEST_DEADLINE_S,
        **options: Any,
    ) -> None:
        self.header_deadline_s = header_deadline_s
        self.request_deadline_s = request_deadline_s
        options = {
            "connection_limit": CONNECTION_LIMIT,
            "cleanup_interval": CHECK_INTERVAL_S,
            "channel_timeout": IDLE_TIMEOUT_S,
            **options,
        }
        super().__init__(application, adj=Adjustments(**options))

    def handle_accept(self) -> None:
        try:
            accepted = self.accept()
        except OSError:
            return
        if accepted is None:
            return
        conn, addr = accepted
        peer = addr[0] if isinstance(addr, tuple) else addr
        held = sum(1 for ch in self.active_channels.values() if ch.addr and ch.addr[0] == peer)
        if held >= PER_ADDRESS_LIMIT:
            self._refuse(conn, held)
            return
        try:
            self.set_socket_options(conn)
        except OSError:
            conn.close()
            return
        self.channel_class(self, conn, addr, self.adj, map=self._map)

    @staticmethod
    def _refuse(conn: socket.socket, held: int) -> None:
        answer = _json_answer(
            "503 Service Unavailable",
            "too many connections",
            f"this address holds {held} connections already, its share of the service's "
            f"{CONNECTION_LIMIT}; close some and try again",
            None,
            [("Retry-After", str(SHARE_RETRY_AFTER_S))],
        )
        with contextlib.suppress(OSError):
            conn.setblocking(False)
            conn.send(answer)
            conn.shutdown(socket.SHUT_WR)
        conn.close()

    def maintenance(self, now: float) -> None:
        super().maintenance(now)
        for channel in list(self.active_channels.values()):
            if isinstance(channel, FieldkitChannel) and channel.overdue(now):
                channel.drain_budget = None  # no drain: close for good
                channel.will_close = True  # the loop closes it (handle_write)


def create_server(application, *, host: str, port: int, **options: Any) -> FieldkitServer:
    """A :class:`FieldkitServer` listening on ``host:port`` (0: a free port)."""
    return FieldkitServer(application, host=host, port=port, **options)
