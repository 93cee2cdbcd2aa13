"""web/render.js draws results by keyed blocks and a recompute redraws only the blocks whose data
changed (web/dom.js ``reconcile``). Checked: after a run of edits the results on screen are, node for
node, what a fresh draw of the same answer gives, and a "How" the user opened stays open while its
result is unchanged."""

from __future__ import annotations

from .conftest import fill, open_sheet, settle

FRESH_DRAW_JS = """async () => {
    const { renderResults } = await import(new URL('render.js', location.href).href);
    const box = document.createElement('div');
    renderResults(box, window.fieldphasor.state.lastResult, {});
    return [box.innerHTML, document.getElementById('results-body').innerHTML];
}"""


def test_redrawn_results_equal_a_fresh_draw(phone):
    open_sheet(phone, "correction")
    # invented loads: the second changes the bank (plans, order list, tables), the third changes it back
    for kw in ("300", "900", "310", "305"):
        fill(phone, "p_kw", kw)
        settle(phone)
    fresh, shown = phone.evaluate(FRESH_DRAW_JS)
    assert shown == fresh
    assert phone.locator("#results-body [data-result='p'] .r-value").inner_text().startswith("305")


def test_an_opened_how_stays_open_while_its_result_is_unchanged(phone):
    open_sheet(phone, "correction")
    kept = phone.locator("#results-body [data-result='factor'] details.how")  # depends on voltages only
    moved = phone.locator("#results-body [data-result='p'] details.how")  # the real power: changes
    kept.locator("summary").click()
    moved.locator("summary").click()
    assert kept.evaluate("d => d.open") and moved.evaluate("d => d.open")
    fill(phone, "p_kw", "333")
    settle(phone)
    assert phone.locator("#results-body [data-result='p'] .r-value").inner_text().startswith("333")
    assert kept.evaluate("d => d.open")  # unchanged result: the user's disclosure is left as it was
    assert not moved.evaluate("d => d.open")  # a changed result is drawn anew


SVG_JS = """async (texts) => {
    const { svgNode } = await import(new URL('dom.js', location.href).href);
    const ser = new XMLSerializer();
    return texts.map((t) => {
        const n = svgNode(t);
        return {inPage: n.ownerDocument === document, svg: n instanceof SVGSVGElement,
                markup: n instanceof SVGSVGElement ? ser.serializeToString(n) : n.outerHTML};
    });
}"""

AS_DOCUMENT_JS = """(texts) => texts.map((t) => new XMLSerializer().serializeToString(
    document.importNode(new DOMParser().parseFromString(t, 'image/svg+xml').documentElement, true)))"""


def test_figures_are_drawn_as_their_svg_document_parses(phone):
    open_sheet(phone, "correction")
    texts = phone.evaluate("() => window.fieldphasor.state.lastResult.figures.map((f) => f.svg)")
    assert texts
    drawn = phone.evaluate(SVG_JS, texts)
    assert all(d["inPage"] and d["svg"] for d in drawn)
    assert [d["markup"] for d in drawn] == phone.evaluate(AS_DOCUMENT_JS, texts)
    assert phone.locator("#results-body figure.fig > svg").count() == len(texts)


def test_svg_figures_lose_scripts_and_handlers_and_bad_text_is_refused(phone):
    open_sheet(phone, "correction")
    ns = 'xmlns="http://www.w3.org/2000/svg"'
    hostile = (f'<svg {ns} onload="window.__ran=1"><script>window.__ran=2</script><rect width="1" height="1" onclick="window.__ran=3"/>'
               '<a href=" javascript:window.__ran=4"><text>t</text></a><foreignObject><div/></foreignObject></svg>')
    refused = [f"<svg {ns}><g></svg>", "<div/>", f"<svg {ns}/><svg {ns}/>", f"<svg {ns}/>tail",
               f"<svg {ns}/><![CDATA[x]]>", "", "plain text"]
    drawn = phone.evaluate(SVG_JS, [hostile, f"<!-- a note --> <svg {ns}/> ", *refused])
    clean = drawn[0]
    assert clean["svg"] and clean["inPage"]
    for bad in ("script", "foreignObject", "onload", "onclick", "javascript:"):
        assert bad not in clean["markup"]
    assert "<rect" in clean["markup"] and "<text>t</text>" in clean["markup"]
    assert drawn[1]["svg"]  # comments and white space beside the root are allowed, as in a document
    for d in drawn[2:]:
        assert not d["svg"] and "This figure could not be drawn." in d["markup"]
    phone.wait_for_timeout(50)
    assert phone.evaluate("window.__ran") is None  # no handler or script ran
    # the parser meets the inline handlers before they are dropped; the page's policy blocks (and
    # reports) them, as it did when each figure was its own document. Nothing else is reported.
    assert set(phone.evaluate("window.__csp.splice(0)")) == {"script-src-attr inline"}
    blocked = [e for e in phone.guard.errors if "inline event handler" in e]
    assert blocked and blocked == phone.guard.errors  # the console says the same, and nothing else
    phone.guard.errors.clear()
