"""Reading what the user typed, field by field: numbers with units, complex values, power factors,
choices, lists and tables, each range-checked with one message per bad field, and a record of what
each reader read (for reports).

Split from :mod:`app.sheet` (which re-exports :class:`Inputs`).
"""

from __future__ import annotations

import json
import math
from typing import Any, Callable, Optional

from pycore.complexparse import parse_complex
from pycore.errors import InputError
from pycore.numparse import parse_quantity
from pycore.pfparse import PowerFactor, parse_pf

from . import fmt
from .fields import OUT_OF_RANGE_MESSAGE, Field, out_of_range
from .reading import INVALID, UNUSED, USED, Reading


class Inputs:
    """Read typed text field by field, collecting one message per bad field."""

    def __init__(self, sheet, raw: dict):  # sheet: the app.sheet.Worksheet being read
        self.sheet = sheet
        self.raw = {k: ("" if v is None else v) for k, v in raw.items()}
        self.errors: dict[str, str] = {}
        self.echo: dict[str, Reading] = {}  # what each typed reader read, for reports
        self._field: Callable[[str], Field] = sheet.field  # asked hundreds of times per computation: bound once

    def _record(self, name: str, value: Any, cells: Optional[list] = None) -> Any:
        """Note what a reader read from a field (the last read wins) and pass the value on."""
        ok = name not in self.errors
        value = value if ok else None
        self.echo[name] = Reading(self._field(name), self.text_of(name), value, ok, cells)
        return value

    def readings(self) -> list[tuple[Field, Reading, str]]:
        """``(field, reading, status)`` for each visible field in declaration order; status is
        'used', 'invalid' (a message is on the field) or 'unused' (the computation never read it)."""
        read = dict(self.echo)  # deciding visibility below reads choices too; those are not uses
        out = []
        for f in self.sheet.fields:
            try:
                if not self.visible(f.name):
                    continue
            except (KeyError, TypeError):  # a show_when naming no field: list the field
                pass
            r = read.get(f.name) or Reading(f, self.text_of(f.name), ok=False)
            if f.name in self.errors or (f.name in read and not r.ok):
                status = INVALID
            else:
                status = USED if f.name in read else UNUSED
            out.append((f, r, status))
        self.echo = read
        return out

    # -- helpers (``self._field(name)``: the sheet's field lookup, bound in __init__)
    def visible(self, name: str) -> bool:
        f = self._field(name)
        if not f.show_when:
            return True
        ctl = f.show_when["field"]
        return self.visible(ctl) and self.choice(ctl) in f.show_when["in"]

    def text_of(self, name: str) -> str:
        f = self._field(name)
        v = self.raw.get(name)
        if v is None:
            v = f.default
        if not isinstance(v, str):
            v = json.dumps(v) if f.kind == "table" else str(v)
        return v

    def fail(self, name: str, message: str) -> None:
        """Record a message for a field (the first message per field wins)."""
        self.errors.setdefault(name, message)

    def _check_range(self, f: Field, v: float, name: str) -> Optional[float]:
        lo, hi = f.min, f.max
        u = f" {f.unit}" if f.unit and f.unit != "%" else f.unit
        if lo is not None and (v < lo or (f.min_open and v == lo)):
            word = "above" if f.min_open else "at least"
            self.fail(name, f"{f.label} must be {word} {fmt.sig(lo)}{u}.")
            return None
        if hi is not None and (v > hi or (f.max_open and v == hi)):
            word = "below" if f.max_open else "at most"
            self.fail(name, f"{f.label} must be {word} {fmt.sig(hi)}{u}.")
            return None
        return v

    # -- typed readers; each returns None (and records a message) when the value is unusable
    def _num(self, name: str) -> Optional[float]:
        """The field's value in its own unit, range-checked; None if empty-and-optional or bad."""
        f = self._field(name)
        text = self.text_of(name).strip()
        if not text:
            if f.required:
                self.fail(name, f"Enter {f.label.lower()}.")
            return None
        try:
            v = parse_quantity(text, f.unit)
        except InputError as e:
            self.fail(name, str(e))
            return None
        if out_of_range(v):
            self.fail(name, OUT_OF_RANGE_MESSAGE)
            return None
        return self._check_range(f, v, name)

    def _cplx(self, name: str) -> Optional[complex]:
        f = self._field(name)
        text = self.text_of(name).strip()
        if not text:
            if f.required:
                self.fail(name, f"Enter {f.label.lower()}.")
            return None
        try:
            z = parse_complex(text, f.unit)
        except InputError as e:
            self.fail(name, str(e))
            return None
        if not (math.isfinite(z.real) and math.isfinite(z.imag)):
            self.fail(name, "Enter a finite value.")
            return None
        if out_of_range(abs(z)):
            self.fail(name, OUT_OF_RANGE_MESSAGE)
            return None
        return z

    def num(self, name: str) -> Optional[float]:
        """The field's value in its own unit, range-checked; None if empty-and-optional or bad."""
        return self._record(name, self._num(name))

    def cplx(self, name: str) -> Optional[complex]:
        return self._record(name, self._cplx(name))

    def pf(self, name: str, *, lagging: bool = False) -> Optional[PowerFactor]:
        """A power-factor field, read by the one shared reader :func:`pycore.pfparse.parse_pf`
        ("0.78", "78 %", "0.78 lag", "0.95 lead"); None if empty-and-optional or bad. With
        ``lagging`` a leading value is refused at the field (a target for shunt capacitors)."""
        f = self._field(name)
        text = self.text_of(name).strip()
        got = None
        if not text:
            if f.required:
                self.fail(name, f"Enter {f.label.lower()}.")
        else:
            try:
                got = parse_pf(text)
            except InputError as e:
                self.fail(name, str(e))
            else:
                if lagging and got.leading and got.value < 1.0:
                    self.fail(name, f"{f.label} is taken as lagging here: capacitors aim at a lagging power factor "
                                    "(e.g. 0.95).")
                    got = None
        self._record(name, None if got is None else got.value)
        return got

    def pf_value(self, name: str) -> Optional[float]:
        """A lagging power-factor field's value [dimensionless] (see :meth:`pf`)."""
        got = self.pf(name, lagging=True)
        return None if got is None else got.value

    def numbers(self, name: str) -> Optional[list[float]]:
        """A ``list`` field's numbers (see :meth:`_numbers`)."""
        return self._record(name, self._numbers(name))

    def rows(self, name: str) -> Optional[list[dict]]:
        """A ``table`` field's rows (see :meth:`_rows`)."""
        cells: list = []
        return self._record(name, self._rows(name, cells), cells)

    def choice(self, name: str) -> str:
        f = self._field(name)
        v = self.text_of(name)
        allowed = [o[0] for o in f.options]
        if v not in allowed:
            v = f.default if f.default in allowed else allowed[0]
        self._record(name, v)
        return v

    def text(self, name: str) -> str:
        if name not in self.echo:  # a typed reader's record of the same field says more
            self._record(name, self.text_of(name))
        return self.text_of(name)

    def _numbers(self, name: str) -> Optional[list[float]]:
        """A ``list`` field: numbers separated by commas, semicolons, spaces or new lines,
        each with an optional unit of the field's family. A comma is a separator here, so
        decimals use a dot in lists (a lone comma between digits with no space is read as
        a decimal mark only when semicolons separate the items)."""
        f = self._field(name)
        text = self.text_of(name).strip()
        if not text:
            if f.required:
                self.fail(name, f"Enter at least one value for {f.label.lower()}.")
            return None if f.required else []
        if ";" in text or "\n" in text:
            items = [t for t in text.replace("\n", ";").split(";")]
        else:
            items = text.split(",")
            if len(items) == 1:
                items = []
                for tok in text.split():
                    # a unit typed after a space ("50 kvar 0.1 Mvar") belongs to the number before it
                    if items and not (tok[0].isdigit() or tok[0] in "+-.\u2212"):
                        items[-1] += " " + tok
                    else:
                        items.append(tok)
        out: list[float] = []
        for i, item in enumerate(items, 1):
            item = item.strip()
            if not item:
                continue
            try:
                v = parse_quantity(item, f.unit)
            except InputError as e:
                self.fail(name, f"Item {i} ('{item[:20]}'): {e}")
                return None
            if out_of_range(v):
                self.fail(name, f"Item {i}: {OUT_OF_RANGE_MESSAGE}")
                return None
            if self._check_range(f, v, name) is None:
                msg = self.errors.pop(name)
                self.fail(name, f"Item {i}: {msg}")
                return None
            out.append(v)
        if not out and f.required:
            self.fail(name, f"Enter at least one value for {f.label.lower()}.")
            return None
        return out

    def _rows(self, name: str, entered: list) -> Optional[list[dict]]:
        """A ``table`` field: a JSON list of rows (lists of cell texts, in column order) →
        list of dicts keyed by column name, numbers parsed in the column's unit. Fully
        empty rows are skipped. A message names the row and column at fault."""
        f = self._field(name)
        text = self.text_of(name).strip()
        if not text:
            data = []
        else:
            try:
                data = json.loads(text)
            except ValueError:
                self.fail(name, "The table could not be read; re-enter the rows.")
                return None
        if not isinstance(data, list):
            self.fail(name, "The table could not be read; re-enter the rows.")
            return None
        if len(data) > f.max_rows:
            self.fail(name, f"At most {f.max_rows} rows.")
            return None
        out = []
        for r, row in enumerate(data, 1):
            if isinstance(row, dict):
                cells = [row.get(c.name, "") for c in f.columns]
            elif isinstance(row, list):
                cells = list(row) + [""] * (len(f.columns) - len(row))
            else:
                self.fail(name, f"Row {r} could not be read.")
                return None
            cells = ["" if c is None else str(c) for c in cells]
            if all(not c.strip() for c in cells):
                continue
            entered.append(cells[: len(f.columns)])
            rec: dict[str, Any] = {"_row": r}
            for c, cell in zip(f.columns, cells):
                cell = cell.strip()
                if not cell:
                    if c.required:
                        self.fail(name, f"Row {r}: enter {c.label.lower()}.")
                        return None
                    rec[c.name] = None
                    continue
                if c.kind == "number":
                    try:
                        v = parse_quantity(cell, c.unit)
                    except InputError as e:
                        self.fail(name, f"Row {r}, {c.label}: {e}")
                        return None
                    if out_of_range(v):
                        self.fail(name, f"Row {r}, {c.label}: {OUT_OF_RANGE_MESSAGE}")
                        return None
                    if c.min is not None and v < c.min or c.max is not None and v > c.max:
                        lo = "" if c.min is None else f"from {fmt.sig(c.min)}"
                        hi = "" if c.max is None else f" up to {fmt.sig(c.max)}"
                        self.fail(name, f"Row {r}, {c.label}: must be {lo}{hi} {c.unit}".rstrip() + ".")
                        return None
                    rec[c.name] = v
                elif c.kind == "choice":
                    allowed = [o[0] for o in c.options]
                    rec[c.name] = cell if cell in allowed else allowed[0]
                else:
                    rec[c.name] = cell
            out.append(rec)
        if not out and f.required:
            self.fail(name, f"Enter at least one row in {f.label.lower()}.")
            return None
        return out
