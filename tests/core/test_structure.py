"""Tests of core.structure: labels, levels, headings, kinds and the segments invariant.

Most documents here are built by hand (invented parties and places), as Blocks the way the
.docx reader produces them (auto-number labels outside the text, lead-ins, heading styles)
or as plain text.  Drafting conventions used as expectations (clause numbering "1." /
"1.1" / "(a)" / "(i)", run-in headings, definitions sections, signature blocks) are common
practice in English-language commercial agreements, no source.  The real-text checks
against an outside source are in test_license_texts.py.
"""

from __future__ import annotations

from dataclasses import replace

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from core.model import Block, Document
from core.reader import document_from_blocks, read_text
from core.structure import is_title_case, parse_label, split_provisions
from tests.support.document_checks import check_document


def doc_of(*blocks: Block) -> Document:
    """A document of hand-built blocks (indices assigned in order)."""
    doc = document_from_blocks(tuple(replace(b, index=i) for i, b in enumerate(blocks)), source="hand.docx")
    check_document(doc)
    return doc


def B(text: str, **kw) -> Block:
    return Block(index=0, text=text, **kw)


def text_doc(text: str, **kw) -> Document:
    doc = read_text(text, **kw)
    check_document(doc)
    return doc


def outline(doc: Document) -> list[tuple]:
    return [(p.kind, p.number, p.heading, p.level) for p in doc.provisions]


def parent_number(doc: Document, pid: str | None) -> str | None:
    return doc.provision(pid).number if pid else None


# --------------------------------------------------------------------------------------
# Labels
# --------------------------------------------------------------------------------------

@pytest.mark.parametrize("text, number, family", [
    ("7. Limitation", "7", "dec"),
    ("7.2 The Supplier", "7.2", "dec"),
    ("7.2. The Supplier", "7.2", "dec"),
    ("7.2.1\tThe Supplier", "7.2.1", "dec"),
    ("12\tPrice", "12", "dec"),
    ("(a) the Goods", "(a)", "list"),
    ("(iv) any loss", "(iv)", "list"),
    ("(A) The Supplier", "(A)", "list"),
    ("(12) twelve", "(12)", "list"),
    ("a) Convey the object code", "a)", "list"),
    ("1) first", "1)", "list"),
    ("A. The Supplier", "A", "list"),
    ("Article IV", "Article IV", "kw"),
    ("ARTICLE 4 - PRICE", "ARTICLE 4", "kw"),
    ("Section 3. Payment. The Customer", "Section 3", "kw"),
    ("Clause 12 Governing Law", "Clause 12", "kw"),
    ("Schedule 2", "Schedule 2", "sched"),
    ("SCHEDULE 1 - THE SERVICES", "SCHEDULE 1", "sched"),
    ("Exhibit A - Notice", "Exhibit A", "sched"),
    ("APPENDIX: How to apply", "APPENDIX", "sched"),
    ("Part B", "Part B", "kw"),
])
def test_literal_labels(text, number, family):
    label = parse_label(text)
    assert label is not None, text
    assert (label.number, label.family) == (number, family)


@pytest.mark.parametrize("text", [
    "30 days after delivery",
    "2.5 million units shall be delivered",
    "section 4 applies",
    "Schedule 2 sets out the Services.",
    "Section 2.1 of this License shall terminate.",
    "(the Supplier) shall",
    "Mr. Tollin shall sign",
    "No. 5 of the list",
    "The Supplier shall",
    "Schedule of Rates",
    "",
    "   ",
])
def test_not_labels(text):
    assert parse_label(text) is None


def test_auto_labels_must_be_labels_end_to_end():
    assert parse_label("7.2.", auto=True).number == "7.2"
    assert parse_label("(a)", auto=True).scheme == "paren-lower-letter"
    assert parse_label("Article IV", auto=True).comps == (4,)
    assert parse_label("Section 1.1", auto=True).comps == (1, 1)
    assert parse_label("7.2 The", auto=True) is None


def test_title_case():
    assert is_title_case("Limitation of Liability".split())
    assert is_title_case("Protecting Users' Legal Rights From Anti-Circumvention Law".split())
    assert not is_title_case("The rights granted under this".split())
    assert not is_title_case("of Liability".split())


# --------------------------------------------------------------------------------------
# Levels and parents
# --------------------------------------------------------------------------------------

def test_dotted_numbers_nest_by_prefix_and_lists_under_the_current_clause():
    doc = text_doc("1. Supply\n7.1 The Supplier shall:\n(a) deliver;\n(i) on time;\n(ii) in full; and\n"
                   "(b) install.\n7.2 The next clause applies.\n7.2.1 A deeper one.\n8. Price\n")
    got = [(p.number, p.level, parent_number(doc, p.parent)) for p in doc.provisions if p.number]
    assert got == [
        ("1", 1, None), ("7.1", 2, None), ("(a)", 3, "7.1"), ("(i)", 4, "(a)"), ("(ii)", 4, "(a)"),
        ("(b)", 3, "7.1"), ("7.2", 2, None), ("7.2.1", 3, "7.2"), ("8", 1, None),
    ]


def test_roman_or_letter_is_resolved_by_context():
    letters = "abcdefghijklmnopqrstuvwxyz"
    lines = ["1. Interpretation"] + [f"({c}) item {c};" for c in letters[:24]]  # (a)..(x)
    doc = text_doc("\n".join(lines))
    items = [p for p in doc.provisions if p.number and p.number.startswith("(")]
    # (i), (v) and (x) continue the letter list: all 24 items are siblings at level 2.
    assert [p.number for p in items] == [f"({c})" for c in letters[:24]]
    assert {p.level for p in items} == {2}
    assert {p.parent for p in items} == {doc.provisions[0].id}

    doc = text_doc("1. Sale\n(a) the Goods:\n(i) first;\n(ii) second;\n(iii) third;\n(iv) fourth;\n"
                   "(v) fifth;\n(b) the Services.")
    got = [(p.number, p.level) for p in doc.provisions if p.number]
    assert got == [("1", 1), ("(a)", 2), ("(i)", 3), ("(ii)", 3), ("(iii)", 3), ("(iv)", 3),
                   ("(v)", 3), ("(b)", 2)]


def test_articles_sections_and_parts():
    doc = text_doc("Part A General\nArticle I\nDEFINITIONS\nSection 1.1 Words. Words mean words.\n"
                   "Section 1.2 More words.\n(a) a thing.\nArticle II Price\nSection 2.1 The price.\n")
    got = [(p.number, p.heading, p.level, parent_number(doc, p.parent)) for p in doc.provisions]
    assert got == [
        ("Part A", "General", 1, None),
        ("Article I", "DEFINITIONS", 2, "Part A"),
        ("Section 1.1", "Words", 3, "Article I"),
        ("Section 1.2", None, 3, "Article I"),
        ("(a)", None, 4, "Section 1.2"),
        ("Article II", "Price", 2, "Part A"),
        ("Section 2.1", None, 3, "Article II"),
    ]


def test_auto_numbered_paragraphs_nest_by_list_level_even_when_labels_look_flat():
    # A list whose level 1 shows "%2." ("1.", "2.") under level 0 "%1.": only w:ilvl tells.
    doc = doc_of(
        B("Definitions", label="1.", list_id="7", list_level=0, emphasised=True),
        B("Words have meanings.", label="1.", list_id="7", list_level=1),
        B("Other words too.", label="2.", list_id="7", list_level=1),
        B("Price", label="2.", list_id="7", list_level=0, emphasised=True),
        B("The price is fixed.", label="1.", list_id="7", list_level=1),
    )
    got = [(p.number, p.heading, p.level, parent_number(doc, p.parent), p.text) for p in doc.provisions]
    assert got == [
        ("1", "Definitions", 1, None, ""),
        ("1", None, 2, "1", "Words have meanings."),
        ("2", None, 2, "1", "Other words too."),
        ("2", "Price", 1, None, ""),
        ("1", None, 2, "2", "The price is fixed."),
    ]


def test_schedule_has_its_own_numbering_under_it():
    doc = text_doc("1. Supply\nThe Supplier supplies.\nSCHEDULE 1\nSERVICE LEVELS\n1. Availability\n"
                   "1.1 The service is available.\nSchedule 2 - Prices\n1. Fees\n")
    got = [(p.kind, p.number, p.heading, p.level, parent_number(doc, p.parent)) for p in doc.provisions]
    assert got == [
        ("clause", "1", "Supply", 1, None),
        ("schedule", "SCHEDULE 1", "SERVICE LEVELS", 1, None),
        ("clause", "1", "Availability", 2, "SCHEDULE 1"),
        ("clause", "1.1", None, 3, "1"),
        ("schedule", "Schedule 2", "Prices", 1, None),
        ("clause", "1", "Fees", 2, "Schedule 2"),
    ]


# --------------------------------------------------------------------------------------
# Headings and text
# --------------------------------------------------------------------------------------

def test_run_in_heading_from_text_cues_and_from_the_lead():
    doc = doc_of(
        B("7. Limitation of Liability. The Supplier's liability is capped."),
        B("Limitation of Liability. The Supplier's liability is capped.", label="8.", list_id="1",
          list_level=0, lead="Limitation of Liability."),
        B("9.\tPayment: The Customer pays.", lead="9.\tPayment:"),
        B("10. Confidentiality – Each party keeps secrets."),
        B("11. If the Customer fails to pay, interest accrues."),
        B("12. In this Agreement: words mean things."),
    )
    got = [(p.number, p.heading, p.text) for p in doc.provisions]
    assert got == [
        ("7", "Limitation of Liability", "The Supplier's liability is capped."),
        ("8", "Limitation of Liability", "The Supplier's liability is capped."),
        ("9", "Payment", "The Customer pays."),
        ("10", "Confidentiality", "Each party keeps secrets."),
        ("11", None, "If the Customer fails to pay, interest accrues."),
        ("12", None, "In this Agreement: words mean things."),
    ]


def test_heading_only_lines_and_heading_styles():
    doc = doc_of(
        B("Limitation of Liability", label="7.", list_id="1", list_level=0, style="Heading 1", outline_level=1),
        B("The Supplier's total liability is capped at the fees paid.", label="7.1", list_id="1", list_level=1),
        B("Unnumbered paragraphs after it belong to it."),
        B("PAYMENT", label="8.", list_id="1", list_level=0),
        B("Within 30 days.", label="8.1", list_id="1", list_level=1),
    )
    got = [(p.number, p.heading, p.text) for p in doc.provisions]
    assert got == [
        ("7", "Limitation of Liability", ""),
        ("7.1", None, "The Supplier's total liability is capped at the fees paid.\n"
                      "Unnumbered paragraphs after it belong to it."),
        ("8", "PAYMENT", ""),
        ("8.1", None, "Within 30 days."),
    ]
    p71 = doc.provisions[1]
    assert [s.block for s in p71.segments] == [1, 2]


def test_unnumbered_headings_enclose_what_follows():
    doc = doc_of(
        B("Master Services Agreement", style="Title", outline_level=0),
        B("Service Levels", style="Heading 1", outline_level=1),
        B("The Supplier meets the service levels.", label="1.", list_id="1", list_level=0),
        B("Exclusions", emphasised=True),
        B("Planned maintenance is excluded from the measurement of availability."),
    )
    got = [(p.kind, p.number, p.heading, p.level, parent_number(doc, p.parent), p.text) for p in doc.provisions]
    assert got == [
        ("title", None, None, 0, None, "Master Services Agreement"),
        ("other", None, "Service Levels", 0, None, ""),
        ("clause", "1", None, 1, None, "The Supplier meets the service levels."),
        ("other", None, "Exclusions", 0, None,
         "Planned maintenance is excluded from the measurement of availability."),
    ]
    assert doc.provisions[2].parent == doc.provisions[1].id


def test_heading_styles_nest_by_outline_level():
    doc = doc_of(
        B("SERVICES AGREEMENT", style="Title", outline_level=0),
        B("General Terms", style="Heading 1", outline_level=1),
        B("Payment", style="Heading 2", outline_level=2),
        B("The Customer pays monthly.", label="1.", list_id="1", list_level=0),
        B("Delivery", style="Heading 2", outline_level=2),
        B("Special Terms", style="Heading 1", outline_level=1),
    )
    got = [(p.heading or p.number, parent_number(doc, p.parent) if p.parent and doc.provision(p.parent).number
            else (doc.provision(p.parent).heading if p.parent else None)) for p in doc.provisions[1:]]
    assert got == [
        ("General Terms", None),
        ("Payment", "General Terms"),
        ("1", "Payment"),
        ("Delivery", "General Terms"),
        ("Special Terms", None),
    ]


def test_a_sub_heading_between_sub_clauses_does_not_break_the_numbering():
    doc = text_doc("7. Liability\n7.1 The cap is the fees paid in the year.\nExclusions\n"
                   "The cap does not apply to fraud or to death or personal injury.\n"
                   "7.2 Indirect loss is excluded.\n")
    got = [(p.number, p.heading, p.level, parent_number(doc, p.parent)) for p in doc.provisions]
    # Without formatting the heading's place is unknown (it closes clause 7), but 7.2 still
    # continues clause 7.
    assert got == [("7", "Liability", 1, None), ("7.1", None, 2, "7"), (None, "Exclusions", 0, None),
                   ("7.2", None, 2, "7")]


def test_plain_text_headings_need_body_text_after_them():
    doc = text_doc("Supply Terms\nThe Supplier shall supply the goods described in the order.\n"
                   "Short Line\nAnother Short Line\n")
    kinds = [(p.kind, p.heading, p.text) for p in doc.provisions]
    assert kinds == [
        ("title", None, "Supply Terms\nThe Supplier shall supply the goods described in the order.\n"
                        "Short Line\nAnother Short Line"),
    ]


@pytest.mark.parametrize("text, number, heading, words", [
    # A run-in heading typed in capitals, no separator (common practice, no source).
    ("11 EXPORT RESTRICTIONS Licensee shall not export the Software.", "11", "EXPORT RESTRICTIONS",
     "Licensee shall not export the Software."),
    ("7. TERM AND TERMINATION This Agreement runs for two years.", "7", "TERM AND TERMINATION",
     "This Agreement runs for two years."),
    ("8.2 FEES & EXPENSES The Customer pays them.", "8.2", "FEES & EXPENSES", "The Customer pays them."),
    # Not headings: an acronym opening the sentence, a whole line in capitals, a recital.
    ("5. GDPR Compliance is required of both parties.", "5", None,
     "GDPR Compliance is required of both parties."),
    ("9. THE SOFTWARE IS PROVIDED AS IS.", "9", "THE SOFTWARE IS PROVIDED AS IS", ""),
    ("3. EXPORT restrictions apply to the Goods.", "3", None, "EXPORT restrictions apply to the Goods."),
])
def test_run_in_headings_in_capitals(text, number, heading, words):
    doc = text_doc(text)
    (prov,) = doc.provisions
    assert (prov.number, prov.heading, prov.text) == (number, heading, words)


def test_run_in_heading_in_capitals_after_an_auto_number():
    doc = doc_of(B("EXPORT RESTRICTIONS Licensee shall comply with export laws.", label="11.",
                   list_id="1", list_level=0))
    assert [(p.number, p.heading, p.text) for p in doc.provisions] == [
        ("11", "EXPORT RESTRICTIONS", "Licensee shall comply with export laws.")]


def test_unnumbered_run_in_heading_in_capitals_starts_a_provision():
    doc = text_doc("1. Supply\nThe Supplier supplies the Goods.\n"
                   "CONFIDENTIALITY Each party keeps the other's secrets.\n")
    assert [(p.number, p.heading, p.text) for p in doc.provisions] == [
        ("1", "Supply", "The Supplier supplies the Goods."),
        (None, "CONFIDENTIALITY", "Each party keeps the other's secrets."),
    ]


@pytest.mark.parametrize("text, number, rest", [
    # A renumbered label glued to its heading (common practice, no source).
    ("2.Scope", "2", "Scope"),
    ("3.1.Definitions", "3.1", "Definitions"),
    ("12.Governing Law. This Agreement is governed by the law of Wexmoor.", "12",
     "Governing Law. This Agreement is governed by the law of Wexmoor."),
])
def test_glued_labels(text, number, rest):
    label = parse_label(text)
    assert label is not None and label.number == number
    assert text[label.end:] == rest


@pytest.mark.parametrize("text", ["2.5million units", "1.A Scope", "3.1.definitions", "v2.Final"])
def test_not_glued_labels(text):
    assert parse_label(text) is None


def test_glued_labels_nest_and_carry_headings():
    doc = text_doc("2.Scope\n2.1.The Supplier supplies the Goods.\n3.Price\nThe Customer pays.\n")
    got = [(p.number, p.heading, p.level, parent_number(doc, p.parent), p.text) for p in doc.provisions]
    assert got == [("2", "Scope", 1, None, ""),
                   ("2.1", None, 2, "2", "The Supplier supplies the Goods."),
                   ("3", "Price", 1, None, "The Customer pays.")]


def test_lists_in_table_cells_keep_their_labels_under_the_clause():
    """An auto-numbered list inside a table cell is a list under the clause the table
    belongs to (its labels as the reader rendered them: tests/core/docx/test_numbering.py
    checks those against LibreOffice); typed "1." in a cell is cell text; the table's items
    end with the table."""
    doc = doc_of(
        B("Service Levels", label="4.", list_id="1", list_level=0, emphasised=True),
        B("The Supplier meets these levels:", label="4.1", list_id="1", list_level=1),
        B("1.", in_table=True),
        B("Availability of 99.5% each month", label="(a)", list_id="9", list_level=0, in_table=True),
        B("Measured at the gateway", label="(i)", list_id="9", list_level=1, in_table=True),
        B("Response within 4 hours", label="(b)", list_id="9", list_level=0, in_table=True),
        B("2.", in_table=True),
        B("The levels are reviewed each year."),
        B("Price", label="5.", list_id="1", list_level=0, emphasised=True),
    )
    got = [(p.number, p.level, parent_number(doc, p.parent), p.text) for p in doc.provisions]
    assert got == [
        ("4", 1, None, ""),
        ("4.1", 2, "4", "The Supplier meets these levels:\n1.\nThe levels are reviewed each year."),
        ("(a)", 3, "4.1", "Availability of 99.5% each month"),
        ("(i)", 4, "(a)", "Measured at the gateway"),
        ("(b)", 3, "4.1", "Response within 4 hours\n2."),
        ("5", 1, None, ""),
    ]
    # After the table, unnumbered words belong to the clause again, not to the last cell item.
    assert "reviewed" not in doc.provisions[4].text


# --------------------------------------------------------------------------------------
# Kinds: parties, recitals, definitions, signature
# --------------------------------------------------------------------------------------

AGREEMENT = """\
SUPPLY AGREEMENT
This Agreement is dated 4 March 2024 and is made between:
(1) Quillmere Fabrication Limited of 9 Lantern Row, Vellingford (the "Supplier"); and
(2) Osterby Lampworks Limited of 22 Copperkiln Yard, Pellbridge (the "Customer").
WHEREAS the Supplier makes lamp housings;
WHEREAS the Customer wishes to buy them.
NOW, THEREFORE, the parties agree as follows:
1. Definitions
In this Agreement:
"Goods" means the lamp housings described in Schedule 1.
“Delivery Date” shall mean the date in the order.
The Delivery Date may be moved by agreement.
‘Price’ has the meaning given in clause 2.
2. Price. The Customer pays the Price.
IN WITNESS WHEREOF the parties have signed this Agreement.
Signed by Mara Tollin for Quillmere Fabrication Limited
SCHEDULE 1 - GOODS
Lamp housings, type QF-200.
"""


def test_kinds_of_a_whole_agreement():
    doc = text_doc(AGREEMENT)
    got = [(p.kind, p.number, p.heading, p.term) for p in doc.provisions]
    assert got == [
        ("title", None, None, None),
        ("parties", None, None, None),
        ("parties", "(1)", None, None),
        ("parties", "(2)", None, None),
        ("recital", None, None, None),
        ("recital", None, None, None),
        ("other", None, None, None),
        ("clause", "1", "Definitions", None),
        ("definition", None, None, "Goods"),
        ("definition", None, None, "Delivery Date"),
        ("definition", None, None, "Price"),
        ("clause", "2", "Price", None),
        ("signature", None, None, None),
        ("schedule", "SCHEDULE 1", "GOODS", None),
    ]
    delivery = doc.provisions[9]
    # the unnumbered paragraph after a definition belongs to it
    assert delivery.text == ("“Delivery Date” shall mean the date in the order.\n"
                             "The Delivery Date may be moved by agreement.")
    assert delivery.parent == doc.provisions[7].id
    assert doc.provisions[7].text == "In this Agreement:"
    assert doc.provisions[12].text.endswith("Signed by Mara Tollin for Quillmere Fabrication Limited")
    assert doc.provisions[13].text == "Lamp housings, type QF-200."


def test_bold_defined_terms_without_quotes_in_a_definitions_section():
    doc = doc_of(
        B("Definitions", label="1.", list_id="1", list_level=0, style="Heading 1", outline_level=1),
        B("Customer means the buyer named above.", lead="Customer"),
        B("Business Day: a day when banks open in Vellingford.", lead="Business Day:"),
        B("“Goods” means lamp housings.", lead="“Goods”"),
        B("Nothing here is a definition.", lead="Nothing"),
    )
    assert [(p.kind, p.term) for p in doc.provisions] == [
        ("clause", None), ("definition", "Customer"), ("definition", "Business Day"),
        ("definition", "Goods"),
    ]
    assert doc.provisions[3].text == "“Goods” means lamp housings.\nNothing here is a definition."


def test_definition_outside_a_definitions_section_needs_the_strong_form():
    doc = text_doc('1. Price\n"Fee" means the fee.\nA "Quiddlet" is a thing.\n')
    assert [(p.kind, p.term) for p in doc.provisions] == [("clause", None), ("definition", "Fee")]


def test_tables_and_bullets_do_not_start_provisions():
    doc = doc_of(
        B("Payment", label="1.", list_id="1", list_level=0, emphasised=True),
        B("1.", in_table=True),
        B("Fees", in_table=True),
        B("Paid monthly in arrears.", bullet=True),
    )
    assert len(doc.provisions) == 1
    assert doc.provisions[0].text == "1.\nFees\nPaid monthly in arrears."


def test_empty_blocks_and_empty_documents():
    assert split_provisions((), source="x") == ()
    doc = doc_of(B(""), B("   "), B("Only words here, nothing else at all."))
    assert [(p.kind, p.text) for p in doc.provisions] == [("other", "Only words here, nothing else at all.")]


def test_ids_are_p1_to_pn_in_document_order():
    doc = text_doc(AGREEMENT)
    assert [p.id for p in doc.provisions] == [f"p{i}" for i in range(1, len(doc.provisions) + 1)]


# --------------------------------------------------------------------------------------
# Property: any text keeps the invariants
# --------------------------------------------------------------------------------------

_LINE = st.one_of(
    st.sampled_from([
        "1. Definitions", "1.1 The Supplier shall:", "(a) deliver;", "(i) on time;", "(ii) in full;",
        "(b) install.", "2. Price. The Customer pays.", "SCHEDULE 1", "Services", "ARTICLE IV",
        '"Goods" means lamps.', "IN WITNESS WHEREOF", "WHEREAS the parties met;", "(A) Background.",
        "Limitation of Liability", "", "   ", "a) item", "Section 3 Payment", "7.2.1\tDeep.",
        "(h) eighth;", "(i) ninth;", "This Agreement is made between:",
    ]),
    st.text(alphabet=st.characters(blacklist_categories=("Cs",)), max_size=40),
)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(_LINE, max_size=25), st.booleans())
def test_any_text_reads_into_a_consistent_document(lines, markdown):
    text = "\n".join(lines)
    if not text.strip():
        return
    try:
        doc = read_text(text, markdown=markdown)
    except Exception as err:  # only the one user-facing error is allowed
        from core.errors import CounterdraftError
        assert isinstance(err, CounterdraftError)
        return
    check_document(doc)


_BLOCK = st.builds(
    lambda text, label, list_id, level, lead, emphasised, outline, in_table, bullet: Block(
        index=0, text=text, label=label,
        list_id=list_id if label is not None else None, list_level=level if label is not None else None,
        lead=lead if lead and text.startswith(lead) else None, emphasised=emphasised,
        outline_level=outline, in_table=in_table, bullet=bullet),
    text=st.one_of(_LINE, st.sampled_from(["Limitation of Liability. The cap applies.", "Customer means x.",
                                           "PAYMENT", "Definitions"])),
    label=st.sampled_from([None, None, "1.", "1.1", "2.", "(a)", "(i)", "(ii)", "a.", "Article I",
                           "Schedule 1", "§ 4", "•", ""]),
    list_id=st.sampled_from([None, "1", "2"]),
    level=st.integers(min_value=0, max_value=3),
    lead=st.sampled_from([None, "Limitation of Liability.", "Customer", "PAYMENT"]),
    emphasised=st.booleans(),
    outline=st.sampled_from([None, None, 0, 1, 2]),
    in_table=st.booleans(),
    bullet=st.booleans(),
)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(_BLOCK, max_size=20))
def test_any_blocks_split_into_a_consistent_document(blocks):
    doc_of(*blocks)
