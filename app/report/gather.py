"""Gathering a report's entries: each one recomputed from its stored inputs through
:mod:`app.registry`, with the inputs as entered and as the computation used them."""

from __future__ import annotations

import re
from typing import Optional

from .. import cautions as _cautions
from .. import registry

STATUS_WORDS = {"ok": "OK", "warn": "CHECK", "fail": "FAILS"}

_STAMP = re.compile(r"(\d{4}-\d{2}-\d{2})T(\d{2}:\d{2})(?::\d{2}(?:\.\d+)?)?(Z|[+-]\d{2}:\d{2})?\Z")


def when(stamp: str) -> str:
    """'2025-03-14T09:26:53.589Z' → '2025-03-14 09:26 UTC' (other text is returned as it is)."""
    m = _STAMP.match(stamp or "")
    if not m:
        return stamp
    zone = {"Z": " UTC", None: ""}.get(m[3], f" UTC{m[3]}")
    return f"{m[1]} {m[2]}{zone}"


def _input_items(outcome: dict, raw: dict) -> list[dict]:
    """The visible fields with the text entered and the value the computation used, from
    the outcome's ``"inputs"`` record (:meth:`app.sheet.Worksheet.run` with ``echo``): a value
    refused at its field shows as '(invalid)', a field the computation never read as '(not used)'."""
    items = []
    for rd in outcome.pop("inputs", None) or []:
        kind = rd["kind"]
        used = rd["status"] == "used"
        item = {
            "name": rd["name"],
            "label": rd["label"],
            "unit": rd["unit"],
            "kind": kind,
            "entered": rd["text"],
            "stored": rd["name"] in raw,
            "status": rd["status"],
            "value": rd["value"] if used and kind in ("number", "choice") else None,  # machine value for CSV
            "used": rd["shown"],  # the value as the computation read it, for people
            "table": None,
            "rows_entered": "",
        }
        if kind == "table":
            rows = rd.get("rows")
            item["table"] = rows
            n = len(rows or [])
            item["rows_entered"] = f"{n} row{'s' if n != 1 else ''}" if rows is not None else "(not read)"
        items.append(item)
    return items


def gather(job: dict, entry_id: Optional[str]) -> list[dict]:
    """One record per entry of ``job`` (or only ``entry_id``; LookupError when absent)."""
    entries = job.get("entries")
    entries = entries if isinstance(entries, list) else []
    out = []
    for k, entry in enumerate(entries, 1):
        if not isinstance(entry, dict):
            continue
        if entry_id is not None and entry.get("id") != entry_id:
            continue
        raw = entry.get("inputs")
        raw = {str(a): ("" if b is None else str(b)) for a, b in raw.items()} if isinstance(raw, dict) else {}
        ws = str(entry.get("worksheet", ""))
        sheet = registry.sheet(ws)
        rec = {
            "index": k,
            "id": str(entry.get("id", "")),
            "name": str(entry.get("name", "")) or f"Entry {k}",
            "worksheet": ws,
            "title": sheet.title if sheet else "",
            "updated": str(entry.get("updated", "")),
            "raw": raw,
            "inputs": [],
            "columns": {f.name: f.columns for f in sheet.fields if f.kind == "table"} if sheet else {},
            "out": None,
            "problem": "",
        }
        if sheet is None:
            rec["problem"] = (
                f"The worksheet '{ws}' is not in this version of Fieldphasor; the stored inputs are listed as they are."
            )
        else:
            rec["out"] = registry.run(ws, raw, echo=True)
            rec["inputs"] = _input_items(rec["out"], raw)
            if not rec["out"].get("ok"):
                rec["problem"] = "Not computed: some inputs need attention (see below)."
        out.append(rec)
    if entry_id is not None and not out:
        raise LookupError("That entry is not in the job.")
    return out


def all_cautions(recs: list[dict]) -> list[str]:
    """Every caution of the entries, once each, and always the estimate caution."""
    seen = []
    for r in recs:
        for c in (r["out"] or {}).get("cautions", []):
            if c not in seen:
                seen.append(c)
    if _cautions.ESTIMATE not in seen:
        seen.append(_cautions.ESTIMATE)
    return seen


def field_label(rec: dict, name: str) -> str:
    for it in rec["inputs"]:
        if it["name"] == name:
            return it["label"]
    return name
