"""The field app's static files from ``web/``; nothing outside that directory can be read.

Caching suits the service worker: ``sw.js`` and the HTML shell are revalidated on every load (an update
reaches phones at once); other files may be reused for a few minutes, then revalidated by ETag.
"""

from __future__ import annotations

import mimetypes
from pathlib import Path

from flask import Blueprint, Flask, current_app, send_from_directory
from werkzeug.exceptions import NotFound
from werkzeug.routing import PathConverter
from werkzeug.security import safe_join

bp = Blueprint("web", __name__)

ASSET_MAX_AGE_S = 300
NO_CACHE_SUFFIXES = (".html", ".webmanifest")
NO_CACHE_NAMES = frozenset({"sw.js"})
mimetypes.add_type("text/javascript", ".js")
mimetypes.add_type("text/javascript", ".mjs")
mimetypes.add_type("application/manifest+json", ".webmanifest")


class WebPath(PathConverter):
    """A path that is not under ``api/``: unknown API routes stay 404, not a static 405."""

    regex = r"(?!api(?:/|$))[^/].*?"


def _send(name: str):
    web_dir = Path(current_app.config["WEB_DIR"])
    parts = name.split("/")
    if any(part.startswith(".") for part in parts) or safe_join(str(web_dir), name) is None:
        raise NotFound(f"no file {name[:80]!r} in the app")
    target = web_dir / name
    try:
        found = target.is_file()
    except OSError:  # a name longer than the file system allows (ENAMETOOLONG), and the like
        found = False
    if not found:
        raise NotFound(f"no file {name[:80]!r} in the app")
    response = send_from_directory(web_dir, name)
    if parts[-1] in NO_CACHE_NAMES or name.endswith(NO_CACHE_SUFFIXES):
        response.headers["Cache-Control"] = "no-cache"
    else:
        response.headers["Cache-Control"] = f"max-age={ASSET_MAX_AGE_S}, must-revalidate"
    return response


@bp.get("/")
def index():
    return _send("index.html")


@bp.get("/<webpath:name>")
def static_file(name: str):
    return _send(name)


def install(app: Flask) -> None:
    app.url_map.converters["webpath"] = WebPath
