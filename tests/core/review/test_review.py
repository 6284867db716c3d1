"""The review engine end to end (core.review.run_review): the exact meaning of each field of
the review, as the issue defines it."""

from __future__ import annotations

from core.review import NO_SHARED_NOTE, run_review

from .helpers import by_category, doc, excerpt, substantive

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
        if v.change == "insert":  # an empty precedent span at the insertion point
            assert v.precedent_text == "" and v.precedent_span is not None
            assert v.precedent_span[0] == v.precedent_span[1]
        if v.change == "delete":  # an empty draft span at the place the words left
            assert v.draft_text == "" and v.draft_span is not None
            assert v.draft_span[0] == v.draft_span[1]
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
        "    4. Liability\n\n    4.1 The Supplier's total liability is limited to the fees paid in the "
        "previous year.\n\n", ""))
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
    """)  # noqa: E501 (a provision is one line of the text)
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


# --------------------------------------------------------------------------------------
# Deviation.part and the spans (core.model's review invariants)
# --------------------------------------------------------------------------------------

INSERTED = """
    1. Liability

    1.1 The Supplier shall be liable for loss caused by its negligence.

    1.2 The Customer shall pay each invoice within thirty (30) days.
"""


def test_insert_and_delete_carry_an_empty_span_at_the_insertion_point():
    """An insert's precedent span and a delete's draft span are empty, at the place where the
    words go (or were): putting the changed words there rebuilds the other side's sentence."""
    with_not = INSERTED.replace("shall be liable", "shall not be liable")
    for draft, precedent, change, side, other in ((with_not, INSERTED, "insert", "precedent", "draft"),
                                                  (INSERTED, with_not, "delete", "draft", "precedent")):
        r = run_review(doc(draft), doc(precedent))
        (v,) = [v for v in substantive(r) if v.change == change]
        assert v.part == "text"
        k, k2 = getattr(v, f"{side}_span")
        a, b = getattr(v, f"{other}_span")
        empty_doc, full_doc = (r.precedent, r.draft) if side == "precedent" else (r.draft, r.precedent)
        empty = empty_doc.provision(getattr(v, f"{side}_provision")).text
        full = full_doc.provision(getattr(v, f"{other}_provision")).text
        assert k == k2 and full[a:b] == "not"
        assert empty[:k].rstrip().endswith("shall") and empty[k:].lstrip().startswith("be liable")
        assert " ".join((empty[:k] + " not " + empty[k:]).split()) == " ".join(full.split())


def test_every_deviation_says_which_part_it_concerns():
    draft = doc(DRAFT.replace("2. Services", "2. Provision of Services"))
    r = run_review(draft, doc(PRECEDENT))
    parts = {v.part for v in r.deviations}
    assert parts <= {"text", "heading", "provision"}
    heading = next(v for v in r.deviations if v.part == "heading")
    assert heading.draft_text == "Provision of Services" and heading.precedent_text == "Services"
    for v in r.deviations:
        if v.part == "text":
            assert v.precedent_span is not None and v.draft_span is not None
            assert v.change in ("insert", "delete", "replace")
        else:
            assert v.precedent_span is None and v.draft_span is None
        if v.change in ("add-provision", "remove-provision", "move") or v.category == "term" \
                or (v.category == "numbering" and v.reasons[0].startswith("renumbered")):
            assert v.part == "provision", v


# --------------------------------------------------------------------------------------
# Headings: only added or removed is formatting (resources/severity.toml, [headings])
# --------------------------------------------------------------------------------------

HEADED = """
1. Payment

1.1 The Customer shall pay each invoice within thirty (30) days.

1.2 Interest accrues on late payments at four per cent (4%) a year.

1.3 **Invoices.** Each invoice shall state the Order number.
"""


def _md(text: str, source: str):
    from core.reader import read_text

    return read_text(text, source=source, markdown=True)


def test_a_heading_only_added_or_removed_is_formatting_with_a_reason():
    """Headings are commonly agreed not to affect interpretation (common practice, no
    source): a run-in heading one side adds or drops is formatting; its reason says so."""
    draft = HEADED.replace("1.1 The Customer", "1.1 **Payment Terms.** The Customer") \
                  .replace("1.3 **Invoices.** Each", "1.3 Each")
    r = run_review(_md(draft, "draft.md"), _md(HEADED, "precedent.md"))
    heads = [v for v in r.deviations if v.part == "heading"]
    assert {(v.change, v.category) for v in heads} == {("insert", "formatting"), ("delete", "formatting")}
    for v in heads:
        assert v.severity == 0
        assert "heading added" in v.reasons[0] or "heading removed" in v.reasons[0]
        assert "headings do not affect interpretation" in v.reasons[0]
    assert not substantive(r)
    # added together with a change of the words: the heading is still formatting, the
    # words are their own substantive deviation
    both = draft.replace("thirty (30) days", "sixty (60) days")
    r2 = run_review(_md(both, "draft.md"), _md(HEADED, "precedent.md"))
    assert [v.reasons[0] for v in substantive(r2)] == ["period changed from 30 to 60 days (longer)"]
    assert {v.category for v in r2.deviations if v.part == "heading"} == {"formatting"}


def test_a_heading_whose_wording_changed_stays_substantive_but_low():
    draft = HEADED.replace("**Invoices.**", "**Invoicing Requirements.**")
    r = run_review(_md(draft, "draft.md"), _md(HEADED, "precedent.md"))
    (v,) = [v for v in r.deviations if v.part == "heading"]
    assert v.category == "substantive" and v.change == "replace"
    assert v.reasons[0] == "heading changed from 'Invoices' to 'Invoicing Requirements'"
    assert 0 < v.severity < 20


def test_the_heading_rule_is_the_firms_to_change(tmp_path):
    """resources/severity.toml names the rule ([headings] added_or_removed); a firm's copy
    set to "substantive" reports added headings as substantive deviations again."""
    from core.review.severity import DEFAULT_RULES_PATH, load_rules

    text = DEFAULT_RULES_PATH.read_text(encoding="utf-8")
    assert 'added_or_removed = "formatting"' in text
    path = tmp_path / "rules.toml"
    path.write_text(text.replace('added_or_removed = "formatting"', 'added_or_removed = "substantive"'),
                    encoding="utf-8")
    draft = HEADED.replace("1.1 The Customer", "1.1 **Payment Terms.** The Customer")
    r = run_review(_md(draft, "draft.md"), _md(HEADED, "precedent.md"), rules=load_rules(path))
    (v,) = [v for v in r.deviations if v.part == "heading"]
    assert (v.category, v.change) == ("substantive", "insert")
    assert v.reasons[0] == "heading added: 'Payment Terms'"


def test_split_and_merged_pairings_carry_their_own_word_diff():
    """One diff per pairing, of the two provisions' own texts (core.model's invariant)."""
    precedent = doc("""
        1. Payment

        1.1 The Customer shall pay each invoice within thirty (30) days of receipt and interest accrues on late payments at four per cent (4%) a year above the base rate.
    """)  # noqa: E501 (a provision is one line of the text)
    draft = doc("""
        1. Payment

        1.1 The Customer shall pay each invoice within thirty (30) days of receipt.

        1.2 Interest accrues on late payments at four per cent (4%) a year above the base rate.
    """)
    for r in (run_review(draft, precedent), run_review(precedent, draft)):
        pairs = [p for p in r.pairs if p.status in ("split", "merged")]
        assert len(pairs) == 2
        for p in pairs:
            a, b = r.precedent.provision(p.precedent).text, r.draft.provision(p.draft).text
            assert "".join(a[e.p1:e.p2] for e in p.edits) == a
            assert "".join(b[e.d1:e.d2] for e in p.edits) == b
            assert any(e.tag == "equal" and len(a[e.p1:e.p2].split()) >= 5 for e in p.edits)


def test_a_label_dropped_by_the_draft_is_numbering():
    """gpl-1.0's appendix is headed "Appendix: How to Apply These Terms to Your New
    Programs"; gpl-2.0 drops the "Appendix:" label (licensedcode-data).  The heading and
    words agree; the label is reported once, as numbering."""
    body = excerpt("gpl-1.0", "If you develop a new program", "change under these terms.")
    start = "1. Copying\n\nYou may copy the Program.\n\n"
    heading = "How to Apply These Terms to Your New Programs"
    review = run_review(doc(f"{start}{heading}\n\n{body}\n"),
                        doc(f"{start}Appendix: {heading}\n\n{body}\n"))
    assert [(v.category, v.change, v.part, v.precedent_text, v.reasons) for v in review.deviations] == [
        ("numbering", "delete", "provision", "Appendix", ("label removed: Appendix",))]


PARTIES_FORM = """
    AGREEMENT

    THIS AGREEMENT is dated [insert date]

    PARTIES

    (1) [NAME OF SUPPLIER] Limited, a company incorporated in [\u25cf] (company number [\u25cf]) (the "Supplier"); and

    (2) [NAME OF CUSTOMER] (the "Customer").

    1. Supply

    1.1 The Supplier shall supply the Goods to the Customer.

    SIGNED by ____________ for and on behalf of the Supplier
    Name:
    Title:
"""


def test_parties_and_signature_blocks_completed_are_completion_but_figures_substance():
    """A form's parties and signature blocks filled in by the draft (an invented form and
    invented parties; the blanks are common practice in templates, no source): each name
    filled in is a completion; the date and the company number are figures, so substantive
    -- with the blank they fill among their reasons."""
    filled = (PARTIES_FORM.replace("[insert date]", "3 March 2026")
              .replace("[NAME OF SUPPLIER]", "Ardence Tools")
              .replace("in [\u25cf]", "in Wexmoor").replace("number [\u25cf]", "number 04417730")
              .replace("[NAME OF CUSTOMER]", "Brennick Foods Ltd")
              .replace("____________", "Mira Solberg")
              .replace("Name:\n", "Name: Mira Solberg\n").replace("Title:\n", "Title: Director\n"))
    review = run_review(doc(filled), doc(PARTIES_FORM))
    filled_in = {v.draft_text.split("\n")[0] for v in by_category(review, "completion")}
    assert {"Ardence Tools", "in Wexmoor (company", "Brennick Foods Ltd", "by Mira Solberg for",
            "Mira Solberg"} == filled_in
    figures = {(v.draft_text, v.reasons[0]) for v in substantive(review)}
    assert figures == {("3 March 2026", "figure added: 3"),
                       ("number 04417730)", "figure added: 04417730")}
    assert all(any(r.startswith("blank of the precedent filled in") for r in v.reasons)
               for v in substantive(review))
