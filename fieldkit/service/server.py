"""Running the service with waitress: ``serve()`` in the foreground, or a server in a thread.

``serve`` handles SIGINT and SIGTERM: in-flight requests finish (up to waitress's shutdown timeout),
the sockets close and the database's write-ahead log is checkpointed before it returns.
"""

from __future__ import annotations

import ipaddress
import logging
import signal
import socket
import sys
import threading
from dataclasses import dataclass
from pathlib import Path
from typing import TextIO

from flask import Flask
from waitress import wasyncore

from fieldkit.errors import InputError
from fieldkit.service.app import create_app
from fieldkit.service.calc_api import warm_up
from fieldkit.service.connections import create_server
from fieldkit.service.lan_api import access_url, lan_address, qr_terminal
from fieldkit.service.plan_jobs import DEFAULT_MAX_WAITERS
from fieldkit.store.sqlite import checkpoint_and_close

log = logging.getLogger("fieldkit.service")

# Request threads that no plan ever occupies: plans run in worker processes (plan_jobs), and a
# request waiting for one holds one of at most max_waiters threads; these stay free for health,
# ticks, reads and static files. Eight serve 20 phones ticking and reading at once (the mixed load of
# benchmarks/bench_service_load.py) with health p95 well under 100 ms.
FREE_THREADS = 8
THREADS = FREE_THREADS + DEFAULT_MAX_WAITERS
LOOPBACK = "127.0.0.1"
# waitress buffers a request body (to disk past a point) before the app sees it: without a bound a
# stranger on the hotspot could fill the disk before the key check. Above Flask's 1 MiB limit, so
# that the app's own 413 JSON answers ordinary oversized bodies [bytes].
MAX_REQUEST_BODY_BYTES = 4 * 1024 * 1024
WAITRESS_OPTIONS = {
    "threads": THREADS,
    "ident": "fieldkit",
    "max_request_body_size": MAX_REQUEST_BODY_BYTES,
    # read on while a request runs, so that a client hanging up is noticed (a plan waiting for a
    # worker is then given up: waitress.client_disconnected)
    "channel_request_lookahead": 1,
}


def threads_for(app: Flask) -> int:
    """Request threads for ``app``: the free ones plus one per request that may wait for a plan."""
    return FREE_THREADS + app.extensions["fieldkit_plan_board"].max_waiters


@dataclass
class RunningServer:
    """A waitress server running in a daemon thread; :meth:`stop` ends it from any thread."""

    server: object
    thread: threading.Thread
    host: str
    port: int

    @property
    def url(self) -> str:
        return f"http://{self.host}:{self.port}/"

    def stop(self, timeout_s: float = 10.0) -> None:
        server = self.server
        # Close every socket from inside the server's own loop: the loop ends when its map is empty.
        # ignore_all: a socket a client already broke (a refused oversized header) must not stop the stop
        try:
            server.trigger.pull_trigger(lambda: wasyncore.close_all(server._map, ignore_all=True))
        except (
            OSError
        ):  # the wake-up pipe is gone already (seen about once in 20 stops): close here
            wasyncore.close_all(server._map, ignore_all=True)
        self.thread.join(timeout_s)
        server.task_dispatcher.shutdown()


def start_in_thread(
    app: Flask, *, host: str = LOOPBACK, port: int = 0, threads: int | None = None, **options
) -> RunningServer:
    """Start waitress for ``app`` on ``host:port`` (0: a free port) in a daemon thread.

    ``options`` go to :class:`fieldkit.service.connections.FieldkitServer` (tests shorten the header
    deadline with ``header_deadline_s``).
    """
    options = {**WAITRESS_OPTIONS, "threads": threads or threads_for(app), **options}
    server = create_server(app, host=host, port=port, **options)
    thread = threading.Thread(target=server.run, name="fieldkit-waitress", daemon=True)
    thread.start()
    return RunningServer(server=server, thread=thread, host=host, port=server.effective_port)


def _is_loopback(host: str) -> bool:
    if host == "localhost":
        return True
    try:
        return ipaddress.ip_address(host).is_loopback
    except ValueError:
        return False


class PortUnavailable(InputError):
    """The address cannot be listened on (in use, or not this computer's); the CLI exits 2."""

    def __init__(self, host: str, port: int, exc: OSError) -> None:
        super().__init__(
            "port",
            f"cannot listen on {host}:{port} ({exc.strerror or exc}); another fieldkit or "
            "program may be using it: choose another with --port",
            value=port,
        )


def _check_port(host: str, port: int) -> None:
    """Refuse a port another program listens on, the way waitress would bind it (SO_REUSEADDR)."""
    if port == 0:
        return
    try:
        infos = socket.getaddrinfo(host, port, type=socket.SOCK_STREAM)
    except OSError as exc:
        raise PortUnavailable(host, port, exc) from None
    family, kind, proto, _name, address = infos[0]
    with socket.socket(family, kind, proto) as probe:
        probe.setsockopt(socket.SOL_SOCKET, socket.SO_REUSEADDR, 1)
        try:
            probe.bind(address)
        except OSError as exc:
            raise PortUnavailable(host, port, exc) from None


def _announce_new_key(url: str, out: TextIO) -> None:
    """The laptop's terminal shows the new address and QR code after a key rotation."""
    print(f"New access key: phones must open {url}", file=out)
    print("The old address and its cookies no longer work. Scan this code:", file=out)
    print(qr_terminal(url), file=out, flush=True)


def _stop(signum: int, _frame: object) -> None:
    raise KeyboardInterrupt(signal.Signals(signum).name)


def serve(
    *,
    host: str = LOOPBACK,
    port: int = 8765,
    data_dir: str | Path | None = None,
    lan: bool = False,
    out: TextIO | None = None,
) -> None:
    """Serve the app and the API until SIGINT or SIGTERM.

    Parameters
    ----------
    host : str
        Address to bind. With ``lan`` a loopback host becomes 0.0.0.0 (every interface). A
        non-loopback host always turns LAN mode on: nothing is served to the network without a key.
    port : int
        TCP port; 0 picks a free one (the line printed at start shows which).
    data_dir : path, optional
        Where the database lives; default the user data directory (or ``FIELDKIT_HOME``).
    lan : bool
        Serve phones on the local network: access key, printed address and QR code.
    """
    out = out or sys.stdout
    if lan and _is_loopback(host):
        host = "0.0.0.0"
    if not lan and not _is_loopback(host):
        lan = True
        print(f"{host} is not a loopback address: LAN mode with an access key is on.", file=out)
    _check_port(host, port)  # before the app exists: a busy port starts nothing
    app = create_app({"DATA_DIR": data_dir, "LAN": lan})
    warm_up()
    board = app.extensions["fieldkit_plan_board"]
    board.start()  # the plan workers load the planner now, not at the first plan
    try:
        server = create_server(
            app, host=host, port=port, **{**WAITRESS_OPTIONS, "threads": threads_for(app)}
        )
    except OSError as exc:
        raise PortUnavailable(host, port, exc) from None
    port = server.effective_port
    if lan:
        address = lan_address() if host in ("0.0.0.0", "") else host
        app.config["PUBLIC_URL"] = f"http://{address}:{port}/"
        url = access_url(app.config["PUBLIC_URL"], app.config["KEY"])
        print(f"fieldkit on the local network: {url}", file=out)
        if address.startswith("127."):
            print(
                "No local network found: start the laptop's hotspot (or join a network) and "
                "restart, or phones cannot reach this address.",
                file=out,
            )
        print("Phones on the same network: scan this code, or type the address.", file=out)
        print(qr_terminal(url), file=out)
        app.config["ON_KEY_ROTATED"] = lambda new_url: _announce_new_key(new_url, out)
    else:
        print(f"fieldkit serving on http://{host}:{port}/ (this computer only)", file=out)
    out.flush()

    previous = {}
    if threading.current_thread() is threading.main_thread():
        for sig in (signal.SIGINT, signal.SIGTERM):
            previous[sig] = signal.signal(sig, _stop)
    try:
        server.run()  # returns after SIGINT/SIGTERM, once the worker threads have finished
    finally:
        wasyncore.close_all(server._map)
        for sig, handler in previous.items():
            signal.signal(sig, handler)
        board.close()  # plan workers stop with the service
        checkpoint_and_close(app.config["DATABASE"])
        print("fieldkit stopped; database closed.", file=out, flush=True)
