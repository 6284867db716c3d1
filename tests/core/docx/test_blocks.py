"""The paragraph walker (core.docx.blocks) on small inline WordprocessingML fixtures.

Each fixture names the ECMA-376 Part 1 section that defines the markup and what a reader
shows for it.
"""

from __future__ import annotations

import pytest
from lxml import etree

from core.docx.blocks import (
    TextPiece,
    blocks_from_document,
    iter_block_pieces,
    iter_body_paragraphs,
    paragraph_pieces,
    read_docx_blocks,
)
from core.docx.numbering import parse_numbering
from core.docx.styles import parse_styles
from tests.support.docx_fixtures import W_DECL, W, body_element, build_docx


def _read(body: str, *, styles: str | None = None, numbering: str | None = None):
    sheet = parse_styles(etree.fromstring(f"<w:styles {W_DECL}>{styles}</w:styles>")
                         if styles is not None else None)
    defs = parse_numbering(etree.fromstring(f"<w:numbering {W_DECL}>{numbering}</w:numbering>")
                           if numbering is not None else None, styles=sheet)
    doc = body_element(body)
    blocks, warnings = blocks_from_document(doc, styles=sheet, numbering=defs)
    # The contract for the tracked-changes writer: pieces join to each block's text.
    aligned = list(iter_block_pieces(doc))
    assert len(aligned) == len(blocks)
    for (_p, pieces), block in zip(aligned, blocks):
        assert "".join(piece.text for piece in pieces) == block.text
        assert all(piece.element.tag == f"{{{W}}}r" for piece in pieces)
    assert list(iter_body_paragraphs(doc)) == [p for p, _ in aligned]
    return blocks, warnings


def r(text: str, rpr: str = "") -> str:
    return f'<w:r>{f"<w:rPr>{rpr}</w:rPr>" if rpr else ""}<w:t xml:space="preserve">{text}</w:t></w:r>'


def p(*content: str, ppr: str = "") -> str:
    return f'<w:p>{f"<w:pPr>{ppr}</w:pPr>" if ppr else ""}{"".join(content)}</w:p>'


# --------------------------------------------------------------------------------------
# Tracked changes: ECMA-376 Part 1 §17.13.5 (revisions) read as accepted
# --------------------------------------------------------------------------------------

A = 'w:id="{}" w:author="Reviewer" w:date="2026-01-05T10:00:00Z"'


def test_insertions_kept_deletions_dropped_with_count():
    # §17.13.5.18 ins, §17.13.5.14 del (deleted text is w:delText, §17.3.3.7),
    # §17.13.5.22/.23 moveFrom/moveTo.
    body = p(
        r("The Supplier shall deliver the Goods within "),
        f'<w:del {A.format(1)}><w:r><w:delText>thirty</w:delText></w:r></w:del>',
        f'<w:ins {A.format(2)}>{r("sixty")}</w:ins>',
        r(" days"),
        f'<w:moveFrom {A.format(3)}>{r(" of the order")}</w:moveFrom>',
        r("."),
        f'<w:ins {A.format(4)}>{r(" Time is of the essence.")}</w:ins>',
    ) + p(
        f'<w:moveTo {A.format(5)}>{r("Of the order")}</w:moveTo>',
        r(" date counts."),
    )
    blocks, warnings = _read(body)
    assert [b.text for b in blocks] == [
        "The Supplier shall deliver the Goods within sixty days. Time is of the essence.",
        "Of the order date counts.",
    ]
    assert warnings == ("5 tracked changes read as accepted "
                        "(2 insertions, 1 deletion, 2 move marks)",)


def test_python_docx_would_lose_inserted_text():
    """The reason for our own walker: python-docx's Paragraph.text skips w:ins content."""
    import docx
    from docx.text.paragraph import Paragraph

    body = p(r("Payment within "), f'<w:ins {A.format(1)}>{r("sixty")}</w:ins>', r(" days."))
    para = docx.oxml.parse_xml(body.replace("<w:p>", f"<w:p {W_DECL}>", 1))
    assert Paragraph(para, None).text == "Payment within  days."
    blocks, _ = _read(body)
    assert blocks[0].text == "Payment within sixty days."


def test_deleted_paragraph_mark_merges_with_next_paragraph():
    # §17.13.5.15 (deleted paragraph mark: w:pPr/w:rPr/w:del): accepting it joins the
    # paragraph with the next one, which keeps its own properties (numbering here).
    numbering = ('<w:abstractNum w:abstractNumId="1"><w:lvl w:ilvl="0"><w:start w:val="1"/>'
                 '<w:numFmt w:val="decimal"/><w:lvlText w:val="%1."/></w:lvl></w:abstractNum>'
                 '<w:num w:numId="1"><w:abstractNumId w:val="1"/></w:num>')
    numpr = '<w:numPr><w:ilvl w:val="0"/><w:numId w:val="1"/></w:numPr>'
    body = (
        p(r("The Customer shall pay"), ppr=numpr + f'<w:rPr><w:del {A.format(1)}/></w:rPr>')
        + p(r(" within sixty days."), ppr=numpr)
        # a paragraph deleted entirely: text and mark
        + p(f'<w:del {A.format(2)}><w:r><w:delText>Deleted clause.</w:delText></w:r></w:del>',
            ppr=numpr + f'<w:rPr><w:del {A.format(3)}/></w:rPr>')
        + p(r("Next clause."), ppr=numpr)
    )
    blocks, warnings = _read(body, numbering=numbering)
    assert [(b.label, b.text) for b in blocks] == [
        (None, ""),
        ("1.", "The Customer shall pay within sixty days."),
        (None, ""),
        ("2.", "Next clause."),
    ]
    assert warnings == ("3 tracked changes read as accepted (3 deletions)",)


def test_deleted_mark_of_last_paragraph_keeps_its_words():
    body = p(r("Closing words."), ppr=f'<w:rPr><w:del {A.format(1)}/></w:rPr>')
    blocks, _ = _read(body)
    assert [b.text for b in blocks] == ["Closing words."]


def test_formatting_changes_are_counted():
    # §17.13.5.31 rPrChange, §17.13.5.29 pPrChange: the current properties are the new ones.
    body = p(
        f'<w:r><w:rPr><w:b/><w:rPrChange {A.format(1)}><w:rPr/></w:rPrChange></w:rPr>'
        "<w:t>Bold now</w:t></w:r>",
        ppr=f'<w:jc w:val="center"/><w:pPrChange {A.format(2)}><w:pPr/></w:pPrChange>',
    )
    blocks, warnings = _read(body)
    assert blocks[0].text == "Bold now"
    assert warnings == ("2 tracked changes read as accepted (2 formatting changes)",)


def test_no_revisions_no_warning():
    assert _read(p(r("Plain.")))[1] == ()


# --------------------------------------------------------------------------------------
# Fields: ECMA-376 Part 1 §17.16
# --------------------------------------------------------------------------------------


def fld(kind: str) -> str:
    return f'<w:r><w:fldChar w:fldCharType="{kind}"/></w:r>'


def instr(text: str) -> str:
    return f'<w:r><w:instrText xml:space="preserve">{text}</w:instrText></w:r>'


def test_simple_field_shows_its_result():
    # §17.16.19 fldSimple: the runs inside are the field's current result.
    body = p(r("See clause "), '<w:fldSimple w:instr=" REF _Ref1 \\r "><w:r><w:t>7.2</w:t></w:r>'
             "</w:fldSimple>", r("."))
    assert _read(body)[0][0].text == "See clause 7.2."


def test_complex_field_shows_result_not_instruction():
    # §17.16.18 fldChar: begin, instruction (§17.16.23 instrText), separate, result, end.
    body = p(r("Dated "), fld("begin"), instr(" DATE \\@ \"d MMMM yyyy\" "), fld("separate"),
             r("5 January 2026"), fld("end"), r("."))
    assert _read(body)[0][0].text == "Dated 5 January 2026."


def test_nested_field_in_instruction_is_hidden_and_in_result_shown():
    # A field nested inside the outer field's instruction (an IF testing a MERGEFIELD) shows
    # nothing; a field inside the outer result shows its own result.
    body = p(
        fld("begin"), instr(" IF "), fld("begin"), instr(" MERGEFIELD Party "), fld("separate"),
        r("Ravelsby"), fld("end"), instr(' = "" "x" "y" '), fld("separate"),
        r("Result "), fld("begin"), instr(" PAGE "), fld("separate"), r("3"), fld("end"),
        fld("end"), r(" end"),
    )
    assert _read(body)[0][0].text == "Result 3 end"


def test_field_without_result_shows_nothing():
    body = p(r("a"), fld("begin"), instr(" TC \"Entry\" "), fld("end"), r("b"))
    assert _read(body)[0][0].text == "ab"


def test_field_spanning_paragraphs():
    # A table of contents: begin and instruction in the first paragraph, the result spread over
    # several paragraphs, end in the last; the instruction never shows.
    body = (p(fld("begin"), instr(" TOC \\o \"1-3\" "), fld("separate"), r("1. Definitions\t1"))
            + p(r("2. Supply\t3"))
            + p(r("3. Price\t4"), fld("end"))
            + p(r("After the table.")))
    blocks, warnings = _read(body)
    assert [b.text for b in blocks] == ["1. Definitions\t1", "2. Supply\t3", "3. Price\t4",
                                        "After the table."]
    assert warnings == ()


def test_field_instruction_spanning_paragraphs_stays_hidden():
    body = p(r("x"), fld("begin"), instr(" QUOTE \"a")) + p(instr('b" '), fld("separate"),
                                                           r("ab"), fld("end"), r("y"))
    assert [b.text for b in _read(body)[0]] == ["x", "aby"]


def test_unclosed_field_warns():
    body = p(r("Before"), fld("begin"), instr(" PAGE ")) + p(r("Hidden by the open field"))
    blocks, warnings = _read(body)
    assert [b.text for b in blocks] == ["Before", ""]
    assert any("never closed" in w for w in warnings)


# --------------------------------------------------------------------------------------
# Run content: ECMA-376 Part 1 §17.3.3
# --------------------------------------------------------------------------------------


def test_tabs_breaks_hyphens_symbols():
    body = p(
        "<w:r><w:t>7.2</w:t><w:tab/><w:t>Price</w:t><w:br/><w:t>line</w:t><w:cr/>"
        "<w:t>non</w:t><w:noBreakHyphen/><w:t>breaking co</w:t><w:softHyphen/>"
        '<w:t>operation</w:t><w:sym w:font="Symbol" w:char="2014"/><w:t>end</w:t>'
        '<w:ptab w:relativeTo="margin" w:alignment="right" w:leader="none"/><w:t>x</w:t></w:r>'
    )
    # §17.3.3.32 tab, §17.3.3.1 br, §17.3.3.4 cr, §17.3.3.18 noBreakHyphen,
    # §17.3.3.29 softHyphen, §17.3.3.30 sym, §17.3.3.23 ptab.
    assert _read(body)[0][0].text == "7.2\tPrice\nline\nnon-breaking cooperation\u2014end\tx"


def test_hidden_text_is_not_displayed():
    # §17.3.2.41 vanish: hidden text is not shown.
    body = p(r("Shown "), r("hidden ", "<w:vanish/>"), r("text"), r(" too", '<w:vanish w:val="0"/>'))
    assert _read(body)[0][0].text == "Shown text too"


def test_containers_are_opened():
    # §17.16.22 hyperlink, §17.5.1.9 smartTag, §17.5.1.3 customXml, §17.5.2.31 sdt (run-level
    # content control), §17.3.3.25 ruby (base text only).
    body = p(
        '<w:hyperlink r:id="rId9" xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/'
        'relationships">' + r("Link") + "</w:hyperlink>",
        '<w:smartTag w:uri="urn:x" w:element="place">' + r(" Skarnel Bay") + "</w:smartTag>",
        '<w:customXml w:element="party">' + r(" Orvane Ltd") + "</w:customXml>",
        "<w:sdt><w:sdtPr><w:alias w:val=\"Amount\"/></w:sdtPr><w:sdtContent>" + r(" 12,500")
        + "</w:sdtContent></w:sdt>",
        "<w:r><w:ruby><w:rubyPr/><w:rt>" + r("yomi") + "</w:rt><w:rubyBase>" + r(" base")
        + "</w:rubyBase></w:ruby></w:r>",
    )
    assert _read(body)[0][0].text == "Link Skarnel Bay Orvane Ltd 12,500 base"


# --------------------------------------------------------------------------------------
# Reading order: tables (§17.4), block-level content controls (§17.5.2), empty paragraphs
# --------------------------------------------------------------------------------------


def tc(*content: str) -> str:
    return f"<w:tc>{''.join(content)}</w:tc>"


def test_tables_in_reading_order_with_nested_tables():
    nested = f"<w:tbl><w:tr>{tc(p(r('N1')))}{tc(p(r('N2')))}</w:tr></w:tbl>"
    body = (
        p(r("Before"))
        + "<w:tbl><w:tblPr/><w:tblGrid/>"
        + f"<w:tr>{tc(p(r('A1')), p(r('A1 second')))}{tc(p(r('B1')))}</w:tr>"
        + f"<w:tr>{tc(p(r('A2')), nested, p())}{tc(p(r('B2')))}</w:tr>"
        + "</w:tbl>"
        + "<w:sdt><w:sdtContent>" + p(r("In a block content control")) + "</w:sdtContent></w:sdt>"
        + p()
        + p(r("After"))
    )
    blocks, _ = _read(body)
    assert [(b.text, b.in_table) for b in blocks] == [
        ("Before", False), ("A1", True), ("A1 second", True), ("B1", True), ("A2", True),
        ("N1", True), ("N2", True), ("", True), ("B2", True),
        ("In a block content control", False), ("", False), ("After", False),
    ]
    assert [b.index for b in blocks] == list(range(len(blocks)))


def test_deep_nesting_needs_no_recursion():
    depth = 200  # each level: table > row > cell
    body = ("<w:tbl><w:tr><w:tc>" * depth + p(r("deep")) + "</w:tc></w:tr></w:tbl>" * depth)
    doc = etree.fromstring(f"<w:document {W_DECL}><w:body>{body}</w:body></w:document>",
                           etree.XMLParser(huge_tree=True))
    blocks, _ = blocks_from_document(doc)
    assert [b.text for b in blocks] == ["deep"]


# --------------------------------------------------------------------------------------
# Heading features: styles (§17.7), run properties (§17.3.2)
# --------------------------------------------------------------------------------------

STYLES = (
    '<w:docDefaults><w:rPrDefault><w:rPr><w:sz w:val="22"/></w:rPr></w:rPrDefault></w:docDefaults>'
    '<w:style w:type="paragraph" w:default="1" w:styleId="Normal"><w:name w:val="Normal"/></w:style>'
    '<w:style w:type="paragraph" w:styleId="Title"><w:name w:val="Title"/>'
    '<w:basedOn w:val="Normal"/></w:style>'
    '<w:style w:type="paragraph" w:styleId="Heading1"><w:name w:val="heading 1"/>'
    '<w:basedOn w:val="Normal"/><w:pPr><w:outlineLvl w:val="0"/></w:pPr>'
    "<w:rPr><w:b/><w:caps/></w:rPr></w:style>"
    '<w:style w:type="paragraph" w:styleId="Heading2"><w:name w:val="heading 2"/>'
    '<w:basedOn w:val="Heading1"/><w:pPr><w:outlineLvl w:val="1"/></w:pPr>'
    '<w:rPr><w:caps w:val="0"/></w:rPr></w:style>'
    '<w:style w:type="paragraph" w:styleId="ClauseHeading"><w:name w:val="Clause Heading"/>'
    '<w:basedOn w:val="Heading2"/></w:style>'
    '<w:style w:type="paragraph" w:styleId="Level3"><w:name w:val="Level 3"/>'
    '<w:pPr><w:outlineLvl w:val="2"/></w:pPr></w:style>'
    '<w:style w:type="paragraph" w:styleId="BodyOutline"><w:name w:val="Body Outline"/>'
    '<w:basedOn w:val="Heading1"/><w:pPr><w:outlineLvl w:val="9"/></w:pPr></w:style>'
    '<w:style w:type="character" w:styleId="Strong"><w:name w:val="Strong"/>'
    "<w:rPr><w:b/></w:rPr></w:style>"
)


def styled(style: str, text: str = "x") -> str:
    return p(r(text), ppr=f'<w:pStyle w:val="{style}"/>')


def test_style_names_and_outline_levels():
    # §17.7.4.9 name (built-in names stored in lower case: "heading 1"), §17.7.4.3 basedOn,
    # §17.3.1.20 outlineLvl (0-based; 9 = body text).
    body = (styled("Title") + styled("Heading1") + styled("Heading2") + styled("ClauseHeading")
            + styled("Level3") + styled("BodyOutline") + p(r("plain"))
            + p(r("direct"), ppr='<w:outlineLvl w:val="3"/>')
            + p(r("unknown style"), ppr='<w:pStyle w:val="Missing"/>'))
    blocks, _ = _read(body, styles=STYLES)
    assert [(b.style, b.outline_level) for b in blocks] == [
        ("Title", 0), ("Heading 1", 1), ("Heading 2", 2), ("Clause Heading", 2),
        ("Level 3", 3), ("Body Outline", None), ("Normal", None), ("Normal", 4),
        ("Normal", None),
    ]


def test_run_in_bold_lead():
    body = (
        p(r("Limitation of Liability.", "<w:b/>"), r(" The Supplier's liability is capped."))
        # punctuation after the bold words belongs to the lead
        + p(r("Payment", "<w:b/>"), r(". The Customer shall pay."))
        # underline (§17.3.2.40) and caps (§17.3.2.5) emphasise too; w:u none does not
        + p(r("Notices", '<w:u w:val="single"/>'), r(" All notices in writing."))
        + p(r("Assignment", "<w:caps/>"), r(": neither party may assign."))
        + p(r("Waiver", '<w:u w:val="none"/>'), r(" No waiver."))
        # w:b w:val="0" is not bold (§17.17.4 ST_OnOff)
        + p(r("Costs.", '<w:b w:val="0"/>'), r(" Each party bears its own."))
        # bold through a character style (§17.7.4.17 rStyle)
        + p(r("Publicity.", '<w:rStyle w:val="Strong"/>'), r(" No announcements."))
        # a literal label typed before the bold heading stays at the start of the lead
        + p(r("7.2\t"), r("Liability Cap.", "<w:b/>"), r(" The cap is 100%."))
        # bold stopping inside a word is emphasis, not a heading
        + p(r("Term", "<w:b/>"), r("inate at will."))
        # a bold quoted defined term is reported as the lead as well
        + p(r("\u201cAgreement\u201d", "<w:b/>"), r(" means this agreement."))
        # whole paragraph emphasised: a standalone heading line, no lead
        + p(r("DEFINITIONS AND INTERPRETATION", "<w:b/>"))
        + p(r("12.\t"), r("Confidentiality", "<w:b/>"))
        + p(r("Plain text only."))
        + p(r("Some "), r("bold", "<w:b/>"), r(" inside."))
    )
    blocks, _ = _read(body, styles=STYLES)
    assert [(b.lead, b.emphasised) for b in blocks] == [
        ("Limitation of Liability.", False),
        ("Payment.", False),
        ("Notices", False),
        ("Assignment:", False),
        (None, False),
        (None, False),
        ("Publicity.", False),
        ("7.2\tLiability Cap.", False),
        (None, False),
        ("\u201cAgreement\u201d", False),
        (None, True),
        (None, True),
        (None, False),
        (None, False),
    ]
    for b in blocks:
        if b.lead is not None:
            assert b.text.startswith(b.lead)


def test_emphasis_from_paragraph_style():
    # Heading 1 here is bold and caps through its style's run properties (§17.7.2).
    body = styled("Heading1", "Supply of Goods") + styled("Heading2", "Delivery")
    blocks, _ = _read(body, styles=STYLES)
    assert [(b.emphasised, b.all_caps) for b in blocks] == [(True, True), (True, False)]


def test_all_caps():
    body = (p(r("GOVERNING LAW")) + p(r("Governing law", "<w:caps/>"))
            + p(r("Governing Law")) + p(r("1.2.3")) + p(r("Small", "<w:smallCaps/>"))
            + p(r("ENTIRE "), r("agreement", "<w:caps/>")))
    blocks, _ = _read(body, styles=STYLES)
    assert [b.all_caps for b in blocks] == [True, True, False, False, True, True]


def test_paragraph_pieces_of_one_paragraph():
    doc = body_element(p(r("a"), f'<w:ins {A.format(1)}>{r("b")}</w:ins>',
                         "<w:r><w:tab/><w:t>c</w:t></w:r>"))
    para = next(iter_body_paragraphs(doc))
    pieces = paragraph_pieces(para)
    assert [piece.text for piece in pieces] == ["a", "b", "\t", "c"]
    assert all(isinstance(piece, TextPiece) for piece in pieces)
    assert pieces[2].element is pieces[3].element  # one run, two pieces
    assert pieces[2].node.tag == f"{{{W}}}tab"


# --------------------------------------------------------------------------------------
# Through a real package
# --------------------------------------------------------------------------------------


def test_read_docx_blocks_skips_headers_footers_and_notes(tmp_path):
    import docx

    path = build_docx(tmp_path / "h.docx", p(r("Body text.")) + p())
    document = docx.Document(path)
    document.sections[0].header.paragraphs[0].text = "Header words"
    document.sections[0].footer.paragraphs[0].text = "Footer words"
    document.save(path)
    blocks, warnings = read_docx_blocks(path)
    # python-docx's default template styles name the default paragraph style "Normal".
    assert [(b.text, b.style) for b in blocks] == [("Body text.", "Normal"), ("", "Normal")]
    assert warnings == ()


def test_heading_styles_from_a_word_style_sheet(tmp_path):
    # python-docx's template holds Word's own styles.xml: "heading 1" with w:outlineLvl 0.
    body = styled("Title", "Supply Agreement") + styled("Heading1", "Definitions") + styled(
        "Heading3", "Deep")
    blocks, _ = read_docx_blocks(build_docx(tmp_path / "s.docx", body))
    assert [(b.style, b.outline_level, b.emphasised) for b in blocks] == [
        ("Title", 0, False), ("Heading 1", 1, True), ("Heading 3", 3, True)]


@pytest.mark.parametrize("boxes", [0, 2])
def test_text_boxes_are_reported_not_read(boxes):
    box = ('<w:r><w:pict><v:shape xmlns:v="urn:schemas-microsoft-com:vml"><v:textbox>'
           '<w:txbxContent>' + p(r("In a box")) + "</w:txbxContent></v:textbox></v:shape>"
           "</w:pict></w:r>")
    blocks, warnings = _read(p(r("Main"), *([box] * boxes)))
    assert [b.text for b in blocks] == ["Main"]
    assert warnings == ((f"text in {boxes} text box(es) not read",) if boxes else ())


# --------------------------------------------------------------------------------------
# What LibreOffice shows, paragraph by paragraph: field results (§17.16), markup
# compatibility (ECMA-376 Part 3 §10.2), a second w:body
# --------------------------------------------------------------------------------------

MC_DECL = ('xmlns:mc="http://schemas.openxmlformats.org/markup-compatibility/2006" '
           'xmlns:w14="http://schemas.microsoft.com/office/word/2010/wordml"')


def _alternate(requires: str, choice: str, fallback: str, extra: str = "") -> str:
    return (f'<mc:AlternateContent {MC_DECL} {extra}><mc:Choice Requires="{requires}">{choice}'
            f"</mc:Choice><mc:Fallback>{fallback}</mc:Fallback></mc:AlternateContent>")


def _lo_texts(path) -> list[str]:
    from tests.support.lo_session import libreoffice

    out: list[str] = []
    for el in libreoffice().inspect(path).body:
        rows = el["paragraphs"] if el["type"] == "table" else [el]
        out.extend(p["text"] for p in rows)
    return out


def test_field_results_and_alternate_content_equal_libreoffice(tmp_path):
    """The text of every paragraph equals LibreOffice's: the visible result of simple and
    complex fields (a document property, a merge field, a text form field, a hyperlink, a
    quotation, a sequence number, one nested in another's result, one across paragraphs,
    one in a table cell), and the branch of mc:AlternateContent a consumer takes, in a
    paragraph, around paragraphs and in a run."""
    form = ('<w:r><w:fldChar w:fldCharType="begin"><w:ffData><w:name w:val="Days"/><w:enabled/>'
            "<w:textInput/></w:ffData></w:fldChar></w:r>")
    body = (
        p(r("Client: "), '<w:fldSimple w:instr=" DOCPROPERTY Client "><w:r><w:t>Hallowmere Ltd'
          "</w:t></w:r></w:fldSimple>", r("."))
        + p(r("Party: "), fld("begin"), instr(" MERGEFIELD Party "), fld("separate"), r("Tarrant Vale"),
            fld("end"))
        + p(r("Within "), form, instr(" FORMTEXT "), fld("separate"), r("forty-five"), fld("end"),
            r(" days."))
        + p(r("See "), fld("begin"), instr(' HYPERLINK "https://example.invalid/terms" '),
            fld("separate"), r("the Terms"), fld("end"), r("."))
        + p(r("Outer "), fld("begin"), instr(' QUOTE "x" '), fld("separate"), r("shown "),
            fld("begin"), instr(' QUOTE "inner" '), fld("separate"), r("inner"), fld("end"),
            fld("end"), r(" end"))
        + p(r("Table "), fld("begin"), instr(" SEQ Table \\* ARABIC "), fld("separate"), r("1"),
            fld("end"))
        + p(fld("begin"), instr(' QUOTE "two lines" '), fld("separate"), r("first line"))
        + p(r("second line"), fld("end"), r(" after"))
        + "<w:tbl><w:tr><w:tc>"
        + p(r("Cell "), fld("begin"), instr(' QUOTE "c"'), fld("separate"), r("cell result"), fld("end"))
        + "</w:tc></w:tr></w:tbl>"
        + p(r("Choice: "), _alternate("w14", r("the w14 branch"), r("the fallback")))
        + _alternate("w14", p(r("A paragraph in a w14 choice")), p(r("Its fallback")))
        + p(r("Unknown: "), _alternate("zz", r("not understood"), r("fallback read"),
                                       'xmlns:zz="urn:example:unknown"'))
        + p("<w:r><w:t xml:space=\"preserve\">Run </w:t>" + _alternate("zz", "<w:t>choice</w:t>", "<w:t>fallback</w:t>",
                                                 'xmlns:zz="urn:example:unknown"') + "</w:r>")
    )
    path = build_docx(tmp_path / "fields.docx", body)
    blocks, _ = read_docx_blocks(path)
    assert [b.text for b in blocks] == _lo_texts(path)  # LibreOffice's rendering
    assert blocks[2].text == "Within forty-five days."
    assert blocks[-1].text == "Run fallback"


def _rewrite_document(path, edit) -> None:
    import zipfile

    with zipfile.ZipFile(path) as zin:
        entries = [(info, zin.read(info)) for info in zin.infolist()]
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as zout:
        for info, data in entries:
            if info.filename == "word/document.xml":
                data = edit(data.decode("utf-8")).encode("utf-8")
            zout.writestr(info, data)


def test_a_second_body_is_read_as_libreoffice_shows_it(tmp_path):
    """ECMA-376 Part 1 §17.2.2 allows one w:body; LibreOffice shows a second one after the
    first, so its words are read too (nothing the other side sees is left out of the
    review), with a warning."""
    path = build_docx(tmp_path / "two.docx", p(r("First body words.")))
    _rewrite_document(path, lambda xml: xml.replace(
        "</w:body>", "</w:body><w:body>" + p(r("Second body words.")) + "</w:body>"))
    blocks, warnings = read_docx_blocks(path)
    assert [b.text for b in blocks] == _lo_texts(path) == ["First body words.",
                                                           "Second body words."]
    assert warnings == ("the document has 2 bodies (w:body; ECMA-376 allows one): all are read, "
                        "in order",)
    assert [b.index for b in blocks] == [0, 1]


def test_a_document_without_a_body_is_refused_in_one_line(tmp_path):
    from core.errors import CounterdraftError

    path = build_docx(tmp_path / "nobody.docx", p(r("Words.")))
    _rewrite_document(path, lambda xml: xml[:xml.index("<w:body>")] + "</w:document>")
    with pytest.raises(CounterdraftError) as err:
        read_docx_blocks(path)
    assert str(err.value) == f"{path}: no text to read: the main part word/document.xml has no body (w:body)"
    # The pure walker given such an element reads no paragraphs (no exception).
    empty = etree.fromstring(f"<w:document {W_DECL}/>")
    assert blocks_from_document(empty) == ((), ())
    assert list(iter_body_paragraphs(empty)) == []


@pytest.mark.parametrize("limit, body", [
    ("MAX_PARAGRAPHS", p(r("one")) * 6),
    ("MAX_RUNS", p(r("a"), r("b"), r("c")) + p(r("d"), r("e"), r("f"))),
])
def test_paragraph_and_run_counts_are_bounded(monkeypatch, limit, body):
    from core.docx import blocks as blocks_module
    from core.errors import CounterdraftError

    monkeypatch.setattr(blocks_module, limit, 5)
    with pytest.raises(CounterdraftError, match="the limit") as err:
        blocks_from_document(body_element(body), source="long.docx")
    assert str(err.value).startswith("long.docx: refused: the document has more than 5 ")
    monkeypatch.setattr(blocks_module, limit, 6)
    assert len(blocks_from_document(body_element(body))[0]) in (2, 6)


def test_the_paragraph_language_reaches_the_text_formats():
    # w:lang (§17.3.2.20) on the paragraph mark, else the style, else the document default.
    numbering = ('<w:abstractNum w:abstractNumId="1"><w:lvl w:ilvl="0"><w:start w:val="1"/>'
                 '<w:numFmt w:val="ordinalText"/><w:lvlText w:val="%1"/></w:lvl></w:abstractNum>'
                 '<w:num w:numId="1"><w:abstractNumId w:val="1"/></w:num>')
    numpr = '<w:numPr><w:ilvl w:val="0"/><w:numId w:val="1"/></w:numPr>'
    styles = ('<w:docDefaults><w:rPrDefault><w:rPr><w:lang w:val="de-DE"/></w:rPr></w:rPrDefault>'
              '</w:docDefaults><w:style w:type="paragraph" w:styleId="Fr"><w:name w:val="Fr"/>'
              '<w:rPr><w:lang w:val="fr-FR"/></w:rPr></w:style>')
    body = (p(r("x"), ppr=numpr) + p(r("x"), ppr='<w:pStyle w:val="Fr"/>' + numpr)
            + p(r("x"), ppr=numpr + '<w:rPr><w:lang w:val="ru-RU"/></w:rPr>'))
    blocks, _ = _read(body, styles=styles, numbering=numbering)
    assert [b.label for b in blocks] == ["Erste", "Deuxième", "Третий"]
