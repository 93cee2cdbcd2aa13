"""The CSV report: one row per input, result, table cell, warning and caution.

RFC 4180: comma separated, CRLF line ends, fields with comma, quote, CR or LF in double
quotes, quotes doubled; every cell passes :func:`app.report.escape.csv_cell`.
"""

from __future__ import annotations

import csv
import io
from typing import Any

from .escape import csv_cell
from .gather import field_label

CSV_COLUMNS = ["job", "entry", "worksheet", "kind", "name", "label", "value", "unit", "display", "method", "source"]


def _num(v: Any) -> str:
    if isinstance(v, bool) or not isinstance(v, (int, float)):
        return "" if v is None else str(v)
    return repr(float(v))


def render(job, recs, app_version, date) -> str:
    """The CSV report of the gathered entries ``recs`` (see :func:`app.report.render`)."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\r\n", quoting=csv.QUOTE_MINIMAL)  # RFC 4180
    w.writerow(CSV_COLUMNS)
    jobname = str(job.get("site", "")) or str(job.get("id", ""))

    def row(entry, ws, kind, name, label, value, unit="", display="", method="", source=""):
        w.writerow([csv_cell(x) for x in (jobname, entry, ws, kind, name, label, value, unit, display, method, source)])

    row("", "", "meta", "job_id", "Job id", job.get("id", ""))
    row("", "", "meta", "site", "Site", job.get("site", ""))
    row("", "", "meta", "site_date", "Site visit date", job.get("date", ""))
    row("", "", "meta", "notes", "Notes", job.get("notes", ""))
    row("", "", "meta", "report_date", "Report date", date)
    row("", "", "meta", "app_version", "App version", app_version)
    for r in recs:
        out = r["out"] or {}
        e, ws = r["name"], r["worksheet"]
        if r["inputs"]:
            for it in r["inputs"]:
                if it["kind"] == "table" and it["table"] is not None:
                    cols = r["columns"].get(it["name"], [])
                    for i, cells in enumerate(it["table"], 1):
                        for c, cell in zip(cols, cells):
                            row(e, ws, "input", f"{it['name']}[{i}].{c.name}", f"{it['label']} row {i}: {c.label}",
                                cell, c.unit, cell)
                    continue
                value = _num(it["value"]) if it["value"] is not None else it["entered"]
                row(e, ws, "input", it["name"], it["label"], value, it["unit"], it["entered"])
        else:
            for k, v in r["raw"].items():
                row(e, ws, "input", k, k, v, "", v)
        if r["problem"]:
            row(e, ws, "error", "", "Problem", r["problem"])
        for name, msg in (out.get("field_errors") or {}).items():
            row(e, ws, "error", name, field_label(r, name), msg)
        if out.get("error"):
            row(e, ws, "error", "", "Problem", out["error"])
        if out.get("ok"):
            for res in out.get("results") or []:
                row(e, ws, "result", res.get("name", ""), res.get("label", ""), _num(res.get("value")),
                    res.get("unit", ""), res.get("display", ""), res.get("method", ""), res.get("source", ""))
            for t in out.get("tables") or []:
                cols = t.get("columns") or []
                for i, cells in enumerate(t.get("rows") or [], 1):
                    cells = list(cells) if isinstance(cells, (list, tuple)) else [cells]
                    for c, cell in zip(cols, cells):
                        row(e, ws, "table", f"{t.get('title', '')} row {i}", c, cell, "", cell)
        for wtext in out.get("warnings") or []:
            row(e, ws, "warning", "", "Warning", wtext)
        for ctext in out.get("cautions") or []:
            row(e, ws, "caution", "", "Caution", ctext)
    return buf.getvalue()
