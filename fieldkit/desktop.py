"""The desktop window: waitress on a free loopback port, a pywebview (Qt) window on it.

``run()`` opens the window and returns when it is closed, after stopping the server and closing the
database. Where there is no display or no usable GUI backend it says why, serves on
http://127.0.0.1:8765/ instead and prints the address to open in a browser.

Closing the window is the clean way out. Ctrl+C or SIGTERM end the window process at once (Qt's event
loop does not return to Python for a handler); every committed write is already on disk (WAL with
``synchronous=FULL``), and the log is replayed at the next start.
"""

from __future__ import annotations

import os
import sys
from collections.abc import Callable
from pathlib import Path
from typing import Any, TextIO

from fieldkit.service.server import LOOPBACK, PortUnavailable, serve, start_in_thread
from fieldkit.store.sqlite import checkpoint_and_close

FALLBACK_PORT = 8765
WINDOW_TITLE = "fieldkit"
WINDOW_SIZE = (1200, 820)
MIN_SIZE = (360, 560)  # a phone-width layout still fits


def prepare_qt_environment() -> None:
    """Environment Qt WebEngine needs here: the PySide6 binding; no Chromium sandbox as root."""
    os.environ.setdefault("QT_API", "pyside6")
    if hasattr(os, "geteuid") and os.geteuid() == 0:
        flags = os.environ.get("QTWEBENGINE_CHROMIUM_FLAGS", "")
        if "--no-sandbox" not in flags.split():
            os.environ["QTWEBENGINE_CHROMIUM_FLAGS"] = (flags + " --no-sandbox").strip()


def gui_unavailable() -> str | None:
    """Why no window can open here, or None when one can."""
    if sys.platform.startswith("linux"):
        offscreen = os.environ.get("QT_QPA_PLATFORM", "").startswith("offscreen")
        if not (os.environ.get("DISPLAY") or os.environ.get("WAYLAND_DISPLAY") or offscreen):
            return "no display (neither DISPLAY nor WAYLAND_DISPLAY is set)"
    prepare_qt_environment()
    try:
        import webview  # noqa: F401
    except ImportError as exc:
        return f"pywebview is not installed ({exc})"
    try:
        from qtpy import QtWebEngineWidgets  # noqa: F401
    except Exception as exc:  # Qt reports missing system libraries as various errors
        return f"the Qt web engine does not load ({type(exc).__name__}: {exc})"
    return None


def open_window(
    app: Any,
    *,
    title: str = WINDOW_TITLE,
    on_loaded: Callable[[Any], None] | None = None,
    out: TextIO | None = None,
) -> int:
    """Serve ``app`` on a free loopback port and show it in a window until the window closes.

    ``on_loaded(window)`` runs after each page load (scripted checks use it with
    ``window.evaluate_js``). Returns 0.
    """
    out = out or sys.stdout
    prepare_qt_environment()
    import webview

    running = start_in_thread(app, host=LOOPBACK, port=0)
    try:
        window = webview.create_window(
            title, running.url, width=WINDOW_SIZE[0], height=WINDOW_SIZE[1], min_size=MIN_SIZE
        )
        if on_loaded is not None:
            window.events.loaded += lambda: on_loaded(window)
        print(f"fieldkit window on {running.url}", file=out, flush=True)
        webview.start(gui="qt")
    finally:
        from fieldkit.service.lan_api import stop_share

        stop_share(app)  # phones lose access when the window closes
        running.stop()
        app.extensions["fieldkit_plan_board"].close()
        checkpoint_and_close(app.config["DATABASE"])
    return 0


def run(
    *,
    data_dir: str | Path | None = None,
    on_loaded: Callable[[Any], None] | None = None,
    out: TextIO | None = None,
) -> int:
    """Open fieldkit in a desktop window; without a display, serve and print the address instead.

    Parameters
    ----------
    data_dir : path, optional
        Where the database lives; default the user data directory (or ``FIELDKIT_HOME``).
    on_loaded : callable, optional
        Called with the window after each page load (for scripted checks).

    Returns
    -------
    int
        Exit status: 0 after the window closed or the fallback server stopped.
    """
    out = out or sys.stdout
    reason = gui_unavailable()
    if reason is None:
        from fieldkit.service import create_app
        from fieldkit.service.calc_api import warm_up

        app = create_app({"DATA_DIR": data_dir, "LAN_SWITCH": True})
        warm_up()
        app.extensions["fieldkit_plan_board"].start()
        return open_window(app, on_loaded=on_loaded, out=out)
    print(f"No desktop window: {reason}.", file=out)
    print("Serving instead; open the address below in a browser on this computer.", file=out)
    try:
        serve(host=LOOPBACK, port=FALLBACK_PORT, data_dir=data_dir, out=out)
    except PortUnavailable:  # the port is taken, e.g. by another fieldkit
        print(f"Port {FALLBACK_PORT} is not free; using a free port.", file=out)
        serve(host=LOOPBACK, port=0, data_dir=data_dir, out=out)
    return 0
