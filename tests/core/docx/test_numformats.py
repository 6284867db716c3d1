"""Number formats (core.docx.numformats) against outside references.

* LibreOffice's rendering (Debian's LibreOffice 7.4 over UNO, ``ListLabelString``): one
  document numbers a paragraph in every ST_NumberFormat value (ECMA-376 Part 1 §17.18.59)
  at many values, and our labels, read from the same file, must equal LibreOffice's.
* For the formats LibreOffice 7.4 shows in plain decimal although the standard names them
  as something else, the check is against the standard's name of the format and Unicode's
  character database (``unicodedata``) for the characters it implies; that LibreOffice shows
  decimal there is asserted too, so the exception stays true.
* The text formats in French, German and Russian (the document's ``w:lang``): LibreOffice.
* The ``custom`` format Word 2010 writes inside ``mc:AlternateContent`` (``w:format``
  "001, 002, 003, ..."): LibreOffice; its "01, 02, ..." form, which LibreOffice 7.4 shows in
  decimal, against XSLT 1.0 §7.7.1 (the format-token syntax ``w:format`` refers to).
"""

from __future__ import annotations

import unicodedata

import pytest

from core.docx.blocks import read_docx_blocks
from core.docx.numformats import MAX_REPEATED_CHARS, NUMBER_FORMATS, format_number
from tests.support.docx_fixtures import build_docx
from tests.support.lo_session import libreoffice

#: Values every format is rendered at: the first sixty (letter and syllable lists wrap
#: within them), and larger ones up to the largest list start accepted.
VALUES = tuple(range(1, 61)) + (99, 100, 101, 110, 111, 256, 999, 1000, 1001, 1024, 4000,
                                 9999, 10000, 10001, 12345, 32767)

#: Formats LibreOffice 7.4 shows in plain decimal.  ECMA-376 §17.18.59 names them otherwise;
#: each is checked against that name below.
LO_SHOWS_DECIMAL = frozenset({
    "hex", "decimalFullWidth", "decimalFullWidth2", "decimalEnclosedFullstop",
    "decimalEnclosedParen", "numberInDash", "hindiNumbers", "thaiNumbers", "taiwaneseDigital",
    "japaneseDigitalTenThousand", "ideographZodiacTraditional",
})
#: Formats neither source spells (words in Hindi, Thai, Vietnamese, baht and dollar amounts,
#: Hindi consonant numbering): LibreOffice 7.4 shows decimal and so do we.
DECIMAL_BOTH = frozenset({"hindiConsonants", "hindiCounting", "thaiCounting", "vietnameseCounting",
                          "bahtText", "dollarText", "decimalHalfWidth"})


def _numbered_document(path, formats, values, *, lang=None, level_extra=""):
    """One abstract numbering per format, one w:num per value (w:startOverride, §17.9.27),
    one paragraph per (format, value) whose text names both."""
    numbering = []
    body = []
    n = 0
    for a, fmt in enumerate(formats, 1):
        num_fmt = level_extra or f'<w:numFmt w:val="{fmt}"/>'
        numbering.append(f'<w:abstractNum w:abstractNumId="{a}"><w:lvl w:ilvl="0">'
                         f'<w:start w:val="1"/>{num_fmt}'
                         '<w:lvlText w:val="%1"/></w:lvl></w:abstractNum>')
    for a, fmt in enumerate(formats, 1):
        for value in values:
            n += 1
            numbering.append(f'<w:num w:numId="{n}"><w:abstractNumId w:val="{a}"/>'
                             f'<w:lvlOverride w:ilvl="0"><w:startOverride w:val="{value}"/>'
                             "</w:lvlOverride></w:num>")
            body.append(f'<w:p><w:pPr><w:numPr><w:ilvl w:val="0"/><w:numId w:val="{n}"/>'
                        f"</w:numPr></w:pPr><w:r><w:t>{fmt} {value}</w:t></w:r></w:p>")
    return build_docx(path, "".join(body), numbering="".join(numbering), default_lang=lang)


def _labels(path):
    """{(format, value): (LibreOffice's label, ours)} for the document at *path*."""
    view = libreoffice().inspect(path)
    lo = {el["text"]: el["label"] for el in view.body if el["type"] == "paragraph" and el["text"]}
    ours = {b.text: b.label for b in read_docx_blocks(path)[0] if b.text}
    assert set(lo) == set(ours)
    out = {}
    for text, label in lo.items():
        fmt, value = text.split()
        out[fmt, int(value)] = (label, ours[text])
    return out


@pytest.fixture(scope="module")
def every_format(tmp_path_factory):
    path = tmp_path_factory.mktemp("formats") / "formats.docx"
    formats = [f for f in NUMBER_FORMATS if f != "custom"]
    return _labels(_numbered_document(path, formats, VALUES))


def test_the_document_covers_every_format(every_format):
    # ECMA-376 Part 1 §17.18.59 lists 63 values; "custom" is tested with its w:format below.
    assert len(NUMBER_FORMATS) == 63 == len(set(NUMBER_FORMATS))
    assert {fmt for fmt, _ in every_format} == set(NUMBER_FORMATS) - {"custom"}


def test_labels_equal_libreoffice(every_format):
    """LibreOffice's rendering: every format LibreOffice implements, at every value."""
    mismatches = [(fmt, value, lo, ours) for (fmt, value), (lo, ours) in every_format.items()
                  if fmt not in LO_SHOWS_DECIMAL and lo != ours
                  and not (lo is not None and len(lo) > MAX_REPEATED_CHARS and ours == str(value))]
    assert mismatches == []
    # Our one deliberate difference: a symbol repeated thousands of times (chicago "‡‡‡..."
    # at 9999) shows in decimal; a label is never longer than MAX_REPEATED_CHARS.
    long_labels = [(fmt, value) for (fmt, value), (lo, _) in every_format.items()
                   if lo is not None and len(lo) > MAX_REPEATED_CHARS]
    assert long_labels and {fmt for fmt, _ in long_labels} == {"chicago"}
    checked = {fmt for fmt, _ in every_format} - LO_SHOWS_DECIMAL
    assert len(checked) == 51
    # Not decimal in disguise: the localized lists show their own scripts.
    shown = {every_format[fmt, 12345][1] for fmt in ("chineseCounting", "koreanCounting",
                                                     "japaneseLegal", "hebrew1", "russianLower")}
    assert shown == {"一万二千三百四十五", "만이천삼백사십오", "壱萬弐参四伍", "יב שמה", "оуф"}


def test_where_libreoffice_shows_decimal_the_standard_is_followed(every_format):
    """ECMA-376 §17.18.59 names these formats; Unicode's database gives their characters."""
    for (fmt, value), (lo, ours) in every_format.items():
        if fmt not in LO_SHOWS_DECIMAL:
            continue
        assert lo == str(value), (fmt, value)  # LibreOffice 7.4's known gap
        if fmt == "hex":  # "Hexadecimal Numbering"
            assert int(ours, 16) == value
        elif fmt in ("decimalFullWidth", "decimalFullWidth2"):  # "Double Byte Arabic Numerals"
            assert unicodedata.normalize("NFKC", ours) == str(value)
            assert {unicodedata.east_asian_width(ch) for ch in ours} == {"F"}
        elif fmt in ("decimalEnclosedFullstop", "decimalEnclosedParen"):
            # "Decimal Numbers Followed by a Period" / "... Enclosed in Parenthesis": Unicode
            # has them for 1-20; above, decimal.
            if value > 20:
                assert ours == str(value)
                continue
            kind = "DIGIT" if value <= 9 else "NUMBER"
            expected = (f"{kind} {_english(value)} FULL STOP" if fmt == "decimalEnclosedFullstop"
                        else f"PARENTHESIZED {kind} {_english(value)}")
            assert unicodedata.name(ours) == expected
        elif fmt in ("hindiNumbers", "thaiNumbers"):  # "Hindi Numbers", "Thai Numerals"
            script = "DEVANAGARI" if fmt == "hindiNumbers" else "THAI"
            assert all(unicodedata.name(ch).startswith(f"{script} DIGIT") for ch in ours)
            assert "".join(str(unicodedata.digit(ch)) for ch in ours) == str(value)
        elif fmt == "numberInDash":  # "Number With Dashes"
            assert ours == f"- {value} -"
        elif fmt in ("taiwaneseDigital", "japaneseDigitalTenThousand"):
            # "Taiwanese Digital Counting System": one ideograph per decimal digit, the
            # digits as LibreOffice shows them in koreanDigital2; zero as the ideographic
            # zero 〇 (common practice, no source).
            digit = {str(d): every_format["koreanDigital2", d][0] for d in range(1, 10)}
            digit["0"] = "\u3007"
            assert ours == "".join(digit[d] for d in str(value))
        elif fmt == "ideographZodiacTraditional":
            # "Traditional Zodiac Ideograph Format": the sixty-year cycle, a heavenly stem
            # (ideographTraditional) joined to an earthly branch (ideographZodiac).
            if value <= 60:
                stem = every_format["ideographTraditional", (value - 1) % 10 + 1][0]
                branch = every_format["ideographZodiac", (value - 1) % 12 + 1][0]
                assert ours == stem + branch
            else:
                assert ours == str(value)


def test_formats_no_source_spells_are_decimal(every_format):
    for (fmt, value), (lo, ours) in every_format.items():
        if fmt in DECIMAL_BOTH:
            assert lo == ours == str(value)  # LibreOffice's rendering


def _english(n: int) -> str:
    return ("ONE TWO THREE FOUR FIVE SIX SEVEN EIGHT NINE TEN ELEVEN TWELVE THIRTEEN FOURTEEN "
            "FIFTEEN SIXTEEN SEVENTEEN EIGHTEEN NINETEEN TWENTY").split()[n - 1]


# --------------------------------------------------------------------------------------
# Language-dependent text formats
# --------------------------------------------------------------------------------------

TEXT_VALUES = (1, 2, 3, 4, 5, 7, 9, 10, 11, 16, 17, 19, 20, 21, 22, 31, 40, 71, 80, 81, 90, 91,
               99, 100, 101, 111, 200, 201, 300, 999, 1000, 1001, 2000, 2001, 5000, 12345)


@pytest.mark.parametrize("lang", ["fr-FR", "de-DE", "ru-RU", "en-GB"])
def test_text_formats_follow_the_document_language(tmp_path, lang):
    """LibreOffice's rendering of ordinal, cardinalText and ordinalText in a document whose
    language (w:docDefaults w:lang) is *lang*."""
    path = _numbered_document(tmp_path / f"{lang}.docx", ["ordinal", "cardinalText", "ordinalText"],
                              TEXT_VALUES, lang=lang)
    labels = _labels(path)
    assert [(k, lo, ours) for k, (lo, ours) in labels.items() if lo != ours] == []
    assert len(labels) == 3 * len(TEXT_VALUES)


def test_spanish_ordinals_follow_libreoffice(tmp_path):
    """Spanish: the ordinal sign ("1.º") as LibreOffice shows it; Spanish words are not
    spelled (English words are shown), a known gap."""
    path = _numbered_document(tmp_path / "es.docx", ["ordinal"], TEXT_VALUES, lang="es-ES")
    labels = _labels(path)
    assert all(lo == ours for lo, ours in labels.values())


# --------------------------------------------------------------------------------------
# custom (w:format inside mc:AlternateContent)
# --------------------------------------------------------------------------------------

MC = ('xmlns:mc="http://schemas.openxmlformats.org/markup-compatibility/2006" '
      'xmlns:w14="http://schemas.microsoft.com/office/word/2010/wordml"')


def _custom(pattern: str) -> str:
    """A custom format as Word 2010 stores it: a w14 choice with a decimal fallback."""
    return (f'<mc:AlternateContent {MC}><mc:Choice Requires="w14">'
            f'<w:numFmt w:val="custom" w:format="{pattern}"/></mc:Choice>'
            '<mc:Fallback><w:numFmt w:val="decimal"/></mc:Fallback></mc:AlternateContent>')


@pytest.mark.parametrize("pattern, shown_at_7", [
    ("001, 002, 003, ...", "007"),
    ("0001, 0002, 0003, ...", "0007"),
    ("00001, 00002, 00003, ...", "00007"),
])
def test_zero_padded_custom_formats_equal_libreoffice(tmp_path, pattern, shown_at_7):
    path = _numbered_document(tmp_path / "custom.docx", ["custom"], (1, 7, 42, 999, 12345),
                              level_extra=_custom(pattern))
    labels = _labels(path)
    assert all(lo == ours for lo, ours in labels.values())  # LibreOffice's rendering
    assert labels["custom", 7] == (shown_at_7, shown_at_7)


def test_custom_two_digit_format_follows_xslt():
    """XSLT 1.0 §7.7.1: a format token "01" pads to two digits (LibreOffice 7.4 shows
    decimal for it); "a"/"A" letters, "i"/"I" roman numerals, anything else decimal."""
    assert [format_number(v, "custom", custom="01, 02, 03, ...") for v in (1, 9, 10, 123)] == [
        "01", "09", "10", "123"]
    assert format_number(28, "custom", custom="a, b, c, ...") == format_number(28, "lowerLetter")
    assert format_number(14, "custom", custom="I, II, III, ...") == format_number(14, "upperRoman")
    assert format_number(5, "custom", custom="") == "5"
    assert format_number(5, "custom", custom="%%%") == "5"


def test_repeated_letter_labels_are_bounded():
    """Letters repeat ("AA", "AAA") by arithmetic; past MAX_REPEATED_CHARS repetitions the
    value shows in decimal, so a hostile value cannot build a huge label."""
    assert format_number(27, "upperLetter") == "AA"
    limit = MAX_REPEATED_CHARS * 26
    assert format_number(limit, "upperLetter") == "Z" * MAX_REPEATED_CHARS
    assert format_number(limit + 1, "upperLetter") == str(limit + 1)
    assert format_number(2_147_483_647, "upperLetter") == "2147483647"
    assert format_number(10**30, "chicago") == str(10**30)
    assert format_number(10**30, "ordinalText") == str(10**30)
