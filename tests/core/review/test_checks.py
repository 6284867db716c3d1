"""Drafting checks (core.review.checks).

Outside source: the licence and EULA texts of the PyPI package ``licensedcode-data`` (the
ScanCode licence database), named beside each check.  Drafting problems of each kind are
planted in them (``tests.support.drafting_plants``); the unmodified texts must raise none.
What counts as a drafting problem, and what a careful reader does not count (a capital at
the start of a sentence, a heading, a month, "this Agreement", "Section 5"), is common
drafting practice, no source.  The small agreements below are invented.
"""

from __future__ import annotations

import pytest

from core.review import run_review
from core.review.checks import CHECK_KINDS, document_checks, review_checks
from tests.support.drafting_plants import (
    found,
    plant_all,
    plant_changed_definition,
    plant_dangling_reference,
    plant_deleted_definition,
    plant_stale_term,
    plant_undefined_term,
    plant_unused_definition,
)

from .helpers import doc, licence_text

HOUSE = """
    SUPPLY AGREEMENT

    This Agreement is made on 1 March 2024 between Harrowgate Instruments Limited (the
    "Supplier") and Pellucid Optics Limited (the "Customer").

    1. Definitions

    1.1 "Products" means the goods described in Schedule 1.

    1.2 "Delivery Date" means the date for delivery stated in the Order Form.

    1.3 "Order Form" means the form the Customer uses to order Products.

    2. Supply

    2.1 The Supplier shall deliver the Products on the Delivery Date. Delivery is complete
    when the Customer signs for the Products.

    2.2 Subject to clause 3.1, the Customer shall inspect the Products within five (5) days
    of the Delivery Date, and no later than 31 December in any year.

    3. Payment

    3.1 The Customer shall pay for the Products within thirty (30) days of the Order Form.

    Payment Terms. Each invoice is payable in full under this Agreement.

    SCHEDULE 1

    The goods listed in the Order Form.
"""


def _kinds(checks) -> list[tuple[str, str | None]]:
    return [(c.kind, c.term) for c in checks]


# --------------------------------------------------------------------------------------
# Small invented agreements: each kind, and what is not a problem
# --------------------------------------------------------------------------------------


def test_a_well_drafted_agreement_raises_nothing() -> None:
    # Sentence-initial "Delivery", the run-in heading "Payment Terms.", the month, "this
    # Agreement", "clause 3.1", "Schedule 1" and the parties' labels are no problems.
    assert document_checks(doc(HOUSE)) == ()
    house = doc(HOUSE)
    assert run_review(house, doc(HOUSE)).checks == ()


def test_each_kind_on_an_invented_agreement() -> None:
    draft = (HOUSE
             .replace("2.1 The Supplier shall deliver", "2.1 The Supplier shall deliver the Spare Parts and")
             .replace("1.3 \"Order Form\" means",
                      "1.4 \"Warranty Period\" means twelve months.\n\n    1.3 \"Order Form\" means")
             .replace("Subject to clause 3.1", "Subject to clause 7.4")
             .replace("the goods described in Schedule 1.", "the goods described in Schedule 1 and their parts."))
    checks = run_review(doc(draft), doc(HOUSE)).checks
    kinds = _kinds(checks)
    assert ("undefined-term", "Spare Parts") in kinds
    assert ("unused-definition", "Warranty Period") in kinds
    assert ("dangling-reference", "7.4") in kinds
    assert ("definition-changed", "Products") in kinds
    changed = next(c for c in checks if c.kind == "definition-changed")
    assert "provisions use the term" in changed.message and len(changed.provisions) >= 3
    # each check's words are where its span says
    review = run_review(doc(draft), doc(HOUSE))
    for c in review.checks:
        if c.span is not None:
            prov = review.draft.provision(c.provision)
            assert (prov.text if c.part == "text" else prov.heading)[c.span[0]:c.span[1]] == c.text
    assert [c.kind for c in checks] == sorted((c.kind for c in checks), key=CHECK_KINDS.index)


def test_stale_name_of_a_renamed_term() -> None:
    renamed = HOUSE.replace("Customer", "Purchaser")
    last = renamed.rindex("Purchaser")
    draft = renamed[:last] + "Customer" + renamed[last + len("Purchaser"):]
    review = run_review(doc(draft), doc(HOUSE))
    mapping = next(m for m in review.term_map if m.draft == "Purchaser")
    stale = [c for c in review.checks if c.kind == "stale-term"]
    assert mapping.stale == len(stale) == 1
    assert stale[0].text == "Customer" and stale[0].term == "Purchaser"


@pytest.mark.parametrize("sentence", [
    "Payment shall be made on Monday in January.",  # sentence start, day, month
    "The parties shall meet in London under the supervision of the Free Software Foundation.",
    "Each party shall comply with the Data Protection Act and this Agreement.",
    "The Supplier shall follow ISO 9001 and the GDPR.",  # acronyms
    "Notices under Section 3 go to the address in Schedule 1.",
])
def test_what_a_careful_reader_does_not_count(sentence: str) -> None:
    text = HOUSE.replace("Each invoice is payable in full under this Agreement.", sentence)
    assert [c for c in document_checks(doc(text)) if c.kind == "undefined-term"] == []


def test_a_term_is_used_in_any_of_its_forms() -> None:
    # plural, possessive, capitals and the verb form count as uses of the definition
    text = HOUSE + '\n    4.1 "Distribute" means to deliver a copy to another person.\n\n' \
                   "    4.2 THE SUPPLIER'S DELIVERY DATES ARE ESTIMATES. The Customer may not be distributing copies.\n"
    unused = [c.term for c in document_checks(doc(text)) if c.kind == "unused-definition"]
    assert unused == []


# --------------------------------------------------------------------------------------
# Planted problems in real texts (licensedcode-data), one of each kind
# --------------------------------------------------------------------------------------

#: licensedcode-data keys: three open-source licences, a proprietary binary-code EULA and
#: a commercial-style licence with a definitions section.
PLANTED_KEYS = ("apache-2.0", "mpl-2.0", "epl-2.0", "sun-bcl-11-06", "cddl-1.0")


@pytest.mark.parametrize("key", PLANTED_KEYS)
@pytest.mark.parametrize("plant", [plant_undefined_term, plant_deleted_definition, plant_unused_definition,
                                   plant_stale_term, plant_dangling_reference, plant_changed_definition],
                         ids=lambda f: f.__name__)
def test_planted_problem_is_found(key: str, plant) -> None:
    text = licence_text(key)  # licensedcode-data: <key>.LICENSE
    planted = plant(text)
    if planted is None:
        pytest.skip(f"{key}: no place for {plant.__name__}")
    review = run_review(doc(planted.text, f"{key}-draft.txt"), doc(text, f"{key}.txt"))
    assert found(planted, review.checks), (planted.how, _kinds(review.checks))
    # nothing else is reported but the planted problem (a rename's stale uses may be several:
    # the old name in capitals in a disclaimer too)
    assert {c.kind for c in review.checks} <= {planted.kind, "definition-changed"} if planted.kind == "stale-term" \
        else {c.kind for c in review.checks} == {planted.kind}


def test_every_planted_kind_on_one_text() -> None:
    text = licence_text("apache-2.0")  # licensedcode-data: apache-2.0.LICENSE
    kinds = {p.kind for p in plant_all(text)}
    assert kinds == set(CHECK_KINDS)


#: Unmodified real texts (licensedcode-data keys) with defined terms and cross-references:
#: open-source licences and proprietary EULAs.  A careful reading finds none of the five
#: problems in them, and neither do the checks.
CLEAN_KEYS = ("apache-2.0", "mpl-2.0", "gpl-3.0", "agpl-3.0", "lgpl-3.0", "epl-2.0", "cddl-1.0", "osl-3.0",
              "afl-3.0", "artistic-2.0", "mpl-1.1", "cpl-1.0", "ms-pl", "apsl-2.0", "ecl-2.0",
              "sun-bcl-11-06", "sun-bcl-11-07")


@pytest.mark.parametrize("key", CLEAN_KEYS)
def test_no_false_alarm_on_unmodified_texts(key: str) -> None:
    text = licence_text(key)  # licensedcode-data: <key>.LICENSE
    assert document_checks(doc(text, f"{key}.txt")) == ()


def test_checks_between_two_versions_report_real_changes_only() -> None:
    # licensedcode-data: mpl-1.0.LICENSE (precedent) and mpl-1.1.LICENSE (draft).  Between
    # the two versions the definition of "Modifications" and of "Contributor Version" are
    # unchanged; any changed definition reported must differ in words.
    old, new = licence_text("mpl-1.0"), licence_text("mpl-1.1")
    review = run_review(doc(new, "mpl-1.1.txt"), doc(old, "mpl-1.0.txt"))
    p_terms = {t.term: t.definition for t in review.precedent.terms}
    for c in review_checks(review):
        if c.kind == "definition-changed":
            d_def = next(t.definition for t in review.draft.terms if t.term == c.term)
            assert " ".join(d_def.split()) != " ".join(p_terms[c.term].split())


@pytest.mark.parametrize("key", ("apache-2.0", "mpl-2.0", "eclipse-sua-2005", "sun-sissl-1.0"))
def test_many_names_are_found_as_a_few_are(key: str, monkeypatch) -> None:
    """Uses of the defined terms are found by a regular expression for an agreement's few
    names and by a character trie for thousands (core.terms.REGEX_FORMS_MAX): both give
    the same unused definitions (licensedcode-data: <key>.LICENSE)."""
    import core.terms
    from core.review.checks import unused_definitions

    document = doc(licence_text(key), f"{key}.txt")
    with_pattern = unused_definitions(document)
    monkeypatch.setattr(core.terms, "REGEX_FORMS_MAX", 0)
    assert unused_definitions(document) == with_pattern
