"""How common each wording of a review is in the precedent set, and the ranking that uses it.

:func:`apply_frequency` attaches a :class:`~core.model.Frequency` to every pair and every
deviation of a review, and adjusts the substantive deviations' severity and reasons.

Figures (all counts of library *documents* unless said otherwise):

``total``
    agreements in the index (readable .docx/.txt/.md files under the library's folder);
``same_type``
    documents with a provision of the provision's clause type (its *bucket*: the clause type,
    or ``~kind`` for an untyped provision);
``matching``
    for a pair, or a deviation covering a whole provision (added, moved): documents with a
    same-type provision within the variant cut-off (Jaccard distance of 3-word shingle sets
    after term normalisation, quotes, whitespace and case; default 0.2, see
    :mod:`.variants`) of the draft's wording (a removed provision: the precedent's).
    For a removed provision's deviation: documents that have no such provision either (no
    counterpart, see below).
    For a word-level deviation: documents whose *counterpart* provision carries the draft's
    wording of the change: it holds at least ``DEPARTURE_MATCH_MIN`` of the shingles that
    only the draft's side of the change has, and a larger share of them than of the
    precedent's side.  For a renamed defined term: documents defining the draft's name;
``closest``
    the ``CLOSEST_COUNT`` nearest same-type library provisions (document path, provision
    number, heading or id, similarity = 1 - distance);
``containing``
    for inserted or removed words (the draft's words of an insert or replace, the
    precedent's of a delete): same-type library *provisions* whose normalised text contains
    them as a phrase; for an added or removed provision: same-type provisions within the
    cut-off of it;
``position``
    the reviewer's label of the variant the matching wording belongs to.

Counterparts (the provision's *slot*): a library document's counterpart of a provision is its
same-type provision that is nearest to the provision (to either side's provision for a
word-level deviation) among those that either lie within the cut-off of it (the same wording)
or share at least one 3-word shingle with it and are nearer to it than to any other
same-type provision of its own document (mutual nearest: a document's general indemnity is
not the counterpart of the draft's IP indemnity when the draft has a general indemnity too,
while a re-worded clause that is the only one of its type still is).  A document without
such a provision does not have the slot.  :func:`provision_slot` gives the counterparts;
:mod:`.slots` groups them into the wording variants the desktop app charts, so that the
chart's figures are these.

Ranking: a substantive deviation's severity is multiplied by ``1 - ACCEPTED_WEIGHT *
matching / total`` and shifted by ``POSITION_ADJUSTMENT``; its reasons say "accepted in 9 of
24 past agreements" (or "never accepted in the 24 past agreements") and the position.  Ranks
are then recomputed 1..N by descending severity, ties in draft order (the ids' order).

Cost: per clause type one sparse product of the review's wordings with the library's
distinct wordings, O(query shingles x library rows sharing them); a slot adds the same for
the other same-type provisions of the draft and the precedent (cached per review) and one
sort of the bucket's (wording, document) entries; phrase checks read only the candidate
rows' text from the index.
"""

from __future__ import annotations

import dataclasses
import re
from collections import defaultdict
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from ..model import ClosestProvision, Deviation, Document, Frequency, Pair, Provision, Review, Stance, stance_named
from .clausetypes import Typing, classify_provisions, document_term_replacer
from .index import BucketIndex, Library, bucket_of, normalised_wording
from .normalise import SHINGLE_SIZE, TermReplacer, _word_hash, match_tokens, shingle_hashes
from .sparse import unique_sorted
from .variants import distances_from_counts, set_distance

__all__ = [
    "ACCEPTED_WEIGHT",
    "CLOSEST_COUNT",
    "DEPARTURE_MATCH_MIN",
    "POSITION_ADJUSTMENT",
    "ReviewTypes",
    "Slot",
    "apply_frequency",
    "clause_type_function",
    "frequency_reasons",
    "provision_slot",
    "review_types",
]

#: Nearest library provisions listed per wording: enough to show whether the nearest one is
#: typical, few enough to read at a glance (a product choice, no source).
CLOSEST_COUNT = 3
#: Share of the draft-only shingles of a change a library provision must hold to carry the
#: draft's wording.  One half: with 3-word shingles a one-word change has 3 draft-only
#: shingles, and a library text that agrees on the changed word but differs in one
#: neighbouring word still holds 2 of them.
DEPARTURE_MATCH_MIN = 0.5
#: How much a departure the firm has accepted in every past agreement loses of its severity
#: (proportionally less for fewer): half, so that frequency re-orders departures of similar
#: severity without hiding a severe one.  A product choice, no source.
ACCEPTED_WEIGHT = 0.5
#: Severity points added for the reviewer's position on the draft's wording (a product choice,
#: no source): the firm's own wording or one it can live with matters less, one it refuses
#: more (core.library.index.POSITIONS).
POSITION_ADJUSTMENT: Mapping[str, int] = {
    "house wording": -20,
    "can live with": -10,
    "last concession": 0,
    "refuse": 15,
}


@dataclass(frozen=True, slots=True)
class ReviewTypes:
    """Clause types and wordings of both documents of a review, as the library reads them."""

    draft_types: Mapping[str, Typing]
    precedent_types: Mapping[str, Typing]
    draft_terms: TermReplacer
    precedent_terms: TermReplacer


def review_types(review: Review, library: Library | None = None) -> ReviewTypes:
    """Type both documents' provisions (with the library's neighbours when given) and build
    their term normalisers (the draft's terms read as the precedent's through the term map)."""
    aliases = library.aliases() if library is not None else {}
    renames = {m.draft: m.precedent for m in review.term_map}
    dterms = document_term_replacer(review.draft, aliases=aliases, renames=renames)
    pterms = document_term_replacer(review.precedent, aliases=aliases)
    neighbours = library.neighbours() if library is not None else None
    dt = classify_provisions(review.draft, neighbours=neighbours, terms=dterms)
    pt = classify_provisions(review.precedent, neighbours=neighbours, terms=pterms)
    return ReviewTypes({t.provision: t for t in dt}, {t.provision: t for t in pt}, dterms, pterms)


def clause_type_function(library: Library | None = None) -> Callable[[Provision, Document], str | None]:
    """A ``(provision, document) -> clause type id | None`` callable for
    ``run_review(clause_type=...)``: heading, parent, then neighbours (the library's when
    given, else the taxonomy's seed phrases).  Each document is typed once."""
    cache: dict[int, tuple[Document, dict[str, str | None]]] = {}
    aliases = library.aliases() if library is not None else {}
    neighbours = library.neighbours() if library is not None else None

    def clause_type(provision: Provision, document: Document) -> str | None:
        entry = cache.get(id(document))
        if entry is None or entry[0] is not document:
            terms = document_term_replacer(document, aliases=aliases)
            types = {t.provision: t.clause_type
                     for t in classify_provisions(document, neighbours=neighbours, terms=terms)}
            entry = (document, types)
            cache[id(document)] = entry
        return entry[1].get(provision.id)

    return clause_type


# ----------------------------------------------------------------------------------------
# Queries against one bucket
# ----------------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class _Wording:
    tokens: tuple[str, ...]
    hashes: np.ndarray


class _Context:
    def __init__(self, review: Review, library: Library, types: ReviewTypes) -> None:
        self.review = review
        self.library = library
        self.types = types
        self.config = library.config
        self.total = library.total
        self.positions = library.variant_positions()
        self._draft = {p.id: p for p in review.draft.provisions}
        self._prec = {p.id: p for p in review.precedent.provisions}
        self._wordings: dict[tuple[str, str], _Wording] = {}
        self._dist: dict[tuple[str, str, str], np.ndarray] = {}
        self._dist_by_wording: dict[tuple[str, bytes], np.ndarray] = {}
        self._siblings: dict[tuple[str, str], list[str]] | None = None
        self._phrases: dict[tuple[str, tuple[str, ...]], int] = {}
        self._refs: dict[int, tuple[str, str] | None] = {}
        self._nearest: dict[int, tuple[np.ndarray, np.ndarray]] = {}  # id(dist): (dist kept alive, rows)
        #: :func:`_whole_frequency`'s figures of present wordings, by (bucket, distances, containing).
        self.whole: dict[tuple[str, int, bool], tuple[np.ndarray, Frequency]] = {}

    def provision(self, side: str, pid: str) -> Provision:
        return (self._draft if side == "d" else self._prec)[pid]

    def terms(self, side: str) -> TermReplacer:
        return self.types.draft_terms if side == "d" else self.types.precedent_terms

    def wording(self, side: str, pid: str) -> _Wording:
        key = (side, pid)
        w = self._wordings.get(key)
        if w is None:
            p = self.provision(side, pid)
            toks = normalised_wording(p.text, p.heading, terms=self.terms(side))
            w = _Wording(tuple(toks), shingle_hashes(toks))
            self._wordings[key] = w
        return w

    def bucket_name(self, draft: str | None, precedent: str | None) -> str:
        """The bucket of a pair: the precedent provision's type when it has one (the house
        document's headings are the better evidence), else the draft's."""
        for pid, table in ((precedent, self.types.precedent_types), (draft, self.types.draft_types)):
            if pid is not None:
                t = table.get(pid)
                if t is not None and t.clause_type:
                    return t.clause_type
        side, pid = ("p", precedent) if precedent is not None else ("d", draft)
        return bucket_of(None, self.provision(side, pid).kind)  # type: ignore[arg-type]

    def siblings(self, side: str, bucket_name: str) -> list[str]:
        """The provisions of one side's document in bucket *bucket_name*, each in the bucket
        of its pair (as the frequencies of the pairs read them), in document order."""
        if self._siblings is None:
            found: dict[tuple[str, str], list[str]] = defaultdict(list)
            for pair in self.review.pairs:
                if pair.draft is None and pair.precedent is None:
                    continue
                name = self.bucket_name(pair.draft, pair.precedent)
                for s, pid in (("d", pair.draft), ("p", pair.precedent)):
                    if pid is not None and pid not in found[(s, name)]:
                        found[(s, name)].append(pid)
            self._siblings = dict(found)
        return self._siblings.get((side, bucket_name), [])

    def distances(self, bucket: BucketIndex, side: str, pid: str) -> np.ndarray:
        key = (bucket.name, side, pid)
        d = self._dist.get(key)
        if d is None:
            w = self.wording(side, pid)
            # Provisions that read the same (most of a draft and its precedent) share one.
            same = (bucket.name, w.hashes.tobytes())
            d = self._dist_by_wording.get(same)
            if d is None:
                inter = bucket.intersections(w.hashes)
                d = distances_from_counts(inter, bucket.sizes, np.full(bucket.rows, w.hashes.size),
                                          metric=self.config.metric)
                self._dist_by_wording[same] = d
            self._dist[key] = d
        return d

    def nearest(self, bucket: BucketIndex, dist: np.ndarray) -> np.ndarray:
        """The CLOSEST_COUNT rows nearest by *dist* (ties: the more common wording, then the
        lower row), once per distances array."""
        found = self._nearest.get(id(dist))
        if found is None:
            # Only rows within the CLOSEST_COUNT-th smallest distance can be among the nearest:
            # sorting them alone gives the order a sort of every row gives.
            k = min(CLOSEST_COUNT, bucket.rows)
            near = np.flatnonzero(dist <= np.partition(dist, k - 1)[k - 1])
            found = self._nearest[id(dist)] = (dist, near[np.lexsort((near, -bucket.count[near], dist[near]))][:k])
        return found[1]

    def closest(self, bucket: BucketIndex, dist: np.ndarray) -> tuple[ClosestProvision, ...]:
        if bucket.rows == 0:
            return ()
        order = self.nearest(bucket, dist)
        refs = self.refs([int(bucket.sample[i]) for i in order])
        out = []
        for i in order.tolist():
            ref = refs.get(int(bucket.sample[i]))
            if ref is not None:
                out.append(ClosestProvision(ref[0], ref[1], round(float(1.0 - dist[i]), 3)))
        return tuple(out)

    def refs(self, ids: Sequence[int]) -> dict[int, tuple[str, str]]:
        """:meth:`Library.provision_refs`, each provision asked for once per review (the
        same common wordings are nearest to many provisions)."""
        known = self._refs
        missing = [i for i in ids if i not in known]
        if missing:
            found = self.library.provision_refs(missing)
            known.update((i, found.get(i)) for i in missing)
        return {i: ref for i in ids if (ref := known[i]) is not None}

    def position_of_rows(self, bucket: BucketIndex, rows: np.ndarray, dist: np.ndarray) -> Stance | None:
        """The stance recorded on the variant of the nearest of *rows* (a boolean mask)."""
        idx = np.flatnonzero(rows)
        if idx.size == 0 or not self.positions:
            return None
        best = idx[np.lexsort((idx, dist[idx]))][0]
        return stance_named(self.positions.get(int(bucket.variant[best])))

    def containing_phrase(self, bucket: BucketIndex, tokens: Sequence[str]) -> int:
        """Same-type library provisions whose normalised text holds *tokens* as a phrase
        (asked once per bucket and phrase: deviations often change the same words)."""
        toks = tuple(t for t in tokens if t)
        key = (bucket.name, toks)
        n = self._phrases.get(key)
        if n is None:
            n = self._phrases[key] = _containing_phrase(self.library, bucket, toks)
        return n


def _containing_phrase(library: Library, bucket: BucketIndex, toks: Sequence[str]) -> int:
    if not toks:
        return 0
    words = unique_sorted(np.fromiter((_word_hash(t) for t in toks), dtype=np.uint64, count=len(toks)))
    hits = bucket.word_hits(words)
    cand = np.flatnonzero(hits == words.size)
    if len(toks) == 1:
        # One word: a text holds it as a phrase exactly when it is among the text's words
        # (its tokens, which hold no space), as the bucket's word columns record them.
        return int(bucket.count[cand].sum())
    if cand.size and len(toks) >= SHINGLE_SIZE:
        # A text holding the phrase holds each of its shingles: a cheaper, exact filter
        # before reading the candidates' texts.
        grams = shingle_hashes(toks)
        cand = cand[bucket.intersections(grams)[cand] == grams.size]
    if cand.size == 0:
        return 0
    phrase = " " + " ".join(toks) + " "
    norms = library.norms([int(bucket.sample[i]) for i in cand])
    n = 0
    for i in cand.tolist():
        norm = norms.get(int(bucket.sample[i]))
        if norm is not None and phrase in f" {norm} ":
            n += int(bucket.count[i])
    return n


def _empty(total: int) -> Frequency:
    return Frequency(same_type=0, matching=0, total=total)


def _whole_frequency(ctx: _Context, bucket_name: str, side: str, pid: str, *,
                     absent: bool = False, containing: bool = False) -> Frequency:
    """Frequency of one provision's whole wording (pairs, added/removed/moved provisions)."""
    bucket = ctx.library.bucket(bucket_name)
    if bucket is None or bucket.rows == 0:
        return Frequency(0, ctx.total if absent else 0, ctx.total, (), 0 if containing else None)
    dist = ctx.distances(bucket, side, pid)
    # Present, the figures depend on the wording alone (its distances): provisions that read
    # the same share them.  Absent, on the provision's siblings too.
    key = (bucket_name, id(dist), containing)
    found = None if absent else ctx.whole.get(key)
    if found is not None:
        return found[1]
    within = dist <= ctx.config.cutoff
    same_type = bucket.document_count
    if absent:  # documents without a counterpart of the provision
        matching = ctx.total - _counterparts(ctx, bucket, ((side, pid),))[1].size
    else:  # == documents whose counterpart is within the cut-off (the nearest row is the counterpart)
        matching = len(bucket.documents_of(within))
    cont = int(bucket.count[within].sum()) if containing else None
    position = None if absent else ctx.position_of_rows(bucket, within, dist)
    freq = Frequency(same_type, matching, ctx.total, ctx.closest(bucket, dist), cont, position)
    if not absent:
        ctx.whole[key] = (dist, freq)  # dist kept alive: its id stays its own
    return freq


# ----------------------------------------------------------------------------------------
# Word-level departures
# ----------------------------------------------------------------------------------------


def _span_of(text: str, span: tuple[int, int] | None, quoted: str) -> tuple[int, int] | None:
    if span is not None:
        return span
    if quoted:
        i = text.find(quoted)
        if i >= 0:
            return (i, i + len(quoted))
    return None


def _split_tokens(p: Provision, span: tuple[int, int] | None,
                  terms: TermReplacer) -> tuple[list[str], list[str], list[str]]:
    """(tokens before, changed tokens, tokens after) of a provision's wording around *span*;
    the heading's tokens come first."""
    if span is None:
        return normalised_wording(p.text, p.heading, terms=terms), [], []
    a, b = span
    before = normalised_wording(p.text[:a], p.heading, terms=terms)
    changed = match_tokens(p.text[a:b], terms=terms)
    after = match_tokens(p.text[b:], terms=terms)
    return before, changed, after


def _window(before: list[str], changed: list[str], after: list[str]) -> list[str]:
    """The changed tokens with SHINGLE_SIZE - 1 tokens of context each side: every shingle of
    the window touches the change (for an insert into the other side: spans the gap)."""
    k = SHINGLE_SIZE - 1
    head = before[len(before) - k:] if k > 0 else []
    return [*head, *changed, *after[:k]]


@dataclass(frozen=True, slots=True)
class _Change:
    """The shingles that only one side of a word-level deviation has (each window: the changed
    words with SHINGLE_SIZE - 1 words of context), and the changed words themselves."""

    only_d: np.ndarray
    only_p: np.ndarray
    changed_words: list[str]


def _is_word_level(dev: Deviation) -> bool:
    return (dev.category != "term" and dev.change in ("insert", "delete", "replace")
            and dev.draft_provision is not None and dev.precedent_provision is not None)


def _change(ctx: _Context, dev: Deviation) -> _Change:
    d_id, p_id = dev.draft_provision, dev.precedent_provision
    dprov = ctx.provision("d", d_id)  # type: ignore[arg-type]
    pprov = ctx.provision("p", p_id)  # type: ignore[arg-type]
    dspan = _span_of(dprov.text, dev.draft_span, dev.draft_text if dev.change != "delete" else "")
    pspan = _span_of(pprov.text, dev.precedent_span, dev.precedent_text if dev.change != "insert" else "")
    db, dc, da = _split_tokens(dprov, dspan, ctx.types.draft_terms)
    pb, pc, pa = _split_tokens(pprov, pspan, ctx.types.precedent_terms)
    if dspan is None and dev.change != "delete":
        dc = match_tokens(dev.draft_text, terms=ctx.types.draft_terms)
    if pspan is None and dev.change != "insert":
        pc = match_tokens(dev.precedent_text, terms=ctx.types.precedent_terms)
    # An insertion has no words on the precedent's side: there the precedent reads as the
    # draft's context around the inserted words (terms already read as the precedent's), and
    # the same for a deletion on the draft's side.
    if dev.change == "insert" and pspan is None and dspan is not None:
        pb, pc, pa = db, [], da
    elif dev.change == "delete" and dspan is None and pspan is not None:
        db, dc, da = pb, [], pa
    d_tokens, p_tokens = _window(db, dc, da), _window(pb, pc, pa)
    d_win, p_win = shingle_hashes(d_tokens), shingle_hashes(p_tokens)
    changed = dc if dev.change in ("insert", "replace") else pc if dev.change == "delete" else []
    # A window shorter than a shingle (words inserted at the very end of a short provision's
    # other side) has no shingle a library text could share: that side has no words of its own.
    only_d = np.setdiff1d(d_win, p_win, assume_unique=True) if len(d_tokens) >= SHINGLE_SIZE else d_win[:0]
    only_p = np.setdiff1d(p_win, d_win, assume_unique=True) if len(p_tokens) >= SHINGLE_SIZE else p_win[:0]
    return _Change(only_d, only_p, changed)


# ----------------------------------------------------------------------------------------
# Slots: a provision's counterpart in each library document
# ----------------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class Slot:
    """A provision's place in the precedent set (module docstring, "Counterparts").

    ``rows[i]`` (a row of ``bucket``: one distinct wording) is the counterpart in library
    document ``docs[i]``; documents without a counterpart are not listed.  ``own[i]``: that
    counterpart carries the wording of ``side`` ("d" the draft's, "p" the precedent's when
    the draft has no such provision); ``other[i]``: it carries the other side's wording
    instead.  By words (``words``) for a word-level deviation: the side's wording of the
    change, as ``matching`` counts it; otherwise the whole wording within the cut-off.
    """

    bucket_name: str | None
    bucket: BucketIndex | None
    side: str
    rows: np.ndarray
    docs: np.ndarray
    own: np.ndarray
    other: np.ndarray
    #: Distance of every bucket row to the side's provision, and to the other side's (or None).
    dist: np.ndarray
    other_dist: np.ndarray | None
    words: bool
    #: Whole wordings only: the draft's and the precedent's provisions read the same (within
    #: the cut-off of each other), so ``own`` holds both and ``other`` is empty.
    same_wording: bool = False

    @property
    def present(self) -> int:
        """Library documents that have the slot."""
        return int(self.docs.size)


def _counterparts(ctx: _Context, bucket: BucketIndex,
                  sides: Sequence[tuple[str, str]]) -> tuple[np.ndarray, np.ndarray]:
    """(counterpart row per document, documents ascending) of the provisions *sides* (one
    provision, or the draft's and the precedent's of a word-level deviation).  A row can be
    a counterpart when it is within the cut-off of a side's provision, or shares a shingle
    with it and is no farther from it than from any other same-bucket provision of that
    side's document; each document's counterpart is its candidate row nearest to either side
    (ties: the lower row, i.e. the more common wording).  Cost O(rows x sides x siblings)
    plus one sort of the bucket's (row, document) entries."""
    n = bucket.rows
    cutoff = ctx.config.cutoff
    score = np.full(n, -np.inf)
    for side, pid in sides:
        dist = ctx.distances(bucket, side, pid)
        nearest = np.ones(n, dtype=bool)
        for sib in ctx.siblings(side, bucket.name):
            if sib != pid:
                nearest &= dist <= ctx.distances(bucket, side, sib)
        ok = (dist <= cutoff) | ((dist < 1.0) & nearest)
        score = np.where(ok, np.maximum(score, 1.0 - dist), score)
    lengths = np.diff(bucket.docptr)
    rows_rep = np.repeat(np.arange(n), lengths)
    docs = bucket.docs
    keep = np.isfinite(score[rows_rep])
    rows_rep, docs = rows_rep[keep], docs[keep]
    if rows_rep.size == 0:
        return np.zeros(0, dtype=np.int64), np.zeros(0, dtype=np.int64)
    order = np.lexsort((rows_rep, -score[rows_rep], docs))
    first = np.ones(order.size, dtype=bool)
    first[1:] = docs[order][1:] != docs[order][:-1]
    return rows_rep[order][first], docs[order][first]


def _slot(ctx: _Context, selection: Deviation | Pair, *, change: _Change | None = None) -> Slot:
    if isinstance(selection, Pair):
        d_id, p_id, dev = selection.draft, selection.precedent, None
    else:
        d_id, p_id, dev = selection.draft_provision, selection.precedent_provision, selection
    empty = np.zeros(0, dtype=np.int64)
    nothing = np.zeros(0, dtype=bool)
    if d_id is None and p_id is None:
        return Slot(None, None, "d", empty, empty, nothing, nothing, np.zeros(0), None, False)
    bucket_name = ctx.bucket_name(d_id, p_id)
    bucket = ctx.library.bucket(bucket_name)
    side, pid = ("d", d_id) if d_id is not None else ("p", p_id)
    other = ("p", p_id) if side == "d" and p_id is not None else None
    if dev is not None and _is_word_level(dev) and change is None:
        change = _change(ctx, dev)
    words = change is not None and change.only_d.size > 0
    if bucket is None or bucket.rows == 0:
        return Slot(bucket_name, bucket, side, empty, empty, nothing, nothing, np.zeros(0), None, words)
    dist = ctx.distances(bucket, side, pid)  # type: ignore[arg-type]
    other_dist = ctx.distances(bucket, *other) if other is not None else None
    if words:
        assert change is not None and other is not None
        rows, docs = _counterparts(ctx, bucket, ((side, pid), other))  # type: ignore[arg-type]
        hits_d = bucket.intersections(change.only_d) / change.only_d.size
        hits_p = (bucket.intersections(change.only_p) / change.only_p.size if change.only_p.size
                  else np.zeros(bucket.rows))
        carries_d = (hits_d >= DEPARTURE_MATCH_MIN) & (hits_d > hits_p)
        if change.only_p.size:
            carries_p = (hits_p >= DEPARTURE_MATCH_MIN) & (hits_p > hits_d)
        else:  # no words of the precedent's own: its whole wording, where the draft's is not
            carries_p = ~carries_d & (other_dist <= ctx.config.cutoff)  # type: ignore[operator]
        return Slot(bucket_name, bucket, side, rows, docs, carries_d[rows], carries_p[rows], dist, other_dist, True)
    rows, docs = _counterparts(ctx, bucket, ((side, pid),))  # type: ignore[arg-type]
    own = dist[rows] <= ctx.config.cutoff
    same = False
    if other_dist is not None:
        same = set_distance(ctx.wording("d", d_id).hashes, ctx.wording("p", p_id).hashes,  # type: ignore[arg-type]
                            metric=ctx.config.metric) <= ctx.config.cutoff
    if other_dist is None or same:
        theirs = np.zeros(rows.size, dtype=bool)
    else:
        theirs = (other_dist[rows] <= ctx.config.cutoff) & ~own
    return Slot(bucket_name, bucket, side, rows, docs, own, theirs, dist, other_dist, False, same)


def provision_slot(library: Library, review: Review, selection: Deviation | Pair, *,
                   types: ReviewTypes | None = None) -> Slot:
    """The slot of *selection* (a deviation or a pair of *review*) in *library*: its
    counterpart in each library document, and which carry the draft's wording as the
    selection's ``frequency.matching`` counts it (module docstring)."""
    return _slot(_Context(review, library, types or review_types(review, library)), selection)


def _departure_frequency(ctx: _Context, dev: Deviation, bucket_name: str) -> Frequency:
    d_id = dev.draft_provision
    bucket = ctx.library.bucket(bucket_name)
    if bucket is None or bucket.rows == 0:
        return Frequency(0, 0, ctx.total, (), 0 if dev.change in ("insert", "delete", "replace") else None)
    change = _change(ctx, dev)
    dist_d = ctx.distances(bucket, "d", d_id)  # type: ignore[arg-type]
    same_type = bucket.document_count
    containing = (ctx.containing_phrase(bucket, change.changed_words)
                  if dev.change in ("insert", "delete", "replace") else None)
    closest = ctx.closest(bucket, dist_d)
    if change.only_d.size == 0:
        # No wording of the draft's own (e.g. only formatting or terms differ): whole-provision
        # comparison of the draft's wording.
        within = dist_d <= ctx.config.cutoff
        return Frequency(same_type, len(bucket.documents_of(within)), ctx.total, closest, containing,
                         ctx.position_of_rows(bucket, within, dist_d))
    slot = _slot(ctx, dev, change=change)
    carrying_rows = slot.rows[slot.own]
    mask = np.zeros(bucket.rows, dtype=bool)
    mask[carrying_rows] = True
    return Frequency(same_type, int(carrying_rows.size), ctx.total, closest, containing,  # one per document
                     ctx.position_of_rows(bucket, mask, dist_d))


def _term_frequency(ctx: _Context, dev: Deviation) -> Frequency:
    """A renamed defined term: documents defining the draft's name among those defining
    either name (same_type)."""
    draft_name, prec_name = dev.draft_text, dev.precedent_text
    aliases = ctx.library.aliases()
    names = {draft_name, prec_name} | {n for n, c in aliases.items() if c in (draft_name, prec_name)}
    same = ctx.library.documents_defining(sorted(names))
    matching = ctx.library.documents_defining([draft_name])
    return Frequency(int(same), int(matching), ctx.total)


# ----------------------------------------------------------------------------------------
# Putting it together
# ----------------------------------------------------------------------------------------


def _deviation_frequency(ctx: _Context, dev: Deviation) -> Frequency:
    d_id, p_id = dev.draft_provision, dev.precedent_provision
    if dev.category == "term":
        return _term_frequency(ctx, dev)
    if d_id is None and p_id is None:
        return _empty(ctx.total)
    bucket_name = ctx.bucket_name(d_id, p_id)
    if dev.change == "add-provision" or (p_id is None and d_id is not None):
        return _whole_frequency(ctx, bucket_name, "d", d_id, containing=True)  # type: ignore[arg-type]
    if dev.change == "remove-provision" or d_id is None:
        return _whole_frequency(ctx, bucket_name, "p", p_id, absent=True, containing=True)  # type: ignore[arg-type]
    if dev.change == "move":
        return _whole_frequency(ctx, bucket_name, "d", d_id)
    return _departure_frequency(ctx, dev, bucket_name)


def frequency_reasons(freq: Frequency) -> tuple[str, ...]:
    """The reasons :func:`apply_frequency` adds to a substantive deviation whose wording has
    *freq*: "accepted in 9 of 24 past agreements" (or "never accepted in the 24 past
    agreements") and the firm's stance on the wording when it has one; none for an empty
    set.  One place for this wording, so that a writer showing the figures in a column of
    their own (the issues list) can leave these reasons out."""
    if freq.total <= 0:
        return ()
    plural = "s" * (freq.total != 1)
    out = [f"accepted in {freq.matching} of {freq.total} past agreement{plural}" if freq.matching > 0
           else f"never accepted in the {freq.total} past agreement{plural}"]
    if freq.position is not None:
        out.append(f"the firm's stance on this wording: {freq.position}")
    return tuple(out)


def _adjust(dev: Deviation, freq: Frequency) -> Deviation:
    if dev.category != "substantive" or freq.total <= 0:
        return dataclasses.replace(dev, frequency=freq)
    share = freq.matching / freq.total
    severity = dev.severity * (1.0 - ACCEPTED_WEIGHT * share)
    reasons = (*dev.reasons, *frequency_reasons(freq))
    if freq.position is not None:
        severity += POSITION_ADJUSTMENT.get(freq.position, 0)
    sev = int(min(100, max(0, round(severity))))
    return dataclasses.replace(dev, severity=sev, reasons=tuple(reasons), frequency=freq)


def _id_order(dev: Deviation) -> int:
    m = re.fullmatch(r"v(\d+)", dev.id)
    return int(m.group(1)) if m else 1 << 30


def _pair_side(pair: Pair) -> tuple[str, str]:
    """The provision whose wording a pair's figures are of: the draft's, else the precedent's."""
    if pair.draft is not None:
        return "d", pair.draft
    assert pair.precedent is not None
    return "p", pair.precedent


def _ask_nearest_at_once(ctx: _Context) -> None:
    """The references of every pair's nearest library provisions, read in one query rather
    than one per pair (the pairs' figures then find them known)."""
    ids: list[int] = []
    for pair in ctx.review.pairs:
        if pair.draft is None and pair.precedent is None:
            continue
        bucket = ctx.library.bucket(ctx.bucket_name(pair.draft, pair.precedent))
        if bucket is not None and bucket.rows:
            order = ctx.nearest(bucket, ctx.distances(bucket, *_pair_side(pair)))
            ids.extend(int(bucket.sample[i]) for i in order)
    ctx.refs(ids)


def apply_frequency(review: Review, library: Library, *, types: ReviewTypes | None = None) -> Review:
    """A new :class:`Review` whose pairs and deviations carry their :class:`Frequency` in
    *library*, with substantive severities, reasons and ranks adjusted (module docstring)."""
    ctx = _Context(review, library, types or review_types(review, library))
    _ask_nearest_at_once(ctx)
    pairs: list[Pair] = []
    for pair in review.pairs:
        if pair.draft is None and pair.precedent is None:
            pairs.append(dataclasses.replace(pair, frequency=_empty(ctx.total)))
            continue
        bucket_name = ctx.bucket_name(pair.draft, pair.precedent)
        side, pid = _pair_side(pair)
        pairs.append(dataclasses.replace(pair, frequency=_whole_frequency(ctx, bucket_name, side, pid)))
    adjusted = [_adjust(dev, _deviation_frequency(ctx, dev)) for dev in review.deviations]
    ranked = sorted(adjusted, key=lambda v: (-v.severity, _id_order(v)))
    deviations = tuple(dataclasses.replace(v, rank=r) for r, v in enumerate(ranked, 1))
    return dataclasses.replace(review, pairs=tuple(pairs), deviations=deviations)
