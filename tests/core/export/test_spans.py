"""The span-edit layer (core.export.spans): laws every decision's edit obeys.

Reference: plain string slicing -- the decided text is the draft with exactly the span
replaced -- and the standard library's ``difflib`` as an independent word diff where a
second opinion is useful.
"""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st

from core.export.spans import SpanEdit, amend_edits, apply_span_edits, revert_edits, seam
from core.review.worddiff import diff_texts

_TEXT = st.text(alphabet="ab cD.,;()0\u201c\u201d-", max_size=40)


@settings(max_examples=500, deadline=None)
@given(text=_TEXT.filter(bool), new=_TEXT.filter(bool), data=st.data())
def test_an_amend_replaces_exactly_the_span(text, new, data):
    a = data.draw(st.integers(0, len(text) - 1))
    b = data.draw(st.integers(a + 1, len(text)))
    edits = amend_edits(text, (a, b), new)
    assert apply_span_edits(text, edits) == text[:a] + new + text[b:]
    for e in edits:  # the edit lies inside the span and is no larger than the change
        assert a <= e.start <= e.end <= b


def test_an_amend_cut_to_the_words_that_differ():
    text = "within sixty (60) days of receipt"
    (edit,) = amend_edits(text, (7, 22), "forty-five (45) days")
    assert (text[edit.start:edit.end], edit.new) == ("sixty (60)", "forty-five (45)")


def test_words_put_in_at_a_point_or_taken_out_keep_single_spaces():
    """Common practice, no source: one space between words, none before a comma."""
    assert apply_span_edits("shall be paid", [seam("shall be paid", 6, 6, "not")]) == "shall not be paid"
    assert apply_span_edits("shall not be paid", [seam("shall not be paid", 6, 9, "")]) == "shall be paid"
    assert apply_span_edits("for fraud, and", [seam("for fraud, and", 9, 9, "or death")]) == "for fraud or death, and"
    assert apply_span_edits("x", amend_edits("x", (1, 1), "y")) == "x y"


@settings(max_examples=300, deadline=None)
@given(precedent=_TEXT, draft=_TEXT)
def test_reverting_the_whole_text_gives_the_precedent_but_for_restyled_words(precedent, draft):
    """With spans covering both texts, a revert gives the precedent's words everywhere the
    word diff changed them, and keeps the draft's where the diff only restyled them (case,
    quotes, dashes, white space: the same words once normalised)."""
    edits = diff_texts(precedent, draft)
    got = apply_span_edits(draft, revert_edits(edits, precedent, draft, precedent=(0, len(precedent)),
                                               draft=(0, len(draft))))
    expected = "".join(draft[e.d1:e.d2] if e.restyle or e.tag == "equal" else precedent[e.p1:e.p2]
                       for e in edits)
    assert got == expected
    if not any(e.restyle for e in edits):
        assert got == precedent


def test_span_edits_apply_in_order():
    assert apply_span_edits("abcdef", [SpanEdit(4, 5, "E"), SpanEdit(0, 1, "A")]) == "AbcdEf"
