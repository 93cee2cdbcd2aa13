"""Field readiness in the browser: accessibility (axe-core, WCAG 2.2 AA rules), small screens,
touch targets, text zoom, keyboard use, themes, live regions, storage failure and updates."""

from __future__ import annotations

import json
import os
import shutil


import build
from app import OPENING_SHEET, bridge

from .conftest import PHONE, guarded_page, settle, shot, wait_ready

SHEETS = [s["id"] for s in json.loads(bridge.catalog())]
WCAG = {"runOnly": {"type": "tag", "values": ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa"]},
        "resultTypes": ["violations"]}


def axe_violations(page):
    from axe_playwright_python.sync_playwright import Axe

    res = Axe().run(page, options=WCAG)
    return [
        f"{v['id']}: {v['help']} — {[n['target'] for n in v['nodes'][:3]]}"
        for v in res.response["violations"]
    ]


def pick(page, sheet_id):
    page.select_option("#sheet-pick", sheet_id)
    page.wait_for_function(f"() => window.fieldphasor.state.sheet.id === '{sheet_id}'")
    settle(page)


def test_axe_every_worksheet_and_theme(phone):
    phone.goto(phone.site)
    wait_ready(phone)
    settle(phone)
    problems = {}
    for sid in SHEETS:
        pick(phone, sid)
        v = axe_violations(phone)
        if v:
            problems[sid] = v
    for theme in ("dark", "sun"):
        phone.evaluate(f"() => {{ document.documentElement.dataset.theme = '{theme}'; }}")
        for sid in ("correction", "bus_scan"):
            pick(phone, sid)
            v = axe_violations(phone)
            if v:
                problems[f"{sid}/{theme}"] = v
    assert not problems, json.dumps(problems, indent=1, ensure_ascii=False)


def test_axe_jobs_and_report(phone):
    phone.goto(phone.site + "#/jobs")
    wait_ready(phone)
    phone.wait_for_selector("#jobs-title")
    assert axe_violations(phone) == []
    phone.click("text=Load demo job")
    phone.wait_for_selector("#job-site")
    assert axe_violations(phone) == []
    job = phone.evaluate("() => JSON.parse(JSON.stringify([...window.fieldphasor.jobs.jobs.values()][0]))")
    rep = json.loads(bridge.report(json.dumps(job), "html", "{}"))
    # The report is a standalone document with its own CSP: open it as a file of its own.
    import tempfile

    with tempfile.NamedTemporaryFile("w", suffix=".html", delete=False, encoding="utf-8") as fh:
        fh.write(rep["text"])
    page = phone.context.browser.new_page()
    try:
        page.goto("file://" + fh.name)
        assert axe_violations(page) == []
    finally:
        page.close()
        os.unlink(fh.name)


def test_no_sideways_scroll_at_320px_and_200pct_text(browser, site):
    with guarded_page(browser, site, viewport={"width": 320, "height": 640}, is_mobile=True, has_touch=True) as page:
        page.goto(site)
        wait_ready(page)
        for zoom in ("100%", "200%"):
            page.evaluate(f"() => {{ document.documentElement.style.fontSize = '{zoom}'; }}")
            for sid in SHEETS:
                pick(page, sid)
                over = page.evaluate("() => document.documentElement.scrollWidth - document.documentElement.clientWidth")
                assert over <= 0, f"{sid} at {zoom} text scrolls sideways by {over}px"
            if zoom == "200%":
                shot(page, "zoom200-correction-320")


def test_touch_targets_at_least_44px(phone):
    phone.goto(phone.site)
    wait_ready(phone)
    small = {}
    for sid in SHEETS:
        pick(phone, sid)
        bad = phone.evaluate("""() => {
            const els = [...document.querySelectorAll('button, select, input[type=text], textarea, .seg-opt label, summary, label.btn')];
            return els.filter(e => {
                const r = e.getBoundingClientRect();
                if (!r.width || !r.height) return false;  // hidden
                return r.height < 44 || r.width < 44;
            }).map(e => (e.id || e.textContent || e.getAttribute('aria-label') || e.tagName).slice(0, 40));
        }""")
        if bad:
            small[sid] = bad
    assert not small, small


def test_keyboard_reaches_every_input_and_choice(phone):
    phone.goto(phone.site + "#/sheet/impedance")
    wait_ready(phone)
    settle(phone)
    phone.focus("#sheet-pick")
    seen = []
    for _ in range(40):
        phone.keyboard.press("Tab")
        seen.append(phone.evaluate("() => document.activeElement.id || document.activeElement.name || document.activeElement.textContent.slice(0, 20)"))
    assert any(str(x).startswith("in-mode-") for x in seen)  # the radio group (arrow keys move within it)
    assert "in-f" in seen
    phone.keyboard.press("Shift+Tab")
    # choose "An impedance Z" with the keyboard only
    phone.focus("#in-mode-network")
    phone.keyboard.press("ArrowDown")
    settle(phone)
    assert phone.is_visible("#in-z")


def test_results_and_errors_are_announced(phone):
    phone.goto(phone.site + "#/sheet/impedance")
    wait_ready(phone)
    settle(phone)
    assert phone.get_attribute("#announce", "aria-live") == "polite"
    assert "Updated" in phone.inner_text("#announce")
    phone.fill("#in-f", "fifty")
    settle(phone)
    text = phone.inner_text("#announce")
    assert "attention" in text and "number" in text
    assert phone.get_attribute("#in-f", "aria-describedby").split()[-1] == "err-f"


def test_themes_follow_system_and_switch_by_hand(browser, site):
    ctx = browser.new_context(viewport=PHONE, color_scheme="dark")
    page = ctx.new_page()
    try:
        page.goto(site)
        page.wait_for_selector("html[data-input-ready='1']", state="attached")  # the shell is running
        bg = page.evaluate("() => getComputedStyle(document.body).backgroundColor")
        assert bg == "rgb(15, 23, 22)"  # the dark theme's background
        texts = []
        for _ in range(4):
            page.click("#theme-btn")
            texts.append(page.inner_text("#theme-btn"))
        assert texts == ["Light", "Dark", "Sunlight", "Auto"]
        assert page.get_attribute("#theme-btn", "aria-label").startswith("Colour theme: Auto")
        page.click("#theme-btn")  # light, by hand, against the system's dark
        assert page.evaluate("() => getComputedStyle(document.body).backgroundColor") == "rgb(244, 241, 232)"
        page.reload()
        page.wait_for_selector("html[data-input-ready='1']", state="attached")  # the shell is running
        assert page.inner_text("#theme-btn") == "Light"  # the choice is remembered
    finally:
        ctx.close()


def test_storage_unavailable_message_and_worksheets_still_work(browser, site):
    ctx = browser.new_context(viewport=PHONE)
    ctx.add_init_script("""Object.defineProperty(window, 'indexedDB', { get() { return { open() { throw new DOMException('The user denied permission to access the database.', 'UnknownError'); } }; } });""")
    page = ctx.new_page()
    try:
        page.goto(site + "#/sheet/impedance")
        wait_ready(page)
        settle(page)
        page.click("label[for='in-mode-z']")
        page.fill("#in-z", "3 + j4")
        settle(page)
        assert page.inner_text("[data-result='z_mag'] .a-value").strip() == "5 Ω"
        page.wait_for_selector("#job-bar .msg")
        assert "Storage on this device is unavailable" in page.inner_text("#job-bar")
        assert "Not stored" in page.inner_text("#save-state")
    finally:
        ctx.close()


def test_update_installs_beside_old_and_switches_when_complete(browser, dist, tmp_path):
    v1, v2 = str(tmp_path / "v1"), str(tmp_path / "v2")
    shutil.copytree(dist, v1)
    shutil.copytree(dist, v2)
    with open(os.path.join(v2, "app.css"), "a") as fh:
        fh.write("\n/* build two */\n")
    build.write_service_worker(v2, "v2")
    srv, url = build.serve_in_thread(v1)
    ctx = browser.new_context(viewport=PHONE)
    page = ctx.new_page()

    def sw_version():
        return page.evaluate("""() => new Promise(res => {
            navigator.serviceWorker.addEventListener('message', e => res(e.data.version), {once: true});
            navigator.serviceWorker.controller.postMessage('version');
        })""")

    try:
        page.goto(url + "#/jobs")
        wait_ready(page)
        page.wait_for_function("() => !!navigator.serviceWorker.controller", timeout=30_000)
        page.click("text=Load demo job")
        page.wait_for_selector("#job-site")
        page.fill("#job-site", "Kept across the update")
        page.wait_for_function("() => document.getElementById('save-state').dataset.state === 'saved'")
        first = sw_version()

        # version 2 appears on the server; v1 keeps working offline while v2 installs beside it
        srv.holder["dir"] = v2
        page.reload()
        wait_ready(page)
        page.wait_for_selector("#update-bar:not([hidden])", timeout=60_000)
        assert sw_version() == first  # still v1 in control until the user says so
        ctx.set_offline(True)
        page.reload()
        wait_ready(page)
        assert page.input_value("#job-site") == "Kept across the update"
        ctx.set_offline(False)
        page.wait_for_selector("#update-bar:not([hidden])", timeout=60_000)
        with page.expect_navigation():
            page.click("#update-btn")
        wait_ready(page)
        page.wait_for_function("() => !!navigator.serviceWorker.controller")
        second = sw_version()
        assert second != first
        css = page.evaluate("async () => (await (await fetch('app.css')).text())")
        assert "build two" in css
        ctx.set_offline(True)
        page.reload()
        wait_ready(page)
        assert page.input_value("#job-site") == "Kept across the update"
        keys = page.evaluate("async () => (await caches.keys()).filter(k => k.startsWith('fieldphasor-'))")
        assert keys == [f"fieldphasor-{second}"]  # the old cache is gone
    finally:
        ctx.close()
        srv.shutdown()


def test_landscape_phone_has_no_sideways_scroll(browser, site):
    ctx = browser.new_context(viewport={"width": 844, "height": 390}, is_mobile=True, has_touch=True)
    page = ctx.new_page()
    try:
        page.goto(site)
        wait_ready(page)
        for sid in SHEETS:
            pick(page, sid)
            over = page.evaluate("() => document.documentElement.scrollWidth - document.documentElement.clientWidth")
            assert over <= 0, f"{sid} scrolls sideways in landscape by {over}px"
        pick(page, "correction")
        shot(page, "landscape-correction-phone")
    finally:
        ctx.close()


def test_bad_input_in_every_worksheet_keeps_text_and_recovers(phone):
    phone.goto(phone.site)
    wait_ready(phone)
    for s in json.loads(bridge.catalog()):
        pick(phone, s["id"])
        field = next(f for f in s["fields"] if f["kind"] == "number" and f["required"]
                     and phone.is_visible(f"#in-{f['name']}"))
        sel = f"#in-{field['name']}"
        good = phone.input_value(sel)
        for bad in ("12..5", "<b>5</b>", "abc"):
            phone.fill(sel, bad)
            settle(phone)
            err = phone.locator(f"#err-{field['name']}")
            assert err.is_visible() and err.inner_text().strip(), f"{s['id']}.{field['name']} gave no message for {bad!r}"
            assert phone.input_value(sel) == bad  # nothing typed is lost
            assert phone.locator("b", has_text="5").count() == 0  # markup stays text
        phone.fill(sel, good)
        settle(phone)
        assert phone.evaluate("() => window.fieldphasor.state.lastResult.ok"), f"{s['id']} did not recover"


FIRST_FIELD_TOP = "(() => { const el = document.querySelector('#form input, #form select'); return el.getBoundingClientRect().top + scrollY; })()"


def test_form_stays_put_from_first_paint_to_first_result(browser, site):
    """The form is usable in the first paint (the static form in index.html), so nothing may push it
    down when the shell takes over, the engine comes up or the first answer arrives: a user who taps
    a field then must hit that field (common practice: no layout shift without user input, as in the
    Web Vitals guidance on layout shifts). The first paint is the page as served, without scripts."""
    for width in (320, 360, 390, 412, 480, 768, 1024):
        viewport = {"width": width, "height": 844}
        ctx = browser.new_context(viewport=viewport, java_script_enabled=False)
        try:
            page = ctx.new_page()
            page.goto(site + f"#/sheet/{OPENING_SHEET}")
            first_paint = page.evaluate(FIRST_FIELD_TOP)
        finally:
            ctx.close()
        with guarded_page(browser, site, viewport=viewport, service_workers="block") as page:
            page.goto(site + f"#/sheet/{OPENING_SHEET}")
            wait_ready(page)
            settle(page)
            answered = page.evaluate(FIRST_FIELD_TOP)
            headline = page.evaluate("(() => { const h = document.getElementById('headline'); return h.hidden ? '' : h.textContent; })()")
            # typing saves the draft ("Saved on this device" appears in the job bar): still no move
            page.fill("#in-p_kw", "430")
            page.wait_for_function("() => document.getElementById('save-state').dataset.state === 'saved'")
            settle(page)
            typed = page.evaluate(FIRST_FIELD_TOP)
        assert abs(answered - first_paint) <= 1, (width, first_paint, answered, headline)
        assert abs(typed - first_paint) <= 1, (width, first_paint, typed)
