"""Alignment of the draft's provisions with the precedent's.

Numbers are never the key (renumbering is cosmetic): provisions are paired by what they say
and what they are called, after the term map has replaced the draft's names of defined terms
by the precedent's and cross-reference numbers have been blanked.

1. **Cheap bound.**  Both documents' provisions become TF-IDF vectors (sub-linear term
   frequency, smoothed inverse document frequency; the weighting of scikit-learn's
   ``TfidfVectorizer(sublinear_tf=True)``) of their words and of their heading words; one
   sparse product gives every cosine similarity (in plain Python for short documents, with
   numpy above :data:`PLAIN_PRODUCT_MAX` multiply-adds).  Each provision
   keeps its :data:`CANDIDATES` best counterparts by cosine (in both directions).
2. **Exact score** for the candidates only: :func:`pair_similarity`, a mix of the Indel
   similarity of the word sequences (rapidfuzz, with a score cut-off), the cosine, and the
   heading similarity.  Pairs below :data:`ALIGN_MIN` are no match.
3. **Global solution**: a maximum-weight one-to-one assignment
   (:func:`.assignment.max_weight_assignment`) on each connected component of the candidate
   graph (the assignment decomposes exactly over components), with a small bonus for the
   same relative position and, in a second round, for children of paired parents.
   Definitions of the same term (after the term map) are always paired, and so are the
   parties' descriptions that define the same party label.
4. **Split / merged**: an unpaired provision beside a paired one whose words it shares
   joins that pair (one precedent provision spread over consecutive draft provisions is
   *split*, the reverse *merged*).
5. **Moved**: pairs outside a longest increasing subsequence of precedent positions taken in
   draft order (:func:`longest_increasing_subsequence`, O(n log n)).

Cost: O(V + n·k) to build the sparse vectors, a sparse product (one multiply-add per word
shared by a draft and a precedent provision; with numpy, in blocks of rows, memory for one
block only), O(n·k) exact scores each O(len²/64)
(bit-parallel LCS), and the assignment on components (cubic in the component size; the
components are small because only near matches are joined).
"""

from __future__ import annotations

import heapq
import math
import sys
from bisect import bisect_left
from collections import Counter
from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Literal

from rapidfuzz.distance import Indel

from ..model import ProvisionKind
from .assignment import max_weight_assignment

if TYPE_CHECKING:
    import numpy as np
    from numpy.typing import NDArray

__all__ = [
    "ALIGN_MIN",
    "CANDIDATES",
    "SIBLING_WINDOW",
    "Alignment",
    "Features",
    "Group",
    "align",
    "longest_increasing_subsequence",
    "pair_similarity",
]

#: Figures marked "sweep" below come from ``benchmarks/sweep_review_constants.py``: the demo
#: pair, the three licence texts (licensedcode-data) with every edit of the licence tests
#: planted at once, and one licence against another; "same alignment" means the same pairs in
#: all five reviews.

#: Similarity (0..1) under which two provisions are not the same provision.  A provision
#: with one sentence in three rewritten scores about 0.6; unrelated provisions of the same
#: agreement score 0.1-0.3 (measured on the licence texts and the demo pair).  Sweep: 0.45
#: gives the same alignment; 0.35 and below add weak pairings between the two different
#: licences, 0.5 and above drop one there (two related warranty sections).
ALIGN_MIN = 0.4
#: Candidate counterparts kept per provision (each draft row and each precedent column) from
#: the cheap cosine bound; only candidates get the exact score, so the exact scoring costs
#: O(n x CANDIDATES) instead of O(n_d x n_p).  Tuned on the demo and licence texts (sweep):
#: every pair that reaches ALIGN_MIN ranks at most 3rd in its row or column by the bound, and
#: any value from 1 to 20 (or every pair) gives the same alignment; 6 is twice the deepest
#: rank seen, a margin for drafts rewritten more heavily than these.
CANDIDATES = 6
#: In the second round, a child of a paired parent is scored against the other parent's
#: children this many places either side of its own place among its siblings (a rewritten
#: sub-clause keeps roughly its place; scoring every sibling pair made a definitions section
#: of n terms cost n^2 exact scores).  Twice CANDIDATES: the demo and licence texts pair the
#: same with any window from 2 up.
SIBLING_WINDOW = 2 * CANDIDATES
#: Bound ((1 - HEADING_WEIGHT) x cosine + HEADING_WEIGHT x heading cosine) under which a pair
#: is not even a candidate: such a pair cannot reach ALIGN_MIN.  Tuned on the demo and
#: licence texts (sweep): pairs under 0.05 score at most 0.23 exactly (ALIGN_MIN is 0.4),
#: every pair reaching ALIGN_MIN has a bound of at least 0.16, and values from 0 to 0.3 give
#: the same alignment; 0.05 keeps a threefold margin under 0.16 and still drops about 70% of
#: the demo's pairs (24,324 of 34,782) before the top-CANDIDATES selection.
CANDIDATE_MIN_COSINE = 0.05
#: Up to this many multiply-adds (the sum over words of draft provisions x precedent
#: provisions that hold the word), the cosine bound is computed in plain Python; above it with
#: numpy, whose import (about 60 ms) costs as much as about 150,000 plain multiply-adds on
#: this 2-core machine (about 0.4 us each; numpy's are some hundred times cheaper).  A 3-page
#: pair needs about 5,000, a 50-page pair about 650,000.
PLAIN_PRODUCT_MAX = 150_000
#: Most (draft row, word, precedent row) triples gathered at once by the numpy product (a
#: block's arrays: about 32 bytes a triple, so 1,000,000 triples hold about 32 MB).
BLOCK_TRIPLES = 1_000_000
#: A word goes through the dense matrix product when (draft rows with it) x (precedent rows
#: with it) is at least this share of all pairs: gathering a triple costs numpy about 30
#: times a multiply-add of the dense product (BLAS), which touches every pair.
DENSE_SHARE = 1 / 32
#: Most draft rows per block of the cosine computation (a block holds BLOCK_ROWS x n_p cosines:
#: 4 MB for a 1,000-provision precedent).
BLOCK_ROWS = 512
#: Weight of the heading in the similarity when both provisions have one: a heading is a few
#: words against the text's many, so it counts for less than half, but enough to pair a
#: clause rewritten under the same heading.  A judgement value (from memory); sweep: 0.1-0.4
#: give the same alignment, 0 changes pairs in two perturbed licences and unpairs
#: same-titled sections of the two different licences, 0.6 unpairs the demo's renamed
#: "Term" / "Commencement and Duration".
HEADING_WEIGHT = 0.3
#: Share of the TF-IDF cosine (rare words count more) in the content similarity; the rest is
#: the Indel similarity of the word sequences (word order counts).  Equal shares, a judgement
#: value (from memory); sweep: 0-0.6 give the same alignment, 0.7 and above change which
#: definitions of the two different licences pair.
COSINE_WEIGHT = 0.5
#: A provision paired with one of another kind (a definition with a clause) loses this much:
#: the kind is evidence, but a reader's heuristic, not a fact.  From memory; sweep: 0.5-0.9
#: give the same alignment, 1 (no loss) pairs one licence's closing line with a clause of
#: the other.
KIND_MISMATCH_FACTOR = 0.8
#: Provisions with a heading and no words of their own (a section title line) compared with
#: one that has words: the heading is all the evidence, worth this much.  From memory; sweep:
#: 0-0.7 give the same alignment, 0.8 and above pair two unrelated clauses of the two
#: different licences.
HEADING_ONLY_FACTOR = 0.6
#: Tie-breaker among equal cosines when choosing candidates (relative position, 0..1): at
#: most 0.01, under any real difference of bound.  From memory; sweep: 0-0.1 give the same
#: alignment.
CANDIDATE_POSITION_WEIGHT = 0.01
#: Tie-breakers in the assignment objective (not in the reported similarity): same relative
#: position, and parents that are themselves paired.  Small beside the similarities so they
#: only decide between near-equal pairs (repeated identical list items: see the alignment
#: tests).  From memory; sweep: 0-0.2 and 0-0.4 give the same alignment.
POSITION_WEIGHT = 0.02
PARENT_BONUS = 0.05
#: Split / merged: the share of the unpaired provision's words found in the paired one, the
#: gain in similarity the paired one must get from joining it, and the fewest words a
#: provision needs to be joined at all (a two-word line is found in any neighbour).  From
#: memory; sweep: containment 0.8-1 give the same alignment, 0.7 and below join an unrelated
#: definition to a pair of definitions of the two different licences; gain 0-0.2 and
#: minimum words 1-10 change nothing here (the split and merged cases of the alignment tests
#: exercise them).
SPLIT_CONTAINMENT = 0.75
SPLIT_GAIN = 0.03
SPLIT_MIN_WORDS = 3
#: An unpaired provision is paired with an unpaired counterpart when at least this share of
#: its children are paired with that counterpart's children: half, so the children's
#: majority decides.  From memory; sweep: 0.25-0.75 give the same alignment, 1 (every child)
#: unpairs the demo's lead-in lines ("NOW, THEREFORE, the parties agree as follows" /
#: "AGREED TERMS").
CHILD_VOTE_SHARE = 0.5

@dataclass(frozen=True, slots=True)
class Features:
    """What the aligner knows of one provision."""

    #: normalised word keys of the text and of the heading: tuples of words, or strings of
    #: one character per distinct word once encoded (:func:`_encoded`)
    words: Sequence[str]
    heading: Sequence[str]
    kind: ProvisionKind
    term: str | None  # the term a definition (or a party's description) defines, by its
    #                   precedent-side name: provisions defining the same term correspond
    parent: int | None  # position of the parent provision


#: How the provisions of a group correspond (see :class:`Group`).
GroupKind = Literal["match", "split", "merged"]


@dataclass(frozen=True, slots=True)
class Group:
    """Provisions that correspond: one-to-one (``match``), one precedent provision over
    several consecutive draft provisions (``split``), or the reverse (``merged``)."""

    drafts: tuple[int, ...]
    precedents: tuple[int, ...]
    kind: GroupKind
    similarity: float  # of the joined texts
    pair_similarities: tuple[float, ...]  # one per draft/precedent pairing, in pairing order
    moved: bool = False

    @property
    def pairings(self) -> list[tuple[int, int]]:
        return [(d, p) for d in self.drafts for p in self.precedents]


@dataclass(frozen=True, slots=True)
class Alignment:
    groups: tuple[Group, ...]  # by first draft position
    added: tuple[int, ...]  # draft positions with no counterpart
    removed: tuple[int, ...]  # precedent positions with no counterpart
    draft_to_precedent: dict[int, int]  # every paired draft position -> a precedent position
    precedent_to_draft: dict[int, int]


def longest_increasing_subsequence(values: Sequence[float]) -> list[int]:
    """Indices of one longest strictly increasing subsequence of *values* (patience
    sorting, O(n log n)); among equally long ones, the one ending with the smallest values."""
    tails: list[float] = []  # tails[k]: smallest tail of an increasing run of length k+1
    tail_idx: list[int] = []
    prev = [-1] * len(values)
    for i, v in enumerate(values):
        k = bisect_left(tails, v)
        if k == len(tails):
            tails.append(v)
            tail_idx.append(i)
        else:
            tails[k] = v
            tail_idx[k] = i
        prev[i] = tail_idx[k - 1] if k > 0 else -1
    out: list[int] = []
    i = tail_idx[-1] if tail_idx else -1
    while i >= 0:
        out.append(i)
        i = prev[i]
    out.reverse()
    return out


Row = dict[int, float]


def _tfidf(seqs: Sequence[Sequence[str]]) -> list[Row]:
    """Rows: l2-normalised TF-IDF vectors (1 + log tf; idf = ln((1+N)/(1+df)) + 1) as
    {word id: weight}, word ids in order of first appearance."""
    vocab: dict[str, int] = {}
    counted: list[dict[int, int]] = []
    df: Counter[int] = Counter()
    # equal sequences (a text both documents hold) are counted once and share one row, which
    # nothing changes afterwards
    seen: dict[Sequence[str], dict[int, int]] = {}
    for seq in seqs:
        key = seq if isinstance(seq, str | tuple) else tuple(seq)
        counts = seen.get(key)
        if counts is None:
            counts = seen[key] = {vocab.setdefault(w, len(vocab)): c for w, c in Counter(seq).items()}
        df.update(counts.keys())
        counted.append(counts)
    n = len(seqs)
    idf = {j: math.log((1 + n) / (1 + d)) + 1.0 for j, d in df.items()}
    made: dict[int, Row] = {}
    rows: list[Row] = []
    for counts in counted:
        row = made.get(id(counts))
        if row is None:
            raw = {j: (1.0 + math.log(c)) * idf[j] for j, c in counts.items()}
            norm = math.sqrt(sum(x * x for x in raw.values())) or 1.0
            row = made[id(counts)] = {j: x / norm for j, x in raw.items()}
        rows.append(row)
    return rows


def _dot(x: Row, y: Row) -> float:
    if len(x) > len(y):
        x, y = y, x
    return sum(v * y[k] for k, v in x.items() if k in y)


def _product_cost(d_rows: Sequence[Row], p_rows: Sequence[Row]) -> int:
    """Multiply-adds of the sparse product of the draft rows by the precedent rows: the sum
    over words of (draft rows with the word) x (precedent rows with it)."""
    dd: Counter[int] = Counter(j for r in d_rows for j in r)
    dp: Counter[int] = Counter(j for r in p_rows for j in r)
    return sum(c * dp[j] for j, c in dd.items())


def _top(scored: Sequence[tuple[float, int]], k: int) -> list[int]:
    """The indices of the *k* best (score, index) pairs: highest score, then lowest index."""
    return [i for _s, i in heapq.nsmallest(k, ((-s, i) for s, i in scored))]


class _Cosines:
    """The TF-IDF cosines of draft rows against precedent rows (content and heading); the
    cosines of the candidate pairs are kept, others computed when asked for."""

    def __init__(self, content: Sequence[Row], heads: Sequence[Row], n_d: int) -> None:
        self.content, self.heads = content, heads
        self.n_d = n_d
        self.known: dict[tuple[int, int], tuple[float, float]] = {}

    def get(self, d: int, p: int) -> tuple[float, float]:
        v = self.known.get((d, p))
        if v is None:
            q = self.n_d + p
            v = self.known[(d, p)] = (_dot(self.content[d], self.content[q]),
                                      _dot(self.heads[d], self.heads[q]))
        return v

    def candidates(self, n_p: int) -> set[tuple[int, int]]:
        """Each draft row's and each precedent column's CANDIDATES best counterparts by the
        bound, ties broken by relative position, at least CANDIDATE_MIN_COSINE.  Below
        PLAIN_PRODUCT_MAX multiply-adds in plain Python (no numpy import), else -- or when
        numpy is loaded already (a review with the precedent set) -- with numpy in blocks of
        draft rows."""
        n_d = self.n_d
        cost = (_product_cost(self.content[:n_d], self.content[n_d:])
                + _product_cost(self.heads[:n_d], self.heads[n_d:]))
        if cost <= PLAIN_PRODUCT_MAX and "numpy" not in sys.modules:
            return self._candidates_plain(n_p)
        return self._candidates_numpy(n_p)

    def _candidates_plain(self, n_p: int) -> set[tuple[int, int]]:
        n_d = self.n_d
        scores: list[dict[int, list[float]]] = [{} for _ in range(n_d)]
        for rows, which in ((self.content, 0), (self.heads, 1)):
            postings: dict[int, list[tuple[int, float]]] = {}
            for p in range(n_p):
                for j, y in rows[n_d + p].items():
                    postings.setdefault(j, []).append((p, y))
            for d in range(n_d):
                acc = scores[d]
                for j, x in rows[d].items():
                    for p, y in postings.get(j, ()):
                        got = acc.get(p)
                        if got is None:
                            got = acc[p] = [0.0, 0.0]
                        got[which] += x * y
        kr, kc = min(CANDIDATES, n_p), min(CANDIDATES, n_d)
        cand: set[tuple[int, int]] = set()
        by_col: dict[int, list[tuple[float, int]]] = {}
        for d, acc in enumerate(scores):
            rd = d / max(1, n_d - 1)
            mine: list[tuple[float, int]] = []
            for p, (cos, hcos) in acc.items():
                bound = (1.0 - HEADING_WEIGHT) * cos + HEADING_WEIGHT * hcos
                if bound < CANDIDATE_MIN_COSINE:
                    continue
                select = bound + CANDIDATE_POSITION_WEIGHT * (1.0 - abs(rd - p / max(1, n_p - 1)))
                mine.append((select, p))
                by_col.setdefault(p, []).append((select, d))
                self.known[(d, p)] = (cos, hcos)
            cand.update((d, p) for p in _top(mine, kr))
        for p, col in by_col.items():
            cand.update((d, p) for d in _top(col, kc))
        return cand

    def _candidates_numpy(self, n_p: int) -> set[tuple[int, int]]:
        import numpy as np

        n_d = self.n_d
        content = _Postings(self.content[n_d:], self.content[:n_d])
        heads = _Postings(self.heads[n_d:], self.heads[:n_d])
        rp = np.arange(n_p) / max(1, n_p - 1)
        kr = min(CANDIDATES, n_p)
        kc = min(CANDIDATES, n_d)
        # each column's best rows so far (values and row numbers), one line per column
        col_val = np.full((n_p, 0), -np.inf)
        col_idx = np.zeros((n_p, 0), dtype=np.int64)
        cand: set[tuple[int, int]] = set()
        known = self.known

        def remember(rows: NDArray[np.intp], cols: NDArray[np.intp], cos: NDArray[np.float64],
                     hcos: NDArray[np.float64], start: int) -> None:
            for r, p, c, h in zip((rows + start).tolist(), cols.tolist(), cos[rows, cols].tolist(),
                                  hcos[rows, cols].tolist()):
                known[(r, p)] = (c, h)

        for start, end in content.blocks(self.content[:n_d], heads, self.heads[:n_d]):
            cos = content.product(self.content[start:end], n_p)
            hcos = heads.product(self.heads[start:end], n_p)
            bound = (1.0 - HEADING_WEIGHT) * cos + HEADING_WEIGHT * hcos
            rd = np.arange(start, end) / max(1, n_d - 1)
            select = bound + CANDIDATE_POSITION_WEIGHT * (1.0 - np.abs(rd[:, None] - rp[None, :]))
            select[bound < CANDIDATE_MIN_COSINE] = -np.inf
            # each row's best columns
            best = (np.argpartition(-select, kr - 1, axis=1)[:, :kr] if kr < n_p
                    else np.broadcast_to(np.arange(n_p), (end - start, n_p)))
            r, k = np.nonzero(np.isfinite(np.take_along_axis(select, best, axis=1)))
            p = best[r, k]
            cand.update(zip((r + start).tolist(), p.tolist()))
            remember(r, p, cos, hcos, start)
            # each column's best rows, this block's included
            col_val = np.hstack([col_val, select.T])
            col_idx = np.hstack([col_idx, np.broadcast_to(np.arange(start, end), (n_p, end - start))])
            if col_val.shape[1] > kc:
                keep = np.argpartition(-col_val, kc - 1, axis=1)[:, :kc]
                col_val = np.take_along_axis(col_val, keep, axis=1)
                col_idx = np.take_along_axis(col_idx, keep, axis=1)
            # remember this block's cosines of the column bests
            p, k = np.nonzero((col_idx >= start) & (col_idx < end) & np.isfinite(col_val))
            remember(col_idx[p, k] - start, p, cos, hcos, start)
        p, k = np.nonzero(np.isfinite(col_val))
        cand.update(zip(col_idx[p, k].tolist(), p.tolist()))
        return cand


class _Postings:
    """The precedent's rows by word, to multiply blocks of draft rows by them with numpy
    alone.  Words common on both sides -- (draft rows with the word) x (precedent rows with
    it) at least DENSE_SHARE of all pairs -- go through one dense matrix product (BLAS);
    for the others each (draft row, word, precedent row) triple is gathered from the word's
    postings (CSC order) and the products summed with ``bincount``."""

    def __init__(self, p_rows: Sequence[Row], d_rows: Sequence[Row]) -> None:
        import numpy as np  # imported on first use: a short review never needs it
        n_p, n_d = len(p_rows), len(d_rows)
        words = np.asarray([j for r in p_rows for j in r], dtype=np.int64)
        width = int(words.max()) + 1 if len(words) else 0
        df_p = np.bincount(words, minlength=width)
        df_d = np.bincount(np.asarray([j for r in d_rows for j in r if j < width], dtype=np.int64),
                           minlength=width)
        dense = np.nonzero(df_p * df_d >= DENSE_SHARE * n_p * n_d)[0] if width else words[:0]
        #: dense word id -> its column in the dense matrices
        self.dense_col = {int(j): k for k, j in enumerate(dense.tolist())}
        self.dense_p = np.zeros((len(dense), n_p))
        rows = np.repeat(np.arange(n_p, dtype=np.int64), [len(r) for r in p_rows])
        vals = np.asarray([x for r in p_rows for x in r.values()], dtype=np.float64)
        is_dense = np.zeros(width, dtype=bool)
        is_dense[dense] = True
        on = is_dense[words] if width else words.astype(bool)
        col = np.full(width, -1, dtype=np.int64)
        col[dense] = np.arange(len(dense))
        self.dense_p[col[words[on]], rows[on]] = vals[on]
        # the other words' postings
        sw, sr, sv = words[~on], rows[~on], vals[~on]
        order = np.argsort(sw, kind="stable")
        self.rows, self.vals = sr[order], sv[order]
        self.df = np.bincount(sw, minlength=width)
        self.ptr = np.concatenate([[0], np.cumsum(self.df)]).astype(np.int64)
        self.width = width

    def triples(self, row: Row) -> int:
        """The triples one draft row gathers: the precedent rows holding each of its words
        that is not dense."""
        df, width = self.df, self.width
        return int(sum(int(df[j]) for j in row if j < width))

    def blocks(self, d_rows: Sequence[Row], heads: _Postings, d_heads: Sequence[Row]
               ) -> list[tuple[int, int]]:
        """Consecutive ranges of draft rows, each at most BLOCK_ROWS rows and, past its first
        row, at most BLOCK_TRIPLES gathered triples (content and headings), so that a block's
        arrays stay small."""
        out: list[tuple[int, int]] = []
        start, load = 0, 0
        for d in range(len(d_rows)):
            t = self.triples(d_rows[d]) + heads.triples(d_heads[d])
            if d > start and (d - start >= BLOCK_ROWS or load + t > BLOCK_TRIPLES):
                out.append((start, d))
                start, load = d, 0
            load += t
        if start < len(d_rows):
            out.append((start, len(d_rows)))
        return out

    def product(self, d_rows: Sequence[Row], n_p: int) -> NDArray[np.float64]:
        """The dense block (len(d_rows) x n_p) of dot products of *d_rows* with the
        precedent rows."""
        import numpy as np
        n = len(d_rows)
        local: list[int] = []
        words: list[int] = []
        weights: list[float] = []
        dense_r: list[int] = []
        dense_c: list[int] = []
        dense_x: list[float] = []
        dense_col, width = self.dense_col, self.width
        for r, row in enumerate(d_rows):
            for j, x in row.items():
                c = dense_col.get(j)
                if c is not None:
                    dense_r.append(r)
                    dense_c.append(c)
                    dense_x.append(x)
                elif j < width:
                    local.append(r)
                    words.append(j)
                    weights.append(x)
        flat_out: NDArray[np.float64] = np.zeros(n * n_p)
        if words:
            w = np.asarray(words, dtype=np.int64)
            lengths = self.df[w]
            total = int(lengths.sum())
            if total:
                # every posting of every (row, word): a ragged gather of the posting ranges
                ends = np.cumsum(lengths)
                pos = np.repeat(self.ptr[w] - (ends - lengths), lengths) + np.arange(total, dtype=np.int64)
                flat = np.repeat(np.asarray(local, dtype=np.int64), lengths) * n_p + self.rows[pos]
                vals = self.vals[pos] * np.repeat(np.asarray(weights, dtype=np.float64), lengths)
                flat_out = np.bincount(flat, weights=vals, minlength=n * n_p).astype(np.float64, copy=False)
        out = flat_out.reshape(n, n_p)
        if dense_r:
            block = np.zeros((n, len(dense_col)))
            block[dense_r, dense_c] = dense_x
            out += block @ self.dense_p
        return out


#: Above any cosine of two l2-normed rows of non-negative weights (at most 1, give or take
#: rounding): :func:`pair_similarity` grows with the cosine, so with this one it bounds a
#: pair's similarity from above without the cosine's dot products.
_COSINE_CEILING = 1.0 + 1e-9


def pair_similarity(d: Features, p: Features, cosine: float, heading_cosine: float = 0.0) -> float:
    """Similarity 0..1 of two provisions (see the module's notes)."""
    hd, hp = bool(d.heading), bool(p.heading)
    h = Indel.normalized_similarity(d.heading, p.heading) if hd and hp else 0.0
    if d.words and p.words:
        indel = Indel.normalized_similarity(d.words, p.words)
        c = COSINE_WEIGHT * cosine + (1.0 - COSINE_WEIGHT) * indel
        s = (1.0 - HEADING_WEIGHT) * c + HEADING_WEIGHT * h if hd and hp else c
    elif not d.words and not p.words:
        s = h
    else:
        s = HEADING_ONLY_FACTOR * h
    if d.kind != p.kind:
        s *= KIND_MISMATCH_FACTOR
    return max(0.0, min(1.0, s))


def _joined(feats: Sequence[Features]) -> Features:
    f0 = feats[0]
    if all(isinstance(f.words, str) for f in feats):  # encoded (see _encoded)
        return Features("".join("".join(f.words) for f in feats), f0.heading, f0.kind, f0.term, f0.parent)
    return Features(tuple(w for f in feats for w in f.words), f0.heading, f0.kind, f0.term, f0.parent)


def _containment(small: Sequence[str], big: Sequence[str]) -> float:
    if not small:
        return 0.0
    cs, cb = Counter(small), Counter(big)
    return sum(min(c, cb[w]) for w, c in cs.items()) / len(small)


def _solve(n_d: int, n_p: int, edges: dict[tuple[int, int], float]) -> dict[int, int]:
    """Maximum-weight one-to-one matching over *edges*, solved per connected component."""
    parent = list(range(n_d + n_p))

    def find(x: int) -> int:
        while parent[x] != x:
            parent[x] = parent[parent[x]]
            x = parent[x]
        return x

    for d, p in edges:
        a, b = find(d), find(n_d + p)
        if a != b:
            parent[a] = b
    comps: dict[int, list[tuple[int, int]]] = {}
    for e in edges:
        comps.setdefault(find(e[0]), []).append(e)
    match: dict[int, int] = {}
    for comp in comps.values():
        if len(comp) == 1:
            d, p = comp[0]
            match[d] = p
            continue
        rows = sorted({d for d, _ in comp})
        cols = sorted({p for _, p in comp})
        ri = {d: i for i, d in enumerate(rows)}
        ci = {p: j for j, p in enumerate(cols)}
        w = [[0.0] * len(cols) for _ in rows]
        for d, p in comp:
            w[ri[d]][ci[p]] = edges[(d, p)]
        for i, j in max_weight_assignment(w):
            if w[i][j] > 0:
                match[rows[i]] = cols[j]
    return match


def _encoded(draft: Sequence[Features], precedent: Sequence[Features]
             ) -> tuple[list[Features], list[Features]]:
    """The features with each distinct word (of a text or a heading) one character of a
    string instead of a tuple of words.  Everything here depends only on which words are
    equal, so the results are the same; rapidfuzz compares strings several times faster
    than tuples of strings (it hashes every element of a tuple on every call)."""
    codes: dict[str, str] = {}

    def enc(words: Sequence[str]) -> str:
        for w in dict.fromkeys(words):
            if w not in codes:
                n = len(codes)
                codes[w] = chr(n if n < 0xD800 else n + 0x800)  # no surrogate code points
        return "".join(map(codes.__getitem__, words))

    def each(feats: Sequence[Features]) -> list[Features]:
        return [Features(enc(f.words), enc(f.heading), f.kind, f.term, f.parent) for f in feats]

    return each(draft), each(precedent)


def align(draft: Sequence[Features], precedent: Sequence[Features]) -> Alignment:
    """Pair the draft's provisions with the precedent's (see the module's notes)."""
    n_d, n_p = len(draft), len(precedent)
    if n_d == 0 or n_p == 0:
        return Alignment((), tuple(range(n_d)), tuple(range(n_p)), {}, {})
    draft, precedent = _encoded(draft, precedent)
    content = _tfidf([f.words for f in draft] + [f.words for f in precedent])
    heads = _tfidf([f.heading for f in draft] + [f.heading for f in precedent])
    cosines = _Cosines(content, heads, n_d)
    linked = _linked_definitions(draft, precedent)
    cand = cosines.candidates(n_p)
    cand |= linked
    sims: dict[tuple[int, int], float] = {}
    for d, p in cand:
        s = pair_similarity(draft[d], precedent[p], *cosines.get(d, p))
        if s >= ALIGN_MIN or (d, p) in linked:
            sims[(d, p)] = s
    prior = _PositionPrior(n_d, n_p)
    base = {e: s + prior(*e) + (2.0 if e in linked else 0.0) for e, s in sims.items()}
    match = _solve(n_d, n_p, base)
    # Second round: the children of paired parents become candidates of each other, and
    # prefer each other.
    for d, p in _sibling_candidates(draft, precedent, match):
        if (d, p) not in sims:
            if pair_similarity(draft[d], precedent[p], _COSINE_CEILING) < ALIGN_MIN:
                continue  # below the threshold whatever their cosines: none computed
            s = pair_similarity(draft[d], precedent[p], *cosines.get(d, p))
            if s >= ALIGN_MIN:
                sims[(d, p)] = s
                base[(d, p)] = s + prior(d, p)
    bonus = dict(base)
    for (d, p) in base:
        pd, pp = draft[d].parent, precedent[p].parent
        if pd is not None and pp is not None and match.get(pd) == pp:
            bonus[(d, p)] += PARENT_BONUS
    match = _solve(n_d, n_p, bonus)
    _pair_by_children(draft, precedent, match, sims, cosines)
    groups = _marked_moves(_splits_and_merges(draft, precedent, match, sims, cosines))
    return _alignment(groups, n_d, n_p)


def _linked_definitions(draft: Sequence[Features], precedent: Sequence[Features]) -> set[tuple[int, int]]:
    """The (draft, precedent) pairs of definitions of the same term: they always correspond."""
    p_def: dict[tuple[str, str], list[int]] = {}
    for j, f in enumerate(precedent):
        if f.term:
            p_def.setdefault((f.kind, f.term), []).append(j)
    return {(i, j) for i, f in enumerate(draft) if f.term for j in p_def.get((f.kind, f.term), ())}


@dataclass(frozen=True, slots=True)
class _PositionPrior:
    """The bonus of a pair for standing at the same relative place in both documents."""

    n_d: int
    n_p: int

    def __call__(self, d: int, p: int) -> float:
        rd = d / (self.n_d - 1) if self.n_d > 1 else 0.0
        rp = p / (self.n_p - 1) if self.n_p > 1 else 0.0
        return POSITION_WEIGHT * (1.0 - abs(rd - rp))


def _sibling_candidates(draft: Sequence[Features], precedent: Sequence[Features],
                        match: dict[int, int]) -> Iterator[tuple[int, int]]:
    """(draft, precedent) pairs of children of paired parents at most SIBLING_WINDOW places
    apart among their siblings."""
    p_children: dict[int, list[int]] = {}
    for j, f in enumerate(precedent):
        if f.parent is not None:
            p_children.setdefault(f.parent, []).append(j)
    d_place: dict[int, int] = {}  # a draft provision's place among its siblings
    seen: Counter[int] = Counter()
    for d, f in enumerate(draft):
        if f.parent is not None:
            d_place[d] = seen[f.parent]
            seen[f.parent] += 1
    for d, f in enumerate(draft):
        q = match.get(f.parent) if f.parent is not None else None
        if q is None:
            continue
        k = d_place[d]
        for p in p_children.get(q, [])[max(0, k - SIBLING_WINDOW):k + SIBLING_WINDOW + 1]:
            yield d, p


def _marked_moves(groups: list[Group]) -> list[Group]:
    """*groups* in draft order, those outside a longest increasing subsequence of precedent
    positions marked moved."""
    groups = sorted(groups, key=lambda g: g.drafts[0])
    keep = set(longest_increasing_subsequence([g.precedents[0] for g in groups]))
    return [g if i in keep else Group(g.drafts, g.precedents, g.kind, g.similarity,
                                      g.pair_similarities, True)
            for i, g in enumerate(groups)]


def _alignment(groups: list[Group], n_d: int, n_p: int) -> Alignment:
    d2p: dict[int, int] = {}
    p2d: dict[int, int] = {}
    for g in groups:
        for d in g.drafts:
            d2p.setdefault(d, g.precedents[0])
        for p in g.precedents:
            p2d.setdefault(p, g.drafts[0])
    added = tuple(d for d in range(n_d) if d not in d2p)
    removed = tuple(p for p in range(n_p) if p not in p2d)
    return Alignment(tuple(groups), added, removed, d2p, p2d)


def _pair_by_children(draft: Sequence[Features], precedent: Sequence[Features],
                      match: dict[int, int], sims: dict[tuple[int, int], float],
                      cosines: _Cosines) -> None:
    """Pair an unpaired provision with the unpaired provision whose children its own
    children are paired with (a section title "Orders" / "Purchase Orders" whose clauses
    correspond).  Deepest provisions first, so that parents of parents follow.  O(n)."""
    children: dict[int, list[int]] = {}
    for d, f in enumerate(draft):
        if f.parent is not None:
            children.setdefault(f.parent, []).append(d)
    taken_p = set(match.values())
    for d in sorted(children, reverse=True):
        if d in match:
            continue
        votes: Counter[int] = Counter()
        for c in children[d]:
            p = match.get(c)
            up = precedent[p].parent if p is not None else None
            if up is not None:
                votes[up] += 1
        if not votes:
            continue
        q, n = votes.most_common(1)[0]
        if q in taken_p or n * 2 < len(children[d]) * CHILD_VOTE_SHARE * 2:
            continue
        match[d] = q
        taken_p.add(q)
        sims[(d, q)] = pair_similarity(draft[d], precedent[q], *cosines.get(d, q))


def _grow(own: Sequence[Features], other: Sequence[Features], mine: dict[int, int],
          extra: dict[int, list[int]]) -> None:
    """Attach each unpaired provision of *own* to the pair of a neighbour whose
    counterpart in *other* holds its words (see SPLIT_CONTAINMENT, SPLIT_GAIN); a
    neighbour already attached to a pair counts as that pair, so that a provision
    spread over several consecutive ones is gathered whole."""
    taken = set(mine)
    anchor_of: dict[int, int] = {}
    for u in range(len(own)):
        if u in taken or len(own[u].words) < SPLIT_MIN_WORDS:
            continue
        for nb in (u - 1, u + 1):
            anchor = nb if nb in mine else anchor_of.get(nb)
            if anchor is None:
                continue
            q = mine[anchor]
            run = sorted([anchor, *extra.get(anchor, [])])
            if not (run[0] - 1 <= u <= run[-1] + 1):
                continue
            if _containment(own[u].words, other[q].words) < SPLIT_CONTAINMENT:
                continue
            before = Indel.normalized_similarity(_joined([own[i] for i in run]).words, other[q].words)
            after_run = sorted([*run, u])
            after = Indel.normalized_similarity(_joined([own[i] for i in after_run]).words,
                                                other[q].words)
            if after >= before + SPLIT_GAIN:
                extra.setdefault(anchor, []).append(u)
                taken.add(u)
                anchor_of[u] = anchor
                break


def _splits_and_merges(draft: Sequence[Features], precedent: Sequence[Features],
                       match: dict[int, int], sims: dict[tuple[int, int], float],
                       cosines: _Cosines) -> list[Group]:
    p_of = dict(match)
    d_of = {p: d for d, p in match.items()}
    split_extra: dict[int, list[int]] = {}  # matched draft d -> extra draft positions
    merge_extra: dict[int, list[int]] = {}  # matched precedent p -> extra precedent positions

    _grow(draft, precedent, p_of, split_extra)
    _grow(precedent, draft, d_of, merge_extra)

    groups: list[Group] = []
    used_p: set[int] = set()
    for d, p in sorted(match.items()):
        if d in split_extra:
            ds = tuple(sorted([d, *split_extra[d]]))
            joined = _joined([draft[i] for i in ds])
            s = pair_similarity(joined, precedent[p], cosines.get(d, p)[0])
            groups.append(Group(ds, (p,), "split", s,
                                tuple(sims.get((i, p), pair_similarity(draft[i], precedent[p], *cosines.get(i, p)))
                                      for i in ds)))
        elif p in merge_extra and p not in used_p:
            ps = tuple(sorted([p, *merge_extra[p]]))
            joined = _joined([precedent[j] for j in ps])
            s = pair_similarity(draft[d], joined, cosines.get(d, p)[0])
            groups.append(Group((d,), ps, "merged", s,
                                tuple(sims.get((d, j), pair_similarity(draft[d], precedent[j], *cosines.get(d, j)))
                                      for j in ps)))
            used_p.update(ps)
        else:
            groups.append(Group((d,), (p,), "match", sims[(d, p)], (sims[(d, p)],)))
    return groups
