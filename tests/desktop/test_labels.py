"""desktop.labels: display strings from the engine's objects, nothing invented."""

from __future__ import annotations

import dataclasses

from desktop.labels import clause_label, frequency_text, short, summary

from .fixtures import make_review


def test_clause_labels_follow_the_drafts_numbering_and_name_the_precedents_when_different():
    review = make_review()
    devs = {d.id: d for d in review.deviations}
    assert clause_label(review, devs["v1"]) == "3 Limitation of liability"
    assert clause_label(review, devs["v7"]) == "4 Governing law (precedent 6)"
    assert clause_label(review, devs["v7"], compact=True) == "4 Governing law"
    assert clause_label(review, devs["v5"]) == "4 Publicity (precedent only)"
    assert clause_label(review, devs["v6"]) == "Definition of \u201cClient\u201d"


def test_summary_is_the_engines_first_reason_else_the_quoted_words():
    d = make_review().deviations[1]
    assert summary(d) == "payment period changed from 30 to 60 days"
    bare = dataclasses.replace(d, reasons=())
    assert summary(bare) == "\u201cwithin 30 days\u201d \u2192 \u201cwithin 60 days\u201d"
    assert summary(dataclasses.replace(bare, change="insert", draft_text="not")) == "adds \u201cnot\u201d"


def test_short_and_frequency_text():
    assert short("a  b\nc", 10) == "a b c"
    assert short("x" * 80, 10) == "x" * 9 + "\u2026"
    f = make_review(with_frequency=True).deviations[0].frequency
    assert frequency_text(f) == "1/12" and frequency_text(None) == ""


def test_the_views_use_the_engines_one_clause_label():
    """No second copy of the label code in the app (core.labels is the one)."""
    import core.labels
    from desktop.labels import provision_caption

    assert clause_label is core.labels.clause_label
    review = make_review()
    p = review.precedent.provision("p4")
    assert provision_caption(p) == core.labels.provision_label(p) == "3 Limitation of liability"
