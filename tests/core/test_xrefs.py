"""Typed cross-references (core.xrefs): finding them, resolving them, keeping them true.

Real texts come from the PyPI package licensedcode-data (the ScanCode license database; see
tests/support/legal_texts.py), read through ``core.reader.read_text``.  Every count and
expected list below was made by reading the ``.LICENSE`` file by hand (the line numbers are
the file's, front matter included), not by running the code.  Forms that no text of that
package carries are small inline examples, marked "inline example".
"""

from __future__ import annotations

import dataclasses
import re
import textwrap
from collections import defaultdict
from functools import cache
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from core.docinfo import build_docinfo
from core.model import Document, Provision
from core.reader import read_document, read_text
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

DEMO = Path(__file__).resolve().parents[2] / "demo_agreements"


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
    """The provision whose full number (core.docinfo) is *number*."""
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
    "within the meaning of article 7:900 of the Civil Code",  # a statute's numbering
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
    "under GDPR Article 28 and FAR Part 27",
    "as the Example Public License version 2, section 3, requires",
    "Sections 4(c) and 4(f)(iii) from the XYZPL",
])
def test_inline_external(text):
    refs = find_references(text)
    assert refs and all(r.external for r in refs)


def test_own_document_is_not_external():
    # inline examples: the document's own name qualifies its own clauses
    for text in ("under clause 4 of the Agreement", "under this Agreement, clause 4",
                 "under clause 4 hereof", "EXCEPT AS SET OUT IN SECTION 7 OF THE LICENSE"):
        [ref] = find_references(text)
        assert not ref.external, text


# ----------------------------------------------------------------------------------------
# Resolving
# ----------------------------------------------------------------------------------------

def resolutions(doc: Document):
    """(provision, words, number, resolution) for every number of every reference."""
    return [(p, text[r.start:r.end], res.number.number, res) for p, _part, text, r in refs_in(doc)
            for res in resolve(r, doc, within=p)]


def test_every_mpl_reference_resolves():
    # mpl-2.0.LICENSE: all 19 numbers above name a provision of the license itself: zero
    # missing, zero ambiguous (checked by hand against its numbering 1 ... 10.4, Exhibits A, B)
    doc = licence("mpl-2.0")
    found = resolutions(doc)
    assert len(found) == 19
    assert [res.status for *_x, res in found] == ["found"] * 19
    info = build_docinfo(doc)
    full = dict(zip((p.id for p in info.provisions), info.full_number))
    assert [full[res.target] for *_x, res in found] == [n for _k, n in numbers(doc)]
    # "Section 2.1(b) above" (line 142) is item (b) of 2.1; "Exhibit B of this License" the exhibit
    targets = {(w, n): doc.provision(res.target) for _p, w, n, res in found}
    assert targets[("Section 2.1(b)", "2.1(b)")].number == "(b)"
    assert targets[("Section 2.1(b)", "2.1(b)")].parent == provision(doc, "2.1").id
    assert targets[("Exhibit B", "B")].kind == "schedule"
    assert targets[("Exhibit B", "B")].heading.startswith('"Incompatible With Secondary Licenses"')


@pytest.mark.parametrize(("key", "count"), [
    # gpl-3.0.LICENSE: the 17 internal numbers counted above
    ("gpl-3.0", 17),
    # cddl-1.0.LICENSE: 10 references, 14 numbers (counted by hand: lines 58 "Section 3.1",
    # 64 "Sections 2.1(a) and (b)", 66 "Section 2.1(b)", 68 "Section 3.1", 74 "Sections 2.2(a)
    # and 2.2(b)", 76 "Section 2.2(b)", 94 "Section 4.3", 106 "Sections 2.1 and/or 2.2", 108
    # "Sections 6.1 or 6.2", 118 "SECTION 9")
    ("cddl-1.0", 14),
    # epl-2.0.LICENSE: 8 references, 9 numbers (counted by hand: lines 120 "Section 3", 127
    # and 146 "section 3.2", 150 "this section 3", 158 "Exhibit A of this Agreement", 243
    # "Section 2(b)", 270 "Sections 2(a) and 2(b)", 285 "this Exhibit A"; 278 is a label)
    ("epl-2.0", 9),
])
def test_real_licences_resolve_without_missing_or_ambiguous(key, count):
    found = [res for *_x, res in resolutions(licence(key)) if res.status != "external"]
    assert len(found) == count
    assert {res.status for res in found} == {"found"}


def test_gpl_run_on_item_resolves_to_the_item():
    # gpl-3.0.LICENSE line 308: "with subsection 6b." names item b) of section 6 (line 296)
    doc = licence("gpl-3.0")
    [(p, _w, _n, res)] = [x for x in resolutions(doc) if x[2] == "6(b)"]
    target = doc.provision(res.target)
    assert target.number == "b)" and doc.provision(target.parent).number == "6"


def test_inline_item_is_a_tail_of_its_provision():
    # mpl-2.0.LICENSE 2.3(b) (line 146) lists "(i) Your and any other third party's
    # modifications ..." in its words: "Section 2.3(b)(i)" (an inline example) names 2.3(b)
    doc = licence("mpl-2.0")
    within = provision(doc, "3.1")
    [ok] = resolve(one("see Section 2.3(b)(i)", "Section 2.3(b)(i)"), doc, within=within)
    assert ok.status == "found" and ok.target == provision(doc, "2.3(b)").id and ok.tail == "(i)"
    [bad] = resolve(one("see Section 2.3(b)(ix)", "Section 2.3(b)(ix)"), doc, within=within)
    assert bad.status == "missing"
    [gone] = resolve(one("see Section 14.2", "Section 14.2"), doc, within=within)
    assert gone.status == "missing"
    stranger = dataclasses.replace(within, id="p999")
    with pytest.raises(ValueError):
        resolve(one("see Section 2", "Section 2"), doc, within=stranger)


SUPPLY = """
    MASTER SUPPLY AGREEMENT

    1. Definitions

    1.1 "Goods" means the goods listed in Schedule 1.

    2. Supply

    2.1 The Supplier shall, as paragraph (b) says:

    (a) deliver the Goods;

    (b) install the Goods in accordance with paragraph (a) above and:

    (i) test them as paragraph (c) says; and

    (ii) record the results; and

    (c) test the Goods as set out in paragraph 2 of Schedule 1 and clauses 3 to 4.

    2.2 Clause 2.1(b) does not apply to Goods under Section 16 of the Companies Act 2006.

    3. Price

    3.1 The price is set out in Part 2 of Schedule 1 and sub-clause (ix).

    4. Payment

    4.1 Payment is due subject to clauses 2.1, 3.1 or 4.2 and Sections 2.1(a) and (c).

    4.2 Late payment: see paragraph 1 and clause 1, and (i) interest or (ii) costs as sub-clause (ii) says.

    SCHEDULE 1
    GOODS

    1. The goods are widgets.

    2. The goods are delivered as clause 2.1(a) says, as paragraph 1 says and as clause 1 says.
"""


def test_relative_and_scoped_resolution():
    # inline example agreement (invented): relative items, schedules, qualifiers
    doc = agreement(SUPPLY)
    got = {(p.number, w, n): (res.status, doc.provision(res.target) if res.target else None, res)
           for p, w, n, res in resolutions(doc)}
    info = build_docinfo(doc)
    full = dict(zip((p.id for p in info.provisions), info.full_number))

    def target(number: str, words: str, n: str) -> str | None:
        status, prov, _res = got[(number, words, n)]
        return full[prov.id] if prov is not None else status

    assert target("2.1", "paragraph (b)", "(b)") == "2.1(b)"  # a child first
    assert target("(b)", "paragraph (a)", "(a)") == "2.1(a)"  # then a sibling
    assert target("(i)", "paragraph (c)", "(c)") == "2.1(c)"  # then up the parents
    # "paragraph 2 of Schedule 1": the schedule's paragraph 2, not clause 2
    assert target("(c)", "paragraph 2", "2") == "2"
    assert doc.provision(got[("(c)", "paragraph 2", "2")][1].parent).kind == "schedule"
    assert target("(c)", "clauses 3 to 4", "3") == "3" and target("(c)", "clauses 3 to 4", "4") == "4"
    assert target("2.2", "Clause 2.1(b)", "2.1(b)") == "2.1(b)"
    assert got[("2.2", "Section 16", "16")][0] == "external"
    assert target("3.1", "Part 2", "2") == "missing"  # Schedule 1 has no Part 2
    assert target("3.1", "sub-clause (ix)", "(ix)") == "missing"
    assert target("4.1", "Sections 2.1(a) and (c)", "2.1(c)") == "2.1(c)"
    # (i) and (ii) of 4.2 are words of its text, not provisions: the tail of 4.2
    status, prov, res = got[("4.2", "sub-clause (ii)", "(ii)")]
    assert status == "found" and full[prov.id] == "4.2" and res.tail == "(ii)"
    # body paragraph 1 is clause 1; in the schedule paragraph 1 is its own, clause 1 the body's
    assert got[("4.2", "paragraph 1", "1")][1].heading == "Definitions"
    in_schedule = {w: prov for (num, w, _n), (_s, prov, _r) in got.items() if num == "2" and prov}
    assert doc.provision(in_schedule["paragraph 1"].parent).kind == "schedule"
    assert in_schedule["clause 1"].heading == "Definitions"


def hand(*rows: tuple[str, str | None, str | None, str]) -> Document:
    """A document built by hand: (id, number, parent id, text) per provision."""
    provs = tuple(Provision(pid, "clause" if num else "other", num, None, 1 if num else 0,
                            parent, text) for pid, num, parent, text in rows)
    return Document("hand.txt", provs, ())


def test_two_lists_under_one_provision_are_ambiguous_without_a_direction():
    # inline example: clause 1 carries two lists (a)-(c), as when a paragraph between them
    # was read as part of the first list's last item
    doc = hand(("p1", "1", None, "The Supplier shall comply with paragraph (c)."),
               ("p2", "(a)", "p1", "first"), ("p3", "(b)", "p1", "second"),
               ("p4", "(c)", "p1", "third"), ("p5", "(a)", "p1", "fourth"),
               ("p6", "(b)", "p1", "fifth, as paragraph (c) above says"),
               ("p7", "(c)", "p1", "sixth, as paragraph (c) below says"))
    [amb] = resolve(find_references(doc.provisions[0].text)[0], doc, within=doc.provisions[0])
    assert amb.status == "ambiguous" and amb.candidates == ("p4", "p7")
    [above] = resolve(find_references(doc.provisions[5].text)[0], doc, within=doc.provisions[5])
    assert above.target == "p4"
    [below] = resolve(find_references(doc.provisions[6].text)[0], doc, within=doc.provisions[6])
    assert below.status == "ambiguous"  # nothing named (c) below the second (c): both remain


ARTICLES = """
    SERVICES AGREEMENT

    ARTICLE I
    DEFINITIONS

    Section 1.01 Terms. Terms are defined in Article IV and Annex B.

    ARTICLE II
    SERVICES

    Section 2.01 Scope. The services in Article I, Article 3 and Section 4 and Sections 2.01 through 2.02.

    Section 2.02 Standards. The standards in Section 2.01 apply.

    ARTICLE III
    FEES

    Section 3.01 Fees. See Annex B.

    ARTICLE IV
    GENERAL

    Section 4.01 Notices. Notices are governed by Article II.

    ANNEX A
    FORMS

    The forms.

    ANNEX B
    RATES

    The rates.
"""


def test_a_labelled_section_wins_over_a_bare_list_number():
    # inline example: "Section 2" names the provision labelled "Section 2", not a numbered
    # list item "2." elsewhere; "clause 2" (no provision labelled "Clause 2") stays ambiguous
    doc = hand(("p1", "Section 1", None, "see Section 2 and clause 2"), ("p2", "1", "p1", ""),
               ("p3", "2", "p1", ""), ("p4", "Section 2", None, ""))
    text = doc.provisions[0].text
    section, clause = (resolve(r, doc, within=doc.provisions[0])[0] for r in find_references(text))
    assert section.target == "p4"
    assert clause.status == "ambiguous" and clause.candidates == ("p3", "p4")


def test_roman_articles_sections_and_annexes():
    # inline example agreement (invented): articles in roman figures, sections, annexes
    doc = agreement(ARTICLES)
    got = {(w, n): doc.provision(res.target) for _p, w, n, res in resolutions(doc)
           if res.status == "found"}
    assert got[("Article IV", "IV")].number == "ARTICLE IV"
    assert got[("Article 3", "3")].number == "ARTICLE III"  # by value
    assert got[("Section 4", "4")].number == "ARTICLE IV"  # a section number names the article
    assert got[("Annex B", "B")].number == "ANNEX B"
    assert got[("Sections 2.01 through 2.02", "2.02")].number == "Section 2.02"
    assert {res.status for *_x, res in resolutions(doc)} == {"found"}


# ----------------------------------------------------------------------------------------
# Renumbering
# ----------------------------------------------------------------------------------------

def check_at(doc: Document, edits, issues=()) -> None:
    """Every edit's block span shows exactly the words it replaces (core.model's segment
    invariant); every issue's block span shows the reference's words."""
    for e in edits:
        assert e.at is not None, e
        assert doc.blocks[e.at.block].text[e.at.start:e.at.end] == e.old
    for i in issues:
        assert i.at is not None and doc.blocks[i.at.block].text[i.at.start:i.at.end] == i.words


def top_level(doc: Document, first: int, shift: int) -> dict[str, str | None]:
    """New numbers when *shift* clauses are inserted before top-level clause *first*."""
    return {p.id: str(int(p.number) + shift) for p in doc.provisions
            if p.level == 1 and p.kind == "clause" and p.number and p.number.isdigit()
            and int(p.number) >= first}


def test_mpl_insert_a_section():
    # mpl-2.0.LICENSE with a new section inserted after section 3: sections 4 ... 10 become
    # 5 ... 11.  By hand, the references to them are line 164 "Section 10.2", line 283
    # "Sections 5.1 or 5.2" and line 356 "Section 10.3": four numbers change.
    doc = licence("mpl-2.0")
    edits, issues = renumber_references(doc, top_level(doc, 4, 1))
    assert [(e.old, e.new, e.reason) for e in edits] == [
        ("10.2", "11.2", "Section 10.2 is now Section 11.2"),
        ("5.1", "6.1", "Section 5.1 is now Section 6.1"),
        ("5.2", "6.2", "Section 5.2 is now Section 6.2"),
        ("10.3", "11.3", "Section 10.3 is now Section 11.3"),
    ]
    assert issues == ()
    assert [e.target for e in edits] == [provision(doc, n).id for n in ("10.2", "5.1", "5.2", "10.3")]
    check_at(doc, edits)


def test_mpl_insert_a_sub_section():
    # mpl-2.0.LICENSE with a new 3.3 inserted: 3.3, 3.4, 3.5 become 3.4, 3.5, 3.6.  By hand:
    # line 158 "Section 3.4", line 165 "Section 3.3", line 181 "... 3.3, and 3.4".
    doc = licence("mpl-2.0")
    new = {provision(doc, f"3.{k}").id: f"3.{k + 1}" for k in (3, 4, 5)}
    edits, issues = renumber_references(doc, new)
    assert [(e.old, e.new) for e in edits] == [("3.4", "3.5"), ("3.3", "3.4"), ("3.3", "3.4"),
                                               ("3.4", "3.5")]
    assert issues == ()
    assert [e.provision for e in edits] == [provision(doc, n).id
                                            for n in ("2.3(c)", "2.4", "2.7", "2.7")]
    check_at(doc, edits)


def test_mpl_remove_a_sub_section():
    # mpl-2.0.LICENSE without 3.3 (3.4, 3.5 become 3.3, 3.4): the references to 3.3 (line 165
    # and line 181) become issues; those to 3.4 (lines 158 and 181) are renumbered.
    doc = licence("mpl-2.0")
    new = {provision(doc, "3.3").id: None, provision(doc, "3.4").id: "3.3",
           provision(doc, "3.5").id: "3.4"}
    edits, issues = renumber_references(doc, new)
    assert [(e.old, e.new) for e in edits] == [("3.4", "3.3"), ("3.4", "3.3")]
    assert [(i.words, i.number, i.kind) for i in issues] == [
        ("Section 3.3", "3.3", "gone"), ("Sections 3.1, 3.2, 3.3, and 3.4", "3.3", "gone")]
    assert all("Distribution of a Larger Work" in i.why for i in issues)
    assert {i.kind for i in issues} <= set(ISSUE_KINDS)
    check_at(doc, edits, issues)


def test_gpl_renumbering_reaches_headings_and_run_on_items():
    # gpl-3.0.LICENSE with a new section after 4 (5 ... 17 become 6 ... 18).  By hand, 14
    # numbers change: 10 (l.211), 7 (l.236), 7 (l.254), 7 (l.259), 5 of "sections 4 and 5"
    # (l.283), 6b (l.308), 6d (l.326), 15 and 16 (l.401), 10 (l.424), 11 (l.448), 10 (l.468),
    # and 15 and 16 in the heading of section 17 (l.647).  "section 13" of the GNU Affero
    # General Public License (l.595) is another instrument's and stays.
    doc = licence("gpl-3.0")
    edits, issues = renumber_references(doc, top_level(doc, 5, 1))
    assert [(e.old, e.new) for e in edits] == [
        ("10", "11"), ("7", "8"), ("7", "8"), ("7", "8"), ("5", "6"), ("6", "7"), ("6", "7"),
        ("15", "16"), ("16", "17"), ("10", "11"), ("11", "12"), ("10", "11"), ("15", "16"),
        ("16", "17")]
    assert issues == ()
    sixb = [e for e in edits if e.reason.startswith("subsection 6b")]
    assert [e.reason for e in sixb] == ["subsection 6b is now subsection 7b"]
    assert [e.part for e in edits][-2:] == ["heading", "heading"]
    assert [e.reason for e in edits][-1] == "Section 16 is now Section 17"
    check_at(doc, edits)


def test_only_the_changing_part_of_a_number_is_replaced():
    # inline examples (hand-built documents): "clause 12(b)" -> "clause 13(b)" replaces "12"
    doc = hand(("p1", "12", None, ""), ("p2", "(b)", "p1", "item b"),
               ("p3", "13", None, "as clause 12(b) and Clause 12 say"))
    edits, issues = renumber_references(doc, {"p1": "13", "p3": "14"})
    text = doc.provision("p3").text
    assert [(text[e.start:e.end], e.new, e.reason) for e in edits] == [
        ("12", "13", "clause 12(b) is now clause 13(b)"), ("12", "13", "Clause 12 is now Clause 13")]
    assert apply(text, list(edits)) == "as clause 13(b) and Clause 13 say" and issues == ()
    assert all(e.at is None for e in edits)  # a hand-built document has no blocks
    # "Clause 3.1(a)(ii)" when an item is inserted before (ii): only "(ii)" changes
    doc = hand(("p1", "3.1", None, ""), ("p2", "(a)", "p1", ""), ("p3", "(ii)", "p2", "x"),
               ("p4", "4", None, "under Clause 3.1(a)(ii)"))
    [e], _ = renumber_references(doc, {"p3": "3.1(a)(iii)"})
    assert (e.old, e.new, e.reason) == ("(ii)", "(iii)", "Clause 3.1(a)(ii) is now Clause 3.1(a)(iii)")
    # "Sections 4(a) and (b)": the item continues 4, so only "4" changes
    doc = hand(("p1", "4", None, ""), ("p2", "(a)", "p1", ""), ("p3", "(b)", "p1", ""),
               ("p4", "5", None, "Sections 4(a) and (b) apply"))
    edits, _ = renumber_references(doc, {"p1": "5", "p4": "6"})
    assert apply(doc.provision("p4").text, list(edits)) == "Sections 5(a) and (b) apply"
    # "paragraph (c) above" when an item is inserted before (c)
    doc = hand(("p1", "1", None, ""), ("p2", "(a)", "p1", ""), ("p3", "(b)", "p1", ""),
               ("p4", "(c)", "p1", ""), ("p5", "(d)", "p1", "as paragraph (c) above says"))
    [e], _ = renumber_references(doc, {"p4": "1(d)", "p5": "1(e)"})
    assert (e.old, e.new, e.reason) == ("(c)", "(d)", "paragraph 1(c) is now paragraph 1(d)")


def test_roman_articles_are_renumbered_in_roman():
    # inline example agreement: a new article inserted after Article II
    doc = agreement(ARTICLES)
    arts = {p.number: p.id for p in doc.provisions if p.number and p.number.startswith("ARTICLE")}
    edits, issues = renumber_references(doc, {arts["ARTICLE III"]: "Article IV",
                                              arts["ARTICLE IV"]: "V"})
    assert [(e.old, e.new, e.reason) for e in edits] == [
        ("IV", "V", "Article IV is now Article V"), ("3", "4", "Article 3 is now Article 4"),
        ("4", "5", "Section 4 is now Section 5")]
    assert issues == ()
    check_at(doc, edits)


def test_parts_by_letter_and_by_roman_figure():
    # inline example: "Part C" is a letter (the third part), "Part II" a roman figure; an
    # item of a named schedule is found inside that schedule
    rows = (("p1", "1", None, "see paragraph (b) of Schedule 2, Part C and Part II"),
            ("p2", "Schedule 2", None, ""), ("p3", "(a)", "p2", ""), ("p4", "(b)", "p2", ""),
            ("p5", "Part C", None, ""), ("p6", "Part II", None, ""))
    provs = tuple(Provision(pid, "schedule" if num.startswith("Schedule") else "clause", num,
                            None, 1, parent, text) for pid, num, parent, text in rows)
    doc = Document("hand.txt", provs, ())
    text = doc.provisions[0].text
    targets = [res.target for r in find_references(text) for res in resolve(r, doc, within=provs[0])]
    assert targets == ["p4", "p2", "p5", "p6"]
    edits, issues = renumber_references(doc, {"p4": "2(c)", "p5": "Part D", "p6": "III"})
    assert apply(text, list(edits)) == "see paragraph (c) of Schedule 2, Part D and Part III"
    assert [e.reason for e in edits] == ["paragraph 2(b) is now paragraph 2(c)",
                                         "Part C is now Part D", "Part II is now Part III"]


def test_a_range_that_changes_width_is_reported():
    # inline example: "Sections 3 to 5" when a new 4 is inserted covers one provision more
    doc = hand(("p1", "3", None, ""), ("p2", "4", None, ""), ("p3", "5", None, ""),
               ("p4", "6", None, "Sections 3 to 5 apply"))
    edits, issues = renumber_references(doc, {"p2": "5", "p3": "6", "p4": "7"})
    assert [(e.old, e.new) for e in edits] == [("5", "6")]
    [issue] = issues
    assert issue.kind == "range" and issue.words == "Sections 3 to 5"
    assert "Section 3 to 5 covered 3 provisions and now covers 4" in issue.why
    # all three move together: the range keeps its width, no issue
    edits, issues = renumber_references(doc, {"p1": "4", "p2": "5", "p3": "6", "p4": "7"})
    assert apply(doc.provision("p4").text, list(edits)) == "Sections 4 to 6 apply" and issues == ()


def test_ambiguous_missing_and_external_references():
    # inline examples: ambiguous and missing references are issues; external ones stay
    doc = hand(("p1", "1", None, "see paragraph (c), clause 99 and Section 2 of the Act"),
               ("p2", "(c)", "p1", ""), ("p3", "(c)", "p1", ""), ("p4", "2", None, ""))
    edits, issues = renumber_references(doc, {"p4": "3"})
    assert edits == ()
    assert [(i.words, i.kind) for i in issues] == [("paragraph (c)", "ambiguous"),
                                                  ("clause 99", "missing")]


def test_translate_precedent_wording():
    # inline example agreement as the precedent; in the counter-draft a new clause 3 comes
    # before the precedent's clauses 3 and 4, and item 2.1(b) has no counterpart
    doc = agreement(SUPPLY)
    info = build_docinfo(doc)
    full = dict(zip((p.id for p in info.provisions), info.full_number))
    schedule = next(p.id for p in doc.provisions if p.kind == "schedule")

    def number_of(pid: str) -> str | None:
        number = full[pid]
        if number == "2.1(b)":
            return None
        if doc.provision(pid).kind == "schedule" or doc.provision(pid).parent == schedule:
            return number
        head = re.match(r"\d+", number).group()
        return f"{int(head) + 1}{number[len(head):]}" if int(head) >= 3 else number

    within = provision(doc, "2.1(c)")
    out = translate_references(within.text, source_doc=doc, source_provision=within,
                               number_of=number_of)
    assert out.text == ("test the Goods as set out in paragraph 2 of Schedule 1 and clauses 4 to 5.")
    assert [e.reason for e in out.edits] == ["clause 3 of the precedent is clause 4 here",
                                             "clause 4 of the precedent is clause 5 here"]
    within = provision(doc, "2.2")
    out = translate_references(within.text, source_doc=doc, source_provision=within,
                               number_of=number_of)
    assert out.text == within.text and out.edits == ()
    assert [(i.words, i.kind) for i in out.issues] == [("Clause 2.1(b)", "no-counterpart")]
    # identity: nothing to rewrite
    out = translate_references(within.text, source_doc=doc, source_provision=within,
                               number_of=lambda pid: full[pid])
    assert out == type(out)(within.text, (), ())


def test_docx_blocks_locate_every_edit():
    # The invented demo draft, read from .docx through core.docx: a new article inserted
    # before Article 10 ("Article 10" ... "Article 36" become 11 ... 37).  Every typed
    # reference to an article from 10 on, or to one of its sections, is renumbered, and each
    # edit's block span (the paragraph text as the reader gives it) shows its words.
    doc = read_document(str(DEMO / "draft.docx"))
    new = {p.id: f"Article {int(p.number.split()[1]) + 1}" for p in doc.provisions
           if p.number and p.number.startswith("Article") and int(p.number.split()[1]) >= 10}
    edits, issues = renumber_references(doc, new)
    typed = [n.number for *_x, r in refs_in(doc) if r.keyword in ("article", "section")
             for n in r.numbers if int(n.number.split(".")[0]) >= 10]
    assert len(edits) == len(typed) > 10 and issues == ()
    for e, number in zip(edits, typed):
        head, _, rest = number.partition(".")
        assert (e.old, e.new) == (number, f"{int(head) + 1}" + (f".{rest}" if rest else ""))
    check_at(doc, edits)


# ----------------------------------------------------------------------------------------
# Property: renumbering, then finding again, gives the new numbers of the same targets
# ----------------------------------------------------------------------------------------

@settings(max_examples=60, deadline=None)
@given(key=st.sampled_from(["mpl-2.0", "gpl-3.0", "cddl-1.0"]),
       gaps=st.lists(st.integers(0, 3), min_size=20, max_size=20))
def test_random_monotone_renumbering_round_trips(key, gaps):
    doc = licence(key)
    info = build_docinfo(doc)
    full = dict(zip((p.id for p in info.provisions), info.full_number))

    def shift(n: int) -> int:  # strictly increasing: top-level n -> n + inserted before it
        return n + sum(gaps[:n + 1])

    new = {pid: str(shift(int(num))) for pid, num in top_level(doc, 0, 0).items()}
    edits, issues = renumber_references(doc, new)
    assert issues == ()
    check_at(doc, edits)
    by_part: dict[tuple[str, str], list[ReferenceEdit]] = defaultdict(list)
    for e in edits:
        by_part[(e.provision, e.part)].append(e)
    for p in doc.provisions:
        for part, text in (("heading", p.heading or ""), ("text", p.text)):
            before = find_references(text)
            after = find_references(apply(text, by_part[(p.id, part)]))
            assert [r.keyword for r in after] == [r.keyword for r in before]
            for ref, again in zip(before, after):
                assert [n.number for n in again.numbers] == expected(doc, full, shift, ref, p)


def expected(doc, full, shift, ref, within) -> list[str]:
    """The numbers *ref* should carry after the shift: each target's number with its head
    shifted (schedules and other instruments keep theirs)."""
    out = []
    for res in resolve(ref, doc, within=within):
        if res.status == "external" or doc.provision(res.target).kind == "schedule":
            out.append(res.number.number)
            continue
        number = full[res.target] + res.tail
        head = re.match(r"\d+", number).group()
        out.append(f"{shift(int(head))}{number[len(head):]}")
    return out
