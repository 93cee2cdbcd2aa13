"""The plain-text report: a summary for an e-mail body or a text message.

Control characters are removed; the user's multi-line notes are indented so they cannot
imitate the report's own headings.
"""

from __future__ import annotations

from .escape import clean
from .gather import STATUS_WORDS, all_cautions, field_label


def _indent(text: str, pad: str = "    ") -> list[str]:
    return [pad + line if line else pad.rstrip() for line in clean(text).split("\n")]


def render(job, recs, app_version, date, full, one_entry) -> str:
    """The plain-text report of the gathered entries ``recs`` (see :func:`app.report.render`)."""
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
        worded = [t for t in (out.get("tables") or []) if t.get("text")] if out.get("ok") else []
        if not full:  # the short summary (shared, e-mailed) leads with what to buy
            for t in worded:
                L.append(f"   {one(t.get('title', ''))}:")
                L += _indent(t["text"], "       ")
        L.append("   Inputs:")
        if r["inputs"]:
            for it in r["inputs"]:
                unit = f" [{one(it['unit'])}]" if it["unit"] else ""
                entered = one(it["entered"]) if it["kind"] != "table" else one(it["rows_entered"])
                used = one(it["used"])
                line = f"     {one(it['label'])}{unit}: {entered or '(blank)'}"
                if used and used != entered and (it["kind"] not in ("text", "table") or it["status"] != "used"):
                    line += f"  -> {used}"
                L.append(line)
                if it["kind"] == "table" and it["table"]:
                    cols = r["columns"].get(it["name"], [])
                    L.append("       columns: " + " | ".join(
                        one(c.label) + (f" [{one(c.unit)}]" if c.unit else "") for c in cols))
                    for i, row in enumerate(it["table"], 1):
                        L.append(f"       row {i}: " + " | ".join(one(c) for c in row))
        else:
            for k, v in r["raw"].items():
                L.append(f"     {one(k)}: {one(v)}")
        for name, msg in (out.get("field_errors") or {}).items():
            L.append(f"   ! {one(field_label(r, name))}: {one(msg)}")
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
                if t.get("text"):  # a table with its own plain wording (e.g. an order list)
                    if full:
                        L.append(f"   {one(t.get('title', ''))}:")
                        L += _indent(t["text"], "       ")
                    continue
                L.append(f"   Table: {one(t.get('title', ''))}")
                L.append("       " + " | ".join(one(c) for c in t.get("columns") or []))
                for row in t.get("rows") or []:
                    cells = list(row) if isinstance(row, (list, tuple)) else [row]
                    L.append("       " + " | ".join(one(c) for c in cells))
        if out.get("warnings"):
            L.append("   Warnings:")
            L += [f"   ! {one(w)}" for w in out["warnings"]]
    L += ["", "=" * 60, "CAUTIONS"]
    L += [f"- {one(c)}" for c in all_cautions(recs)]
    L += ["", f"Made with Fieldphasor {one(app_version)} on {one(date)}; each entry recomputed from its inputs."]
    return "\n".join(L) + "\n"
