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
