"""Classification of word-diff hunks (core.review.classify).

The categories follow the issue's definitions: formatting = white space, quote style, dash
style or letter case only (quote and dash characters: Unicode general categories Pi/Pf and
Pd); punctuation; numbering = labels and renumbered cross-references; term; substantive.
"""

from __future__ import annotations

from core.review import run_review
from core.review.classify import TermContext, classify_ops
from core.review.tokens import tokenize
from core.review.worddiff import token_ops

from .helpers import by_category, doc, excerpt, substantive


def changes(a: str, b: str):
    ta, tb = tokenize(a), tokenize(b)
    return [(c.category, c.detail, a[slice(*c.p_span)], b[slice(*c.d_span)])
            for c in classify_ops(ta, tb, token_ops(ta, tb), TermContext({}, {}, frozenset(), {}))]


def test_formatting_kinds():
    assert changes("the  Goods", "the Goods") == [("formatting", "whitespace", "  ", " ")]
    assert changes('the "Goods" are', "the “Goods” are") == [
        ("formatting", "quote style", '"Goods"', "“Goods”")]
    assert changes("5 - 10 days", "5 – 10 days") == [("formatting", "dash style", "-", "–")]
    assert changes("The Goods", "THE GOODS") == [("formatting", "case", "The Goods", "THE GOODS")]
    assert changes("line one\nline two", "line one line two") == [
        ("formatting", "whitespace", "\n", " ")]


def test_punctuation_and_joining():
    assert [c[0] for c in changes("goods, services and fees", "goods services and fees")] == [
        "punctuation"]
    assert [c[:2] for c in changes("send an e-mail now", "send an email now")] == [
        ("punctuation", "joining")]


def test_substantive_words_and_figures_in_one_change():
    got = changes("within thirty (30) days", "within sixty (60) days")
    assert [c[0] for c in got] == ["substantive"]


def test_article_before_a_renamed_term_is_term():
    review = run_review(doc("""
        1. Definitions

        1.1 "Agent" means the person appointed under clause 2.

        2. Appointment

        2.1 The Principal appoints an Agent for each territory.
        """), doc("""
        1. Definitions

        1.1 "Representative" means the person appointed under clause 2.

        2. Appointment

        2.1 The Principal appoints a Representative for each territory.
        """))
    assert [(m.draft, m.precedent) for m in review.term_map] == [("Agent", "Representative")]
    assert substantive(review) == []


XREF_PRECEDENT = """
    1. Supply

    1.1 The Supplier shall supply the goods.

    2. Payment

    2.1 The Customer shall pay the price subject to clause 3.1.

    2.2 Late payment is dealt with in clause 2.1.

    3. Disputes

    3.1 The parties shall try to settle disputes in good faith.
"""

#: The precedent with a new clause 2 (Delivery): Payment is now 3 and Disputes 4; the
#: reference in 3.1 is filled in by each test.
XREF_DRAFT = """
    1. Supply

    1.1 The Supplier shall supply the goods.

    2. Delivery

    2.1 The Supplier shall deliver the goods to the site.

    3. Payment

    3.1 The Customer shall pay the price subject to {reference}.

    3.2 Late payment is dealt with in clause 3.1.

    4. Disputes

    4.1 The parties shall try to settle disputes in good faith.
"""


def test_cross_reference_renumbered_with_its_target_is_numbering():
    """A new clause 2 pushes Payment to 3 and Disputes to 4; the draft updates its
    references ("clause 3.1" -> "Clause 4.1", a different keyword too)."""
    draft = doc(XREF_DRAFT.format(reference="Clause 4.1"))
    review = run_review(draft, doc(XREF_PRECEDENT))
    notes = [r for v in by_category(review, "numbering") for r in v.reasons]
    assert "cross-reference renumbered from clause 3.1 to Clause 4.1 (same provision)" in notes
    assert "cross-reference renumbered from clause 2.1 to clause 3.1 (same provision)" in notes
    assert [v.change for v in substantive(review)] == ["add-provision"]


def test_unchanged_reference_pointing_elsewhere_after_renumbering_is_numbering():
    """The draft kept "clause 3.1" although Disputes is now clause 4.1: the reference is
    unchanged and now lands on another provision because of renumbering."""
    draft = doc(XREF_DRAFT.format(reference="clause 3.1"))
    review = run_review(draft, doc(XREF_PRECEDENT))
    numbering = [v for v in by_category(review, "numbering") if "unchanged" in " ".join(v.reasons)]
    assert len(numbering) == 1 and numbering[0].draft_text == "clause 3.1"
    assert numbering[0].severity > 0
    assert [v.change for v in substantive(review)] == ["add-provision"]


def test_reference_pointed_at_another_provision_is_substantive():
    draft = doc(XREF_PRECEDENT.replace("subject to clause 3.1", "subject to clause 1.1"))
    review = run_review(draft, doc(XREF_PRECEDENT))
    (v,) = substantive(review)
    assert (v.precedent_text, v.draft_text) == ("clause 3.1", "clause 1.1")
    assert any("cross-reference changed" in r for r in v.reasons)


# ----------------------------------------------------------------------------------------
# Noise is not substance: excerpts of the licences of licensedcode-data, each with one kind
# of noise planted (or two versions of the same licence where they differ only so).
# ----------------------------------------------------------------------------------------

def test_typewriter_quotes_against_curly_ones_are_formatting():
    # apache-1.1: 'THIS SOFTWARE IS PROVIDED ``AS IS'' AND ANY EXPRESSED OR IMPLIED'
    old = excerpt("apache-1.1", "THIS SOFTWARE IS PROVIDED", "OR IMPLIED")
    assert "``AS IS''" in old
    new = old.replace("``AS IS''", "\u201cAS IS\u201d")
    assert changes(old, new) == [("formatting", "quote style", "``", "\u201c"),
                                 ("formatting", "quote style", "''", "\u201d")]
    assert {c[:2] for c in changes(old, old.replace("``AS IS''", '"AS IS"'))} == {
        ("formatting", "quote style")}


def test_letter_case_of_a_defined_term_against_a_plain_word_is_formatting():
    """google-tos-2013 defines "Services" and writes its disclaimer in capitals ("ABOUT THE
    SERVICES"); the draft writes the disclaimer in sentence case, so "Services" there is a
    use of the defined term on one side and a plain word on the other."""
    definition = excerpt("google-tos-2013", "Thanks for using our products", '("Services").')
    caps = excerpt("google-tos-2013", "NEITHER GOOGLE NOR ITS SUPPLIERS", "ABOUT THE SERVICES.")
    lower = caps[0] + caps[1:].lower().replace("google", "Google").replace("services", "Services")
    precedent = doc(f"1. Services\n\n{definition}\n\n2. Warranties\n\n{caps}\n")
    draft = doc(f"1. Services\n\n{definition}\n\n2. Warranties\n\n{lower}\n")
    review = run_review(draft, precedent)
    assert substantive(review) == []
    details = {r for v in by_category(review, "formatting") for r in v.reasons}
    assert details == {"case differs"}


def test_list_labels_restyled_inside_a_sentence_are_numbering():
    # cc-by-3.0, section 4(b): "(i) ... (ii) ... (iii)" written "(a) ... (b) ... (c)"
    old = excerpt("cc-by-3.0", "You are utilizing: (i)", "(iii) to the extent")
    new = old.replace("(i)", "(a)").replace("(ii)", "(b)").replace("(iii)", "(c)")
    got = changes(old, new)
    assert [(c[0], c[1]) for c in got] == [("numbering", "list label")] * 3
    assert [c[2] for c in got] == ["i", "ii", "iii"]


def test_list_label_added_or_glued_label_renumbered_is_numbering():
    # cc-by-3.0, section 8: item "b." follows the end of a sentence once lines are joined
    old = excerpt("cc-by-3.0", "granted to You under this License. b. Each time", "Licensor offers")
    assert changes(old, old.replace(" b. Each", " Each")) == [("numbering", "list label", "b.", "")]
    # a label glued to its heading ("2.Scope", common practice in converted documents)
    assert [c[0] for c in changes("2.Scope of the Licence", "3.Scope of the Licence")] == [
        "numbering"]


def test_a_blank_of_the_precedent_filled_in_is_completion():
    # apache-2.0, appendix: "Copyright [yyyy] [name of copyright owner]"
    old = excerpt("apache-2.0", "Copyright [yyyy]", "copyright owner]")
    got = changes(old, "Copyright 2026 Ardence Tools Ltd")
    assert [(c[0], c[1], c[2]) for c in got] == [
        ("completion", "blank", "[yyyy] [name of copyright owner]")]
    # "[●]" and an empty "Name:" line of a signature block (common practice, no source)
    assert [c[:2] for c in changes("Signed for [\u25cf] by:\nName:\nTitle:",
                                   "Signed for Ardence Tools Ltd by:\nName: Mira Solberg\nTitle:")
            ] == [("completion", "blank"), ("completion", "blank")]
    # words that replace a blank's neighbour are no completion
    assert changes("pay [\u25cf] within", "pay [\u25cf] before")[0][0] == "substantive"
