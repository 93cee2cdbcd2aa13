"""The shared test helpers (tests/helpers.py) catch what they are there to catch: an internal
error by the registry's ``"internal"`` key whatever its message says, an answer the bridge could
not write as JSON, and outcomes that are no answer at all."""

import pytest

from app import registry
from helpers import assert_answered, res, run, table, titled, val


def test_run_takes_a_dict_and_keywords_together():
    a = run("impedance", {"mode": "z", "z": "3 + j4"}, f="50")
    b = run("impedance", mode="z", z="3 + j4", f="50")
    assert a == b and val(a, "z_mag") == pytest.approx(5.0)  # |3 + j4| = 5 (Pythagoras)
    assert res(a, "z_mag")["name"] == "z_mag"
    with pytest.raises(KeyError):
        res(a, "no_such_result")


def test_titled_finds_a_table_by_its_title():
    out = run("correction")
    first = out["tables"][0]
    assert titled(out, first["title"]) is first
    with pytest.raises(KeyError):
        titled(out, "no such table")


def test_run_fails_on_an_internal_error_whatever_its_wording(monkeypatch):
    ws = registry.sheet("impedance")

    def broken(ins, out):
        raise ZeroDivisionError("a bug")

    monkeypatch.setattr(ws, "compute", broken)
    monkeypatch.setattr(registry, "INTERNAL_ERROR", "Something else entirely ({}).")
    with pytest.raises(AssertionError, match="internal error in impedance"):
        run("impedance")


def test_run_fails_on_an_answer_json_cannot_hold(monkeypatch):
    ws = registry.sheet("impedance")
    real = ws.compute

    def with_inf(ins, out):
        real(ins, out)
        out.results[0]["value"] = float("inf")

    monkeypatch.setattr(ws, "compute", with_inf)
    with pytest.raises(AssertionError, match="not valid JSON"):
        run("impedance")


def test_assert_answered_refuses_what_is_no_answer():
    good = run("impedance")
    assert_answered(good)
    refused = run("impedance", f="-5")
    assert_answered(refused)
    bad = [
        {**registry.failure("Anything at all."), "internal": True},  # a bug, however worded
        {**good, "results": []},  # ok but nothing computed
        {**good, "error": "A message beside an answer."},
        {**refused, "field_errors": {}},  # refused without a message
        {**refused, "field_errors": {"f": " "}},  # an empty message
        {**refused, "results": good["results"]},  # refused but results shown
    ]
    for out in bad:
        with pytest.raises(AssertionError):
            assert_answered(out)


def test_table_writes_cells_as_typed_text():
    assert table((5, 3), ("7", "1.5")) == '[["5", "3"], ["7", "1.5"]]'
