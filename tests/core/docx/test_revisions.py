"""Tracked changes written into existing paragraphs (core.docx.revisions).

References:
* ECMA-376 Part 1 §17.13.5 (revisions): w:ins (§17.13.5.18), w:del (§17.13.5.14) with
  w:delText (§17.3.3.7) and w:delInstrText (§17.13.5.13), deleted/inserted paragraph marks
  (w:pPr/w:rPr/w:del §17.13.5.15, w:ins §17.13.5.16); §17.13.4 (comments).
* LibreOffice headless (Debian's libreoffice-writer, driven through UNO by
  tests/support/lo_uno.py) as the independent word processor that accepts and rejects the
  changes; our own structural check (core.docx.validate) runs on every file, since
  LibreOffice accepts malformed markup silently.
"""

from __future__ import annotations

import copy
import io
import zipfile

import pytest
from lxml import etree

from core.docx.blocks import iter_body_paragraphs, paragraph_pieces, read_docx_blocks
from core.docx.revisions import (
    IdAllocator,
    RevisionStamp,
    TextEdit,
    apply_paragraph_edits,
    delete_paragraph,
    insert_paragraph_after,
    make_runs,
    mark_paragraph,
    max_annotation_id,
    w,
)
from core.docx.validate import check_revisions, validate_docx
from tests.support.docx_fixtures import body_element, docx_bytes
from tests.support.lo_session import libreoffice

STAMP = RevisionStamp(author="Ines Testwright", date="2024-05-01T10:00:00Z")


def _text(p) -> str:
    return "".join(piece.text for piece in paragraph_pieces(p))


def _accepted_text(p) -> str:
    """The paragraph's text with its tracked changes accepted, read by the project's own
    reader (which reads w:ins as present and w:del as gone, §17.13.5)."""
    return _text(p)


def _rejected_text(p) -> str:
    """Text with every change rejected: drop w:ins, turn w:del back into plain runs."""
    q = copy.deepcopy(p)
    for ins in list(q.iter(w("ins"))):
        ins.getparent().remove(ins)
    for d in list(q.iter(w("del"))):
        parent = d.getparent()
        i = parent.index(d)
        for child in list(d):
            for t in child.iter(w("delText")):
                t.tag = w("t")
            for t in child.iter(w("delInstrText")):
                t.tag = w("instrText")
            parent.insert(i, child)
            i += 1
        parent.remove(d)
    return _text(q)


def _first_p(xml_inner: str):
    doc = body_element(xml_inner)
    return doc, next(iter_body_paragraphs(doc))


def test_replacement_splits_runs_and_keeps_their_properties():
    doc, p = _first_p(
        '<w:p><w:r><w:rPr><w:b/></w:rPr><w:t xml:space="preserve">Pay within thirty days </w:t></w:r>'
        '<w:r><w:t>of receipt.</w:t></w:r></w:p>'
    )
    text = _text(p)
    start = text.index("thirty")
    apply_paragraph_edits(p, [TextEdit(start, start + len("thirty"), "sixty")], stamp=STAMP, ids=IdAllocator(1))
    assert _accepted_text(p) == text.replace("thirty", "sixty")
    assert _rejected_text(p) == text
    # §17.13.5.14: the deleted run sits in w:del and its text is w:delText, not w:t.
    dels = p.findall(w("del"))
    assert len(dels) == 1
    assert [t.text for t in dels[0].iter(w("delText"))] == ["thirty"]
    assert not list(dels[0].iter(w("t")))
    # Every piece of the split run keeps the run properties (bold) it had.
    for run in p.iter(w("r")):
        if "thirty" in "".join(run.itertext()) or "Pay" in "".join(run.itertext()):
            assert run.find(f"{w('rPr')}/{w('b')}") is not None
    # The inserted run copies the rPr of the run it replaces (bold).
    ins = p.find(w("ins"))
    assert ins is not None and ins.find(f"{w('r')}/{w('rPr')}/{w('b')}") is not None
    assert ins.getprevious() is dels[0]  # deletion first, then insertion (common practice)
    assert check_revisions(doc) == []


def test_every_revision_has_a_unique_numeric_id_author_and_date_above_existing_ids():
    doc, p = _first_p(
        '<w:p><w:bookmarkStart w:id="41" w:name="b"/><w:r><w:t>one two three four</w:t></w:r>'
        '<w:bookmarkEnd w:id="41"/></w:p>'
    )
    ids = IdAllocator(max_annotation_id(doc) + 1)
    apply_paragraph_edits(p, [TextEdit(0, 3, "ONE"), TextEdit(8, 14, ""), TextEdit(18, 18, " five")],
                          stamp=STAMP, ids=ids)
    marks = list(p.iter(w("ins"), w("del")))
    values = [int(m.get(w("id"))) for m in marks]
    assert len(values) == 4 and len(set(values)) == 4
    assert min(values) > 41  # never clashes with the bookmark's id
    for m in marks:
        assert m.get(w("author")) == STAMP.author and m.get(w("date")) == STAMP.date
    assert _accepted_text(p) == "ONE two four five"
    assert _rejected_text(p) == "one two three four"
    assert check_revisions(doc) == []


def test_deletion_inside_a_hyperlink_stays_inside_it():
    doc, p = _first_p(
        '<w:p><w:r><w:t xml:space="preserve">See </w:t></w:r>'
        '<w:hyperlink w:anchor="x"><w:r><w:t>the schedule</w:t></w:r></w:hyperlink>'
        '<w:r><w:t xml:space="preserve"> below.</w:t></w:r></w:p>'
    )
    text = _text(p)
    s = text.index("the ")
    apply_paragraph_edits(p, [TextEdit(s, s + 4, "")], stamp=STAMP, ids=IdAllocator(1))
    link = p.find(w("hyperlink"))
    assert link.find(w("del")) is not None
    assert _accepted_text(p) == "See schedule below."
    assert _rejected_text(p) == text
    assert check_revisions(doc) == []


def test_deleting_a_whole_field_turns_its_instruction_into_delinstrtext():
    doc, p = _first_p(
        '<w:p><w:r><w:t xml:space="preserve">Page </w:t></w:r>'
        '<w:r><w:fldChar w:fldCharType="begin"/></w:r><w:r><w:instrText xml:space="preserve"> PAGE </w:instrText></w:r>'
        '<w:r><w:fldChar w:fldCharType="separate"/></w:r><w:r><w:t>7</w:t></w:r>'
        '<w:r><w:fldChar w:fldCharType="end"/></w:r><w:r><w:t xml:space="preserve"> of the text</w:t></w:r></w:p>'
    )
    text = _text(p)
    assert text == "Page 7 of the text"
    # Delete "Page 7 " -- covering the whole field result and the runs between.
    apply_paragraph_edits(p, [TextEdit(0, 7, "")], stamp=STAMP, ids=IdAllocator(1))
    # §17.13.5.13: a deleted field instruction is w:delInstrText.
    assert not list(p.iter(w("instrText")))
    assert [e.text for e in p.iter(w("delInstrText"))] == [" PAGE "]
    assert _accepted_text(p) == "of the text"
    assert check_revisions(doc) == []


def test_pure_insertion_copies_the_run_before_it():
    doc, p = _first_p(
        '<w:p><w:r><w:rPr><w:i/></w:rPr><w:t>shall</w:t></w:r>'
        '<w:r><w:t xml:space="preserve"> be deemed</w:t></w:r></w:p>'
    )
    apply_paragraph_edits(p, [TextEdit(5, 5, " not")], stamp=STAMP, ids=IdAllocator(1))
    ins = p.find(w("ins"))
    assert ins.find(f"{w('r')}/{w('rPr')}/{w('i')}") is not None
    assert _accepted_text(p) == "shall not be deemed"
    assert check_revisions(doc) == []


def test_overlapping_or_out_of_range_edits_are_refused():
    _, p = _first_p("<w:p><w:r><w:t>abcdef</w:t></w:r></w:p>")
    with pytest.raises(ValueError):
        apply_paragraph_edits(p, [TextEdit(0, 3, "x"), TextEdit(2, 4, "y")], stamp=STAMP, ids=IdAllocator(1))
    with pytest.raises(ValueError):
        apply_paragraph_edits(p, [TextEdit(4, 9, "x")], stamp=STAMP, ids=IdAllocator(1))


def test_make_runs_writes_tabs_and_breaks_as_elements():
    (run,) = make_runs("a\tb\nc", None, deleted=True)
    assert [etree.QName(c).localname for c in run] == ["delText", "tab", "delText", "br", "delText"]


def test_deleted_paragraph_marks_its_mark_unless_it_holds_the_section():
    doc = body_element(
        "<w:p><w:r><w:t>keep</w:t></w:r></w:p>"
        "<w:p><w:r><w:t>drop me</w:t></w:r></w:p>"
        "<w:p><w:pPr><w:sectPr/></w:pPr><w:r><w:t>section end</w:t></w:r></w:p>"
        "<w:p><w:r><w:t>last</w:t></w:r></w:p>"
    )
    paras = list(iter_body_paragraphs(doc))
    ids = IdAllocator(1)
    delete_paragraph(paras[1], stamp=STAMP, ids=ids)
    delete_paragraph(paras[2], stamp=STAMP, ids=ids)
    # §17.13.5.15: the deleted paragraph mark is w:pPr/w:rPr/w:del.
    assert paras[1].find(f"{w('pPr')}/{w('rPr')}/{w('del')}") is not None
    # A paragraph carrying w:sectPr keeps its mark: deleting it would delete the section.
    assert paras[2].find(f"{w('pPr')}/{w('rPr')}/{w('del')}") is None
    assert paras[2].find(f"{w('pPr')}/{w('sectPr')}") is not None
    assert check_revisions(doc) == []
    # Where a mark is written next to w:sectPr, w:rPr goes first (CT_PPr sequence, §17.3.1.26)
    # and the revision mark opens w:rPr (CT_ParaRPr, §17.3.1.29).
    p = copy.deepcopy(paras[2])
    p.find(w("pPr")).insert(0, etree.Element(w("jc")))
    mark_paragraph(p, "ins", stamp=STAMP, ids=IdAllocator(1))
    assert [etree.QName(c).localname for c in p.find(w("pPr"))] == ["jc", "rPr", "sectPr"]
    assert etree.QName(p.find(w("pPr")).find(w("rPr"))[0]).localname == "ins"


def test_inserted_paragraph_copies_the_neighbours_paragraph_properties():
    doc = body_element(
        '<w:p><w:pPr><w:pStyle w:val="ListParagraph"/><w:numPr><w:ilvl w:val="1"/><w:numId w:val="3"/>'
        '</w:numPr></w:pPr><w:r><w:rPr><w:b/></w:rPr><w:t>first</w:t></w:r></w:p>'
    )
    (p,) = list(iter_body_paragraphs(doc))
    rpr = p.find(f"{w('r')}/{w('rPr')}")
    new = insert_paragraph_after(p, "second", ppr=p.find(w("pPr")), rpr=rpr, stamp=STAMP, ids=IdAllocator(1))
    assert p.getnext() is new
    assert new.find(f"{w('pPr')}/{w('numPr')}/{w('numId')}").get(w("val")) == "3"
    assert new.find(f"{w('pPr')}/{w('rPr')}/{w('ins')}") is not None  # inserted mark, §17.13.5.16
    assert new.find(f"{w('ins')}/{w('r')}/{w('rPr')}/{w('b')}") is not None
    assert _text(new) == "second"
    assert check_revisions(doc) == []


# --------------------------------------------------------------------------------------
# LibreOffice as the outside reference
# --------------------------------------------------------------------------------------

_RICH_BODY = (
    '<w:p><w:r><w:rPr><w:b/></w:rPr><w:t xml:space="preserve">Payment. </w:t></w:r>'
    '<w:r><w:t xml:space="preserve">The Client shall pay within </w:t></w:r>'
    '<w:r><w:rPr><w:u w:val="single"/></w:rPr><w:t>sixty (60)</w:t></w:r>'
    '<w:r><w:t xml:space="preserve"> days of the </w:t></w:r>'
    '<w:hyperlink w:anchor="inv"><w:r><w:t>invoice date</w:t></w:r></w:hyperlink>'
    '<w:r><w:t>.</w:t></w:r></w:p>'
    '<w:p><w:r><w:t>Either party</w:t><w:tab/><w:t xml:space="preserve">may terminate on notice.</w:t></w:r></w:p>'
    '<w:p><w:r><w:t xml:space="preserve">Section </w:t></w:r>'
    '<w:r><w:fldChar w:fldCharType="begin"/></w:r><w:r><w:instrText xml:space="preserve"> SEQ x </w:instrText></w:r>'
    '<w:r><w:fldChar w:fldCharType="separate"/></w:r><w:r><w:t>4</w:t></w:r>'
    '<w:r><w:fldChar w:fldCharType="end"/></w:r>'
    '<w:r><w:t xml:space="preserve"> applies in full.</w:t></w:r></w:p>'
    '<w:p><w:r><w:t>This paragraph goes.</w:t></w:r></w:p>'
    '<w:p><w:r><w:t>Untouched closing words.</w:t></w:r></w:p>'
)


def _edit_package(data: bytes, change) -> bytes:
    """Apply *change(document_root)* to word/document.xml of *data*; other parts unchanged."""
    zin = zipfile.ZipFile(io.BytesIO(data))
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as zout:
        for info in zin.infolist():
            raw = zin.read(info)
            if info.filename == "word/document.xml":
                root = etree.fromstring(raw)
                change(root)
                raw = etree.tostring(root, xml_declaration=True, encoding="UTF-8", standalone=True)
            zout.writestr(info, raw)
    return out.getvalue()


def test_libreoffice_accepts_and_rejects_our_changes_exactly(tmp_path):
    src = tmp_path / "in.docx"
    src.write_bytes(docx_bytes(_RICH_BODY))
    blocks, _ = read_docx_blocks(str(src))
    texts = [b.text for b in blocks]
    # Edits as (block, old words, new words); the expected result is computed on the plain
    # strings, independently of the XML.
    plan = [
        (0, "sixty (60)", "thirty (30)"),
        (0, "invoice date", "date of receipt of the invoice"),
        (1, "Either party", "The Supplier"),
        (1, "may", "shall"),
        (2, "Section 4 applies", "This Agreement applies"),
    ]

    def change(root):
        paras = list(iter_body_paragraphs(root))
        ids = IdAllocator(max_annotation_id(root) + 1)
        per_block: dict[int, list[TextEdit]] = {}
        for b, old, new in plan:
            s = texts[b].index(old)
            per_block.setdefault(b, []).append(TextEdit(s, s + len(old), new))
        for b, edits in per_block.items():
            apply_paragraph_edits(paras[b], edits, stamp=STAMP, ids=ids)
        delete_paragraph(paras[3], stamp=STAMP, ids=ids)
        insert_paragraph_after(paras[1], "A new paragraph is inserted.", ppr=paras[1].find(w("pPr")),
                               rpr=None, stamp=STAMP, ids=ids)

    out = tmp_path / "out.docx"
    out.write_bytes(_edit_package(src.read_bytes(), change))
    assert validate_docx(out) == []

    expected = list(texts)
    for b, old, new in plan:
        expected[b] = expected[b].replace(old, new, 1)
    expected = expected[:2] + ["A new paragraph is inserted."] + expected[2:3] + expected[4:]

    office = libreoffice()
    accepted = office.inspect(out, action="accept", pdf=tmp_path / "a.pdf")
    assert accepted.redlines_before > 0 and accepted.redlines_after == 0
    assert accepted.paragraphs == expected
    assert accepted.pdf_bytes and accepted.pdf_bytes > 0
    rejected = office.inspect(out, action="reject")
    assert rejected.redlines_after == 0
    assert rejected.paragraphs == texts
    assert {r["author"] for r in accepted.redlines} <= {STAMP.author}


def test_libreoffice_sees_our_author_on_every_change(tmp_path):
    src = tmp_path / "in.docx"
    src.write_bytes(docx_bytes("<w:p><w:r><w:t>alpha beta gamma</w:t></w:r></w:p>"))

    def change(root):
        (p,) = list(iter_body_paragraphs(root))
        apply_paragraph_edits(p, [TextEdit(6, 10, "BETA")], stamp=STAMP, ids=IdAllocator(1))

    out = tmp_path / "out.docx"
    out.write_bytes(_edit_package(src.read_bytes(), change))
    view = libreoffice().inspect(out)
    assert view.redlines_before == 2
    assert {r["author"] for r in view.redlines} == {STAMP.author}
    assert sorted(r["type"] for r in view.redlines) == ["Delete", "Insert"]
