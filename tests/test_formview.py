"""app/formview.py and the field widget: the form's one markup source.

The browser side (the shell instantiating the same tree, compared with the serialised HTML for
every worksheet) is tests/browser/test_form_markup.py; these check the Python side alone.
"""

from __future__ import annotations

import json
from html.parser import HTMLParser

import pytest

from app import OPENING_SHEET, bridge, formview, snapshot
from app.sheet import BUTTON_CHOICES, WIDGETS, Column, Field, Inputs, Worksheet

CATALOG = json.loads(bridge.catalog())


def opts(n):
    return [(str(i), f"Option {i}") for i in range(n)]


def test_default_widget_is_decided_by_kind_and_option_count():
    assert Field("a", "A", kind="choice", options=opts(BUTTON_CHOICES)).widget == "buttons"
    assert Field("a", "A", kind="choice", options=opts(BUTTON_CHOICES + 1)).widget == "select"
    assert Field("a", "A", kind="table", columns=[Column("x", "X")]).widget == "table"
    for kind in ("number", "complex", "text", "list"):
        assert Field("a", "A", kind=kind).widget == "input"


def test_widget_comes_from_the_declaration_never_the_name():
    assert Field("site_notes", "Notes", kind="text").widget == "input"
    assert Field("x", "Notes", kind="text", widget="textarea").widget == "textarea"
    assert Field("x", "Units", kind="choice", options=opts(2), widget="select").widget == "select"


@pytest.mark.parametrize("kind, widget", [("number", "buttons"), ("choice", "textarea"), ("text", "table"), ("table", "input")])
def test_a_widget_that_cannot_draw_the_kind_is_refused_at_declaration(kind, widget):
    with pytest.raises(ValueError, match=widget):
        Field("x", "X", kind=kind, widget=widget, options=opts(2))


def test_catalog_carries_each_fields_widget_and_flags_the_opening_sheet_once():
    for d in CATALOG:
        for f in d["fields"]:
            assert f["widget"] in WIDGETS[f["kind"]], (d["id"], f["name"])
    assert [d["id"] for d in CATALOG if d.get("opening")] == [OPENING_SHEET]
    assert snapshot.PROBE_SHEET == OPENING_SHEET


def walk(nodes):
    for n in nodes:
        if not isinstance(n, str):
            yield n
            yield from walk(n[2:])


@pytest.mark.parametrize("sheet_id", list(bridge.sheets()))
def test_tree_has_every_field_once_in_order_with_its_hooks(sheet_id):
    sheet = bridge.sheets()[sheet_id]
    tree = next(d for d in CATALOG if d["id"] == sheet_id)["form"]
    assert tree == json.loads(json.dumps(formview.form_tree(sheet)))
    wrappers = [n for n in walk(tree) if "data-field" in n[1]]
    assert [n[1]["data-field"] for n in wrappers] == [f.name for f in sheet.fields]
    ids = [n[1]["id"] for n in walk(tree) if "id" in n[1]]
    assert len(ids) == len(set(ids))
    for n in walk(tree):
        for ref in n[1].get("aria-describedby", "").split() + n[1].get("aria-labelledby", "").split():
            assert ref in ids, (sheet_id, ref)
        if n[0] == "label" and "for" in n[1]:
            assert n[1]["for"] in ids
    ins = Inputs(sheet, {})
    for f, w in zip(sheet.fields, wrappers):
        assert ("hidden" in w[1]) == (not ins.visible(f.name)), f.name
        assert ["p", {"class": "err", "id": f"err-{f.name}", "hidden": True}] in w[2:]
        kinds = {n[0] for n in walk(w[2:])}
        expect = {"buttons": "fieldset", "select": "select", "input": "input", "textarea": "textarea", "table": "div", "file": "textarea"}[f.widget]
        assert expect in kinds, f.name
        if f.widget == "buttons":
            radios = [n for n in walk(w[2:]) if n[0] == "input"]
            assert [r[1]["value"] for r in radios] == [v for v, _ in f.options]
            assert [r[1]["value"] for r in radios if r[1].get("checked")] == [f.default]
        chips = [n for n in walk(w[2:]) if "data-set" in n[1]]
        assert [c[1]["data-set"] for c in chips] == list(f.suggest)


class TreeParser(HTMLParser):
    """HTML back to the tree form (attributes without a value as True)."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.root = ["root", {}]
        self.stack = [self.root]

    def handle_starttag(self, tag, attrs):
        node = [tag, {k: True if v is None else v for k, v in attrs}]
        self.stack[-1].append(node)
        if tag not in formview.VOID:
            self.stack.append(node)

    def handle_endtag(self, tag):
        assert self.stack.pop()[0] == tag

    def handle_data(self, data):
        self.stack[-1].append(data)


def parse(html):
    p = TreeParser()
    p.feed(html)
    p.close()
    return p.root[2:]


def test_serialised_html_reads_back_as_the_tree_with_markup_characters_in_text_and_values():
    odd = 'a<b> & "c" \'d\' </p>'
    sheet = Worksheet(id="t", title="T", summary="", compute=lambda i, o: None, fields=[
        Field("x", odd, unit="Ω", help=odd, default=odd, suggest=[odd], group=odd),
        Field("c", odd, kind="choice", default="1", options=[("1", odd), ("2", "two")]),
        Field("k", odd, kind="choice", default="2", options=opts(6)),
        Field("n", odd, kind="text", widget="textarea", default="\nstarts with a new line " + odd),
    ])
    tree = formview.form_tree(sheet)
    back = parse(formview.html(tree))
    # the serialiser writes one new line after <textarea>, which the HTML parser drops (as html.parser does not)
    area = next(n for n in walk(back) if n[0] == "textarea")
    assert area[2].startswith("\n\n")
    area[2] = area[2][1:]
    assert back == tree


def test_first_sections_stop_at_the_asked_group_and_leave_tables_to_the_shell():
    opening = next(d for d in CATALOG if d.get("opening"))
    groups = [n for n in opening["form"] if n[0] == "fieldset"]
    assert len(groups) > 2
    part = formview.first_sections_html(opening["form"], 2)
    assert part == formview.html(opening["form"][: opening["form"].index(groups[2])])
    assert formview.first_sections_html(opening["form"]) == formview.html(opening["form"])
    with_table = [d for d in CATALOG if any(f["widget"] == "table" for f in d["fields"])]
    assert with_table
    for d in with_table:
        assert formview.first_sections_html(d["form"]) is None
