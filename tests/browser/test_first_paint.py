"""The first frame shows the whole opening form, not the header alone.

index.html carries the opening worksheet's first form sections (build.py) and holds rendering
until the parser is past that form and the inline early.js after it (which puts a reopened draft's
remembered answer in the first frame): ``<link rel="expect" href="#jobs-view" blocking="render">``
(HTML Standard, the "expect" link type and the ``blocking`` attribute; Chromium lifts the hold
when the element with that id is inserted, so the id is on an element after both). On a slow
phone the parser otherwise yields part-way and the browser paints a frame with half a form.

The test sends index.html in two parts with a pause in the middle of the form, first as built
and then with the expect link taken out. As built, the first paint must wait for the rest of
the form; without the link it must come before (the control: it shows the pause is long enough
for the browser to paint early, so the first check can fail).
"""

from __future__ import annotations

import os
import threading
import time
from http.server import SimpleHTTPRequestHandler, ThreadingHTTPServer

import pytest

from app import OPENING_SHEET

from .conftest import PHONE

PAUSE_S = 1.0
EXPECT = '<link rel="expect" href="#jobs-view" blocking="render">'


def serve_split(dist: str, keep_expect: bool):
    """A server for dist/ that sends index.html up to its second form section, pauses, then the rest."""

    class Handler(SimpleHTTPRequestHandler):
        def __init__(self, *a, **k):
            super().__init__(*a, directory=dist, **k)

        def log_message(self, *a):
            pass

        def do_GET(self):
            if self.path.split("?")[0].split("#")[0] not in ("/", "/index.html"):
                return super().do_GET()
            with open(os.path.join(dist, "index.html"), encoding="utf-8") as fh:
                html = fh.read()
            assert EXPECT in html, "index.html no longer holds its first paint for the form"
            if not keep_expect:
                html = html.replace(EXPECT, "")
            cut = html.index("<fieldset", html.index("<fieldset") + 1)  # the second section
            head, tail = html[:cut].encode(), html[cut:].encode()
            self.send_response(200)
            self.send_header("Content-Type", "text/html; charset=utf-8")
            self.send_header("Content-Length", str(len(head) + len(tail)))
            self.send_header("Cache-Control", "no-store")
            self.end_headers()
            self.wfile.write(head)
            self.wfile.flush()
            time.sleep(PAUSE_S)
            self.wfile.write(tail)

    srv = ThreadingHTTPServer(("127.0.0.1", 0), Handler)
    threading.Thread(target=srv.serve_forever, daemon=True).start()
    return srv, f"http://127.0.0.1:{srv.server_address[1]}/"


def first_paint(browser, dist, keep_expect: bool) -> dict:
    srv, url = serve_split(dist, keep_expect)
    ctx = browser.new_context(viewport=PHONE, service_workers="block")
    try:
        page = ctx.new_page()
        page.goto(url + f"#/sheet/{OPENING_SHEET}", wait_until="load")
        page.wait_for_function("() => performance.getEntriesByName('first-contentful-paint').length > 0")
        return page.evaluate("""() => {
            const nav = performance.getEntriesByType('navigation')[0];
            return {fcp: performance.getEntriesByName('first-contentful-paint')[0].startTime,
                    // the parser had the whole document (the pause is over) by this time
                    parsed: nav.domInteractive, responseStart: nav.responseStart};
        }""")
    finally:
        ctx.close()
        srv.shutdown()


@pytest.mark.browser
def test_first_paint_waits_for_the_whole_static_form(browser, dist):
    held = first_paint(browser, dist, keep_expect=True)
    free = first_paint(browser, dist, keep_expect=False)
    pause_ms = PAUSE_S * 1000
    # control: without the hold, the browser paints the header and half a form during the pause
    assert free["fcp"] < free["responseStart"] + pause_ms * 0.8, free
    # as built: nothing is painted until the rest of the form has arrived and been parsed
    assert held["fcp"] >= held["responseStart"] + pause_ms * 0.95, held
    assert held["fcp"] >= held["parsed"], held
