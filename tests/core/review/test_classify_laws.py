"""Laws of the classifier's fast paths against the direct computation they replace."""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st

from core.review.classify import _Cover
from core.review.worddiff import TokenOp, _ops

_spans = st.lists(st.tuples(st.integers(0, 60), st.integers(0, 30)).map(lambda t: (t[0], t[0] + t[1])), max_size=12)


@settings(max_examples=300, deadline=None)
@given(_spans, st.integers(0, 90), st.integers(0, 30))
def test_cover_answers_as_a_scan_of_every_span(spans, a, width) -> None:
    # reference: the direct question asked of each span in turn
    b = a + width
    assert _Cover(spans).covers(a, b) == any(s <= a and b < e for s, e in spans)


def _ops_direct(diffs):
    """The opcodes the way the diff reads: walk the entries, close a run of edits at each
    equality."""
    out, i, j, dels, ins = [], 0, 0, 0, 0
    for op, text in [*diffs, (0, "")]:
        if op == 0:
            if dels or ins:
                tag = "replace" if dels and ins else "delete" if dels else "insert"
                out.append(TokenOp(tag, i, i + dels, j, j + ins))
                i, j, dels, ins = i + dels, j + ins, 0, 0
            if text:
                out.append(TokenOp("equal", i, i + len(text), j, j + len(text)))
                i, j = i + len(text), j + len(text)
        elif op < 0:
            dels += len(text)
        else:
            ins += len(text)
    return out


@settings(max_examples=300, deadline=None)
@given(st.lists(st.tuples(st.sampled_from((-1, 0, 1)), st.text("abc", min_size=1, max_size=5)), max_size=15))
def test_ops_tile_the_diff_as_its_entries_read(diffs) -> None:
    assert _ops(diffs) == _ops_direct(diffs)


@settings(max_examples=200, deadline=None)
@given(st.lists(st.sampled_from(["Fees", "fees", " ", "  ", "\u201cSupplier\u201d", '"Supplier"', "shall", "SHALL",
                                 ",", "-", "\u2013"]), max_size=30), st.randoms())
def test_differing_tokens_are_those_a_token_by_token_scan_finds(words, rnd) -> None:
    # reference: the direct comparison of each pair of token texts
    from core.review.tokens import tokenize
    from core.review.worddiff import _differing

    a = tokenize("".join(words))
    other = [w.swapcase() if rnd.random() < 0.3 else w for w in words]
    b = tokenize("".join(other))
    if a.keys != b.keys:
        return  # the law is about equal-key runs
    op = TokenOp("equal", 0, len(a), 0, len(b))
    assert _differing(a, b, op) == [k for k in range(len(a)) if a.token(k) != b.token(k)]
