"""Reports of a job or one of its entries: print-ready HTML, a plain-text summary, CSV.

Every entry is recomputed from its stored inputs through :mod:`app.registry`, so a report
always shows what this version of the app computes, and lists each input as entered beside
the value the computation used (after its range checks). The package holds one module per
job: :mod:`.gather` (recomputing the entries), :mod:`.escape` (cleaning and escaping text),
:mod:`.html_out` (HTML with its style sheet and figure filter), :mod:`.text_out` and
:mod:`.csv_out`.
"""

from __future__ import annotations

from typing import Optional

from ..jobfile import slug
from . import csv_out, html_out, text_out
from .csv_out import CSV_COLUMNS  # noqa: F401  (public names of the report package)
from .escape import clean, csv_cell, esc  # noqa: F401
from .gather import STATUS_WORDS, gather, when  # noqa: F401
from .html_out import safe_svg, style_hash, style_text  # noqa: F401

FORMATS = {"html": ("text/html", "html"), "text": ("text/plain", "txt"), "csv": ("text/csv", "csv")}
PAPERS = {"auto": "auto", "a4": "A4", "letter": "letter"}


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
    recs = gather(job, entry_id)
    if fmt == "html":
        return html_out.render(job, recs, app_version, date, PAPERS.get(paper, "auto"), figures, entry_id is not None)
    if fmt == "text":
        return text_out.render(job, recs, app_version, date, detail != "brief", entry_id is not None)
    return ("\ufeff" if bom else "") + csv_out.render(job, recs, app_version, date)


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
