"""Tests of core.reader: dispatch by suffix, bad input, and whole documents end to end.

The .docx inputs are written by core.docx.compose with real Word auto-numbering
(ECMA-376 Part 1 §17.9: the labels live in numbering.xml, not in the text).
"""

from __future__ import annotations

import hashlib

import pytest

from core.docx.compose import ComposeParagraph as P
from core.docx.compose import compose_docx
from core.errors import CounterdraftError
from core.reader import read_document, read_text
from tests.support.document_checks import check_document

AGREEMENT_MD = """\
# Lamp Supply Agreement

This Agreement is made between Quillmere Fabrication Limited (the "Supplier") and
Osterby Lampworks Limited (the "Customer").

## 1. Definitions

**"Goods"** means lamp housings.

## 2. Price

2.1 **Fixed Price.** The Customer pays the Supplier's price for the Goods.
"""


def digest(path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def test_reads_markdown_and_plain_text_files(tmp_path):
    md = tmp_path / "agreement.md"
    md.write_text(AGREEMENT_MD, encoding="utf-8")
    before = digest(md)
    doc = read_document(str(md))
    check_document(doc)
    assert doc.source == str(md)
    got = [(p.kind, p.number, p.heading, p.term) for p in doc.provisions]
    assert got == [
        ("title", None, None, None),
        ("parties", None, None, None),
        ("clause", "1", "Definitions", None),
        ("definition", None, None, "Goods"),
        ("clause", "2", "Price", None),
        ("clause", "2.1", "Fixed Price", None),
    ]
    assert [(t.term, t.uses) for t in doc.terms] == [("Supplier", 1), ("Customer", 1), ("Goods", 1)]
    assert digest(md) == before  # input never modified

    txt = tmp_path / "agreement.TXT"
    txt.write_bytes(b"PRICE TERMS\n1. Price. The price is \x93fixed\x94.\n")
    doc = read_document(str(txt))
    check_document(doc)
    assert doc.provisions[1].text == "The price is “fixed”."
    assert doc.warnings == ("the file is not UTF-8; it was read as Windows-1252",)


def test_reads_docx_with_auto_numbering(tmp_path):
    data = compose_docx([
        P("LAMP SUPPLY AGREEMENT", style="Title"),
        P("Definitions", level=0, style="Heading 1"),
        P('"Goods" means lamp housings.'),
        P("Price", level=0, style="Heading 1"),
        P("The Customer pays for the Goods:", level=1),
        P("on delivery; and", level=2),
        P("in euros.", level=2),
        P("Within 30 days.", level=1, lead="Payment Terms."),
    ])
    path = tmp_path / "agreement.docx"
    path.write_bytes(data)
    before = digest(path)
    doc = read_document(str(path))
    check_document(doc)
    got = [(p.kind, p.number, p.heading, p.level, p.text) for p in doc.provisions]
    assert got == [
        ("title", None, None, 0, "LAMP SUPPLY AGREEMENT"),
        ("clause", "1", "Definitions", 1, ""),
        ("definition", None, None, 0, '"Goods" means lamp housings.'),
        ("clause", "2", "Price", 1, ""),
        ("clause", "2.1", None, 2, "The Customer pays for the Goods:"),
        ("clause", "(a)", None, 3, "on delivery; and"),
        ("clause", "(b)", None, 3, "in euros."),
        ("clause", "2.2", "Payment Terms", 2, "Within 30 days."),
    ]
    assert digest(path) == before


@pytest.mark.parametrize("name, message", [
    ("contract.doc", "legacy binary Word .doc"),
    ("contract.rtf", "RTF file is not supported"),
    ("contract.pdf", "damaged or not a PDF file"),  # read as a PDF by its name: no %PDF header
    ("contract.xlsx", "unsupported file type '.xlsx'"),
    ("contract", "unsupported file type (no suffix)"),
])
def test_unsupported_types_are_refused_by_name(tmp_path, name, message):
    path = tmp_path / name
    path.write_bytes(b"something")
    with pytest.raises(CounterdraftError) as info:
        read_document(str(path))
    assert message in str(info.value)
    assert str(info.value).startswith(str(path))


def test_missing_file_folder_and_empty_file(tmp_path):
    with pytest.raises(CounterdraftError, match="no such file"):
        read_document(str(tmp_path / "missing.docx"))
    with pytest.raises(CounterdraftError, match="not a file"):
        read_document(str(tmp_path))
    empty = tmp_path / "empty.txt"
    empty.write_bytes(b"")
    with pytest.raises(CounterdraftError, match="the file is empty"):
        read_document(str(empty))
    binary = tmp_path / "binary.md"
    binary.write_bytes(b"\x00\x01\x02 not text")
    with pytest.raises(CounterdraftError, match="binary data"):
        read_document(str(binary))


def test_read_text():
    doc = read_text("1. Price. The price is ten.", source="memo.txt")
    check_document(doc)
    assert doc.source == "memo.txt"
    assert [(p.number, p.heading, p.text) for p in doc.provisions] == [("1", "Price", "The price is ten.")]
    with pytest.raises(CounterdraftError, match="memo.txt: the text is empty"):
        read_text(" \n ", source="memo.txt")
