"""A worksheet's form as a small markup tree: the one source of the form's markup.

The catalog ships each worksheet's tree (``"form"``); ``web/render.js`` instantiates it with the
DOM builder, binds behaviour by the data-* hooks below and applies the current values; the build
writes the opening worksheet's first sections into ``index.html`` with :func:`html`. Both forms
therefore come from :func:`form_tree`, and a browser test compares their DOM for every worksheet.

A node is ``[tag, {attribute: value}, *children]``; a child is a node or a text string; an
attribute whose value is ``True`` is written bare (``hidden``, ``checked``). The tree is drawn for
one set of values (the catalog's: the defaults). Which fields it shows comes from
:meth:`app.sheet.Inputs.visible`, the rule that also decides what is validated; the shell keeps
one generic copy of that rule for toggling fields while the user chooses.

Hooks the shell binds by (it knows no worksheet): ``data-field`` on each field's wrapper;
``data-insert`` (text put at the caret) and ``data-set`` (value to set) on chips; ``data-table``,
``data-rows``, ``data-row-count`` and ``data-add-row`` in a table, whose rows the shell draws
from the column declarations.
"""

from __future__ import annotations

import json
from html import escape
from typing import Optional

from .sheet import Field, Inputs, Worksheet

VOID = frozenset({"input"})
# (shown, spoken name, text inserted) for the chips under a complex field
COMPLEX_CHIPS = (("j", "imaginary j", "j"), ("∠", "angle mark", "∠"), ("−", "minus", "-"))


def form_tree(sheet: Worksheet, values: Optional[dict] = None) -> list:
    """The form of ``sheet`` as a list of top-level nodes, drawn for ``values`` (field name →
    text; the defaults for anything missing): fields before the first group, then one
    ``fieldset.group`` per group, hidden when none of its fields is shown. A group holding none of
    the sheet's ``essential`` fields is optional: drawn collapsed (:func:`optional_section`)."""
    ins = Inputs(sheet, values or {})
    top: list = []
    groups: list[tuple[list, list[bool], list]] = []
    for f in sheet.fields:
        if f.group:
            groups.append((["fieldset", {"class": "group"}, ["legend", {}, f.group]], [], []))
            top.append(groups[-1][0])
        shown = ins.visible(f.name)
        node = with_help_toggle(f, field_node(f, ins.text_of(f.name)))
        if not shown:
            node[1]["hidden"] = True
        if groups:
            groups[-1][0].append(node)
            groups[-1][1].append(shown)
            groups[-1][2].append(f)
        else:
            top.append(node)
    essential = set(sheet.essential)
    for node, shown, fields in groups:
        if not any(shown):
            node[1]["hidden"] = True
        if essential and not essential.intersection(f.name for f in fields):
            optional_section(node, fields, ins)
    return top


def optional_section(node: list, fields: list, ins: Inputs) -> None:
    """Make a group a disclosure: its legend holds a button with ``aria-expanded`` that
    controls the region holding the fields, collapsed, and shows a one-line summary of the values
    (:func:`summary`). The shell opens it on a tap (and remembers that), or when a field in it has a
    message. ``data-section`` (its first field's name) is the hook and the key it is remembered by."""
    key = fields[0].name
    title = node[2][2]
    button = ["button", {"type": "button", "class": "sec-toggle", "aria-expanded": "false", "aria-controls": f"sec-{key}",
                         "data-toggle-section": True},
              ["span", {"class": "sec-title"}, title], ["span", {"class": "sec-sum", "data-summary": True}, summary(fields, ins)]]
    body = ["div", {"class": "sec-body", "id": f"sec-{key}", "hidden": True}, *node[3:]]
    node[1]["class"] = "group opt"
    node[1]["data-section"] = key
    del node[2:]
    node += [["legend", {}, button], body]


def summary(fields: list, ins: Inputs) -> str:
    """The one-line summary of a collapsed section: each shown field's current text with its unit,
    a choice by its option's label, a table by its row count, a value with no unit after its label;
    empty fields left out. ``summaryOf`` in web/render.js follows the same rule (a browser test
    compares the two for every worksheet and choice)."""
    parts = []
    for f in fields:
        if not ins.visible(f.name):
            continue
        text = ins.text_of(f.name).strip()
        if f.kind == "table":
            try:
                n = len(json.loads(text or "[]"))
            except ValueError:
                n = 0
            parts.append(f"{n} row{'' if n == 1 else 's'}")
        elif not text:
            continue
        elif f.kind == "choice":
            parts.append(next((lab for v, lab in f.options if v == text), text))
        elif f.unit:
            parts.append(f"{text} {f.unit}")
        else:
            parts.append(f"{f.label} {text}")
    return ", ".join(parts) or "nothing entered"


def with_help_toggle(f: Field, node: list) -> list:
    """Put a field's help behind a button: the help paragraph is drawn hidden and a
    ``data-help`` button with ``aria-expanded`` controlling it comes just before it."""
    for i, child in enumerate(node):
        if isinstance(child, list) and child[0] == "p" and child[1].get("class") == "help":
            child[1]["hidden"] = True
            node.insert(i, ["button", {"type": "button", "class": "help-btn", "aria-expanded": "false",
                                       "aria-controls": child[1]["id"], "aria-label": f"Help: {f.label}",
                                       "data-help": True}, "?"])
            node[1]["class"] += " has-help"
            break
    return node


def _unit_span(unit: str) -> list:
    return ["span", {"class": "unit"}, f" ({unit})"] if unit else ["span", {"class": "unit"}]


def field_node(f: Field, value: str) -> list:
    """One field's wrapper (label or legend, help, control, chips, error paragraph) by its widget."""
    n, fid = f.name, f"in-{f.name}"
    described = f"help-{n} err-{n}" if f.help else f"err-{n}"
    wrap: list = ["div", {"class": f"field kind-{f.kind}", "data-field": n}]
    help_ = [["p", {"class": "help", "id": f"help-{n}"}, f.help]] if f.help else []
    err = ["p", {"class": "err", "id": f"err-{n}", "hidden": True}]
    if f.widget == "buttons":
        row: list = ["div", {"class": "seg-row"}]
        for v, lab in f.options:
            radio = {"type": "radio", "name": fid, "id": f"{fid}-{v}", "value": v}
            if v == value:
                radio["checked"] = True
            row.append(["span", {"class": "seg-opt"}, ["input", radio], ["label", {"for": f"{fid}-{v}"}, lab]])
        return wrap + [["fieldset", {"class": "seg", "aria-describedby": described}, ["legend", {}, f.label], row], *help_, err]
    if f.widget == "table":
        head = ["div", {"class": "tbl-row tbl-head", "aria-hidden": "true"},
                *[["span", {"class": "tbl-cell", "data-kind": c.kind}, c.label + (f" ({c.unit})" if c.unit else "")] for c in f.columns],
                ["span", {"class": "tbl-act"}]]
        foot = ["div", {"class": "tbl-foot"}, ["button", {"type": "button", "class": "btn", "data-add-row": True}, "Add row"],
                *paste_nodes(f)[:1], ["p", {"class": "muted tbl-count", "data-row-count": True}]]
        box = ["div", {"class": "tbl", "role": "group", "aria-labelledby": f"{fid}-label", "aria-describedby": described,
                       "data-table": True}, head, ["div", {"class": "tbl-body", "data-rows": True}], foot, *paste_nodes(f)[1:]]
        return wrap + [["div", {"class": "table-label", "id": f"{fid}-label"}, f.label, _unit_span(f.unit)], *help_, box, err]
    if f.widget == "select":
        control: list = ["select", {"id": fid, "aria-describedby": described}]
        for v, lab in f.options:
            control.append(["option", {"value": v, "selected": True} if v == value else {"value": v}, lab])
    else:
        attrs = {"id": fid, "aria-describedby": described, "spellcheck": "false", "autocapitalize": "off"}
        if f.placeholder:
            attrs["placeholder"] = f.placeholder
        if f.widget in ("textarea", "file"):
            control = ["textarea", {**attrs, "rows": "6" if f.widget == "file" else "3"}, value]
        else:
            attrs.update({"type": "text", "value": value, "enterkeyhint": "next"})
            if f.kind == "number":
                attrs["inputmode"] = "decimal"
            control = ["input", attrs]
    chips = []
    if f.kind == "complex":
        for shown, name, text in COMPLEX_CHIPS:
            chips.append(["button", {"type": "button", "class": "chip", "aria-label": f"Insert {name}", "data-insert": text}, shown])
    for s in f.suggest:
        spoken = f" {f.unit}" if f.unit else ""
        shown = f" {f.unit}" if f.unit and f.unit != "%" else f.unit
        chips.append(["button", {"type": "button", "class": "chip", "aria-label": f"Set {f.label} to {s}{spoken}", "data-set": s}, f"{s}{shown}"])
    wrap += [["label", {"for": fid}, f.label, _unit_span(f.unit)], *help_]
    if f.widget == "file":
        wrap.append(file_node(f))
    wrap.append(control)
    if chips:
        wrap.append(["div", {"class": "chips"}, *chips])
    wrap.append(err)
    return wrap


def file_node(f: Field) -> list:
    """The "Open file…" control of a ``file`` widget: a file input (kept in the focus order, drawn
    as its label button), a line for the chosen file's name and size, filled by the shell, and the
    button that shows a text too long to lay out at once (the shell holds it back: web/render.js)."""
    fid = f"file-{f.name}"
    return ["div", {"class": "file-open"},
            ["input", {"type": "file", "id": fid, "class": "file-input", "data-file": True,
                       "accept": ".csv,.txt,.tsv,.dat,.prn,text/csv,text/plain,text/tab-separated-values"}],
            ["label", {"for": fid, "class": "btn file-btn"}, "Open file…"],
            ["span", {"class": "muted file-info", "data-file-info": True, "aria-live": "polite"}],
            ["button", {"type": "button", "class": "btn ghost", "data-show-text": True, "hidden": True,
                        "aria-controls": f"in-{f.name}"}, "Show the text"]]


def paste_nodes(f: Field) -> list:
    """A table's paste panel: the button that opens it (``data-paste-toggle``), then the
    panel (a text area, ``data-paste-add``, and ``data-paste-report`` listing the lines not read).
    The shell splits the pasted lines into cells; Python checks the values like any typed row."""
    pid = f"paste-{f.name}"
    order = ", ".join(c.label + (f" ({c.unit})" if c.unit else "") for c in f.columns)
    return [["button", {"type": "button", "class": "btn ghost", "aria-expanded": "false", "aria-controls": pid,
                        "data-paste-toggle": True}, "Paste rows"],
            ["div", {"class": "tbl-paste", "id": pid, "hidden": True},
             ["label", {"for": f"{pid}-text"}, "Rows to add, one per line"],
             ["p", {"class": "help", "id": f"{pid}-help"},
              f"Columns in this order: {order}; separated by tabs (as copied from a spreadsheet), semicolons or "
              "commas. With tabs or semicolons a decimal comma is read as a point."],
             ["textarea", {"id": f"{pid}-text", "rows": "4", "spellcheck": "false", "autocapitalize": "off",
                           "aria-describedby": f"{pid}-help", "data-paste-text": True}],
             ["button", {"type": "button", "class": "btn", "data-paste-add": True}, "Add these rows"],
             ["p", {"class": "paste-report", "role": "status", "data-paste-report": True}]]]


def html(nodes: list) -> str:
    """Serialise nodes as HTML (text and attribute values escaped)."""
    out: list[str] = []

    def put(node) -> None:
        if isinstance(node, str):
            out.append(escape(node, quote=False))
            return
        tag, attrs, *children = node
        out.append(f"<{tag}")
        for k, v in attrs.items():
            out.append(f" {k}" if v is True else f' {k}="{escape(str(v))}"')
        out.append(">")
        if tag in VOID:
            return
        if tag == "textarea":
            out.append("\n")  # the parser drops one leading newline in a textarea: keep the value's own
        for c in children:
            put(c)
        out.append(f"</{tag}>")

    for n in nodes:
        put(n)
    return "".join(out)


def _has_table(node) -> bool:
    return not isinstance(node, str) and ("data-table" in node[1] or any(_has_table(c) for c in node[2:]))


def first_sections_html(tree: list, sections: Optional[int] = None) -> Optional[str]:
    """HTML of a form tree's top-level nodes up to its ``sections``-th group (all if None), for
    the first paint; None when that part holds a table (the shell draws its rows)."""
    part, n = [], 0
    for node in tree:
        if node[0] == "fieldset" and node[1].get("class") == "group":
            n += 1
            if sections is not None and n > sections:
                break
        part.append(node)
    if any(_has_table(node) for node in part):
        return None
    return html(part)
