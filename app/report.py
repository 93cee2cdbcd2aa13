"""Reports of a job or one of its entries: print-ready HTML, a plain-text summary, CSV.

Every entry is recomputed through :func:`app.bridge.compute` from its stored inputs, so a
report always shows what this version of the app computes. All user text (site, notes,
entry names, typed inputs) and all computed text is cleaned of control and bidirectional
override characters, then escaped for the format:

* HTML: :func:`html.escape` on every piece of text; a Content-Security-Policy in the
  document allows no script at all and only its own style element (by hash), so even a
  missed escape could not run code. Figures are SVG from :mod:`app.svg`, admitted only
  when every element and attribute is on an allow-list.
* CSV: RFC 4180 (comma separated, CRLF line ends, fields with comma, quote, CR or LF in
  double quotes, quotes doubled). Cells that a spreadsheet could take for a formula
  (first character = + - @ tab CR LF or their full-width forms) get a leading apostrophe,
  as the OWASP "CSV Injection" guidance advises; plain numbers such as -12.5 are left as
  they are, since a number is never a formula.
* Text: control characters removed; the user's multi-line notes are indented so they
  cannot imitate the report's own headings.
"""

from __future__ import annotations

import base64
import csv
import hashlib
import html
import io
import json
import re
import xml.etree.ElementTree as ET
from typing import Any, Optional

from pycore.complexparse import parse_complex
from pycore.errors import InputError
from pycore.numparse import parse_quantity

from . import cautions as _cautions
from . import fmt as _fmt
from .jobfile import slug

FORMATS = {"html": ("text/html", "html"), "text": ("text/plain", "txt"), "csv": ("text/csv", "csv")}
CSV_COLUMNS = ["job", "entry", "worksheet", "kind", "name", "label", "value", "unit", "display", "method", "source"]
PAPERS = {"auto": "auto", "a4": "A4", "letter": "letter"}
STATUS_WORDS = {"ok": "OK", "warn": "CHECK", "fail": "FAILS"}

# ---------------------------------------------------------------------------------------
# cleaning and escaping

# C0 and C1 controls except tab/LF/CR, and the bidirectional embeddings, overrides and
# isolates that can make text display in a different order than it is stored.
_CONTROLS = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069\ufeff]")
_NUMBER_CELL = re.compile(r"-?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\Z")
_FORMULA_START = ("=", "+", "-", "@", "\t", "\r", "\n", "\uff1d", "\uff0b", "\uff0d", "\uff20")


def clean(text: Any, multiline: bool = True) -> str:
    """Text with control and bidi-override characters removed. Single-line text has
    its line breaks and tabs turned into spaces."""
    s = _CONTROLS.sub("", "" if text is None else str(text))
    s = s.replace("\r\n", "\n").replace("\r", "\n").replace("\u2028", "\n").replace("\u2029", "\n")
    if not multiline:
        s = " ".join(s.replace("\t", " ").split("\n"))
    return s


def esc(text: Any, multiline: bool = False) -> str:
    """Cleaned and HTML-escaped text (quotes too, so it is safe in attributes)."""
    return html.escape(clean(text, multiline), quote=True)


def csv_cell(text: Any) -> str:
    """A cell made safe for spreadsheets (OWASP CSV Injection: prefix an apostrophe
    to a cell whose first non-blank character could start a formula)."""
    s = clean(text, multiline=True)
    if _NUMBER_CELL.match(s):
        return s
    if s.lstrip(" \u00a0").startswith(_FORMULA_START) or s.startswith(_FORMULA_START):
        return "'" + s
    return s


# ---------------------------------------------------------------------------------------
# gathering one entry: inputs as entered and as used, and the recomputed outcome


_STAMP = re.compile(r"(\d{4}-\d{2}-\d{2})T(\d{2}:\d{2})(?::\d{2}(?:\.\d+)?)?(Z|[+-]\d{2}:\d{2})?\Z")


def when(stamp: str) -> str:
    """'2025-03-14T09:26:53.589Z' → '2025-03-14 09:26 UTC' (other text is returned as it is)."""
    m = _STAMP.match(stamp or "")
    if not m:
        return stamp
    zone = {"Z": " UTC", None: ""}.get(m[3], f" UTC{m[3]}")
    return f"{m[1]} {m[2]}{zone}"


def _num_text(v: float) -> str:
    return _fmt.sig(v, 6)


def _input_items(sheet, raw: dict) -> list[dict]:
    """The visible fields of a worksheet with the text entered and the value used."""
    from .sheet import Inputs

    ins = Inputs(sheet, raw)
    items = []
    for f in sheet.fields:
        try:
            if not ins.visible(f.name):
                continue
        except Exception:
            pass
        entered = ins.text_of(f.name)
        item = {
            "name": f.name,
            "label": f.label,
            "unit": f.unit,
            "kind": f.kind,
            "entered": entered,
            "stored": f.name in raw,
            "value": None,  # machine value for CSV
            "used": "",  # the value as the worksheet reads it, for people
            "table": None,
        }
        text = entered.strip()
        try:
            if f.kind == "number":
                if text:
                    v = parse_quantity(text, f.unit)
                    item["value"] = v
                    item["used"] = _fmt.with_unit(v, f.unit, 6) if f.unit != "%" else f"{_num_text(v)} %"
                else:
                    item["used"] = "(blank)"
            elif f.kind == "complex":
                if text:
                    item["used"] = _fmt.complex_rect(parse_complex(text, f.unit), f.unit, 6)
                else:
                    item["used"] = "(blank)"
            elif f.kind == "choice":
                val = ins.choice(f.name)
                item["value"] = val
                item["used"] = next((lab for v, lab in f.options if v == val), val)
            elif f.kind == "list":
                nums = Inputs(sheet, raw).numbers(f.name)
                item["used"] = "(not readable)" if nums is None else "; ".join(_num_text(x) for x in nums) + (
                    f" {f.unit}" if f.unit and nums else ""
                )
            elif f.kind == "table":
                item["table"] = _table_cells(f, entered)
                n = 0 if item["table"] is None else len(item["table"])
                item["used"] = "(not readable)" if item["table"] is None else f"{n} row{'s' if n != 1 else ''}"
            else:
                item["used"] = entered
        except InputError:
            item["used"] = "(not readable)"
        except Exception:
            item["used"] = "(not readable)"
        items.append(item)
    return items


def _table_cells(f, text: str) -> Optional[list[list[str]]]:
    if not text.strip():
        return []
    try:
        data = json.loads(text)
    except ValueError:
        return None
    if not isinstance(data, list):
        return None
    rows = []
    for row in data:
        if isinstance(row, dict):
            cells = [row.get(c.name, "") for c in f.columns]
        elif isinstance(row, list):
            cells = list(row)[: len(f.columns)] + [""] * (len(f.columns) - len(row))
        else:
            cells = [row] + [""] * (len(f.columns) - 1)
        cells = ["" if c is None else str(c) for c in cells]
        if any(c.strip() for c in cells):
            rows.append(cells)
    return rows


def _gather(job: dict, entry_id: Optional[str]) -> list[dict]:
    from .bridge import compute, sheets

    known = sheets()
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
        sheet = known.get(ws)
        rec = {
            "index": k,
            "id": str(entry.get("id", "")),
            "name": str(entry.get("name", "")) or f"Entry {k}",
            "worksheet": ws,
            "title": sheet.title if sheet else "",
            "updated": str(entry.get("updated", "")),
            "raw": raw,
            "inputs": [],
            "out": None,
            "problem": "",
        }
        if sheet is None:
            rec["problem"] = (
                f"The worksheet '{ws}' is not in this version of Fieldphasor; the stored inputs are listed as they are."
            )
        else:
            rec["inputs"] = _input_items(sheet, raw)
            rec["out"] = json.loads(compute(ws, json.dumps(raw)))
            if not rec["out"].get("ok"):
                rec["problem"] = "Not computed: some inputs need attention (see below)."
        out.append(rec)
    if entry_id is not None and not out:
        raise LookupError("That entry is not in the job.")
    return out


def _all_cautions(recs: list[dict]) -> list[str]:
    seen = []
    for r in recs:
        for c in (r["out"] or {}).get("cautions", []):
            if c not in seen:
                seen.append(c)
    if _cautions.ESTIMATE not in seen:
        seen.append(_cautions.ESTIMATE)
    return seen


def _field_label(rec: dict, name: str) -> str:
    for it in rec["inputs"]:
        if it["name"] == name:
            return it["label"]
    return name


# ---------------------------------------------------------------------------------------
# public entry point


def render(
    job: dict,
    fmt: str,
    *,
    app_version: str,
    date: str,
    entry_id: Optional[str] = None,
    paper: str = "auto",
    figures: bool = True,
    bom: bool = True,
    detail: str = "full",
) -> str:
    """Render a job (or only the entry ``entry_id``) as ``fmt`` = 'html', 'text' or 'csv'.

    ``date`` is the report date (YYYY-MM-DD), ``app_version`` the app's version. ``paper``
    ('auto', 'a4', 'letter') sets the HTML @page size; the layout fits both A4 and Letter
    with 'auto'. ``bom`` starts the CSV with a byte-order mark so spreadsheet programs
    read it as UTF-8. ``detail`` 'brief' leaves method and source out of the text format
    (for short e-mail bodies). Raises ValueError/LookupError for a bad format or entry.
    """
    if fmt not in FORMATS:
        raise ValueError(f"Unknown report format '{fmt}' (html, text or csv).")
    if not isinstance(job, dict):
        raise ValueError("The job could not be read.")
    recs = _gather(job, entry_id)
    if fmt == "html":
        return _html(job, recs, app_version, date, PAPERS.get(paper, "auto"), figures, entry_id is not None)
    if fmt == "text":
        return _text(job, recs, app_version, date, detail != "brief", entry_id is not None)
    return ("\ufeff" if bom else "") + _csv(job, recs, app_version, date)


def title_of(job: dict, entry_name: str = "", date: str = "") -> str:
    """A one-line title (for the share sheet or an e-mail subject)."""
    site = clean(job.get("site", ""), multiline=False).strip() or "Untitled job"
    t = f"Fieldphasor report: {site}"
    if entry_name:
        t += f" — {clean(entry_name, multiline=False)}"
    if date:
        t += f" ({date})"
    return t


def filename(job: dict, fmt: str, date: str, entry_name: str = "") -> str:
    ext = FORMATS[fmt][1]
    parts = ["fieldphasor", slug(job.get("site", ""), fallback="job")]
    if entry_name:
        parts.append(slug(entry_name, 30, fallback="entry"))
    parts.append(slug(date, 10, fallback="report"))
    return "-".join(parts) + "." + ext


# ---------------------------------------------------------------------------------------
# HTML

_CSS = """:root{color-scheme:light}
@page{size:%(size)s;margin:15mm 14mm 16mm 14mm}
@page{@bottom-right{content:"Page " counter(page) " of " counter(pages);font:8pt system-ui,sans-serif;color:#444}}
*{box-sizing:border-box}
body{font:10pt/1.4 system-ui,-apple-system,"Segoe UI",Roboto,Arial,sans-serif;color:#111;background:#fff;margin:0}
main,header,footer{max-width:182mm;margin:0 auto;padding:0 4mm}
h1{font-size:16pt;margin:6mm 0 1mm}
h2{font-size:13pt;margin:6mm 0 2mm;border-bottom:1.5pt solid #1d3f73;padding-bottom:1mm;break-after:avoid}
h3{font-size:10.5pt;margin:3mm 0 1mm;break-after:avoid}
p,li{overflow-wrap:anywhere}
.meta{margin:0;color:#333}
.notes{white-space:pre-wrap;border-left:2pt solid #999;padding-left:3mm}
table{width:100%%;border-collapse:collapse;margin:1mm 0 3mm;table-layout:fixed}
thead{display:table-header-group}
tr{break-inside:avoid}
th,td{border:0.5pt solid #888;padding:1mm 1.5mm;text-align:left;vertical-align:top;overflow-wrap:anywhere}
th{background:#e8edf5}
th.grp{background:#f4f4f4;font-style:italic}
.res col.c1{width:24%%}.res col.c2{width:20%%}.res col.c3{width:30%%}.res col.c4{width:26%%}
.sum col.c1{width:6%%}.sum col.c2{width:26%%}.sum col.c3{width:18%%}.sum col.c4{width:50%%}
.inp col.c1{width:34%%}.inp col.c2{width:33%%}.inp col.c3{width:33%%}
.small{font-size:8.5pt}
tr.key td.v{font-weight:700}
caption{text-align:left;color:#333}
.st{font-weight:700;font-size:8.5pt;border:0.5pt solid #333;padding:0 1mm;margin-left:1mm;white-space:nowrap}
.st-fail{background:#fde2e0;color:#7a0c02}.st-warn{background:#fff1c2;color:#5c4000}.st-ok{background:#def3df;color:#0c4a12}
.warn li,.err li{margin-bottom:1mm}
.warn{border:1pt solid #a06800;background:#fff8e5;padding:1mm 3mm 1mm 7mm}
.err{border:1pt solid #9b1c12;background:#fdecea;padding:1mm 3mm 1mm 7mm}
.cau{border:1pt solid #333;padding:1mm 3mm 1mm 7mm}
section.entry{break-before:auto;margin-bottom:4mm}
figure{margin:2mm 0;break-inside:avoid}
figure svg{max-width:130mm;height:auto;display:block}
figcaption{font-size:8.5pt;color:#333}
figure svg rect{fill:#f3f3f3}figure svg line,figure svg polyline{stroke:#333}figure svg text{fill:#111}
figure svg polygon,figure svg circle{fill:#333}
figure svg .fp-bg{fill:#fff}figure svg .fp-band{fill:#f3e7c4}figure svg .fp-axis{stroke:#222}
figure svg .fp-grid{stroke:#d0d0d0}figure svg .fp-mark{stroke:#b3261e}figure svg .fp-text{fill:#111}
figure svg .fp-s1{stroke:#1d3f73}figure svg .fp-s2{stroke:#b3261e}figure svg .fp-s3{stroke:#2e7d32}
figure svg .fp-s4{stroke:#6a1b9a}figure svg .fp-s5{stroke:#8d5a00}figure svg .fp-s6{stroke:#00838f}
figure svg .fp-s1-fill{fill:#1d3f73}figure svg .fp-s2-fill{fill:#b3261e}figure svg .fp-s3-fill{fill:#2e7d32}
figure svg .fp-s4-fill{fill:#6a1b9a}figure svg .fp-s5-fill{fill:#8d5a00}figure svg .fp-s6-fill{fill:#00838f}
footer{margin-top:6mm;border-top:0.5pt solid #888;padding-top:2mm;font-size:8.5pt;color:#333}
a{color:#1d3f73}
@media print{a{color:inherit;text-decoration:none}main,header,footer{max-width:none;padding:0}}
"""


def style_text(paper: str = "auto") -> str:
    """The report's style sheet for a paper size ('auto', 'A4' or 'letter')."""
    return _CSS % {"size": paper}


def style_hash(paper: str = "auto") -> str:
    """CSP source for the style element: 'sha256-…' of its exact text (CSP Level 2 hashes)."""
    digest = hashlib.sha256(style_text(paper).encode("utf-8")).digest()
    return "sha256-" + base64.b64encode(digest).decode("ascii")


_SVG_NS = "{http://www.w3.org/2000/svg}"
_SVG_TAGS = {"svg", "title", "desc", "g", "line", "polyline", "polygon", "circle", "ellipse", "rect", "path", "text", "tspan"}
_SVG_ATTRS = {
    "x", "y", "x1", "y1", "x2", "y2", "cx", "cy", "r", "rx", "ry", "width", "height", "points", "d", "class",
    "stroke-width", "stroke-dasharray", "text-anchor", "font-size", "font-weight", "font-family", "font-style",
    "viewBox", "role", "aria-labelledby", "aria-label", "aria-hidden", "id", "fill", "stroke", "opacity",
    "fill-opacity", "stroke-opacity", "transform", "dominant-baseline", "stroke-linecap", "stroke-linejoin", "dx", "dy",
}
_ID_ATTR = re.compile(r'\bid="([^"<>]*)"')
_LABELLEDBY = re.compile(r'\baria-labelledby="([^"<>]*)"')


def safe_svg(svg: str, prefix: str) -> Optional[str]:
    """The figure if every element and attribute is on the allow-list (ids made unique
    with ``prefix``), else None. No script, no links, no styles, no foreign content."""
    if not isinstance(svg, str) or len(svg) > 2_000_000 or "<!" in svg or "<?" in svg:
        return None
    try:
        root = ET.fromstring(svg)
    except ET.ParseError:
        return None
    if root.tag != _SVG_NS + "svg":
        return None
    for el in root.iter():
        if not el.tag.startswith(_SVG_NS) or el.tag[len(_SVG_NS):] not in _SVG_TAGS:
            return None
        for a in el.attrib:
            if a not in _SVG_ATTRS:
                return None
    svg = _ID_ATTR.sub(lambda m: f'id="{prefix}{m[1]}"', svg)
    return _LABELLEDBY.sub(lambda m: 'aria-labelledby="' + " ".join(prefix + t for t in m[1].split()) + '"', svg)


def _status_badge(status: str) -> str:
    word = STATUS_WORDS.get(status)
    if not word:
        return ""
    return f' <span class="st st-{esc(status)}">{word}</span>'


def _html_inputs(rec: dict) -> list[str]:
    h = []
    if rec["inputs"]:
        h.append('<table class="inp"><caption class="small">Inputs: as entered and as the worksheet reads them</caption>')
        h.append('<colgroup><col class="c1"><col class="c2"><col class="c3"></colgroup>')
        h.append('<thead><tr><th scope="col">Input</th><th scope="col">As entered</th><th scope="col">Value used</th></tr></thead><tbody>')
        for it in rec["inputs"]:
            label = esc(it["label"]) + (f" [{esc(it['unit'])}]" if it["unit"] else "")
            entered = esc(it["entered"], multiline=True) if it["entered"].strip() else "<em>(blank)</em>"
            if it["kind"] == "table":
                entered = esc(it["used"])
            if not it["stored"]:
                entered += ' <span class="small">(default)</span>'
            h.append(f'<tr><th scope="row">{label}</th><td>{entered}</td><td>{esc(it["used"])}</td></tr>')
        h.append("</tbody></table>")
        for it in rec["inputs"]:
            if it["kind"] == "table" and it["table"]:
                cols = rec["_sheet_cols"].get(it["name"], [])
                h.append(f'<table class="small"><caption>{esc(it["label"])}</caption><thead><tr><th scope="col">#</th>')
                for c in cols:
                    h.append(f'<th scope="col">{esc(c.label)}{(" [" + esc(c.unit) + "]") if c.unit else ""}</th>')
                h.append("</tr></thead><tbody>")
                for i, row in enumerate(it["table"], 1):
                    h.append(f"<tr><td>{i}</td>" + "".join(f"<td>{esc(c)}</td>" for c in row) + "</tr>")
                h.append("</tbody></table>")
    elif rec["raw"]:
        h.append('<table class="inp"><caption class="small">Stored inputs</caption><thead><tr><th scope="col">Field</th>'
                 '<th scope="col">As entered</th></tr></thead><tbody>')
        for k, v in rec["raw"].items():
            h.append(f'<tr><th scope="row">{esc(k)}</th><td>{esc(v, multiline=True)}</td></tr>')
        h.append("</tbody></table>")
    return h


def _html_results(rec: dict) -> list[str]:
    out = rec["out"] or {}
    h = []
    results = out.get("results") or []
    if results:
        h.append('<table class="res"><caption class="small">Results with method and published source</caption>')
        h.append('<colgroup><col class="c1"><col class="c2"><col class="c3"><col class="c4"></colgroup>')
        h.append('<thead><tr><th scope="col">Result</th><th scope="col">Value</th><th scope="col">Method</th>'
                 '<th scope="col">Source</th></tr></thead><tbody>')
        group = ""
        for r in results:
            g = r.get("group") or ""
            if g and g != group:
                h.append(f'<tr><th class="grp" colspan="4" scope="colgroup">{esc(g)}</th></tr>')
            group = g
            cls = ' class="key"' if r.get("key") else ""
            h.append(
                f"<tr{cls}><th scope=\"row\">{esc(r.get('label', ''))}</th>"
                f"<td class=\"v\">{esc(r.get('display', ''))}{_status_badge(r.get('status', ''))}</td>"
                f"<td class=\"small\">{esc(r.get('method', ''))}</td>"
                f"<td class=\"small\">{esc(r.get('source', ''))}</td></tr>"
            )
        h.append("</tbody></table>")
    for t in out.get("tables") or []:
        cols = t.get("columns") or []
        h.append(f'<table class="small"><caption>{esc(t.get("title", ""))}</caption><thead><tr>')
        h.append("".join(f'<th scope="col">{esc(c)}</th>' for c in cols) + "</tr></thead><tbody>")
        for row in t.get("rows") or []:
            cells = list(row) if isinstance(row, (list, tuple)) else [row]
            h.append("<tr>" + "".join(f"<td>{esc(c)}</td>" for c in cells) + "</tr>")
        h.append("</tbody></table>")
        if t.get("note"):
            h.append(f'<p class="small">{esc(t["note"])}</p>')
    for n in out.get("notes") or []:
        h.append(f'<p class="small">{esc(n)}</p>')
    return h


def _html_entry(rec: dict, figures: bool) -> list[str]:
    out = rec["out"] or {}
    h = [f'<section class="entry" id="entry-{rec["index"]}" aria-labelledby="entry-{rec["index"]}-h">']
    h.append(f'<h2 id="entry-{rec["index"]}-h">{rec["index"]}. {esc(rec["name"])}</h2>')
    ws = f"{esc(rec['title'])} ({esc(rec['worksheet'])})" if rec["title"] else esc(rec["worksheet"])
    edited = f" · last edited {esc(when(rec['updated']))}" if rec["updated"] else ""
    h.append(f'<p class="meta">Worksheet: {ws}{edited}</p>')
    if rec["problem"]:
        h.append(f'<p class="err"><strong>{esc(rec["problem"])}</strong></p>')
    h.append("<h3>Inputs</h3>")
    h += _html_inputs(rec) or ["<p>No inputs stored.</p>"]
    errs = out.get("field_errors") or {}
    if errs or out.get("error"):
        h.append('<h3>Input problems</h3><ul class="err">')
        for name, msg in errs.items():
            h.append(f"<li>{esc(_field_label(rec, name))}: {esc(msg)}</li>")
        if out.get("error"):
            h.append(f"<li>{esc(out['error'])}</li>")
        h.append("</ul>")
    if out.get("ok"):
        h.append("<h3>Results</h3>")
        h += _html_results(rec)
    if out.get("warnings"):
        h.append('<h3>Warnings</h3><ul class="warn">' + "".join(f"<li>{esc(w)}</li>" for w in out["warnings"]) + "</ul>")
    if figures and out.get("ok"):
        for j, fig in enumerate(out.get("figures") or [], 1):
            svg = safe_svg(fig.get("svg", ""), f"e{rec['index']}f{j}-")
            if svg is None:
                continue
            h.append(f"<figure>{svg}<figcaption>Figure {rec['index']}.{j}: {esc(fig.get('title', ''))}</figcaption></figure>")
    h.append("</section>")
    return h


def _key_summary(rec: dict) -> str:
    out = rec["out"] or {}
    if not out.get("ok"):
        return rec["problem"] or "Not computed."
    keys = [r for r in out.get("results") or [] if r.get("key")] or (out.get("results") or [])[:2]
    more = " …" if len(keys) > 4 else ""
    return "; ".join(f"{clean(r.get('label', ''), False)}: {clean(r.get('display', ''), False)}" for r in keys[:4]) + more


def _html(job, recs, app_version, date, paper, figures, one_entry) -> str:
    site = clean(job.get("site", ""), multiline=False).strip() or "Untitled job"
    heading = f"{site} — {recs[0]['name']}" if one_entry and recs else site
    csp = f"default-src 'none'; style-src '{style_hash(paper)}'; img-src data:; base-uri 'none'; form-action 'none'"
    h = [
        "<!DOCTYPE html>",
        '<html lang="en">',
        "<head>",
        '<meta charset="utf-8">',
        f'<meta http-equiv="Content-Security-Policy" content="{esc(csp)}">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f'<meta name="generator" content="Fieldphasor {esc(app_version)}">',
        f"<title>{esc('Fieldphasor report: ' + heading)}</title>",
        f"<style>{style_text(paper)}</style>",
        "</head>",
        "<body>",
        "<header>",
        f"<h1>{esc(heading)}</h1>",
        f'<p class="meta">Site visit date: {esc(job.get("date", "") or "not given")} · '
        f"Report date: {esc(date)} · Fieldphasor {esc(app_version)}</p>",
        "</header>",
        "<main>",
    ]
    notes = clean(job.get("notes", ""))
    if notes.strip() and not one_entry:
        h.append('<section aria-labelledby="notes-h"><h2 id="notes-h">Notes</h2>')
        h.append(f'<p class="notes">{html.escape(notes, quote=True)}</p></section>')
    if not one_entry:
        h.append('<section aria-labelledby="sum-h"><h2 id="sum-h">Summary</h2>')
        if recs:
            h.append('<table class="small sum"><colgroup><col class="c1"><col class="c2"><col class="c3"><col class="c4">'
                     '</colgroup><thead><tr><th scope="col">#</th><th scope="col">Entry</th>'
                     '<th scope="col">Worksheet</th><th scope="col">Headline results</th></tr></thead><tbody>')
            for r in recs:
                h.append(
                    f'<tr><td>{r["index"]}</td><td><a href="#entry-{r["index"]}">{esc(r["name"])}</a></td>'
                    f"<td>{esc(r['title'] or r['worksheet'])}</td><td>{esc(_key_summary(r))}</td></tr>"
                )
            h.append("</tbody></table>")
        else:
            h.append("<p>This job has no entries yet.</p>")
        h.append("</section>")
    h.append('<section aria-labelledby="cau-h"><h2 id="cau-h">Cautions</h2><ul class="cau">')
    h += [f"<li>{esc(c)}</li>" for c in _all_cautions(recs)]
    h.append("</ul></section>")
    for r in recs:
        r["_sheet_cols"] = _sheet_columns(r["worksheet"])
        h += _html_entry(r, figures)
    h.append("</main>")
    h.append(
        f"<footer><p>Made with Fieldphasor {esc(app_version)} on {esc(date)}. Each entry was recomputed from its "
        "inputs by this version of the app; methods and published sources are given beside each result. "
        "Results are engineering estimates: local codes, the utility's rules, the equipment maker's instructions "
        "and a licensed engineer's review govern.</p></footer>"
    )
    h.append("</body>")
    h.append("</html>")
    return "\n".join(h) + "\n"


def _sheet_columns(ws: str) -> dict:
    from .bridge import sheets

    sheet = sheets().get(ws)
    return {f.name: f.columns for f in sheet.fields if f.kind == "table"} if sheet else {}


# ---------------------------------------------------------------------------------------
# plain text


def _indent(text: str, pad: str = "    ") -> list[str]:
    return [pad + line if line else pad.rstrip() for line in clean(text).split("\n")]


def _text(job, recs, app_version, date, full, one_entry) -> str:
    one = lambda s: clean(s, multiline=False)  # noqa: E731
    site = one(job.get("site", "")).strip() or "Untitled job"
    L = ["FIELDPHASOR REPORT", "", f"Site: {site}"]
    if one_entry and recs:
        L.append(f"Entry: {one(recs[0]['name'])}")
    L.append(f"Site visit date: {one(job.get('date', '')) or 'not given'}")
    L.append(f"Report date: {one(date)}   App: Fieldphasor {one(app_version)}")
    notes = clean(job.get("notes", ""))
    if notes.strip() and not one_entry:
        L += ["", "Notes:"] + _indent(notes)
    for r in recs:
        out = r["out"] or {}
        L += ["", "=" * 60, f"{r['index']}. {one(r['name'])}"]
        L.append(f"   Worksheet: {one(r['title'] or r['worksheet'])}" + (f" ({one(r['worksheet'])})" if r["title"] else ""))
        if r["problem"]:
            L.append(f"   ! {one(r['problem'])}")
        L.append("   Inputs:")
        if r["inputs"]:
            for it in r["inputs"]:
                unit = f" [{one(it['unit'])}]" if it["unit"] else ""
                entered = one(it["entered"]) if it["kind"] != "table" else one(it["used"])
                used = one(it["used"])
                line = f"     {one(it['label'])}{unit}: {entered or '(blank)'}"
                if used and used != entered and it["kind"] not in ("text", "table"):
                    line += f"  -> {used}"
                L.append(line)
                if it["kind"] == "table" and it["table"]:
                    cols = _sheet_columns(r["worksheet"]).get(it["name"], [])
                    L.append("       columns: " + " | ".join(
                        one(c.label) + (f" [{one(c.unit)}]" if c.unit else "") for c in cols))
                    for i, row in enumerate(it["table"], 1):
                        L.append(f"       row {i}: " + " | ".join(one(c) for c in row))
        else:
            for k, v in r["raw"].items():
                L.append(f"     {one(k)}: {one(v)}")
        for name, msg in (out.get("field_errors") or {}).items():
            L.append(f"   ! {one(_field_label(r, name))}: {one(msg)}")
        if out.get("error"):
            L.append(f"   ! {one(out['error'])}")
        if out.get("ok"):
            L.append("   Results:")
            for res in out.get("results") or []:
                st = STATUS_WORDS.get(res.get("status", ""), "")
                mark = "*" if res.get("key") else "-"
                L.append(f"   {mark} {one(res.get('label', ''))}: {one(res.get('display', ''))}" + (f"  [{st}]" if st else ""))
                if full:
                    L.append(f"       method: {one(res.get('method', ''))}")
                    L.append(f"       source: {one(res.get('source', ''))}")
            for t in out.get("tables") or []:
                L.append(f"   Table: {one(t.get('title', ''))}")
                L.append("       " + " | ".join(one(c) for c in t.get("columns") or []))
                for row in t.get("rows") or []:
                    cells = list(row) if isinstance(row, (list, tuple)) else [row]
                    L.append("       " + " | ".join(one(c) for c in cells))
        if out.get("warnings"):
            L.append("   Warnings:")
            L += [f"   ! {one(w)}" for w in out["warnings"]]
    L += ["", "=" * 60, "CAUTIONS"]
    L += [f"- {one(c)}" for c in _all_cautions(recs)]
    L += ["", f"Made with Fieldphasor {one(app_version)} on {one(date)}; each entry recomputed from its inputs."]
    return "\n".join(L) + "\n"


# ---------------------------------------------------------------------------------------
# CSV


def _num(v: Any) -> str:
    if isinstance(v, bool) or not isinstance(v, (int, float)):
        return "" if v is None else str(v)
    return repr(float(v))


def _csv(job, recs, app_version, date) -> str:
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
                    cols = _sheet_columns(ws).get(it["name"], [])
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
            row(e, ws, "error", name, _field_label(r, name), msg)
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
