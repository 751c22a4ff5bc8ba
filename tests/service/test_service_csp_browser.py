"""The Content-Security-Policy holds in a real browser (Debian's chromium through Playwright).

Inline script, inline event handlers, eval and external origins must not run; the app's own
same-origin module scripts must. W3C Content Security Policy Level 3 defines the behaviour checked.
"""

from __future__ import annotations

import shutil

import pytest

from fieldkit import paths
from fieldkit.service import create_app
from fieldkit.service.server import start_in_thread

CHROMIUM = shutil.which("chromium")
pytestmark = [
    pytest.mark.browser,
    pytest.mark.slow,
    pytest.mark.skipif(CHROMIUM is None, reason="needs Debian's chromium"),
]
WATCH = """
window.__violations = [];
document.addEventListener('securitypolicyviolation',
  (e) => window.__violations.push(e.effectiveDirective + ' ' + e.blockedURI));
"""


@pytest.fixture(scope="module")
def browser():
    playwright = pytest.importorskip("playwright.sync_api")
    with playwright.sync_playwright() as p:
        launched = p.chromium.launch(
            executable_path=CHROMIUM,
            args=["--disable-gpu", "--disable-dev-shm-usage", "--disable-quic"],
        )
        yield launched
        launched.close()


def open_page(browser, app, path="/"):
    running = start_in_thread(app)
    context = browser.new_context()
    page = context.new_page()
    page.add_init_script(WATCH)  # injected by the browser driver, outside the page's CSP
    return running, context, page, running.url.rstrip("/") + path


def test_inline_script_eval_and_external_origins_do_not_run(browser, tmp_path):
    web = tmp_path / "web"
    web.mkdir()
    (web / "index.html").write_text(
        "<!doctype html><html><head><title>start</title>"
        "<script>document.title = 'inline ran';</script>"
        "<script type='module' src='/ok.js'></script>"
        "<script src='https://example.invalid/x.js'></script>"
        "<style>body { color: red; }</style></head>"
        "<body><img src='x' onerror=\"document.title = 'handler ran'\">"
        "<p id='p'>text</p></body></html>",
        encoding="utf-8",
    )
    (web / "ok.js").write_text(
        "window.okRan = true;\n"
        "try { eval('1'); window.evalRan = true; } catch (e) { window.evalRan = false; }\n",
        encoding="utf-8",
    )
    app = create_app({"DATA_DIR": tmp_path / "data", "WEB_DIR": web, "DEMO": False})
    running, context, page, url = open_page(browser, app)
    try:
        page.goto(url)
        page.wait_for_function("window.okRan === true")
        assert page.title() == "start"
        assert page.evaluate("window.evalRan") is False
        colour = page.evaluate("getComputedStyle(document.getElementById('p')).color")
        assert colour != "rgb(255, 0, 0)"  # the inline <style> was refused too
        violations = page.evaluate("window.__violations")
        directives = {v.split(" ")[0] for v in violations}
        assert {"script-src-elem", "script-src-attr", "style-src-elem"} <= directives, violations
    finally:
        context.close()
        running.stop()


def test_the_field_app_loads_without_violations(browser, tmp_path):
    if not (paths.web_dir() / "index.html").exists():
        pytest.skip("web/index.html has not landed")
    app = create_app({"DATA_DIR": tmp_path / "data", "DEMO": False})
    running, context, page, url = open_page(browser, app)
    try:
        page.goto(url)
        page.wait_for_load_state("networkidle")
        assert page.evaluate("window.__violations") == []
    finally:
        context.close()
        running.stop()
