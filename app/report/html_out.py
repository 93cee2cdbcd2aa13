"""The HTML report: a print-ready page with its own style sheet, and the figure filter.

A Content-Security-Policy in the document allows no script at all and only its own style
element (by hash), so even a missed escape could not run code. Figures are SVG from
:mod:`app.svg`, admitted only when every element and attribute is on an allow-list.
"""

from __future__ import annotations

import base64
import hashlib
import html
import re
import xml.etree.ElementTree as ET
from typing import Optional

from .escape import clean, esc
from .gather import STATUS_WORDS, all_cautions, field_label, when

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
                entered = esc(it["rows_entered"])
            if not it["stored"]:
                entered += ' <span class="small">(default)</span>'
            h.append(f'<tr><th scope="row">{label}</th><td>{entered}</td><td>{esc(it["used"])}</td></tr>')
        h.append("</tbody></table>")
        for it in rec["inputs"]:
            if it["kind"] == "table" and it["table"]:
                cols = rec["columns"].get(it["name"], [])
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
            h.append(f"<li>{esc(field_label(rec, name))}: {esc(msg)}</li>")
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


def render(job, recs, app_version, date, paper, figures, one_entry) -> str:
    """The HTML report of the gathered entries ``recs`` (see :func:`app.report.render`)."""
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
    h += [f"<li>{esc(c)}</li>" for c in all_cautions(recs)]
    h.append("</ul></section>")
    for r in recs:
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
