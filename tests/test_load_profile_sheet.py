"""The load-profile worksheet: defaults, the invented files, links into correction and
savings, messages at the right field, and the time a year of 15-minute data takes through
``app.bridge.compute`` (printed, never asserted)."""

from __future__ import annotations

import json
import math
import time
from pathlib import Path

import numpy as np
import pytest

from app import bridge
from helpers import res, run
from pycore.profile_demo import demo_text
from pycore.profile_read import read_profile

DATA = Path(__file__).parent / "data"


def test_defaults_compute_and_match_numpy():
    out = run("load_profile", {})
    assert out["ok"], out["field_errors"]
    prof = read_profile(bridge.sheets()["load_profile"].field("profile").default)
    p, q = np.array(prof.p), np.array(prof.q)
    k = math.tan(math.acos(0.95))
    need = np.maximum(0, q - p * k)
    # numpy as the reference for the headline figures
    assert res(out, "kvar_share")["value"] == pytest.approx(np.quantile(need, 0.95, method="inverted_cdf"))
    assert res(out, "kwh")["value"] == pytest.approx(np.sum(p) * prof.hours)
    kwh, kvarh = np.sum(p) * prof.hours, np.sum(q) * prof.hours
    assert res(out, "pf_bill")["value"] == pytest.approx(kwh / np.hypot(kwh, kvarh))
    assert {f["title"] for f in out["figures"]} == {"kvar duration", "Power-factor duration", "Daily profile"}
    assert [t["title"] for t in out["tables"]][:2] == ["By calendar month", "What was understood"]
    for f in out["figures"]:
        assert f["svg"].startswith("<svg") and "style=" not in f["svg"]


def test_link_carries_the_design_point_into_correction():
    out = run("load_profile", {})
    link = next(l for l in out["links"] if l["worksheet"] == "correction")
    corr = run("correction", link["inputs"])
    assert corr["ok"], corr["field_errors"]
    # the correction worksheet sizes the same kvar as the share figure (to the rounding of the link)
    assert res(corr, "q_need")["value"] == pytest.approx(res(out, "kvar_share")["value"], abs=0.5)
    assert float(link["inputs"]["light_pf"]) < 1


def test_link_carries_the_lowest_month_into_savings():
    out = run("load_profile", {})
    link = next(l for l in out["links"] if l["worksheet"] == "savings")
    sav = run("savings", link["inputs"])
    assert sav["ok"], sav["field_errors"]
    assert float(link["inputs"]["kwh_month"]) == pytest.approx(res(out, "kwh")["value"], abs=1)


@pytest.mark.parametrize("path", sorted(DATA.glob("profile_*")), ids=lambda p: p.name)
def test_each_invented_file_gives_the_same_bank_size(path):
    ref = run("load_profile", {"profile": (DATA / "profile_kw_kvar_comma.csv").read_text()})
    out = run("load_profile", {"profile": path.read_text(encoding="utf-8")})
    assert out["ok"], out["field_errors"]
    rough = "kva" in path.name or "pf" in path.name
    assert res(out, "kvar_share")["value"] == pytest.approx(res(ref, "kvar_share")["value"], abs=0.3 if rough else 1e-9)
    assert res(out, "kwh")["value"] == pytest.approx(res(ref, "kwh")["value"], rel=1e-12)


def test_measured_voltage_scales_the_bank():
    base = run("load_profile", {"bank": "fixed", "fixed_kvar": "150"})
    low = run("load_profile", {"bank": "fixed", "fixed_kvar": "150", "cap_v": "480", "v_bus": "440"})
    assert res(low, "bank_size")["value"] == pytest.approx(150 * (440 / 480) ** 2)
    assert res(low, "pf_after")["value"] < res(base, "pf_after")["value"]
    assert "440 V" in res(low, "bank_size")["display"]


def test_rows_left_out_are_listed_and_the_rest_computes():
    text = demo_text(days=3, interval_min=60).splitlines()
    text[5] = text[5].split(",")[0] + ",abc,12"
    out = run("load_profile", {"profile": "\n".join(text)})
    assert out["ok"]
    table = next(t for t in out["tables"] if t["title"] == "Rows left out or flagged")
    assert table["rows"][0][0] == "6" and "not a number" in table["rows"][0][2]
    assert any("left out" in w for w in out["warnings"])


@pytest.mark.parametrize("field,text,extra,word", [
    ("profile", "", {}, "empty"),
    ("profile", "\x00\x01binary", {}, "not text"),
    ("profile", "Time,kW,kvar\n2025-01-01 00:15,5,5\n", {}, "one row"),
    ("date_order", "auto", {"profile": "Time,kW,kvar\n" + "".join(f"03/04/2025 {h:02d}:00,5,5\n" for h in range(1, 5))}, "choose"),
    ("roles", "time, kW, banana", {}, "column role"),
    ("target_pf", "0.95 lead", {}, "lagging"),
    ("target_pf", "-0.95", {}, "lead"),
    ("steps", "5,5,5,5,5,5,5,5,5,5,5,5,5", {}, "12"),
    ("v_bus", "", {"cap_v": "480"}, "both"),
])
def test_messages_land_at_the_field(field, text, extra, word):
    out = run("load_profile", {**extra, field: text})
    assert out["ok"] is False
    assert set(out["field_errors"]) == {field}, out["field_errors"]
    assert word.lower() in out["field_errors"][field].lower()


def test_percent_target_is_accepted():
    a = run("load_profile", {"target_pf": "95 %"})
    b = run("load_profile", {"target_pf": "0.95"})
    assert a["ok"] and a["results"] == b["results"]


def test_year_of_15_minute_data_through_the_bridge_is_timed():
    text = demo_text(days=365, interval_min=15, seed=3)
    inputs = json.dumps({"profile": text})
    t0 = time.process_time()
    out = json.loads(bridge.compute("load_profile", inputs))
    ms = (time.process_time() - t0) * 1000
    assert out["ok"] and res(out, "rows")["value"] == 35040
    assert len(next(t for t in out["tables"] if t["title"] == "By calendar month")["rows"]) == 13  # 2025-03-03 to 2026-03-02: March to March
    print(f"\nload_profile, 35,040 rows through app.bridge.compute: {ms:.0f} ms CPU (CPython)")


def test_an_edit_to_another_field_reuses_the_file_already_read(monkeypatch):
    # Editing the target, share or bank must not read the file again (a year of 5-minute rows is a
    # third of an answer), yet every answer must be what a fresh read gives, the error too.
    from app.sheets import load_profile as sheet

    calls = []

    def counted(text, **kw):
        calls.append(len(text))
        return read_profile(text, **kw)

    monkeypatch.setattr(sheet, "read_profile", counted)
    monkeypatch.setattr(sheet, "_last_read", [None, None])
    text = demo_text(days=20, interval_min=15, seed=5)
    edits = [{}, {"target_pf": "0.92"}, {"share": "90"}, {"bank": "fixed", "fixed_kvar": "120"},
             {"bank": "steps", "steps": "40,40,40"}, {}]
    answers = [run("load_profile", {"profile": text, **e}) for e in edits]
    assert calls == [len(text)], calls  # read once for all six answers
    for e, got in zip(edits, answers):
        sheet._last_read[:] = [None, None]  # a fresh read: the reference for the same inputs
        assert got == run("load_profile", {"profile": text, **e}), e
    calls.clear()
    run("load_profile", {"profile": text, "stamps": "start"})  # another reading of the same file: read again
    run("load_profile", {"profile": text + "\n", "stamps": "start"})  # another file: read again
    assert len(calls) == 2, calls
    # a file that cannot be read gives its message each time, from one read
    calls.clear()
    ambiguous = "Time,kW,kvar\n" + "".join(f"03/04/2025 {h:02d}:00,5,5\n" for h in range(1, 5))
    for target in ("0.95", "0.9"):
        out = run("load_profile", {"profile": ambiguous, "target_pf": target})
        assert set(out["field_errors"]) == {"date_order"} and "choose" in out["field_errors"]["date_order"].lower()
    assert len(calls) == 1, calls
