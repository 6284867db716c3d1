"""Word-level diff of one aligned pair of provisions.

Each distinct token key of the pair is mapped to one code point (white space to " ", a
single punctuation character to itself, every other key to a private-use code point,
Unicode 15.0 section 23.5), and the two code-point strings are diffed exactly: a longest
common subsequence of tokens is kept unchanged.  diff-match-patch's semantic clean-up then
merges the small equalities that make a diff hard to read.  The clean-up may also swallow
long unchanged stretches between two larger edits (it merges an equality shorter than the
edits on both sides of it), which would show unchanged words as deleted and inserted again;
every run of at least :data:`ANCHOR_WORDS` unchanged words that the exact diff found inside a
merged edit is therefore kept unchanged.  Equal runs are then compared token by token on the
*original* texts: tokens whose keys agree but whose text differs (letter case, quote or dash
style, white space, a renamed defined term, a renumbered cross-reference) become edits of
their own, so an ``equal`` edit always covers identical text on both sides.

The exact diff is computed one of two ways, both giving a shortest edit script:

* diff-match-patch (Myers' O(ND) algorithm, with no time-out so that the result is exact
  and reproducible) when it is cheap -- for N and M tokens with D of them inserted or
  deleted, (N + M) x D + MYERS_SQUARE_WEIGHT x D^2 at most :data:`MYERS_BUDGET`, or at
  most the cost of the other way: the pairs of two versions of a document;
* otherwise rapidfuzz's ``Indel.opcodes`` (a bit-parallel longest common subsequence, in
  compiled code, O(N·M/64) whatever D): a rewritten provision or two unrelated ones, where
  Myers' search in Python grows with D squared (a 10,000-word provision rewritten from
  scratch took about fifty seconds per diff).

Cost: whether D is small enough is decided by rapidfuzz's ``Indel.distance`` with a cut-off
(compiled, at most O(N·M/64)); then the cheaper of the two ways; the semantic clean-up and
the rest are linear in the diff's entries and the tokens.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from functools import lru_cache
from typing import Any, Literal, NamedTuple

from diff_match_patch import diff_match_patch
from rapidfuzz.distance import Indel

from ..model import Edit, EditTag
from .tokens import KIND_TERM, KIND_XREF, TokenSeq, tokenize

#: Token kinds that are words (word, number, defined-term use, cross-reference).
_WORDLIKE = frozenset("wntx")

__all__ = ["MYERS_BUDGET", "MYERS_SQUARE_WEIGHT", "TokenOp", "TokenTag", "clear_diff_cache", "diff_texts",
           "edits_from_ops", "exact_diff", "pair_edits_from_ops", "semantic_cleanup", "token_ops"]

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
#: Myers' search in Python, on N and M tokens with D of them inserted or deleted, takes
#: about (N + M) x D + MYERS_SQUARE_WEIGHT x D^2 steps of about 20 ns each (fitted on this
#: 2-core machine over random token strings: 0.5 ms for 200 tokens with D = 18, 30 ms for 200
#: unrelated tokens with D = 212, 10 ms for 4,000 tokens with D = 64, 6.5 s for 4,000
#: unrelated tokens); rapidfuzz's opcodes take about N x M / 64 word operations of about the
#: same time each (108 ms for 21,000 tokens a side), whatever D.
MYERS_SQUARE_WEIGHT = 20
#: Pairs whose Myers cost (above) is at most this -- about 2 ms -- are always diffed with
#: Myers' search: the pairs of two versions of a document (a few words changed in a clause),
#: on which the review's rules were tuned.  Costlier pairs take whichever of the two costs
#: less: Myers for a long provision with few changes, rapidfuzz for a rewritten or
#: unrelated one.
MYERS_BUDGET = 100_000


def _pua(n: int) -> str:
    for a, b in _PUA_RANGES:
        if n <= b - a:
            return chr(a + n)
        n -= b - a + 1
    raise ValueError("more distinct words in one provision pair than private-use code points")


#: The tags of a token op: difflib's four, and ``restyle``.
TokenTag = Literal["equal", "insert", "delete", "replace", "restyle"]


class TokenOp(NamedTuple):
    """``a`` tokens i1..i2 became ``b`` tokens j1..j2.

    tag is ``equal`` (same text), ``insert``, ``delete``, ``replace`` (different keys) or
    ``restyle`` (same keys, different text: formatting, a renamed term or a renumbered
    cross-reference; always the same number of tokens on both sides, some of which may be
    identical).  A named tuple: a rewritten provision's diff makes tens of thousands, and a
    tuple is made several times faster than a frozen dataclass."""

    tag: TokenTag
    i1: int
    i2: int
    j1: int
    j2: int


def _encode(keys: Sequence[str], book: dict[str, str]) -> str:
    """*keys* as one code point each, new keys added to *book* (the loop in Python runs over
    the distinct keys only)."""
    for k in dict.fromkeys(keys):
        if k in book:
            continue
        if k == ".":
            c = "\n"  # a sentence end: the clean-up prefers edit boundaries at line breaks
        elif k == " " or (len(k) == 1 and not k.isalnum() and not k.isspace()):
            c = k
        else:
            n = len(book)
            if n >= _PUA_SIZE:
                raise ValueError("too many distinct words in one provision pair")
            c = _pua(n)
        book[k] = c
    return "".join(map(book.__getitem__, keys))


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
        diffs = exact_diff(sa, sb)
        if semantic:
            exact = list(diffs)
            diffs = semantic_cleanup(diffs)
            return _restyled(a, b, _anchored(a, _ops(diffs), _ops(exact)))
    return _restyled(a, b, _ops(diffs))


def _myers_cap(n: int, m: int) -> int:
    """The largest D for which Myers' search is chosen (see MYERS_BUDGET): the root of
    (n + m) D + MYERS_SQUARE_WEIGHT D^2 = max(MYERS_BUDGET, n m / 64)."""
    limit = max(MYERS_BUDGET, n * m / 64)
    if limit < 0:
        return -1
    w = MYERS_SQUARE_WEIGHT
    return int((-(n + m) + math.sqrt((n + m) ** 2 + 4 * w * limit)) / (2 * w))


def exact_diff(sa: str, sb: str) -> list[tuple[int, str]]:
    """A shortest edit script from *sa* to *sb* as diff-match-patch's (op, text) list
    (-1 delete, 0 equal, 1 insert): Myers' search when it is cheap (see MYERS_BUDGET), else
    rapidfuzz's longest common subsequence.  Cached: the term map's scan and the review
    diff the same pair of texts, with the same keys when no defined term differs."""
    return list(_exact_diff(sa, sb))


def clear_diff_cache() -> None:
    """Forget the diffs computed (benchmarks measure cold runs)."""
    _exact_diff.cache_clear()


#: Pairs of encoded texts whose exact diff is kept (the aligned pairs of a long agreement).
_DIFF_CACHE_SIZE = 1024


@lru_cache(maxsize=_DIFF_CACHE_SIZE)
def _exact_diff(sa: str, sb: str) -> tuple[tuple[int, str], ...]:
    cap = _myers_cap(len(sa), len(sb))
    # D itself, or cap + 1 as soon as it exceeds cap (rapidfuzz's banded bound is cheaper)
    if cap >= 0 and Indel.distance(sa, sb, score_cutoff=cap) <= cap:
        return tuple(_dmp().diff_main(sa, sb, False))
    diffs: list[tuple[int, str]] = []
    for opcode in Indel.opcodes(sa, sb):
        i1, i2, j1, j2 = opcode.src_start, opcode.src_end, opcode.dest_start, opcode.dest_end
        if opcode.tag == "equal":
            diffs.append((0, sa[i1:i2]))
            continue
        if i2 > i1:
            diffs.append((-1, sa[i1:i2]))
        if j2 > j1:
            diffs.append((1, sb[j1:j2]))
    return tuple(diffs)


def semantic_cleanup(diffs: list[tuple[int, str]]) -> list[tuple[int, str]]:
    """diff-match-patch's semantic clean-up of *diffs* (``diff_cleanupSemantic``: the same
    result, the tests compare), with its two passes that edit the list in place rewritten to
    build a new list in one sweep: the elimination of small equalities re-scanned the merged
    edits after each elimination, and a rewritten provision's diff of 18,000 entries took
    0.3 s.  Its own merge and sideways shifts (``diff_cleanupMerge``,
    ``diff_cleanupSemanticLossless``) run in between, unchanged."""
    dmp = _dmp()
    out, changed = _eliminate_equalities(diffs)
    if changed:
        dmp.diff_cleanupMerge(out)
    dmp.diff_cleanupSemanticLossless(out)
    return _split_overlaps(dmp, out)


def _eliminate_equalities(diffs: list[tuple[int, str]]) -> tuple[list[tuple[int, str]], bool]:
    """The first pass of the semantic clean-up: an equality no longer than the edits on
    each side of it (the longer of the deleted and inserted text, between it and the next
    equality) becomes a deletion and an insertion, and the equality before it is looked at
    again.  A stack of equalities (str) and edit runs ([deleted parts, inserted parts,
    deleted length, inserted length]); each entry is pushed once and merged at most once,
    so O(entries).  Returns *diffs* itself when nothing was eliminated."""
    stack: list[Any] = []
    changed = False
    for op, text in diffs:
        if op == 0:
            stack.append(text)
            continue
        run = stack[-1] if stack and type(stack[-1]) is list else None
        if run is None:
            run = [[], [], 0, 0]
            stack.append(run)
        if op < 0:
            run[0].append(text)
            run[2] += len(text)
        else:
            run[1].append(text)
            run[3] += len(text)
        while len(stack) >= 3 and type(stack[-2]) is str:
            after, equal, before = stack[-1], stack[-2], stack[-3]
            n = len(equal)
            if not (n and type(before) is list and n <= max(before[2], before[3]) and n <= max(after[2], after[3])):
                break
            stack[-3:] = [[[*before[0], equal, *after[0]], [*before[1], equal, *after[1]],
                           before[2] + n + after[2], before[3] + n + after[3]]]
            changed = True
    if not changed:
        return list(diffs), False
    out: list[tuple[int, str]] = []
    for entry in stack:
        if type(entry) is str:
            out.append((0, entry))
            continue
        if entry[2]:
            out.append((-1, "".join(entry[0])))
        if entry[3]:
            out.append((1, "".join(entry[1])))
    return out, True


def _split_overlaps(dmp: diff_match_patch, diffs: list[tuple[int, str]]) -> list[tuple[int, str]]:
    """The last pass of the semantic clean-up: a deletion followed by an insertion that
    overlap by at least half of either ("abcxxx" -> "xxxdef") keep the overlap as an
    equality.  O(entries) list building instead of insertions."""
    out: list[tuple[int, str]] = []
    i, n = 0, len(diffs)
    while i < n:
        if i + 1 < n and diffs[i][0] < 0 and diffs[i + 1][0] > 0:
            deletion, insertion = diffs[i][1], diffs[i + 1][1]
            o1 = dmp.diff_commonOverlap(deletion, insertion)
            o2 = dmp.diff_commonOverlap(insertion, deletion)
            if o1 >= o2 and (o1 >= len(deletion) / 2.0 or o1 >= len(insertion) / 2.0):
                out += [(-1, deletion[:len(deletion) - o1]), (0, insertion[:o1]), (1, insertion[o1:])]
            elif o1 < o2 and (o2 >= len(deletion) / 2.0 or o2 >= len(insertion) / 2.0):
                out += [(1, insertion[:len(insertion) - o2]), (0, deletion[:o2]), (-1, deletion[o2:])]
            else:
                out += diffs[i:i + 2]
            i += 2
            continue
        out.append(diffs[i])
        i += 1
    return out


def _ops(diffs: Sequence[tuple[int, str]]) -> list[TokenOp]:
    """diff-match-patch's (op, text) list as token opcodes: each equality one op, the edits
    between two equalities one op."""
    raw: list[TokenOp] = []
    i = j = 0
    pend_del = pend_ins = 0
    for op, text in diffs:
        n = len(text)
        if op < 0:
            pend_del += n
        elif op > 0:
            pend_ins += n
        else:
            if pend_del or pend_ins:
                raw.append(TokenOp(_EDIT_TAG[bool(pend_del), bool(pend_ins)], i, i + pend_del, j, j + pend_ins))
                i += pend_del
                j += pend_ins
                pend_del = pend_ins = 0
            raw.append(TokenOp("equal", i, i + n, j, j + n))
            i += n
            j += n
    if pend_del or pend_ins:
        raw.append(TokenOp(_EDIT_TAG[bool(pend_del), bool(pend_ins)], i, i + pend_del, j, j + pend_ins))
    return raw


#: The tag of a run of edits by (anything deleted, anything inserted).
_EDIT_TAG: dict[tuple[bool, bool], TokenTag] = {(True, True): "replace", (True, False): "delete",
                                                 (False, True): "insert"}


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
    tag: TokenTag = "replace" if i1 < i2 and j1 < j2 else ("delete" if i1 < i2 else "insert")
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
        diff_at = _differing(a, b, op)
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


def _differing(a: TokenSeq, b: TokenSeq, op: TokenOp) -> list[int]:
    """The places k of the tokens of equal-key *op* whose texts differ (``a.token(op.i1 + k)
    != b.token(op.j1 + k)``), the slices taken in one pass."""
    at, bt, sa, sb = a.text, b.text, a.starts, b.starts
    return [k for k, (p, q, r, s) in enumerate(zip(sa[op.i1:op.i2], sa[op.i1 + 1:op.i2 + 1],
                                                   sb[op.j1:op.j2], sb[op.j1 + 1:op.j2 + 1], strict=True))
            if at[p:q] != bt[r:s]]


def edits_from_ops(a: TokenSeq, b: TokenSeq, ops: Sequence[TokenOp]) -> list[Edit]:
    """Character-offset :class:`Edit` hunks (``restyle`` becomes ``replace`` with its
    ``restyle`` flag set)."""
    edits: list[Edit] = []
    for op in ops:
        p1, p2 = a.span(op.i1, op.i2)
        d1, d2 = b.span(op.j1, op.j2)
        tag: EditTag = "replace" if op.tag == "restyle" else op.tag
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

    def push(tag: EditTag, p1: int, p2: int, d1: int, d2: int, alone: bool = False,
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
