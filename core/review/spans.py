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
``equal`` hunk (its two sides are the same text).  Timing: O(hunks) to index a diff
(:class:`AlignedPoints`), then O(log hunks) per pair of spans.
"""

from __future__ import annotations

from bisect import bisect_left, bisect_right
from collections.abc import Sequence

from .tokens import TokenSeq
from .worddiff import TokenOp

__all__ = ["AlignedPoints", "corresponding_spans"]

Span = tuple[int, int]


class AlignedPoints:
    """The aligned points of one diff, computed once (O(hunks)), so that each change's
    corresponding spans cost O(log hunks) (a long provision rewritten has hundreds of
    changes: scanning every hunk for each was quadratic)."""

    def __init__(self, ops: Sequence[TokenOp], a: TokenSeq, b: TokenSeq) -> None:
        self.a, self.b = a, b
        self.equal: list[bool] = []
        self.p1: list[int] = []
        self.p2: list[int] = []
        self.d1: list[int] = []
        self.d2: list[int] = []
        for op in ops:
            p1, p2 = a.span(op.i1, op.i2)
            d1, d2 = b.span(op.j1, op.j2)
            self.equal.append(op.tag == "equal")
            self.p1.append(p1)
            self.p2.append(p2)
            self.d1.append(d1)
            self.d2.append(d2)

    def left(self, x: int, y: int) -> tuple[int, int]:
        """The last aligned point (px, py) with px <= x and py <= y: in the last hunk that
        starts at or before (x, y) (hunks tile both texts in order)."""
        k = min(bisect_right(self.p1, x), bisect_right(self.d1, y)) - 1
        if k < 0:
            return (0, 0)
        p1, p2, d1, d2 = self.p1[k], self.p2[k], self.d1[k], self.d2[k]
        if self.equal[k]:
            step = min(x - p1, y - d1, p2 - p1)
            return (p1 + step, d1 + step)
        if p2 <= x and d2 <= y:
            return (p2, d2)
        return (p1, d1)

    def right(self, x: int, y: int) -> tuple[int, int]:
        """The first aligned point (px, py) with px >= x and py >= y: in the first hunk that
        ends at or after (x, y) (an equal hunk's two sides have the same length, so the
        point inside it always exists)."""
        k = max(bisect_left(self.p2, x), bisect_left(self.d2, y))
        if k >= len(self.p1):
            return (len(self.a.text), len(self.b.text))
        p1, p2, d1, d2 = self.p1[k], self.p2[k], self.d1[k], self.d2[k]
        if self.equal[k]:
            step = max(x - p1, y - d1, 0)
            return (p1 + step, d1 + step)
        if p1 >= x and d1 >= y:
            return (p1, d1)
        return (p2, d2)

    def spans(self, *, precedent: Span, draft: Span) -> tuple[Span, Span]:
        """See :func:`corresponding_spans`."""
        x0, y0 = self.left(precedent[0], draft[0])
        x1, y1 = self.right(precedent[1], draft[1])
        return _trim(self.a.text, x0, x1), _trim(self.b.text, y0, y1)


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
    return AlignedPoints(ops, a, b).spans(precedent=precedent, draft=draft)
