"""Word-level diff of one aligned pair of provisions.

Each distinct token key of the pair is mapped to one code point (white space to " ", a
single punctuation character to itself, every other key to a private-use code point,
Unicode 15.0 section 23.5), the two code-point strings are diffed with diff-match-patch
(Myers' O(ND) algorithm, with no time-out so that the result is exact and reproducible), and
diff-match-patch's semantic clean-up merges the small equalities that make a diff hard to
read.  The clean-up may also swallow long unchanged stretches between two larger edits (it
merges an equality shorter than the edits on both sides of it), which would show unchanged
words as deleted and inserted again; every run of at least :data:`ANCHOR_WORDS` unchanged
words that the exact diff found inside a merged edit is therefore kept unchanged.  Equal
runs are then compared token by token on the *original* texts: tokens whose keys agree but
whose text differs (letter case, quote or dash style, white space, a renamed defined term, a
renumbered cross-reference) become edits of their own, so an ``equal`` edit always covers
identical text on both sides.

Cost: O((N + M) + N·D) per pair for N, M tokens and D differing tokens (Myers), with no
time-out; D is small for an aligned pair because alignment requires similar texts.  Pairs
longer than :data:`LINE_MODE_TOKENS` are diffed sentence by sentence first.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from diff_match_patch import diff_match_patch

from ..model import Edit
from .tokens import KIND_TERM, KIND_XREF, TokenSeq, tokenize

#: Token kinds that are words (word, number, defined-term use, cross-reference).
_WORDLIKE = frozenset("wntx")

__all__ = ["TokenOp", "diff_texts", "edits_from_ops", "pair_edits_from_ops", "token_ops"]

# Private-use areas (Unicode 15.0 section 23.5): the BMP area, then planes 15 and 16.
_PUA_RANGES = ((0xE000, 0xF8FF), (0xF0000, 0xFFFFD), (0x100000, 0x10FFFD))
_PUA_SIZE = sum(b - a + 1 for a, b in _PUA_RANGES)
#: Restyled tokens (same key, different text) at most this many tokens apart are one hunk.
RESTYLE_JOIN_GAP = 2
#: Unchanged words in a row that the semantic clean-up may not merge into an edit: three
#: words in the same order on both sides are the text kept, not chance ("the" or "of the"
#: between two rewritten phrases is chance, and merging it keeps the change readable).
#: A judgement value; on the licence version pairs (benchmarks/accuracy_version_pairs.py) it
#: keeps every unchanged stretch of a provision split over several draft provisions.
ANCHOR_WORDS = 3
#: Above this many tokens in a pair (about 4,000 words of each text), diff sentence by
#: sentence first (diff-match-patch's line mode, full stops encoded as line breaks), then word
#: by word inside the changed sentences: a heavily rewritten 10,000-word provision then takes
#: well under a second instead of tens of seconds.  Below it the diff is an exact Myers diff.
LINE_MODE_TOKENS = 16_000


def _pua(n: int) -> str:
    for a, b in _PUA_RANGES:
        if n <= b - a:
            return chr(a + n)
        n -= b - a + 1
    raise ValueError("more distinct words in one provision pair than private-use code points")


@dataclass(frozen=True, slots=True)
class TokenOp:
    """``a`` tokens i1..i2 became ``b`` tokens j1..j2.

    tag is ``equal`` (same text), ``insert``, ``delete``, ``replace`` (different keys) or
    ``restyle`` (same keys, different text: formatting, a renamed term or a renumbered
    cross-reference; always the same number of tokens on both sides, some of which may be
    identical)."""

    tag: str
    i1: int
    i2: int
    j1: int
    j2: int


def _encode(keys: Sequence[str], book: dict[str, str]) -> str:
    out = []
    for k in keys:
        c = book.get(k)
        if c is None:
            if k == ".":
                c = "\n"  # a sentence end is a "line" for diff-match-patch's line mode
            elif k == " " or (len(k) == 1 and not k.isalnum() and not k.isspace()):
                c = k
            else:
                n = len(book)
                if n >= _PUA_SIZE:
                    raise ValueError("too many distinct words in one provision pair")
                c = _pua(n)
            book[k] = c
        out.append(c)
    return "".join(out)


def _dmp() -> diff_match_patch:
    dmp = diff_match_patch()
    dmp.Diff_Timeout = 0  # exact and reproducible (no half-match short cut, no deadline)
    return dmp


def token_ops(a: TokenSeq, b: TokenSeq, *, semantic: bool = True) -> list[TokenOp]:
    """Opcodes turning token sequence *a* (precedent) into *b* (draft).

    The ops tile both sequences in order without gap or overlap."""
    if a.keys == b.keys:
        diffs = [(0, "x" * len(a.keys))] if a.keys else []
    else:
        book: dict[str, str] = {}
        sa = _encode(a.keys, book)
        sb = _encode(b.keys, book)
        dmp = _dmp()
        diffs = dmp.diff_main(sa, sb, len(sa) + len(sb) > LINE_MODE_TOKENS)
        if semantic:
            exact = list(diffs)
            dmp.diff_cleanupSemantic(diffs)
            return _restyled(a, b, _anchored(a, _ops(diffs), _ops(exact)))
    return _restyled(a, b, _ops(diffs))


def _ops(diffs: Sequence[tuple[int, str]]) -> list[TokenOp]:
    """diff-match-patch's (op, text) list as token opcodes."""
    raw: list[TokenOp] = []
    i = j = 0
    pend_del = pend_ins = 0

    def flush() -> None:
        nonlocal i, j, pend_del, pend_ins
        if pend_del or pend_ins:
            tag = "replace" if pend_del and pend_ins else ("delete" if pend_del else "insert")
            raw.append(TokenOp(tag, i, i + pend_del, j, j + pend_ins))
            i += pend_del
            j += pend_ins
            pend_del = pend_ins = 0

    for op, text in diffs:
        n = len(text)
        if op == 0:
            flush()
            raw.append(TokenOp("equal", i, i + n, j, j + n))
            i += n
            j += n
        elif op < 0:
            pend_del += n
        else:
            pend_ins += n
    flush()
    return raw


def _anchored(a: TokenSeq, ops: Sequence[TokenOp], exact: Sequence[TokenOp]) -> list[TokenOp]:
    """*ops* (after the semantic clean-up) with the equal runs of the *exact* diff of at
    least ANCHOR_WORDS words that fall inside a ``replace`` op kept equal.  O(tokens)."""
    anchors = [op for op in exact if op.tag == "equal" and sum(
        a.kinds[i] in _WORDLIKE for i in range(op.i1, op.i2)) >= ANCHOR_WORDS]
    if not anchors:
        return list(ops)
    out: list[TokenOp] = []
    k = 0
    for op in ops:
        if op.tag != "replace":
            out.append(op)
            continue
        while k < len(anchors) and anchors[k].i2 <= op.i1:
            k += 1
        i, j = op.i1, op.j1
        m = k
        while m < len(anchors) and anchors[m].i1 < op.i2:
            e = anchors[m]
            lo = max(0, op.i1 - e.i1, op.j1 - e.j1, i - e.i1, j - e.j1)
            hi = min(e.i2 - e.i1, op.i2 - e.i1, op.j2 - e.j1)
            if hi - lo > 0 and sum(a.kinds[t] in _WORDLIKE
                                   for t in range(e.i1 + lo, e.i1 + hi)) >= ANCHOR_WORDS:
                out.extend(_edit_op(i, e.i1 + lo, j, e.j1 + lo))
                out.append(TokenOp("equal", e.i1 + lo, e.i1 + hi, e.j1 + lo, e.j1 + hi))
                i, j = e.i1 + hi, e.j1 + hi
            m += 1
        out.extend(_edit_op(i, op.i2, j, op.j2))
    return out


def _edit_op(i1: int, i2: int, j1: int, j2: int) -> list[TokenOp]:
    """The op for tokens i1..i2 becoming j1..j2 (none when both are empty)."""
    if i1 == i2 and j1 == j2:
        return []
    tag = "replace" if i1 < i2 and j1 < j2 else ("delete" if i1 < i2 else "insert")
    return [TokenOp(tag, i1, i2, j1, j2)]


def _restyled(a: TokenSeq, b: TokenSeq, raw: Sequence[TokenOp]) -> list[TokenOp]:
    """Split equal-key runs where the original texts differ; differing tokens at most
    RESTYLE_JOIN_GAP tokens apart form one restyle op (the quotation marks around a word)."""
    out: list[TokenOp] = []
    for op in raw:
        if op.tag != "equal":
            out.append(op)
            continue
        if a.text[a.starts[op.i1]:a.starts[op.i2]] == b.text[b.starts[op.j1]:b.starts[op.j2]]:
            out.append(op)  # same text, token for token
            continue
        diff_at = [k for k in range(op.i2 - op.i1) if a.token(op.i1 + k) != b.token(op.j1 + k)]
        if not diff_at:
            out.append(op)
            continue
        runs: list[list[int]] = [[diff_at[0], diff_at[0] + 1]]
        for k in diff_at[1:]:
            if k - runs[-1][1] <= RESTYLE_JOIN_GAP:
                runs[-1][1] = k + 1
            else:
                runs.append([k, k + 1])
        pos = 0
        for s0, s1 in runs:
            if s0 > pos:
                out.append(TokenOp("equal", op.i1 + pos, op.i1 + s0, op.j1 + pos, op.j1 + s0))
            out.append(TokenOp("restyle", op.i1 + s0, op.i1 + s1, op.j1 + s0, op.j1 + s1))
            pos = s1
        if op.i1 + pos < op.i2:
            out.append(TokenOp("equal", op.i1 + pos, op.i2, op.j1 + pos, op.j2))
    return out


def edits_from_ops(a: TokenSeq, b: TokenSeq, ops: Sequence[TokenOp]) -> list[Edit]:
    """Character-offset :class:`Edit` hunks (``restyle`` becomes ``replace`` with its
    ``restyle`` flag set)."""
    edits: list[Edit] = []
    for op in ops:
        p1, p2 = a.span(op.i1, op.i2)
        d1, d2 = b.span(op.j1, op.j2)
        tag = "replace" if op.tag == "restyle" else op.tag
        if edits and edits[-1].tag == tag == "equal":
            prev = edits.pop()
            edits.append(Edit("equal", prev.p1, p2, prev.d1, d2))
        else:
            edits.append(Edit(tag, p1, p2, d1, d2, restyle=op.tag == "restyle"))
    return edits


def pair_edits_from_ops(a: TokenSeq, b: TokenSeq, ops: Sequence[TokenOp]) -> tuple[Edit, ...]:
    """The hunks the review keeps in :attr:`core.model.Pair.edits` (see the invariants in
    :mod:`core.model`): the ops as character-offset :class:`Edit` hunks of the original
    texts, with each ``restyle`` op cut token by token -- identical tokens are ``equal``, a
    restyled defined-term use or cross-reference is a ``replace`` hunk of its own (so that a
    view can tell a renamed term or a renumbered reference from changed words), other
    restyled tokens next to each other form one ``replace`` hunk; every hunk cut from a
    ``restyle`` op has its ``restyle`` flag set.  Adjacent ``equal`` hunks are merged.  O(tokens)."""
    out: list[Edit] = []
    whole: list[bool] = []  # per hunk of out: a term use or cross-reference on its own

    def push(tag: str, p1: int, p2: int, d1: int, d2: int, alone: bool = False,
             restyle: bool = False) -> None:
        if p1 == p2 and d1 == d2:
            return
        if (out and not alone and not whole[-1] and out[-1].tag == tag and tag in ("equal", "replace")
                and out[-1].restyle == restyle):
            prev = out[-1]
            out[-1] = Edit(tag, prev.p1, p2, prev.d1, d2, restyle=restyle)
            return
        out.append(Edit(tag, p1, p2, d1, d2, restyle=restyle))
        whole.append(alone)

    for op in ops:
        if op.tag != "restyle":
            p1, p2 = a.span(op.i1, op.i2)
            d1, d2 = b.span(op.j1, op.j2)
            # a replace op from the diff is not merged with restyled tokens next to it
            push(op.tag, p1, p2, d1, d2, alone=op.tag != "equal")
            continue
        for k in range(op.i2 - op.i1):
            i, j = op.i1 + k, op.j1 + k
            p1, p2 = a.span(i, i + 1)
            d1, d2 = b.span(j, j + 1)
            if a.text[p1:p2] == b.text[d1:d2]:
                push("equal", p1, p2, d1, d2)
            else:
                push("replace", p1, p2, d1, d2, alone=a.kinds[i] in (KIND_TERM, KIND_XREF),
                     restyle=True)
        if whole and out[-1].tag == "replace" and not whole[-1]:
            whole[-1] = True  # restyled tokens do not run on into the next op
    return tuple(out)


def diff_texts(precedent: str, draft: str, *, semantic: bool = True) -> list[Edit]:
    """Word diff of two plain texts (no term map): ``precedent[e.p1:e.p2]`` became
    ``draft[e.d1:e.d2]`` for each edit; equal edits cover identical text."""
    a = tokenize(precedent)
    b = tokenize(draft)
    return edits_from_ops(a, b, token_ops(a, b, semantic=semantic))
