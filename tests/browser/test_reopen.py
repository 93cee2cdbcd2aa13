"""Reopening shows the last result at once: the engine's answer for a draft or job entry is remembered
beside it, keyed by the build and the exact inputs, shown before the engine is up and marked until
the engine confirms it; never shown against other inputs or under another build.

The engine is held back by not serving its runtime (``pyodide.asm.wasm``) and the app wheel until
the test releases them, so "before the engine is ready" is certain, not a race. Service workers are
blocked in these contexts so that every request passes the test's routes."""

from __future__ import annotations

import base64
import contextlib
import json
import os

from app import OPENING_SHEET

from .conftest import ARTIFACTS, PHONE, cpython_compute, guarded_page, settle, shot, wait_ready

SHEET = OPENING_SHEET
FIELD = "p_kw"  # a number field of the opening worksheet, shown with its default choices
VALUE, OTHER, ENTRY_VALUE = "300", "550", "375"  # invented readings [kW]

HEADLINE_JS = """() => { const h = document.getElementById('headline');
    return [...h.childNodes].filter(n => n.nodeType === 3).map(n => n.data).join(''); }"""
ROWS_JS = """() => [...document.querySelectorAll('#results-body [data-result]')].map(e =>
    e.dataset.result + '=' + (e.querySelector('.a-value, .r-value') || {textContent: ''}).textContent)"""
STATE_JS = """() => { const h = document.getElementById('headline');
    return {engine: window.fieldphasor.engine.state, recall: window.fieldphasor.perf.recall,
            remembered: window.fieldphasor.state.remembered, headRemembered: h.hasAttribute('data-remembered'),
            pending: h.hasAttribute('data-pending'), headHidden: h.hidden,
            marks: [...document.querySelectorAll('.remembered-mark')].map(e => e.textContent),
            value: document.getElementById('in-' + arguments[0]).value}; }"""


@contextlib.contextmanager
def reopen_page(browser, site):
    with guarded_page(browser, site, viewport=PHONE, device_scale_factor=2, is_mobile=True, has_touch=True,
                      service_workers="block") as page:
        yield page


def state(page):
    return page.evaluate(STATE_JS.replace("arguments[0]", json.dumps(FIELD)))


def expected_headline(inputs):
    """The headline the shell writes for these inputs, from the same code run by CPython."""
    res = cpython_compute(SHEET, inputs)
    first = next(r for r in res["results"] if r.get("key"))
    return f'{first["label"]}: {first["display"]} — all results ↓'


class HeldEngine:
    """Requests for the engine's runtime and the app wheel (or ``patterns``) wait until ``release()``."""

    PATTERNS = ("**/pyodide/pyodide.asm.wasm", "**/wheels/*.whl")

    def __init__(self, ctx, patterns=PATTERNS):
        self.ctx = ctx
        self.held = []
        self.PATTERNS = patterns
        for p in self.PATTERNS:
            ctx.route(p, self._hold)

    def _hold(self, route):
        self.held.append(route)

    def release(self):
        for p in self.PATTERNS:
            self.ctx.unroute(p, self._hold)
        for r in self.held:
            with contextlib.suppress(Exception):  # requests of a page since reloaded are gone
                r.continue_()
        self.held.clear()


def reopen_held(page):
    """Reload with the engine held; wait until the shell has decided whether to show a remembered result."""
    held = HeldEngine(page.context)
    page.reload()
    page.wait_for_function("() => window.fieldphasor && ['shown', 'none'].includes(window.fieldphasor.perf.recall)")
    assert page.evaluate("() => window.fieldphasor.engine.state") == "starting"
    return held


def edit_and_settle(page, value):
    """Edit, wait for the engine's answer, and for the shell to have remembered it (just after its frame)."""
    page.fill(f"#in-{FIELD}", value)
    settle(page)
    page.wait_for_function("""([field, value]) => {
        const r = JSON.parse(localStorage.getItem('fp-remembered') || 'null');
        return r && r.inputs.includes(JSON.stringify([field, value])); }""", arg=[FIELD, value])


def open_draft(page, site):
    """Open the opening worksheet, type VALUE and wait until its answer is remembered; its inputs."""
    page.goto(site + f"#/sheet/{SHEET}")
    wait_ready(page)
    edit_and_settle(page, VALUE)
    return page.evaluate("() => ({...window.fieldphasor.state.inputs})")


def field_top(page):
    return page.evaluate("() => document.querySelector('#form .field').getBoundingClientRect().top + scrollY")


def test_reopened_draft_shows_its_remembered_result_before_the_engine(browser, site):
    with reopen_page(browser, site) as page:
        inputs = open_draft(page, site)
        assert inputs[FIELD] == VALUE
        want = expected_headline(inputs)
        assert want != expected_headline({**inputs, FIELD: OTHER})  # the readings give different answers
        assert page.evaluate(HEADLINE_JS) == want
        rows = page.evaluate(ROWS_JS)
        assert rows

        held = reopen_held(page)
        s = state(page)
        assert s["recall"] == "shown" and s["remembered"] and s["headRemembered"], s
        assert s["value"] == VALUE
        assert "Remembered — confirming…" in s["marks"], s
        # on a phone the headline's three-line clamp would clip its border mark, so the engine pill
        # says it instead, and the results open with the note
        assert not page.is_visible("#headline .remembered-mark")
        assert page.text_content("#engine") == "Checking…"
        assert page.is_visible("#results-body .remembered-mark")
        assert page.evaluate(HEADLINE_JS) == want
        assert page.evaluate(ROWS_JS) == rows
        before = field_top(page)
        scroll = page.evaluate("() => scrollY")
        shot(page, "reopen-remembered-390")
        page.evaluate("() => scrollTo(0, 0)")  # a reload keeps the scroll position of the edit
        page.screenshot(path=os.path.join(ARTIFACTS, "reopen-remembered-390-screen.png"))  # what a phone shows
        page.evaluate(f"() => scrollTo(0, {scroll})")
        perf = page.evaluate("""() => ({fcp: performance.getEntriesByName('first-contentful-paint')[0].startTime,
                                        shell: window.fieldphasor.perf.inputReady,
                                        shown: window.fieldphasor.perf.rememberedPainted})""")
        print(f"\nreopen (no service worker, engine held): first paint {perf['fcp']:.0f} ms, "
              f"shell's form {perf['shell']:.0f} ms, remembered result painted {perf['shown']:.0f} ms")

        held.release()
        wait_ready(page)
        settle(page)
        s = state(page)
        assert not s["remembered"] and not s["headRemembered"] and s["marks"] == [], s
        assert page.evaluate(HEADLINE_JS) == want
        assert page.evaluate(ROWS_JS) == rows
        assert field_top(page) == before  # confirming moves nothing


def test_edit_before_the_engine_shows_pending_never_the_old_answer(browser, site):
    with reopen_page(browser, site) as page:
        inputs = open_draft(page, site)

        held = reopen_held(page)
        assert state(page)["recall"] == "shown"
        before = field_top(page)
        page.fill(f"#in-{FIELD}", OTHER)  # the engine is still held
        s = state(page)
        assert s["engine"] == "starting"
        assert not s["remembered"] and not s["headRemembered"] and s["marks"] == [], s
        assert page.text_content("#engine") == "Starting…"  # nothing remembered on screen now
        assert s["pending"] and not s["headHidden"], s
        assert "pending" in page.text_content("#headline .pending-msg").lower()
        assert page.evaluate(ROWS_JS) == []  # no answer on screen for the new reading
        assert field_top(page) == before  # the pending headline keeps the answer's size

        # Reopen again, engine still held: the draft now holds OTHER; what is remembered is for VALUE.
        held.release()
        held = reopen_held(page)
        s = state(page)
        assert s["value"] == OTHER
        assert s["recall"] == "none" and not s["remembered"] and s["marks"] == [], s
        assert page.evaluate(ROWS_JS) == []
        assert expected_headline(inputs).split(" — ")[0] not in page.text_content("#headline")

        held.release()
        wait_ready(page)
        settle(page)
        assert page.evaluate(HEADLINE_JS) == expected_headline({**inputs, FIELD: OTHER})


def test_result_remembered_under_another_build_is_not_shown(browser, site):
    with reopen_page(browser, site) as page:
        page.goto(site + f"#/sheet/{SHEET}")
        wait_ready(page)
        edit_and_settle(page, VALUE)

        # the synchronous copy (localStorage), labelled with another build
        page.evaluate("""() => { const r = JSON.parse(localStorage.getItem('fp-remembered'));
            const other = r.build.replace(/[0-9a-f]{64}/, '0'.repeat(64));  // another app wheel
            if (other === r.build) throw new Error('the build has no SHA-256 in it');
            r.build = other;
            localStorage.setItem('fp-remembered', JSON.stringify(r)); }""")
        held = reopen_held(page)
        s = state(page)
        assert s["recall"] == "none" and not s["remembered"] and s["marks"] == [], s
        assert page.evaluate(ROWS_JS) == []

        # without the synchronous copy, the one in IndexedDB is used (control: it matches) ...
        page.evaluate("() => localStorage.removeItem('fp-remembered')")
        held.release()
        held = reopen_held(page)
        assert state(page)["recall"] == "shown"
        assert page.evaluate(ROWS_JS)

        # ... and not when it too is from another build
        page.evaluate("""() => new Promise((res, rej) => {
            const rq = indexedDB.open('fieldphasor');
            rq.onsuccess = () => {
                const t = rq.result.transaction('drafts', 'readwrite'), s = t.objectStore('drafts');
                const key = 'result:sheet:' + window.fieldphasor.state.sheet.id;
                s.get(key).onsuccess = (e) => { const r = e.target.result; r.build = 'another build'; s.put(r, key); };
                t.oncomplete = () => { rq.result.close(); res(); };
                t.onerror = () => rej(t.error);
            };
        })""")
        page.evaluate("() => localStorage.removeItem('fp-remembered')")
        held.release()
        held = reopen_held(page)
        s = state(page)
        assert s["recall"] == "none" and s["marks"] == [], s
        assert page.evaluate(ROWS_JS) == []
        held.release()
        wait_ready(page)
        settle(page)


def test_job_entry_reopens_with_its_remembered_result(browser, site):
    with reopen_page(browser, site) as page:
        page.goto(site + f"#/sheet/{SHEET}")
        wait_ready(page)
        edit_and_settle(page, VALUE)
        page.click("text=Save to a job")
        page.wait_for_function("() => location.hash.startsWith('#/entry/')")
        settle(page)
        edit_and_settle(page, ENTRY_VALUE)
        inputs = page.evaluate("() => ({...window.fieldphasor.state.inputs})")
        want = expected_headline(inputs)
        assert want != expected_headline({**inputs, FIELD: VALUE})
        assert page.evaluate(HEADLINE_JS) == want
        entry_hash = page.evaluate("() => location.hash")

        held = reopen_held(page)
        assert page.evaluate("() => location.hash") == entry_hash
        s = state(page)
        assert s["recall"] == "shown" and s["remembered"] and s["value"] == ENTRY_VALUE, s
        assert page.evaluate(HEADLINE_JS) == want
        assert page.evaluate("() => window.fieldphasor.state.target !== null")

        # from IndexedDB too: the worksheet's own draft was remembered for VALUE, the entry for ENTRY_VALUE
        page.evaluate("() => localStorage.removeItem('fp-remembered')")
        held.release()
        held = reopen_held(page)
        s = state(page)
        assert s["recall"] == "shown" and s["value"] == ENTRY_VALUE, s
        assert page.evaluate(HEADLINE_JS) == want

        held.release()
        wait_ready(page)
        settle(page)
        s = state(page)
        assert not s["remembered"] and s["marks"] == [], s
        assert page.evaluate(HEADLINE_JS) == want

        # deleting the entry deletes what was remembered for it
        stored = """(key) => new Promise((res) => { const rq = indexedDB.open('fieldphasor');
            rq.onsuccess = () => { const g = rq.result.transaction('drafts').objectStore('drafts').get(key);
                g.onsuccess = () => { rq.result.close(); res(g.result !== undefined); }; }; })"""
        job_id, entry_id = entry_hash.split("/")[2:4]
        key = f"result:entry:{job_id}/{entry_id}"
        assert page.evaluate(stored, key)
        page.evaluate("([j, e]) => window.fieldphasor.jobs.deleteEntry(j, e)", [job_id, entry_id])
        for _ in range(50):  # the delete is queued after the job's write
            if not page.evaluate(stored, key):
                break
            page.wait_for_timeout(100)
        assert not page.evaluate(stored, key)
        assert page.evaluate(stored, f"result:sheet:{SHEET}")  # the worksheet's own draft keeps its result


def test_engine_answer_replaces_a_different_remembered_one_entirely(browser, site):
    with reopen_page(browser, site) as page:
        page.goto(site + f"#/sheet/{SHEET}")
        wait_ready(page)
        edit_and_settle(page, VALUE)
        want = page.evaluate(HEADLINE_JS)
        rows = page.evaluate(ROWS_JS)
        page.wait_for_function("() => localStorage.getItem('fp-remembered')")
        # the same build and inputs, but a remembered answer that differs from what the engine will say
        page.evaluate("""() => { const r = JSON.parse(localStorage.getItem('fp-remembered'));
            const k = r.result.results.find(x => x.key); k.display = 'STALE 999';
            r.result.warnings = [...(r.result.warnings || []), 'STALE warning'];
            localStorage.setItem('fp-remembered', JSON.stringify(r)); }""")
        held = reopen_held(page)
        assert state(page)["recall"] == "shown"
        assert "STALE 999" in page.evaluate(HEADLINE_JS)
        assert "STALE warning" in page.text_content("#results-body")

        held.release()
        wait_ready(page)
        settle(page)
        s = state(page)
        assert not s["remembered"] and s["marks"] == [], s
        assert page.evaluate(HEADLINE_JS) == want
        assert page.evaluate(ROWS_JS) == rows
        assert "STALE" not in page.text_content("#sheet-view")
        assert "STALE" not in page.text_content("#announce")


# ---- drawn before the shell (web/remembered.js) ----------------------------------------------------
SHELL = ("**/app.js",)  # the shell's entry module: held, only index.html and remembered.js have run
EARLY_JS = """() => ({early: window.fieldphasor && window.fieldphasor.perf.early,
    shell: !!(window.fieldphasor && window.fieldphasor.state),
    static: document.getElementById('form').hasAttribute('data-static'),
    remembered: document.getElementById('results').hasAttribute('data-remembered'),
    pending: document.getElementById('headline').hasAttribute('data-pending'),
    marks: [...document.querySelectorAll('.remembered-mark')].map(e => e.textContent)})"""


def screen_now(page, name):
    """What a phone shows now (Playwright's own screenshot waits for the page's load, which waits for the shell)."""
    data = page.context.new_cdp_session(page).send("Page.captureScreenshot", {"format": "png"})["data"]
    os.makedirs(ARTIFACTS, exist_ok=True)
    with open(os.path.join(ARTIFACTS, f"{name}.png"), "wb") as fh:
        fh.write(base64.b64decode(data))


def reopen_before_shell(page):
    """Reload with the engine and the shell held; wait until remembered.js has decided."""
    engine, shell = HeldEngine(page.context), HeldEngine(page.context, SHELL)
    page.reload(wait_until="commit")  # the page's load waits for the shell
    page.wait_for_function("() => window.fieldphasor && window.fieldphasor.perf.early")
    s = page.evaluate(EARLY_JS)
    assert not s["shell"] and s["static"], s  # the shell has not run: the form is index.html's
    return engine, shell


def test_remembered_result_is_drawn_before_the_shell_and_kept_by_it(browser, site):
    with reopen_page(browser, site) as page:
        page.goto(site + f"#/sheet/{SHEET}")
        wait_ready(page)
        edit_and_settle(page, VALUE)  # a field of the static form: the draft differs from index.html
        inputs = page.evaluate("() => ({...window.fieldphasor.state.inputs})")
        want = expected_headline(inputs)
        rows = page.evaluate(ROWS_JS)

        engine, shell = reopen_before_shell(page)
        s = page.evaluate(EARLY_JS)
        assert s["early"] == "drawn" and s["remembered"] and not s["pending"], s
        assert "Remembered — confirming…" in s["marks"], s
        # drawn before the first frame (index.html holds it for remembered.js), so that frame shows it
        page.wait_for_function("() => performance.getEntriesByName('first-contentful-paint').length")
        shown, fcp = page.evaluate("""() => [window.fieldphasor.perf.rememberedShown,
            performance.getEntriesByName('first-contentful-paint')[0].startTime]""")
        assert shown < fcp, (shown, fcp)
        assert page.input_value(f"#in-{FIELD}") == VALUE  # the draft's text, put in the static form
        assert page.evaluate(HEADLINE_JS) == want
        assert page.evaluate(ROWS_JS) == rows
        before = field_top(page)
        page.evaluate("() => scrollTo(0, 0)")
        screen_now(page, "reopen-early-390-screen")

        shell.release()  # the shell takes the drawn result over as it is
        page.wait_for_function("() => window.fieldphasor.perf.recall === 'shown'")
        s = state(page)
        assert s["engine"] == "starting" and s["remembered"] and s["headRemembered"] and s["value"] == VALUE, s
        assert page.evaluate(HEADLINE_JS) == want
        assert page.evaluate(ROWS_JS) == rows
        assert field_top(page) == before

        engine.release()
        wait_ready(page)
        settle(page)
        s = state(page)
        assert not s["remembered"] and s["marks"] == [], s
        assert page.evaluate(HEADLINE_JS) == want
        assert field_top(page) == before
        page.screenshot(path=os.path.join(ARTIFACTS, "reopen-early-confirmed-390-screen.png"))


def test_edit_before_the_shell_takes_the_early_result_away(browser, site):
    with reopen_page(browser, site) as page:
        inputs = open_draft(page, site)

        engine, shell = reopen_before_shell(page)
        assert page.evaluate(EARLY_JS)["early"] == "drawn"
        before = field_top(page)
        page.fill(f"#in-{FIELD}", OTHER)  # typed into index.html's form: no shell, no engine
        s = page.evaluate(EARLY_JS)
        assert not s["remembered"] and s["pending"] and s["marks"] == [], s
        assert page.evaluate(ROWS_JS) == []
        assert "pending" in page.text_content("#headline .pending-msg").lower()
        assert field_top(page) == before

        shell.release()  # the shell keeps the text typed and the pending answer
        page.wait_for_function("() => window.fieldphasor.perf.recall === 'none'")
        s = state(page)
        assert s["value"] == OTHER and not s["remembered"] and s["pending"] and not s["headHidden"], s
        assert page.evaluate("() => window.fieldphasor.state.inputs.p_kw") == OTHER
        assert page.evaluate(ROWS_JS) == []
        assert field_top(page) == before

        engine.release()
        wait_ready(page)
        settle(page)
        assert page.evaluate(HEADLINE_JS) == expected_headline({**inputs, FIELD: OTHER})


def test_edit_before_any_module_takes_the_first_frame_answer_away(browser, site):
    """Only index.html and its inline early.js have run (remembered.js and the shell held): the first
    frame's answer bar goes at the first keystroke, and the modules keep it pending when they arrive."""
    with reopen_page(browser, site) as page:
        inputs = open_draft(page, site)
        want = expected_headline(inputs)

        engine, modules = HeldEngine(page.context), HeldEngine(page.context, ("**/remembered.js", "**/app.js"))
        page.reload(wait_until="commit")
        page.wait_for_function("() => window.__fpEarly && window.__fpEarly.state === 'drawn'")
        assert page.evaluate("() => !window.fieldphasor || !window.fieldphasor.state")  # no module has run
        assert page.input_value(f"#in-{FIELD}") == VALUE
        assert page.evaluate(HEADLINE_JS) == want
        # and at the top of the results, for a wide screen where the answer bar is hidden
        assert page.text_content("#results-body .early-answer") == want.removesuffix(" — all results ↓")
        before = field_top(page)
        page.fill(f"#in-{FIELD}", OTHER)
        s = page.evaluate(EARLY_JS.replace("window.fieldphasor && window.fieldphasor.perf.early", "window.__fpEarly.state"))
        assert s["early"] == "withdrawn" and not s["remembered"] and s["pending"] and s["marks"] == [], s
        assert want.split(" — ")[0] not in page.evaluate(HEADLINE_JS)
        assert want.split(" — ")[0] not in page.text_content("#results-body")
        assert "pending" in page.text_content("#headline .pending-msg").lower()
        assert field_top(page) == before

        modules.release()  # the modules and the shell keep the text typed and the pending answer
        page.wait_for_function("() => window.fieldphasor && window.fieldphasor.perf && window.fieldphasor.perf.recall === 'none'")
        s = state(page)
        assert s["value"] == OTHER and not s["remembered"] and s["pending"] and s["marks"] == [], s
        assert page.evaluate(ROWS_JS) == []
        engine.release()
        wait_ready(page)
        settle(page)
        assert page.evaluate(HEADLINE_JS) == expected_headline({**inputs, FIELD: OTHER})


def test_not_drawn_before_the_shell_under_another_build_or_another_choice(browser, site):
    with reopen_page(browser, site) as page:
        page.goto(site + f"#/sheet/{SHEET}")
        wait_ready(page)
        edit_and_settle(page, VALUE)
        page.evaluate("""() => { const r = JSON.parse(localStorage.getItem('fp-remembered'));
            r.build = r.build.replace(/[0-9a-f]{64}/, '0'.repeat(64));
            localStorage.setItem('fp-remembered', JSON.stringify(r)); }""")
        engine, shell = reopen_before_shell(page)
        s = page.evaluate(EARLY_JS)
        assert s["early"] == "none" and not s["remembered"] and s["marks"] == [], s
        assert page.evaluate(ROWS_JS) == []
        shell.release()
        engine.release()
        wait_ready(page)
        settle(page)

        # a choice in the static form that the draft holds otherwise: left to the shell, which shows
        # and hides the fields it governs; the shell then shows the remembered result (control)
        page.check("#in-phases-1")
        settle(page)
        page.wait_for_function("""() => {
            const r = JSON.parse(localStorage.getItem('fp-remembered') || 'null');
            return r && r.inputs.includes('["phases","1"]'); }""")
        engine, shell = reopen_before_shell(page)
        s = page.evaluate(EARLY_JS)
        assert s["early"] == "none" and not s["remembered"], s
        assert page.is_checked("#in-phases-3")  # index.html's form as served
        shell.release()
        page.wait_for_function("() => window.fieldphasor.perf.recall === 'shown'")
        assert page.is_checked("#in-phases-1")
        engine.release()
        wait_ready(page)
        settle(page)
