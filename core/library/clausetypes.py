"""Clause types: which subject each provision deals with (``resources/clause_types.toml``).

A provision is typed by, in order (see the taxonomy file's header for the reasons):

1. its kind: a definition is ``definitions``; the title, parties block, recitals and signature
   page have no clause type;
2. its heading (or run-in lead), matched against the taxonomy's heading keywords;
3. its parent's type, when the parent's type itself came from a heading (an unheaded
   sub-clause deals with its clause's subject);
4. its nearest typed neighbours: TF-IDF cosine (scikit-learn's weighting, computed with
   numpy) between the provision's words and typed provisions of the precedent set plus the
   taxonomy's seed phrases; the k nearest vote, weighted by similarity.

Cost: heading matching is one regular-expression search per heading.  The neighbour classifier
is fitted on at most ``40 * (MAX_EXAMPLES_PER_TYPE + 1)`` examples (O(total words)); a query
is one sparse matrix product, O(query words * examples sharing them).
"""

from __future__ import annotations

import importlib.util
import io
import mmap
import re
import tomllib
from collections import defaultdict
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path

import numpy as np

from ..errors import CounterdraftError
from ..lazyre import compile_pattern
from ..model import Document, Provision
from .normalise import TermReplacer, canonical_role, fold, match_tokens, shared_replacer
from .npzview import stored_arrays
from .sparse import Csr

__all__ = [
    "CLAUSE_TYPES_PATH",
    "HEADING_LINE_MAX_WORDS",
    "MAX_EXAMPLES_PER_TYPE",
    "NEIGHBOUR_K",
    "NEIGHBOUR_MIN_SHARE",
    "NEIGHBOUR_MIN_SIMILARITY",
    "NEIGHBOUR_MIN_WORDS",
    "UNTYPED_KINDS",
    "ClauseType",
    "NeighbourClassifier",
    "Taxonomy",
    "Typing",
    "classifier_text",
    "classify_document",
    "classify_provisions",
    "document_term_replacer",
    "heading_type",
    "load_taxonomy",
]

CLAUSE_TYPES_PATH = Path(__file__).resolve().parents[2] / "resources" / "clause_types.toml"

#: Provision kinds that never carry a clause type: they are not clauses.
UNTYPED_KINDS = frozenset({"title", "parties", "recital", "signature"})

#: Neighbours that vote for an unheaded provision's type (k of k-nearest-neighbours).  Five is
#: the usual small odd k (common practice, no source); with 40 types a tie is rare and is
#: broken by the taxonomy's order.
NEIGHBOUR_K = 5

#: Below this TF-IDF cosine even the nearest typed provision is not evidence of a type: the
#: provision stays untyped.  Measured on the taxonomy's seeds: a clause of the same subject
#: written differently scores 0.15-0.5 against them, unrelated boilerplate below 0.1.
NEIGHBOUR_MIN_SIMILARITY = 0.12

#: The winning type needs at least this share of the neighbours' summed similarity; otherwise
#: the neighbours disagree and the provision stays untyped.  With NEIGHBOUR_K = 5, 0.4 asks
#: for about two of five equally close neighbours and a lead over any other type (a judgement
#: value, from memory).
NEIGHBOUR_MIN_SHARE = 0.4

#: A provision with fewer content words (stop words excluded) than this is not typed by its
#: neighbours: a two-word line ("AGREED TERMS") matches some seed by accident.
NEIGHBOUR_MIN_WORDS = 4

#: Texts whose predicted type a classifier remembers (:meth:`NeighbourClassifier.predict`):
#: a few long agreements' worth (a 100-page agreement has some 500 provisions), a few MB.
PREDICTION_MEMO = 20_000

#: Typed provisions of one type kept as neighbour examples (chosen deterministically), which
#: bounds the classifier's size and fitting time for a large precedent set.
MAX_EXAMPLES_PER_TYPE = 200


@dataclass(frozen=True, slots=True)
class ClauseType:
    id: str
    label: str
    headings: tuple[str, ...]
    seeds: tuple[str, ...]


@dataclass(frozen=True, slots=True)
class Taxonomy:
    types: tuple[ClauseType, ...]
    _heading_re: re.Pattern[str] = field(compare=False, repr=False)
    _keyword_type: Mapping[str, str] = field(compare=False, repr=False)

    @property
    def ids(self) -> tuple[str, ...]:
        return tuple(t.id for t in self.types)

    def get(self, type_id: str) -> ClauseType:
        for t in self.types:
            if t.id == type_id:
                return t
        raise KeyError(type_id)

    def label(self, type_id: str | None) -> str:
        """A readable name for *type_id* ("Limitation of liability"); the id itself if unknown."""
        if type_id is None:
            return "Untyped"
        try:
            return self.get(type_id).label
        except KeyError:
            return type_id


def _norm_heading(text: str) -> str:
    t = fold(text).lower().replace("&", " and ")
    t = re.sub(r"[^\w'\- ]+", " ", t)
    return re.sub(r"\s+", " ", t).strip()


def _parse_taxonomy(data: Mapping[str, object], source: str) -> Taxonomy:
    raw = data.get("types")
    if not isinstance(raw, Mapping) or not raw:
        raise CounterdraftError("no [types.*] tables in the clause-type taxonomy", path=source)
    types: list[ClauseType] = []
    keyword_type: dict[str, str] = {}
    order: list[str] = []
    for tid, spec in raw.items():
        if not isinstance(spec, Mapping):
            raise CounterdraftError(f"clause type {tid!r} is not a table", path=source)
        headings = tuple(_norm_heading(h) for h in spec.get("headings", ()) if str(h).strip())
        seeds = tuple(str(s) for s in spec.get("seeds", ()))
        types.append(ClauseType(tid, str(spec.get("label", tid)), headings, seeds))
        for h in headings:
            if h not in keyword_type:
                keyword_type[h] = tid
                order.append(h)
    # Longer keywords first so that at one position the longer one matches.
    alts = "|".join(re.escape(k) for k in sorted(order, key=lambda k: (-len(k), order.index(k))))
    # The taxonomy's own pattern: its compiled program is kept between runs (core.lazyre).
    heading_re = compile_pattern(rf"(?<![\w'\-])(?:{alts})(?![\w'\-])")
    return Taxonomy(tuple(types), heading_re, keyword_type)


@lru_cache(maxsize=8)
def _load(path: str) -> Taxonomy:
    try:
        with open(path, "rb") as fh:
            data = tomllib.load(fh)
    except OSError as err:
        raise CounterdraftError(f"cannot read the clause-type taxonomy ({err.strerror})", path=path) from None
    except tomllib.TOMLDecodeError as err:
        raise CounterdraftError(f"the clause-type taxonomy is not valid TOML ({err})", path=path) from None
    return _parse_taxonomy(data, path)


def load_taxonomy(path: str | None = None) -> Taxonomy:
    """The taxonomy in *path* (default ``resources/clause_types.toml``), parsed once."""
    return _load(str(path or CLAUSE_TYPES_PATH))


def heading_type(heading: str | None, *, taxonomy: Taxonomy | None = None) -> str | None:
    """The clause type whose keyword occurs earliest in *heading* (ties: the longer keyword,
    then the taxonomy's order), or None."""
    if not heading:
        return None
    tax = taxonomy or load_taxonomy()
    m = tax._heading_re.search(_norm_heading(heading))
    return tax._keyword_type[m.group(0)] if m else None


# ----------------------------------------------------------------------------------------
# Neighbour classifier
# ----------------------------------------------------------------------------------------


#: Words that say nothing about a clause's subject: scikit-learn's English stop-word list plus
#: the words every clause of an agreement uses (common drafting usage, no source).
_LEGAL_STOP_WORDS = frozenset({"shall", "agreement", "party", "parties", "may", "will", "must",
                               "provided", "accordance", "clause", "hereby", "such", "any"})


def _english_stop_words() -> frozenset[str]:
    """scikit-learn's English stop-word list.  Read from its own module file (a plain list,
    no imports) without importing the scikit-learn package, whose import costs about half a
    second to a second -- more than clause typing itself in ``review --library`` and in a
    one-file rebuild; through the package when that file is not where this version keeps it."""
    spec = importlib.util.find_spec("sklearn")  # finds the package without running it
    folder = spec.submodule_search_locations if spec is not None else None
    path = Path(folder[0]) / "feature_extraction" / "_stop_words.py" if folder else None
    if path is not None and path.is_file():
        module_spec = importlib.util.spec_from_file_location("_counterdraft_stop_words", path)
        if module_spec is not None and module_spec.loader is not None:
            module = importlib.util.module_from_spec(module_spec)
            module_spec.loader.exec_module(module)
            words = getattr(module, "ENGLISH_STOP_WORDS", None)
            if isinstance(words, frozenset):
                return words
    from sklearn.feature_extraction.text import ENGLISH_STOP_WORDS

    return frozenset(ENGLISH_STOP_WORDS)


@lru_cache(maxsize=1)
def _stop_words() -> frozenset[str]:
    return _english_stop_words() | _LEGAL_STOP_WORDS


def _ngrams(tokens: str) -> list[str]:
    """Analyzer for TfidfVectorizer: the input is already space-joined normalised tokens;
    content words (stop words dropped) and their bigrams."""
    stop = _stop_words()
    words = [w for w in tokens.split() if w not in stop and not w[0].isdigit()]
    return words + [a + " " + b for a, b in zip(words, words[1:])]


def _classifier_text(text: str, heading: str | None, terms: TermReplacer | None) -> str:
    return " ".join(match_tokens(f"{heading or ''} {text}", terms=terms))


class NeighbourClassifier:
    """k-nearest-neighbour clause typing by TF-IDF cosine over typed examples.

    Build it with :meth:`fit` from ``(normalised token string, clause type)`` examples (typed
    provisions of the precedent set); one example per type made of the taxonomy's seed phrases
    is always added.  The TF-IDF weighting is scikit-learn's ``TfidfVectorizer`` with
    ``sublinear_tf=True`` and l2 norm; queries are weighted the same way by :meth:`transform`
    from the fitted vocabulary and idf, so the model persists as plain arrays
    (:meth:`to_npz_bytes`), with no pickle.
    """

    def __init__(self, vocabulary: Sequence[str], idf: np.ndarray, matrix: Csr | None,
                 labels: Sequence[str], *, by_term: Csr | None = None) -> None:
        """*matrix*: the examples' TF-IDF rows; or None with *by_term*, its transpose."""
        self._terms = list(vocabulary)
        self._index = {t: i for i, t in enumerate(self._terms)}
        self._idf = np.asarray(idf, dtype=np.float64)
        if matrix is None and by_term is None:
            raise ValueError("the examples' matrix or its transpose is needed")
        self._examples = matrix
        self._by_term = by_term  # the examples' transpose, made when first needed
        self._memo: dict[str, tuple[str | None, float]] = {}
        self._labels = [str(x) for x in labels]
        self._type_order = {t: i for i, t in enumerate(dict.fromkeys(self._labels))}

    @classmethod
    def fit(cls, examples: Iterable[tuple[str, str]], *, taxonomy: Taxonomy | None = None,
            max_per_type: int = MAX_EXAMPLES_PER_TYPE) -> NeighbourClassifier:
        """Fit on *examples*.  Per type, the first *max_per_type* distinct examples in sorted
        order are kept, so the result does not depend on the examples' order.

        The weighting is scikit-learn's ``TfidfVectorizer(sublinear_tf=True, norm="l2")``
        (smooth idf ``ln((1 + n) / (1 + df)) + 1``, features in sorted order), computed here
        with numpy so that fitting does not import scikit-learn (tested against it)."""
        tax = taxonomy or load_taxonomy()
        per_type: dict[str, set[str]] = defaultdict(set)
        for text, tid in examples:
            if text.strip():
                per_type[tid].add(text)
        texts: list[str] = []
        labels: list[str] = []
        for t in tax.types:
            if t.seeds:  # one example per type: all its seed phrases together
                texts.append(" ".join(match_tokens(" . ".join(t.seeds))))
                labels.append(t.id)
            for text in sorted(per_type.get(t.id, ()))[:max_per_type]:
                texts.append(text)
                labels.append(t.id)
        grams = [set(_ngrams(text)) for text in texts]
        vocab = sorted(set().union(*grams)) if grams else []
        index = {g: i for i, g in enumerate(vocab)}
        df = np.zeros(len(vocab), dtype=np.float64)
        for gs in grams:
            df[[index[g] for g in gs]] += 1.0
        idf = np.log((1.0 + len(texts)) / (1.0 + df)) + 1.0
        unfitted = cls(vocab, idf, Csr.empty(len(vocab)), labels)
        return cls(vocab, idf, unfitted.transform(texts), labels)

    def transform(self, texts: Sequence[str]) -> Csr:
        """TF-IDF rows of *texts* over the fitted vocabulary: (1 + log tf) * idf, l2-normed
        (array work over all texts at once; only the n-gram lookup is per word)."""
        width = max(len(self._terms), 1)
        keys: list[int] = []
        for r, text in enumerate(texts):
            base = r * width
            keys.extend(base + j for j in map(self._index.get, _ngrams(text)) if j is not None)
        uniq, counts = np.unique(np.array(keys, dtype=np.int64), return_counts=True)
        rows, cols = np.divmod(uniq, width)
        w = (1.0 + np.log(counts.astype(np.float64))) * self._idf[cols]
        norms = np.sqrt(np.bincount(rows, weights=w * w, minlength=len(texts)))
        w = w / np.where(norms[rows] > 0, norms[rows], 1.0)
        return Csr.from_entries(rows, cols, w, (len(texts), len(self._terms)))

    def predict(self, texts: Sequence[str]) -> list[tuple[str | None, float]]:
        """For each normalised token string: (clause type or None, best cosine similarity).

        A text's answer depends on that text alone, so answers are remembered (up to
        ``PREDICTION_MEMO`` texts): a review types each document once for the comparison and
        again with the review's term renames, where most texts read the same."""
        memo = self._memo
        new = [t for t in dict.fromkeys(texts) if t not in memo]
        if len(memo) + len(new) > PREDICTION_MEMO:
            memo.clear()
        if new:
            by_term = self._terms_by_example()
            for start in range(0, len(new), 512):  # bounded memory: 512 x examples per step
                chunk = new[start:start + 512]
                sims = self.transform(chunk).dot(by_term)  # cosine: rows are l2-normed
                memo.update((text, self._vote(text, row)) for text, row in zip(chunk, sims))
        return [memo[t] for t in texts]

    def _vote(self, text: str, row: np.ndarray) -> tuple[str | None, float]:
        """The type the nearest examples agree on (similarities *row*), and the best one."""
        best = float(row.max()) if row.size else 0.0
        stop = _stop_words()
        if sum(1 for w in text.split() if w not in stop) < NEIGHBOUR_MIN_WORDS:
            return None, best
        k = min(NEIGHBOUR_K, row.size)  # one similarity per example
        top = np.argpartition(-row, k - 1)[:k]
        top = top[row[top] >= NEIGHBOUR_MIN_SIMILARITY]
        if top.size == 0:
            return None, best
        votes: dict[str, float] = defaultdict(float)
        for i in top.tolist():
            votes[self._labels[i]] += float(row[i])
        total = sum(votes.values())
        winner = min(votes, key=lambda t: (-votes[t], self._type_order.get(t, 0)))
        return (winner, best) if votes[winner] / total >= NEIGHBOUR_MIN_SHARE else (None, best)

    @property
    def _matrix(self) -> Csr:
        """The examples' TF-IDF rows (examples x terms)."""
        if self._examples is None:
            assert self._by_term is not None
            self._examples = self._by_term.transpose()
        return self._examples

    def _terms_by_example(self) -> Csr:
        """The examples' matrix by terms (its transpose: what a query is multiplied by)."""
        if self._by_term is None:
            self._by_term = self._matrix.transpose()
        return self._by_term

    def to_npz_bytes(self) -> bytes:
        """The model's arrays; the examples' matrix kept by terms (``t*``), the form a
        review multiplies by, so that it is not turned round on every review."""
        buf = io.BytesIO()
        t = self._terms_by_example()
        np.savez(buf, vocabulary=np.array(self._terms, dtype=str), idf=self._idf, tdata=t.data,
                 tindices=t.indices, tindptr=t.indptr, shape=np.array(t.shape[::-1]),
                 labels=np.array(self._labels, dtype=str))
        return buf.getvalue()

    @classmethod
    def from_npz_bytes(cls, data: bytes | mmap.mmap) -> NeighbourClassifier:
        """A model :meth:`to_npz_bytes` wrote (or one written by rows, before it kept the
        matrix by terms)."""
        common = ("vocabulary", "idf", "shape", "labels")
        for form in (("tdata", "tindices", "tindptr"), ("data", "indices", "indptr")):
            a = stored_arrays(data, (*common, *form))  # in place: no copy
            if a is not None:
                break
        else:
            with np.load(io.BytesIO(data), allow_pickle=False) as stored:
                a = {f: stored[f] for f in stored.files}
        rows, cols = (int(n) for n in a["shape"].tolist())
        if "tdata" in a:
            by_term = Csr(a["tindptr"], a["tindices"], a["tdata"], (cols, rows))
            return cls(a["vocabulary"].tolist(), a["idf"], None, a["labels"].tolist(), by_term=by_term)
        matrix = Csr(a["indptr"], a["indices"], a["data"], (rows, cols))
        return cls(a["vocabulary"].tolist(), a["idf"], matrix, a["labels"].tolist())


@lru_cache(maxsize=1)
def _seed_classifier() -> NeighbourClassifier:
    return NeighbourClassifier.fit((), taxonomy=load_taxonomy())


# ----------------------------------------------------------------------------------------
# Typing a document
# ----------------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class Typing:
    provision: str  # provision id
    clause_type: str | None
    source: str  # "kind" | "heading" | "parent" | "neighbour" | "none"


def document_term_replacer(doc: Document, *, aliases: Mapping[str, str] | None = None,
                           renames: Mapping[str, str] | None = None) -> TermReplacer:
    """A :class:`TermReplacer` for *doc*'s defined terms: each name goes through *renames*
    (e.g. a review's draft -> precedent term map), then the party roles and *aliases*."""
    aliases = aliases or {}
    renames = renames or {}
    names: dict[str, str] = {}
    for t in doc.terms:
        name = renames.get(t.term, t.term)
        name = aliases.get(name, name)
        names[t.term] = canonical_role(name) or name
    for draft_name, prec_name in renames.items():
        if draft_name not in names:
            name = aliases.get(prec_name, prec_name)
            names[draft_name] = canonical_role(name) or name
    return shared_replacer(names)


#: A provision without a heading whose first line is at most this many words and does not end
#: like a sentence is read as carrying its heading in its text ("Governing law" on a line of
#: its own in a plain-text agreement).  Common drafting practice: headings are a few words.
HEADING_LINE_MAX_WORDS = 6


def _heading_like_first_line(text: str) -> str | None:
    first = text.split("\n", 1)[0].strip()
    if not first or first[-1] in ".;:," or len(first.split()) > HEADING_LINE_MAX_WORDS:
        return None
    return first


def classify_provisions(doc: Document, *, taxonomy: Taxonomy | None = None,
                        neighbours: NeighbourClassifier | None = None,
                        terms: TermReplacer | None = None) -> tuple[Typing, ...]:
    """Type every provision of *doc* (same order as ``doc.provisions``).

    *neighbours* defaults to a classifier of the taxonomy's seed phrases alone; pass the
    precedent set's classifier (:meth:`core.library.index.Library.neighbours`) when a library
    is open.  *terms* replaces defined terms before the neighbour comparison.
    """
    tax = taxonomy or load_taxonomy()
    by_id: dict[str, Typing] = {}
    pending: list[Provision] = []
    result: list[Typing | None] = []
    for p in doc.provisions:
        typ: Typing | None
        if p.kind == "definition":
            typ = Typing(p.id, "definitions", "kind")
        elif p.kind in UNTYPED_KINDS:
            typ = Typing(p.id, None, "kind")
        else:
            tid = heading_type(p.heading or _heading_like_first_line(p.text), taxonomy=tax)
            if tid is not None:
                typ = Typing(p.id, tid, "heading")
            else:
                parent = by_id.get(p.parent) if p.parent else None
                if parent is not None and parent.source in ("heading", "parent", "kind") \
                        and parent.clause_type is not None:
                    typ = Typing(p.id, parent.clause_type, "parent")
                else:
                    typ = None
                    pending.append(p)
        if typ is not None:
            by_id[p.id] = typ
        result.append(typ)
    if pending:
        clf = neighbours or _seed_classifier()
        preds = clf.predict([_classifier_text(p.text, p.heading, terms) for p in pending])
        for p, (tid, _score) in zip(pending, preds):
            by_id[p.id] = Typing(p.id, tid, "neighbour" if tid else "none")
        # Unheaded children of a neighbour-typed clause were typed on their own above; that
        # keeps a "General" clause's boilerplate children apart.
    return tuple(by_id[p.id] for p in doc.provisions)


def classify_document(doc: Document, *, taxonomy: Taxonomy | None = None,
                      neighbours: NeighbourClassifier | None = None,
                      terms: TermReplacer | None = None) -> dict[str, str | None]:
    """``{provision id: clause type id or None}`` for *doc* (see :func:`classify_provisions`)."""
    return {t.provision: t.clause_type
            for t in classify_provisions(doc, taxonomy=taxonomy, neighbours=neighbours, terms=terms)}


def classifier_text(p: Provision, *, terms: TermReplacer | None = None) -> str:
    """The normalised token string the neighbour classifier compares for provision *p*."""
    return _classifier_text(p.text, p.heading, terms)

