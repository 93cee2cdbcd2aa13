"""Browser test harness: Debian's Chromium driven by Playwright against the built dist/.

Every page records the requests it makes, console errors and Content-Security-Policy
violations; a test fails if any request leaves the page's own origin or any CSP violation
occurs (see ``guard``).
"""

from __future__ import annotations

import contextlib
import os
import shutil
import sys
import tempfile
from urllib.parse import urlparse

import pytest

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
sys.path.insert(0, ROOT)
import build  # noqa: E402
from helpers import run  # noqa: E402

CHROMIUM = "/usr/bin/chromium"
ARGS = [
    "--no-sandbox",
    "--disable-gpu",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--disable-quic",
    "--no-first-run",
]
PHONE = {"width": 390, "height": 844}
TABLET = {"width": 1024, "height": 1366}
ARTIFACTS = os.path.join(ROOT, "test-artifacts")
BOOT_TIMEOUT = 90_000

# Recorded in every page before any script runs: CSP violations.
INIT_SCRIPT = """
window.__csp = [];
document.addEventListener('securitypolicyviolation', e => window.__csp.push(e.violatedDirective + ' ' + e.blockedURI));
"""


def pytest_collection_modifyitems(items):
    for item in items:
        if "/browser/" in str(item.fspath).replace(os.sep, "/"):
            item.add_marker(pytest.mark.browser)


@pytest.fixture(scope="session")
def site(dist):  # dist: the shared fixture in tests/conftest.py
    srv, url = build.serve_in_thread(dist)
    yield url
    srv.shutdown()


@pytest.fixture(scope="session")
def pw():
    from playwright.sync_api import sync_playwright

    with sync_playwright() as p:
        yield p


@pytest.fixture(scope="session")
def browser(pw):
    if not os.path.exists(CHROMIUM):
        pytest.skip("Debian's chromium is not installed (apt-get install chromium)")
    b = pw.chromium.launch(executable_path=CHROMIUM, args=ARGS)
    yield b
    b.close()


class Guard:
    """Collects what a page did that it must not: foreign requests, CSP violations, errors."""

    def __init__(self, origin: str):
        self.origin = origin
        self.foreign: list[str] = []
        self.errors: list[str] = []
        self.requests: list[str] = []

    def attach(self, page):
        page.on("request", self._on_request)
        page.on("pageerror", lambda e: self.errors.append(f"pageerror: {e}"))
        page.on("console", lambda m: m.type == "error" and self.errors.append(f"console: {m.text}"))
        # Workers' requests (the engine's, the snapshot maker's) reach the page's "request" event too;
        # a listener on each worker raced the maker's end and left Playwright tasks failing at exit.

    def _on_request(self, req):
        url = req.url
        self.requests.append(url)
        u = urlparse(url)
        if u.scheme in ("data", "blob", "about", "chrome-extension"):
            return
        if f"{u.scheme}://{u.netloc}" != self.origin:
            self.foreign.append(url)

    def check(self, page=None):
        assert not self.foreign, f"requests left the app's origin: {self.foreign[:5]}"
        if page is not None:
            csp = page.evaluate("window.__csp || []")
            assert not csp, f"CSP violations: {csp}"
        bad = [e for e in self.errors if "Failed to load resource" not in e]
        assert not bad, f"errors in the page: {bad[:5]}"


def origin_of(url: str) -> str:
    u = urlparse(url)
    return f"{u.scheme}://{u.netloc}"


@contextlib.contextmanager
def guarded_page(browser, site, **context_options):
    """A page in a new context (``page.context``) whose test fails on foreign requests, CSP
    violations or page errors; the context is closed on leaving."""
    ctx = browser.new_context(**context_options)
    try:
        ctx.add_init_script(INIT_SCRIPT)
        page = ctx.new_page()
        guard = Guard(origin_of(site))
        guard.attach(page)
        ctx.on("request", guard._on_request)
        page.guard = guard
        page.site = site
        yield page
        guard.check(page)
    finally:
        ctx.close()


@pytest.fixture
def phone(browser, site):
    with guarded_page(browser, site, viewport=PHONE, device_scale_factor=2, is_mobile=True, has_touch=True) as page:
        yield page


@pytest.fixture
def tablet(browser, site):
    with guarded_page(browser, site, viewport=TABLET, device_scale_factor=1, has_touch=True) as page:
        yield page


def wait_ready(page, timeout=BOOT_TIMEOUT):
    page.wait_for_selector("#engine[data-state=ready]", timeout=timeout)


def settle(page, timeout=30_000):
    """Wait until the results on screen belong to the latest edit (debounce and compute done)."""
    page.wait_for_function(
        "() => { const s = window.fieldphasor && window.fieldphasor.state; return s && s.shownSeq === s.editSeq; }",
        timeout=timeout,
    )


wait_result = settle


def open_sheet(page, sheet_id: str):
    page.goto(page.site + f"#/sheet/{sheet_id}")
    page.wait_for_selector(f"#sheet-pick option[value='{sheet_id}']", state="attached")
    wait_ready(page)
    wait_result(page)


def reveal(page, name: str) -> None:
    """Open, as a user would with one tap, the collapsed optional section holding field ``name``."""
    toggle = page.locator(f"fieldset.opt:has([data-field='{name}']) [data-toggle-section][aria-expanded='false']")
    if toggle.count():
        toggle.first.click()


def fill(page, name: str, text: str) -> None:
    """Type ``text`` into field ``name``, opening its section first when it is collapsed."""
    reveal(page, name)
    page.fill(f"#in-{name}", text)


def cpython_compute(sheet_id: str, inputs: dict) -> dict:
    """The same worksheet computed in CPython (the reference for what Pyodide showed)."""
    return run(sheet_id, inputs)


def shot(page, name: str):
    os.makedirs(ARTIFACTS, exist_ok=True)
    page.screenshot(path=os.path.join(ARTIFACTS, f"{name}.png"), full_page=True)


@pytest.fixture
def fresh_profile():
    d = tempfile.mkdtemp(prefix="fp-profile-")
    yield d
    shutil.rmtree(d, ignore_errors=True)
