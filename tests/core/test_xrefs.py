"""Typed cross-references (core.xrefs): finding them, resolving them, keeping them true.

Real texts come from the PyPI package licensedcode-data (the ScanCode license database; see
tests/support/legal_texts.py), read through ``core.reader.read_text``.  Every count and
expected list below was made by reading the ``.LICENSE`` file by hand (the line numbers are
the file's, front matter included), not by running the code.  Forms that no text of that
package carries are small inline examples, marked "inline example".
"""

from __future__ import annotations

import textwrap
from collections import defaultdict
from functools import cache

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from core.model import Document, Provision
from core.reader import read_document, read_text
from core.review.docinfo import build_docinfo
from core.xrefs import (
    ISSUE_KINDS,
    Reference,
    ReferenceEdit,
    find_references,
    renumber_references,
    resolve,
    translate_references,
)
from tests.support.legal_texts import license_text


@cache
def licence(key: str) -> Document:
    return read_text(license_text(key), source=f"{key}.LICENSE")


def agreement(text: str) -> Document:
    """An inline example agreement (invented wording)."""
    return read_text(textwrap.dedent(text).strip() + "\n", source="agreement.txt")


def refs_in(doc: Document) -> list[tuple[Provision, str, str, Reference]]:
    """(provision, part, words of that part, reference) for every reference, in order."""
    out = []
    for p in doc.provisions:
        for part, text in (("heading", p.heading or ""), ("text", p.text)):
            out.extend((p, part, text, r) for r in find_references(text))
    return out


def numbers(doc: Document, *, external: bool = False) -> list[tuple[str, str]]:
    """(keyword, normalised number) of every number of the document's references."""
    return [(r.keyword, n.number) for _p, _part, _t, r in refs_in(doc) if r.external == external
            for n in r.numbers]


def one(text: str, words: str) -> Reference:
    """The single reference of *text* whose words are *words*."""
    found = [r for r in find_references(text) if text[r.start:r.end] == words]
    assert len(found) == 1, (words, [text[r.start:r.end] for r in find_references(text)])
    return found[0]


def provision(doc: Document, number: str) -> Provision:
    """The provision whose full number (core.review.docinfo) is *number*."""
    info = build_docinfo(doc)
    hits = [p for p, n in zip(info.provisions, info.full_number) if n == number]
    assert len(hits) == 1, (number, hits)
    return hits[0]


def apply(text: str, edits: list[ReferenceEdit]) -> str:
    for e in sorted(edits, key=lambda e: e.start, reverse=True):
        assert text[e.start:e.end] == e.old
        text = text[:e.start] + e.new + text[e.end:]
    return text


# ----------------------------------------------------------------------------------------
# Finding: real texts
# ----------------------------------------------------------------------------------------

def test_mpl_references_counted_by_hand():
    # mpl-2.0.LICENSE has 12 typed references to Section numbers carrying 16 numbers
    # (counted by hand: lines 133 "Section 2.1", 139 "this Section 2", 142 "Section 2.1(b)
    # above", 158 "Section 3.4", 164 "Section 10.2", 165 "Section 3.3", 181 "Sections 3.1,
    # 3.2, 3.3, and 3.4", 182 "Section 2.1", 202 "Section 3.1", 280-281 "Section\n2.1 of this
    # License", 283 "Sections 5.1 or 5.2 above", 355-356 "Section\n10.3") and 3 references to
    # Exhibits (lines 47 "Exhibit A", 55 "Exhibit B", 380 "Exhibit B of this License"; line 11
    # is front matter, lines 382 and 396 are the exhibits' own labels).  "this Section"
    # (line 337) names no number.
    doc = licence("mpl-2.0")
    assert numbers(doc) == [
        ("exhibit", "A"), ("exhibit", "B"),
        ("section", "2.1"), ("section", "2"), ("section", "2.1(b)"), ("section", "3.4"),
        ("section", "10.2"), ("section", "3.3"),
        ("section", "3.1"), ("section", "3.2"), ("section", "3.3"), ("section", "3.4"),
        ("section", "2.1"), ("section", "3.1"), ("section", "2.1"),
        ("section", "5.1"), ("section", "5.2"), ("section", "10.3"), ("exhibit", "B"),
    ]
    assert numbers(doc, external=True) == []
    kinds = [r.keyword for *_x, r in refs_in(doc)]
    assert kinds.count("section") == 12 and kinds.count("exhibit") == 3 and len(kinds) == 15


def test_mpl_number_spans_are_exactly_the_numbers():
    # mpl-2.0.LICENSE line 181: "Sections 3.1, 3.2, 3.3, and 3.4 are conditions ..."
    # and line 142: "Notwithstanding Section 2.1(b) above, ..."
    doc = licence("mpl-2.0")
    text = provision(doc, "2.7").text
    ref = one(text, "Sections 3.1, 3.2, 3.3, and 3.4")
    assert [text[n.start:n.end] for n in ref.numbers] == ["3.1", "3.2", "3.3", "3.4"]
    assert [n.link for n in ref.numbers] == ["", "list", "list", "list"]
    assert not ref.is_range and not ref.external
    text = provision(doc, "2.3").text
    ref = one(text, "Section 2.1(b)")
    assert text[ref.numbers[0].start:ref.numbers[0].end] == "2.1(b)"
    assert ref.direction == "above"
    # lines 280-281: the keyword and the number are on two lines of the file
    text = provision(doc, "5.2").text
    ref = one(text, "Section 2.1")
    assert ref.scope == ("document", "")  # "of this License"


def test_gpl3_references_counted_by_hand():
    # gpl-3.0.LICENSE has 14 references to this License's sections carrying 17 numbers
    # (counted by hand: lines 211 "section 10", 236 "section 7", 247 "section 4", 253-254
    # "section\n7", 254 "section 4", 259 "section 7", 283 "sections 4 and 5", 308 "subsection
    # 6b", 326 "subsection 6d", 401 "sections 15 and 16 of this License", 424 "section 10",
    # 448 "section 11", 468 "section 10", and the heading on line 647 "Interpretation of
    # Sections 15 and 16"), and 2 to other instruments: line 217-218 "article\n11 of the WIPO
    # copyright treaty" and line 594-595 "the GNU Affero General Public License,\nsection 13".
    doc = licence("gpl-3.0")
    internal = [n for _k, n in numbers(doc)]
    assert internal == ["10", "7", "4", "7", "4", "7", "4", "5", "6(b)", "6(d)", "15", "16",
                        "10", "11", "10", "15", "16"]
    assert numbers(doc, external=True) == [("article", "11"), ("section", "13")]
    heading = [(p.number, text[r.start:r.end]) for p, part, text, r in refs_in(doc)
               if part == "heading"]
    assert heading == [("17", "Sections 15 and 16")]
    sixb = [(text, r) for _p, _part, text, r in refs_in(doc) if r.numbers[0].number == "6(b)"]
    [(text, ref)] = sixb
    assert text[ref.start:ref.end] == "subsection 6b" and ref.keyword == "sub-section"


def test_cc_by_4_item_chains_ranges_and_lists():
    # cc-by-4.0.LICENSE has 12 references to its own sections carrying 17 numbers (counted by
    # hand: lines 104 "Section 2(b)(1)-(2)", 166-167 "Section\n6(a)", 178-179 "this Section
    # 2(a)\n(4)", 201 "Section 3(a)(1)(A)(i)", 260 "Section 3(a)(1)", 268 "Section 3(a)(1)(A)",
    # 281 "Section 2(a)(1)", 290 "Section 3(a)", 293 "this Section 4", 335 "Section 6(a)",
    # 343 "this Section 6(b)", 352 "Sections 1, 5, 6, 7, and 8") and one to another
    # instrument (line 109 "Article 11 of the WIPO Copyright Treaty").
    doc = licence("cc-by-4.0")
    assert [n for _k, n in numbers(doc)] == [
        "2(b)(1)", "2(b)(2)", "6(a)", "2(a)(4)", "3(a)(1)(A)(i)", "3(a)(1)", "3(a)(1)(A)",
        "2(a)(1)", "3(a)", "4", "6(a)", "6(b)", "1", "5", "6", "7", "8"]
    assert numbers(doc, external=True) == [("article", "11")]
    by_words = {text[r.start:r.end]: (text, r) for _p, _part, text, r in refs_in(doc)}
    text, ref = by_words["Section 2(b)(1)-(2)"]
    assert ref.is_range and [text[n.start:n.end] for n in ref.numbers] == ["2(b)(1)", "(2)"]
    text, ref = by_words["Section 2(a) (4)"]  # the line break of the file read as a space
    assert text[ref.numbers[0].start:ref.numbers[0].end] == "2(a) (4)"


def test_range_and_lists_in_real_texts():
    # apache-2.0.LICENSE line 38: "as defined by Sections 1 through 9 of this document."
    text = license_text("apache-2.0")
    ref = one(text, "Sections 1 through 9")
    assert [n.number for n in ref.numbers] == ["1", "9"] and ref.is_range
    assert ref.scope == ("document", "")
    # cddl-1.0.LICENSE: "The licenses granted in Sections 2.1(a) and (b) are effective ..."
    text = license_text("cddl-1.0")
    ref = one(text, "Sections 2.1(a) and (b)")
    assert [n.number for n in ref.numbers] == ["2.1(a)", "2.1(b)"]
    assert text[ref.numbers[1].start:ref.numbers[1].end] == "(b)"
    # cecill-2.1.LICENSE: "Article 5.3.4" (line 525) and "Articles 8 and 9" (lines 267, 290)
    text = license_text("cecill-2.1")
    assert one(text, "Article 5.3.4").numbers[0].number == "5.3.4"
    both = [r for r in find_references(text) if text[r.start:r.end] == "Articles 8 and 9"]
    assert len(both) == 2 and [n.number for n in both[0].numbers] == ["8", "9"]
    # cc-by-2.5.LICENSE line 51 (twice): "as required by clause 4(b)"
    text = license_text("cc-by-2.5")
    found = [r for r in find_references(text) if text[r.start:r.end] == "clause 4(b)"]
    assert len(found) == 2 and found[0].numbers[0].number == "4(b)"


def test_relative_items_and_qualifiers_in_real_texts():
    # nosl-3.0.LICENSE line 79: "in paragraph (a) of this Section 17"
    text = license_text("nosl-3.0")
    ref = one(text, "paragraph (a)")
    assert ref.numbers[0].relative and ref.numbers[0].number == "(a)"
    assert ref.scope == ("enclosing", "clause")
    # okl.LICENSE line 17: "(including paragraphs (a), (b) and (c)), clause 2 and clause 3"
    text = license_text("okl")
    ref = one(text, "paragraphs (a), (b) and (c)")
    assert [(n.number, n.relative) for n in ref.numbers] == [("(a)", True), ("(b)", True),
                                                            ("(c)", True)]
    # eupl-1.2.LICENSE line 122 "Article 9 above", line 111 "Article 2 of this Licence"
    text = license_text("eupl-1.2")
    assert one(text, "Article 9").direction == "above"
    assert one(text, "Article 2").scope == ("document", "")
    # adapt-1.0.LICENSE line 28: "see Part 3 of Exhibit A"
    text = license_text("adapt-1.0")
    part3 = [r for r in find_references(text) if text[r.start:r.end] == "Part 3"][0]
    assert part3.scope == ("schedule", "A")


@pytest.mark.parametrize(("key", "words", "count"), [
    # lgpl-3.0.LICENSE: lines 75 (heading), 78, 139, 150-151 and 158 cite the GNU GPL's sections
    ("lgpl-3.0", "section 3", 1), ("lgpl-3.0", "Section 3", 1), ("lgpl-3.0", "section 6", 3),
    # eupl-1.2.LICENSE line 134: "article 272 of the Treaty on the Functioning of the European Union"
    ("eupl-1.2", "article 272", 1),
    # can-ogl-british-columbia-2.0.LICENSE line 72: "Schedule 1 of the Freedom of Information and
    # Protection of Privacy Act"; line 76: "section 29 of the Interpretation Act (B.C.)"
    ("can-ogl-british-columbia-2.0", "Schedule 1", 1),
    ("can-ogl-british-columbia-2.0", "section 29", 1),
    # can-ogl-2.0-en.LICENSE line 64: "section 3 of the Privacy Act, R.S.C. 1985"
    ("can-ogl-2.0-en", "section 3", 1),
    # itu-t-gpl.LICENSE line 16: "published in the Annex 1 of the ITU-T Recommendation"
    ("itu-t-gpl", "Annex 1", 1),
    # cc-by-2.5.LICENSE lines 45-46: "17 USC Section 115 of the US Copyright Act" (and 114)
    ("cc-by-2.5", "Section 115", 1), ("cc-by-2.5", "Section 114", 1),
])
def test_other_instruments_are_external(key, words, count):
    text = license_text(key)
    found = [r for r in find_references(text) if text[r.start:r.end] == words]
    assert len(found) == count and all(r.external for r in found)


def test_lgpl_own_sections_stay_internal():
    # lgpl-3.0.LICENSE line 77: "under sections 3 and 4 of this License" is its own
    text = license_text("lgpl-3.0")
    ref = one(text, "sections 3 and 4")
    assert not ref.external and ref.scope == ("document", "")


# ----------------------------------------------------------------------------------------
# Finding: inline examples of forms the real texts do not carry
# ----------------------------------------------------------------------------------------

@pytest.mark.parametrize(("text", "keyword", "expected"), [
    # inline examples: common drafting forms, no licensedcode-data text carries them
    ("as set out in clause 9(b).", "clause", ["9(b)"]),
    ("under Clause 3.1(a)(ii), the", "clause", ["3.1(a)(ii)"]),
    ("subject to Section 2(a) and", "section", ["2(a)"]),
    ("in Schedule 2.", "schedule", ["2"]),
    ("in Annex B.", "annex", ["B"]),
    ("in Appendix 1 and", "appendix", ["1"]),
    ("under Article 4.", "article", ["4"]),
    ("under Article IV.", "article", ["IV"]),
    ("see Part 2.", "part", ["2"]),
    ("see Part II.", "part", ["II"]),
    ("Sections 3 to 5 apply", "section", ["3", "5"]),
    ("clauses 4.1 - 4.3 apply", "clause", ["4.1", "4.3"]),
    ("clauses 4.1\u20134.3 apply", "clause", ["4.1", "4.3"]),
    ("Clauses 7 through 9 apply", "clause", ["7", "9"]),
    ("Sections 3, 4 and 7 apply", "section", ["3", "4", "7"]),
    ("clauses 2.1, 2.3 or 2.5 apply", "clause", ["2.1", "2.3", "2.5"]),
    ("Sections 4(a) and (b) apply", "section", ["4(a)", "4(b)"]),
    ("SECTIONS 3 AND 4 OF THIS AGREEMENT", "section", ["3", "4"]),
    ("under sub-clause (iii) of this clause", "sub-clause", ["(iii)"]),
    ("under subclauses (i) to (iii),", "sub-clause", ["(i)", "(iii)"]),
    ("in paragraph (c) below", "paragraph", ["(c)"]),
    ("in clause 12 (b) the", "clause", ["12"]),  # a space parts a number from an item
])
def test_inline_forms(text, keyword, expected):
    [ref] = find_references(text)
    assert ref.keyword == keyword and [n.number for n in ref.numbers] == expected
    assert not ref.external
    for n in ref.numbers:
        typed = "".join(text[n.start:n.end].split())
        assert n.number.endswith(typed) or typed.isalpha()


def test_inline_qualifiers_and_directions():
    # inline examples
    text = "under paragraph 2 of Schedule 1, clause 5 of this Agreement and paragraph (c) above"
    p2, sched, c5, pc = find_references(text)
    assert p2.scope == ("schedule", "1") and sched.keyword == "schedule"
    assert c5.scope == ("document", "")
    assert pc.direction == "above" and pc.numbers[0].relative
    assert find_references("as in paragraph 3 of this Schedule")[0].scope == ("enclosing", "schedule")


@pytest.mark.parametrize("text", [
    # inline examples: quantities, dates and amounts after a keyword are not references
    "the period in clause 3 days",  # a quantity, not clause 3
    "a fee under Section 5,000",  # an amount
    "see Schedule 1 January 2024",  # a date
    "this clause applies",  # no number
    "in whole or in part of",  # "part" without a number
    "Section 2006 of the Code",  # four figures: a year or a statute's section
])
def test_not_references(text):
    assert [r for r in find_references(text) if not r.external] == []


@pytest.mark.parametrize("text", [
    # inline examples: references to other instruments are external
    "under Section 16 of the Companies Act 2006",
    "under Section 2 of the Act",
    "as required by the Companies Act 2006, section 16",
    "under 15 U.S.C. Section 78",
    "clause 4 of the Escrow Agreement",
    "Article 6(1)(f) of the GDPR",
])
def test_inline_external(text):
    [ref] = find_references(text)
    assert ref.external


def test_own_document_is_not_external():
    # inline examples: the document's own name qualifies its own clauses
    for text in ("under clause 4 of the Agreement", "under this Agreement, clause 4",
                 "under clause 4 hereof", "EXCEPT AS SET OUT IN SECTION 7 OF THE LICENSE"):
        [ref] = find_references(text)
        assert not ref.external, text
