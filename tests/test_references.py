"""Every source a result cites comes from the one table of references (pycore/references.py).

Each worksheet is run on its defaults and with each option of each of its choice fields in turn;
every result's ``source`` must be one table entry or several joined by the table's separator,
and every entry of a worksheet's reference list must be a table entry. The house rule checked
(one citation per publication, in one place) is the project's own.
"""

from __future__ import annotations

import os
import re

import pytest

from app import bridge
from helpers import ROOT, run
from pycore import references as R

ENTRIES = set(R.REFERENCES.values())


def variants(sheet) -> list[dict]:
    cases = [{}]
    for f in sheet.fields:
        if f.kind == "choice":
            cases += [{f.name: value} for value, _ in f.options if value != f.default]
    return cases


def from_table(source: str) -> bool:
    return all(part in ENTRIES for part in source.split(R.SEPARATOR))


@pytest.mark.parametrize("sheet_id", list(bridge.sheets()))
def test_every_result_cites_the_table(sheet_id):
    sheet = bridge.sheets()[sheet_id]
    seen = 0
    for inputs in variants(sheet):
        out = run(sheet_id, inputs)
        for r in out["results"]:
            assert from_table(r["source"]), (sheet_id, inputs, r["name"], r["source"])
            seen += 1
    assert seen > 0, sheet_id  # the defaults compute, so there was something to check


@pytest.mark.parametrize("sheet_id", list(bridge.sheets()))
def test_reference_lists_come_from_the_table(sheet_id):
    refs = bridge.sheets()[sheet_id].references
    assert refs and all(r in ENTRIES for r in refs), refs


def test_entries_are_whole_and_distinct():
    values = list(R.REFERENCES.values())
    assert len(values) == len(set(values))
    assert not any(R.SEPARATOR in v for v in values)  # a joined source splits back into entries
    assert R.cite("ieee18", "ieee1036").split(R.SEPARATOR) == [R.ref("ieee18"), R.ref("ieee1036")]


def test_worksheets_write_no_citation_of_their_own():
    # a publication's name appears in pycore/references.py only, never in a worksheet's source code
    names = ["Red Book", "Brown Book", "Alexander", "Sadiku", "Dugan", "Chapman", "NFPA 70", "Fundamentals of"]
    for fn in sorted(os.listdir(os.path.join(ROOT, "app", "sheets"))):
        if fn.endswith(".py"):
            text = open(os.path.join(ROOT, "app", "sheets", fn), encoding="utf-8").read()
            for n in names:
                assert n not in text, (fn, n)
            # no source text written inline: every source= names a table entry
            assert not re.search(r'source\s*=\s*f?"', text), fn
