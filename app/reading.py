"""What a computation read from each field: the text entered, the value used and its unit.

:class:`app.sheet.Inputs` records one :class:`Reading` per field its typed readers touch, so a
report can show the values the computation actually used, after the range checks, rather than
parsing the inputs a second time.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Optional

from . import fmt

USED, INVALID, UNUSED = "used", "invalid", "unused"
DIGITS = 6  # significant figures of a value shown as used


@dataclass
class Reading:
    """One field as the computation read it.

    ``field``: the :class:`app.sheet.Field`; ``text``: the text entered (or the field's default);
    ``value``: the value used, in the field's own unit (float for a number, complex, list of
    floats, the choice's value, the text, or the table's rows), None when blank or not usable;
    ``ok``: False when the field was refused; ``cells``: for a table, the non-empty rows as
    entered. :attr:`shown` (the value for people) is worked out only when a report asks.
    """

    field: Any
    text: str
    value: Any = None
    ok: bool = True
    cells: Optional[list] = None

    @property
    def name(self) -> str:
        return self.field.name

    @property
    def unit(self) -> str:
        return self.field.unit

    @property
    def shown(self) -> str:
        """The value used, for people: '480 V' for '0.48 kV' typed in a V field."""
        return describe(self.field, self.value, self.text, self.cells)

    def to_json(self, status: str = USED) -> dict:
        """A JSON-safe record: ``{"name", "label", "unit", "kind", "text", "status", "value",
        "shown"}`` (+ ``"rows"`` for a table). ``status`` is 'used', 'invalid' or 'unused'."""
        f = self.field
        value = self.value if status == USED else None
        if isinstance(value, complex):
            value = [value.real, value.imag]
        elif f.kind == "table":
            value = None
        text = file_summary(self.text) if getattr(f, "widget", "") == "file" else self.text
        d = {"name": f.name, "label": f.label, "unit": f.unit, "kind": f.kind, "text": text,
             "status": status, "value": value, "shown": self.shown if status == USED else shown_for(status, self.text)}
        if f.kind == "table":
            d["rows"] = self.cells
        return d


FIRST_LINE = 80  # characters of a file's first line a report shows


def file_summary(text: str) -> str:
    """A file kept in a field, for a report: its size and first line, never the whole text."""
    lines = text.splitlines()
    first = next((ln.strip() for ln in lines if ln.strip()), "")
    if len(first) > FIRST_LINE:
        first = first[: FIRST_LINE - 1] + "…"
    return (f"{len(text):,} characters ({len(text.encode('utf-8', 'replace')):,} bytes), {len(lines):,} lines; "
            f"first line: {first}" if text.strip() else "(empty)")


def shown_for(status: str, text: str) -> str:
    """What a report shows as 'value used' for a field that was refused or never read."""
    if status == UNUSED:
        return "(not used)"
    if status == INVALID:
        return "(blank)" if not text.strip() else "(invalid)"
    return ""


def describe(field, value: Any, text: str, cells: Optional[list] = None) -> str:
    """The value as the computation uses it, for people: '480 V' for '0.48 kV' in a V field."""
    kind, unit = field.kind, field.unit
    if isinstance(value, str) and kind != "choice" and getattr(field, "widget", "") != "file":
        return value  # read as plain text (e.g. to test for a blank)
    if kind == "number":
        if value is None:
            return "(blank)"
        return fmt.with_unit(value, unit, DIGITS) if unit != "%" else f"{fmt.sig(value, DIGITS)} %"
    if kind == "complex":
        return "(blank)" if value is None else fmt.complex_rect(value, unit, DIGITS)
    if kind == "choice":
        return next((lab for v, lab in field.options if v == value), str(value))
    if kind == "list":
        if not value:
            return "(blank)" if not text.strip() else ""
        return "; ".join(fmt.sig(x, DIGITS) for x in value) + (f" {unit}" if unit else "")
    if kind == "table":
        n = len(cells or [])
        return f"{n} row{'s' if n != 1 else ''}"
    if getattr(field, "widget", "") == "file":
        return file_summary(text)
    return text
