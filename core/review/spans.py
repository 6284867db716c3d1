"""Where a deviation's shown words sit: corresponding spans of the two texts.

A change found by the word diff covers the changed words only (``sixty (60`` of "sixty (60)
days").  What the review shows, and what a decision replaces, is wider: whole figures, and a
word of context around a change without letters or digits.  Widening each side on its own
can make the two sides disagree ("EUR 10,000,000 (ten million euros)" against "EUR 5,000,000
(five"), and a decision that replaces the draft's shown words by the precedent's would then
leave words behind or double them.  :func:`corresponding_spans` widens the two spans to the
nearest *aligned points* of the diff -- places where the text before is the same stretch of
both documents -- and then trims white space at both ends of each, so that:

* ``P[:a]`` and ``D[:c]`` end at the same place of the diff, up to white space, and so do
  ``P[b:]`` and ``D[d:]``;
* neither span starts or ends with white space (it is what a reader sees quoted).

Aligned points are the boundaries of the diff's hunks, and every character boundary inside an
``equal`` hunk (its two sides are the same text).  Timing: O(hunks) per call.
"""

from __future__ import annotations

from collections.abc import Sequence

from .tokens import TokenSeq
from .worddiff import TokenOp

__all__ = ["corresponding_spans"]

Span = tuple[int, int]


def _hunks(ops: Sequence[TokenOp], a: TokenSeq, b: TokenSeq) -> list[tuple[bool, int, int, int, int]]:
    """(equal?, p1, p2, d1, d2) character ranges of each op."""
    out = []
    for op in ops:
        p1, p2 = a.span(op.i1, op.i2)
        d1, d2 = b.span(op.j1, op.j2)
        out.append((op.tag == "equal", p1, p2, d1, d2))
    return out


def _left_point(hunks, x: int, y: int) -> tuple[int, int]:
    """The last aligned point (px, py) with px <= x and py <= y."""
    best = (0, 0)
    for equal, p1, p2, d1, d2 in hunks:
        if p1 > x or d1 > y:
            break
        best = (p1, d1)
        if equal:
            k = min(x - p1, y - d1, p2 - p1)
            best = (p1 + k, d1 + k)
        elif p2 <= x and d2 <= y:
            best = (p2, d2)
    return best


def _right_point(hunks, x: int, y: int, end: tuple[int, int]) -> tuple[int, int]:
    """The first aligned point (px, py) with px >= x and py >= y."""
    for equal, p1, p2, d1, d2 in hunks:
        if p2 < x or d2 < y:
            continue
        if equal:
            k = max(x - p1, y - d1, 0)
            if k <= p2 - p1:
                return (p1 + k, d1 + k)
            continue
        if p1 >= x and d1 >= y:
            return (p1, d1)
        return (p2, d2)
    return end


def _trim(text: str, a: int, b: int) -> Span:
    while a < b and text[a].isspace():
        a += 1
    while b > a and text[b - 1].isspace():
        b -= 1
    return a, b


def corresponding_spans(ops: Sequence[TokenOp], a: TokenSeq, b: TokenSeq, *, precedent: Span,
                        draft: Span) -> tuple[Span, Span]:
    """The smallest corresponding spans of ``a.text`` (precedent) and ``b.text`` (draft) that
    contain *precedent* and *draft* (each side's widened change), trimmed of white space.

    An empty side (words inserted or deleted) stays empty, at the aligned point where the
    words would go, moved past any white space there.

    >>> from core.review.tokens import tokenize
    >>> from core.review.worddiff import token_ops
    >>> p, d = tokenize("within thirty (30) days"), tokenize("within sixty (60) days")
    >>> corresponding_spans(token_ops(p, d), p, d, precedent=(7, 23), draft=(7, 16))
    ((7, 23), (7, 22))
    """
    hunks = _hunks(ops, a, b)
    x0, y0 = _left_point(hunks, precedent[0], draft[0])
    x1, y1 = _right_point(hunks, precedent[1], draft[1], (len(a.text), len(b.text)))
    return _trim(a.text, x0, x1), _trim(b.text, y0, y1)
