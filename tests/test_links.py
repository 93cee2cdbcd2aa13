"""Every link a result offers opens a worksheet that computes.

A result may offer "open another worksheet with these inputs" (``out.link``). Over a grid of
inputs to every worksheet that offers links (each shared quantity's field at its lowest and
highest accepted value and at typical values, one at a time, then all together), every link
offered must open its target with ``ok: true``. The limits come from :mod:`app.quantities`,
so a value one worksheet accepts is accepted by the worksheet it links to.

The outside reference here is the worksheets' own contract (a link is an offer to compute);
the limits themselves are justified in :mod:`app.quantities`.
"""

from __future__ import annotations

import json

import pytest

from app import bridge
from app import quantities as Q
from helpers import run


def _quantities() -> list[Q.Quantity]:
    return [v for v in vars(Q).values() if isinstance(v, Q.Quantity)]


def quantity_of(field):
    """The shared quantity a field was built from (same unit and limits), or None."""
    if field.kind not in ("number", "list"):
        return None
    for q in _quantities():
        if (q.unit, q.min, q.max, q.min_open, q.max_open) == (field.unit, field.min, field.max, field.min_open, field.max_open):
            return q
    return None


def edge_values(q: Q.Quantity) -> list[str]:
    """The lowest and highest values the quantity accepts, and its typical values, as typed text."""
    vals = []
    if q.min is not None:
        lo = q.min if not q.min_open else (q.min * (1 + 1e-9) if q.min else 1e-3)
        vals.append(repr(float(lo)))
    if q.max is not None:
        hi = q.max if not q.max_open else q.max * (1 - 1e-9)
        vals.append(repr(float(hi)))
    vals += list(q.typical)
    assert all(q.admits(float(v)) for v in vals), (q, vals)
    return vals


def _visible(sheet, name: str, inputs: dict) -> dict:
    """Inputs that make field ``name`` visible: each controlling choice set to an allowed value."""
    f = sheet.field(name)
    if f.show_when:
        ctl = f.show_when["field"]
        inputs = _visible(sheet, ctl, inputs)
        if inputs.get(ctl, sheet.field(ctl).default) not in f.show_when["in"]:
            inputs = {**inputs, ctl: f.show_when["in"][0]}
    return inputs


def _survey_tables() -> list[str]:
    """Survey load tables with one row at the P column's limits, and at power-factor edges."""
    col = {c.name: c for c in bridge.sheets()["survey"].field("loads").columns}
    p_max = col["p"].max
    rows = [
        [["Big", repr(p_max), "0.7", "", "1", "8"]],
        [["Small", "0.001", "0.7", "", "1", "8"]],
        [["Poor", "75", "0.001", "", "1", "8"]],
        [["Near target", "75", "0.94999", "", "1", "8"]],
        [["Many", repr(p_max), "0.7", "", "500", "8"], ["Other", repr(p_max), "0.5", "", "500", "8"]],
    ]
    return [json.dumps(r) for r in rows]


def grid(sheet) -> list[dict]:
    """Inputs for one worksheet: each shared field at each edge value alone, then all at their lowest,
    all at their highest, and all at their first typical value."""
    cases: list[dict] = [{}]
    shared = [(f.name, quantity_of(f)) for f in sheet.fields]
    shared = [(n, q) for n, q in shared if q is not None]
    for name, q in shared:
        for v in edge_values(q):
            cases.append({**_visible(sheet, name, {}), name: v})
    for pick in (0, 1, 2):
        together = {}
        for name, q in shared:
            together[name] = edge_values(q)[pick]
        cases.append(together)
    if sheet.id == "survey":
        cases += [{"loads": t} for t in _survey_tables()]
    if sheet.id == "correction":
        # the most steps, with the capacitors already there sent as one more step
        most = sheet.field("n_steps").max
        cases += [{"n_steps": repr(most), "pattern": p, "existing_kvar": "20", "existing_in": e}
                  for p in ("equal", "binary") for e in ("yes", "no")]
    return cases


def linking_sheets():
    return [s for s in bridge.sheets().values() if any(quantity_of(f) for f in s.fields)]


def test_every_offered_link_computes():
    offered = 0
    sources_with_links = set()
    failures = []
    for sheet in linking_sheets():
        for inputs in grid(sheet):
            out = run(sheet.id, inputs)
            for link in out["links"]:
                target = bridge.sheets()[link["worksheet"]]
                names = {f.name for f in target.fields}
                assert set(link["inputs"]) <= names, (sheet.id, link)
                got = run(link["worksheet"], link["inputs"])
                offered += 1
                sources_with_links.add(sheet.id)
                if not got["ok"]:
                    failures.append((sheet.id, inputs, link["label"], link["inputs"],
                                     got["field_errors"], got.get("error")))
    assert not failures, f"{len(failures)} link(s) open with errors; first: {failures[0]}"
    # the grid really reached the worksheets that offer links
    assert {"correction", "detuned", "survey"} <= sources_with_links
    assert offered > 100


def test_the_grid_includes_each_shared_limit():
    # correction's system voltage at its lowest and highest accepted values are in its grid
    corr = bridge.sheets()["correction"]
    values = {c.get("v_ll") for c in grid(corr)}
    assert {repr(float(Q.SYSTEM_VOLTAGE.min)), repr(float(Q.SYSTEM_VOLTAGE.max))} <= values
    z = {c.get("tx_z") for c in grid(corr)}
    assert {repr(float(Q.TRANSFORMER_Z.min)), repr(float(Q.TRANSFORMER_Z.max))} <= z


@pytest.mark.parametrize("sheet_id", ["correction", "bus_scan", "detuned", "cap_duty", "bank_health", "motor_cap"])
def test_shared_fields_carry_the_shared_limits(sheet_id):
    # every voltage and frequency field of these worksheets is one of the shared quantities
    # (but the detuned sheet's tuning frequency, a harmonic-range frequency, not a supply's)
    sheet = bridge.sheets()[sheet_id]
    for f in sheet.fields:
        if f.kind == "number" and f.unit in ("V", "Hz") and (sheet_id, f.name) != ("detuned", "ft"):
            assert quantity_of(f) is not None, (sheet_id, f.name, f.min, f.max)


def test_the_live_defect_is_gone():
    # was: correction computed with 80 kV and 0.4 % impedance, and its scan link then failed on both
    out = run("correction", {"v_ll": "80000", "tx_z": "0.4"})
    assert not out["ok"] and set(out["field_errors"]) == {"v_ll", "tx_z"}
