"""Phones on the local network: the address with the key, as text and as a QR code; key rotation."""

from __future__ import annotations

import io
import socket

import segno
from flask import Blueprint, current_app, jsonify, request

from fieldkit.errors import InputError, check_keys
from fieldkit.service.http import json_body
from fieldkit.service.security import (
    KEY_QUERY,
    Forbidden,
    is_loopback_peer,
    keyring,
    set_key_cookie,
)
from fieldkit.store.store_errors import Conflict

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


def _share():
    """The running LAN share of a desktop app (its RunningServer and app), or None."""
    return current_app.extensions.get("fieldkit_lan_share")


def _current() -> dict:
    lan = current_app.config["LAN"]
    share = _share()
    if share is not None:
        running, share_app = share
        url = access_url(share_app.config["PUBLIC_URL"], keyring(share_app).key)
    else:
        base = current_app.config.get("PUBLIC_URL") or request.host_url
        url = access_url(base, keyring().key if lan else None)
    return {
        "lan": lan,
        "sharing": share is not None,
        "switch": bool(current_app.config["LAN_SWITCH"]),
        "url": url,
        "qr_svg": qr_svg(url),
        "can_rotate_key": bool(lan or share is not None) and is_loopback_peer(),
    }


@bp.get("/lan")
def read_lan():
    return jsonify(_current())


@bp.post("/lan")
def switch_lan():
    """The desktop window's switch: share this fieldkit with phones on the local network, or stop."""
    body = json_body()
    check_keys(body, "", ("enabled",))
    enabled = body.get("enabled")
    if not isinstance(enabled, bool):
        raise InputError("enabled", f"expected true or false, got {enabled!r}"[:200])
    if not current_app.config["LAN_SWITCH"] or not is_loopback_peer():
        raise Conflict(
            "enabled",
            "only the desktop window can switch sharing; on a server use `fieldkit serve --lan`",
        )
    if enabled and _share() is None:
        start_share(current_app._get_current_object())
    elif not enabled:
        stop_share(current_app._get_current_object())
    return jsonify(_current())


def start_share(app) -> None:
    """Start a second server on every interface with its own app in LAN mode (the key required).

    The desktop window keeps its loopback server without a key; phones reach only the shared one.
    """
    from fieldkit.service.app import create_app
    from fieldkit.service.server import start_in_thread

    shared = create_app(
        {
            "DATA_DIR": app.config["DATA_DIR"],
            "WEB_DIR": app.config["WEB_DIR"],
            "LAN": True,
            "DEMO": False,
            "PLAN_CACHE": app.extensions["fieldkit_plan_cache"],
            "PLAN_BOARD": app.extensions["fieldkit_plan_board"],  # one pool for both servers
        }
    )
    try:
        running = start_in_thread(shared, host="0.0.0.0", port=app.config["LAN_PORT"])
    except OSError:  # the usual port is taken: any free one will do, the QR code carries it
        running = start_in_thread(shared, host="0.0.0.0", port=0)
    shared.config["PUBLIC_URL"] = f"http://{lan_address()}:{running.port}/"
    app.extensions["fieldkit_lan_share"] = (running, shared)


def stop_share(app) -> None:
    share = app.extensions.pop("fieldkit_lan_share", None)
    if share is not None:
        share[0].stop()


@bp.post("/lan/key")
def rotate_key():
    """A new access key; only from the laptop itself (loopback: the desktop window or its browser).

    A phone holding the key must not be able to lock every other phone out: it gets 403. The new
    address and QR code come back in the answer and, under ``fieldkit serve --lan``, are printed in
    the laptop's terminal (``ON_KEY_ROTATED``).
    """
    if not is_loopback_peer():
        raise Forbidden(
            "key",
            "the access key can be changed only on the laptop (the desktop window, or a browser "
            "there at http://127.0.0.1); a phone cannot change it, so no phone can lock the others out",
        )
    share = _share()
    if share is not None:
        target = share[1]
    elif current_app.config["LAN"]:
        target = current_app._get_current_object()
    else:
        raise Conflict("lan", "the service is not on the local network; there is no key to rotate")
    key = keyring(target).rotate()
    current = _current()
    announce = target.config.get("ON_KEY_ROTATED")
    if announce is not None:
        announce(current["url"])
    response = jsonify({**current, "rotated": True})
    if target is current_app._get_current_object():
        set_key_cookie(response, key)
    return response
