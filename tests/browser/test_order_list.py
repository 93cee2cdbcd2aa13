"""The correction worksheet's order list and step plans, and bank health's verdicts, read on a
phone (390×844) and a tablet (1024×1366): the same rows as CPython computes, no table wider
than the screen on a phone, screenshots of each for a person to look at."""

from __future__ import annotations

from .conftest import cpython_compute, settle, shot, wait_ready

ORDER = "[role=region][aria-label='What to order']"
PLANS = "[role=region][aria-label='Step plans']"


def _rows(page, region):
    return page.evaluate(
        f"() => [...document.querySelectorAll(\"{region} tbody tr\")].map(tr => [...tr.cells].map(td => td.textContent))")


def _overflow(page, region):
    """How far the region's content runs past its own width and past the screen [px]."""
    return page.evaluate(f"""() => {{
        const r = document.querySelector("{region}");
        const cells = [...r.querySelectorAll('td')].map(td => td.getBoundingClientRect().right);
        return [r.scrollWidth - r.clientWidth, Math.max(...cells) - window.innerWidth];
    }}""")


def _open_correction(page):
    page.goto(page.site + "#/sheet/correction")
    wait_ready(page)
    settle(page)


def test_order_list_reads_on_a_phone(phone):
    _open_correction(phone)
    rows = _rows(phone, ORDER)
    inputs = phone.evaluate("() => ({...window.fieldphasor.state.inputs})")
    ref = cpython_compute("correction", inputs)
    want = next(t for t in ref["tables"] if t["title"] == "What to order")
    assert rows == [[str(c) for c in r] for r in want["rows"]]  # the worker's rows are CPython's
    items = [r[1] for r in rows]
    assert "Capacitor unit" in items and "Power-factor controller" in items and "Main cable" in items
    # on a phone the list is a card per line, nothing to scroll sideways
    inner, past_screen = _overflow(phone, ORDER)
    assert inner <= 1 and past_screen <= 1, (inner, past_screen)
    first = phone.locator(f"{ORDER} tbody tr").first
    label = phone.evaluate(f"() => getComputedStyle(document.querySelector(\"{ORDER} tbody td:nth-child(4)\"), '::before').content")
    assert "Specification" in label  # each cell says what it is
    assert first.bounding_box()["width"] <= 390
    phone.locator(PLANS).scroll_into_view_if_needed()
    inner, past_screen = _overflow(phone, PLANS)
    assert inner <= 1 and past_screen <= 1
    assert len(_rows(phone, PLANS)) == 3
    phone.locator("#headline").screenshot(path=_path("order-headline-phone"))
    phone.locator(PLANS).screenshot(path=_path("order-plans-phone"))
    phone.locator(ORDER).screenshot(path=_path("order-list-phone"))
    shot(phone, "order-correction-phone")


def test_order_list_and_plans_on_a_tablet(tablet):
    _open_correction(tablet)
    assert len(_rows(tablet, PLANS)) == 3
    # wide enough for the table itself: header row shown, the table within its region
    assert tablet.locator(f"{ORDER} thead th").first.is_visible()
    tablet.locator(PLANS).screenshot(path=_path("order-plans-tablet"))
    tablet.locator(ORDER).screenshot(path=_path("order-list-tablet"))


def test_bank_health_verdicts_on_phone_and_tablet(phone, tablet):
    for page, name in ((phone, "phone"), (tablet, "tablet")):
        page.goto(page.site + "#/sheet/bank_health")
        wait_ready(page)
        settle(page)
        for rn in ("bank_state", "verdict_3"):  # the demo's third phase: −12.5 % ± 4.5, drifted
            text = page.locator(f"[data-result='{rn}'] .a-value, [data-result='{rn}'] .r-value").first.inner_text()
            assert text.startswith("Drifted"), text
        region = "[role=region][aria-label='Each phase']"
        inner, past_screen = _overflow(page, region)
        assert inner <= 1 and past_screen <= 1
        for sel, what in (("[data-result='bank_state']", "bank-state"), ("[data-result='verdict_3']", "verdict-3"),
                          (region, "phases")):
            page.locator(sel).first.screenshot(path=_path(f"order-bank-health-{what}-{name}"))
        shot(page, f"order-bank-health-{name}")


def _path(name):
    import os

    from .conftest import ARTIFACTS

    os.makedirs(ARTIFACTS, exist_ok=True)
    return os.path.join(ARTIFACTS, f"{name}.png")
