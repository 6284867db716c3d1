"""Clause labels (core.labels): one label for a clause everywhere -- the review table, the
decisions, the outputs and the desktop app.

Outside reference: the demo generator's record (``demo_agreements/scenario.json``, schema
counterdraft.demo-scenario/1) lists every provision's rendered number and heading as the
generator wrote them into the .docx; the labels must name clauses by exactly those."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from core.labels import clause_label, find_provision, full_number, provision_label
from core.model import Deviation, Document, Provision, Review
from core.reader import read_document

DEMO = Path(__file__).resolve().parents[2] / "demo_agreements"


@pytest.fixture(scope="module")
def demo():
    record = json.loads((DEMO / "scenario.json").read_text(encoding="utf-8"))
    return record, read_document(str(DEMO / record["draft"]["file"]))


def test_numbered_clauses_are_named_by_the_generators_number_and_heading(demo):
    record, draft = demo
    clauses = [p for p in draft.provisions if p.kind == "clause"]
    outline = [e for e in record["draft"]["outline"] if e["kind"] == "clause"]
    assert len(clauses) == len(outline)
    for prov, entry in zip(clauses, outline):
        label = provision_label(prov, doc=draft)
        if entry["number"] and not entry["number"].startswith("("):
            assert label.startswith(entry["number"]), (label, entry)
        if entry["heading"]:
            assert label.endswith(entry["heading"]), (label, entry)


def test_list_items_carry_their_parents_number_and_the_nearest_heading(demo):
    _record, draft = demo
    by_id = {p.id: p for p in draft.provisions}
    items = [p for p in draft.provisions if p.kind == "clause" and p.number and p.number.startswith("(")]
    assert items
    for item in items:
        parent = by_id[item.parent]
        # the generator's rendered parent number, then the item's own label: "Section 3.3(iii)"
        assert full_number(item, doc=draft) == full_number(parent, doc=draft) + item.number
        label = provision_label(item, doc=draft)
        heading = item.heading
        cur = item
        while heading is None and cur.parent:
            cur = by_id[cur.parent]
            heading = cur.heading
        assert heading is not None  # every list item of the demo sits below a headed clause
        assert label == f"{full_number(item, doc=draft)} {heading}"


def _doc(*provs: Provision) -> Document:
    return Document(source="x.docx", provisions=provs, terms=())


def P(pid: str, number=None, heading=None, *, kind="clause", parent=None, text="The words.", term=None):
    return Provision(id=pid, kind=kind, number=number, heading=heading, level=1, parent=parent,
                     text=text, term=term)


def test_definitions_and_unnamed_provisions():
    d = _doc(P("p1", "1", "Definitions"),
             P("p2", None, None, kind="definition", parent="p1", term="Goods"),
             P("p3", None, None, kind="parties", text="THIS AGREEMENT is dated the first day of spring 2031"))
    assert provision_label(d.provisions[1], doc=d) == "1 Definition of \u201cGoods\u201d"
    assert provision_label(d.provisions[1], doc=d, compact=True) == "1 \u201cGoods\u201d"
    assert provision_label(d.provisions[1]) == "Definition of \u201cGoods\u201d"
    assert provision_label(d.provisions[2], doc=d) == "parties \u201cTHIS AGREEMENT is dated the first \u2026\u201d"
    assert provision_label(d.provisions[2], doc=d, compact=True) == "parties"
    assert find_provision(d, "p9") is None and find_provision(d, None) is None


def test_clause_label_names_the_precedents_number_when_it_differs():
    draft = _doc(P("p1", "Section 9", "Notices"), P("p2", "(a)", None, parent="p1"))
    precedent = _doc(P("p1", "Section 14", "Notices"), P("p2", "(a)", None, parent="p1"),
                     P("p3", "15", "Publicity"))

    def dev(d, p, category="substantive"):
        return Deviation("v1", 1, 10, category, "replace", d, p, "", "", ())

    review = Review(draft, precedent, (), (), ())
    assert clause_label(review, dev("p2", "p2")) == "Section 9(a) Notices (precedent Section 14(a))"
    assert clause_label(review, dev("p2", "p2"), compact=True) == "Section 9(a) Notices"
    assert clause_label(review, dev(None, "p3")) == "15 Publicity (precedent only)"
    assert clause_label(review, dev(None, None)) == "Whole document"
    assert clause_label(review, dev(None, None, "term")) == "Defined terms"


def test_one_label_function_serves_every_consumer():
    """The decisions module, the outputs, the review table and the desktop app use the same
    function (no second copy of the label code)."""
    import core.decisions
    import core.export.issues
    import core.review.report

    assert core.decisions.clause_label is clause_label
    assert core.export.issues.clause_label is clause_label
    assert core.review.report.clause_label is clause_label
