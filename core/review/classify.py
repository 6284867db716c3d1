"""Classification of the hunks of a pair's word diff.

Categories (:data:`core.model.CATEGORIES`):

``formatting``
    only white space, quote style (TeX-style ````x''`` included), dash style or letter case
    differ -- also where one side writes a defined term ("You") and the other the same word
    as a plain word ("you");
``punctuation``
    the same words, different punctuation (or the same letters joined differently:
    "e-mail" / "email");
``numbering``
    a cross-reference renumbered to keep pointing at the same aligned provision
    ("Section 5.2" -> "Section 6.2"), an unchanged reference that lands elsewhere only
    because of renumbering, or list labels written into the text that changed, came or
    went ("(i)" -> "(a)"; :func:`.noise.label_spans`) with the words around them unchanged;
``completion``
    the draft fills in a blank of the precedent ("[●]", "[insert date]", "____", an empty
    "Name:" line; :mod:`.noise`): informational;
``term``
    a use of a defined term the draft names differently (the term map explains it), and
    "a"/"an" adjusted in front of it; the review reports one deviation per term pair;
``substantive``
    everything else.  The classifier adds the token-level signals the severity rules need:
    the other party named in a party's place, a proper name replaced, a cross-reference
    pointed at another provision.

Whatever the category, a change of figures is made substantive afterwards by the figures
guard (:mod:`.figures`), which runs last.

Adjacent hunks separated only by spaces and punctuation are one change (so "thirty (30)" ->
"sixty (60)" is one change, not two).  Cost: O(tokens of the pair).
"""

from __future__ import annotations

from bisect import bisect_right
from collections.abc import Container, Mapping, Sequence
from dataclasses import dataclass, field
from itertools import accumulate
from typing import Literal

from ..model import Category
from .noise import is_blank_fill, label_spans
from .severity import Signal
from .tokens import (
    DASHES,
    KIND_SPACE,
    KIND_TERM,
    KIND_XREF,
    QUOTES,
    TEX_QUOTES,
    TokenSeq,
    fold_text,
)
from .worddiff import TokenOp

__all__ = ["BLANK_FILLED", "Change", "TermContext", "classify_ops"]

#: Token kinds that carry meaning (tokens.KIND_WORD, KIND_NUMBER, KIND_TERM, KIND_XREF):
#: space and punctuation are judged apart (formatting, punctuation).
_WORDLIKE = frozenset("wntx")
#: "a" / "an" swapped in front of a renamed defined term follows the rename (grammar): it is
#: part of the term change, not a change of its own.
_ARTICLES = frozenset({"a", "an"})
#: Formatting differences of one kind at most this many tokens apart are one change (the
#: two quotation marks around a word).
_FORMAT_JOIN_GAP = 3


@dataclass(frozen=True, slots=True)
class TermContext:
    """What the classifier must know about terms on each side."""

    #: offset of a term-use token in the draft text -> the draft's term name
    draft_term_at: Mapping[int, str]
    #: offset of a term-use token in the precedent text -> the precedent's term name
    precedent_term_at: Mapping[int, str]
    #: the precedent's party labels (the draft's are mapped to these names)
    party_labels: frozenset[str] = frozenset()
    #: draft term -> precedent term, for the mapped (renamed) terms
    mapped: Mapping[str, str] = field(default_factory=dict)


#: The changes a word hunk can be (the provision-level ones are core.model.ChangeKind's others).
WordChange = Literal["insert", "delete", "replace"]


@dataclass(frozen=True, slots=True)
class Change:
    category: Category
    change: WordChange
    p_span: tuple[int, int]  # character offsets in the precedent text (empty for an insert)
    d_span: tuple[int, int]
    detail: str  # e.g. "whitespace", "quote style", "case", "cross-reference", "words"
    terms: tuple[tuple[str, str], ...] = ()  # (draft name, precedent name) for category term
    signals: tuple[Signal, ...] = ()
    note: str = ""  # a reason for the non-substantive categories


def _quotes_folded(s: str) -> str:
    for tex, plain in TEX_QUOTES.items():
        s = s.replace(tex, plain)
    return "".join(QUOTES.get(c, c) for c in s)


def _fold_detail(a: str, b: str) -> str:
    if a.casefold() == b.casefold():
        return "case"
    if "".join(a.split()) == "".join(b.split()):
        return "whitespace"
    qa = _quotes_folded(a)
    qb = _quotes_folded(b)
    if qa.casefold() == qb.casefold():
        return "quote style"
    da = "".join(DASHES.get(c, c) for c in qa)
    db = "".join(DASHES.get(c, c) for c in qb)
    if da.casefold() == db.casefold():
        return "dash style"
    return "quote and dash style"


def _trim(seq: TokenSeq, i: int, j: int) -> tuple[int, int]:
    """Character span of tokens i..j-1 without white space at either end (the span itself
    when it is white space only)."""
    a, b = i, j
    while a < b and seq.kinds[a] == KIND_SPACE:
        a += 1
    while b > a and seq.kinds[b - 1] == KIND_SPACE:
        b -= 1
    if a == b:
        return seq.span(i, j)
    return seq.span(a, b)


def _restyle_changes(a: TokenSeq, b: TokenSeq, op: TokenOp, ctx: TermContext) -> list[Change]:
    out: list[Change] = []
    last_fmt: dict[str, tuple[int, int]] = {}  # detail -> (index in out, last token)
    for k in range(op.i2 - op.i1):
        i, j = op.i1 + k, op.j1 + k
        ta, tb = a.token(i), b.token(j)
        if ta == tb:
            continue
        kind = a.kinds[i] if a.kinds[i] == b.kinds[j] else ""  # "": a term against a word
        terms: tuple[tuple[str, str], ...] = ()
        note = ""
        cat: Category
        if kind == KIND_TERM:
            dn = ctx.draft_term_at.get(b.starts[j], tb)
            pn = ctx.precedent_term_at.get(a.starts[i], ta)
            if dn != pn and fold_text(ta) != fold_text(tb):
                cat, detail, terms = "term", "term", ((dn, pn),)
            else:
                cat, detail = "formatting", _fold_detail(ta, tb) if ta.strip() else "whitespace"
        elif kind == KIND_XREF:
            cat, detail = "numbering", "cross-reference"
            note = f"cross-reference renumbered from {ta} to {tb} (same provision)"
        elif kind == KIND_SPACE:
            cat, detail = "formatting", "whitespace"
        else:
            cat, detail = "formatting", _fold_detail(ta, tb)
        pa, pb = a.span(i, i + 1), b.span(j, j + 1)
        prev = last_fmt.get(detail) if cat == "formatting" else None
        if prev is not None and i - prev[1] <= _FORMAT_JOIN_GAP:
            c = out[prev[0]]
            out[prev[0]] = Change(cat, "replace", (c.p_span[0], pa[1]), (c.d_span[0], pb[1]),
                                  detail, note=c.note)
            last_fmt[detail] = (prev[0], i)
            continue
        if not note and cat == "formatting":
            note = f"{detail} differs"
        out.append(Change(cat, "replace", pa, pb, detail, terms, (), note))
        if cat == "formatting":
            last_fmt[detail] = (len(out) - 1, i)
    return out


@dataclass(frozen=True, slots=True)
class _Hunk:
    """One run of edits: precedent tokens i1..i2 became draft tokens j1..j2."""

    a: TokenSeq
    b: TokenSeq
    i1: int
    i2: int
    j1: int
    j2: int
    change: WordChange
    p_span: tuple[int, int]
    d_span: tuple[int, int]
    wa: list[int]  # word-like tokens of each side
    wb: list[int]
    la: frozenset[int]  # tokens of list labels on each side (the whole text's)
    lb: frozenset[int]

    def mk(self, cat: Category, detail: str, *, terms: tuple[tuple[str, str], ...] = (),
           signals: tuple[Signal, ...] = (), note: str = "") -> Change:
        return Change(cat, self.change, self.p_span, self.d_span, detail, terms=terms,
                      signals=signals, note=note)

    def words(self) -> tuple[str, str]:
        return self.a.text[slice(*self.p_span)], self.b.text[slice(*self.d_span)]


def _hunk(a: TokenSeq, b: TokenSeq, i1: int, i2: int, j1: int, j2: int,
          labels: tuple[frozenset[int], frozenset[int]]) -> _Hunk:
    change: WordChange = "insert" if i1 == i2 else ("delete" if j1 == j2 else "replace")
    p_span = _trim(a, i1, i2) if i1 < i2 else (a.starts[i1], a.starts[i1])
    d_span = _trim(b, j1, j2) if j1 < j2 else (b.starts[j1], b.starts[j1])
    wa = [i for i in range(i1, i2) if a.kinds[i] in _WORDLIKE]
    wb = [j for j in range(j1, j2) if b.kinds[j] in _WORDLIKE]
    return _Hunk(a, b, i1, i2, j1, j2, change, p_span, d_span, wa, wb, *labels)


def _article_rule(h: _Hunk, ctx: TermContext) -> Change | None:
    """"a" <-> "an" in front of a renamed term follows the rename."""
    ka = [h.a.keys[i] for i in h.wa]
    kb = [h.b.keys[j] for j in h.wb]
    if not (len(ka) == len(kb) == 1 and {ka[0], kb[0]} <= _ARTICLES and ka != kb):
        return None
    nxt = next((j for j in range(h.j2, len(h.b)) if h.b.kinds[j] in _WORDLIKE), None)
    if nxt is not None and h.b.kinds[nxt] == KIND_TERM:
        dn = ctx.draft_term_at.get(h.b.starts[nxt])
        if dn is not None and ctx.mapped and dn in ctx.mapped:
            return h.mk("term", "article", terms=((dn, ctx.mapped[dn]),))
    return None


def _xref_rule(h: _Hunk, ctx: TermContext) -> Change | None:
    """Cross-references that differ in what they point at, or only in their words."""
    a, b, wa, wb = h.a, h.b, h.wa, h.wb
    if not wa or len(wa) != len(wb):
        return None
    diff_pos = [k for k in range(len(wa)) if a.keys[wa[k]] != b.keys[wb[k]]]
    if not diff_pos or not all(a.kinds[wa[k]] == KIND_XREF and b.kinds[wb[k]] == KIND_XREF
                               for k in diff_pos):
        return None
    changed = [(a.token(wa[k]), b.token(wb[k])) for k in diff_pos
               if a.token(wa[k]) != b.token(wb[k])]
    if not changed:
        return h.mk("numbering", "cross-reference",
                    note=f"cross-reference {a.token(wa[diff_pos[0]])} is unchanged but, after "
                         "renumbering, now refers to a different provision")
    sigs = tuple(Signal("cross_reference_changed",
                        f"cross-reference changed from {x} to {y}, which is not the "
                        "provision the precedent refers to") for x, y in changed[:2])
    return h.mk("substantive", "cross-reference", signals=sigs)


def _label_note(h: _Hunk) -> str:
    def shown(seq: TokenSeq, lo: int, hi: int, marks: frozenset[int]) -> str:
        return " ".join("".join(seq.token(k) for k in range(lo, hi) if k in marks).split())

    old, new = shown(h.a, h.i1, h.i2, h.la), shown(h.b, h.j1, h.j2, h.lb)
    if old and new:
        return f"list label changed from {old} to {new}"
    return f"list label added: {new}" if new else f"list label removed: {old}"


def _noise_rule(h: _Hunk, ctx: TermContext) -> Change | None:
    """Formatting, punctuation and list labels: the same words once noise is set aside."""
    pw, dw = h.words()
    if h.change == "replace" and fold_text(pw) == fold_text(dw):
        detail = _fold_detail(pw, dw)
        return h.mk("formatting", detail, note=f"{detail} differs")
    a, b = h.a, h.b

    def kept(seq: TokenSeq, lo: int, hi: int, marks: frozenset[int], kinds: Container[str]) -> list[str]:
        return [seq.keys[k] for k in range(lo, hi) if seq.kinds[k] in kinds and k not in marks]

    ka, kb = kept(a, h.i1, h.i2, h.la, _WORDLIKE), kept(b, h.j1, h.j2, h.lb, _WORDLIKE)
    pa, pb = kept(a, h.i1, h.i2, h.la, "p"), kept(b, h.j1, h.j2, h.lb, "p")
    labelled = any(k in h.la for k in range(h.i1, h.i2)) or any(k in h.lb for k in range(h.j1, h.j2))
    if labelled and ka == kb and pa == pb:
        return h.mk("numbering", "list label", note=_label_note(h))
    if ka == kb:
        if pa != pb:
            return h.mk("punctuation", "punctuation", note="punctuation differs")
        return h.mk("formatting", "whitespace", note="whitespace differs")
    if "".join(ka).replace("-", "") == "".join(kb).replace("-", ""):
        if pa != pb:
            return h.mk("punctuation", "joining", note="words joined or hyphenated differently")
        return h.mk("formatting", "whitespace", note="words joined differently")
    return None


def _completion_rule(h: _Hunk, ctx: TermContext) -> Change | None:
    """The draft fills in a blank of the precedent (informational)."""
    if h.change == "delete":
        return None
    blank = is_blank_fill(h.a.text, h.p_span)
    if blank is None and not (h.change == "replace" and _fills_fields(h)):
        return None
    dw = h.words()[1]
    what = h.a.text[slice(*blank)] if blank and blank[0] < blank[1] else "an empty field"
    return h.mk("completion", "blank", note=f"{BLANK_FILLED}: {what} -> {_short(dw)}")


def _fills_fields(h: _Hunk) -> bool:
    """Whether the draft's side is the precedent's words with values added after empty form
    fields ("Name:" / "Name: Mira Solberg"): the clean-up of the diff merges such a short
    field label between two values into one replacement."""
    a, b = h.a, h.b
    pk = [i for i in range(h.i1, h.i2) if a.kinds[i] != KIND_SPACE]
    if sum(b.kinds[j] != KIND_SPACE for j in range(h.j1, h.j2)) <= len(pk):
        return False  # the draft adds no word to the precedent's: no value filled in
    points: list[int] = []  # where the draft adds words, as offsets of the precedent
    k = 0
    added = False
    folded: dict[str, str] = {}  # a rewritten clause repeats its words: fold each once

    def fold(tok: str) -> str:
        got = folded.get(tok)
        if got is None:
            got = folded[tok] = fold_text(tok)
        return got

    for j in range(h.j1, h.j2):
        if b.kinds[j] == KIND_SPACE:
            continue
        if k < len(pk) and fold(a.token(pk[k])) == fold(b.token(j)):
            if added:
                points.append(a.starts[pk[k]])
            added = False
            k += 1
        else:
            added = True
    if added and pk:
        points.append(a.starts[pk[-1] + 1])
    return k == len(pk) and bool(points) and all(is_blank_fill(a.text, (p, p)) for p in points)


#: How the reason of a filled-in blank starts (the precedent-set statistics leave such
#: deviations out of negotiation patterns).
BLANK_FILLED = "blank of the precedent filled in"
#: Longest quotation of a filled-in value in a completion's reason (a layout choice).
_COMPLETION_QUOTE_CHARS = 60


def _short(s: str) -> str:
    s = " ".join(s.split())
    return s if len(s) <= _COMPLETION_QUOTE_CHARS else s[:_COMPLETION_QUOTE_CHARS - 1] + "\u2026"


def _substantive(h: _Hunk, ctx: TermContext) -> Change:
    """Everything else, with the token-level signals the severity rules need."""
    a, b, wa, wb = h.a, h.b, h.wa, h.wb
    signals: list[Signal] = list(_party_signals(h, ctx))
    if h.change == "replace" and not signals:
        na, nb = _names(a, wa), _names(b, wb)
        if na and nb and na != nb:
            signals.append(Signal("name_changed", f"name changed from '{' '.join(na)}' to "
                                                  f"'{' '.join(nb)}'"))
    xa = [a.token(i) for i in wa if a.kinds[i] == KIND_XREF]
    xb = [b.token(j) for j in wb if b.kinds[j] == KIND_XREF]
    if xa and xb and xa != xb:
        signals.append(Signal("cross_reference_changed",
                              f"cross-reference changed from {xa[0]} to {xb[0]}"))
    return h.mk("substantive", "words", signals=tuple(signals))


def _party_signals(h: _Hunk, ctx: TermContext) -> list[Signal]:
    """The other party named where the precedent names one of ours."""
    if not ctx.party_labels:
        return []
    pparty = [(h.a.token(i), h.a.keys[i]) for i in h.wa if h.a.kinds[i] == KIND_TERM]
    dparty = [(h.b.token(j), h.b.keys[j]) for j in h.wb if h.b.kinds[j] == KIND_TERM]
    pnames = {_name(k) for _t, k in pparty} & ctx.party_labels
    dnames = {_name(k) for _t, k in dparty} & ctx.party_labels
    gone, came = pnames - dnames, dnames - pnames
    if not (gone and came):
        return []
    x, y = min(gone), min(came)
    ytext = next(t for t, k in dparty if _name(k) == y)
    also = "" if ytext.rstrip("'\u2019s") == y or ytext == y else f" (the precedent's {y})"
    return [Signal("party_swapped", f"party changed: the draft names {ytext}{also} where the "
                                    f"precedent names the {x}")]


_RULES = (_article_rule, _xref_rule, _noise_rule, _completion_rule)


def _classify_hunk(h: _Hunk, ctx: TermContext) -> Change:
    for rule in _RULES:
        got = rule(h, ctx)
        if got is not None:
            return got
    return _substantive(h, ctx)


def _label_tokens(seq: TokenSeq) -> frozenset[int]:
    """Indices of the tokens that make up list labels written into the text."""
    spans = label_spans(seq.text)
    if not spans:
        return frozenset()
    out = set()
    for s, e in spans:
        k = bisect_right(seq.starts, s) - 1
        while k < len(seq) and seq.starts[k] < e:
            out.add(k)
            k += 1
    return frozenset(out)


def _names(seq: TokenSeq, idx: Sequence[int]) -> list[str]:
    """Capitalised plain words (not defined terms, not the first word of a sentence): the
    proper names among the changed words."""
    out = []
    for i in idx:
        t = seq.token(i)
        if seq.kinds[i] != "w" or not t[:1].isupper():
            continue
        k = i - 1
        while k >= 0 and seq.kinds[k] == KIND_SPACE:
            k -= 1
        if k < 0 or seq.token(k) in (".", "!", "?", ":", "(", '"', "\u201c"):
            continue  # a sentence starts here
        out.append(t)
    return out


def _name(key: str) -> str:
    return key[2:].split("\x00", 1)[0]


class _Cover:
    """Character spans, indexed for one question: does one of them cover both offsets *a*
    and *b* (a <= b)?  Among the spans starting at or before *a*, the one reaching furthest
    decides; a rewritten provision asks for each of its hundreds of changes."""

    __slots__ = ("reach", "starts")

    def __init__(self, spans: Sequence[tuple[int, int]]) -> None:
        ordered = sorted(spans)
        self.starts = [s for s, _e in ordered]
        self.reach = list(accumulate((e for _s, e in ordered), max))

    def covers(self, a: int, b: int) -> bool:
        k = bisect_right(self.starts, a)
        return k > 0 and b < self.reach[k - 1]


def classify_ops(a: TokenSeq, b: TokenSeq, ops: Sequence[TokenOp], ctx: TermContext, *,
                 keep_together: tuple[Sequence[tuple[int, int]], Sequence[tuple[int, int]]] = ((), ())
                 ) -> list[Change]:
    """The changes of one diff: precedent tokens *a*, draft tokens *b*, opcodes *ops*.

    Edits separated only by spaces and punctuation form one change, and so do edits inside
    one span of *keep_together* (character spans of the precedent and of the draft, e.g.
    the figures "one hundred per cent (100%)")."""
    out: list[Change] = []
    n = len(ops)
    k = 0
    pq, dq = _Cover(keep_together[0]), _Cover(keep_together[1])
    labels = (_label_tokens(a), _label_tokens(b))
    while k < n:
        op = ops[k]
        if op.tag == "equal":
            k += 1
            continue
        if op.tag == "restyle":
            out.extend(_restyle_changes(a, b, op, ctx))
            k += 1
            continue
        # a run of real edits
        i1, j1, i2, j2 = op.i1, op.j1, op.i2, op.j2
        m = k + 1
        while m < n:
            nxt = m
            while nxt < n and ops[nxt].tag in ("equal", "restyle"):
                nxt += 1
            if nxt >= n:
                break
            words_between = any(a.kinds[i] in _WORDLIKE for g in range(m, nxt)
                                for i in range(ops[g].i1, ops[g].i2))
            if words_between and not (
                    pq.covers(max(a.starts[i2] - 1, 0), a.starts[ops[nxt].i1])
                    or dq.covers(max(b.starts[j2] - 1, 0), b.starts[ops[nxt].j1])):
                break
            i2, j2 = ops[nxt].i2, ops[nxt].j2
            m = nxt + 1
        out.append(_classify_hunk(_hunk(a, b, i1, i2, j1, j2, labels), ctx))
        k = m
    return out
