"""The .odt reader on hand-written OpenDocument (ISO/IEC 26300, ODF 1.2 Part 1): list labels
(§16.30-16.32 list styles; §5.3 lists, start values, continued numbering), headings numbered
by the outline style (§16.34), text content (§6.1: white space, text:s, tab, line break),
emphasis from styles (§16.2 inheritance), tables, and what is left out (notes, comments).
Each expected value is the one ODF's definitions give (checked by hand against the clauses
cited); the LibreOffice check below renders the same labels independently."""

from __future__ import annotations

import pytest

from core.errors import CounterdraftError
from core.odf.numbering import format_value
from core.readers import read_document
from core.readers.odt import read_blocks
from tests.support.odt_fixtures import odt_bytes

LIST_STYLE = (
    '<text:list-style style:name="Clauses">'
    '<text:list-level-style-number text:level="1" style:num-format="1" style:num-suffix="."/>'
    '<text:list-level-style-number text:level="2" style:num-format="1" style:num-suffix="." text:display-levels="2"/>'
    '<text:list-level-style-number text:level="3" style:num-format="a" style:num-prefix="(" style:num-suffix=")"/>'
    '<text:list-level-style-number text:level="4" style:num-format="i" style:num-prefix="(" style:num-suffix=")"/>'
    '</text:list-style>'
)


def _read(tmp_path, body, **kw):
    path = tmp_path / "doc.odt"
    path.write_bytes(odt_bytes(body, **kw))
    blocks, warnings = read_blocks(str(path))
    return blocks, warnings


def _item(text, inner=""):
    return f"<text:list-item><text:p>{text}</text:p>{inner}</text:list-item>"


def test_list_labels_levels_and_display_levels(tmp_path):
    level3 = '<text:list>' + _item("first") + _item("second") + "</text:list>"
    level2 = '<text:list>' + _item("in euros;") + _item("net.", level3) + "</text:list>"
    level1 = '<text:list>' + _item("Goods means lamps.") + _item("Price means the price.", level2) + "</text:list>"
    body = ('<text:list text:style-name="Clauses">'
            + _item("Definitions", level1)
            + _item("Delivery")
            + "</text:list>")
    blocks, _ = _read(tmp_path, body, styles=LIST_STYLE)
    got = [(b.label, b.list_level, b.text) for b in blocks]
    assert got == [("1.", 0, "Definitions"), ("1.1.", 1, "Goods means lamps."), ("1.2.", 1, "Price means the price."),
                   ("(a)", 2, "in euros;"), ("(b)", 2, "net."), ("(i)", 3, "first"), ("(ii)", 3, "second"),
                   ("2.", 0, "Delivery")]
    assert len({b.list_id for b in blocks}) == 1


def test_start_values_list_headers_and_continued_numbering(tmp_path):
    body = ('<text:list text:style-name="Clauses" xml:id="L1">' + _item("One")
            + '<text:list-header><text:p>No number here</text:p></text:list-header>'
            + '<text:list-item text:start-value="5"><text:p>Five</text:p><text:p>Same item</text:p></text:list-item>'
            + "</text:list>"
            + "<text:p>Between the lists.</text:p>"
            + '<text:list text:style-name="Clauses" text:continue-numbering="true">' + _item("Six") + "</text:list>"
            + '<text:list text:style-name="Clauses">' + _item("Again one") + "</text:list>"
            + '<text:list text:style-name="Clauses" text:continue-list="L1">' + _item("Seven") + "</text:list>")
    blocks, _ = _read(tmp_path, body, styles=LIST_STYLE)
    assert [(b.label, b.text) for b in blocks] == [
        ("1.", "One"), (None, "No number here"), ("5.", "Five"), (None, "Same item"),
        (None, "Between the lists."), ("6.", "Six"), ("1.", "Again one"), ("7.", "Seven")]
    ids = [b.list_id for b in blocks if b.label]
    assert ids[0] == ids[1] == ids[2] == ids[4] != ids[3]


def test_headings_numbered_by_the_outline_style(tmp_path):
    outline = ('<text:outline-style style:name="Outline">'
               '<text:outline-level-style text:level="1" style:num-format="I" style:num-prefix="Article " />'
               '<text:outline-level-style text:level="2" style:num-format="1" text:display-levels="2"'
               ' style:num-suffix="."/>'
               "</text:outline-style>")
    body = ('<text:h text:outline-level="1">Definitions</text:h>'
            '<text:h text:outline-level="2">Terms</text:h><text:p>Body.</text:p>'
            '<text:h text:outline-level="2">Rules</text:h>'
            '<text:h text:outline-level="1">Supply</text:h>'
            '<text:h text:outline-level="2">Goods</text:h>'
            '<text:h text:outline-level="1" text:is-list-header="true">Schedule</text:h>')
    blocks, _ = _read(tmp_path, body, styles=outline)
    assert [(b.label, b.outline_level) for b in blocks] == [
        ("Article I", 1), ("I.1.", 2), (None, None), ("I.2.", 2), ("Article II", 1), ("II.1.", 2), (None, 1)]


def test_text_white_space_tabs_breaks_and_what_is_left_out(tmp_path):
    body = ("<text:p>  The   Supplier<text:s text:c=\"2\"/>shall\n deliver<text:tab/>the<text:line-break/>Goods"
            "<text:note><text:note-citation>1</text:note-citation><text:note-body><text:p>A footnote.</text:p>"
            "</text:note-body></text:note>"
            "<office:annotation><text:p>A reviewer's comment.</text:p></office:annotation>.</text:p>")
    blocks, warnings = _read(tmp_path, body)
    assert blocks[0].text == "The Supplier  shall deliver\tthe\nGoods."  # text:c="2": two spaces
    assert warnings == ("1 comment(s) in the file not shown",)


def test_emphasis_from_paragraph_and_span_styles(tmp_path):
    automatic = ('<style:style style:name="B" style:family="text">'
                 '<style:text-properties fo:font-weight="bold"/></style:style>'
                 '<style:style style:name="H" style:family="paragraph" style:parent-style-name="Strong"/>')
    styles = ('<style:style style:name="Strong" style:family="paragraph">'
              '<style:text-properties fo:font-weight="700"/></style:style>')
    body = ('<text:p text:style-name="H">LIMITATION OF LIABILITY</text:p>'
            '<text:p><text:span text:style-name="B">Price.</text:span> The Customer pays.</text:p>')
    blocks, _ = _read(tmp_path, body, styles=styles, automatic=automatic)
    assert blocks[0].emphasised and blocks[0].all_caps
    assert blocks[1].lead == "Price." and not blocks[1].emphasised


def test_table_cells_are_blocks_in_a_table(tmp_path):
    body = ("<table:table><table:table-row><table:table-cell><text:p>Fee</text:p></table:table-cell>"
            "<table:table-cell><text:p>EUR 100</text:p></table:table-cell></table:table-row></table:table>")
    blocks, _ = _read(tmp_path, body)
    assert [(b.text, b.in_table) for b in blocks] == [("Fee", True), ("EUR 100", True)]


@pytest.mark.parametrize("value, fmt, sync, shown", [
    (1, "1", False, "1"), (4, "i", False, "iv"), (9, "I", False, "IX"), (3, "a", False, "c"),
    (27, "a", False, "aa"), (28, "a", False, "ab"), (28, "a", True, "bb"), (53, "A", True, "AAA"),
    (5, "", False, ""),
])
def test_number_formats(value, fmt, sync, shown):
    # style:num-format tokens as in XSL xsl:number; letter sync per style:num-letter-sync
    assert format_value(value, fmt, letter_sync=sync) == shown


def test_refusals_name_the_file(tmp_path):
    locked = tmp_path / "locked.odt"
    locked.write_bytes(odt_bytes("<text:p>x</text:p>", encrypted=True))
    with pytest.raises(CounterdraftError, match="password-protected") as info:
        read_document(str(locked))
    assert str(info.value).startswith(str(locked))
    sheet = tmp_path / "sheet.odt"
    sheet.write_bytes(odt_bytes("<text:p>x</text:p>", mimetype="application/vnd.oasis.opendocument.spreadsheet"))
    with pytest.raises(CounterdraftError, match="spreadsheet"):
        read_document(str(sheet))
    cut = tmp_path / "cut.odt"
    cut.write_bytes(odt_bytes("<text:p>x</text:p>")[:60])
    with pytest.raises(CounterdraftError) as info:
        read_document(str(cut))
    assert str(info.value).startswith(str(cut))


def test_labels_agree_with_libreoffice(tmp_path):
    """LibreOffice headless (Debian's) renders the same .odt as text: each numbered paragraph
    is indented, then its label, a space and the words (tests/support/libreoffice.py)."""
    from tests.support.libreoffice import UTF8_BOM, convert

    body = ('<text:list text:style-name="Clauses"><text:list-item><text:list>' + _item("Deeper first")
            + "</text:list></text:list-item>" + _item("Then up") + "</text:list>"
            + '<text:list text:style-name="Clauses" xml:id="L1">'
            + _item("One", '<text:list>' + _item("One one")
                    + _item("One two", '<text:list>' + _item("deep a") + _item("deep b") + "</text:list>")
                    + "</text:list>")
            + '<text:list-item text:start-value="5"><text:p>Five</text:p></text:list-item>'
            + "</text:list><text:p>Between.</text:p>"
            + '<text:list text:style-name="Clauses" text:continue-numbering="true">' + _item("Six") + "</text:list>"
            + '<text:list text:style-name="Clauses">' + _item("Again one") + "</text:list>")
    path = tmp_path / "lists.odt"
    path.write_bytes(odt_bytes(body, styles=LIST_STYLE))
    ours = [f"{b.label} {b.text}" if b.label else b.text for b in read_blocks(str(path))[0]]
    out = convert(path, target="txt:Text (encoded):UTF8", suffix=".txt", outdir=tmp_path / "lo")
    theirs = [ln.strip() for ln in out.read_text(encoding="utf-8").removeprefix(UTF8_BOM).splitlines() if ln.strip()]
    assert ours == theirs
