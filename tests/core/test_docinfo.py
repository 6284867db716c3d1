"""Per-document facts (core.docinfo): full clause numbers and the parties' labels."""

from __future__ import annotations

from core.docinfo import build_docinfo, item_label, party_role
from core.reader import read_text
from tests.core.review.helpers import doc
from tests.support.legal_texts import license_text


def test_full_numbers_and_lookup():
    info = build_docinfo(doc("""
        1. Supply

        1.1 The Supplier shall supply:

        (a) the goods; and

        (b) the services.

        2. Payment

        2.1 The Customer shall pay.
    """))
    numbers = [n for n in info.full_number if n]
    assert numbers == ["1", "1.1", "1.1(a)", "1.1(b)", "2", "2.1"]
    assert info.provisions[info.by_number[("clause", "1.1(b)")]].text == "the services."


def test_party_labels_and_roles():
    info = build_docinfo(doc("""
        This agreement is made between:

        (1) Harvenlow Lysk Limited, a company incorporated in Ardence (the "Licensor"); and

        (2) Pellowen Marrisk Limited, a company incorporated in Corvanne (the "Licensee").

        1. Definitions

        1.1 "Party" means the Licensor or the Licensee.

        1.2 "Software" means the programs listed in Schedule 1.
    """))
    assert info.party_labels == {"Licensor", "Licensee"}
    assert info.party_roles == {"Licensor": "supply", "Licensee": "buy"}
    assert party_role("Service Provider") == "supply"
    assert party_role("Orlenby", 'acting as customer') == "buy"
    assert party_role("Party") is None


def test_full_numbers_of_items_in_every_label_style():
    # gpl-3.0.LICENSE (licensedcode-data) numbers the items of section 5 "a)" ... "d)" (lines
    # 249-265) and mpl-2.0.LICENSE calls its schedules "Exhibit A" and "Exhibit B" (lines 382,
    # 396): full numbers are "5(a)" ... and "A", "B", as "(a)" items and "Schedule 2" are.
    gpl = build_docinfo(read_text(license_text("gpl-3.0"), source="gpl-3.0.LICENSE"))
    five = [n for p, n in zip(gpl.provisions, gpl.full_number)
            if p.parent and gpl.provisions[gpl.position[p.parent]].number == "5"]
    assert five == ["5(a)", "5(b)", "5(c)", "5(d)"]
    assert gpl.provisions[gpl.by_number[("clause", "6(b)")]].number == "b)"
    mpl = build_docinfo(read_text(license_text("mpl-2.0"), source="mpl-2.0.LICENSE"))
    exhibits = [n for p, n in zip(mpl.provisions, mpl.full_number) if p.kind == "schedule"]
    assert exhibits == ["A", "B"]
    assert item_label("b)") == item_label("(b)") == item_label("b.") == "(b)"
    assert item_label("7.2") is None and item_label("Schedule 2") is None


def test_aliases_are_names_of_their_term_not_terms():
    # apache-2.0.LICENSE: '"You" (or "Your") shall mean ...' (licensedcode-data).
    info = build_docinfo(read_text(license_text("apache-2.0")))
    assert "You" in info.term_names and "Your" not in info.term_names
    assert info.alias_of == {"Your": "You"}
    assert info.names_of("You") == ("You", "Your")
    assert info.all_names[-1] == "Your"


def test_a_party_label_takes_its_side_from_an_alias():
    # netapp-sdk-aug2020.LICENSE (licensedcode-data): 'between you ... (“You”, “Your” or
    # “Licensee”) and NetApp, Inc.' -- "You" has no side of its own; "Licensee" is the
    # buyer's side (common practice, no source).
    info = build_docinfo(doc("""
        LICENCE AGREEMENT

        This agreement is made between:

        (1) Quillon Ashby Limited, a company incorporated in Ardence ("Licensor"); and

        (2) Marsh Tollard Limited, a company incorporated in Corvanne ("You", "Your" or "Licensee").

        1. The Licensor grants You a licence.
    """))
    assert info.party_labels == {"Licensor", "You"}
    assert info.party_roles == {"Licensor": "supply", "You": "buy"}
