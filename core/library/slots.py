"""How the past agreements word *this* provision: the wording variants of one provision's slot.

For a provision selected in a review (through a deviation, or an aligned pair), the library
documents that have a counterpart of it (:func:`.frequency.provision_slot`: per document the
nearest same-type provision, mutual nearest or within the cut-off) are put in bars:

* **the draft's wording**: the counterparts that carry the draft's wording: of the change for
  a word-level deviation, the whole wording within the variant cut-off otherwise.  These are
  exactly the documents the selection's ``frequency.matching`` counts;
* **the precedent's wording**: the counterparts carrying the precedent's wording instead
  (one bar with both names when the two provisions read the same);
* **other wordings**: the remaining counterparts by their wording variant (the library's
  clustering of the clause type, :mod:`.variants`, so that the reviewer's position labels
  apply), most common first.  Past ``max_variants`` bars (at least 3), the rarest are put
  together in one bar.

Every document with the slot is in exactly one bar, so the counts add up to ``present``;
``total - present`` agreements have no such provision (for a removed provision, that is the
deviation's ``matching``).  A bar lists its documents, quotes one wording with its source,
carries the reviewer's position, and a *gist*: the words that set it apart from the
selected provision (the draft's; the precedent's when the draft has none), found by
difflib's ``SequenceMatcher`` over the normalised tokens (:func:`.normalise.token_spans`)
and quoted from the text, near the deviation's change when there is one.

Cost: the slot (see :mod:`.frequency`), then per bar one text read from the index and one
``SequenceMatcher`` over two provisions' tokens (quadratic in the words of one provision at
worst).  Nothing is written; contract text is only returned, never logged.
"""

from __future__ import annotations

from dataclasses import dataclass
from difflib import SequenceMatcher

import numpy as np

from ..model import Deviation, Pair, Review
from .frequency import CLOSEST_COUNT, ReviewTypes, Slot, _Context, _slot, _span_of, review_types
from .index import Library
from .normalise import TermReplacer, fold, token_spans

__all__ = [
    "DRAFT_WORDING",
    "GIST_CONTEXT_WORDS",
    "GIST_JOIN_WORDS",
    "GIST_MAX_CHARS",
    "GIST_MIN_RATIO",
    "MAX_SLOT_VARIANTS",
    "OTHER_WORDING",
    "PRECEDENT_WORDING",
    "SAME_WORDING",
    "ClosestText",
    "SlotVariant",
    "SlotVariants",
    "slot_variants",
]

#: Bars of one slot before the rarest wordings are put together in one bar: a chart that a
#: reviewer reads at a glance (a product choice, no source).
MAX_SLOT_VARIANTS = 8
#: Words quoted either side of the words that set a wording apart ("within *thirty (30)* days").
GIST_CONTEXT_WORDS = 1
#: Longest gist, in characters (one line of the chart's label column).
GIST_MAX_CHARS = 90
#: Differences at most this many words apart are quoted together ("two hundred per cent
#: (200%)" rather than "two" and "200"): one quote then reads as a phrase.
GIST_JOIN_WORDS = 3
#: Below this share of common tokens (difflib's ``ratio``) a wording is not a variation of
#: the selected one but another text: the gist then quotes its opening words instead.
GIST_MIN_RATIO = 0.5

DRAFT_WORDING = "The draft's wording"
PRECEDENT_WORDING = "The precedent's wording"
SAME_WORDING = "The draft's and the precedent's wording"
#: "Other wording A", "Other wording B", ... by descending count.
OTHER_WORDING = "Other wording"


@dataclass(frozen=True, slots=True)
class ClosestText:
    """One of the library provisions nearest to the selected provision, with its text."""

    document: str
    provision: str  # number, else heading, else provision id
    similarity: float  # 1 - distance
    text: str


@dataclass(frozen=True, slots=True)
class SlotVariant:
    """One bar: the library documents whose counterpart of the provision reads one way."""

    name: str  # DRAFT_WORDING, PRECEDENT_WORDING, SAME_WORDING, "Other wording A", "3 rarer wordings"
    count: int  # documents
    documents: tuple[str, ...]  # their paths inside the library folder, sorted
    #: What sets this wording apart from the selected provision, quoted ("...within thirty
    #: (30) days..." or 'without "material"'); "" when nothing does.
    gist: str
    text: str  # one past agreement's wording of the bar ("" when count is 0)
    sample_document: str | None  # where ``text`` comes from
    sample_provision: str | None
    position: str | None  # the reviewer's label of the wording's variant
    draft: bool  # holds the draft's wording
    precedent: bool  # holds the precedent's wording
    variant: int | None  # the library variant id of ``text`` (for labelling), None if none


@dataclass(frozen=True, slots=True)
class SlotVariants:
    """The wording variants of one provision's slot in the precedent set (module docstring)."""

    clause_type: str | None
    label: str  # the clause type's name, e.g. "Payment"
    total: int  # agreements in the precedent set
    same_type: int  # agreements with any provision of the clause type
    present: int  # agreements with a counterpart of the provision == sum of the counts
    variants: tuple[SlotVariant, ...]  # the draft's, the precedent's, then the others
    closest: tuple[ClosestText, ...]
    draft_absent: bool  # the draft has no such provision (a removed provision)
    precedent_absent: bool  # the precedent has none (an added provision)
    #: The draft's bar counts documents carrying the words of the change (a word-level
    #: deviation) rather than the whole wording.
    by_change: bool

    @property
    def absent(self) -> int:
        """Agreements with no such provision."""
        return self.total - self.present


def slot_variants(library: Library, review: Review, selection: Deviation | Pair, *,
                  types: ReviewTypes | None = None, max_variants: int = MAX_SLOT_VARIANTS) -> SlotVariants:
    """The wording variants of the provision of *selection* (a deviation or a pair of
    *review*, whose frequencies *library* gave) across the past agreements that have it.
    *types* reuses the review's clause typing (:func:`.frequency.review_types`)."""
    from .clausetypes import load_taxonomy

    if max_variants < 3:
        raise ValueError("max_variants must be at least 3: the draft's, the precedent's and one more")
    ctx = _Context(review, library, types or review_types(review, library))
    slot = _slot(ctx, selection)
    if isinstance(selection, Pair):
        d_id, p_id, dev = selection.draft, selection.precedent, None
    else:
        d_id, p_id, dev = selection.draft_provision, selection.precedent_provision, selection
    name = slot.bucket_name
    ctype = name if name is not None and not name.startswith("~") else None
    label = load_taxonomy().label(ctype)
    bucket = slot.bucket
    same_type = bucket.document_count if bucket is not None else 0
    builder = _Bars(ctx, slot, d_id, p_id, dev)
    bars = builder.bars(max_variants=max_variants)
    closest = builder.closest()
    present = slot.present
    assert sum(b.count for b in bars) == present
    return SlotVariants(ctype, label, ctx.total, same_type, present, tuple(bars), closest,
                        d_id is None, p_id is None, slot.words)


class _Bars:
    def __init__(self, ctx: _Context, slot: Slot, d_id: str | None, p_id: str | None,
                 dev: Deviation | None) -> None:
        self.ctx = ctx
        self.slot = slot
        self.d_id = d_id
        self.p_id = p_id
        self.dev = dev
        lib = ctx.library
        self.paths = lib.document_paths(slot.docs.tolist()) if slot.docs.size else {}

    # -- the selected provisions ----------------------------------------------------------
    def _text(self, side: str) -> tuple[str, TermReplacer, tuple[int, int] | None]:
        pid = self.d_id if side == "d" else self.p_id
        p = self.ctx.provision(side, pid)  # type: ignore[arg-type]
        span = None
        if self.dev is not None:
            if side == "d":
                span = _span_of(p.text, self.dev.draft_span, self.dev.draft_text if self.dev.change != "delete" else "")
            else:
                span = _span_of(p.text, self.dev.precedent_span,
                                self.dev.precedent_text if self.dev.change != "insert" else "")
        return p.text, self.ctx.terms(side), span

    # -- bars -------------------------------------------------------------------------------
    def bars(self, *, max_variants: int) -> list[SlotVariant]:
        slot = self.slot
        out: list[SlotVariant] = []
        own_idx = np.flatnonzero(slot.own)
        other_idx = np.flatnonzero(slot.other)
        if self.d_id is not None:  # then slot.side == "d"
            out.append(self._marked(own_idx, draft=True, precedent=slot.same_wording, dist=slot.dist))
        if self.p_id is not None and not slot.same_wording:
            if self.d_id is None:  # slot.side == "p"
                out.append(self._marked(own_idx, draft=False, precedent=True, dist=slot.dist))
            else:
                out.append(self._marked(other_idx, draft=False, precedent=True, dist=slot.other_dist))
        rest = np.flatnonzero(~(slot.own | slot.other))
        groups: dict[int, list[int]] = {}
        bucket = slot.bucket
        for i in rest.tolist():
            row = int(slot.rows[i])
            vid = int(bucket.variant[row]) if bucket is not None else -1
            key = vid if vid >= 0 else -1 - row  # an unclustered wording is its own group
            groups.setdefault(key, []).append(i)
        ordered = sorted(groups.values(), key=lambda idx: (-len(idx), min(self.paths[int(slot.docs[i])] for i in idx)))
        room = max(max_variants - len(out), 1)
        if len(ordered) > room:
            head, tail = ordered[:room - 1], [i for g in ordered[room - 1:] for i in g]
            n_tail = len(ordered) - (room - 1)
        else:
            head, tail, n_tail = ordered, [], 0
        for k, idx in enumerate(head):
            out.append(self._other(np.array(idx), f"{OTHER_WORDING} {_letter(k)}"))
        if tail:
            docs = self._documents(np.array(tail))
            out.append(SlotVariant(f"{n_tail} rarer wordings", len(docs), docs, "", "", None, None, None,
                                   False, False, None))
        return out

    def _documents(self, idx: np.ndarray) -> tuple[str, ...]:
        return tuple(sorted(self.paths[int(d)] for d in self.slot.docs[idx]))

    def _sample(self, row: int | None) -> tuple[str, str | None, str | None, int | None, int | None]:
        """(text, document, provision, variant id, provision row id) of a bucket row's sample."""
        if row is None or self.slot.bucket is None:
            return "", None, None, None, None
        bucket = self.slot.bucket
        sample = int(bucket.sample[row])
        lib = self.ctx.library
        ref = lib.provision_refs([sample]).get(sample)
        text = lib.texts([sample]).get(sample, "")
        vid = int(bucket.variant[row])
        return text, ref[0] if ref else None, ref[1] if ref else None, vid if vid >= 0 else None, sample

    def _marked(self, idx: np.ndarray, *, draft: bool, precedent: bool, dist: np.ndarray | None) -> SlotVariant:
        """The bar of the draft's (or the precedent's) own wording."""
        slot = self.slot
        rows = slot.rows[idx]
        rep = None
        position = None
        if rows.size and dist is not None and slot.bucket is not None:
            rep = int(rows[np.lexsort((rows, dist[rows]))[0]])
            mask = np.zeros(slot.bucket.rows, dtype=bool)
            mask[rows] = True
            position = self.ctx.position_of_rows(slot.bucket, mask, dist)
        text, doc, prov, vid, _sample = self._sample(rep)
        if draft and precedent:
            name, gist = SAME_WORDING, ""
        elif draft:
            name = DRAFT_WORDING
            gist = self._gist_between("p", "d") if self.p_id is not None else ""
        else:
            name = PRECEDENT_WORDING
            gist = self._gist_between("d", "p") if self.d_id is not None else ""
        return SlotVariant(name, int(idx.size), self._documents(idx), gist, text, doc, prov, position,
                           draft, precedent, vid)

    def _other(self, idx: np.ndarray, name: str) -> SlotVariant:
        slot = self.slot
        rows = slot.rows[idx]
        uniq, counts = np.unique(rows, return_counts=True)
        rep = int(uniq[np.lexsort((uniq, slot.dist[uniq], -counts))[0]])
        text, doc, prov, vid, sample = self._sample(rep)
        position = self.ctx.positions.get(vid) if vid is not None else None
        gist = ""
        if sample is not None:
            base, base_terms, focus = self._text(slot.side)
            gist = _gist(base, base_terms, focus, text, self.ctx.library.term_replacer(sample))
        return SlotVariant(name, int(idx.size), self._documents(idx), gist, text, doc, prov, position,
                           False, False, vid)

    def _gist_between(self, base_side: str, other_side: str) -> str:
        base, base_terms, focus = self._text(base_side)
        other, other_terms, _ = self._text(other_side)
        return _gist(base, base_terms, focus, other, other_terms)

    def closest(self) -> tuple[ClosestText, ...]:
        slot = self.slot
        bucket = slot.bucket
        if bucket is None or bucket.rows == 0:
            return ()
        order = np.lexsort((np.arange(bucket.rows), -bucket.count, slot.dist))[:CLOSEST_COUNT]
        samples = [int(bucket.sample[i]) for i in order]
        lib = self.ctx.library
        refs = lib.provision_refs(samples)
        texts = lib.texts(samples)
        return tuple(ClosestText(refs[s][0], refs[s][1], round(float(1.0 - slot.dist[i]), 3), texts.get(s, ""))
                     for i, s in zip(order.tolist(), samples) if s in refs)


def _letter(k: int) -> str:
    """A, B, ..., Z, AA, AB, ..."""
    out = ""
    k += 1
    while k:
        k, r = divmod(k - 1, 26)
        out = chr(ord("A") + r) + out
    return out


def _gist(base: str, base_terms: TermReplacer, focus: tuple[int, int] | None,
          other: str, other_terms: TermReplacer) -> str:
    """What *other* says where it differs from *base* (near *focus*, character offsets in
    *base*, when given), quoted from *other* with GIST_CONTEXT_WORDS words either side."""
    base_folded, b = token_spans(base, terms=base_terms)
    folded, o = token_spans(other, terms=other_terms)
    if not o:
        return ""
    matcher = SequenceMatcher(None, [t for t, _, _ in b], [t for t, _, _ in o], autojunk=False)
    if matcher.ratio() < GIST_MIN_RATIO:
        return f"worded differently: \u201c{_shorten(_squash(folded[o[0][1]:]), GIST_MAX_CHARS - 24)}\u201d"
    hunks: list[list[int]] = []  # [i1, i2, j1, j2] of runs of differences GIST_JOIN_WORDS apart
    for tag, i1, i2, j1, j2 in matcher.get_opcodes():
        if tag == "equal":
            continue
        if hunks and i1 - hunks[-1][1] <= GIST_JOIN_WORDS and j1 - hunks[-1][3] <= GIST_JOIN_WORDS:
            hunks[-1][1], hunks[-1][3] = i2, j2
        else:
            hunks.append([i1, i2, j1, j2])
    if not hunks:
        return ""
    hunk = hunks[0]
    if focus is not None and b:
        start, end = len(fold(base[:focus[0]])), len(fold(base[:focus[1]]))
        inside = [i for i, (_, s, e) in enumerate(b) if s < end and e > start] or \
                 [min(range(len(b)), key=lambda i: abs(b[i][1] - start))]
        lo, hi = min(inside), max(inside) + 1

        def gap(h: list[int]) -> int:
            i1, i2 = h[0], max(h[1], h[0] + 1)
            return 0 if i1 < hi and i2 > lo else min(abs(i1 - hi), abs(lo - i2))

        hunk = min(hunks, key=gap)
    i1, i2, j1, j2 = hunk
    if j2 > j1:
        a, z = max(j1 - GIST_CONTEXT_WORDS, 0), min(j2 + GIST_CONTEXT_WORDS, len(o))
        quote = _squash(folded[o[a][1]:o[z - 1][2]])
        text = ("\u2026" if a > 0 else "") + _shorten(quote) + ("\u2026" if z < len(o) else "")
    else:
        quote = _squash(base_folded[b[i1][1]:b[i2 - 1][2]])
        text = f"without \u201c{_shorten(quote)}\u201d"
    more = len(hunks) - 1
    if more:
        text += f" (+{more} other difference{'s' * (more != 1)})"
    return text


def _squash(s: str) -> str:
    return " ".join(s.split())


def _shorten(s: str, limit: int = GIST_MAX_CHARS) -> str:
    return s if len(s) <= limit else s[:limit - 1].rstrip() + "\u2026"
