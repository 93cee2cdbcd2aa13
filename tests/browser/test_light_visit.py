"""A light first visit: the default start fetches the trimmed standard library and
neither micropip, the whole standard library nor pyodide-lock.json; the service worker precaches
the build once (revalidating what the page has just downloaded) and afterwards every worksheet
and every report format runs offline from the trimmed archive, answering as CPython does."""

from __future__ import annotations

import json

from app import bridge

from .conftest import PHONE, guarded_page, settle, wait_ready

ON_DEMAND_NAMES = ("pyodide-lock.json", "python_stdlib-full.zip", "micropip-")


def test_default_start_skips_on_demand_files_and_everything_runs_offline_from_the_trimmed_archive(browser, dist):
    import build

    srv, url = build.serve_in_thread(dist)
    with guarded_page(browser, url, viewport=PHONE) as page:
        srv.bytes_sent = 0
        page.goto(url + "#/sheet/correction")
        wait_ready(page)
        settle(page)
        page.evaluate("async () => { await navigator.serviceWorker.ready; }")
        page.wait_for_function("() => !!navigator.serviceWorker.controller", timeout=60_000)
        fetched = [u for u in page.guard.requests if "/pyodide/" in u or "/wheels/" in u]
        assert any(u.endswith("/pyodide/python_stdlib.zip") for u in fetched)
        assert not [u for u in fetched if any(n in u for n in ON_DEMAND_NAMES)], fetched
        # each file went over the wire about once, gzipped where that helps (not twice, as when the
        # service worker fetched with cache: "no-store"): less than the decoded precache
        precached = page.evaluate("""async () => {
            const c = await caches.open((await caches.keys()).find(k => k.startsWith('fieldphasor-')));
            let n = 0;
            for (const r of await c.keys()) n += (await (await c.match(r)).arrayBuffer()).byteLength;
            return n;
        }""")
        assert srv.bytes_sent < 0.6 * precached, (srv.bytes_sent, precached)
        srv.shutdown()
        srv.server_close()
        page.context.set_offline(True)
        page.reload()
        wait_ready(page)
        settle(page)
        out = page.evaluate("""async (sheets) => {
            const e = window.fieldphasor.engine, out = {results: {}, reports: {}};
            for (const s of sheets) out.results[s] = await e.call('compute', {worksheet: s, inputs: {}});
            const job = JSON.parse(await e.call('demo_job'));
            out.job = job;
            for (const f of ['html', 'text', 'csv'])
                out.reports[f] = await e.call('report', {job, format: f, options: {date: '2000-01-01'}});
            return out;
        }""", list(bridge.sheets()))
    for sheet_id, text in out["results"].items():
        got, ref = json.loads(text), json.loads(bridge.compute(sheet_id, "{}"))
        assert got["ok"], sheet_id
        assert [(r["name"], r["display"]) for r in got["results"]] == [(r["name"], r["display"]) for r in ref["results"]]
    job = json.dumps(out["job"])
    for fmt, text in out["reports"].items():
        got, ref = json.loads(text), json.loads(bridge.report(job, fmt, '{"date": "2000-01-01"}'))
        assert got["ok"] and got["filename"] == ref["filename"], fmt
        if fmt != "csv":  # csv carries raw floats, which may differ in the last bit (another libm)
            assert got["text"] == ref["text"], fmt
        else:
            assert got["text"].splitlines()[0] == ref["text"].splitlines()[0]
            assert len(got["text"].splitlines()) == len(ref["text"].splitlines())
