"""A tracked-changes copy (core.docx.tracked) leaves headers, footers, section properties and
tables exactly as they were (decisions-and-outputs issue, point 2: "nothing else touched:
styles, numbering, sections, headers, footers, tables ... stay byte-for-byte").

The other tests of the writer use drafts without header or footer parts and compare only
the body's paragraphs; this one builds a draft that has them.

Outside references:
* ECMA-376 Part 1 (WordprocessingML): headers and footers are parts of their own, referenced
  from the section properties (w:sectPr with w:headerReference / w:footerReference); tables
  are w:tbl elements of the body (the clause numbers, §17.10 for headers and footers, §17.6
  for sections and §17.4 for tables, are from memory);
* python-docx, which writes the header, footer and table of the input and reads them back
  from our output.
"""

from __future__ import annotations

import io
import zipfile

import docx
from docx.shared import Cm
from lxml import etree

from core.docx.blocks import read_docx_blocks
from core.docx.revisions import RevisionStamp, w
from core.docx.tracked import BlockDeletion, BlockEdit, write_tracked_copy
from core.docx.validate import validate_docx

STAMP = RevisionStamp(author="Ines Testwright", date="2024-05-01T10:00:00Z")

#: Parts a tracked copy may change: the main part, its relationships and the package's
#: content types and relationships (for a comments part and custom properties).
MAY_CHANGE = {"word/document.xml", "word/_rels/document.xml.rels", "[Content_Types].xml", "_rels/.rels"}


def _draft(path) -> None:
    """An invented two-clause draft with a header, a footer, a table and custom margins
    (python-docx writes the parts)."""
    d = docx.Document()
    section = d.sections[0]
    section.left_margin = Cm(2.7)
    section.header.paragraphs[0].text = "Harlowden Supply Terms \u2014 draft for discussion"
    section.footer.paragraphs[0].text = "Confidential \u2014 page footer"
    d.add_paragraph("The Client shall pay within sixty (60) days.")
    table = d.add_table(rows=2, cols=2)
    table.style = "Table Grid"
    for r, row in enumerate(table.rows):
        for c, cell in enumerate(row.cells):
            cell.text = f"Price band {r}{c}"
    d.add_paragraph("The Vendor may assign this Agreement freely.")
    d.add_paragraph("Closing words of the agreement.")
    d.save(str(path))


def _members(data: bytes) -> dict[str, bytes]:
    with zipfile.ZipFile(io.BytesIO(data)) as zf:
        return {i.filename: zf.read(i) for i in zf.infolist()}


def _body_children(data: bytes) -> list[etree._Element]:
    root = etree.fromstring(_members(data)["word/document.xml"])
    return list(root.find(w("body")))


def test_headers_footers_sections_and_tables_stay_byte_for_byte(tmp_path):
    source = tmp_path / "draft.docx"
    _draft(source)
    blocks, _ = read_docx_blocks(str(source))
    texts = [b.text for b in blocks]
    pay = texts.index("The Client shall pay within sixty (60) days.")
    assign = texts.index("The Vendor may assign this Agreement freely.")
    start = texts[pay].index("sixty (60)")
    out = write_tracked_copy(
        str(source),
        edits=[BlockEdit(pay, start, start + len("sixty (60)"), "thirty (30)", comment="House term.")],
        deletions=[BlockDeletion(assign)],
        stamp=STAMP,
    )
    assert validate_docx(out) == []  # ECMA-376 Part 1 §17.13 structure of what we wrote

    before, after = _members(source.read_bytes()), _members(out)
    headers = [n for n in before if n.startswith("word/header")]
    footers = [n for n in before if n.startswith("word/footer")]
    assert headers and footers  # the input really has them
    for name, data in before.items():
        if name not in MAY_CHANGE:
            assert after[name] == data, f"{name} changed"  # header, footer, styles, numbering...

    # Inside the main part: every body element other than the two decided paragraphs --
    # the table (with its properties and cell paragraphs) and the final w:sectPr (margins,
    # header and footer references) -- is serialised exactly as before.
    old, new = _body_children(source.read_bytes()), _body_children(out)
    assert [c.tag for c in old] == [c.tag for c in new]
    decided = {texts[pay], texts[assign]}
    compared = 0
    for a, b in zip(old, new):
        own_text = "".join(a.itertext()) if a.tag == w("p") else None
        if own_text in decided:
            assert etree.tostring(a) != etree.tostring(b)
            continue
        assert etree.tostring(a) == etree.tostring(b), etree.QName(a).localname
        compared += 1
    tags = {etree.QName(c).localname for c in old}
    assert {"tbl", "sectPr"} <= tags and compared >= 3

    # python-docx, an outside reader, sees the same header, footer and table in the output.
    copy = tmp_path / "counter.docx"
    copy.write_bytes(out)
    read_back = docx.Document(str(copy))
    section = read_back.sections[0]
    assert section.header.paragraphs[0].text == "Harlowden Supply Terms \u2014 draft for discussion"
    assert section.footer.paragraphs[0].text == "Confidential \u2014 page footer"
    # Margins are stored in twips, so compare with what python-docx reads from the input.
    assert section.left_margin == docx.Document(str(source)).sections[0].left_margin
    (table,) = read_back.tables
    assert [[c.text for c in row.cells] for row in table.rows] == [
        ["Price band 00", "Price band 01"], ["Price band 10", "Price band 11"]]
    assert table.style.name == "Table Grid"
