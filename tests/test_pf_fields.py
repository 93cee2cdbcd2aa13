"""Every power-factor field of every worksheet is read by the one shared reader (pycore.pfparse via
app.sheet.Inputs.pf): the same value typed as "0.78", "78 %" or "0.78 lag" gives the same outcome.
A field is a power-factor field when it carries the shared power-factor quantity's limits
(app/quantities.py: above 0, at most 1, no unit). The rule checked is the project's own."""

from __future__ import annotations


import pytest

from app import registry
from app import quantities as Q
from helpers import run


def pf_fields():
    out = []
    for sid, sheet in registry.sheets().items():
        for f in sheet.fields:
            if (f.kind == "number" and f.unit == Q.POWER_FACTOR.unit and f.min == Q.POWER_FACTOR.min
                    and f.max == Q.POWER_FACTOR.max and f.min_open and f.default):
                out.append((sid, f.name, f.default))
    return out


def test_the_grid_finds_the_power_factor_fields():
    found = {(s, n) for s, n, _ in pf_fields()}
    assert {("correction", "pf1"), ("correction", "pf2"), ("savings", "threshold"), ("survey", "target_pf"),
            ("load_profile", "target_pf"), ("motor_cap", "pf_full")} <= found


@pytest.mark.parametrize("sheet, name, default", pf_fields())
def test_percent_and_sense_words_read_as_the_number(sheet, name, default):
    base = run(sheet, {})
    v = float(default)
    for typed in (f"{100 * v:g} %", f"{default} lag", f"{100 * v:g}%"):
        got = run(sheet, {name: typed})
        assert name not in got["field_errors"], (sheet, name, typed, got["field_errors"])
        assert [r["value"] for r in got["results"]] == [r["value"] for r in base["results"]], (sheet, name, typed)
