"""Later starts restore this build's interpreter memory snapshot, and a
restored engine answers exactly as CPython does; a snapshot that fails its check is refused."""

from __future__ import annotations

import json

from app import bridge

from helpers import same_csv_cells

from .conftest import PHONE, cpython_compute, guarded_page, settle, wait_ready

SNAPSHOT_WAIT = 120_000  # the maker boots a second interpreter a few seconds after the first result


def marks(page) -> dict:
    return page.evaluate("() => window.fieldphasor.engine.marks")


def shown(page) -> list:
    return [(r["name"], r["display"]) for r in page.evaluate("() => window.fieldphasor.state.lastResult.results")]


def reference(page, sheet_id: str) -> list:
    inputs = page.evaluate("() => ({...window.fieldphasor.state.inputs})")
    return [(r["name"], r["display"]) for r in cpython_compute(sheet_id, inputs)["results"]]


# Every worker the page constructs, with whether the service worker controlled the page then.
RECORD_WORKERS = """(() => {
    const Real = window.Worker;
    window.__workers = [];
    window.Worker = class extends Real {
        constructor(url, options) {
            super(url, options);
            window.__workers.push({ name: (options || {}).name || '', controlled: !!navigator.serviceWorker.controller });
        }
    };
})()"""


def first_visit_until_snapshot(page, site):
    page.goto(site + "#/sheet/correction")
    wait_ready(page)
    settle(page)
    page.wait_for_function("() => 'snapshot-saved' in window.fieldphasor.engine.marks", timeout=SNAPSHOT_WAIT)
    assert "python-ready" in marks(page)  # this start booted normally: there was no snapshot yet


def test_later_start_restores_snapshot_and_every_worksheet_answers_as_cpython(browser, site):
    with guarded_page(browser, site, viewport=PHONE) as page:
        first_visit_until_snapshot(page, site)
        page.context.set_offline(True)
        page.reload()
        wait_ready(page)
        settle(page)
        m = marks(page)
        assert "snapshot-checked" in m and "python-ready" not in m, m
        # Reference: the same app code in CPython, the same inputs (the engine must not drift).
        for sheet_id in bridge.sheets():
            page.evaluate("(id) => window.fieldphasor.open(id)", sheet_id)
            page.wait_for_function(
                """(id) => { const s = window.fieldphasor.state;
                            return s.sheet && s.sheet.id === id && s.lastResult && s.shownSeq === s.editSeq; }""",
                arg=sheet_id,
            )
            assert shown(page) == reference(page, sheet_id), sheet_id
        # Reports, which import modules the worksheets do not, match CPython's text exactly.
        job = json.loads(bridge.demo_job())
        options = {"date": "2026-03-04"}
        for fmt in ("html", "text", "csv"):
            got = page.evaluate(
                "([job, fmt, options]) => window.fieldphasor.engine.json('report', {job, format: fmt, options})",
                [job, fmt, options],
            )
            want = json.loads(bridge.report(json.dumps(job), fmt, json.dumps(options)))
            assert got["ok"] and want["ok"], fmt
            if fmt == "csv":
                # CSV carries full-precision floats; Python 3.12+ sums floats with compensation, so
                # the last digit may differ from this CPython's. Numbers agree to 1e-12, text exactly.
                assert same_csv_cells(got.pop("text"), want.pop("text"))
            assert got == want, fmt
        # The snapshot holds only what the app imported; a module imported later (the benchmark's
        # timing cases: see test_registry) comes from the app's wheel, written back after a restore.
        timed = page.evaluate("() => window.fieldphasor.engine.json('time_call', {name: 'opening_sheet', runs: 1})")
        assert timed.get("name") == "opening_sheet" and len(timed["ms"]) == 1, timed


def test_snapshot_maker_is_started_by_the_page_once_the_service_worker_controls_it(browser, site):
    # Chromium keeps compiled wasm code beside the Cache Storage entry a response came from, which
    # only a worker the service worker controls reads; the engine worker of a first visit is not.
    with guarded_page(browser, site, viewport=PHONE) as page:
        page.context.add_init_script(RECORD_WORKERS)
        first_visit_until_snapshot(page, site)
        workers = page.evaluate("() => window.__workers")
        makers = [w for w in workers if w["name"] == "snapshot-maker"]
        assert makers == [{"name": "snapshot-maker", "controlled": True}], workers
        # the engine worker of this first visit started before the service worker took over
        assert workers[0] == {"name": "engine", "controlled": False}, workers
        # kept a few seconds after saving, for V8 to hand over its compiled code (web/engine.js)
        page.wait_for_function("() => 'snapshot-maker-ended' in window.fieldphasor.engine.marks", timeout=30_000)
        m = marks(page)
        assert m["snapshot-maker-ended"] - m["snapshot-saved"] >= 3_900, m


def test_snapshot_that_fails_its_check_is_refused_and_engine_boots_normally(browser, site):
    with guarded_page(browser, site, viewport=PHONE) as page:
        first_visit_until_snapshot(page, site)
        key = page.evaluate("async () => (await (await caches.open('fp-snapshot')).keys())[0].url")
        real = "async (key) => new Uint8Array(await (await (await caches.open('fp-snapshot')).match(key)).arrayBuffer())"
        layout = page.evaluate("async (key) => (await (await caches.open('fp-snapshot')).match(key)).headers.get('x-fp-layout')", key)
        tamper = """async ([key, kind, layout]) => {
            const c = await caches.open('fp-snapshot');
            // 'label': a real snapshot whose recorded probe digest is not what it computes;
            // 'bytes': not a snapshot at all, under a plausible label and the real layout
            const body = kind === 'label' ? window.__realSnapshot : new Uint8Array(4096);
            const headers = {'x-fp-probe': '0'.repeat(64), 'x-fp-layout': layout};
            await c.put(key, new Response(body, {headers}));
        }"""
        page.context.set_offline(True)  # the refusals, and the snapshot made again, all offline
        for kind in ("label", "bytes"):
            if kind == "label":
                page.evaluate(f"async (key) => {{ window.__realSnapshot = await ({real})(key); }}", key)
                # stored without its zero pages: the body is well under the memory it restores
                assert 0 < page.evaluate("() => window.__realSnapshot.length") < int(layout.split(";")[0]) * 0.8
            page.evaluate(tamper, [key, kind, layout])
            page.reload()
            wait_ready(page)
            settle(page)
            m = marks(page)
            assert "snapshot-rejected" in m and "snapshot-checked" not in m and "python-ready" in m, (kind, m)
            assert shown(page) == reference(page, "correction"), kind
            # the refused snapshot was deleted, so the next start does not try it again
            assert page.evaluate("async () => (await (await caches.open('fp-snapshot')).keys()).length") == 0, kind
        # a start without a snapshot makes a new one (offline: the maker's files come from the
        # service worker's cache), and the start after that uses it
        page.wait_for_function("() => 'snapshot-saved' in window.fieldphasor.engine.marks", timeout=SNAPSHOT_WAIT)
        page.reload()
        wait_ready(page)
        settle(page)
        assert "snapshot-checked" in marks(page)
        assert shown(page) == reference(page, "correction")
