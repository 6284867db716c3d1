"""Auto-number labels (core.docx.numbering) against outside references.

* LibreOffice as reference: the labels LibreOffice renders for the same .docx
  (``soffice --convert-to txt``, one run per module) must equal ours, paragraph by paragraph.
* ECMA-376 Part 1 §17.9 (Numbering) for what the LibreOffice 7.4 on Debian does not
  implement: ``w:isLgl`` (§17.9.4; LibreOffice gained "legal numbering" for DOCX in 24.2),
  ``w:lvlRestart`` (§17.9.10) and the level a ``w:lvl/w:pStyle`` links to a style (§17.9.23).
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import pytest
from lxml import etree

from core.docx.blocks import blocks_from_document, read_docx_blocks
from core.docx.numbering import (
    MAX_LIST_START,
    MAX_NUMBERING_ENTRIES,
    ListCounter,
    decimal_number,
    format_number,
    parse_numbering,
)
from core.docx.styles import parse_styles
from tests.support.docx_fixtures import W_DECL, body_element, build_docx
from tests.support.libreoffice import docx_to_text, soffice_version

# --------------------------------------------------------------------------------------
# The reference document
# --------------------------------------------------------------------------------------


def _lvl(ilvl: int, fmt: str, text: str, *, start: int = 1, extra: str = "") -> str:
    """A w:lvl in CT_Lvl element order (§17.9.6): start, numFmt, lvlRestart, pStyle, isLgl,
    suff, lvlText."""
    return (f'<w:lvl w:ilvl="{ilvl}"><w:start w:val="{start}"/><w:numFmt w:val="{fmt}"/>'
            f'{extra}<w:lvlText w:val="{text}"/></w:lvl>')


NUMBERING = (
    # 1: a contract's clause list over all nine levels and many formats.
    '<w:abstractNum w:abstractNumId="1">'
    + _lvl(0, "decimal", "%1.")
    + _lvl(1, "decimal", "%1.%2.")
    + _lvl(2, "lowerLetter", "(%3)")
    + _lvl(3, "lowerRoman", "(%4)")
    + _lvl(4, "upperLetter", "%5.")
    + _lvl(5, "upperRoman", "%6)")
    + _lvl(6, "decimalZero", "%7.")
    + _lvl(7, "ordinal", "%8")
    + _lvl(8, "cardinalText", "%9:")
    + "</w:abstractNum>"
    # 2: articles linked to the Heading 1-3 styles; level 1 is "legal" (isLgl).
    + '<w:abstractNum w:abstractNumId="2">'
    + _lvl(0, "upperRoman", "Article %1", extra='<w:pStyle w:val="Heading1"/>')
    + _lvl(1, "decimal", "%1.%2", extra='<w:pStyle w:val="Heading2"/><w:isLgl/>')
    + _lvl(2, "lowerLetter", "(%3)", extra='<w:pStyle w:val="Heading3"/>')
    + "</w:abstractNum>"
    # 3 uses the levels of 4 through the numbering style "LegalList" (§17.9.21 numStyleLink).
    + '<w:abstractNum w:abstractNumId="3"><w:numStyleLink w:val="LegalList"/></w:abstractNum>'
    + '<w:abstractNum w:abstractNumId="4"><w:styleLink w:val="LegalList"/>'
    + _lvl(0, "upperLetter", "%1.")
    + _lvl(1, "lowerRoman", "%1.%2")
    + "</w:abstractNum>"
    # 5: decimalZero from 8, spelled ordinals below it.
    + '<w:abstractNum w:abstractNumId="5">'
    + _lvl(0, "decimalZero", "%1.", start=8)
    + _lvl(1, "ordinalText", "%2 part", start=19)
    + "</w:abstractNum>"
    # 6: bullets with a numbered level below.
    + '<w:abstractNum w:abstractNumId="6">'
    + _lvl(0, "bullet", "\u2022")
    + _lvl(1, "decimal", "%2.")
    + "</w:abstractNum>"
    + '<w:num w:numId="1"><w:abstractNumId w:val="1"/></w:num>'
    # 2 restarts list 1 (the way Word stores "restart numbering", §17.9.27).
    + '<w:num w:numId="2"><w:abstractNumId w:val="1"/>'
    '<w:lvlOverride w:ilvl="0"><w:startOverride w:val="1"/></w:lvlOverride></w:num>'
    # 3 shares list 1 without overrides: it continues the same counters.
    + '<w:num w:numId="3"><w:abstractNumId w:val="1"/></w:num>'
    + '<w:num w:numId="4"><w:abstractNumId w:val="2"/></w:num>'
    + '<w:num w:numId="5"><w:abstractNumId w:val="3"/></w:num>'
    + '<w:num w:numId="6"><w:abstractNumId w:val="4"/></w:num>'
    + '<w:num w:numId="7"><w:abstractNumId w:val="5"/></w:num>'
    + '<w:num w:numId="8"><w:abstractNumId w:val="6"/></w:num>'
)

#: The numbering style that abstractNum 3 links to (§17.7.4.17 numbering styles).
EXTRA_STYLES = (
    '<w:style w:type="numbering" w:styleId="LegalList"><w:name w:val="Legal List"/>'
    '<w:pPr><w:numPr><w:numId w:val="6"/></w:numPr></w:pPr></w:style>'
)

#: Heading styles carry the numbering, with w:ilvl as Word writes it (level 0 without ilvl).
STYLE_NUMBERING = {"Heading1": ("4", None), "Heading2": ("4", 1), "Heading3": ("4", 2)}


@dataclass(frozen=True)
class P:
    text: str
    num: int | None = None
    ilvl: int | None = None
    style: str | None = None


def _sequence() -> list[P]:
    seq: list[P] = [P("Numbering reference document")]
    n = 0

    def add(num: int | None, ilvl: int | None, count: int = 1, style: str | None = None) -> None:
        nonlocal n
        for _ in range(count):
            n += 1
            seq.append(P(f"Paragraph {n} reads", num, ilvl, style))

    add(1, 0, 2)
    add(1, 1, 3)
    add(1, 2, 3)
    add(1, 3, 4)
    add(1, 4, 2)
    add(1, 5, 4)
    add(1, 6, 3)
    add(1, 7, 3)
    add(1, 8, 2)
    add(1, 2, 1)
    add(1, 1, 1)
    add(1, 0, 1)
    add(1, 2, 2)  # level 2 straight under level 0
    add(None, None, 1, "Heading1")
    add(None, None, 2, "Heading2")
    add(None, None, 3, "Heading3")
    add(None, None, 1, "Heading2")
    add(None, None, 1, "Heading1")
    add(None, None, 1, "Heading3")  # under an article with no section yet
    add(None, None, 1, "Heading2")
    add(2, 0, 2)  # restarted list
    add(2, 1, 2)
    add(3, 0, 1)  # continues the shared counters
    add(None, None, 1)  # plain paragraph between lists
    add(5, 0, 2)
    add(5, 1, 2)
    add(6, 0, 1)  # same list as numId 5 through the style link
    add(7, 0, 3)
    add(7, 1, 3)
    add(8, 0, 1)
    add(8, 1, 2)
    add(8, 0, 1)
    add(8, 1, 1)
    add(None, None, 1, "Heading1")
    return seq


def _paragraph_xml(p: P) -> str:
    ppr = ""
    if p.style:
        ppr += f'<w:pStyle w:val="{p.style}"/>'
    if p.num is not None:
        ppr += f'<w:numPr><w:ilvl w:val="{p.ilvl}"/><w:numId w:val="{p.num}"/></w:numPr>'
    return f"<w:p>{f'<w:pPr>{ppr}</w:pPr>' if ppr else ''}<w:r><w:t>{p.text}</w:t></w:r></w:p>"


SEQUENCE = _sequence()


def _build(path, *, legal: bool) -> str:
    numbering = NUMBERING if legal else NUMBERING.replace("<w:isLgl/>", "")
    return build_docx(path, "".join(_paragraph_xml(p) for p in SEQUENCE),
                      numbering=numbering, style_numbering=STYLE_NUMBERING,
                      extra_styles=EXTRA_STYLES)


@dataclass(frozen=True)
class Rendered:
    label: str | None
    indent: int  # leading spaces


def _parse_libreoffice(text: str) -> dict[str, Rendered]:
    """Paragraph text -> what LibreOffice shows before it (4 spaces per level, label, one
    space, text)."""
    out: dict[str, Rendered] = {}
    for line in text.splitlines():
        stripped = line.lstrip(" ")
        indent = len(line) - len(stripped)
        m = re.search(r"(Paragraph \d+ reads|Numbering reference document)$", stripped)
        if m is None:
            continue
        label = stripped[: m.start()]
        if label:
            assert label.endswith(" "), line  # one space after the label
            label = label[:-1]
        out[m.group(1)] = Rendered(label or None, indent)
    return out


@pytest.fixture(scope="module")
def reference(tmp_path_factory):
    folder = tmp_path_factory.mktemp("numbering")
    legal = _build(folder / "reference.docx", legal=True)
    plain = _build(folder / "reference_plain.docx", legal=False)
    lo = _parse_libreoffice(docx_to_text(legal))  # LibreOffice as reference
    ours = {b.text: b for b in read_docx_blocks(legal)[0]}
    ours_plain = {b.text: b for b in read_docx_blocks(plain)[0]}
    return lo, ours, ours_plain, soffice_version()


def _legal_levels() -> set[str]:
    return {p.text for p in SEQUENCE if p.style == "Heading2"}


def test_every_paragraph_reaches_libreoffice_and_us(reference):
    lo, ours, _, _ = reference
    assert set(lo) == {p.text for p in SEQUENCE}
    assert set(ours) == set(lo)


def test_labels_equal_libreoffice(reference):
    """LibreOffice as reference (ECMA-376 Part 1 §17.9): same label for every paragraph.

    LibreOffice before 24.2 ignores w:isLgl, so for the isLgl level its label is compared with
    ours read from the same document without isLgl."""
    lo, ours, ours_plain, version = reference
    legal_supported = version >= (24, 2)
    mismatches = []
    for p in SEQUENCE:
        block = ours[p.text]
        if p.text in _legal_levels() and not legal_supported:
            block = ours_plain[p.text]
        want = lo[p.text].label
        got = "\u2022" if block.bullet else block.label
        if got != want:
            mismatches.append((p.text, want, got))
    assert mismatches == []
    # The document exercises what the task names: restart, romans, letters, decimalZero...
    shown = {lo[p.text].label for p in SEQUENCE}
    for expected in ("1.", "2.1.", "(c)", "(iv)", "B.", "IV)", "03.", "3rd", "Two:",
                     "Article II", "(b)", "B.ii", "08.", "Twentieth part", "\u2022"):
        assert expected in shown


def test_list_levels_equal_libreoffice_indent(reference):
    """LibreOffice writes 4 spaces of indent per list level (w:ilvl + 1) for paragraphs with
    their own w:numPr.  (It writes heading-style numbering, which it turns into its outline
    numbering, without indent, so those are left out.)"""
    lo, ours, _, _ = reference
    checked = 0
    for p in SEQUENCE:
        if p.style is not None:
            continue
        checked += 1
        block = ours[p.text]
        expected = 0 if block.list_level is None else 4 * (block.list_level + 1)
        assert lo[p.text].indent == expected, p.text
    assert checked > 40


def _roman_to_int(s: str) -> int:
    values = {"I": 1, "V": 5, "X": 10, "L": 50, "C": 100, "D": 500, "M": 1000}
    total = 0
    for a, b in zip(s, s[1:] + " "):
        v = values[a]
        total += -v if b != " " and values[b] > v else v
    return total


def test_is_lgl_shows_higher_levels_in_decimal(reference):
    """ECMA-376 Part 1 §17.9.4 (isLgl): the higher levels' numbers in the level text are shown
    in decimal ("II.1" becomes "2.1").  LibreOffice >= 24.2 is compared directly."""
    lo, ours, _, version = reference
    checked = 0
    for text in _legal_levels():
        shown = lo[text].label
        assert shown is not None
        if version >= (24, 2):
            expected = shown
        else:
            roman, _, section = shown.partition(".")
            expected = f"{_roman_to_int(roman)}.{section}"
        assert ours[text].label == expected
        checked += 1
    assert checked == 4


# --------------------------------------------------------------------------------------
# ECMA-376 rules LibreOffice 7.4 does not implement, checked against the standard's text
# --------------------------------------------------------------------------------------


def _labels(numbering: str, paragraphs: str, styles: str | None = None) -> list[str | None]:
    sheet = parse_styles(etree.fromstring(f"<w:styles {W_DECL}>{styles}</w:styles>")
                         if styles else None)
    defs = parse_numbering(etree.fromstring(f"<w:numbering {W_DECL}>{numbering}</w:numbering>"),
                           styles=sheet)
    blocks, _ = blocks_from_document(body_element(paragraphs), styles=sheet, numbering=defs)
    return [b.label for b in blocks]


def _np(num: int, ilvl: int) -> str:
    return f'<w:p><w:pPr><w:numPr><w:ilvl w:val="{ilvl}"/><w:numId w:val="{num}"/></w:numPr></w:pPr></w:p>'


def test_lvl_restart():
    """§17.9.10 lvlRestart: the level restarts after the given 1-based level is used; 0 means
    it never restarts; without it, any higher level restarts it."""
    numbering = (
        '<w:abstractNum w:abstractNumId="1">'
        + _lvl(0, "decimal", "%1.")
        + _lvl(1, "decimal", "%1.%2")
        + _lvl(2, "lowerLetter", "(%3)", extra='<w:lvlRestart w:val="1"/>')
        + _lvl(3, "lowerRoman", "(%4)", extra='<w:lvlRestart w:val="0"/>')
        + "</w:abstractNum>"
        '<w:num w:numId="1"><w:abstractNumId w:val="1"/></w:num>'
    )
    paras = [(0,), (1,), (2,), (3,), (1,), (2,), (3,), (0,), (2,), (3,)]
    labels = _labels(numbering, "".join(_np(1, i[0]) for i in paras))
    # level 2 restarts only after level 1 (index 0): "(b)" continues past "1.2";
    # level 3 never restarts: "(ii)", "(iii)".
    assert labels == ["1.", "1.1", "(a)", "(i)", "1.2", "(b)", "(ii)", "2.", "(a)", "(iii)"]


def test_style_linked_level():
    """§17.9.23 (w:lvl/w:pStyle): a paragraph style linked to a level is numbered at that
    level even when the style's w:numPr names no w:ilvl.  (LibreOffice 7.4 uses level 0.)"""
    numbering = (
        '<w:abstractNum w:abstractNumId="1">'
        + _lvl(0, "decimal", "%1.", extra='<w:pStyle w:val="H1"/>')
        + _lvl(1, "decimal", "%1.%2", extra='<w:pStyle w:val="H2"/>')
        + "</w:abstractNum>"
        '<w:num w:numId="5"><w:abstractNumId w:val="1"/></w:num>'
    )
    styles = (
        '<w:style w:type="paragraph" w:styleId="H1"><w:name w:val="heading 1"/>'
        '<w:pPr><w:numPr><w:numId w:val="5"/></w:numPr></w:pPr></w:style>'
        '<w:style w:type="paragraph" w:styleId="H2"><w:name w:val="heading 2"/>'
        '<w:basedOn w:val="H1"/><w:pPr><w:outlineLvl w:val="1"/></w:pPr></w:style>'
    )
    paras = "".join(f'<w:p><w:pPr><w:pStyle w:val="{s}"/></w:pPr></w:p>'
                    for s in ("H1", "H2", "H2", "H1", "H2"))
    assert _labels(numbering, paras, styles) == ["1.", "1.1", "1.2", "2.", "2.1"]


def test_num_id_zero_removes_style_numbering():
    """§17.9.18 (numId): the value 0 removes the numbering a style would give."""
    numbering = ('<w:abstractNum w:abstractNumId="1">' + _lvl(0, "decimal", "%1.")
                 + '</w:abstractNum><w:num w:numId="2"><w:abstractNumId w:val="1"/></w:num>')
    styles = ('<w:style w:type="paragraph" w:styleId="N"><w:name w:val="Numbered"/>'
              '<w:pPr><w:numPr><w:ilvl w:val="0"/><w:numId w:val="2"/></w:numPr></w:pPr></w:style>')
    paras = ('<w:p><w:pPr><w:pStyle w:val="N"/></w:pPr></w:p>'
             '<w:p><w:pPr><w:pStyle w:val="N"/><w:numPr><w:numId w:val="0"/></w:numPr></w:pPr></w:p>'
             '<w:p><w:pPr><w:pStyle w:val="N"/></w:pPr></w:p>')
    assert _labels(numbering, paras, styles) == ["1.", None, "2."]


def test_lvl_override_replaces_the_level():
    """§17.9.8 (lvlOverride/lvl): a w:num may replace a whole level of its abstract
    definition; other w:num of the same definition keep the original level."""
    numbering = (
        '<w:abstractNum w:abstractNumId="1">' + _lvl(0, "decimal", "%1.") + "</w:abstractNum>"
        '<w:num w:numId="1"><w:abstractNumId w:val="1"/></w:num>'
        '<w:num w:numId="2"><w:abstractNumId w:val="1"/><w:lvlOverride w:ilvl="0">'
        + _lvl(0, "upperLetter", "Part %1", start=3) + "</w:lvlOverride></w:num>"
    )
    assert _labels(numbering, _np(1, 0) + _np(1, 0) + _np(2, 0)) == ["1.", "2.", "Part C"]


def test_level_without_start_counts_from_zero():
    """§17.9.25 (start): when w:start is omitted the first number is 0."""
    numbering = ('<w:abstractNum w:abstractNumId="1"><w:lvl w:ilvl="0"><w:numFmt w:val="decimal"/>'
                 '<w:lvlText w:val="%1)"/></w:lvl></w:abstractNum>'
                 '<w:num w:numId="1"><w:abstractNumId w:val="1"/></w:num>')
    assert _labels(numbering, _np(1, 0) * 2) == ["0)", "1)"]


def test_unknown_num_id_and_missing_level_are_not_numbered():
    numbering = ('<w:abstractNum w:abstractNumId="1">' + _lvl(0, "decimal", "%1.")
                 + '</w:abstractNum><w:num w:numId="1"><w:abstractNumId w:val="1"/></w:num>')
    assert _labels(numbering, _np(9, 0) + _np(1, 4) + _np(1, 0)) == [None, None, "1."]


@pytest.mark.parametrize(
    ("fmt", "values", "expected"),
    [
        # ECMA-376 Part 1 §17.18.59 ST_NumberFormat; the spellings of letters past "z" and of
        # the text formats are LibreOffice's (checked in the reference document above).
        ("decimal", [1, 9, 10, 123], ["1", "9", "10", "123"]),
        ("decimalZero", [1, 9, 10, 123], ["01", "09", "10", "123"]),
        ("lowerLetter", [1, 26, 27, 28, 53], ["a", "z", "aa", "bb", "aaa"]),
        ("upperLetter", [1, 26, 27], ["A", "Z", "AA"]),
        ("lowerRoman", [1, 4, 9, 14, 40, 90, 400, 1994], ["i", "iv", "ix", "xiv", "xl", "xc",
                                                           "cd", "mcmxciv"]),
        ("upperRoman", [3, 2024], ["III", "MMXXIV"]),
        ("ordinal", [1, 2, 3, 4, 11, 12, 13, 21, 102], ["1st", "2nd", "3rd", "4th", "11th",
                                                        "12th", "13th", "21st", "102nd"]),
        ("cardinalText", [1, 21, 100, 101, 1001], ["One", "Twenty-one", "One hundred",
                                                   "One hundred one", "One thousand and one"]),
        ("ordinalText", [1, 2, 3, 12, 20, 21, 100], ["First", "Second", "Third", "Twelfth",
                                                     "Twentieth", "Twenty-first",
                                                     "One hundredth"]),
        ("none", [5], [""]),
    ],
)
def test_format_number(fmt, values, expected):
    assert [format_number(v, fmt) for v in values] == expected


def test_counter_is_per_abstract_definition():
    """Two w:num without overrides on one w:abstractNum continue one list (§17.9.15); a
    w:startOverride restarts it once, on first use of its w:num (§17.9.27)."""
    numbering = etree.fromstring(
        f"<w:numbering {W_DECL}>"
        '<w:abstractNum w:abstractNumId="7">' + _lvl(0, "decimal", "%1.") + "</w:abstractNum>"
        '<w:num w:numId="1"><w:abstractNumId w:val="7"/></w:num>'
        '<w:num w:numId="2"><w:abstractNumId w:val="7"/></w:num>'
        '<w:num w:numId="3"><w:abstractNumId w:val="7"/>'
        '<w:lvlOverride w:ilvl="0"><w:startOverride w:val="5"/></w:lvlOverride></w:num>'
        "</w:numbering>"
    )
    counter = ListCounter(parse_numbering(numbering))
    shown = [counter.advance(n, 0) for n in ("1", "2", "3", "3", "1")]
    assert [s.text for s in shown] == ["1.", "2.", "5.", "6.", "7."]
    assert {s.list_id for s in shown} == {"7"}


# --------------------------------------------------------------------------------------
# Bounds: every number from numbering.xml is an ST_DecimalNumber (§17.18.10) within a limit
# --------------------------------------------------------------------------------------


def _list_docx(path, *, start: str = "1", fmt: str = "decimal", override: str | None = None,
               text: str = "%1.") -> str:
    over = (f'<w:lvlOverride w:ilvl="0"><w:startOverride w:val="{override}"/></w:lvlOverride>'
            if override is not None else "")
    numbering = ('<w:abstractNum w:abstractNumId="1"><w:lvl w:ilvl="0">'
                 f'<w:start w:val="{start}"/><w:numFmt w:val="{fmt}"/>'
                 f'<w:lvlText w:val="{text}"/></w:lvl></w:abstractNum>'
                 f'<w:num w:numId="1"><w:abstractNumId w:val="1"/>{over}</w:num>')
    return build_docx(path, _np(1, 0).replace("</w:p>", "<w:r><w:t>Item</w:t></w:r></w:p>") * 2,
                      numbering=numbering)


@pytest.mark.parametrize("kwargs", [
    {"start": str(10**30)},  # was OverflowError
    {"start": str(10**12)},  # was MemoryError
    {"start": "2147483647", "fmt": "upperLetter"},  # was minutes and 7.6 GB
    {"start": "-5"},
    {"start": "32768"},
    {"override": "2147483647", "fmt": "upperLetter"},
    {"text": "%1" * 1000},
])
def test_numbers_beyond_the_limits_are_refused_in_one_line(tmp_path, kwargs):
    from core.errors import CounterdraftError

    path = _list_docx(tmp_path / "bad.docx", **kwargs)
    with pytest.raises(CounterdraftError) as err:
        read_docx_blocks(path)
    message = str(err.value)
    assert "\n" not in message and message.startswith(str(path))
    assert "limit" in message
    assert len(message) < 300


def test_the_largest_start_gives_the_label_libreoffice_shows(tmp_path):
    """MAX_LIST_START (32767) is the largest start LibreOffice 7.4 keeps; its upper-letter
    label there is 1261 letters, computed by arithmetic: LibreOffice's rendering."""
    from tests.support.lo_session import libreoffice

    path = _list_docx(tmp_path / "big.docx", start=str(MAX_LIST_START), fmt="upperLetter",
                      text="%1")
    lo = [el["label"] for el in libreoffice().inspect(path).body if el["type"] == "paragraph"]
    ours = [b.label for b in read_docx_blocks(path)[0]]
    assert ours == lo
    assert len(ours[0]) == 1261 and len(ours[1]) == 1261


@pytest.mark.parametrize("raw, value", [
    ("7", 7), (" +7 ", 7), ("007", 7), ("-3", -3),
    ("1_000", None), ("\u0663", None), ("7.0", None), ("", None), ("1e3", None),
    ("9" * 5000, 10**19), ("-" + "9" * 40, -10**19),  # never converted: beyond every limit
])
def test_decimal_numbers_are_read_strictly(raw, value):
    # ECMA-376 Part 1 §17.18.10 ST_DecimalNumber: an XML Schema integer (optional sign,
    # ASCII digits; XML Schema Part 2 §3.3.13), white space collapsed.  Python's int()
    # would accept "1_000" and Arabic-Indic digits.
    assert decimal_number(raw) == value


def test_ids_compare_as_numbers_and_bad_values_count_as_absent():
    # numId "007" names w:num 7 (both are ST_DecimalNumber); a start that is not a number
    # is absent, so the level starts at 0 (§17.9.25).
    numbering = ('<w:abstractNum w:abstractNumId="01"><w:lvl w:ilvl="0"><w:start w:val="1_0"/>'
                 '<w:numFmt w:val="decimal"/><w:lvlText w:val="%1."/></w:lvl></w:abstractNum>'
                 '<w:num w:numId="7"><w:abstractNumId w:val="1"/></w:num>')
    paras = ('<w:p><w:pPr><w:numPr><w:ilvl w:val="0"/><w:numId w:val="007"/></w:numPr></w:pPr></w:p>'
             '<w:p><w:pPr><w:numPr><w:ilvl w:val="x"/><w:numId w:val="7"/></w:numPr></w:pPr></w:p>')
    assert _labels(numbering, paras) == ["0.", "1."]


def test_too_many_list_definitions_are_refused():
    from core.errors import CounterdraftError

    nums = '<w:num w:numId="1"><w:abstractNumId w:val="1"/></w:num>' * (MAX_NUMBERING_ENTRIES + 1)
    root = etree.fromstring(f"<w:numbering {W_DECL}>{nums}</w:numbering>")
    with pytest.raises(CounterdraftError, match=f"limit is {MAX_NUMBERING_ENTRIES}") as err:
        parse_numbering(root, source="many.docx")
    assert str(err.value).startswith("many.docx: ")


def test_a_refused_file_does_not_stop_a_library_build(tmp_path):
    """One precedent with an absurd list start is reported as a failure; the build goes on."""
    from core.library.index import build_library

    folder = tmp_path / "precedents"
    folder.mkdir()
    _list_docx(folder / "absurd.docx", start="2147483647", fmt="upperLetter")
    report = build_library(folder, vocabulary=False, workers=1)
    problems = {f.path: f.problem for f in report.failures}
    assert set(problems) == {"absurd.docx"}
    assert "limit is 0 to 32767" in problems["absurd.docx"]


# --------------------------------------------------------------------------------------
# Lists inside table cells: LibreOffice's rendering
# --------------------------------------------------------------------------------------


def test_lists_in_table_cells_equal_libreoffice(tmp_path):
    """A clause list that runs through a table (its items in cells, nested table included),
    a list of its own inside a cell, and typed "1." text in a cell (not a list): the labels
    of every paragraph, in and out of tables, equal LibreOffice's."""
    from tests.support.lo_session import libreoffice

    numbering = (
        '<w:abstractNum w:abstractNumId="1">' + _lvl(0, "decimal", "%1.")
        + _lvl(1, "lowerLetter", "(%2)") + _lvl(2, "lowerRoman", "(%3)") + "</w:abstractNum>"
        '<w:abstractNum w:abstractNumId="2">' + _lvl(0, "upperLetter", "%1)") + "</w:abstractNum>"
        '<w:num w:numId="1"><w:abstractNumId w:val="1"/></w:num>'
        '<w:num w:numId="2"><w:abstractNumId w:val="2"/></w:num>'
    )

    def item(num: int, ilvl: int, text: str) -> str:
        return _np(num, ilvl).replace("</w:p>", f"<w:r><w:t>{text}</w:t></w:r></w:p>")

    def cell(*content: str) -> str:
        return f"<w:tc>{''.join(content)}</w:tc>"

    nested = f"<w:tbl><w:tr>{cell(item(1, 2, 'nested roman'))}</w:tr></w:tbl>"
    body = (
        item(1, 0, "Clause before the table")
        + "<w:tbl>"
        + f"<w:tr>{cell(item(1, 1, 'cell letter a'), item(1, 1, 'cell letter b'))}"
        + f"{cell(item(2, 0, 'own list A'), item(2, 0, 'own list B'))}</w:tr>"
        + f"<w:tr>{cell(nested, item(1, 2, 'after nested'))}"
        + f"{cell('<w:p><w:r><w:t>1. typed in a cell</w:t></w:r></w:p>', item(1, 0, 'cell clause'))}</w:tr>"
        + "</w:tbl>"
        + item(1, 0, "Clause after the table") + item(1, 1, "its letter")
    )
    path = build_docx(tmp_path / "cells.docx", body, numbering=numbering)
    view = libreoffice().inspect(path)
    lo: list[tuple[str, str | None]] = []
    for el in view.body:
        rows = el["paragraphs"] if el["type"] == "table" else [el]
        lo.extend((p["text"], p["label"]) for p in rows)
    blocks = read_docx_blocks(path)[0]
    assert [(b.text, b.label) for b in blocks] == lo
    in_table = [b for b in blocks if b.in_table and b.label]
    assert len(in_table) == 7
