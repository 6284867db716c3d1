"""Corresponding spans of a change (core.review.spans).

Reference: the definition in the module's docstring, computed by brute force -- every
aligned point of the diff (the boundaries of its hunks and every character boundary inside
an ``equal`` hunk) listed, then the last one at or before the span's start and the first one
at or after its end picked by a linear search.  :class:`AlignedPoints` finds the same points
by bisection.
"""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st

from core.review.spans import AlignedPoints, corresponding_spans
from core.review.tokens import tokenize
from core.review.worddiff import token_ops

WORDS = ["the", "Customer", "shall", "may", "pay", "thirty", "(30)", "days", "EUR", "10,000",
         ",", ".", "not", "within", "  "]
texts = st.lists(st.sampled_from(WORDS), max_size=25).map(" ".join)


def _points(ops, a, b) -> list[tuple[int, int]]:
    out = [(0, 0)]
    for op in ops:
        p1, p2 = a.span(op.i1, op.i2)
        d1, d2 = b.span(op.j1, op.j2)
        out.append((p1, d1))
        if op.tag == "equal":
            out += [(p1 + k, d1 + k) for k in range(p2 - p1 + 1)]
        out.append((p2, d2))
    out.append((len(a.text), len(b.text)))
    return sorted(set(out))


def _trim(text: str, x: int, y: int) -> tuple[int, int]:
    while x < y and text[x].isspace():
        x += 1
    while y > x and text[y - 1].isspace():
        y -= 1
    return x, y


@settings(max_examples=400, deadline=None)
@given(texts, texts, st.data())
def test_spans_equal_the_brute_force_definition(p: str, d: str, data) -> None:
    a, b = tokenize(p), tokenize(d)
    ops = token_ops(a, b)
    x0 = data.draw(st.integers(0, len(p)))
    x1 = data.draw(st.integers(x0, len(p)))
    y0 = data.draw(st.integers(0, len(d)))
    y1 = data.draw(st.integers(y0, len(d)))
    points = _points(ops, a, b)
    left = max(pt for pt in points if pt[0] <= x0 and pt[1] <= y0)
    right = min(pt for pt in points if pt[0] >= x1 and pt[1] >= y1)
    want = (_trim(p, left[0], right[0]), _trim(d, left[1], right[1]))
    got = AlignedPoints(ops, a, b).spans(precedent=(x0, x1), draft=(y0, y1))
    assert got == want
    assert corresponding_spans(ops, a, b, precedent=(x0, x1), draft=(y0, y1)) == want
