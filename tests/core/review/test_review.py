"""The review engine end to end (core.review.run_review): the exact meaning of each field of
the review, as the issue defines it."""

from __future__ import annotations

from core.review import NO_SHARED_NOTE, run_review

from .helpers import by_category, doc, substantive

PRECEDENT = """
    SERVICES AGREEMENT

    1. Definitions

    1.1 "Customer" means the person named in the Order Form.

    1.2 "Services" means the services described in the Order Form.

    2. Services

    2.1 The Supplier shall provide the Services with reasonable skill and care.

    2.2 The Supplier shall notify the Customer of any delay.

    3. Payment

    3.1 The Customer shall pay each invoice within thirty (30) days of receipt.

    3.2 Interest on late payments accrues at four per cent (4%) a year.

    4. Liability

    4.1 The Supplier's total liability is limited to the fees paid in the previous year.

    5. Notices

    5.1 Notices shall be in writing and sent to the address in the Order Form.

    6. Counterparts

    6.1 This agreement may be signed in counterparts.
"""

DRAFT = """
    SERVICES AGREEMENT

    1. Definitions

    1.1 "Client" means the person named in the Order Form.

    1.2 "Services" means the services described in the Order Form.

    2. Services

    2.1 The Supplier may provide the Services with reasonable skill and care.

    2.2 The Supplier shall notify the Client of any delay.

    3. Notices

    3.1 Notices shall be in writing and sent to the address in the Order Form.

    4. Payment

    4.1 The Client shall pay each invoice within sixty (60) days of receipt.

    4.2 Interest on late payments accrues at four per cent (4%) a year.

    4.3 The Client may withhold any amount it disputes in good faith.

    5. Counterparts

    5.1 This agreement may be signed in counterparts.
"""


def review():
    return run_review(doc(DRAFT, "draft.txt"), doc(PRECEDENT, "precedent.txt"))


def text_of(document, pid):
    return document.provision(pid).text


def test_changed_words_are_verbatim_with_little_context_and_spans_locate_them():
    r = review()
    for v in r.deviations:
        if v.category == "numbering" and v.reasons[0].startswith("renumbered"):
            # a label: the numbers as the documents show them
            assert v.draft_text == r.draft.provision(v.draft_provision).number
            assert v.precedent_text == r.precedent.provision(v.precedent_provision).number
            continue
        if v.change in ("insert", "delete", "replace") and v.category != "term":
            if v.draft_provision and v.draft_text:
                assert v.draft_text in text_of(r.draft, v.draft_provision) or \
                    v.draft_text in (r.draft.provision(v.draft_provision).heading or "")
            if v.precedent_provision and v.precedent_text:
                assert v.precedent_text in text_of(r.precedent, v.precedent_provision) or \
                    v.precedent_text in (r.precedent.provision(v.precedent_provision).heading or "")
            assert len(v.draft_text.split()) <= 12 and len(v.precedent_text.split()) <= 12
        if v.change == "insert":
            assert v.precedent_text == "" and v.precedent_span is None
        if v.change == "delete":
            assert v.draft_text == "" and v.draft_span is None
        if v.draft_span is not None:
            a, b = v.draft_span
            assert text_of(r.draft, v.draft_provision)[a:b] in v.draft_text
        if v.precedent_span is not None:
            a, b = v.precedent_span
            assert text_of(r.precedent, v.precedent_provision)[a:b] in v.precedent_text
    payment = next(v for v in substantive(r) if "period changed" in v.reasons[0])
    assert (payment.precedent_text, payment.draft_text) == ("thirty (30) days", "sixty (60) days")
    assert payment.reasons[0] == "period changed from 30 to 60 days (longer)"


def test_draft_text_keeps_the_drafts_own_terms():
    r = review()
    insert = next(v for v in substantive(r) if v.change == "add-provision")
    assert insert.draft_text == "The Client may withhold any amount it disputes in good faith."
    assert insert.precedent_text == "" and insert.precedent_provision is None
    assert insert.category == "substantive"


def test_removed_provision_carries_the_whole_text():
    precedent = doc(PRECEDENT)
    draft = doc(PRECEDENT.replace(
        "    4. Liability\n\n    4.1 The Supplier's total liability is limited to the fees paid in the previous year.\n\n", ""))
    r = run_review(draft, precedent)
    (v,) = substantive(r)
    assert v.change == "remove-provision" and v.draft_text == "" and v.draft_provision is None
    assert v.precedent_text == "The Supplier's total liability is limited to the fees paid in the previous year."
    assert "clause type: limitation of liability" in v.reasons[-1]
    assert any(p.status == "removed" for p in r.pairs)


def test_term_map_and_one_term_deviation_per_entry():
    r = review()
    assert [(m.draft, m.precedent) for m in r.term_map] == [("Client", "Customer")]
    (t,) = by_category(r, "term")
    assert (t.draft_text, t.precedent_text, t.change) == ("Client", "Customer", "replace")
    assert not any("Client" in v.draft_text and "Customer" in v.precedent_text for v in substantive(r))


def test_moved_only_provision_has_no_substantive_deviation_and_one_move():
    r = review()
    moved = [p for p in r.pairs if p.status == "moved"]
    notices = r.draft.provisions[[p.heading for p in r.draft.provisions].index("Notices")]
    assert {p.draft for p in moved} >= {notices.id}
    ids = {p.draft for p in moved}
    assert not [v for v in substantive(r) if v.draft_provision in ids]
    moves = [v for v in r.deviations if v.change == "move"]
    assert len(moves) == 1 and moves[0].category == "numbering"
    assert moves[0].draft_provision == notices.id  # the section, not also its sub-clause


def test_moved_and_changed_stays_moved_with_word_deviations():
    draft = doc(DRAFT.replace("Notices shall be in writing", "Notices may be in writing"))
    r = run_review(draft, doc(PRECEDENT))
    sub = next(v for v in substantive(r) if "obligation weakened" in v.reasons[0]
               and r.draft.provision(v.draft_provision).text.startswith("Notices"))
    pair = next(p for p in r.pairs if p.draft == sub.draft_provision)
    assert pair.status == "moved"


def test_statuses_same_changed_added():
    r = review()
    status = {p.draft: p.status for p in r.pairs if p.draft}
    heads = {p.heading: p.id for p in r.draft.provisions if p.heading}
    assert status[heads["Counterparts"]] == "same"  # only renumbered
    changed = next(v.draft_provision for v in substantive(r) if "obligation" in v.reasons[0])
    assert status[changed] == "changed"
    added = next(v.draft_provision for v in substantive(r) if v.change == "add-provision")
    assert status[added] == "added"
    assert all((p.status == "added") == (p.precedent is None) for p in r.pairs)
    assert all((p.status == "removed") == (p.draft is None) for p in r.pairs)
    assert all(0 <= p.similarity <= 1 for p in r.pairs)


def test_ranks_run_1_to_n_by_severity_ties_in_draft_order_and_ids_are_stable():
    r = review()
    assert [v.rank for v in r.deviations] == list(range(1, len(r.deviations) + 1))
    sev = [v.severity for v in r.deviations]
    assert sev == sorted(sev, reverse=True)
    pos = {p.id: i for i, p in enumerate(r.draft.provisions)}
    for a, b in zip(r.deviations, r.deviations[1:]):
        if a.severity == b.severity and a.draft_provision and b.draft_provision:
            assert pos[a.draft_provision] <= pos[b.draft_provision]
    again = review()
    assert [(v.id, v.rank) for v in again.deviations] == [(v.id, v.rank) for v in r.deviations]
    assert sorted(int(v.id[1:]) for v in r.deviations) == list(range(1, len(r.deviations) + 1))


def test_split_and_merged_have_one_pair_entry_per_pairing():
    precedent = doc("""
        1. Payment

        1.1 The Customer shall pay each invoice within thirty (30) days of receipt and interest accrues on late payments at four per cent (4%) a year above the base rate.

        2. Notices

        2.1 Notices shall be in writing.
    """)
    draft = doc("""
        1. Payment

        1.1 The Customer shall pay each invoice within thirty (30) days of receipt.

        1.2 Interest accrues on late payments at four per cent (4%) a year above the base rate.

        2. Notices

        2.1 Notices shall be in writing.
    """)
    split = run_review(draft, precedent)
    pairs = [p for p in split.pairs if p.status == "split"]
    assert len(pairs) == 2 and len({p.precedent for p in pairs}) == 1
    assert len({p.draft for p in pairs}) == 2
    merged = run_review(precedent, draft)
    pairs = [p for p in merged.pairs if p.status == "merged"]
    assert len(pairs) == 2 and len({p.draft for p in pairs}) == 1


def test_documents_that_share_nothing_give_an_empty_alignment_and_a_note():
    a = doc("1. Harbour\n\n1.1 Lighthouse keepers rotate their watches at dawn.")
    b = doc("1. Orchard\n\n1.1 Apples are picked by hand in the autumn months.")
    r = run_review(a, b)
    assert r.notes == (NO_SHARED_NOTE,)
    assert not [p for p in r.pairs if p.draft and p.precedent]
    assert {v.change for v in r.deviations} == {"add-provision", "remove-provision"}
