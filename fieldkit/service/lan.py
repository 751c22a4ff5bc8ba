"""Phones on the local network: the address with the key, as text and as a QR code; key rotation."""

from __future__ import annotations

import io
import socket

import segno
from flask import Blueprint, current_app, jsonify, request

from fieldkit.service.security import KEY_QUERY, keyring, set_key_cookie
from fieldkit.store.errors import Conflict

bp = Blueprint("lan", __name__, url_prefix="/api")

QR_SCALE = 4  # pixels per module in the SVG; the app scales it with CSS


def lan_address() -> str:
    """This machine's address on the local network (no packet is sent); 127.0.0.1 if there is none."""
    probe = socket.socket(socket.AF_INET, socket.SOCK_DGRAM)
    try:
        probe.connect(
            ("10.255.255.255", 1)
        )  # any non-local address: selects the outgoing interface
        address = probe.getsockname()[0]
    except OSError:
        address = ""
    finally:
        probe.close()
    if address and not address.startswith("127."):
        return address
    try:
        for info in socket.getaddrinfo(socket.gethostname(), None, socket.AF_INET):
            candidate = info[4][0]
            if not candidate.startswith("127."):
                return candidate
    except OSError:
        pass
    return "127.0.0.1"


def access_url(base: str, key: str | None) -> str:
    """``http://ADDRESS:PORT/?key=KEY`` (without the key outside LAN mode)."""
    base = base if base.endswith("/") else base + "/"
    return f"{base}?{KEY_QUERY}={key}" if key else base


def qr_svg(url: str) -> str:
    buffer = io.BytesIO()
    segno.make(url, error="m").save(buffer, kind="svg", xmldecl=False, scale=QR_SCALE, svgns=True)
    return buffer.getvalue().decode()


def qr_terminal(url: str) -> str:
    buffer = io.StringIO()
    segno.make(url, error="m").terminal(out=buffer, compact=True)
    return buffer.getvalue()


def _current() -> dict:
    lan = current_app.config["LAN"]
    base = current_app.config.get("PUBLIC_URL") or request.host_url
    url = access_url(base, keyring().key if lan else None)
    return {"lan": lan, "url": url, "qr_svg": qr_svg(url)}


@bp.get("/lan")
def read_lan():
    return jsonify(_current())


@bp.post("/lan/key")
def rotate_key():
    if not current_app.config["LAN"]:
        raise Conflict("lan", "the service is not on the local network; there is no key to rotate")
    key = keyring().rotate()
    response = jsonify({**_current(), "rotated": True})
    set_key_cookie(response, key)
    return response
