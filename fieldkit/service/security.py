"""Security headers on every response, the LAN access key, and the Host and Origin checks.

In LAN mode every ``/api/`` route except health needs the key: the ``X-Fieldkit-Key`` header or the
``fieldkit_key`` cookie (HttpOnly, SameSite=Strict) that a first visit with ``?key=KEY`` sets. The key
is never written to a log. Writes accept ``application/json`` only: a cross-site HTML form cannot send
that content type, and the SameSite=Strict cookie is not sent on cross-site requests, which together
close cross-site request forgery. Defence in depth beside the key: the Host header must name this
laptop (loopback, or in LAN mode the address the connection arrived on, the address phones were
given, or the laptop's own name), so a page that rebinds its domain name to the laptop reaches
nothing; and a write that carries an ``Origin`` must come from the service's own origin.
"""

from __future__ import annotations

import hmac
import ipaddress
import secrets
import socket
import threading
from typing import Any
from urllib.parse import quote, urlencode, urlsplit

from flask import Flask, Response, current_app, redirect, request
from werkzeug.datastructures import MultiDict

from fieldkit.errors import InputError
from fieldkit.service.http import WRITE_METHODS, UnsupportedMedia, error_response

KEY_HEADER = "X-Fieldkit-Key"
KEY_COOKIE = "fieldkit_key"
KEY_QUERY = "key"
KEY_BYTES = 24  # secrets.token_urlsafe(24): 192 bits, 32 characters
# The app needs nothing else: no inline script, no external origin, no framing.
CONTENT_SECURITY_POLICY = (
    "default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' data:; "
    "connect-src 'self'; frame-ancestors 'none'; base-uri 'none'; form-action 'self'"
)
SECURITY_HEADERS = {
    "Content-Security-Policy": CONTENT_SECURITY_POLICY,
    "X-Content-Type-Options": "nosniff",
    "Referrer-Policy": "no-referrer",
    "X-Frame-Options": "DENY",
    "Cross-Origin-Opener-Policy": "same-origin",
    "Cross-Origin-Resource-Policy": "same-origin",
    "Permissions-Policy": "camera=(), microphone=(), payment=(), usb=()",
}
OPEN_API_PATHS = frozenset({"/api/health"})
# The WSGI environ key under which fieldkit's waitress channel puts the address a connection arrived
# on (fieldkit.service.connections); absent under the Flask test client.
LOCAL_ADDRESS_KEY = "fieldkit.local_address"
CHANGING_METHODS = WRITE_METHODS | {"DELETE"}


class Forbidden(InputError):
    """The request is understood and refused for who or where it comes from (HTTP 403)."""

    def __init__(self, field: str, detail: str) -> None:
        super().__init__(field, detail, status=403)

    def to_json(self) -> dict[str, Any]:
        return {"error": "forbidden", "field": self.field, "detail": self.detail}


def new_key() -> str:
    return secrets.token_urlsafe(KEY_BYTES)


class KeyRing:
    """The current access key; :meth:`rotate` replaces it and the old one stops working at once."""

    def __init__(self, key: str | None) -> None:
        self._key = key
        self._lock = threading.Lock()

    @property
    def key(self) -> str | None:
        with self._lock:
            return self._key

    def rotate(self) -> str:
        with self._lock:
            self._key = new_key()
            return self._key

    def matches(self, candidate: str | None) -> bool:
        current = self.key
        if not current or not candidate:
            return False
        return hmac.compare_digest(candidate.encode(), current.encode())


def keyring(app: Flask | None = None) -> KeyRing:
    return (app or current_app).extensions["fieldkit_keyring"]


def set_key_cookie(response: Response, key: str) -> None:
    response.set_cookie(KEY_COOKIE, key, httponly=True, samesite="Strict", path="/")


def _unauthorized(detail: str) -> Response:
    response = error_response(401, "unauthorized", detail, "key")
    response.headers["WWW-Authenticate"] = f'{KEY_HEADER} realm="fieldkit"'
    return response


def host_name(host: str) -> str:
    """The name or address of a Host header, without its port (``[::1]:8765`` -> ``::1``)."""
    if host.startswith("["):  # [::1]:8765
        return host[1:].split("]", 1)[0]
    if host.count(":") == 1:  # name:port
        return host.split(":", 1)[0]
    return host  # a bare name or a bare IPv6 address


def is_loopback_host(host: str) -> bool:
    """Whether a Host header (name, optional port) names this computer's loopback interface."""
    name = host_name(host)
    if name == "localhost":
        return True
    try:
        return ipaddress.ip_address(name).is_loopback
    except ValueError:
        return False


def is_loopback_peer() -> bool:
    """Whether the request comes from this computer (the desktop window, a browser on the laptop)."""
    try:
        return ipaddress.ip_address(request.remote_addr or "").is_loopback
    except ValueError:
        return False


def laptop_names() -> set[str]:
    """Names a LAN-mode Host header may carry: where this connection arrived, the address phones were
    given (``PUBLIC_URL``), and this computer's own host name (also as ``.local`` for mDNS)."""
    names = {socket.gethostname().lower()}
    names.add(next(iter(names)) + ".local")
    arrived = request.environ.get(LOCAL_ADDRESS_KEY)
    if arrived:
        names.add(str(arrived).lower())
    public = current_app.config.get("PUBLIC_URL")
    if public:
        names.add((urlsplit(public).hostname or "").lower())
    return names - {""}


def _host_ok() -> bool:
    if is_loopback_host(request.host):
        return True
    return current_app.config["LAN"] and host_name(request.host).lower() in laptop_names()


def _origin_ok() -> bool:
    """A write from a browser names its page's origin: it must be this service's own (the Host)."""
    origin = request.headers.get("Origin")
    if origin is None:  # scripts and command-line clients send none; the key still applies
        return True
    return origin.lower() == f"{request.scheme}://{request.host}".lower()


def same_site_path(path: str) -> str:
    """``path`` as a Location that stays on this service.

    Percent-encoded (a tab or newline cannot reach the header: browsers drop tabs and newlines from
    URLs, so ``/\t/evil.example`` would become the protocol-relative ``//evil.example``), and with
    one leading slash (``//host`` would leave the laptop).
    """
    if path.startswith("//"):
        return "/"
    return "/" + quote(path, safe="/").lstrip("/")


def _guard() -> Response | None:
    """Before every request: the LAN key for the API, the cookie from ``?key=``, JSON-only writes.

    Without LAN mode the service answers only requests addressed to a loopback name: a web page that
    rebinds its own domain name to 127.0.0.1 (DNS rebinding) cannot read or change anything.
    """
    path = request.path
    is_api = path == "/api" or path.startswith("/api/")
    if not _host_ok():
        where = (
            "this laptop's address"
            if current_app.config["LAN"]
            else "http://127.0.0.1 or localhost"
        )
        return error_response(
            400, "misdirected request", f"this fieldkit answers only {where}", "Host"
        )
    if request.method in CHANGING_METHODS and not _origin_ok():
        return error_response(
            403,
            "forbidden",
            "a change may come only from this fieldkit's own pages, not from another site",
            "Origin",
        )
    if current_app.config["LAN"]:
        ring = keyring()
        if is_api and path not in OPEN_API_PATHS:
            sent = request.headers.get(KEY_HEADER) or request.cookies.get(KEY_COOKIE)
            if not ring.matches(sent):
                return _unauthorized(
                    "this fieldkit is on the local network: open the address with ?key=… shown on "
                    f"the laptop, or send the {KEY_HEADER} header"
                )
        elif not is_api and KEY_QUERY in request.args:
            if not ring.matches(request.args.get(KEY_QUERY)):
                return _unauthorized("wrong or old access key: scan the code on the laptop again")
            # Move the key from the address into the cookie, so it does not stay in the history.
            rest = MultiDict(request.args)
            rest.pop(KEY_QUERY)
            target = same_site_path(path)
            if rest:
                target += "?" + urlencode(list(rest.items(multi=True)))
            response = redirect(target, code=303)
            set_key_cookie(response, ring.key or "")
            return response
    routed = request.routing_exception is None  # unknown routes answer 404/405, not 415
    if (
        is_api
        and routed
        and request.method in WRITE_METHODS
        and request.mimetype != "application/json"
    ):
        raise UnsupportedMedia()
    return None


def _headers(response: Response) -> Response:
    for name, value in SECURITY_HEADERS.items():
        response.headers.setdefault(name, value)
    if request.path.startswith("/api/"):
        response.headers.setdefault("Cache-Control", "no-store")
    return response


def install(app: Flask) -> None:
    app.extensions["fieldkit_keyring"] = KeyRing(app.config.get("KEY"))
    app.before_request(_guard)
    app.after_request(_headers)
