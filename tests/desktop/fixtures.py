"""A small hand-made review (invented parties and figures) for the desktop tests.

It does not come from the engine: the views are tested on it first, so that they are known
to show exactly the objects they are given.  Spans are located with ``str.find`` in the
provision texts, so they are correct by construction.
"""

from __future__ import annotations

from core.model import (
    ClosestProvision,
    DefinedTerm,
    Deviation,
    Document,
    Frequency,
    Pair,
    Provision,
    Review,
    TermMapping,
)

PRECEDENT = [
    # id, kind, number, heading, level, text, term
    ("p1", "definition", None, None, 0, "\u201cCustomer\u201d means the party buying the Goods.", "Customer"),
    ("p2", "clause", "1", "Supply", 1,
     "The Supplier shall supply the Goods to the Customer in accordance with each Order.", None),
    ("p3", "clause", "2", "Payment", 1, "The Customer shall pay each invoice within 30 days of receipt.", None),
    ("p4", "clause", "3", "Limitation of liability", 1,
     "The Supplier's total liability shall not exceed the fees paid in the 12 months before the claim.", None),
    ("p5", "clause", "4", "Publicity", 1, "Neither party shall announce this agreement without consent.", None),
    ("p6", "clause", "5", "Confidentiality", 1,
     "Each party shall keep the other party's Confidential Information secret.", None),
    ("p7", "clause", "6", "Governing law", 1, "This agreement is governed by the law of Veloria.", None),
]

DRAFT = [
    ("d1", "definition", None, None, 0, "\u201cClient\u201d means the party buying the Goods.", "Client"),
    ("d2", "clause", "1", "Supply", 1,
     "The Supplier shall supply the Goods to the Client in accordance with each Order.", None),
    ("d3", "clause", "2", "Payment", 1, "The Client shall pay each invoice within 60 days of receipt.", None),
    ("d4", "clause", "3", "Limitation of liability", 1,
     "The Supplier's total liability shall not exceed the fees paid in the 24 months before the claim.", None),
    ("d5", "clause", "4", "Governing law", 1, "This agreement is governed by the law of Veloria.", None),
    ("d6", "clause", "5", "Confidentiality", 1,
     "Each party may keep the other party's Confidential Information secret.", None),
    ("d7", "clause", "6", "Audit", 1, "The Client may audit the Supplier's records once a year.", None),
]


def _doc(source: str, rows) -> Document:
    provs = tuple(
        Provision(id=i, kind=k, number=n, heading=h, level=lv, parent=None, text=t, term=term)
        for (i, k, n, h, lv, t, term) in rows
    )
    terms = tuple(DefinedTerm(term=p.term, definition=p.text, provision=p.id, uses=3) for p in provs if p.term)
    return Document(source=source, provisions=provs, terms=terms)


def _span(text: str, words: str) -> tuple[int, int]:
    i = text.find(words)
    assert i >= 0, (words, text)
    return (i, i + len(words))


def make_review(*, with_frequency: bool = False) -> Review:
    """Precedent and draft of a short supply agreement; renamed term, two number changes,
    "shall" weakened to "may", a moved clause, an added and a removed clause."""
    pre = _doc("precedent.docx", PRECEDENT)
    dra = _doc("draft.docx", DRAFT)
    P = {p.id: p.text for p in pre.provisions}
    D = {p.id: p.text for p in dra.provisions}

    def freq(matching: int) -> Frequency | None:
        if not with_frequency:
            return None
        return Frequency(same_type=12, matching=matching, total=12,
                         closest=(ClosestProvision("ardent-2021.docx", "p9", 0.93),))

    devs = [
        Deviation("v1", 1, 88, "substantive", "replace", "d4", "p4", "in the 12 months", "in the 24 months",
                  ("liability cap changed from 12 to 24 months",), freq(1),
                  _span(P["p4"], "12"), _span(D["d4"], "24")),
        Deviation("v2", 2, 74, "substantive", "replace", "d3", "p3", "within 30 days", "within 60 days",
                  ("payment period changed from 30 to 60 days",), freq(4),
                  _span(P["p3"], "30"), _span(D["d3"], "60")),
        Deviation("v3", 3, 70, "substantive", "replace", "d6", "p6", "party shall keep", "party may keep",
                  ("obligation weakened: shall \u2192 may",), freq(0),
                  _span(P["p6"], "shall"), _span(D["d6"], "may")),
        Deviation("v4", 4, 55, "substantive", "add-provision", "d7", None, "", D["d7"],
                  ("audit provision added",), freq(2)),
        Deviation("v5", 5, 40, "substantive", "remove-provision", None, "p5", P["p5"], "",
                  ("publicity provision removed",), freq(3)),
        Deviation("v6", 6, 20, "term", "replace", "d1", "p1", "Customer", "Client",
                  ("defined term \u201cCustomer\u201d is called \u201cClient\u201d (4 uses)",), None,
                  _span(P["p1"], "Customer"), _span(D["d1"], "Client")),
        Deviation("v7", 7, 5, "numbering", "move", "d5", "p7", "", "",
                  ("clause 6 moved to 4",), None),
    ]
    pairs = (
        Pair("d1", "p1", "changed", 0.9),
        Pair("d2", "p2", "changed", 0.95),
        Pair("d3", "p3", "changed", 0.9),
        Pair("d4", "p4", "changed", 0.92),
        Pair(None, "p5", "removed", 0.0),
        Pair("d5", "p7", "moved", 1.0),
        Pair("d6", "p6", "changed", 0.9),
        Pair("d7", None, "added", 0.0),
    )
    term_map = (TermMapping("Client", "Customer", 0.97, ("definition", "substitution"), 4),)
    return Review(draft=dra, precedent=pre, term_map=term_map, pairs=pairs, deviations=tuple(devs))


def make_record(review: Review | None = None):
    """The engine's review record (core.decisions.ReviewFile) around a hand-made review."""
    from core.decisions import DocumentRef, ReviewFile

    return ReviewFile(draft=DocumentRef("/invented/draft.docx", "0" * 64),
                      precedent=DocumentRef("/invented/precedent.docx", "0" * 64),
                      review=review if review is not None else make_review())


def show_fixture(window, review: Review | None = None, *, library: object | None = None) -> None:
    """Put a hand-made review on *window* as if the engine had produced it."""
    from desktop.state import Change, Inputs

    window.ws.inputs = Inputs("/invented/draft.docx", "/invented/precedent.docx")
    window.ws.record = make_record(review)
    window.ws.library = library
    window.broadcast(Change.EVERYTHING)
