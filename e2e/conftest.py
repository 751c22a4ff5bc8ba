"""End-to-end fixtures: the real service (create_app + waitress) and Debian's chromium through Playwright.

The service runs in this process on an ephemeral loopback port with its own data directory; the demo
deployment is loaded by the service itself on first start. It can be stopped and started again on the
same port (same origin: the browser keeps its storage and service worker). One browser per session.
"""

from __future__ import annotations

import json
import os
import time
import urllib.request
from pathlib import Path
from urllib.parse import urlsplit

import pytest
from playwright.sync_api import sync_playwright

from fieldkit.service import create_app
from fieldkit.service.server import start_in_thread

CHROMIUM = "/usr/bin/chromium"
CHROMIUM_ARGS = ["--disable-gpu", "--disable-dev-shm-usage", "--disable-quic"]
ARTIFACTS = Path(__file__).resolve().parent / "artifacts"
PHONE = {
    "viewport": {"width": 390, "height": 844},
    "device_scale_factor": 3,
    "is_mobile": True,
    "has_touch": True,
}
LAPTOP = {"viewport": {"width": 1280, "height": 800}}
VIEWPORTS = {"phone": PHONE, "laptop": LAPTOP}
# Planning the demo models every option with the engine: minutes on a busy 2-core machine.
PLAN_TIMEOUT_MS = 300_000


class Service:
    """The real fieldkit service in a thread, restartable on the same port."""

    def __init__(
        self, data_dir: Path, *, demo: bool = True, host: str = "127.0.0.1", key: str | None = None
    ) -> None:
        self.data_dir = data_dir
        self.demo = demo
        self.host = host
        self.key = key
        self.port = 0
        self.running = None

    def start(self) -> None:
        config = {"DATA_DIR": self.data_dir, "DEMO": self.demo}
        if self.key:
            config.update({"LAN": True, "KEY": self.key})
        app = create_app(config)
        self.running = start_in_thread(app, host=self.host, port=self.port)
        self.port = self.running.port

    def stop(self) -> None:
        if self.running is not None:
            self.running.stop()
            self.running = None

    @property
    def url(self) -> str:
        return f"http://{self.host}:{self.port}/"

    def get(self, path: str) -> dict:
        req = urllib.request.Request(self.url.rstrip("/") + path)
        if self.key:
            req.add_header("X-Fieldkit-Key", self.key)
        with urllib.request.urlopen(req, timeout=30) as r:
            return json.loads(r.read())


@pytest.fixture(scope="module")
def service(tmp_path_factory):
    home = tmp_path_factory.mktemp("fieldkit-home")
    old = os.environ.get("FIELDKIT_HOME")
    os.environ["FIELDKIT_HOME"] = str(home)
    svc = Service(home / "data")
    svc.start()
    yield svc
    svc.stop()
    if old is None:
        os.environ.pop("FIELDKIT_HOME", None)
    else:
        os.environ["FIELDKIT_HOME"] = old


@pytest.fixture(scope="module")
def demo_planned(service):
    """The demo deployment, once the service has planned it (it does so in the background at start)."""
    deadline = time.monotonic() + PLAN_TIMEOUT_MS / 1000
    while True:
        demo = service.get("/api/deployments")["deployments"][0]
        if demo["has_result"]:
            return demo
        assert time.monotonic() < deadline, "the service did not plan the demo in time"
        time.sleep(1)


@pytest.fixture(scope="session")
def chromium():
    with sync_playwright() as p:
        browser = p.chromium.launch(executable_path=CHROMIUM, args=CHROMIUM_ARGS)
        yield browser
        browser.close()


@pytest.fixture
def open_app(chromium, service):
    """open_app(kind) -> page on the app in a fresh context; fails the test on any request to another
    origin, and on any uncaught error in the page."""
    contexts = []
    foreign: list[str] = []
    errors: list[str] = []

    def make(kind: str, path: str = "", base: str | None = None):
        base = base or service.url
        origin = urlsplit(base)

        def watch(request):
            u = urlsplit(request.url)
            if u.scheme in ("data", "blob", "about"):
                return
            if (u.scheme, u.hostname, u.port) != (origin.scheme, origin.hostname, origin.port):
                foreign.append(request.url)

        ctx = chromium.new_context(**VIEWPORTS[kind])
        ctx.on("request", watch)
        contexts.append(ctx)
        page = ctx.new_page()
        page.on("pageerror", lambda e: errors.append(str(e)))
        page.set_default_timeout(30_000)
        page.goto(base + path)
        page.wait_for_selector("html[data-ready='1']")
        return page

    yield make
    for ctx in contexts:
        ctx.close()
    assert not foreign, f"the app asked another origin: {foreign}"
    assert not errors, f"uncaught errors in the page: {errors}"


def shot(page, name: str) -> None:
    ARTIFACTS.mkdir(exist_ok=True)
    page.evaluate(
        "window.scrollTo(0, 0)"
    )  # the sticky header belongs at the top of a full-page shot
    page.screenshot(path=str(ARTIFACTS / f"{name}.png"), full_page=True)
