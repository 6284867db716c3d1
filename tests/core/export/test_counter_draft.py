"""The counter-draft (core.export.counter_draft).

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

import zipfile
from pathlib import Path

from lxml import etree

from core import CAUTION
from core.decisions import Decision
from core.docx.blocks import iter_body_paragraphs
from core.docx.revisions import w
from core.docx.validate import validate_docx
from core.export import (
    CAUTION_PROPERTY,
    counter_draft_bytes,
    plan_counter_draft,
    write_counter_draft,
)
from tests.core.export.conftest import AUTHOR, DECISIONS, DEMO
from tests.core.export.conftest import no_second_diff as _no_second_diff
from tests.core.export.conftest import texts as _texts
from tests.support.lo_session import libreoffice

# --------------------------------------------------------------------------------------
# Counter-draft
# --------------------------------------------------------------------------------------


def _expected_counter_draft(scenario) -> list[str]:
    """The decided text, built on plain strings from the scenario's own words."""
    draft = _texts(scenario.review.draft)
    prec = _texts(scenario.review.precedent)
    out: list[str] = []
    for t in draft:
        if "set off" in t:  # v4 reverted: the added provision goes
            continue
        t = t.replace("sixty (60)", "thirty (30)")  # v1 reverted
        t = t.replace(" or death", "")  # v2 reverted
        out.append(t)
        if t.startswith("Late payments"):  # v3 and v5 reverted: Audit comes back after 2.2
            out.extend([x for x in prec if x == "Audit" or "complete records" in x])
    return out


def test_counter_draft_accepted_is_the_decided_text_and_rejected_the_draft(scenario, tmp_path):
    out = tmp_path / "counter.docx"
    notes = write_counter_draft(scenario.review, DECISIONS, out, draft_path=str(scenario.draft_path),
                                author=AUTHOR)
    assert notes == ()
    assert validate_docx(out) == []  # ECMA-376 Part 1 §17.13 structure
    office = libreoffice()
    accepted = office.inspect(out, action="accept", pdf=tmp_path / "counter.pdf")
    assert accepted.redlines_before > 0 and accepted.redlines_after == 0
    assert accepted.paragraphs == _expected_counter_draft(scenario)
    assert accepted.pdf_bytes and accepted.pdf_bytes > 1000
    # The restored clause takes its place in the draft's own numbering (LibreOffice's labels).
    labels = [(el["label"], el["text"]) for el in accepted.body if el["type"] == "paragraph"]
    assert [lab for lab, _ in labels if lab and lab.count(".") == 1 and lab.endswith(".")] == [
        "1.", "2.", "3.", "4.", "5."]
    assert dict((t, lab) for lab, t in labels)["Audit"] == "3."
    assert any(lab == "3.1" and "complete records" in t for lab, t in labels)
    # The note is a comment anchored on the changed words.
    (comment,) = accepted.comments
    assert comment["content"] == DECISIONS[0].note and comment["author"] == AUTHOR
    assert comment["anchor"] == "thirty (30)"
    # The caution travels in the file's custom properties (§22.3), not in the body.
    assert accepted.user_properties[CAUTION_PROPERTY] == CAUTION
    assert not any(CAUTION in p for p in accepted.paragraphs)

    rejected = office.inspect(out, action="reject")
    assert rejected.redlines_after == 0
    assert rejected.paragraphs == _texts(scenario.review.draft)
    # LibreOffice numbers the rejected document as our reader numbered the draft.
    assert [el["label"] for el in rejected.body if el["type"] == "paragraph"] == [
        b.label for b in scenario.review.draft.blocks]


def test_amend_writes_the_reviewers_words(scenario, tmp_path):
    out = tmp_path / "amended.docx"
    decisions = [Decision("v1", "amend", text="forty-five (45)"),
                 Decision("v3", "amend", text="The Supplier shall keep records for three years.")]
    write_counter_draft(scenario.review, decisions, out, draft_path=str(scenario.draft_path), author=AUTHOR)
    assert validate_docx(out) == []
    view = libreoffice().inspect(out, action="accept")
    assert view.redlines_before > 0 and view.redlines_after == 0  # LibreOffice: all accepted
    draft = _texts(scenario.review.draft)
    expected = []
    for t in draft:
        expected.append(t.replace("sixty (60)", "forty-five (45)"))
        if t.startswith("Late payments"):
            expected.append("The Supplier shall keep records for three years.")
    assert view.paragraphs == expected


def _input_paragraph_xml(path: Path) -> list[bytes]:
    with zipfile.ZipFile(path) as zf:
        root = etree.fromstring(zf.read("word/document.xml"))
    return [etree.tostring(p) for p in iter_body_paragraphs(root)]


def _is_new_paragraph(p) -> bool:
    """A paragraph we inserted: its mark and all its runs are tracked insertions."""
    mark = p.find(f"{w('pPr')}/{w('rPr')}/{w('ins')}")
    runs = [r for r in p.iter(w("r"))]
    return mark is not None and bool(runs) and all(r.getparent().tag == w("ins") for r in runs)


def test_every_undecided_paragraph_keeps_its_exact_xml(scenario, tmp_path):
    out = tmp_path / "counter.docx"
    write_counter_draft(scenario.review, DECISIONS, out, draft_path=str(scenario.draft_path), author=AUTHOR)
    plan = plan_counter_draft(scenario.review, DECISIONS)
    touched = {e.block for e in plan.edits} | {d.block for d in plan.deletions}
    before = _input_paragraph_xml(scenario.draft_path)
    with zipfile.ZipFile(out) as zf:
        root = etree.fromstring(zf.read("word/document.xml"))
    after = [p for p in iter_body_paragraphs(root) if not _is_new_paragraph(p)]
    assert len(after) == len(before)
    assert touched  # the decisions did change something
    for i, (a, b) in enumerate(zip(before, after)):
        if i in touched:
            assert a != etree.tostring(b)
        else:
            assert a == etree.tostring(b), f"undecided paragraph {i} changed"
    # Every other part of the package is byte for byte the draft's.
    with zipfile.ZipFile(scenario.draft_path) as zin, zipfile.ZipFile(out) as zout:
        for info in zin.infolist():
            if info.filename in ("word/document.xml", "[Content_Types].xml", "_rels/.rels",
                                 "word/_rels/document.xml.rels") or info.filename.startswith("docProps/custom"):
                continue
            assert zin.read(info) == zout.read(info.filename), info.filename


def test_decisions_that_cannot_be_written_are_reported(scenario, tmp_path):
    plan = plan_counter_draft(scenario.review, [Decision("v99", "revert"),
                                                Decision("v1", "revert"),
                                                Decision("v1", "amend", text="ninety (90)")])
    assert any("v99" in n for n in plan.notes)
    assert any("overlaps another decision" in n for n in plan.notes)
    # a note on a deviation of the review names it by its number, as the review table does
    assert "deviation 1 (2.1 Payment): overlaps another decision; skipped" in plan.notes
    assert len(plan.edits) == 1



# --------------------------------------------------------------------------------------
# The demo: revert the three most severe deviations, note one
# --------------------------------------------------------------------------------------



def _norm(text: str) -> str:
    return " ".join(text.split())


def _house_wording_in_place(review, dev) -> tuple[int, int, int, str]:
    """(draft block, start, end, words): the precedent's words that belong in place of the
    draft's at this deviation, built from the review's own fields -- the definition of "the
    house wording in that place" -- with the draft's names for mapped defined terms."""
    import re

    prov = review.draft.provision(dev.draft_provision)
    prec = review.precedent.provision(dev.precedent_provision)
    seg = prov.segments[0]
    text = review.draft.blocks[seg.block].text
    if dev.draft_span is None and dev.precedent_span is None:  # the heading changed
        if prec.heading:
            i = text.index(prov.heading)
            return seg.block, i, i + len(prov.heading), prec.heading
        return seg.block, text.index(prov.heading), seg.start, ""  # run-in heading removed
    # The words the review showed on each side (Deviation.*_text_span): a decision applies
    # to exactly those.
    house = prec.text[dev.precedent_text_span[0]:dev.precedent_text_span[1]]
    for m in review.term_map:
        house = re.sub(rf"\b{re.escape(m.precedent)}", m.draft, house)
    assert dev.draft_text_span[0] < dev.draft_text_span[1], "a pure deletion has no place to check"
    return seg.block, seg.start + dev.draft_text_span[0], seg.start + dev.draft_text_span[1], house


def test_demo_counter_draft_reverting_the_three_most_severe(tmp_path):
    from core.reader import read_document
    from core.review import run_review

    draft_path, precedent_path = DEMO / "draft.docx", DEMO / "precedent.docx"
    review = run_review(read_document(str(draft_path)), read_document(str(precedent_path)))
    top = sorted(review.deviations, key=lambda d: d.rank)[:3]
    note = "The house position applies here."
    decisions = [Decision(d.id, "revert", note=note if i == 0 else None) for i, d in enumerate(top)]
    out = tmp_path / "counter-draft.docx"
    notes = write_counter_draft(review, decisions, out, draft_path=str(draft_path), author=AUTHOR)
    assert notes == ()
    assert validate_docx(out) == []  # ECMA-376 Part 1 §17.13

    # Expected: the draft's text with the house wording in exactly those three places
    # (applied from the end of each paragraph so earlier offsets stay valid).
    expected = [b.text for b in review.draft.blocks]
    places = sorted((_house_wording_in_place(review, d) for d in top), key=lambda x: (x[0], -x[1]))
    for block, start, end, words in places:
        expected[block] = expected[block][:start] + words + expected[block][end:]

    office = libreoffice()
    accepted = office.inspect(out, action="accept", pdf=tmp_path / "counter-draft.pdf")
    assert accepted.redlines_after == 0
    assert accepted.pdf_bytes and accepted.pdf_bytes > 10_000
    body = [i for i, b in enumerate(review.draft.blocks) if not b.in_table]
    # Word spacing is compared loosely: removing a word also removes one space beside it.
    assert [_norm(t) for t in accepted.paragraphs] == [_norm(expected[i]) for i in body]
    changed = {i for i, b in enumerate(review.draft.blocks) if _norm(expected[i]) != _norm(b.text)}
    assert changed == {block for block, *_ in places}  # those places and nothing else
    (comment,) = accepted.comments
    assert comment["content"] == note and comment["author"] == AUTHOR
    first_words = _house_wording_in_place(review, top[0])[3]
    if first_words:  # anchored on the changed words (§17.13.4.3 - .5)
        assert _norm(comment["anchor"]) == _norm(first_words)

    rejected = office.inspect(out, action="reject")
    assert rejected.redlines_after == 0
    assert rejected.paragraphs == [review.draft.blocks[i].text for i in body]



def test_reverting_every_substantive_deviation_found_by_the_engine(scenario, tmp_path):
    """End to end with the review engine on the hand-made pair: reverting every substantive
    deviation gives the same decided text as the hand-written review above."""
    from core.reader import read_document
    from core.review import run_review

    review = run_review(read_document(str(scenario.draft_path)), read_document(str(scenario.precedent_path)))
    decisions = [Decision(d.id, "revert") for d in review.deviations if d.category == "substantive"]
    out = tmp_path / "all-reverted.docx"
    assert write_counter_draft(review, decisions, out, draft_path=str(scenario.draft_path), author=AUTHOR) == ()
    assert validate_docx(out) == []
    view = libreoffice().inspect(out, action="accept")
    assert view.redlines_after == 0
    assert view.paragraphs == _expected_counter_draft(scenario)


def test_demo_reverting_every_substantive_deviation_leaves_only_cross_references(tmp_path):
    """Revert all of the demo's substantive deviations, let LibreOffice accept the changes
    and save the result, then review that result against the precedent again: nothing
    substantive is left but cross-references, whose numbers the restored and removed
    clauses shifted (the draft's own references are not renumbered by a counter-draft)."""
    import re

    from core.reader import read_document
    from core.review import run_review

    draft_path, precedent_path = DEMO / "draft.docx", DEMO / "precedent.docx"
    precedent = read_document(str(precedent_path))
    review = run_review(read_document(str(draft_path)), precedent)
    decisions = [Decision(d.id, "revert") for d in review.deviations if d.category == "substantive"]
    assert len(decisions) > 10
    out = tmp_path / "all-reverted.docx"
    assert write_counter_draft(review, decisions, out, draft_path=str(draft_path), author=AUTHOR) == ()
    assert validate_docx(out) == []
    accepted = tmp_path / "accepted.docx"
    view = libreoffice().inspect(out, action="accept", save_as=accepted)
    assert view.redlines_after == 0
    again = run_review(read_document(str(accepted)), precedent)
    refs = re.compile(r"^(?:(?:clauses?|sections?|articles?)\s+[\d.]+[,;]?\s*(?:and\s+)?)*$", re.IGNORECASE)
    left = [d for d in again.deviations if d.category == "substantive"]
    assert all(refs.match(d.precedent_text.strip()) and refs.match(d.draft_text.strip()) for d in left), [
        (d.precedent_text, d.draft_text) for d in left if not (refs.match(d.precedent_text.strip())
                                                              and refs.match(d.draft_text.strip()))]


def test_a_draft_with_tracked_changes_of_its_own_is_flagged(tmp_path):
    from core.reader import read_document
    from tests.support.docx_fixtures import docx_bytes

    body = ('<w:p><w:r><w:t xml:space="preserve">The Client shall pay </w:t></w:r>'
            '<w:ins w:id="1" w:author="Other Side" w:date="2024-01-01T00:00:00Z"><w:r><w:t>promptly</w:t></w:r></w:ins>'
            '<w:r><w:t>.</w:t></w:r></w:p>')
    path = tmp_path / "draft.docx"
    path.write_bytes(docx_bytes(body))
    doc = read_document(str(path))
    from core.model import Review

    review = Review(draft=doc, precedent=doc, term_map=(), pairs=(), deviations=())
    data, notes = counter_draft_bytes(review, [], draft_path=str(path), author=AUTHOR)
    assert any("tracked changes of its own" in n for n in notes)
    assert validate_docx(data) == []



def test_a_delete_is_restored_at_the_drafts_empty_span(scenario, monkeypatch):
    """A delete carries an empty draft span at its insertion point; reverting it puts the
    precedent's words there (no diff of the texts is needed).  The hand-made pair read the
    other way round: the draft took "or death" out of the precedent's clause."""
    from core.reader import read_document
    from core.review import run_review

    review = run_review(read_document(str(scenario.precedent_path)), read_document(str(scenario.draft_path)))
    (dev,) = [d for d in review.deviations if d.change == "delete" and d.category == "substantive"]
    k, k2 = dev.draft_span
    prov = review.draft.provision(dev.draft_provision)
    assert k == k2 and prov.text[:k].endswith("fraud")
    _no_second_diff(monkeypatch)
    plan = plan_counter_draft(review, [Decision(dev.id, "revert")])
    (edit,) = plan.edits
    seg = prov.segments[0]
    assert (edit.block, edit.start, edit.end) == (seg.block, seg.start + k, seg.start + k)
    assert edit.replacement == " or death"



