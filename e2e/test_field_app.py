"""The field app in Debian's chromium against the real service: a newcomer's walk through the demo
scenario (SCENARIO.md) at a phone and a laptop viewport, ticks kept through a service restart, the
offline reload from the service worker, the unit switch and entry errors at the field.

Tests run in file order and share one service (one demo plan at start, one plan for the phone walk):
the restart test uses the deployment the phone walk made.
"""

from __future__ import annotations

import math
import re
import secrets
import time

import pytest
import segno

from e2e.conftest import ARTIFACTS, PLAN_TIMEOUT_MS, Service, shot
from fieldkit.service.lan_api import lan_address

pytestmark = [pytest.mark.browser, pytest.mark.slow]

SECTIONS = ("site", "sky", "wire", "mast", "checks", "card")
FOOT_M = 0.3048  # international foot, exact
WALK = {}  # what the phone walk made, for the tests after it


def go(page, section: str, *, touch: bool) -> None:
    link = page.locator(f"nav.sections a[data-section='{section}']")
    link.tap() if touch else link.click()
    page.wait_for_selector(f"#sec-{section}:not([hidden])")


def fill(page, testid: str, value: str) -> None:
    page.get_by_test_id(testid).fill(value)


def add_support_xy(page, sid, height, x, y):
    fill(page, "new-id", sid)
    fill(page, "new-height", height)
    page.get_by_test_id("mode-xy").click()
    fill(page, "new-x", x)
    fill(page, "new-y", y)
    page.get_by_test_id("add-support-submit").click()
    page.get_by_test_id(f"support-{sid}").wait_for()


INCH_M = 0.0254  # international inch, exact
FRACTION = {"": 0.0, "¼": 0.25, "½": 0.5, "¾": 0.75}
# "12.5 m", "59 cm", "40.4 ft", and a tape's "67 ft 4½ in" or "23¼ in" (issue 16: tape readings)
LENGTH = re.compile(r"(-?\d+(?:\.\d+)?)([¼½¾]?)\s*(cm|m|ft|in)\b(?:\s+(\d+)([¼½¾]?)\s*in\b)?")


def metres(text: str) -> float:
    m = LENGTH.search(text)
    assert m, f"no length in {text!r}"
    value = float(m.group(1)) + FRACTION[m.group(2)]
    unit = {"m": 1.0, "cm": 0.01, "ft": FOOT_M, "in": INCH_M}[m.group(3)]
    inches = float(m.group(4)) + FRACTION[m.group(5)] if m.group(4) else 0.0
    return value * unit + inches * INCH_M


def wait_plan(page) -> None:
    """Until the plan is shown; fails at once with the app's message when the service refuses or breaks."""
    outcome = page.wait_for_function(
        """() => {
          const status = document.querySelector('[data-testid=plan-status]')?.textContent || '';
          if (/^Plan:/.test(status)) return 'ok';
          const banner = document.querySelector('[data-testid=banner]');
          return banner && !banner.hidden ? 'banner: ' + banner.textContent : null;
        }""",
        timeout=PLAN_TIMEOUT_MS,
    ).json_value()
    assert outcome == "ok", outcome


FITS_JS = """() => {
  const out = [];
  const doc = document.documentElement;
  if (doc.scrollWidth > window.innerWidth + 1) out.push(`page is ${doc.scrollWidth}px wide in a ${window.innerWidth}px window`);
  for (const svg of document.querySelectorAll('main section:not([hidden]) svg.plot')) {
    const vb = svg.viewBox.baseVal;
    const toSvg = svg.getScreenCTM().inverse();
    for (const t of svg.querySelectorAll('text')) {
      const b = t.getBBox();
      if (!b.width) continue;
      const m = toSvg.multiply(t.getScreenCTM());  // includes the label's own rotation
      const pts = [[b.x, b.y], [b.x + b.width, b.y], [b.x, b.y + b.height], [b.x + b.width, b.y + b.height]]
        .map(([x, y]) => new DOMPoint(x, y).matrixTransform(m));
      const xs = pts.map((p) => p.x), ys = pts.map((p) => p.y);
      if (Math.min(...xs) < -1 || Math.max(...xs) > vb.width + 1 || Math.min(...ys) < -1 || Math.max(...ys) > vb.height + 1)
        out.push(`"${t.textContent}" leaves its drawing (${svg.dataset.testid || svg.getAttribute('aria-label')})`);
    }
  }
  return out;
}"""


def assert_fits(page) -> None:
    """Nothing wider than the screen, and every label of every drawing inside its drawing."""
    problems = page.evaluate(FITS_JS)
    assert not problems, problems


def walk_sections(page, kind: str, *, touch: bool) -> None:
    """See the plan in every section, read the cut list, tick every pre-raise check, print the card."""
    go(page, "sky", touch=touch)
    page.get_by_test_id("channel-day").wait_for(timeout=120_000)
    rows = page.locator("[data-testid=channel-day] tbody tr")
    assert rows.count() == 24
    assert page.get_by_test_id("recommended-channel").inner_text().endswith("MHz")
    assert "sunrise" in page.get_by_test_id("sun-times").inner_text()
    shot(page, f"{kind}-sky")
    assert_fits(page)

    go(page, "wire", touch=touch)
    cut = page.get_by_test_id("cut-list")
    legs = [metres(page.get_by_test_id(f"leg-{i}").inner_text()) for i in range(2)]
    total = metres(page.get_by_test_id("total-wire").inner_text())
    # Plausible NVIS dipole legs on 3.5-7.3 MHz: a quarter wave is 10-21 m (common practice)
    assert all(8.0 < leg < 23.0 for leg in legs), legs
    assert total > sum(legs)  # the wrap allowance is extra wire
    assert cut.is_visible()
    page.get_by_test_id("swr-plot").wait_for(timeout=120_000)
    f_mhz = float(
        re.search(r"(\d+\.\d+) MHz", page.get_by_test_id("option-0").inner_text()).group(1)
    )
    # A dip 2 % low means the wire is long: cut (length goes as 1/f, common practice)
    page.get_by_test_id("dip").fill(f"{f_mhz * 0.98:.4f}")
    advice = page.get_by_test_id("retrim-result").inner_text()
    assert advice.startswith("Cut "), advice
    leg = legs[0]
    assert 0.3 * 0.02 * leg < metres(advice) < 3 * 0.02 * leg, (advice, leg)
    shot(page, f"{kind}-wire")
    assert_fits(page)

    go(page, "mast", touch=touch)
    page.get_by_test_id("side-view").wait_for()
    page.get_by_test_id("person").wait_for()
    page.get_by_test_id("sweep-plot").wait_for()
    page.get_by_test_id("pattern-plot").wait_for(timeout=120_000)
    page.get_by_test_id("reach-plot").wait_for(timeout=120_000)
    shot(page, f"{kind}-mast")
    assert_fits(page)

    go(page, "checks", touch=touch)
    ready = page.get_by_test_id("ready-state")
    assert ready.get_attribute("data-ready") == "false"
    fill(page, "initials", "AB" if kind == "phone" else "CD")
    pre = page.locator("ul.checklist[data-stage='pre-raise'] li.check")
    n = pre.count()
    assert n >= 3
    for i in range(n):
        item = pre.nth(i)
        if item.get_attribute("data-done") == "true":
            continue
        btn = item.locator("button.tick")
        btn.tap() if touch else btn.click()
        page.wait_for_function(
            "(i) => { const li = document.querySelectorAll(\"ul.checklist[data-stage='pre-raise'] li.check\")[i];"
            " return li && li.dataset.done === 'true' && !li.classList.contains('is-pending'); }",
            arg=i,
        )
    page.wait_for_selector("[data-testid=ready-state][data-ready='true']")
    assert "Ready to raise" in page.get_by_test_id("ready-state").inner_text()
    shot(page, f"{kind}-checks")
    assert_fits(page)

    go(page, "card", touch=touch)
    card = page.get_by_test_id("field-card")
    card.wait_for()
    assert "Ready to raise" in card.inner_text()
    assert page.get_by_test_id("card-qr").is_visible()
    shot(page, f"{kind}-card")
    assert_fits(page)


def print_card(page, kind: str, fmt: str) -> bytes:
    page.emulate_media(media="print")
    shot(page, f"{kind}-card-print")
    pdf = page.pdf(format=fmt, print_background=True)
    page.emulate_media(media="screen")
    (ARTIFACTS / f"{kind}-card-{fmt}.pdf").write_bytes(pdf)
    return pdf


def page_count(pdf: bytes) -> int:
    return len(re.findall(rb"/Type\s*/Page(?!s)", pdf))


def test_first_start_shows_the_demo_plan_when_it_arrives(open_app, service):
    """On first start the service plans the demo in the background; the app, opened at once, shows
    the cut list when the plan is stored, without a reload."""
    page = open_app("laptop", "#wire")
    planning = not service.get("/api/deployments")["deployments"][0]["has_result"]
    page.get_by_test_id("leg-0").wait_for(timeout=PLAN_TIMEOUT_MS)
    assert metres(page.get_by_test_id("leg-0").inner_text()) > 5
    if planning:
        shot(page, "laptop-wire-after-background-plan")


def test_phone_newcomer_walk(open_app, service):
    """A newcomer on a phone enters the Larch Basin clearing from SCENARIO.md and gets to "ready"."""
    page = open_app("phone")
    page.get_by_test_id("deployment-select").select_option("__new")
    page.get_by_test_id("new-name").fill("Larch Basin walk (phone)")
    demo = service.get("/api/deployments")["deployments"][0]
    page.get_by_test_id("new-kit").select_option(demo["id"])
    page.get_by_test_id("new-submit").tap()
    page.get_by_test_id("add-support").wait_for()

    page.get_by_label("Latitude (°N)").fill("46.8")
    page.get_by_label("Longitude (°E)").fill("8.2")
    page.get_by_label("Date (UTC day)").fill("2026-12-01")
    page.get_by_label("Ground").select_option("poor")
    fill(page, "channels", "3.605, 3.79, 5.3715, 7.055, 7.185")

    add_support_xy(page, "T1", "13.5 m", "-24", "6")
    add_support_xy(page, "T2", "32.8 ft", "21 m", "-3 m")  # 32.8 ft = 10.0 m
    # T3 by paces from the reference point: 40.36 paces of 0.75 m on bearing 7.59° = (4, 30)
    fill(page, "new-id", "T3")
    fill(page, "new-height", "12")
    page.get_by_test_id("mode-paces").tap()
    fill(page, "new-paces", "40.36")
    fill(page, "new-pace-length", "0.75 m")
    fill(page, "new-pace-bearing", "7.59")
    page.get_by_test_id("add-support-submit").tap()
    page.get_by_test_id("support-T3").wait_for()
    # T4 by distance and bearing from T2: 30.36 m on 17.24° from (21, -3) = (30, 26)
    fill(page, "new-id", "T4")
    fill(page, "new-height", "8 m")
    page.get_by_test_id("mode-bearing").tap()
    page.get_by_test_id("new-from").select_option("T2")
    fill(page, "new-distance", "30.36 m")
    fill(page, "new-bearing", "17.24")
    page.get_by_test_id("add-support-submit").tap()
    page.get_by_test_id("support-T4").wait_for()
    for sid, (x, y) in {"T3": (4.0, 30.0), "T4": (30.0, 26.0)}.items():
        assert math.isclose(metres(page.get_by_test_id(f"x-{sid}").input_value()), x, abs_tol=0.05)
        assert math.isclose(metres(page.get_by_test_id(f"y-{sid}").input_value()), y, abs_tol=0.05)
    assert math.isclose(metres(page.get_by_test_id("height-T2").input_value()), 10.0, abs_tol=0.01)
    page.get_by_test_id("unsafe-T3").check()
    for tid, v in (
        ("pl-x1", "-200"),
        ("pl-y1", "-38"),
        ("pl-x2", "200"),
        ("pl-y2", "-38"),
        ("pl-height", "8.5"),
    ):
        fill(page, tid, v)
    page.get_by_test_id("add-power-line-submit").tap()
    page.get_by_test_id("power-line-0").wait_for()
    sketch = page.get_by_test_id("site-sketch")
    assert sketch.locator("circle.support").count() == 4
    assert sketch.locator("circle.support.unsafe").count() == 1
    assert sketch.locator("line.power-line").count() == 1

    page.get_by_test_id("save-plan").tap()
    # the demo's site plans in well under a second on a warm service, before the progress bar's
    # first poll: the bar is checked on a long plan (e2e/test_plan_progress.py)
    wait_plan(page)
    assert page.get_by_test_id("plan-progress").count() == 0  # no bar left behind
    status = page.get_by_test_id("plan-status").inner_text()
    assert "T3" not in status.split("rope heights")[0], "the unsafe snag must not be used"
    assert page.get_by_test_id("site-sketch").locator("[data-testid=sketch-wire]").count() == 1
    shot(page, "phone-site")
    assert_fits(page)
    WALK["id"] = page.evaluate("localStorage.getItem('fieldkit.last')")

    walk_sections(page, "phone", touch=True)
    pdf = print_card(page, "phone", "A4")
    assert page_count(pdf) == 1
    checks = service.get(f"/api/deployments/{WALK['id']}/checks")
    assert checks["ready_to_raise"] is True, checks["missing_checks"]


def test_pending_ticks_survive_a_service_restart(open_app, service):
    """Ticks made while the service is stopped stay on the device, show as pending, and reach the
    service exactly once when it is back (the contract's idempotent client_id)."""
    assert WALK.get("id"), "needs the phone walk's deployment"
    dep = WALK["id"]
    page = open_app("phone", f"?deployment={dep}#checks")
    page.get_by_test_id("initials").fill("EF")
    items = page.locator("ul.checklist[data-stage='after-raise'] li.check")
    assert items.count() >= 2
    ids = [
        items.nth(i).get_attribute("data-testid").removeprefix("check-")
        for i in range(min(3, items.count()))
    ]
    before = {
        it["id"]: it["acknowledgements"]
        for it in service.get(f"/api/deployments/{dep}/checks")["items"]
    }

    service.stop()
    for item_id in ids:
        page.get_by_test_id(f"tick-{item_id}").tap()
        page.get_by_test_id(f"pending-{item_id}").wait_for()
    page.wait_for_function(
        "(n) => (document.querySelector('[data-testid=pending-count]')?.textContent || '').startsWith(n + ' ')",
        arg=len(ids),
    )
    assert "unreachable" in page.get_by_test_id("online-state").inner_text()
    shot(page, "phone-checks-pending")
    # A reload while the service is away keeps them (the laptop's service worker serves the app).
    page.reload()
    page.wait_for_selector("html[data-ready='1']")
    page.get_by_test_id(f"pending-{ids[0]}").wait_for()

    service.start()
    page.wait_for_function(
        "() => !document.querySelector('[data-testid=pending-count]')", timeout=30_000
    )
    after = {it["id"]: it for it in service.get(f"/api/deployments/{dep}/checks")["items"]}
    for item_id in ids:
        assert after[item_id]["done"] is True
        assert after[item_id]["by"] == "EF"
        assert after[item_id]["acknowledgements"] == before[item_id] + 1, (
            "a tick was lost or doubled"
        )
    # Nothing is sent again on the next replay round.
    time.sleep(6)
    again = {
        it["id"]: it["acknowledgements"]
        for it in service.get(f"/api/deployments/{dep}/checks")["items"]
    }
    assert all(again[i] == after[i]["acknowledgements"] for i in ids)
    page.get_by_test_id("pending-count").wait_for(state="detached")
    # The history lists each replayed tick once, as recorded by the service.
    page.get_by_test_id("history").locator("summary").tap()
    page.get_by_test_id("history").locator("table").wait_for()
    rows = page.get_by_test_id("history").locator("tbody tr").all_inner_texts()
    assert sum("EF" in r and "recorded" in r for r in rows) == len(ids), rows


UUID4 = re.compile(r"^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$")


def test_lan_phone_over_plain_http_keeps_ticks_in_local_storage(open_app, service):
    """A phone on the laptop's network: plain HTTP, so no secure context, no service worker and no
    crypto.randomUUID. Its ticks wait in localStorage with their own UUIDs and arrive once."""
    assert WALK.get("id"), "needs the phone walk's deployment"
    host = lan_address()
    if host.startswith("127."):
        pytest.skip("this machine has no non-loopback address to serve the LAN on")
    dep = WALK["id"]
    lan = Service(service.data_dir, demo=False, host=host, key=secrets.token_urlsafe(24))
    lan.start()
    try:
        page = open_app("phone", f"?key={lan.key}", base=lan.url)
        assert page.evaluate("isSecureContext") is False
        assert page.evaluate("typeof crypto.randomUUID") == "undefined"
        assert (
            page.evaluate("!!(navigator.serviceWorker && navigator.serviceWorker.controller)")
            is False
        )
        page.get_by_test_id("deployment-select").select_option(dep)
        go(page, "checks", touch=True)
        page.get_by_test_id("initials").fill("GH")
        items = page.locator("ul.checklist[data-stage='tear-down'] li.check")
        ids = [items.nth(i).get_attribute("data-testid").removeprefix("check-") for i in range(2)]
        lan.stop()
        for item_id in ids:
            page.get_by_test_id(f"tick-{item_id}").tap()
            page.get_by_test_id(f"pending-{item_id}").wait_for()
        stored = page.evaluate("JSON.parse(localStorage.getItem('fieldkit.kv.pending-ticks'))")
        assert [e["item_id"] for e in stored] == ids
        client_ids = [e["body"]["client_id"] for e in stored]
        assert all(UUID4.match(c) for c in client_ids), client_ids
        assert len(set(client_ids)) == len(client_ids)
        shot(page, "phone-lan-pending")
        lan.start()
        page.wait_for_function(
            "() => !document.querySelector('[data-testid=pending-count]')", timeout=30_000
        )
        assert page.evaluate("localStorage.getItem('fieldkit.kv.pending-ticks')") == "[]"
        for item_id, client_id in zip(ids, client_ids, strict=True):
            history = service.get(f"/api/deployments/{dep}/checks/{item_id}")["history"]
            assert [a["client_id"] for a in history].count(client_id) == 1
            assert history[-1]["by"] == "GH" and history[-1]["done"] is True
        # Sharing: the Card shows the LAN address with its key as a QR code for the next phone.
        go(page, "card", touch=True)
        page.get_by_test_id("lan-show").tap()
        page.get_by_test_id("lan-qr").wait_for()
        url = page.get_by_test_id("lan-url").inner_text()
        assert url == f"{lan.url}?key={lan.key}"
        version = int(page.get_by_test_id("lan-qr").get_attribute("data-version"))
        assert version == segno.make(url, error="m", mode="byte").version
        shot(page, "phone-lan-card")
    finally:
        lan.stop()


def test_laptop_walk(open_app, service, demo_planned):
    """The team lead on the laptop goes through the demo deployment the service loaded."""
    page = open_app("laptop")
    page.get_by_test_id("deployment-select").select_option(demo_planned["id"])
    page.get_by_test_id("support-T4").wait_for()
    assert page.get_by_test_id("unsafe-T3").is_checked()
    wait_plan(page)
    shot(page, "laptop-site")
    walk_sections(page, "laptop", touch=False)
    pdf = print_card(page, "laptop", "Letter")
    assert page_count(pdf) == 1
    # night mode, for the record
    page.get_by_test_id("night-toggle").click()
    for section in ("site", "sky", "mast", "card"):
        go(page, section, touch=False)
        page.wait_for_timeout(300)
        shot(page, f"laptop-night-{section}")
        assert_fits(page)
    page.get_by_test_id("night-toggle").click()


def test_offline_reload_on_the_laptop(open_app, service, demo_planned):
    """With the service stopped, the laptop reopens the app and the deployment from the service worker."""
    page = open_app("laptop")
    page.wait_for_function("() => navigator.serviceWorker.controller !== null", timeout=30_000)
    # Load once more under the worker, so the deployment's answers pass through it and are kept.
    page.reload()
    page.wait_for_selector("html[data-ready='1']")
    name = page.get_by_test_id("deployment-select").locator("option:checked").inner_text()
    go(page, "card", touch=False)
    page.get_by_test_id("field-card").wait_for()
    service.stop()
    try:
        page.reload()
        page.wait_for_selector("html[data-ready='1']")
        assert "unreachable" in page.get_by_test_id("online-state").inner_text()
        assert (
            page.get_by_test_id("deployment-select").locator("option:checked").inner_text() == name
        )
        page.get_by_test_id("field-card").wait_for()
        assert "Rope heights" in page.get_by_test_id("field-card").inner_text()
        go(page, "site", touch=False)
        page.get_by_test_id("support-T1").wait_for()
        shot(page, "laptop-offline-site")
        # the in-app help says what happens to ticks made now
        page.get_by_test_id("help-toggle").click()
        help_text = page.get_by_test_id("help").inner_text()
        assert "pending" in help_text and "local storage" in help_text
    finally:
        service.start()


def test_unit_switch_is_everywhere_and_stored(open_app, service, demo_planned):
    page = open_app("phone", "#wire")
    leg_m = metres(page.get_by_test_id("leg-0").inner_text())
    # tape readings keep number and unit together with a no-break space (issue 16)
    assert page.get_by_test_id("leg-0").inner_text().replace("\xa0", " ").endswith(" m")
    page.get_by_test_id("units-toggle").tap()
    text = page.get_by_test_id("leg-0").inner_text()
    # issue 16: lengths of the wire read as a tape does, in feet and inches (¼ in)
    assert re.fullmatch(r"\d+\s+ft\s+\d+[¼½¾]?\s+in", text), text
    assert math.isclose(metres(text), leg_m, abs_tol=0.02)
    page.reload()
    page.wait_for_selector("html[data-ready='1']")
    go(page, "mast", touch=True)
    assert all(t.endswith(" ft") for t in page.locator("[data-testid^=rope-]").all_inner_texts())
    go(page, "site", touch=True)
    assert page.get_by_test_id("height-T1").input_value().endswith(" ft")
    shot(page, "phone-site-imperial")
    assert_fits(page)
    go(page, "wire", touch=True)
    assert_fits(page)
    page.get_by_test_id("units-toggle").tap()
    # tape readings keep number and unit together with a no-break space (issue 16)
    assert page.get_by_test_id("leg-0").inner_text().replace("\xa0", " ").endswith(" m")


@pytest.mark.parametrize(
    ("testid", "typed", "expected"),
    [
        ("new-height", "12 parsecs", "unknown unit"),
        ("new-height", "-3 m", "cannot be negative"),
        ("new-height", "90 m", "at most"),
        ("new-height", "tall", "is not a length"),
        ("height-T1", "abc", "is not a length"),
        ("new-bearing", "400", "at most 360"),
        ("channels", "3.79, 45", "between 1.8 and 30"),
        ("new-x", "12 m east", "is not a length"),
    ],
)
def test_bad_entry_shows_the_error_at_the_field(open_app, service, testid, typed, expected):
    page = open_app("phone", "#site")
    if testid == "new-bearing":
        page.get_by_test_id("mode-bearing").tap()
    if testid == "channels":
        page.get_by_test_id("place").locator("summary").tap()
    field = page.get_by_test_id(testid)
    field.fill(typed)
    error = page.get_by_test_id(f"{testid}-error")
    error.wait_for()
    assert expected in error.inner_text()
    assert field.get_attribute("aria-invalid") == "true"
    # the error sits with its field, inside the same labelled block
    assert field.locator("xpath=..").locator(".field-error").inner_text() == error.inner_text()
    if testid == "new-height":
        page.get_by_test_id("add-support-submit").tap()
        assert "Fix the marked fields" in page.get_by_test_id("add-error").inner_text()
    field.fill("12 m" if "height" in testid else "7.055" if testid == "channels" else "90")
    error.wait_for(state="hidden")


def test_service_refusal_shows_at_the_field(open_app, service, demo_planned):
    """A rule only the service knows (a name of at most 200 characters) comes back at its field."""
    page = open_app("phone", "#site")
    page.get_by_test_id("place").locator("summary").tap()
    name = page.locator("[data-field='name']")
    name.fill("Larch " * 40)  # 240 characters
    page.get_by_test_id("save-plan").tap()
    error = name.locator("xpath=..").locator(".field-error")
    error.wait_for()
    assert "at most 200 characters" in error.inner_text()
    assert name.get_attribute("aria-invalid") == "true"
    assert "name" in page.get_by_test_id("banner").inner_text()
    assert (
        service.get("/api/deployments")["deployments"][0]["name"] == "Larch Basin relay camp (demo)"
    )


def test_kit_entered_in_the_app_becomes_the_operators_kit(open_app, service):
    """A first deployment on a laptop with no stored kit: the newcomer types the kit and stores it."""
    assert service.get("/api/kit")["kit"] == {}
    page = open_app("laptop")
    page.get_by_test_id("deployment-select").select_option("__new")
    page.get_by_test_id("new-name").fill("Kit check")
    page.get_by_test_id("new-submit").click()
    kit = page.get_by_test_id("kit")
    kit.wait_for()
    assert kit.get_attribute("open") is not None, "an empty kit opens for entry"
    for name, value in (
        ("Wire diameter (mm)", "1.6"),
        ("Jacket thickness (mm, 0 = bare)", "0.7"),
        ("Coax length (m)", "82 ft"),
        ("Balun or centre insulator (kg)", "0.35"),
        ("Rope (m)", "60"),
        ("Pull on the wire (N)", "60"),
    ):
        kit.get_by_label(name, exact=True).fill(value)
    page.get_by_test_id("kit-mast-id").fill("M1")
    page.get_by_test_id("kit-mast-height").fill("9 m")
    kit.get_by_role("button", name="Add mast").click()
    page.get_by_test_id("mast-M1").wait_for()
    # issue 14: the strength figures the plan checks against
    page.get_by_test_id("kit-wire-temper").select_option("hard")
    page.get_by_test_id("kit-rope-wll").fill("400")
    page.get_by_test_id("kit-weak-link").fill("300")
    page.get_by_test_id("kit-design-wind").fill("15")
    page.get_by_test_id("mast-M1-wind").fill("12")
    page.get_by_test_id("mast-M1-guy-wll").fill("250")
    page.get_by_test_id("mast-M1-guy-wll").blur()
    page.get_by_test_id("kit-store").click()
    page.get_by_test_id("kit-stored").filter(has_text="Stored").wait_for()
    stored = service.get("/api/kit")["kit"]
    assert stored["wire"] == {
        "conductor": "copper",
        "diameter_mm": 1.6,
        "insulation": {"thickness_mm": 0.7, "relative_permittivity": 3.5},
        "temper": "hard",
    }
    assert stored["coax"] == {"class": "rg-58", "length_m": 24.99}  # 82 ft = 24.99 m
    assert stored["rope"]["length_m"] == 60
    assert stored["masts"][0]["id"] == "M1" and stored["masts"][0]["height_m"] == 9
    assert stored["masts"][0]["wind_limit_m_s"] == 12
    assert stored["masts"][0]["guy_rope"] == {"working_load_n": 250}
    assert stored["rope"]["working_load_n"] == 400 and stored["weak_link_n"] == 300
    assert stored["design_wind_m_s"] == 15
    shot(page, "laptop-kit")


def test_sounding_overrides_the_estimate(open_app, service, demo_planned):
    """An observed foF2 typed into Sky replaces the modelled one and the channel day follows it."""
    page = open_app("phone", "#sky")
    page.get_by_test_id("channel-day").wait_for(timeout=120_000)
    before = page.locator("[data-testid=channel-day] td.fo").all_inner_texts()
    page.get_by_test_id("sounding").locator("summary").tap()
    fill(page, "sounding-fof2", "2.5")
    fill(page, "sounding-height", "300")
    fill(page, "sounding-hour", "17:00")
    page.get_by_test_id("sounding-use").tap()
    page.get_by_test_id("sounding-summary").filter(has_text="Sounding in use").wait_for()
    page.wait_for_function(
        "(b) => { const t = [...document.querySelectorAll('[data-testid=channel-day] td.fo')].map((e) => e.textContent);"
        " return t.length === 24 && t.join() !== b.join(); }",
        arg=before,
        timeout=120_000,
    )
    after = page.locator("[data-testid=channel-day] td.fo").all_inner_texts()
    assert after[17] == "2.5", after  # the observed reading at its hour
    shot(page, "phone-sky-sounding")
    fill(page, "sounding-height", "90")
    assert "at least 150" in page.get_by_test_id("sounding-height-error").inner_text()
