"""The worksheet framework: field declarations, input reading with messages, and outcomes.

A worksheet module in :mod:`app.sheets` defines ``SHEET = Worksheet(...)``. The shell
renders its fields from :meth:`Worksheet.declaration`; :func:`app.registry.run` (behind
:func:`app.bridge.compute`) calls :meth:`Worksheet.run` with the text the user typed.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable, Optional

from pycore.errors import InputError

from . import fmt
# re-exported: worksheets import their building blocks from here
from .fields import BUTTON_CHOICES, OUT_OF_RANGE_MESSAGE, WIDGETS, Column, Field, FieldError, out_of_range  # noqa: F401
from .inputs import Inputs


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
    # Field names a user on a phone needs first: a form section holding none of them is
    # drawn collapsed to a one-line summary (app/formview.py). Empty: every section is open.
    essential: tuple = ()

    def __post_init__(self):
        unknown = [n for n in self.essential if n not in {f.name for f in self.fields}]
        if unknown:
            raise ValueError(f"worksheet {self.id}: essential names no field: {unknown}")

    def field(self, name: str) -> Field:
        by_name = self.__dict__.get("_by_name")
        if by_name is None or len(by_name) != len(self.fields):  # built once; a compute asks hundreds of times
            by_name = self.__dict__["_by_name"] = {f.name: f for f in self.fields}
        return by_name[name]

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
