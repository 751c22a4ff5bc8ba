"""One store connection per request, kept on ``flask.g`` and closed at teardown."""

from __future__ import annotations

import sqlite3

from flask import Flask, current_app, g

from fieldkit import store


def get_db() -> sqlite3.Connection:
    if "fieldkit_db" not in g:
        g.fieldkit_db = store.connect(current_app.config["DATABASE"])
    return g.fieldkit_db


def close_db(_exc: BaseException | None = None) -> None:
    conn = g.pop("fieldkit_db", None)
    if conn is not None:
        conn.close()


def install(app: Flask) -> None:
    app.teardown_appcontext(close_db)
