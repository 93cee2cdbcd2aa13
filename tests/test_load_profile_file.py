"""A load profile kept with its job: the file widget's declaration, the jobs file's limit for a
file field (a year of 15-minute data, about 1 MB, saves and reopens), and reports that state a
kept file's size and first line instead of echoing it. Profiles are invented (pycore.profile_demo).
The limits checked are the project's own (app/jobfile.py, pycore/profile_read.py)."""

from __future__ import annotations

import json

from app import jobfile, registry, report
from app.formview import form_tree
from pycore.profile_demo import demo_text
from pycore.profile_read import MAX_CHARS

STAMP = "2025-03-14T09:30:00Z"
YEAR_15 = demo_text(days=365, interval_min=15)


def _job(inputs: dict, ws: str = "load_profile") -> dict:
    entry = {"id": "e1", "name": "Feeder 3", "worksheet": ws, "inputs": inputs, "updated": STAMP}
    return {"id": "job-1", "site": "Invented Dairy", "date": "2025-03-14", "notes": "", "created": STAMP,
            "updated": STAMP, "entries": [entry]}


def _walk(nodes):
    for n in nodes:
        if isinstance(n, list):
            yield n
            yield from _walk(n[2:])


def test_the_profile_field_is_a_file_widget_with_the_readers_limit():
    sheet = registry.sheets()["load_profile"]
    f = sheet.field("profile")
    assert f.widget == "file" and f.max_chars == MAX_CHARS
    tree = form_tree(sheet)
    files = [n for n in _walk(tree) if n[0] == "input" and n[1].get("type") == "file"]
    assert len(files) == 1 and files[0][1]["id"] == "file-profile"
    labels = [n for n in _walk(tree) if n[0] == "label" and n[1].get("for") == "file-profile"]
    assert labels and "Open file" in labels[0][2]  # the visible button is the file input's label


def test_a_year_of_15_minute_data_saves_with_the_job_and_reopens():
    assert len(YEAR_15.splitlines()) == 35_041 and len(YEAR_15) > jobfile.MAX_INPUT_VALUE  # header + a year
    text = jobfile.make_export([_job({"profile": YEAR_15})], "0.1.0", STAMP)
    jobs, msg = jobfile.validate_export(text)
    assert msg is None, msg
    assert jobs[0]["entries"][0]["inputs"]["profile"] == YEAR_15
    out = registry.run("load_profile", jobs[0]["entries"][0]["inputs"])
    assert out["ok"], out["field_errors"]
    assert next(r for r in out["results"] if r["name"] == "rows")["value"] == 35_040


def test_other_fields_keep_the_ordinary_limit():
    long = "1" * (jobfile.MAX_INPUT_VALUE + 1)
    _, msg = jobfile.validate_export(jobfile.make_export([_job({"roles": long})], "0.1.0", STAMP))
    assert msg and "'roles'" in msg
    _, msg = jobfile.validate_export(jobfile.make_export([_job({"profile": "x" * (MAX_CHARS + 1)})], "0.1.0", STAMP))
    assert msg and "'profile'" in msg and str(MAX_CHARS) in msg


def test_reports_state_the_files_size_and_first_line_not_the_file():
    job = _job({"profile": YEAR_15})
    for fmt in ("html", "text", "csv"):
        out = report.render(job, fmt, app_version="0.1.0", date="2025-03-14")
        assert len(out) < len(YEAR_15) / 4, fmt  # the megabyte is not echoed
        assert f"{len(YEAR_15):,} characters" in out, fmt
        assert "Time,kW,kvar" in out, fmt  # the first line
        assert YEAR_15.splitlines()[5000] not in out, fmt


def test_a_title_line_above_the_header_is_listed_but_not_warned_about():
    text = "Logger LX-12 (invented)\n" + demo_text(days=2, interval_min=60)
    out = registry.run("load_profile", {"profile": text})
    assert out["ok"]
    table = next(t for t in out["tables"] if t["title"] == "Rows left out or flagged")
    assert table["rows"][0][0] == "1"
    assert not any("left out" in w for w in out["warnings"])
    bad = registry.run("load_profile", {"profile": demo_text(days=2, interval_min=60) + "2025-03-05 01:00,abc,1\n"})
    assert any("left out" in w for w in bad["warnings"])
