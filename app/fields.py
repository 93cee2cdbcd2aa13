"""Field declarations: the kinds and widgets the shell draws, a field's limits, units, help and
one-tap values, table columns, and the error that belongs to one field.

Split from :mod:`app.sheet` (which re-exports these names, so worksheets import them from there).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Optional

from pycore.errors import InputError

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
