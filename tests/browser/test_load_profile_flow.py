"""The load-profile flow on a phone with the network off: open an invented logger export through the
file control, see the duration curve and the recommended kvar, carry the design point into
correction and the bill into savings, save it with the job and reopen it. A binary file gets a
message at the file field. Screenshots at phone and tablet size go to test-artifacts/.

The figures in the page are checked against the same worksheet computed in CPython (the engine is
the same code; the reference for the figures themselves is numpy, in tests/test_load_profile_sheet.py).
"""

from __future__ import annotations

from pycore.profile_demo import demo_text

from .conftest import PHONE, TABLET, cpython_compute, guarded_page, settle, shot, wait_ready
from .test_jobs import add_entry, back_to_job, new_job, wait_saved


def logger_export(days: int = 28) -> str:
    """An invented logger export: a title line, semicolons, decimal commas, 15-minute kW and kvar."""
    rows = demo_text(days=days, interval_min=15).splitlines()
    body = [r.replace(",", ";").replace(".", ",") for r in rows[1:]]
    return "Logger LX-12 feeder 3 (invented)\nEnd of interval;kW;kvar\n" + "\n".join(body) + "\n"


def key_value(page, name: str) -> str:
    return page.inner_text(f"[data-result='{name}'] .a-value").strip()


def open_profile(page, path):
    page.set_input_files("#file-profile", str(path))
    page.wait_for_function("(n) => document.querySelector('[data-file-info]').textContent.startsWith(n)", arg=path.name)
    page.wait_for_function("(len) => document.getElementById('in-profile').value.length === len",
                           arg=len(path.read_text(encoding="utf-8")))
    settle(page)


def test_open_a_logger_export_offline_carry_it_save_and_reopen(browser, site, tmp_path):
    text = logger_export()
    path = tmp_path / "feeder3-logger.csv"
    path.write_text(text, encoding="utf-8")
    expect = cpython_compute("load_profile", {"profile": text})
    assert expect["ok"], expect["field_errors"]
    want = {r["name"]: r["display"] for r in expect["results"]}

    with guarded_page(browser, site, viewport=PHONE, device_scale_factor=2, is_mobile=True, has_touch=True) as page:
        ctx = page.context
        page.goto(site)
        wait_ready(page)
        page.evaluate("async () => { await navigator.serviceWorker.ready; }")
        page.wait_for_function("() => !!navigator.serviceWorker.controller", timeout=30_000)
        ctx.set_offline(True)

        new_job(page, "Invented Dairy, feeder 3", "")
        add_entry(page, "load_profile")
        open_profile(page, path)
        info = page.inner_text("[data-file-info]")
        assert "feeder3-logger.csv" in info and "kB" in info  # the name and size shown
        assert key_value(page, "kvar_share") == want["kvar_share"]
        assert page.locator("figcaption", has_text="kvar duration").count() == 1
        assert page.locator("figure.fig svg").first.is_visible()
        shot(page, "load-profile-phone")
        wait_saved(page)

        # saved with the job: reload offline and reopen the entry
        back_to_job(page)
        page.reload()
        wait_ready(page)
        page.wait_for_selector("#jobs-title")
        page.click(".entry-card >> nth=0 >> text=Open")
        settle(page)
        assert page.input_value("#in-profile") == text
        assert key_value(page, "kvar_share") == want["kvar_share"]

        # into correction
        page.click("button:has-text('Size the bank for the design point in Correction')")
        page.wait_for_function("() => window.fieldphasor.state.sheet.id === 'correction'")
        settle(page)
        assert page.locator("[data-result='q_need']").count() == 1
        corr_link = next(lk for lk in expect["links"] if lk["worksheet"] == "correction")
        assert page.input_value("#in-p_kw") == corr_link["inputs"]["p_kw"]

        # into savings, from the reopened entry
        page.click("#jobs-btn")  # back to the job's entry
        page.wait_for_selector("#jobs-title")
        if page.locator(".entry-card").count() == 0:
            page.click(".job-card >> text=Open")
        page.click(".entry-card >> nth=0 >> text=Open")
        page.wait_for_function("() => window.fieldphasor.state.sheet.id === 'load_profile'")
        settle(page)
        sav_link = next(lk for lk in expect["links"] if lk["worksheet"] == "savings")
        page.click(f"button:has-text({sav_link['label']!r})")
        page.wait_for_function("() => window.fieldphasor.state.sheet.id === 'savings'")
        settle(page)
        assert page.input_value("#in-pf1") == sav_link["inputs"]["pf1"]
        saved = cpython_compute("savings", sav_link["inputs"])
        assert key_value(page, "monthly") == next(r["display"] for r in saved["results"] if r["name"] == "monthly")


def test_a_binary_file_gets_a_message_at_the_field(browser, site, tmp_path):
    path = tmp_path / "workbook.xlsx"
    path.write_bytes(b"PK\x03\x04" + bytes(range(256)) * 8)  # a zip header and binary bytes (invented)
    with guarded_page(browser, site, viewport=PHONE, is_mobile=True, has_touch=True) as page:
        page.goto(site + "#/sheet/load_profile")
        wait_ready(page)
        settle(page)
        page.set_input_files("#file-profile", str(path))
        page.wait_for_selector("#err-profile:not([hidden])")
        assert "not text" in page.inner_text("#err-profile")
        assert "workbook.xlsx" in page.inner_text("[data-file-info]")


HELD_JS = """() => { const t = document.getElementById('in-profile'); const b = document.querySelector('[data-show-text]');
    return {shown: !t.hidden && t.getBoundingClientRect().height > 0, length: t.value.length,
            button: !b.hidden && b.getBoundingClientRect().height > 0, info: document.querySelector('[data-file-info]').textContent,
            limit: window.__shownChars}; }"""


def open_held_export(page, tmp_path) -> str:
    """Open a 100-day export (longer than the shell shows at once) through the file control and wait
    until it is held and computed; its text."""
    text = logger_export(days=100)
    path = tmp_path / "feeder3-100-days.csv"
    path.write_text(text, encoding="utf-8")
    page.set_input_files("#file-profile", str(path))
    page.wait_for_function("() => document.querySelector('[data-file-info]').textContent.includes('held')")
    settle(page)
    return text


def test_a_long_file_is_held_not_laid_out_kept_in_the_draft_and_shown_on_request(browser, site, tmp_path):
    # a text over the shell's display limit (SHOWN_CHARS, web/render.js) is computed and kept in the
    # draft but not put into the text area, whose layout would hold the page for seconds
    with guarded_page(browser, site, viewport=PHONE, is_mobile=True, has_touch=True) as page:
        page.goto(site + "#/sheet/load_profile")
        wait_ready(page)
        settle(page)
        page.evaluate("async () => { window.__shownChars = (await import('./render.js')).SHOWN_CHARS; }")
        text = open_held_export(page, tmp_path)
        expect = cpython_compute("load_profile", {"profile": text})
        rows = next(r["display"] for r in expect["results"] if r["name"] == "rows")
        held = page.evaluate(HELD_JS)
        assert len(text) > held["limit"] > 0
        assert not held["shown"] and held["length"] == 0 and held["button"], held
        assert held["info"].startswith("feeder3-100-days.csv") and f"{text.count(chr(10)):,} lines" in held["info"], held
        assert page.inner_text("[data-result='rows'] .r-value") == rows  # the engine had the whole text
        wait_saved(page)

        page.reload()  # the draft keeps the whole text, and holds it again
        wait_ready(page)
        settle(page)
        again = page.evaluate(HELD_JS)
        assert not again["shown"] and again["length"] == 0 and again["button"] and "held" in again["info"], again
        assert page.inner_text("[data-result='rows'] .r-value") == rows

        page.click("[data-show-text]")
        shown = page.evaluate(HELD_JS)
        assert shown["shown"] and not shown["button"] and "held" not in shown["info"], shown
        assert page.input_value("#in-profile") == text
        assert page.evaluate("document.activeElement.id") == "in-profile"


# localStorage with a small quota (phones give an origin a few MB; a logger file can be larger): a
# write over 200,000 characters fails as a full store does (QuotaExceededError, the Web Storage standard)
SMALL_QUOTA_JS = """(() => { const set = Storage.prototype.setItem;
    window.__setItemTries = {};  // key → how many writes were tried
    Storage.prototype.setItem = function (k, v) {
      window.__setItemTries[k] = (window.__setItemTries[k] || 0) + 1;
      if (String(v).length > 200000) throw new DOMException('quota (simulated)', 'QuotaExceededError');
      return set.call(this, k, v); }; })();"""


def test_a_draft_too_long_for_local_storage_survives_a_reload(browser, site, tmp_path):
    with guarded_page(browser, site, viewport=PHONE, is_mobile=True, has_touch=True) as page:
        page.add_init_script(SMALL_QUOTA_JS)
        page.goto(site + "#/sheet/load_profile")
        wait_ready(page)
        page.fill("#in-target_pf", "0.93")  # a short edit: the journal holds it
        settle(page)
        wait_saved(page)
        assert '"0.93"' in page.evaluate("localStorage.getItem('fp-journal')")
        text = open_held_export(page, tmp_path)  # too long for the journal: IndexedDB keeps it
        wait_saved(page)
        assert page.evaluate("localStorage.getItem('fp-journal')") is None  # the short, older copy went
        # once refused, the long draft is not written out again on every keystroke (25 ms each for 6 MB)
        tries = page.evaluate("() => window.__setItemTries['fp-journal']")
        remembered = page.evaluate("() => window.__setItemTries['fp-remembered']")  # the result's copy: likewise
        page.press("#in-target_pf", "End")
        page.type("#in-target_pf", "25", delay=20)  # 0.9325: each keystroke a longer draft
        settle(page)
        wait_saved(page)
        assert page.evaluate("() => window.__setItemTries['fp-journal']") == tries
        assert page.evaluate("() => window.__setItemTries['fp-remembered']") == remembered
        assert page.evaluate("() => window.fieldphasor.state.inputs.target_pf") == "0.9325"  # the typing reached the draft
        assert page.evaluate("localStorage.getItem('fp-journal')") is None
        page.reload()
        wait_ready(page)
        settle(page)
        kept = page.evaluate("() => window.fieldphasor.state.inputs")
        assert len(kept.get("profile", "")) == len(text) and kept["target_pf"] == "0.9325"
        assert "held" in page.inner_text("[data-file-info]")


def test_tablet_screenshot(browser, site, tmp_path):
    path = tmp_path / "feeder3-logger.csv"
    path.write_text(logger_export(), encoding="utf-8")
    with guarded_page(browser, site, viewport=TABLET, has_touch=True) as page:
        page.goto(site + "#/sheet/load_profile")
        wait_ready(page)
        settle(page)
        open_profile(page, path)
        assert page.locator("figcaption", has_text="kvar duration").count() == 1
        shot(page, "load-profile-tablet")


def test_a_long_compute_shows_working_and_the_page_responds(browser, site, tmp_path):
    # two years of 5-minute data (210,240 rows, invented) keep the engine busy well past the 300 ms after
    # which the shell says "Working…" (a 15-minute year can finish in about 400 ms, too close to test on)
    path = tmp_path / "two-years-5min.csv"
    path.write_text(demo_text(days=730, interval_min=5), encoding="utf-8")
    with guarded_page(browser, site, viewport=PHONE, is_mobile=True, has_touch=True) as page:
        page.goto(site + "#/sheet/load_profile")
        wait_ready(page)
        settle(page)
        page.set_input_files("#file-profile", str(path))
        # the 6 MB text is held, not laid out in the text area (which held the page over 10 s)
        page.wait_for_selector("#results > .working", state="attached", timeout=30_000)
        assert page.evaluate("document.getElementById('in-profile').hidden")
        box = page.evaluate("(() => { const r = document.querySelector('#results > .working').getBoundingClientRect(); "
                            "return [r.width, r.height]; })()")
        assert box[0] > 0 and box[1] > 0  # drawn, not only in the DOM
        assert page.text_content("#results > .working") == "Working…"
        # the page still answers a tap while the engine works: the theme changes at once
        before = page.evaluate("document.documentElement.dataset.theme")
        t0 = page.evaluate("performance.now()")
        page.click("#theme-btn")
        assert page.evaluate("document.documentElement.dataset.theme") != before
        assert page.evaluate("performance.now()") - t0 < 1000
        assert page.locator("#results > .working").count() == 1  # still working after the tap
        settle(page, timeout=60_000)
        assert page.locator("#results > .working").count() == 0
        assert page.inner_text("[data-result='rows'] .r-value").startswith("210,240")
