"""desktop.sidebyside: each cell shows the provision's exact text, with every change marked
by colour and by a cue that needs no colour (underline, strikethrough, dotted underline).

Outside reference: the standard library's difflib.SequenceMatcher gives the word changes of
the pairs, and the characters the view marks must be exactly those."""

from __future__ import annotations

import difflib
import re

from PySide6.QtGui import QFont, QTextCharFormat

from desktop import marks as mk
from desktop.models import PairRowsModel
from desktop.palette import DELETED, INSERTED
from desktop.sidebyside import SideBySideView, cell_document
from desktop.state import DisplayOptions

from .fixtures import make_review


def _fragments(doc):
    """(text, char format) of every fragment of the document's last block (the provision text)."""
    out = []
    block = doc.lastBlock()
    it = block.begin()
    while not it.atEnd():
        frag = it.fragment()
        if frag.isValid():
            out.append((frag.text(), frag.charFormat()))
        it += 1
    return out


def _word_changes(a: str, b: str) -> tuple[set[str], set[str]]:
    """Words difflib finds only in *a* and only in *b* (word-level SequenceMatcher)."""
    wa, wb = re.findall(r"\w+", a), re.findall(r"\w+", b)
    only_a, only_b = set(), set()
    for tag, i1, i2, j1, j2 in difflib.SequenceMatcher(a=wa, b=wb, autojunk=False).get_opcodes():
        if tag != "equal":
            only_a.update(wa[i1:i2])
            only_b.update(wb[j1:j2])
    return only_a, only_b


def _aligned_rows(view, review):
    """(row, pair, precedent text, draft text) of every row the view shows with both sides."""
    for row in range(view.model.rowCount()):
        pair = view.model.pair(row)
        if pair.draft is not None and pair.precedent is not None:
            yield (row, pair, review.precedent.provision(pair.precedent).text,
                   review.draft.provision(pair.draft).text)


def _marked_words(marks, text: str, kind) -> set[str]:
    """The words of *text* under the marks of *kind*."""
    return {w for m in marks if m.kind == kind for w in re.findall(r"\w+", text[m.start:m.end])}


def test_cell_text_is_exact_and_marks_carry_non_colour_cues(qtbot):
    review = make_review()
    p = review.precedent.provision("p3")
    d = review.draft.provision("d3")
    kw = dict(caption_note="", number_changed=False, font=QFont(), width=400)

    def at(text: str, word: str, kind: str) -> mk.Mark:
        i = text.index(word)
        return mk.Mark(i, i + len(word), kind)

    pdoc = cell_document(p, text_marks=[at(p.text, "30", mk.DELETED)], side="precedent", **kw)
    ddoc = cell_document(d, text_marks=[at(d.text, "60", mk.INSERTED), at(d.text, "Client", mk.TERM)],
                         side="draft", **kw)
    assert pdoc.toPlainText() == "2 Payment\n" + p.text
    assert ddoc.toPlainText() == "2 Payment\n" + d.text
    struck = [(t, f) for t, f in _fragments(pdoc) if f.fontStrikeOut()]
    assert [t for t, _ in struck] == ["30"]
    assert struck[0][1].foreground().color().name() == DELETED.ink
    single = QTextCharFormat.UnderlineStyle.SingleUnderline
    under = [(t, f) for t, f in _fragments(ddoc) if f.underlineStyle() == single]
    assert [t for t, _ in under] == ["60"]
    assert under[0][1].background().color().name() == INSERTED.background
    dotted = [t for t, f in _fragments(ddoc) if f.underlineStyle() == QTextCharFormat.UnderlineStyle.DotLine]
    assert dotted == ["Client"]


def test_the_view_marks_exactly_the_words_difflib_finds_changed(qtbot):
    review = make_review()
    view = SideBySideView()
    qtbot.addWidget(view)
    from desktop.engine import pair_edits

    view.set_review(review, edits=pair_edits)
    view.set_display(DisplayOptions(terms=False))  # renamed terms shown as plain text
    for row, _pair, pt, dt in _aligned_rows(view, review):
        # difflib on the texts with the renamed term read as the precedent's (as the engine does)
        only_p, only_d = _word_changes(pt, dt.replace("Client", "Customer"))
        pm, dm = view.side_marks(row)
        marked_p, marked_d = _marked_words(pm, pt, mk.DELETED), _marked_words(dm, dt, mk.INSERTED)
        assert marked_p == only_p, (row, marked_p, only_p)
        assert marked_d == only_d, (row, marked_d, only_d)


def test_added_removed_and_moved_rows_say_so_in_words(qtbot):
    review = make_review()
    view = SideBySideView()
    qtbot.addWidget(view)
    view.set_review(review, edits=None)
    text = {}
    for row in range(view.model.rowCount()):
        pair = view.model.pair(row)
        for col in (PairRowsModel.PRECEDENT, PairRowsModel.DRAFT):
            text[(pair.status, col)] = view.build_cell(row, col, 400).toPlainText()
    assert "Added in the draft" in text[("added", PairRowsModel.DRAFT)]
    assert "Taken out of the draft" in text[("removed", PairRowsModel.PRECEDENT)]
    assert "moved from precedent 6" in text[("moved", PairRowsModel.DRAFT)]
    assert view.model.index(4, PairRowsModel.GUTTER).data() == "Not in draft"


PRECEDENT_TEXT = """
1. Payment

1.1 The Customer shall pay each invoice within thirty (30) days of receipt.

1.2 The Customer's records are kept by the Supplier for the Customer.

2. "Customer" means the buyer named in the order form.
"""


def test_the_view_shows_the_engines_own_word_diff_and_renamed_terms_as_terms(qtbot, monkeypatch):
    """With an engine review the view reads Pair.edits (no second diff: diff_texts is made to
    fail); the words it marks are the words difflib (the reference) finds changed once the
    draft's term is read as the precedent's, and each use of the renamed term is marked as
    a term (dotted underline), never as inserted or deleted words."""
    import core.review.worddiff as worddiff
    from core.reader import read_text
    from core.review import run_review
    from desktop.engine import pair_edits

    draft_text = (PRECEDENT_TEXT.replace("Customer", "Client")
                  .replace("thirty (30)", "sixty (60)").replace("kept by", "kept for six years by"))
    review = run_review(read_text(draft_text, source="draft.txt"), read_text(PRECEDENT_TEXT, source="precedent.txt"))
    assert [(m.draft, m.precedent) for m in review.term_map] == [("Client", "Customer")]

    def refuse(*_a, **_k):
        raise AssertionError("the view diffed the texts again")

    monkeypatch.setattr(worddiff, "diff_texts", refuse)
    view = SideBySideView()
    qtbot.addWidget(view)
    view.set_review(review, edits=pair_edits)
    view.set_display(DisplayOptions())
    seen_terms = 0
    for row, pair, pt, dt in _aligned_rows(view, review):
        pm, dm = view.side_marks(row)
        only_p, only_d = _word_changes(pt, dt.replace("Client", "Customer"))
        marked_p, marked_d = _marked_words(pm, pt, mk.DELETED), _marked_words(dm, dt, mk.INSERTED)
        assert marked_p == only_p and marked_d == only_d, (row, marked_p, marked_d)
        terms = [dt[m.start:m.end] for m in dm if m.kind == mk.TERM]
        assert terms == re.findall(r"Client(?:'s)?", dt)
        assert "Client" not in marked_d and "Customer" not in marked_p
        # the inserted marks are the engine's own hunks (Pair.edits), term hunks set apart
        assert pair.edits or not (pt or dt)
        engine_ins = {(m.start, m.end) for m in mk.edit_marks(pair.edits)[1]
                      if not dt[m.start:m.end].startswith("Client")}
        assert engine_ins == {(m.start, m.end) for m in dm if m.kind == mk.INSERTED}
        seen_terms += len(terms)
    assert seen_terms >= 4
