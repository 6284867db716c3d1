"""Tests of core.outline: the readable outline fits the terminal.

Column widths follow Unicode Standard Annex #11 (East Asian Width): Wide and Fullwidth
characters take two columns; combining marks take none (as terminals render them).
"""

from __future__ import annotations

import pytest

from core.model import Document, Provision
from core.outline import display_width, format_outline
from core.reader import read_text
from tests.support.document_checks import check_document
from tests.support.legal_texts import license_text


@pytest.mark.parametrize("width", [100, 72, 40, 20])
@pytest.mark.parametrize("name", ["apache-2.0", "gpl-3.0", "mpl-2.0"])
def test_every_line_fits_the_width(name, width):
    doc = read_text(license_text(name), source=f"{name}.txt")
    check_document(doc)
    out = format_outline(doc, width=width)
    lines = out.split("\n")
    assert all(display_width(line) <= width for line in lines)
    assert len(lines) == 1 + len(doc.provisions) + (2 + len(doc.terms) if doc.terms else 0)


def test_outline_shows_number_heading_kind_and_first_words():
    doc = read_text("SUPPLY TERMS\n1. Definitions\n\"Goods\" means lamps.\n2. Price. The price is ten.\n"
                    "(a) Paid monthly.\n", source="/x/terms.txt")
    check_document(doc)
    lines = format_outline(doc, width=100).split("\n")
    assert lines[0] == "terms.txt: 5 provisions, 1 defined terms"
    assert lines[1].startswith("·") and "[title]" in lines[1] and "SUPPLY TERMS" in lines[1]
    assert lines[2].startswith("1") and "Definitions" in lines[2]
    assert lines[3].startswith("  ·") and '[definition: Goods] — "Goods" means lamps.' in lines[3]
    assert lines[4].startswith("2") and "Price — The price is ten." in lines[4]
    assert lines[5].startswith("  (a)") and "Paid monthly." in lines[5]
    assert lines[-1] == "  Goods (p3): 0"


def test_wide_characters_and_long_words_are_cut_to_the_width():
    heading = "責任の制限" * 30  # CJK: two columns each
    doc = Document(source="wide.txt", terms=(), provisions=(
        Provision(id="p1", kind="clause", number="7", heading=heading, level=1, parent=None, text="x" * 500),
    ))
    for width in (100, 33, 20):
        for line in format_outline(doc, width=width).split("\n"):
            assert display_width(line) <= width
    assert format_outline(doc, width=100).split("\n")[1].endswith("…")


def test_display_width():
    assert display_width("abc") == 3
    assert display_width("責任") == 4
    assert display_width("e\u0301") == 1  # e + combining acute accent


def test_outline_names_a_term_s_aliases():
    # apache-2.0.LICENSE (licensedcode-data): '"You" (or "Your") shall mean ...'.
    doc = read_text(license_text("apache-2.0"))
    lines = format_outline(doc, width=100).split("\n")
    you = next(t for t in doc.terms if t.term == "You")
    assert f"  You [also Your] ({you.provision}): {you.uses}" in lines
