"""Cleaning and escaping user and computed text for the report formats.

All user text (site, notes, entry names, typed inputs) and all computed text is cleaned of
control and bidirectional override characters, then escaped for its format:

* HTML: :func:`html.escape` on every piece of text (quotes too, so it is safe in attributes).
* CSV: cells that a spreadsheet could take for a formula (first character = + - @ tab CR LF
  or their full-width forms) get a leading apostrophe, as the OWASP "CSV Injection" guidance
  advises; plain numbers such as -12.5 are left as they are, since a number is never a formula.
"""

from __future__ import annotations

import html
import re
from typing import Any

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
