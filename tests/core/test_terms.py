"""Tests of core.terms: finding defined terms and counting their uses.

The definition forms tested are the drafting conventions of English-language agreements
(common practice, no source).  Use counts are checked against counts made by hand (stated
beside each check) and against an independent count with Python's ``str.split`` /
``re`` on the same words (a second method, not our pattern builder).  The real-text check
against an outside source is in test_license_texts.py (the Apache License's terms).
"""

from __future__ import annotations

import re

import pytest

from core.model import Provision
from core.reader import read_text
from core.terms import find_terms, term_forms, term_pattern, terms_pattern
from tests.support.document_checks import check_document


def prov(pid: int, text: str, *, kind: str = "clause", term: str | None = None, heading: str | None = None):
    return Provision(id=f"p{pid}", kind=kind, number=None, heading=heading, level=0, parent=None,
                     text=text, term=term)


def terms_of(*texts: str) -> dict[str, tuple[str, int]]:
    found = find_terms([prov(i, t) for i, t in enumerate(texts, start=1)])
    return {t.term: (t.provision, t.uses) for t in found}


# --------------------------------------------------------------------------------------
# Definition forms
# --------------------------------------------------------------------------------------

@pytest.mark.parametrize("text, terms", [
    ('"Supplier" means Quillmere Fabrication Limited.', ["Supplier"]),
    ('"Supplier" shall mean Quillmere Fabrication Limited.', ["Supplier"]),
    ('"Fees" has the meaning given in clause 4.', ["Fees"]),
    ('“Goods” means lamp housings.', ["Goods"]),
    ("‘Goods’ means lamp housings.", ["Goods"]),
    ('"Source" form shall mean the preferred form.', ["Source"]),
    ('"You" (or "Your") shall mean an individual.', ["You"]),  # "Your": an alias
    ('Quillmere Fabrication Limited (the "Supplier") agrees.', ["Supplier"]),
    ('Quillmere Fabrication Limited ("Supplier") agrees.', ["Supplier"]),
    ('the companies listed below (each a "Member") agree.', ["Member"]),
    ('the two companies (together, the "Group") agree.', ["Group"]),
    ('the parties (each a "Party" and together the "Parties") agree.', ["Party", "Parties"]),
    ('Quillmere Fabrication Limited, hereinafter "Quillmere", agrees.', ["Quillmere"]),
    ('Osterby Lampworks (hereinafter referred to as "Osterby") agrees.', ["Osterby"]),
    ('Osterby Lampworks, each a "Buyer" and together the "Buyers".', ["Buyer", "Buyers"]),
    ('Such a work is called a "modified version" of the earlier work.', ["modified version"]),
    ('"Customer": the buyer named in the Order.', ["Customer"]),
    ('The "Term" of this Agreement means five years.', ["Term"]),
])
def test_definition_forms(text, terms):
    assert [t.term for t in find_terms([prov(1, text)])] == terms


@pytest.mark.parametrize("text", [
    'The Software is provided on an "AS IS" basis, without warranty.',
    'marked in writing as "Not a Contribution."',
    '(see "the Manual") for details',
    'He said "this is not a definition" and left.',
])
def test_quotes_that_are_not_definitions(text):
    assert find_terms([prov(1, text)]) == ()


def test_definition_provisions_give_their_term_and_the_whole_text():
    p = prov(1, '"Goods" means lamp housings; and "Spares" means spare parts.', kind="definition", term="Goods")
    found = find_terms([p])
    assert [(t.term, t.definition) for t in found] == [
        ("Goods", p.text),
        ("Spares", '"Goods" means lamp housings; and "Spares" means spare parts.'),
    ]


def test_inline_definition_text_is_its_sentence():
    found = find_terms([prov(1, 'The parties met. Quillmere Fabrication Limited (the "Supplier") '
                                'supplies lamps. The end.')])
    assert found[0].definition == 'Quillmere Fabrication Limited (the "Supplier") supplies lamps.'


def test_first_definition_wins():
    found = find_terms([prov(1, '"Fee" means ten.'), prov(2, '"Fee" means twenty.')])
    assert [(t.term, t.provision) for t in found] == [("Fee", "p1")]


# --------------------------------------------------------------------------------------
# Uses
# --------------------------------------------------------------------------------------

def test_uses_count_plural_and_possessive_forms_outside_the_definition():
    got = terms_of(
        'Quillmere Fabrication (the "Supplier") and Osterby (the "Customer"); each a "Party".',
        "The Supplier sells. The Suppliers' agents and the Supplier's staff help the Customer.",
        "The Customer’s premises and the Customers' sites. Either Party; both Parties.",
        '"Liability" means any liability. Liabilities are capped; a Liability is a loss.',
        "customer and SUPPLIER in other cases do not count; nor does Customerservice or Sub-Supplier.",
    )
    # By hand: Supplier in p2 "Supplier sells", "Suppliers' agents", "Supplier's staff" = 3;
    # Customer: p2 "Customer" + p3 "Customer’s", "Customers'" = 3; Party: p3 "Party",
    # "Parties" = 2; Liability: only outside p4, which defines it = 0.
    assert got == {"Supplier": ("p1", 3), "Customer": ("p1", 3), "Party": ("p1", 2), "Liability": ("p4", 0)}


def test_a_longer_term_is_not_a_use_of_the_shorter_one():
    got = terms_of('"Services" means the services.', '"Additional Services" means more services.',
                   "The Additional Services and the Services; Additional Services again; Service.")
    # By hand in p3: "Additional Services" x2, "Services" x1 (the singular "Service" is a
    # different word when the term is already plural) = {"Additional Services": 2, "Services": 1};
    # p2 "Additional Services" is its own definition and does not count, and the "Services"
    # inside it belongs to the longer term.
    assert got == {"Services": ("p1", 1), "Additional Services": ("p2", 2)}


def test_uses_in_headings_count():
    found = find_terms([prov(1, '"Customer" means the buyer.'),
                        prov(2, "Pay on time.", heading="Customer's Obligations")])
    assert found[0].uses == 1


def test_uses_match_an_independent_count_on_a_longer_text():
    words = ["Supplier", "Goods", "the", "shall", "deliver", "Supplier's", "Goods", "to", "Customer"]
    body = " ".join(words[i % len(words)] for i in range(900)) + "."
    found = find_terms([prov(1, 'Quillmere (the "Supplier") sells "Goods" meaning lamps to Osterby (the '
                                '"Customer").'), prov(2, body)])
    uses = {t.term: t.uses for t in found}
    # Independent count: whitespace tokens of p2, possessive and full stop stripped.
    tokens = [re.sub(r"(?:'s)?\.?$", "", w) for w in body.split()]
    assert uses["Supplier"] == tokens.count("Supplier")
    assert uses["Customer"] == tokens.count("Customer")


def test_term_forms():
    assert term_forms("Party") == ("Party", "Parties")
    assert term_forms("Liability") == ("Liability", "Liabilities")
    assert term_forms("Services") == ("Services",)
    assert term_forms("Business") == ("Business", "Businesses")
    assert term_forms("Legal Entity") == ("Legal Entity", "Legal Entities")
    assert term_forms("Day") == ("Day", "Days")
    assert term_forms("You") == ("You",)
    assert term_forms("Schedule 1") == ("Schedule 1",)


def test_term_pattern_matches_whole_words_in_every_form():
    rx = term_pattern("Customer")
    text = "Customer, Customers, Customer's, Customer’s, Customers' and Customers’ but not Customerss, " \
           "customer, Sub-Customer or CustomerX."
    assert [m.group(0) for m in rx.finditer(text)] == [
        "Customer", "Customers", "Customer's", "Customer’s", "Customers'", "Customers’"]
    assert term_pattern("Legal Entity").search("any Legal\nEntities here").group(0) == "Legal\nEntities"


def test_terms_pattern_prefers_the_longest_term():
    rx, owner = terms_pattern(["Services", "Additional Services", "Service Credit"])
    found = [owner[" ".join(m.group(0).split()).removesuffix("'s")] for m in rx.finditer(
        "Additional Services, Services, Service Credits and Service Credit's")]
    assert found == ["Additional Services", "Services", "Service Credit", "Service Credit"]


def test_terms_of_a_read_document():
    doc = read_text('SUPPLY TERMS\n\n1. Definitions\n\n"Goods" means lamps.\n\n"Price" means the price.\n\n'
                    "2. Price. The Price for the Goods is fixed. Goods' prices include delivery.\n")
    check_document(doc)
    assert [(t.term, t.uses) for t in doc.terms] == [("Goods", 2), ("Price", 2)]
    assert doc.terms[0].provision == next(p.id for p in doc.provisions if p.term == "Goods")


def test_uses_counted_by_the_trie_walk_equal_the_patterns_count():
    """Above REGEX_FORMS_MAX forms the uses are counted by walking a character trie; on a
    real text (apache-2.0.LICENSE, licensedcode-data) it counts what the compiled pattern
    (Python's re, the reference) counts."""
    from core import terms as terms_module
    from tests.support.legal_texts import license_text

    doc = read_text(license_text("apache-2.0"))
    by_pattern = [(t.term, t.uses) for t in doc.terms]
    saved = terms_module.REGEX_FORMS_MAX
    terms_module.REGEX_FORMS_MAX = 0
    try:
        by_walk = [(t.term, t.uses) for t in terms_module.find_terms(doc.provisions, blocks=doc.blocks)]
    finally:
        terms_module.REGEX_FORMS_MAX = saved
    assert by_walk == by_pattern and sum(u for _, u in by_walk) > 50
