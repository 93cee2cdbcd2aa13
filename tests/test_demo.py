"""The demo job (app/demo.py): valid, computing with its invented plant on every worksheet it
plans, and still valid in a build that lacks some worksheets. Checked with the jobs file
format's own validator and by running each entry."""

import app.bridge as bridge
from app import demo, registry
from app import jobfile as jobs
from helpers import bridge_demo, run


def test_demo_job_is_valid_and_uses_several_worksheets():
    job = bridge_demo()
    assert jobs.check_job(job) is None
    n_sheets = len(bridge.sheets())
    assert 3 <= len(job["entries"]) <= 5
    used = {e["worksheet"] for e in job["entries"]}
    assert len(used) >= min(3, n_sheets)
    assert len({e["id"] for e in job["entries"]}) == len(job["entries"])
    for e in job["entries"]:
        res = run(e["worksheet"], e["inputs"])
        assert res["ok"], (e["name"], res.get("field_errors"), res.get("error"))
        assert res["results"]


def test_demo_job_with_only_one_worksheet_present():
    # a build holding only the impedance worksheet: the demo fills up with its three planned entries
    only = {"impedance": registry.sheets()["impedance"]}
    job = demo.demo_job(known=only)
    assert len(job["entries"]) == 3
    assert {e["worksheet"] for e in job["entries"]} == {"impedance"}
    assert jobs.check_job(job, known=only) is None
    # ... and a file holding it is refused by a build that lacks that worksheet
    assert "not in this version" in jobs.check_job(job, known={"survey": registry.sheets()["survey"]})


def test_demo_job_skips_missing_worksheets():
    # a build with none of the worksheets the plan names still gives a valid, empty job
    job = demo.demo_job(known={})
    assert job["entries"] == [] and jobs.check_job(job, known={}) is None


def test_demo_entries_use_the_invented_plant_not_fallbacks():
    """Each demo entry carries its planned inputs (fields the worksheet has), so the demo's
    numbers agree with its notes: if a worksheet changes so the plan no longer computes,
    the demo would silently fall back to that worksheet's defaults; this catches it."""
    job = bridge_demo()
    plan = {(ws, name): ov for ws, name, ov in demo.DEMO_PLAN}
    for e in job["entries"]:
        fields = {f.name for f in bridge.sheets()[e["worksheet"]].fields}
        wanted = {k: v for k, v in plan[(e["worksheet"], e["name"])].items() if k in fields}
        assert {k: e["inputs"][k] for k in wanted} == wanted, e["name"]
    assert "invented" in job["site"].lower() and "DEMO DATA" in job["notes"]
