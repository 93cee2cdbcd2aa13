"""The worksheet framework: field declarations, input reading with messages, and outcomes.

A worksheet module in :mod:`app.sheets` defines ``SHEET = Worksheet(...)``. The shell
renders its fields from :meth:`Worksheet.declaration`; :func:`app.registry.run` (behind
:func:`app.bridge.compute`) calls :meth:`Worksheet.run` with the text the user typed.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass, field
from typing import Any, Callable, Optional

from pycore.complexparse import parse_complex
from pycore.errors import InputError
from pycore.numparse import parse_quantity
from pycore.pfparse import PowerFactor, parse_pf

from . import fmt
from .reading import INVALID, UNUSED, USED, Reading

# Field kinds the shell knows how to render.
KINDS = ("number", "complex", "choice", "table", "text", "list")
# How a field is drawn (app/formview.py), by kind: the first widget of each list is the default,
# except that a choice of at most BUTTON_CHOICES options defaults to a row of buttons.
WIDGETS = {"choice": ("select", "buttons"), "table": ("table",), "number": ("input",), "complex": ("input",),
           "text": ("input", "textarea", "file"), "list": ("input", "textarea")}
# A "file" widget is a multi-line text area the user may also fill from a file on the device; its
# field states the longest text it keeps (``max_chars``), which the jobs file allows for it.
BUTTON_CHOICES = 4

# No quantity of this trade lies outside this band of magnitudes in its field's own unit
# (zero aside): such a value is a wrong exponent or unit, refused at the field rather than
# carried into the arithmetic, where it would overflow or underflow.
MAGNITUDE_BAND = (1e-18, 1e18)
OUT_OF_RANGE_MESSAGE = "That value is out of range here (far too large or too small): check the unit and the exponent."


def out_of_range(v: float) -> bool:
    """True for a non-zero magnitude outside :data:`MAGNITUDE_BAND`."""
    return v != 0 and not (MAGNITUDE_BAND[0] <= abs(v) <= MAGNITUDE_BAND[1])


@dataclass
class Column:
    """One column of a ``table`` field."""

    name: str
    label: str
    unit: str = ""
    kind: str = "number"  # number | text | choice
    required: bool = True
    options: list = field(default_factory=list)
    min: Optional[float] = None
    max: Optional[float] = None

    def to_json(self) -> dict:
        d = {"name": self.name, "label": self.label, "unit": self.unit, "kind": self.kind, "required": self.required}
        if self.options:
            d["options"] = [{"value": v, "label": lab} for v, lab in self.options]
        return d


@dataclass
class Field:
    """One input of a worksheet.

    ``min``/``max`` are limits in the field's own unit; ``min_open``/``max_open`` make them
    strict. ``suggest`` lists one-tap values. ``show_when`` = ``{"field": name, "in": [values]}``
    shows the field only when a choice field has one of those values (hidden fields are
    neither validated nor used). ``group`` starts a titled section in the form. ``widget`` is
    how the form draws it (see :data:`WIDGETS`); left empty, the kind's default is set here.
    """

    name: str
    label: str
    kind: str = "number"
    unit: str = ""
    default: str = ""
    required: bool = True
    help: str = ""
    min: Optional[float] = None
    max: Optional[float] = None
    min_open: bool = False
    max_open: bool = False
    options: list = field(default_factory=list)  # [(value, label)] for choice
    suggest: list = field(default_factory=list)
    show_when: Optional[dict] = None
    group: str = ""
    columns: list = field(default_factory=list)  # [Column] for table
    max_rows: int = 500
    placeholder: str = ""
    widget: str = ""
    max_chars: Optional[int] = None  # longest text kept (a "file" widget): the reader's own limit

    def __post_init__(self):
        if self.kind not in KINDS:
            raise ValueError(f"unknown field kind {self.kind}")
        if not self.widget:
            buttons = self.kind == "choice" and len(self.options) <= BUTTON_CHOICES
            self.widget = "buttons" if buttons else WIDGETS[self.kind][0]
        if self.widget not in WIDGETS[self.kind]:
            raise ValueError(f"field {self.name}: a {self.kind} field cannot be drawn as {self.widget}")

    def to_json(self) -> dict:
        d: dict[str, Any] = {
            "name": self.name,
            "label": self.label,
            "unit": self.unit,
            "kind": self.kind,
            "default": self.default,
            "required": self.required,
            "help": self.help,
            "widget": self.widget,
        }
        if self.min is not None:
            d["min"] = self.min
        if self.max is not None:
            d["max"] = self.max
        if self.options:
            d["options"] = [{"value": v, "label": lab} for v, lab in self.options]
        if self.suggest:
            d["suggest"] = list(self.suggest)
        if self.show_when:
            d["show_when"] = self.show_when
        if self.group:
            d["group"] = self.group
        if self.columns:
            d["columns"] = [c.to_json() for c in self.columns]
            d["max_rows"] = self.max_rows
        if self.placeholder:
            d["placeholder"] = self.placeholder
        if self.max_chars:
            d["max_chars"] = self.max_chars
        return d


class FieldError(InputError):
    """An input error that belongs to one field; raise it from a compute function."""

    def __init__(self, field_name: str, message: str):
        super().__init__(message)
        self.field = field_name


class Inputs:
    """Read typed text field by field, collecting one message per bad field."""

    def __init__(self, sheet: "Worksheet", raw: dict):
        self.sheet = sheet
        self.raw = {k: ("" if v is None else v) for k, v in raw.items()}
        self.errors: dict[str, str] = {}
        self.echo: dict[str, Reading] = {}  # what each typed reader read, for reports

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

    # -- helpers
    def _field(self, name: str) -> Field:
        return self.sheet.field(name)

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


class Outcome:
    """What a compute function produces: results, tables, warnings, cautions, figures."""

    def __init__(self):
        self.results: list[dict] = []
        self.tables: list[dict] = []
        self.warnings: list[str] = []
        self.cautions: list[str] = []
        self.figures: list[dict] = []
        self.notes: list[str] = []
        self.links: list[dict] = []

    def result(
        self,
        name: str,
        label: str,
        value: Optional[float],
        unit: str = "",
        *,
        method: str,
        source: str,
        display: Optional[str] = None,
        digits: int = 4,
        si: bool = False,
        status: str = "",
        key: bool = False,
        group: str = "",
    ) -> None:
        """Add one result. ``display`` defaults to the value with ``digits`` significant
        figures and the unit (with an SI prefix when ``si``). ``status`` is '', 'ok',
        'warn' or 'fail'; ``key`` marks the headline answers shown first."""
        v = None
        if isinstance(value, (int, float)) and not isinstance(value, bool):
            v = float(value) if math.isfinite(value) else None
        if display is None:
            if value is None:
                display = "—"
            elif si:
                display = fmt.si(value, unit, digits)
            else:
                display = fmt.with_unit(value, unit, digits)
        r = {
            "name": name,
            "label": label,
            "value": v,
            "display": display,
            "unit": unit,
            "method": method,
            "source": source,
        }
        if status:
            r["status"] = status
        if key:
            r["key"] = True
        if group:
            r["group"] = group
        self.results.append(r)

    def table(self, title: str, columns: list[str], rows: list[list[str]], note: str = "", text: str = "") -> None:
        """Add a table. ``text``, when given, is the same table as plain lines for the text
        report and the shared summary (e.g. an order list that reads as a purchase request)."""
        t = {"title": title, "columns": columns, "rows": rows, "note": note}
        if text:
            t["text"] = text
        self.tables.append(t)

    def warn(self, text: str) -> None:
        if text not in self.warnings:
            self.warnings.append(text)

    def caution(self, text: str) -> None:
        if text not in self.cautions:
            self.cautions.append(text)

    def figure(self, title: str, svg: str) -> None:
        self.figures.append({"title": title, "svg": svg})

    def link(self, label: str, worksheet: str, inputs: dict) -> None:
        """Offer to open another worksheet with these inputs (texts by field name)."""
        self.links.append({"label": label, "worksheet": worksheet, "inputs": {k: str(v) for k, v in inputs.items()}})


ComputeFn = Callable[[Inputs, Outcome], None]


@dataclass
class Worksheet:
    """A worksheet: its declaration and its compute function.

    ``compute(inputs, out)`` reads fields through ``inputs`` (which records messages),
    and, when it has what it needs, fills ``out``. It may raise :class:`FieldError` to
    put a message on one field, or :class:`InputError` for a message about the whole.
    """

    id: str
    title: str
    summary: str
    fields: list
    compute: ComputeFn
    cautions: list = field(default_factory=list)
    order: int = 100
    references: list = field(default_factory=list)
    # Field names a user on a phone needs first (issue 17): a form section holding none of them is
    # drawn collapsed to a one-line summary (app/formview.py). Empty: every section is open.
    essential: tuple = ()

    def __post_init__(self):
        unknown = [n for n in self.essential if n not in {f.name for f in self.fields}]
        if unknown:
            raise ValueError(f"worksheet {self.id}: essential names no field: {unknown}")

    def field(self, name: str) -> Field:
        for f in self.fields:
            if f.name == name:
                return f
        raise KeyError(name)

    def declaration(self) -> dict:
        return {
            "id": self.id,
            "title": self.title,
            "summary": self.summary,
            "fields": [f.to_json() for f in self.fields],
            "cautions": list(self.cautions),
            "references": list(self.references),
            "essential": list(self.essential),
        }

    def run(self, raw: dict, echo: bool = False) -> dict:
        """Compute from field name → typed text: the outcome dict of the bridge contract.

        With ``echo`` the outcome also holds ``"inputs"``: for each visible field, what the
        computation read (:meth:`app.reading.Reading.to_json`), so a report shows the values
        actually used, range-checked, and marks refused or unread fields as such."""
        ins = Inputs(self, raw)
        out = Outcome()
        for c in self.cautions:
            out.caution(c)
        general_error = ""
        try:
            self.compute(ins, out)
        except FieldError as e:
            ins.fail(e.field, str(e))
        except InputError as e:
            general_error = str(e)
        ok = not ins.errors and not general_error
        if not ok:
            out.results, out.tables, out.figures = [], [], []
        res = {
            "ok": ok,
            "results": out.results,
            "tables": out.tables,
            "field_errors": dict(ins.errors),
            "warnings": out.warnings,
            "cautions": out.cautions,
            "figures": out.figures,
            "links": out.links if ok else [],
            "notes": out.notes,
        }
        if general_error:
            res["error"] = general_error
        if echo:
            res["inputs"] = [r.to_json(status) for _, r, status in ins.readings()]
        return res
