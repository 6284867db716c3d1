"""The structure reader against real legal texts from outside the project.

Outside source: the license texts of the PyPI package ``licensedcode-data`` (the ScanCode
license database, installed with the test extra), files
``licensedcode/data/licenses/apache-2.0.LICENSE``, ``gpl-3.0.LICENSE`` and
``mpl-2.0.LICENSE``.  Each file is a YAML front-matter block (ScanCode's metadata, not part
of the license) followed by the license text exactly as published, hard-wrapped plain text
with no formatting at all.  The expected section numbers, headings and defined terms below
were written down by reading those files, not by running our code.

The second half writes the same texts to .docx with real Word auto-numbering
(``core.docx.compose``: the numbers live in numbering.xml, not in the paragraph text) and
checks that reading the .docx gives the same provisions as reading the plain text.
"""

from __future__ import annotations

from functools import cache

import pytest

from core.docx.compose import ComposeParagraph, compose_docx
from core.model import Document
from core.reader import read_document, read_text
from core.structure import parse_label
from tests.support.document_checks import check_document
from tests.support.legal_texts import license_text


@cache
def license_doc(name: str) -> Document:
    doc = read_text(license_text(name), source=f"{name}.txt")
    check_document(doc)
    return doc


def top_sections(doc: Document) -> list[tuple[str, str | None]]:
    """(number, heading) of the numbered top-level clauses (level 1, not schedules)."""
    return [(p.number, p.heading) for p in doc.provisions  # type: ignore[misc]
            if p.kind in ("clause", "definition") and p.level == 1]


def children(doc: Document, pid: str) -> list[tuple[str | None, str | None]]:
    return [(p.number, p.heading) for p in doc.provisions if p.parent == pid and p.number is not None]


def by_number(doc: Document, number: str, level: int):
    [p] = [p for p in doc.provisions if p.number == number and p.level == level]
    return p


def normalise(text: str) -> str:
    return " ".join(text.split())


# --------------------------------------------------------------------------------------
# Apache License 2.0 (licensedcode-data: apache-2.0.LICENSE)
# --------------------------------------------------------------------------------------

# Read from apache-2.0.LICENSE: "TERMS AND CONDITIONS FOR USE, REPRODUCTION, AND
# DISTRIBUTION" followed by sections "1. Definitions." to "9. Accepting Warranty or
# Additional Liability. ...", then "END OF TERMS AND CONDITIONS" and the APPENDIX.
APACHE_SECTIONS = [
    ("1", "Definitions"),
    ("2", "Grant of Copyright License"),
    ("3", "Grant of Patent License"),
    ("4", "Redistribution"),
    ("5", "Submission of Contributions"),
    ("6", "Trademarks"),
    ("7", "Disclaimer of Warranty"),
    ("8", "Limitation of Liability"),
    ("9", "Accepting Warranty or Additional Liability"),
]
# Section 1 of apache-2.0.LICENSE has 10 definition paragraphs, each starting with a quoted
# term and "shall mean" (counted by hand): License, Licensor, Legal Entity, You (written
# "You" (or "Your")), Source, Object, Work, Derivative Works, Contribution, Contributor.
APACHE_DEFINITION_PARAGRAPHS = [
    "License", "Licensor", "Legal Entity", "You", "Source", "Object", "Work",
    "Derivative Works", "Contribution", "Contributor",
]
# Inside those paragraphs three more terms are defined (counted by hand): the alternative
# form "Your" ("You" (or "Your") shall mean), "control" (in Legal Entity: "For the purposes
# of this definition, "control" means ...") and "submitted" (in Contribution: ""submitted"
# means any form of ..."). 10 + 3 = 13 defined terms in the definitions section.
APACHE_TERMS_IN_SECTION_1 = [  # "Your" is an alias of "You": '"You" (or "Your") shall mean'
    "License", "Licensor", "Legal Entity", "control", "You", "Source", "Object",
    "Work", "Derivative Works", "Contribution", "submitted", "Contributor",
]


def test_apache_splits_into_exactly_sections_1_to_9_with_their_headings():
    doc = license_doc("apache-2.0")
    assert top_sections(doc) == APACHE_SECTIONS


def test_apache_title_preamble_and_appendix():
    doc = license_doc("apache-2.0")
    first = doc.provisions[0]
    assert first.kind == "title"
    assert first.text.split("\n")[:2] == ["Apache License", "Version 2.0, January 2004"]
    terms_heading = doc.provisions[1]
    assert terms_heading.heading == "TERMS AND CONDITIONS FOR USE, REPRODUCTION, AND DISTRIBUTION"
    section_1 = by_number(doc, "1", 1)
    assert section_1.parent == terms_heading.id
    appendix = doc.provisions[-1]
    assert appendix.kind == "schedule" and appendix.number == "APPENDIX"
    assert appendix.heading == "How to apply the Apache License to your work"


def test_apache_section_4_has_items_a_to_d_under_it():
    doc = license_doc("apache-2.0")
    section_4 = by_number(doc, "4", 1)
    assert children(doc, section_4.id) == [("(a)", None), ("(b)", None), ("(c)", None), ("(d)", None)]
    item_a = by_number(doc, "(a)", 2)
    # apache-2.0.LICENSE, 4(a), rewrapped:
    assert item_a.text == ("You must give any other recipients of the Work or Derivative Works "
                           "a copy of this License; and")
    # Section 4's own words: the lead-in sentence only, without heading or items.
    assert section_4.text == ("You may reproduce and distribute copies of the Work or Derivative "
                              "Works thereof in any medium, with or without modifications, and in "
                              "Source or Object form, provided that You meet the following "
                              "conditions:")


def test_apache_definitions_section_yields_each_defined_term():
    doc = license_doc("apache-2.0")
    section_1 = by_number(doc, "1", 1)
    definitions = [p for p in doc.provisions if p.kind == "definition"]
    assert [p.term for p in definitions] == APACHE_DEFINITION_PARAGRAPHS
    assert len(definitions) == 10
    assert all(p.parent == section_1.id for p in definitions)
    # apache-2.0.LICENSE, the Licensor definition, rewrapped:
    [licensor] = [p for p in definitions if p.term == "Licensor"]
    assert licensor.text == ('"Licensor" shall mean the copyright owner or entity authorized by '
                             'the copyright owner that is granting the License.')

    in_section_1 = {p.id for p in definitions}
    terms = [t for t in doc.terms if t.provision in in_section_1]
    assert [t.term for t in terms] == APACHE_TERMS_IN_SECTION_1
    assert len(terms) == 12
    [you] = [t for t in terms if t.term == "You"]
    assert you.aliases == ("Your",)
    assert normalise(you.definition).startswith('"You" (or "Your") shall mean an individual or Legal Entity')
    [control] = [t for t in terms if t.term == "control"]
    assert control.definition.startswith('For the purposes of this definition, "control" means (i) the power')


def test_apache_term_uses_are_counted_outside_the_definition():
    doc = license_doc("apache-2.0")
    uses = {t.term: t.uses for t in doc.terms}
    # Counted by hand in apache-2.0.LICENSE outside the "Licensor" definition paragraph:
    # "Licensor" appears in the Contribution definition (3 times: "submitted to Licensor",
    # "to the Licensor or its representatives", "the Licensor for the purpose"), the
    # Contributor definition (2: "mean Licensor and", "received by Licensor"), section 5
    # (2: "to the Licensor shall be", "with Licensor regarding"), section 6 (1) and
    # section 7 (1) = 9.
    assert uses["Licensor"] == 9
    # "Legal Entity" appears in the You, Contribution and Contributor definitions = 3.
    assert uses["Legal Entity"] == 3


# --------------------------------------------------------------------------------------
# GNU GPL version 3 (licensedcode-data: gpl-3.0.LICENSE)
# --------------------------------------------------------------------------------------

# Read from gpl-3.0.LICENSE, "TERMS AND CONDITIONS", sections "0. Definitions." to
# "17. Interpretation of Sections 15 and 16.".
GPL_SECTIONS = [
    ("0", "Definitions"),
    ("1", "Source Code"),
    ("2", "Basic Permissions"),
    ("3", "Protecting Users' Legal Rights From Anti-Circumvention Law"),
    ("4", "Conveying Verbatim Copies"),
    ("5", "Conveying Modified Source Versions"),
    ("6", "Conveying Non-Source Forms"),
    ("7", "Additional Terms"),
    ("8", "Termination"),
    ("9", "Acceptance Not Required for Having Copies"),
    ("10", "Automatic Licensing of Downstream Recipients"),
    ("11", "Patents"),
    ("12", "No Surrender of Others' Freedom"),
    ("13", "Use with the GNU Affero General Public License"),
    ("14", "Revised Versions of this License"),
    ("15", "Disclaimer of Warranty"),
    ("16", "Limitation of Liability"),
    ("17", "Interpretation of Sections 15 and 16"),
]


def test_gpl3_terms_and_conditions_split_into_sections_0_to_17_with_their_headings():
    doc = license_doc("gpl-3.0")
    assert top_sections(doc) == GPL_SECTIONS
    [terms] = [p for p in doc.provisions if p.heading == "TERMS AND CONDITIONS"]
    assert all(by_number(doc, n, 1).parent == terms.id for n, _h in GPL_SECTIONS)


def test_gpl3_preamble_and_lettered_conditions():
    doc = license_doc("gpl-3.0")
    assert doc.provisions[0].kind == "title"
    assert doc.provisions[0].text.startswith("GNU GENERAL PUBLIC LICENSE\nVersion 3, 29 June 2007")
    [preamble] = [p for p in doc.provisions if p.heading == "Preamble"]
    assert preamble.kind == "other" and preamble.text.startswith("The GNU General Public License is a free")
    # gpl-3.0.LICENSE: conditions a) to d) in section 5, a) to e) in 6, a) to f) in 7.
    for section, letters in (("5", "abcd"), ("6", "abcde"), ("7", "abcdef")):
        sec = by_number(doc, section, 1)
        assert children(doc, sec.id) == [(f"{c})", None) for c in letters]
    # 5 b) wraps a line that starts "7.  This requirement ...": still one paragraph.
    [b5] = [p for p in doc.provisions if p.parent == by_number(doc, "5", 1).id and p.number == "b)"]
    assert b5.text.endswith('section 7.  This requirement modifies the requirement in section 4 to '
                            '"keep intact all notices".')


def test_gpl3_definitions_in_section_0():
    doc = license_doc("gpl-3.0")
    section_0 = by_number(doc, "0", 1)
    defs = [p.term for p in doc.provisions if p.kind == "definition" and p.parent == section_0.id]
    # gpl-3.0.LICENSE section 0: "This License" refers to; "Copyright" also means; "The
    # Program" refers to; To "modify" a work means; A "covered work" means; To "propagate" a
    # work means; To "convey" a work means.  (The leading "The" of "The Program" is not part
    # of the term: the text says "the Program" everywhere else.)
    assert defs == ["This License", "Copyright", "Program", "modify", "covered work", "propagate", "convey"]


# --------------------------------------------------------------------------------------
# Mozilla Public License 2.0 (licensedcode-data: mpl-2.0.LICENSE)
# --------------------------------------------------------------------------------------

# Read from mpl-2.0.LICENSE: sections 1-10 (headings underlined with dashes; 6 and 7 framed
# in asterisk boxes), sub-sections "1.1." ... with or without headings, Exhibits A and B.
MPL_SECTIONS = [
    ("1", "Definitions"),
    ("2", "License Grants and Conditions"),
    ("3", "Responsibilities"),
    ("4", "Inability to Comply Due to Statute or Regulation"),
    ("5", "Termination"),
    ("6", "Disclaimer of Warranty"),
    ("7", "Limitation of Liability"),
    ("8", "Litigation"),
    ("9", "Miscellaneous"),
    ("10", "Versions of the License"),
]
MPL_SUBSECTIONS = {
    "1": [(f"1.{i}", None) for i in range(1, 15)],
    "2": [("2.1", "Grants"), ("2.2", "Effective Date"), ("2.3", "Limitations on Grant Scope"),
          ("2.4", "Subsequent Licenses"), ("2.5", "Representation"), ("2.6", "Fair Use"),
          ("2.7", "Conditions")],
    "3": [("3.1", "Distribution of Source Form"), ("3.2", "Distribution of Executable Form"),
          ("3.3", "Distribution of a Larger Work"), ("3.4", "Notices"),
          ("3.5", "Application of Additional Terms")],
    "4": [],
    "5": [("5.1", None), ("5.2", None), ("5.3", None)],
    "6": [], "7": [], "8": [], "9": [],
    "10": [("10.1", "New Versions"), ("10.2", "Effect of New Versions"), ("10.3", "Modified Versions"),
           ("10.4", "Distributing Source Code Form that is Incompatible With Secondary Licenses")],
}
# mpl-2.0.LICENSE 1.1 to 1.14, each "1.n. "Term"" then "means ...".
MPL_DEFINED = [
    "Contributor", "Contributor Version", "Contribution", "Covered Software",
    "Incompatible With Secondary Licenses", "Executable Form", "Larger Work", "License",
    "Licensable", "Modifications", "Patent Claims", "Secondary License", "Source Code Form", "You",
]


def test_mpl2_splits_into_its_numbered_sections_and_subsections():
    doc = license_doc("mpl-2.0")
    assert top_sections(doc) == MPL_SECTIONS
    for number, subs in MPL_SUBSECTIONS.items():
        sec = by_number(doc, number, 1)
        assert children(doc, sec.id) == subs, number
        assert all(by_number(doc, n, 2).level == 2 for n, _h in subs)


def test_mpl2_definitions_boxes_and_exhibits():
    doc = license_doc("mpl-2.0")
    defs = [p for p in doc.provisions if p.kind == "definition"]
    assert [p.term for p in defs] == MPL_DEFINED
    assert [p.number for p in defs] == [f"1.{i}" for i in range(1, 15)]
    # The boxed section 6 is read without its frame (mpl-2.0.LICENSE, section 6, rewrapped).
    six = by_number(doc, "6", 1)
    assert six.text.startswith('Covered Software is provided under this License on an "as is" basis, '
                               'without warranty of any kind')
    assert "*" not in six.text
    # 1.5 has (a) and (b) under it.
    assert children(doc, by_number(doc, "1.5", 2).id) == [("(a)", None), ("(b)", None)]
    exhibits = [(p.number, p.heading) for p in doc.provisions if p.kind == "schedule"]
    assert exhibits == [("Exhibit A", "Source Code Form License Notice"),
                        ("Exhibit B", '"Incompatible With Secondary Licenses" Notice')]


@pytest.mark.parametrize("name", ["apache-2.0", "gpl-3.0", "mpl-2.0"])
def test_the_text_file_reads_like_the_text(name, tmp_path):
    path = tmp_path / f"{name}.txt"
    path.write_bytes(license_text(name).replace("\n", "\r\n").encode("utf-8"))
    from_file = read_document(str(path))
    check_document(from_file)
    assert from_file.provisions == license_doc(name).provisions


# --------------------------------------------------------------------------------------
# The same texts as .docx with real auto-numbering give the same provisions
# --------------------------------------------------------------------------------------

# Numbering of each license as Word lists: (numFmt, lvlText) per level (ECMA-376 Part 1,
# §17.9.6-§17.9.11), and which level each literal label goes to.  The GPL's section 0
# cannot be produced by a list starting at 1, so it gets a one-level list whose lvlText is
# the literal "0." (a level text without a %n placeholder, §17.9.11).
DOCX_LISTS = {
    "apache-2.0": ({"main": [("decimal", "%1."), ("lowerLetter", "(%2)")]},
                   {"dec": 0, "paren-lower-letter": 1}),
    "gpl-3.0": ({"main": [("decimal", "%1."), ("lowerLetter", "%2)")], "zero": [("decimal", "0.")]},
                {"dec": 0, "close-lower-letter": 1}),
    "mpl-2.0": ({"main": [("decimal", "%1."), ("decimal", "%1.%2."), ("lowerLetter", "(%3)")]},
                {"dec": None, "paren-lower-letter": 2}),
}


def as_docx(doc: Document, name: str) -> tuple[bytes, int]:
    """The blocks of *doc* as a .docx: literal labels moved into Word auto-numbering."""
    lists, levels = DOCX_LISTS[name]
    paragraphs = []
    numbered = 0
    for b in doc.blocks:
        label = parse_label(b.text)
        if label is not None and label.scheme in levels:
            level = levels[label.scheme]
            if level is None:  # MPL: 1. / 1.1. by dotted depth
                level = len(label.comps or ()) - 1
            list_name = "zero" if label.number == "0" else "main"
            paragraphs.append(ComposeParagraph(b.text[label.end:].strip(), level=0 if list_name == "zero" else level,
                                               list=list_name, bold=b.emphasised))
            numbered += 1
        else:
            paragraphs.append(ComposeParagraph(b.text, bold=b.emphasised))
    return compose_docx(paragraphs, lists=lists), numbered


@pytest.mark.parametrize("name", ["apache-2.0", "gpl-3.0", "mpl-2.0"])
def test_the_same_text_as_docx_with_auto_numbering_gives_the_same_provisions(name, tmp_path):
    plain = license_doc(name)
    data, numbered = as_docx(plain, name)
    path = tmp_path / f"{name}.docx"
    path.write_bytes(data)
    docx_doc = read_document(str(path))
    check_document(docx_doc)
    # The numbers really are auto-numbers: labels come from numbering.xml, not the text.
    auto = [b for b in docx_doc.blocks if b.label is not None]
    assert len(auto) == numbered > 0
    assert all(parse_label(b.text) is None or parse_label(b.text).family == "kw" for b in auto)

    def shape(d: Document):
        return [(p.number, p.heading, p.level, p.kind, p.text, p.term) for p in d.provisions]

    assert shape(docx_doc) == shape(plain)
    assert [(t.term, t.uses) for t in docx_doc.terms] == [(t.term, t.uses) for t in plain.terms]
