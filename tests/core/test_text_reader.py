"""Tests of core.text_reader: .txt and .md into blocks, decoding and refusing bad input.

Expectations for Markdown follow the CommonMark specification (https://spec.commonmark.org,
version 0.31.2): ATX headings (§4.2), setext headings (§4.3), thematic breaks (§4.1),
paragraph continuation lines (§4.8), list items (§5.2), emphasis (§6.2), links (§6.3),
backslash escapes (§2.4); tables as in the GitHub Flavored Markdown specification
(https://github.github.com/gfm/, §4.10).  Encodings: UTF-8 and its byte-order mark (the
Unicode Standard §23.8), Windows-1252 as Python's ``cp1252`` codec defines it.
"""

from __future__ import annotations

import codecs

import pytest

from core.errors import CounterdraftError
from core.text_reader import decode_text, read_text_blocks, read_text_file


def texts(text: str, **kw) -> list[str]:
    return [b.text for b in read_text_blocks(text, **kw)]


# --------------------------------------------------------------------------------------
# Plain text: wrapped and one paragraph per line
# --------------------------------------------------------------------------------------

WRAPPED = """\
                         SUPPLY AGREEMENT
                      Quillmere Fabrication

1. Supply. The Supplier shall supply the Goods described in the Order
   to the Customer at the Delivery Location on the Delivery Date, in
   accordance with the Specification.

2. The Customer shall:
(a) inspect the Goods on delivery; and
(b) notify the Supplier of any defect within five Business Days of the
    date of delivery.

  The Supplier shall remedy defects notified under this clause within a
reasonable time.  (1) The first remedy is repair, and (2) the second is
replacement.
"""


def test_wrapped_paragraphs_are_joined_and_deliberate_breaks_kept():
    assert texts(WRAPPED) == [
        "SUPPLY AGREEMENT",
        "Quillmere Fabrication",
        "1. Supply. The Supplier shall supply the Goods described in the Order to the Customer at "
        "the Delivery Location on the Delivery Date, in accordance with the Specification.",
        "2. The Customer shall:",
        "(a) inspect the Goods on delivery; and",
        "(b) notify the Supplier of any defect within five Business Days of the date of delivery.",
        "The Supplier shall remedy defects notified under this clause within a reasonable time.  "
        "(1) The first remedy is repair, and (2) the second is replacement.",
    ]


def test_a_wrapped_line_that_starts_with_a_label_continues_when_it_could_not_fit():
    text = ("  Developers that use the licence protect your rights with two steps and\n"
            "(1) assert copyright on the software, and (2) offer you this licence\n"
            "giving you legal permission to copy it.\n\n"
            "Second paragraph of ordinary wrapped text that is long enough to wrap\nagain here.\n")
    assert texts(text)[0].startswith(
        "Developers that use the licence protect your rights with two steps and (1) assert")


def test_lower_case_line_continues_a_short_line():
    text = ('1.1. "Contributor"\n    means each individual or legal entity that creates, contributes to\n'
            '    the creation of, or owns Covered Software.\n\n'
            '1.2. "Contribution"\n    means Covered Software of a particular Contributor and nothing\n    else.\n')
    assert texts(text) == [
        '1.1. "Contributor" means each individual or legal entity that creates, contributes to the '
        'creation of, or owns Covered Software.',
        '1.2. "Contribution" means Covered Software of a particular Contributor and nothing else.',
    ]


def test_one_paragraph_per_line():
    text = "MASTER AGREEMENT\n1. Price. The price is ten.\n2. Payment. Pay in 30 days.\nSigned by the parties\n"
    assert texts(text) == ["MASTER AGREEMENT", "1. Price. The price is ten.", "2. Payment. Pay in 30 days.",
                           "Signed by the parties"]


def test_hyphenated_word_across_lines_and_crlf_line_endings():
    text = ("The licence granted is a perpetual, worldwide, royalty-free and non-\r\n"
            "exclusive licence to use the Software for the Customer's business.\r\n\r\n"
            "Another paragraph that is of about the same length as the one above it\r\nends here.\r\n")
    assert texts(text)[0] == ("The licence granted is a perpetual, worldwide, royalty-free and non-exclusive "
                              "licence to use the Software for the Customer's business.")


def test_setext_underlines_and_asterisk_boxes():
    text = ("Mozart Supply Terms Version 1.0\n"
            "===============================\n\n"
            "6. Disclaimer of Warranty\n"
            "-------------------------\n\n"
            "****************************************************\n"
            "*                                                  *\n"
            "*  7. Limitation of Liability                      *\n"
            "*  --------------------------                      *\n"
            "*                                                  *\n"
            "*  Under no circumstances shall any party be       *\n"
            "*  liable for indirect, special or consequential   *\n"
            "*  loss of any kind.                               *\n"
            "*                                                  *\n"
            "****************************************************\n")
    blocks = read_text_blocks(text)
    assert [(b.text, b.emphasised) for b in blocks] == [
        ("Mozart Supply Terms Version 1.0", True),
        ("6. Disclaimer of Warranty", True),
        ("7. Limitation of Liability", True),
        ("Under no circumstances shall any party be liable for indirect, special or consequential "
         "loss of any kind.", False),
    ]
    assert all(b.outline_level is None for b in blocks)  # plain text has no heading styles


def test_a_rule_under_a_long_paragraph_is_a_separator_not_a_heading():
    text = ("The Supplier shall deliver the Goods to the Delivery Location on the Delivery Date\n"
            "and shall unload them there at its own cost and risk, and the Customer shall\n"
            "provide reasonable access to the Delivery Location for that purpose at all times\n"
            "during the Customer's normal business hours on any Business Day.\n"
            "----------\n\nNext paragraph.\n")
    blocks = read_text_blocks(text)
    assert [b.emphasised for b in blocks] == [False, False]
    assert blocks[0].text.endswith("on any Business Day.")


def test_bullets_caps_and_indices():
    blocks = read_text_blocks("TERMS\n• first point\n• second point\nThe end of it.\n")
    assert [(b.index, b.text, b.bullet, b.all_caps) for b in blocks] == [
        (0, "TERMS", False, True), (1, "first point", True, False), (2, "second point", True, False),
        (3, "The end of it.", False, False),
    ]


# --------------------------------------------------------------------------------------
# Markdown
# --------------------------------------------------------------------------------------

MARKDOWN = """\
---
title: front matter is metadata
---
# Supply Agreement

## 7. Limitation of Liability

**7.1 Cap.** The Supplier's *total* liability is capped
at the [fees](https://example.invalid/fees) paid.

7.2 **Exclusions:** indirect loss is excluded.

**DEFINITIONS**

- first bullet
- second bullet
  continues here

1. ordered item kept with its label
2) second ordered item

> quoted paragraph with a \\*literal\\* star

| Party | Role |
|-------|------|
| Quillmere | Supplier |

***

Schedule 1
==========
Setext heading above.
"""


def test_markdown_blocks():
    blocks = read_text_blocks(MARKDOWN, markdown=True)
    got = [(b.text, b.outline_level, b.lead, b.emphasised, b.bullet, b.in_table) for b in blocks]
    assert got == [
        ("Supply Agreement", 1, None, False, False, False),
        ("7. Limitation of Liability", 2, None, False, False, False),
        ("7.1 Cap. The Supplier's total liability is capped at the fees paid.", None, "7.1 Cap.", False, False, False),
        ("7.2 Exclusions: indirect loss is excluded.", None, "Exclusions:", False, False, False),
        ("DEFINITIONS", None, None, True, False, False),
        ("first bullet", None, None, False, True, False),
        ("second bullet continues here", None, None, False, True, False),
        ("1. ordered item kept with its label", None, None, False, False, False),
        ("2) second ordered item", None, None, False, False, False),
        ("quoted paragraph with a *literal* star", None, None, False, False, False),
        ("Party\tRole", None, None, False, False, True),
        ("Quillmere\tSupplier", None, None, False, False, True),
        ("Schedule 1", 1, None, False, False, False),
        ("Setext heading above.", None, None, False, False, False),
    ]


def test_markdown_joins_soft_breaks_but_not_labels_after_a_sentence():
    text = "The Customer shall:\n(a) pay; and\n(b) cooperate.\nThese words\ncontinue the item.\n"
    assert texts(text, markdown=True) == ["The Customer shall:", "(a) pay; and",
                                          "(b) cooperate. These words continue the item."]


# --------------------------------------------------------------------------------------
# Decoding and bad input
# --------------------------------------------------------------------------------------

def test_decode_utf8_with_and_without_bom():
    assert decode_text("“Customer” means".encode(), path="a.txt") == ("“Customer” means", ())
    assert decode_text(codecs.BOM_UTF8 + "“Customer”".encode(), path="a.txt")[0] == "“Customer”"


def test_decode_utf16_with_bom():
    assert decode_text("“Customer” means".encode("utf-16"), path="a.txt")[0] == "“Customer” means"


def test_decode_windows_1252_and_latin1_fallback():
    # cp1252: 0x93/0x94 are curly double quotes, 0x92 the right single quote.
    text, warnings = decode_text(b"\x93Customer\x94 means the Customer\x92s buyer", path="a.txt")
    assert text == "“Customer” means the Customer’s buyer"
    assert warnings == ("the file is not UTF-8; it was read as Windows-1252",)
    # 0x81 is undefined in cp1252: Latin-1 reads every byte.
    text, warnings = decode_text(b"Caf\xe9 \x81", path="a.txt")
    assert text == "Café \x81"
    assert "Latin-1" in warnings[0]


@pytest.mark.parametrize("data, message", [
    (b"", "the file is empty"),
    (b"  \n\t\n", "the file is empty"),
    (codecs.BOM_UTF8, "the file is empty"),
    (b"abc\x00def", "binary data"),
    (b"PK\x03\x04rest of a zip", "zip archive"),
    (b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1rest", "OLE compound file"),
    (b"%PDF-1.7 ...", "PDF"),
    (bytes(range(1, 9)) * 20 + b"text", "binary data"),
])
def test_bad_bytes_are_refused_with_one_line(data, message):
    with pytest.raises(CounterdraftError) as info:
        decode_text(data, path="in.txt")
    assert message in str(info.value)
    assert str(info.value).startswith("in.txt: ")
    assert "\n" not in str(info.value)


def test_read_text_file_reads_without_modifying(tmp_path):
    path = tmp_path / "agreement.md"
    data = b"# Title\n\n1. Price. The price is ten.\n"
    path.write_bytes(data)
    before = path.stat().st_mtime_ns
    blocks, warnings = read_text_file(str(path), markdown=True)
    assert [b.text for b in blocks] == ["Title", "1. Price. The price is ten."]
    assert warnings == ()
    assert path.read_bytes() == data and path.stat().st_mtime_ns == before


def test_read_text_file_refuses_oversized_files(tmp_path, monkeypatch):
    import core.text_reader as tr

    monkeypatch.setattr(tr, "MAX_TEXT_BYTES", 10)
    path = tmp_path / "big.txt"
    path.write_text("x" * 11)
    with pytest.raises(CounterdraftError, match="too large"):
        read_text_file(str(path))


def test_read_text_file_reports_unreadable_files(tmp_path):
    with pytest.raises(CounterdraftError, match="cannot read"):
        read_text_file(str(tmp_path / "missing.txt"))
