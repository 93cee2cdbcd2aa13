"""Helpers shared by the tests: run a worksheet, look a result up by name, type a table field,
and check that an outcome is an answer.

Worksheet tests run worksheets through :func:`app.registry.run` (the bridge's JSON door is
tested where the JSON contract itself is under test). :func:`run` still writes the outcome as
the bridge does (JSON without NaN or infinity) and reads it back, so a test sees exactly what
the browser receives, lists where Python held tuples.
"""

from __future__ import annotations

import csv
import io
import json
import math
import os

from app import registry

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))  # the repository


def run(sheet_id: str, inputs: dict | None = None, /, **more) -> dict:
    """Compute worksheet ``sheet_id`` from field name → typed text: ``inputs`` and the keyword
    fields together (a keyword wins). The outcome dict of the bridge contract, as JSON gives it.

    Fails the test on an internal error (the registry's ``"internal": true``, an unexpected
    exception inside the computation) and on an outcome the bridge could not write as JSON."""
    out = registry.run(sheet_id, {**(inputs or {}), **more})
    assert not out.get("internal"), f"internal error in {sheet_id}: {out.get('error')} (inputs {inputs or {}} {more})"
    try:
        text = json.dumps(out, ensure_ascii=False, allow_nan=False)
    except ValueError as exc:  # the bridge would turn this into an internal error
        raise AssertionError(f"{sheet_id}: the outcome is not valid JSON ({exc})") from exc
    return json.loads(text)


def res(out: dict, name: str) -> dict:
    """The result called ``name`` in an outcome."""
    for r in out["results"]:
        if r["name"] == name:
            return r
    raise KeyError(f"{name} (results: {[r['name'] for r in out['results']]})")


def val(out: dict, name: str):
    """The value of the result called ``name``."""
    return res(out, name)["value"]


def steps_shown(display: str) -> list[float]:
    """The step sizes [kvar], step 1 first, read from a shown steps answer as a person reads it:
    '30, 5 steps of 60 (2 × 30) kvar' is 30 and five 60s (a step's units in brackets are its make-up)."""
    out: list[float] = []
    for part in display.removesuffix(" kvar").split(", "):
        head = part.split(" (")[0]
        n, _, size = head.rpartition(" steps of ")
        out += [float(size)] * (int(n) if n else 1)
    return out


def titled(out: dict, title: str) -> dict:
    """The result table called ``title`` in an outcome."""
    for t in out["tables"]:
        if t["title"] == title:
            return t
    raise KeyError(f"{title} (tables: {[t['title'] for t in out['tables']]})")


def table(*rows) -> str:
    """A table field's text: rows of cells as JSON, each cell as typed text."""
    return json.dumps([[str(c) for c in r] for r in rows])


def assert_answered(out: dict) -> None:
    """The outcome is an answer, whatever the inputs: not an internal error (by the registry's
    ``"internal"`` key, not by wording), and either ok with results and no messages, or refused
    with a non-empty message at a field or a general one and nothing computed shown."""
    assert not out.get("internal"), out.get("error")
    if out["ok"]:
        assert out["results"], "ok without any result"
        assert out["field_errors"] == {} and "error" not in out
    else:
        messages = list(out["field_errors"].values()) + ([out["error"]] if "error" in out else [])
        assert messages, "refused without a message"
        assert all(isinstance(m, str) and m.strip() for m in messages), messages
        assert out["results"] == [] and out["figures"] == []


def bridge_demo() -> dict:
    """The demo job as the bridge hands it to the shell (JSON text read back)."""
    from app import bridge  # the JSON door itself is what these tests look at

    return json.loads(bridge.demo_job())


def same_csv_cells(a: str, b: str) -> bool:
    """Two CSV texts with the same rows and cells, numbers equal to 1e-12 (relative): full-precision
    floats may differ in the last digit between Python versions (3.12+ sums with compensation)."""
    ra, rb = list(csv.reader(io.StringIO(a))), list(csv.reader(io.StringIO(b)))
    if [len(r) for r in ra] != [len(r) for r in rb]:
        return False
    for x, y in zip((c for r in ra for c in r), (c for r in rb for c in r)):
        if x == y:
            continue
        try:
            if not math.isclose(float(x), float(y), rel_tol=1e-12):
                return False
        except ValueError:
            return False
    return True
