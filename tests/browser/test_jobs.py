"""Site jobs on the device: a day on site offline, persistence, files, reports and sharing."""

from __future__ import annotations

import json
from urllib.parse import parse_qs, urlparse

from .conftest import PHONE, guarded_page, settle, shot, wait_ready

SITE = "Harbour Lane Bottling <script>alert(1)</script> & Co"  # invented site; markup must stay text
NOTES = 'Line 2 MCC. <img src=x onerror="alert(2)"> =HYPERLINK("http://x")'

SHARE_STUB = """() => {
window.__shared = null;
navigator.canShare = (d) => !!(d && d.files && d.files.length);
navigator.share = async (d) => {
  const f = d.files[0];
  window.__shared = {title: d.title, name: f.name, type: f.type, size: f.size, text: await f.text()};
};
}"""


def goto_jobs(page):
    page.click("#jobs-btn")
    page.wait_for_selector("#jobs-title")


def new_job(page, site, notes):
    goto_jobs(page)
    page.click("text=New job")
    page.fill("#job-site", site)
    page.fill("#job-notes", notes)


def add_entry(page, sheet_id):
    page.select_option("#add-sheet", sheet_id)
    page.click("text=Add entry")
    page.wait_for_function(f"() => window.fieldphasor.state.sheet.id === '{sheet_id}' && window.fieldphasor.state.target")
    settle(page)


def back_to_job(page):
    page.click("text=Back to job")
    page.wait_for_selector("#job-site")


def wait_saved(page):
    page.wait_for_function("() => { const e = document.getElementById('save-state'); return e && e.dataset.state === 'saved'; }")


def test_a_day_on_site_offline_then_share(browser, site):
    with guarded_page(browser, site, viewport=PHONE, is_mobile=True, has_touch=True) as page:
        ctx = page.context
        page.goto(site)
        wait_ready(page)
        page.evaluate("async () => { await navigator.serviceWorker.ready; }")
        page.wait_for_function("() => !!navigator.serviceWorker.controller", timeout=30_000)
        page.wait_for_function("async () => (await caches.keys()).some(k => k.startsWith('fieldphasor-'))")
        ctx.set_offline(True)  # the rest of the day has no signal

        new_job(page, SITE, NOTES)
        add_entry(page, "impedance")
        page.click("label[for='in-mode-z']")
        page.fill("#in-z", "4 + j3")
        settle(page)
        wait_saved(page)
        back_to_job(page)
        add_entry(page, "bus_scan")
        wait_saved(page)
        back_to_job(page)
        add_entry(page, "detuned")
        wait_saved(page)
        back_to_job(page)
        page.fill(".entry-card >> nth=0 >> input", "Panel B compressor feeder")
        wait_saved(page)
        shot(page, "job-phone")

        page.reload()
        wait_ready(page)
        page.wait_for_selector("#jobs-title")  # the app comes back where it was
        assert page.input_value("#job-site") == SITE
        assert page.input_value("#job-notes") == NOTES
        names = page.eval_on_selector_all(".entry-card input", "els => els.map(e => e.value)")
        assert len(names) == 3 and names[0] == "Panel B compressor feeder"
        page.click(".entry-card >> nth=0 >> text=Open")
        settle(page)
        assert page.input_value("#in-z") == "4 + j3"
        assert page.inner_text("[data-result='z_mag'] .a-value").strip() == "5 Ω"
        # Markup typed by the user never became markup in the page.
        assert page.locator("script:text('alert(1)')").count() == 0
        assert page.locator("img[src='x']").count() == 0

        # Share with the Web Share API (stubbed): the report file travels with the title.
        back_to_job(page)
        page.evaluate(SHARE_STUB)
        page.click("text=Share report")
        page.wait_for_function("() => window.__shared !== null", timeout=30_000)
        shared = page.evaluate("window.__shared")
        assert shared["name"].endswith(".html") and shared["type"].startswith("text/html")
        assert "Harbour Lane Bottling" in shared["title"]
        assert "<script>alert(1)</script>" not in shared["text"]
        assert "&lt;script&gt;alert(1)&lt;/script&gt;" in shared["text"]
        assert "Panel B compressor feeder" in shared["text"]

        # Without Web Share: a mailto: draft with the subject and a body within the length limit.
        page.evaluate("""() => { navigator.canShare = undefined; navigator.share = undefined;
                              window.__mailto = null; window.fieldphasor.openMailto = (u) => { window.__mailto = u; }; }""")
        page.click("text=Share report")
        page.wait_for_function("() => window.__mailto !== null", timeout=30_000)
        url = page.evaluate("window.__mailto")
        assert url.startswith("mailto:") and len(url) <= 2000
        q = parse_qs(urlparse(url).query)
        assert "Harbour Lane Bottling" in q["subject"][0]
        body = q["body"][0]
        assert SITE in body  # plain text: the name is shown as typed
        if "Summary cut to fit" in body:
            assert page.locator("text=Download full report").count() == 1


def test_persistence_across_contexts_and_rapid_edits(pw, site, fresh_profile):
    from .conftest import ARGS, CHROMIUM

    ctx = pw.chromium.launch_persistent_context(fresh_profile, executable_path=CHROMIUM, args=ARGS, viewport=PHONE)
    try:
        page = ctx.pages[0] if ctx.pages else ctx.new_page()
        page.goto(site)
        wait_ready(page)
        new_job(page, "Rapid edits test site", "")
        add_entry(page, "impedance")
        page.click("label[for='in-mode-z']")
        for i in range(100):
            page.fill("#in-z", f"{i} + j1")
        page.reload()  # at once, no waiting for the save
        wait_ready(page)
        settle(page)
        assert page.input_value("#in-z") == "99 + j1"
    finally:
        ctx.close()
    # Close the browser profile and open it again: the job is still there.
    ctx = pw.chromium.launch_persistent_context(fresh_profile, executable_path=CHROMIUM, args=ARGS, viewport=PHONE)
    try:
        page = ctx.pages[0] if ctx.pages else ctx.new_page()
        page.goto(site + "#/jobs")
        wait_ready(page)
        page.wait_for_selector(".job-card")
        assert "Rapid edits test site" in page.inner_text(".job-list")
        page.click(".job-card >> text=Open")
        page.click(".entry-card >> text=Open")
        settle(page)
        assert page.input_value("#in-z") == "99 + j1"
    finally:
        ctx.close()


def test_export_import_round_trip_and_bad_files(phone, tmp_path):
    phone.goto(phone.site + "#/jobs")
    wait_ready(phone)
    phone.wait_for_selector("#jobs-title")
    phone.click("text=Load demo job")
    phone.wait_for_selector("#job-site")
    with phone.expect_download() as dl:
        phone.click("text=Export job file")
    path = tmp_path / "export.json"
    dl.value.save_as(path)
    exported = json.loads(path.read_text())
    assert exported["format"] == "fieldphasor-jobs" and exported["version"] == 1

    # A bad file changes nothing and says why.
    phone.click("text=‹ All jobs")
    count = phone.locator(".job-card").count()
    bad = tmp_path / "bad.json"
    bad.write_text(path.read_text()[:200])  # truncated
    phone.set_input_files("#import-file", str(bad))
    phone.wait_for_selector("#job-msg .msg.fail")
    assert "Nothing was changed" in phone.inner_text("#job-msg")
    assert phone.locator(".job-card").count() == count

    # The good file comes back as an exact copy (a new id, since the original is still here).
    phone.set_input_files("#import-file", str(path))
    phone.wait_for_selector("text=Imported 1 job")
    jobs = phone.evaluate("async () => { const r = await new Promise((res, rej) => { const q = indexedDB.open('fieldphasor'); q.onsuccess = () => res(q.result); q.onerror = rej; }); return await new Promise((res) => { const g = r.transaction('jobs').objectStore('jobs').getAll(); g.onsuccess = () => res(g.result); }); }")
    assert len(jobs) == count + 1
    orig = exported["jobs"][0]
    copies = [j for j in jobs if j["id"] != orig["id"] and j["site"] == orig["site"]]
    assert copies
    strip = lambda j: {k: v for k, v in j.items() if k != "id"}
    assert strip(copies[0]) == strip(orig)


def test_delete_entry_has_undo(phone):
    phone.goto(phone.site + "#/jobs")
    wait_ready(phone)
    phone.click("text=Load demo job")
    phone.wait_for_selector("#job-site")
    n = phone.locator(".entry-card").count()
    first = phone.input_value(".entry-card >> nth=0 >> input")
    phone.click(".entry-card >> nth=0 >> text=Delete")
    phone.wait_for_function(f"() => document.querySelectorAll('.entry-card').length === {n - 1}")
    phone.click("#toast >> text=Undo")
    phone.wait_for_function(f"() => document.querySelectorAll('.entry-card').length === {n}")
    assert phone.input_value(".entry-card >> nth=0 >> input") == first
