"""The comparison redline (core.export.redline).

Outside references, named at each check:
* LibreOffice headless (Debian's libreoffice-writer, through UNO: tests/support/lo_uno.py)
  accepts or rejects every tracked change, reports comments, list labels and custom
  properties, and converts each .docx to PDF;
* ECMA-376 Part 1 §17.13 (revisions and comments) through our structural validator, run
  on every .docx written here;
* the standard library's ``html.parser`` and ``csv`` modules and python-docx read the issues
  list back.
"""

from __future__ import annotations

import dataclasses
import zipfile

from hypothesis import given, settings
from hypothesis import strategies as st
from lxml import etree

from core import CAUTION
from core.decisions import Decision
from core.docx.revisions import w
from core.docx.validate import validate_docx
from core.export import (
    REDLINE_BODY_HEADING,
    REDLINE_END,
    plan_counter_draft,
    write_redline,
)
from tests.core.export.conftest import AUTHOR, DEMO
from tests.core.export.conftest import made_deviation as _made_deviation
from tests.core.export.conftest import no_second_diff as _no_second_diff
from tests.support.lo_session import libreoffice

# --------------------------------------------------------------------------------------
# Comparison redline
# --------------------------------------------------------------------------------------


def _comparison_body(view) -> list[str]:
    paras = view.paragraphs
    start = paras.index(REDLINE_BODY_HEADING) + 1
    end = paras.index(REDLINE_END)
    return paras[start:end]


def _lines(doc) -> list[str]:
    return [f"{b.label}\t{b.text}" if b.label else b.text for b in doc.blocks]


def test_redline_accepted_is_the_draft_and_rejected_the_precedent(scenario, tmp_path):
    out = tmp_path / "redline.docx"
    write_redline(scenario.review, out, author=AUTHOR)
    assert validate_docx(out) == []  # ECMA-376 Part 1 §17.13, move ranges paired
    with zipfile.ZipFile(out) as zf:
        root = etree.fromstring(zf.read("word/document.xml"))
    # The moved clause (Notices) is a move (§17.13.5.22/.25), not a deletion and insertion.
    from_names = {e.get(w("name")) for e in root.iter(w("moveFromRangeStart"))}
    to_names = {e.get(w("name")) for e in root.iter(w("moveToRangeStart"))}
    assert from_names and from_names == to_names
    moved_from = "".join(t.text for m in root.iter(w("moveFrom")) for t in m.iter(w("delText")))
    assert "Notices must be in writing" in moved_from

    office = libreoffice()
    view = office.inspect(out, pdf=tmp_path / "redline.pdf")
    assert view.pdf_bytes and view.pdf_bytes > 1000
    assert CAUTION in view.paragraphs[:4]
    (table,) = [el for el in view.body if el["type"] == "table"]
    subs = sorted((d for d in scenario.review.deviations if d.category == "substantive"), key=lambda d: d.rank)
    assert [row[0] for row in table["rows"][1:]] == [str(d.rank) for d in subs]
    assert [row[1] for row in table["rows"][1:]] == [str(d.severity) for d in subs]

    accepted = office.inspect(out, action="accept")
    assert accepted.redlines_after == 0
    assert _comparison_body(accepted) == _lines(scenario.review.draft)
    rejected = office.inspect(out, action="reject")
    assert rejected.redlines_after == 0
    assert _comparison_body(rejected) == _lines(scenario.review.precedent)



def test_demo_redline_accepts_to_the_draft_and_rejects_to_the_precedent(tmp_path):
    from core.reader import read_document
    from core.review import run_review

    review = run_review(read_document(str(DEMO / "draft.docx")), read_document(str(DEMO / "precedent.docx")))
    out = tmp_path / "redline.docx"
    write_redline(review, out, author=AUTHOR)
    assert validate_docx(out) == []
    with zipfile.ZipFile(out) as zf:
        root = etree.fromstring(zf.read("word/document.xml"))
    assert any(True for _ in root.iter(w("moveFrom")))  # the demo's moved clauses
    office = libreoffice()
    accepted = office.inspect(out, action="accept", pdf=tmp_path / "redline.pdf")
    assert accepted.redlines_before > 0 and accepted.redlines_after == 0
    assert accepted.pdf_bytes and accepted.pdf_bytes > 10_000
    assert _comparison_body(accepted) == _lines(review.draft)
    rejected = office.inspect(out, action="reject")
    assert rejected.redlines_after == 0
    assert _comparison_body(rejected) == _lines(review.precedent)



# --------------------------------------------------------------------------------------
# The outputs consume the review's own results (Pair.edits, Deviation.part and spans)
# --------------------------------------------------------------------------------------




def _accept_reject(paras) -> tuple[list[str], list[str]]:
    """Each paragraph's text with all changes accepted and with all rejected, read from the
    runs as ECMA-376 Part 1 §17.13.5 defines the marks (ins/moveTo kept on acceptance,
    del/moveFrom kept on rejection; a paragraph whose mark is deleted or moved away goes)."""
    accepted = ["".join(r.text for r in p.runs if r.mark in ("", "ins", "moveTo"))
                for p in paras if p.mark not in ("del", "moveFrom")]
    rejected = ["".join(r.text for r in p.runs if r.mark in ("", "del", "moveFrom"))
                for p in paras if p.mark not in ("ins", "moveTo")]
    return accepted, rejected


def test_demo_redline_is_built_from_the_reviews_word_diff(monkeypatch):
    from core.export import redline_body
    from core.reader import read_document
    from core.review import run_review

    review = run_review(read_document(str(DEMO / "draft.docx")), read_document(str(DEMO / "precedent.docx")))
    _no_second_diff(monkeypatch)
    paras = redline_body(review)
    accepted, rejected = _accept_reject(paras)
    assert accepted == _lines(review.draft)
    assert rejected == _lines(review.precedent)
    # the planted 30 -> 60 days shows as the review's own hunks, words only, and each use
    # of a renamed defined term as a hunk of its own
    (pay,) = [p for p in paras if any(r.mark == "ins" and r.text == "sixty" for r in p.runs)]
    deleted = [r.text for r in pay.runs if r.mark == "del"]
    inserted = [r.text for r in pay.runs if r.mark == "ins"]
    assert {"thirty", "30", "Customer", "Supplier"} <= set(deleted)
    assert {"sixty", "60", "Client", "Vendor"} <= set(inserted)


def test_redline_of_the_engines_review_on_the_hand_made_pair(scenario, monkeypatch):
    from core.export import redline_body
    from core.reader import read_document
    from core.review import run_review

    review = run_review(read_document(str(scenario.draft_path)), read_document(str(scenario.precedent_path)))
    _no_second_diff(monkeypatch)
    accepted, rejected = _accept_reject(redline_body(review))
    assert accepted == _lines(review.draft) and rejected == _lines(review.precedent)


@settings(max_examples=200, deadline=None)
@given(st.text(alphabet="ab .,\n", max_size=30), st.text(alphabet="ab .,\n", max_size=30),
       st.data())
def test_a_pairs_diff_restricted_to_one_paragraph_tiles_both_stretches(a, b, data):
    """Any stretch of each text: the pieces rebuild exactly those stretches, and the
    unchanged pieces are identical on both sides."""
    from core.export.redline import _clipped_pieces
    from core.review.worddiff import diff_texts

    edits = diff_texts(a, b)  # a word diff tiling both texts, as Pair.edits does
    a0 = data.draw(st.integers(0, len(a)))
    a1 = data.draw(st.integers(a0, len(a)))
    b0 = data.draw(st.integers(0, len(b)))
    b1 = data.draw(st.integers(b0, len(b)))
    pieces = _clipped_pieces(edits, a, b, (a0, a1), (b0, b1))
    assert "".join(p for _, p, _ in pieces) == a[a0:a1]
    assert "".join(d for _, _, d in pieces) == b[b0:b1]
    assert all(p == d for same, p, d in pieces if same)



def test_heading_deviations_are_found_by_their_part_not_guessed(scenario):
    review = scenario.review
    notices_d = next(p for p in review.draft.provisions if p.heading == "Notices")
    notices_p = next(p for p in review.precedent.provisions if p.heading == "Notices")
    heading = _made_deviation("v8", "replace", notices_d.id, notices_p.id, "Notices", "Notices", None, None,
                         part="heading")
    guessed = dataclasses.replace(heading, id="v9", part="text", reasons=("heading changed",))
    review2 = dataclasses.replace(review, deviations=review.deviations + (heading, guessed))
    plan = plan_counter_draft(review2, [Decision("v8", "amend", text="Communications")])
    assert [e.replacement for e in plan.edits] == ["Communications"] and plan.notes == ()
    # a deviation of the provision's text without any span has no place: it is skipped,
    # never taken for a heading because of its reasons
    plan = plan_counter_draft(review2, [Decision("v9", "amend", text="Communications")])
    assert plan.edits == () and any(n.startswith(f"deviation {guessed.rank} (") and "no place" in n
                                    for n in plan.notes)




