"""The app loads, computes in Pyodide, installs, and keeps working offline."""

from __future__ import annotations

import json


from .conftest import (
    guarded_page,
    ARGS,
    CHROMIUM,
    PHONE,
    cpython_compute,
    open_sheet,
    settle,
    shot,
    wait_ready,
)
import build


def result_text(page, name: str) -> str:
    return page.inner_text(f"[data-result='{name}'] .a-value, [data-result='{name}'] .r-value").strip()


def choose(page, field: str, value: str):
    page.click(f"label[for='in-{field}-{value}']")


def test_impedance_computes_from_typed_input_same_as_cpython(phone):
    open_sheet(phone, "impedance")
    choose(phone, "mode", "z")
    phone.fill("#in-z", "3 + j4")
    settle(phone)
    # |Z| of 3 + j4 Ω is 5 Ω (3-4-5 right triangle) and PF = 3/5 = 0.6 lagging.
    assert result_text(phone, "z_mag") == "5 Ω"
    assert result_text(phone, "pf") == "0.6000 lagging"
    # The worker's answer equals CPython's for the same inputs (catches drift between the two).
    inputs = phone.evaluate("() => ({...window.fieldphasor.state.inputs})")
    ref = cpython_compute("impedance", inputs)
    shown = {r["name"]: r["display"] for r in phone.evaluate("() => window.fieldphasor.state.lastResult.results")}
    assert shown == {r["name"]: r["display"] for r in ref["results"]}
    shot(phone, "impedance-phone")


def test_network_entry_and_polar_notation(phone):
    open_sheet(phone, "impedance")
    choose(phone, "mode", "z")
    phone.fill("#in-z", "10∠-30")
    settle(phone)
    # 10∠-30° → 8.660 − j5.000 Ω (cos 30° = 0.8660), leading PF 0.8660.
    assert result_text(phone, "z_rect") == "8.66 − j5 Ω"
    assert result_text(phone, "pf") == "0.8660 leading"
    choose(phone, "mode", "network")
    settle(phone)
    assert phone.is_visible("[data-field='elements']")
    assert not phone.is_visible("[data-field='z']")


def test_bad_input_shows_message_and_keeps_text(phone):
    open_sheet(phone, "impedance")
    choose(phone, "mode", "z")
    phone.fill("#in-z", "12..5 - j4")
    settle(phone)
    err = phone.locator("#err-z")
    assert err.is_visible()
    assert "decimal mark" in err.inner_text()
    assert phone.input_value("#in-z") == "12..5 - j4"
    assert phone.get_attribute("#in-z", "aria-invalid") == "true"
    phone.fill("#in-f", "-50")
    settle(phone)
    assert "above 0" in phone.inner_text("#err-f")
    # What was typed survives a reload (autosaved on the device).
    phone.wait_for_timeout(400)
    phone.reload()
    wait_ready(phone)
    settle(phone)
    assert phone.input_value("#in-z") == "12..5 - j4"
    assert phone.input_value("#in-f") == "-50"


def test_offline_reload_after_one_visit(browser, dist):
    srv, url = build.serve_in_thread(dist)
    with guarded_page(browser, url, viewport=PHONE, is_mobile=True, has_touch=True) as page:
        ctx = page.context
        page.goto(url + "#/sheet/impedance")
        wait_ready(page)
        settle(page)
        page.evaluate("async () => { await navigator.serviceWorker.ready; }")
        page.wait_for_function("() => !!navigator.serviceWorker.controller", timeout=30_000)
        # Everything precached before we cut the network.
        page.wait_for_function(
            """async () => { const keys = await caches.keys(); return keys.some(k => k.startsWith('fieldphasor-')); }""",
            timeout=60_000,
        )
        srv.shutdown()
        srv.server_close()
        ctx.set_offline(True)
        page.reload()
        wait_ready(page)
        page.click("label[for='in-mode-z']")
        page.fill("#in-z", "6 - j8")
        settle(page)
        assert page.inner_text("[data-result='z_mag'] .a-value").strip() == "10 Ω"  # 6-8-10 triangle
        assert "leading" in page.inner_text("[data-result='pf'] .a-value")


def test_installable_no_errors(pw, site, fresh_profile):
    # A persistent context: an ordinary one is incognito-like and always reports 'in-incognito'.
    ctx = pw.chromium.launch_persistent_context(fresh_profile, executable_path=CHROMIUM, args=ARGS, viewport=PHONE)
    try:
        page = ctx.new_page()
        page.goto(site)
        wait_ready(page)
        page.evaluate("async () => { await navigator.serviceWorker.ready; }")
        page.wait_for_function("() => !!navigator.serviceWorker.controller", timeout=30_000)
        cdp = ctx.new_cdp_session(page)
        errors = cdp.send("Page.getInstallabilityErrors")["installabilityErrors"]
        assert errors == []
        manifest = cdp.send("Page.getAppManifest")
        data = json.loads(manifest["data"])
        assert data["display"] == "standalone"
        sizes = {(i["sizes"], i.get("purpose", "any")) for i in data["icons"]}
        assert ("192x192", "any") in sizes and ("512x512", "maskable") in sizes
    finally:
        ctx.close()


def test_tablet_layout_puts_inputs_beside_results(tablet):
    open_sheet(tablet, "impedance")
    form = tablet.locator("#form").bounding_box()
    res = tablet.locator("#results").bounding_box()
    assert res["x"] >= form["x"] + form["width"] - 1  # side by side, not stacked
    shot(tablet, "impedance-tablet")


def test_a_start_without_snapshot_imports_the_app_from_its_wheel_and_gives_cpythons_answers(browser, site):
    # ?snapshot=off forces the path a first visit takes: the wheel written as one file and imported
    # from (its .pyc beside each module; tests/test_stdlib.py shows none is compiled from source)
    ctx = browser.new_context(viewport=PHONE)
    try:
        page = ctx.new_page()
        page.goto(site + "?snapshot=off#/sheet/correction")
        wait_ready(page)
        settle(page)
        marks = page.evaluate("() => window.fieldphasor.engine.marks")
        assert "installed-with-zip" in marks and "snapshot-restored" not in marks
        res = page.evaluate("() => window.fieldphasor.state.lastResult")
        ref = cpython_compute("correction", page.evaluate("() => ({...window.fieldphasor.state.inputs})"))
        assert [(r["name"], r["display"]) for r in res["results"]] == [(r["name"], r["display"]) for r in ref["results"]]
    finally:
        ctx.close()


def test_micropip_install_path_works_offline(browser, site):
    """The wheel can also be installed by micropip from the wheels shipped in dist/. That path's
    files (micropip, the whole standard library, pyodide-lock.json) are not precached: the service
    worker keeps each, digest-checked, the first time a page it controls asks for it."""
    with guarded_page(browser, site, viewport=PHONE) as page:
        ctx = page.context
        page.goto(site + "?installer=micropip#/sheet/impedance")
        wait_ready(page)
        page.evaluate("async () => { await navigator.serviceWorker.ready; }")
        page.wait_for_function("() => !!navigator.serviceWorker.controller", timeout=30_000)
        fetched = page.guard.requests
        for name in ("micropip-", "python_stdlib-full.zip", "pyodide-lock.json"):
            assert any(name in u for u in fetched), name
        page.reload()  # online, now under the service worker: it keeps the on-demand files
        wait_ready(page)
        kept = page.evaluate("""async () => {
            const c = await caches.open((await caches.keys()).find(k => k.startsWith('fieldphasor-')));
            return (await c.keys()).map(r => r.url);
        }""")
        for name in ("micropip-", "python_stdlib-full.zip", "pyodide-lock.json"):
            assert any(name in u for u in kept), name
        ctx.set_offline(True)
        page.reload()
        wait_ready(page)
        assert "installed-with-micropip" in page.evaluate("() => window.fieldphasor.engine.marks")
        page.click("label[for='in-mode-z']")
        page.fill("#in-z", "3 + j4")
        settle(page)
        assert page.inner_text("[data-result='z_mag'] .a-value").strip() == "5 Ω"


def test_opening_form_is_usable_before_the_shell_runs_and_keeps_typing(browser, site):
    """index.html carries the opening worksheet's form; typing there before the scripts run is kept."""
    ctx = browser.new_context(viewport=PHONE, java_script_enabled=False)
    try:
        page = ctx.new_page()
        page.goto(site)
        assert page.is_visible("#in-p_kw") and page.input_value("#in-p_kw") != ""
        labels = page.eval_on_selector_all("#form label", "els => els.map(e => e.textContent)")
    finally:
        ctx.close()
    ctx = browser.new_context(viewport=PHONE)
    try:
        page = ctx.new_page()
        # hold the shell (app.js) back until the static form has been typed into: goto returns at
        # "commit", before the page has loaded, and app.js is answered only after the typing
        held, released = [], []

        def hold_shell(route):
            if released:
                route.continue_()
            else:
                held.append(route)

        page.route("**/app.js", hold_shell)
        page.goto(site, wait_until="commit")
        page.fill("#in-p_kw", "777")  # waits for the static form in index.html, nothing else
        # (remembered.js, which runs before the shell, may have made window.fieldphasor; the shell adds its state)
        assert page.evaluate("() => !(window.fieldphasor && window.fieldphasor.state)"), "the shell ran before the typing"
        released.append(True)
        for route in held:
            route.continue_()
        wait_ready(page)
        settle(page)
        assert page.input_value("#in-p_kw") == "777"
        assert page.evaluate("() => window.fieldphasor.state.inputs.p_kw") == "777"
        # the static form is the live form's first sections, label for label; the live one has more
        live = page.eval_on_selector_all("#form label", "els => els.map(e => e.textContent)")
        assert live[: len(labels)] == labels and len(live) > len(labels)
    finally:
        ctx.close()


def test_worksheet_picker_lists_each_worksheet_once(phone):
    """The picker (written into index.html by the build, then taken over by the shell) lists every
    worksheet of the catalog exactly once, in catalog order."""
    from app import bridge

    open_sheet(phone, "correction")
    values = phone.eval_on_selector_all("#sheet-pick option", "els => els.map(e => e.value)")
    assert values == list(bridge.sheets())
