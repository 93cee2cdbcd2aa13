"""The survey worksheet through the bridge: defaults, bad input at the field, links (to correction
and to savings), user text kept verbatim, and a few hundred rows in good time."""

import json
import time

import numpy as np
import pytest

import app.bridge as bridge
from helpers import res, run, table


def test_catalog_lists_both_sheets_in_order():
    cat = json.loads(bridge.catalog())
    ids = [s["id"] for s in cat]
    assert "survey" in ids and "savings" in ids
    assert ids.index("survey") < ids.index("savings")
    survey = next(s for s in cat if s["id"] == "survey")
    loads = next(f for f in survey["fields"] if f["name"] == "loads")
    assert [c["name"] for c in loads["columns"]] == ["name", "p", "pf", "q", "qty", "hours"]
    assert loads["kind"] == "table" and loads["max_rows"] >= 300


def test_survey_defaults_compute_and_agree_with_numpy():
    r = run("survey", {})
    assert r["ok"], r
    # the demo table, summed independently with numpy from the declared default
    sheet = bridge.sheets()["survey"]
    rows = json.loads(sheet.field("loads").default)
    p = np.array([float(x[1]) for x in rows])
    qty = np.array([float(x[4] or 1) for x in rows])
    q = []
    for x in rows:
        if x[3]:
            q.append(float(x[3]))
        else:
            val, *word = x[2].split()
            sign = -1.0 if word and word[0].startswith("lead") else 1.0
            q.append(sign * float(x[1]) * np.tan(np.arccos(float(val))))
    q = np.array(q)
    P, Q = np.sum(p * qty), np.sum(q * qty)
    assert res(r, "p_total")["value"] == pytest.approx(P, rel=1e-12)
    assert res(r, "q_total")["value"] == pytest.approx(Q, rel=1e-12)
    assert res(r, "pf_site")["value"] == pytest.approx(P / np.hypot(P, Q), rel=1e-12)
    tan_t = np.tan(np.arccos(0.95))
    assert res(r, "central_kvar")["value"] == pytest.approx(max(0.0, Q - P * tan_t), rel=1e-12)
    assert res(r, "individual_kvar")["value"] == pytest.approx(np.sum(np.maximum(0, q - p * tan_t) * qty), rel=1e-12)
    assert any(x.get("key") for x in r["results"])
    assert r["cautions"] and r["figures"]


@pytest.mark.parametrize("rows, words", [
    ([["Kiln fan", "30", "", "", "1", ""]], ["Row 1", "Kiln fan", "PF or Q"]),
    ([["Mill", "20", "0.8", "", "", ""], ["Kiln fan", "30", "1.3", "", "", ""]], ["Row 2", "Kiln fan", "impossible"]),
    ([["Kiln fan", "30", "0.9 wobbly", "", "", ""]], ["Row 1", "not a power factor"]),
    ([["Kiln fan", "30", "0.6", "10", "", ""]], ["Row 1", "disagree"]),
    ([["Kiln fan", "30 kvar", "0.8", "", "", ""]], ["Row 1", "P"]),
    ([["Kiln fan", "-30", "0.8", "", "", ""]], ["Row 1", "P"]),
    ([["Kiln fan", "30", "0.8", "", "", "30"]], ["Row 1", "Hours"]),
    ([["", "", "", "", "", ""]], ["row"]),
    ([["Kiln fan", "", "0.8", "", "", ""]], ["Row 1", "Kiln fan", "Enter P"]),
    ([["Bank", "0", "", "-20", "", ""]], ["no real power"]),
])
def test_survey_bad_rows_get_a_message_at_the_table(rows, words):
    r = run("survey", {"loads": table(*rows)})
    assert not r["ok"]
    msg = r["field_errors"].get("loads", "")
    for w in words:
        assert w.lower() in msg.lower(), msg
    assert r["results"] == [] and r["links"] == []


def test_survey_counts_further_bad_rows():
    rows = [["A", "10", "", "", "", ""], ["B", "10", "", "", "", ""], ["C", "10", "0.8", "", "", ""], ["D", "5", "2", "", "", ""]]
    msg = run("survey", {"loads": table(*rows)})["field_errors"]["loads"]
    assert msg.startswith("Row 1 (A)") and "2 more rows" in msg


@pytest.mark.parametrize("text", ["{not json", '"a string"', "[1, 2]"])
def test_survey_unreadable_table(text):
    r = run("survey", {"loads": text})
    assert not r["ok"] and "loads" in r["field_errors"]


@pytest.mark.parametrize("target", ["1.2", "0", "abc", ""])
def test_survey_bad_target(target):
    r = run("survey", {"target_pf": target})
    assert not r["ok"] and "target_pf" in r["field_errors"]


def test_markup_in_a_load_name_comes_back_verbatim():
    evil = '<img src=x onerror="alert(1)"><script>alert("x")</script> & Co'
    r = run("survey", {"loads": table([evil, "40", "0.75", "", "2", "8"], ["Pump", "10", "0.9", "", "", ""])})
    assert r["ok"], r
    names = [row[0] for row in r["tables"][0]["rows"]]
    assert evil in names  # plain text, unchanged: escaping is the shell's job
    assert any(link["label"] == f"Size correction for {evil}" for link in r["links"])


def test_correction_links_open_the_correction_sheet_prefilled():
    r = run("survey", {"loads": table(["Press", "40", "0.75", "", "3", ""], ["Lights", "10", "0.99", "", "", ""]),
                       "target_pf": "0.96"})
    links = [x for x in r["links"] if x["worksheet"] == "correction"]
    assert len(links) == 1  # the lights are already above the target
    inp = links[0]["inputs"]
    assert inp["basis"] == "p_pf"
    assert float(inp["p_kw"]) == pytest.approx(40)  # per unit, not × quantity
    assert float(inp["pf1"]) == pytest.approx(0.75, abs=1e-4)
    assert float(inp["pf2"]) == pytest.approx(0.96)
    # every key is a field of the correction worksheet, and it computes from them
    corr = bridge.sheets()["correction"]
    names = {f.name for f in corr.fields}
    assert set(inp) <= names, set(inp) - names
    r2 = run("correction", inp)
    assert r2["ok"], r2["field_errors"]
    sav = [x for x in r["links"] if x["worksheet"] == "savings"]
    assert sav and float(sav[0]["inputs"]["p_kw"]) == pytest.approx(130)


def test_links_capped_at_twenty_and_said_so():
    rows = [[f"Motor {i}", str(5 + i), "0.8", "", "", ""] for i in range(35)]
    r = run("survey", {"loads": table(*rows)})
    links = [x for x in r["links"] if x["worksheet"] == "correction"]
    assert len(links) == 20
    # the twenty largest needs: motors 15..34 (P rises with i at the same PF)
    assert {x["label"] for x in links} == {f"Size correction for Motor {i}" for i in range(15, 35)}
    assert any("20 rows" in n and "15 more rows" in n for n in r["notes"])


def test_leading_site_warns_and_offers_no_bank():
    r = run("survey", {"loads": table(["Drive filter", "20", "0.5 lead", "", "", ""], ["Fan", "5", "0.9", "", "", ""])})
    assert r["ok"]
    assert res(r, "central_kvar")["value"] == 0
    assert "leading" in res(r, "pf_site")["display"]
    assert any("leading" in w for w in r["warnings"])


def test_several_hundred_rows_quickly():
    rng = np.random.default_rng(7)
    n = 500
    p = rng.uniform(0.5, 90, n).round(2)
    pf = rng.uniform(0.6, 0.99, n).round(3)
    qty = rng.integers(1, 6, n)
    rows = [[f"Load {i}", f"{p[i]}", f"{pf[i]}", "", f"{qty[i]}", "12"] for i in range(n)]
    t0 = time.perf_counter()
    r = run("survey", {"loads": table(*rows)})
    dt = time.perf_counter() - t0
    assert r["ok"]
    assert len(r["tables"][0]["rows"]) == n + 1  # plus the total row
    assert res(r, "p_total")["value"] == pytest.approx(float(np.sum(p * qty)), rel=1e-12)
    assert dt < 1.0, f"500 rows took {dt:.2f} s"  # CPython; Pyodide is a few times slower


def test_too_many_rows_is_refused():
    rows = [["x", "1", "0.9", "", "", ""]] * 501
    r = run("survey", {"loads": table(*rows)})
    assert not r["ok"] and "500" in r["field_errors"]["loads"]


def test_survey_link_opens_savings():
    r = run("survey", {})
    link = next(x for x in r["links"] if x["worksheet"] == "savings")
    r2 = run("savings", link["inputs"])
    assert r2["ok"], r2
    assert float(link["inputs"]["pf1"]) == pytest.approx(res(r, "pf_site")["value"], abs=1e-4)
