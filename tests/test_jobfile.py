"""The jobs file format (app/jobfile.py): round trip, and rejection of corrupt, truncated, foreign, future and bad files.

The file format is the project's own; the outside references here are
the JSON grammar (RFC 8259: what a parser must accept or refuse), Python's own json module
as an independent reader of what we write, the ISO 8601 calendar (datetime), and
JavaScript's Date.prototype.toISOString() form "YYYY-MM-DDTHH:mm:ss.sssZ" (ECMA-262,
Date Time String Format, from memory) for the time stamps the shell writes.
"""

import copy
import datetime
import json

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import app.bridge as bridge
from app import jobfile as jobs
from helpers import bridge_demo


STAMP = "2025-03-14T09:26:53.589Z"  # the shape toISOString() gives (ECMA-262, from memory)


def _sheet_ids():
    return list(bridge.sheets())


def _entry(i=1, ws="impedance", **kw):
    e = {
        "id": f"e{i}",
        "name": f"Feeder {i}",
        "worksheet": ws,
        "inputs": {"mode": "z", "z": "12.5 - j4.7", "f": "50"} if ws == "impedance" else {},
        "updated": STAMP,
    }
    e.update(kw)
    return e


def _job(i=1, n_entries=2, **kw):
    j = {
        "id": f"job-{i}",
        "site": f"Invented site {i}",
        "date": "2025-03-14",
        "notes": "Invented notes.\nSecond line.",
        "created": STAMP,
        "updated": STAMP,
        "entries": [_entry(k) for k in range(1, n_entries + 1)],
    }
    j.update(kw)
    return j


def _file(jobs_list, **kw):
    doc = {"format": "fieldphasor-jobs", "version": 1, "app_version": "0.1.0", "exported": STAMP, "jobs": jobs_list}
    doc.update(kw)
    return json.dumps(doc, ensure_ascii=False)


def _reject(text):
    got, msg = jobs.validate_export(text)
    assert got is None, "a bad file must give no jobs at all (all or nothing)"
    assert isinstance(msg, str) and len(msg) > 10
    return msg


def test_round_trip_reproduces_every_job_exactly():
    originals = [
        _job(1),
        _job(2, n_entries=0, site="", date="", notes=""),
        # every character class a site visit may bring: accents, CJK, emoji, Ω µ, quotes, markup
        _job(3, site="Müller & Söhne — Halle 3 «Ω» 工場 🏭 \"q\" <b>", notes="a\r\nb\tc\u2028d" + "x" * 100),
        _job(4, site="S" * jobs.MAX_SITE, notes="N" * jobs.MAX_NOTES,
             entries=[_entry(1, name="E" * jobs.MAX_NAME, inputs={"z": "v" * jobs.MAX_INPUT_VALUE})]),
        _job(5, created="2025-03-14T09:26:53+05:30", updated="2025-03-14T09:26Z"),
        bridge_demo(),
    ]
    text = jobs.make_export(copy.deepcopy(originals), "0.1.0", STAMP)
    # an independent reader (the json module) sees exactly the jobs we wrote
    assert json.loads(text)["jobs"] == originals
    got, msg = jobs.validate_export(text)
    assert msg is None
    assert got == originals
    # and writing what was read gives the same bytes again
    assert jobs.make_export(got, "0.1.0", STAMP).encode("utf-8") == text.encode("utf-8")


def test_boundary_counts_accepted():
    job = _job(1, n_entries=jobs.MAX_ENTRIES)
    got, msg = jobs.validate_export(_file([job]))
    assert msg is None and len(got[0]["entries"]) == jobs.MAX_ENTRIES


_chars = st.characters(blacklist_categories=("Cs",))  # any character but lone surrogates


_ids = st.from_regex(r"[A-Za-z0-9][A-Za-z0-9._:-]{0,30}", fullmatch=True)


_dates = st.dates(min_value=datetime.date(1, 1, 1)).map(lambda d: d.isoformat())


_stamps = st.datetimes(min_value=datetime.datetime(1000, 1, 1)).map(
    lambda t: t.strftime("%Y-%m-%dT%H:%M:%S.") + f"{t.microsecond // 1000:03d}Z"
)


@st.composite
def _jobs_strategy(draw):
    ws_ids = _sheet_ids()
    out = []
    for i in range(draw(st.integers(0, 3))):
        n = draw(st.integers(0, 4))
        entries = []
        for k in range(n):
            ws = draw(st.sampled_from(ws_ids))
            names = [f.name for f in bridge.sheets()[ws].fields]
            inputs = draw(st.dictionaries(st.sampled_from(names), st.text(_chars, max_size=40), max_size=len(names)))
            entries.append({"id": f"e{k}-" + draw(_ids), "name": draw(st.text(_chars, max_size=60)),
                            "worksheet": ws, "inputs": inputs, "updated": draw(_stamps)})
        out.append({"id": f"j{i}-" + draw(_ids), "site": draw(st.text(_chars, max_size=60)),
                    "date": draw(st.one_of(st.just(""), _dates)), "notes": draw(st.text(_chars, max_size=200)),
                    "created": draw(_stamps), "updated": draw(_stamps), "entries": entries})
    return out


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(_jobs_strategy())
def test_round_trip_property(job_list):
    text = jobs.make_export(copy.deepcopy(job_list), "9.9.9", STAMP)
    got, msg = jobs.validate_export(text)
    assert msg is None, msg
    assert got == job_list


def test_bridge_export_then_validate():
    job = _job(7)
    res = json.loads(bridge.export_jobs(json.dumps(job), json.dumps({"exported": STAMP})))
    assert res["ok"] and res["filename"] == "fieldphasor-job-invented-site-7-2025-03-14.json"
    back = json.loads(bridge.validate_jobs(res["text"]))
    assert back["ok"] and back["jobs"] == [job] and back["exported"] == STAMP
    # a list of jobs, default time stamp
    res = json.loads(bridge.export_jobs(json.dumps([_job(1), _job(2)])))
    assert res["ok"] and res["filename"].startswith("fieldphasor-jobs-")
    assert json.loads(bridge.validate_jobs(res["text"]))["jobs"] == [_job(1), _job(2)]


def test_bridge_export_of_an_invalid_job_says_why_and_still_gives_the_text():
    res = json.loads(bridge.export_jobs(json.dumps(_job(1, site="S" * 201))))
    assert res["ok"] is False and "site" in res["error"] and "200" in res["error"]
    assert json.loads(res["text"])["jobs"][0]["site"] == "S" * 201


def test_bridge_validate_never_raises():
    for bad in ["", "{", "null", "[]", "\x00", "{\"format\": 1}", "9" * 5000]:
        res = json.loads(bridge.validate_jobs(bad))
        assert res["ok"] is False and res["error"]
    assert json.loads(bridge.export_jobs("not json"))["ok"] is False
    assert json.loads(bridge.validate_jobs(None))["ok"] is False


def test_truncated_file_rejected_at_every_cut():
    text = jobs.make_export([_job(1), _job(2)], "0.1.0", STAMP)
    end = len(text.rstrip())
    cuts = sorted(set(range(1, end, max(1, end // 200))) | {end - 1, end // 2, 1})
    for n in cuts:
        _reject(text[:n])
    # a cut inside a long string and a cut at a structural point both say "truncated"
    assert "truncated" in _reject(text[: text.index("Second line")])
    assert "truncated" in _reject(text[: text.rindex("]")])


@pytest.mark.parametrize(
    "text, words",
    [
        ("", ["empty"]),
        ("   \n", ["empty"]),
        ("{this is not json}", ["not valid JSON", "line 1"]),
        ('{"format": "fieldphasor-jobs", "version": 1,, }', ["not valid JSON"]),
        ("\x89PNG\r\n\x1a\n\x00\x00", ["not valid JSON"]),
        ("[" * 100000 + "]" * 100000, ["nested too deeply"]),
        ('{"format": "fieldphasor-jobs", "version": NaN}', ["NaN"]),
    ],
)
def test_corrupt_files_rejected(text, words):
    msg = _reject(text)
    for w in words:
        assert w in msg


def test_bytes_that_are_not_utf8_rejected():
    assert "UTF-8" in _reject(b"\xff\xfe\x00{")


@pytest.mark.parametrize(
    "doc",
    [
        [],  # a JSON list
        "fieldphasor-jobs",  # a JSON string
        {"name": "some-package", "version": "1.0.0", "dependencies": {}},  # another program's JSON
        {"format": "fieldphasor-job", "version": 1, "jobs": []},  # near miss on the marker
        {"version": 1, "jobs": []},  # no marker
        _job(1),  # a bare job object, not an export file
    ],
)
def test_foreign_files_rejected(doc):
    assert "not a Fieldphasor jobs file" in _reject(json.dumps(doc))


def test_future_version_rejected_with_update_advice():
    msg = _reject(_file([_job(1)], version=2, app_version="3.0.0"))
    assert "version 2" in msg and "version 1" in msg and "Update" in msg and "3.0.0" in msg


@pytest.mark.parametrize("version", ["1", 1.5, True, None, 0, -1])
def test_bad_version_rejected(version):
    msg = _reject(_file([_job(1)], version=version))
    assert "version" in msg


def _mut(fn):
    job_list = [_job(1), _job(2, n_entries=3)]
    doc = json.loads(_file(job_list))
    fn(doc)
    return json.dumps(doc, ensure_ascii=False)


BAD_FIELDS = [
    # (what is wrong, mutation, words the message must hold)
    ("site too long", lambda d: d["jobs"][1].__setitem__("site", "x" * 201), ["Job 2", "'site'", "201", "200"]),
    ("notes too long", lambda d: d["jobs"][0].__setitem__("notes", "x" * 20001), ["Job 1", "'notes'", "20000"]),
    ("site not text", lambda d: d["jobs"][0].__setitem__("site", 42), ["Job 1", "'site'", "text"]),
    ("site a broken surrogate", lambda d: d["jobs"][0].__setitem__("site", "ab\ud800"), ["Job 1", "'site'", "broken"]),
    ("entry name too long", lambda d: d["jobs"][1]["entries"][2].__setitem__("name", "n" * 201),
     ["Job 2", "entry 3", "'name'", "200"]),
    ("too many entries", lambda d: d["jobs"][0].__setitem__("entries", [_entry(k) for k in range(1001)]),
     ["Job 1", "1001 entries", "1000"]),
    ("entries not a list", lambda d: d["jobs"][0].__setitem__("entries", {}), ["Job 1", "'entries'", "list"]),
    ("entry not an object", lambda d: d["jobs"][0]["entries"].__setitem__(0, "oops"), ["Job 1", "entry 1", "object"]),
    ("duplicate job id", lambda d: d["jobs"][1].__setitem__("id", "job-1"), ["Job 2", "job-1", "already used by job 1"]),
    ("duplicate entry id", lambda d: d["jobs"][1]["entries"][2].__setitem__("id", "e1"),
     ["Job 2", "entry 3", "'e1'", "already used by entry 1"]),
    ("unknown worksheet", lambda d: d["jobs"][1]["entries"][1].__setitem__("worksheet", "flux_capacitor"),
     ["Job 2", "entry 2", "flux_capacitor", "not in this version"]),
    ("input not text", lambda d: d["jobs"][0]["entries"][0]["inputs"].__setitem__("f", 50), ["entry 1", "'f'", "text"]),
    ("input too long", lambda d: d["jobs"][0]["entries"][0]["inputs"].__setitem__("z", "1" * 100001),
     ["entry 1", "'z'", "100000"]),
    ("inputs not an object", lambda d: d["jobs"][0]["entries"][0].__setitem__("inputs", ["50"]), ["'inputs'", "object"]),
    ("input name odd", lambda d: d["jobs"][0]["entries"][0]["inputs"].__setitem__("__proto__", "x"),
     ["entry 1", "__proto__", "not a valid field name"]),
    ("date not ISO", lambda d: d["jobs"][0].__setitem__("date", "14/03/2025"), ["Job 1", "'date'", "YYYY-MM-DD"]),
    ("date not a real day", lambda d: d["jobs"][0].__setitem__("date", "2025-02-29"), ["Job 1", "calendar"]),
    ("stamp not ISO", lambda d: d["jobs"][0].__setitem__("created", "yesterday"), ["Job 1", "'created'", "ISO"]),
    ("stamp hour 25", lambda d: d["jobs"][0]["entries"][1].__setitem__("updated", "2025-03-14T25:00:00Z"),
     ["entry 2", "'updated'"]),
    ("exported missing", lambda d: d.pop("exported"), ["'exported'", "missing"]),
    ("notes missing", lambda d: d["jobs"][1].pop("notes"), ["Job 2", "'notes'", "missing"]),
    ("unknown job field", lambda d: d["jobs"][0].__setitem__("colour", "red"), ["Job 1", "colour", "unknown field"]),
    ("unknown entry field", lambda d: d["jobs"][0]["entries"][0].__setitem__("results", []),
     ["entry 1", "results", "unknown field"]),
    ("job id with a space", lambda d: d["jobs"][0].__setitem__("id", "job 1"), ["Job 1", "'id'", "not a valid id"]),
    ("empty id", lambda d: d["jobs"][0]["entries"][0].__setitem__("id", ""), ["entry 1", "'id'", "empty"]),
    ("jobs not a list", lambda d: d.__setitem__("jobs", {"a": 1}), ["'jobs'", "list"]),
]


@pytest.mark.parametrize("what, mutate, words", BAD_FIELDS, ids=[b[0] for b in BAD_FIELDS])
def test_bad_field_rejected_naming_it(what, mutate, words):
    msg = _reject(_mut(mutate))
    for w in words:
        assert w in msg, f"{what}: {w!r} not in {msg!r}"


def test_message_names_the_site_of_the_job_at_fault():
    msg = _reject(_mut(lambda d: d["jobs"][1].__setitem__("date", "2025-13-01")))
    assert "Invented site 2" in msg


def test_duplicate_key_rejected():
    text = _file([_job(1)]).replace('"site": "Invented site 1"', '"site": "A", "site": "B"')
    assert "twice" in _reject(text)


def test_bom_and_trailing_space_accepted():
    got, msg = jobs.validate_export("\ufeff" + _file([_job(1)]) + "\n\n")
    assert msg is None and got == [_job(1)]
