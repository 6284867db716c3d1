"""Per-document facts (core.review.docinfo): full clause numbers and the parties' labels."""

from __future__ import annotations

from core.review.docinfo import build_docinfo, party_role

from .helpers import doc


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
