"""The worksheet registry (app.registry): running a worksheet from a Python dict, unknown ids,
importing only the worksheet asked for, and the record of what a computation read.

Outside references: the impedance Z = R + jX = 3 + j4 Ω has |Z| = √(3² + 4²) = 5 Ω and power
factor cos φ = R/|Z| = 0.6 (circuit theory, any circuit-analysis textbook, e.g. Alexander &
Sadiku); 0.48 kV = 480 V by the SI prefix kilo = 10³ (SI Brochure, 9th edition, Table 7).
"""

import json
import subprocess
import sys

import pytest

from app import bridge, registry
from app.sheet import Inputs
from helpers import ROOT, res

CONTRACT_KEYS = {"ok", "results", "tables", "field_errors", "warnings", "cautions", "figures"}


def test_run_from_a_dict_computes_the_worksheet():
    out = registry.run("impedance", {"mode": "z", "z": "3 + j4", "f": "50"})
    assert out["ok"] is True and out["field_errors"] == {}
    assert res(out, "z_mag")["value"] == pytest.approx(5.0, rel=1e-12)  # √(3² + 4²)
    assert res(out, "pf")["value"] == pytest.approx(0.6, rel=1e-12)  # R/|Z|
    # the bridge is only the JSON door onto the same computation
    assert json.loads(bridge.compute("impedance", json.dumps({"mode": "z", "z": "3 + j4", "f": "50"}))) == out
    assert "inputs" not in out  # the record of what was read comes only when asked for


def test_run_gives_field_errors_at_the_field():
    out = registry.run("impedance", {"mode": "z", "z": "3 + j4", "f": "-5"})
    assert out["ok"] is False and set(out["field_errors"]) == {"f"} and out["results"] == []


@pytest.mark.parametrize("wid", ["no_such_sheet", "", "../bridge", "_private", "sheet", 42, None, ["impedance"]])
def test_unknown_worksheet(wid):
    assert registry.sheet(wid) is None
    out = registry.run(wid, {})
    assert out["ok"] is False and CONTRACT_KEYS <= set(out)
    assert out["error"] == f"Unknown worksheet '{wid}'."
    assert "internal" not in out  # a refusal, not a bug


def test_inputs_that_are_not_a_dict():
    out = registry.run("impedance", ["z", "3"])
    assert out["ok"] is False and out["error"] == "The inputs could not be read."


def test_run_never_raises(monkeypatch):
    ws = registry.sheet("impedance")

    def broken(ins, out):
        raise ZeroDivisionError("a bug")

    monkeypatch.setattr(ws, "compute", broken)
    out = registry.run("impedance", {})
    assert out["ok"] is False and CONTRACT_KEYS <= set(out)
    assert out["internal"] is True  # what tests and tools look for, whatever the wording
    assert out["error"] == registry.INTERNAL_ERROR.format("ZeroDivisionError")
    # the bridge passes the mark on
    assert json.loads(bridge.compute("impedance", "{}"))["internal"] is True


def test_an_answer_the_bridge_cannot_write_is_marked_internal(monkeypatch):
    # a NaN in a result: JSON has no NaN, so the bridge's writing fails and it says so, marked
    ws = registry.sheet("impedance")
    real = ws.compute

    def with_nan(ins, out):
        real(ins, out)
        out.results[0]["value"] = float("nan")

    monkeypatch.setattr(ws, "compute", with_nan)
    assert registry.run("impedance", {})["ok"] is True
    out = json.loads(bridge.compute("impedance", "{}"))
    assert out["ok"] is False and out["internal"] is True


def test_refused_inputs_are_not_marked_internal():
    out = registry.run("impedance", {"mode": "z", "z": "3 + j4", "f": "-5"})
    assert out["ok"] is False and "internal" not in out


def _fresh_python(code):
    res = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, check=True)
    return json.loads(res.stdout.strip().splitlines()[-1])


def test_one_worksheet_imports_only_its_own_module():
    """The first result in the browser must not pay for importing every worksheet."""
    before, after = _fresh_python(
        "import json, sys\n"
        "from app import registry\n"
        "out = registry.run('impedance', {})\n"
        "assert out['ok'], out\n"
        "one = sorted(m for m in sys.modules if m.startswith('app.sheets.'))\n"
        "registry.sheets()\n"
        "print(json.dumps([one, sorted(m for m in sys.modules if m.startswith('app.sheets.'))]))\n"
    )
    assert before == ["app.sheets.impedance"]
    ids = sorted(s["id"] for s in json.loads(bridge.catalog()))
    # helper modules of a worksheet (app/sheets/_<name>.py, no SHEET) load with it; only worksheets count here
    assert [m for m in after if not m.rsplit(".", 1)[1].startswith("_")] == sorted(f"app.sheets.{i}" for i in ids)


def test_the_same_worksheet_object_before_and_after_the_catalog_loads():
    lazy, ids, same = _fresh_python(
        "import json\n"
        "from app import registry\n"
        "lazy = registry.sheet('savings')\n"
        "all_ = registry.sheets()\n"
        "print(json.dumps([lazy.id, list(all_), all_['savings'] is lazy]))\n"
    )
    assert lazy == "savings" and same is True and ids == list(registry.sheets())


def test_jobs_and_reports_never_load_the_bridge():
    """Inside Python everything runs through the registry; the JSON door stays shut."""
    loaded = _fresh_python(
        "import json, sys\n"
        "from app import demo, jobfile, registry, report, snapshot\n"
        "job = demo.demo_job()\n"
        "for fmt in ('html', 'text', 'csv'):\n"
        "    report.render(job, fmt, app_version='0', date='2000-01-01')\n"
        "jobfile.validate_export(jobfile.make_export([job], '0', '2000-01-01T00:00:00Z'))\n"
        "snapshot.prepare()\n"
        "print(json.dumps(sorted(sys.modules)))\n"
    )
    assert "app.registry" in loaded and "app.report.gather" in loaded
    assert "app.bridge" not in loaded
    # a module the snapshot does not hold, so the browser test of a restored engine imports one late
    assert "app.timings" not in loaded


# ---------------------------------------------------------------------------------------
# what a computation read


def test_inputs_record_the_value_read_in_the_field_unit():
    ws = registry.sheet("correction")
    ins = Inputs(ws, {"v_ll": "0.48 kV", "f": "1 kHz"})
    assert ins.num("v_ll") == pytest.approx(480.0)  # kilo = 10³
    r = ins.echo["v_ll"]
    assert (r.text, r.value, r.unit, r.ok, r.shown) == ("0.48 kV", pytest.approx(480.0), "V", True, "480 V")
    assert ins.num("f") is None  # 1000 Hz is above the field's 400 Hz limit
    r = ins.echo["f"]
    assert (r.text, r.value, r.ok) == ("1 kHz", None, False)


def test_run_with_echo_lists_each_visible_field_with_its_status():
    out = registry.run("correction", {"v_ll": "0.48 kV", "f": "1 kHz"}, echo=True)
    rows = {r["name"]: r for r in out["inputs"]}
    assert rows["v_ll"]["status"] == "used" and rows["v_ll"]["value"] == pytest.approx(480.0)
    assert rows["v_ll"]["shown"] == "480 V" and rows["v_ll"]["text"] == "0.48 kV"
    assert rows["f"]["status"] == "invalid" and rows["f"]["value"] is None and rows["f"]["shown"] == "(invalid)"
    assert "f" in out["field_errors"]
    # every visible field, in declaration order, and no hidden one
    ws = registry.sheet("correction")
    ins = Inputs(ws, {"v_ll": "0.48 kV", "f": "1 kHz"})
    assert [r["name"] for r in out["inputs"]] == [f.name for f in ws.fields if ins.visible(f.name)]
    json.dumps(out["inputs"], allow_nan=False)  # JSON-safe, like the rest of the outcome


def test_a_field_never_read_is_marked_not_used():
    # a bad system voltage stops the computation before it reads the power factor's sense
    out = registry.run("correction", {"v_ll": "abc"}, echo=True)
    rows = {r["name"]: r for r in out["inputs"]}
    assert rows["v_ll"]["status"] == "invalid"
    assert rows["pf1_sense"]["status"] == "unused" and rows["pf1_sense"]["shown"] == "(not used)"
    # on good inputs the same field is read
    good = {r["name"]: r for r in registry.run("correction", {}, echo=True)["inputs"]}
    assert good["pf1_sense"]["status"] == "used"


def test_echo_does_not_change_the_outcome():
    for sid in registry.sheets():
        plain = registry.run(sid, {})
        echoed = registry.run(sid, {}, echo=True)
        assert echoed.pop("inputs") and echoed == plain, sid
