"""Term mapping: which of the draft's defined terms is which of the precedent's.

The draft may call "Client" what the precedent calls "Customer".  A mapping draft term ->
precedent term is proposed from three kinds of evidence, each recorded in
:attr:`TermMapping.evidence`:

``definition``
    The two definitions say the same thing (rapidfuzz Indel similarity of their word
    sequences, after both documents' term uses are reduced to the term names).
``substitution``
    In provisions the aligner paired, the same slot holds the precedent term in the
    precedent and the draft term in the draft; counted over the whole document.
``embedding``
    A vocabulary model of the firm's precedent set (:class:`VocabularyModel`) finds the
    two names close.  Optional: the mapper works without it.

The evidences are combined as independent signals (noisy-or, see :func:`_confidence`), and
the mapping is made one-to-one by a maximum-weight assignment
(``scipy.optimize.linear_sum_assignment``) over the candidate pairs.  User overrides
confirm, reject or add mappings (:class:`TermOverride`).

Traps handled:

* the parties' own labels: a party label maps only onto a party label of the same side of
  the deal (:func:`core.review.docinfo.party_role`) and never on a definition alone, since
  the parties' definitions all read alike ("a company incorporated in ...");
* plural and possessive uses ("Clients'", "Client's") are uses of the singular term;
* a term defined in one document and used undefined in the other is not a rename: the name
  already exists on the other side (:data:`FOREIGN_USE_RATIO`);
* similar names are not evidence: "Services" and "Additional Services" are different terms
  unless their definitions or their slots say otherwise, and longer names are matched
  first, so a use of "Additional Services" is not a use of "Services".

Cost: O(T_d × T_p) rapidfuzz comparisons of definitions for T terms, plus one word diff of
each aligned pair that uses an unmatched term on both sides.
"""

from __future__ import annotations

import math
from collections import Counter
from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass
from typing import Literal, Protocol, runtime_checkable

import numpy as np
from rapidfuzz.distance import Indel
from scipy.optimize import linear_sum_assignment

from ..errors import CounterdraftError
from ..model import TermMapping
from .docinfo import DocInfo
from .tokens import (
    KIND_TERM,
    Special,
    TermMatcher,
    TokenSeq,
    find_term_uses,
    term_matcher,
    tokenize,
    word_keys,
)
from .worddiff import token_ops

__all__ = [
    "DEFINITION_MIN",
    "EVIDENCE_WEIGHTS",
    "FOREIGN_USE_MIN",
    "FOREIGN_USE_RATIO",
    "MAP_MIN",
    "TermMap",
    "TermOverride",
    "VocabularyModel",
    "count_substitutions",
    "map_terms",
    "term_key",
]

#: Definition similarity (0..1, rapidfuzz Indel normalised similarity) below which two
#: definitions are no evidence at all.  Unrelated definitions of a contract share their
#: frame ("means any ... of the Supplier") and score about 0.4-0.6; the same definition
#: reworded scores above 0.8 (measured on the demo agreements and the licence texts; the
#: sweep above gives the same term maps for 0.5-0.9).
DEFINITION_MIN = 0.7
#: Embedding similarity below which the vocabulary model is no evidence.  Word2Vec cosine
#: similarities of unrelated words are mostly below 0.5 (gensim's word-similarity tutorial
#: figures; from memory).
EMBEDDING_MIN = 0.5
#: How far one kind of evidence can carry a mapping on its own (noisy-or weights): an
#: identical definition gives 0.9, substitution in many slots 0.95, an embedding 0.6 (a
#: vocabulary model guesses; the documents' own wording shows).  Judgement values (from
#: memory), ordered by how directly each kind shows a rename.
EVIDENCE_WEIGHTS: Mapping[str, float] = {"definition": 0.9, "substitution": 0.95, "embedding": 0.6}
#: Substitutions needed for the substitution evidence to reach 1 - 1/e of its weight.  One
#: slot is weak evidence (it could be a single deliberate change); three are strong.  From
#: memory; ``benchmarks/sweep_review_constants.py`` (demo pair, three perturbed licences, one
#: licence against another) gives the same term maps for 0.5-4.
SUBSTITUTION_SCALE = 2.0
#: Confidence needed to accept a mapping: one clear kind of evidence, or two weak ones.  From
#: memory; the same sweep gives the same term maps for 0.3-0.9 (the renames there carry
#: strong evidence; the term-map tests pin the weak cases).
MAP_MIN = 0.5
#: A name of one document that the other document itself uses this often (relative to its
#: own document, and at least FOREIGN_USE_MIN times) exists on both sides and is not renamed:
#: half as often as its own document, and twice, so that one stray mention does not count.
#: From memory; the same sweep gives the same term maps for ratios 0.1-1 and minimums 1-5.
FOREIGN_USE_RATIO = 0.5
FOREIGN_USE_MIN = 2
#: Substitution slots: at most this many ordinary words beside the term in a replaced run
#: ("the Vendor's" -> "the Supplier's"); more, and the run is a rewrite, not a rename.  From
#: memory; the same sweep gives the same term maps for 0-5.
_SLOT_MAX_OTHER_WORDS = 2


@runtime_checkable
class VocabularyModel(Protocol):
    """A model of the precedent set's vocabulary, e.g. gensim Word2Vec (precedent-set
    engineer).  ``similarity`` is about 0..1, or None when a word is unknown."""

    def similarity(self, a: str, b: str) -> float | None: ...


@dataclass(frozen=True, slots=True)
class TermOverride:
    """A reviewer's decision: ``confirm`` or ``add`` the mapping draft -> precedent, or
    ``reject`` it (``precedent=None`` rejects every mapping of the draft term)."""

    draft: str
    precedent: str | None = None
    action: Literal["confirm", "reject", "add"] = "confirm"

    def __post_init__(self) -> None:
        if self.action not in ("confirm", "reject", "add"):
            raise CounterdraftError(f"term override: unknown action {self.action!r}")
        if not self.draft.strip():
            raise CounterdraftError("term override: empty draft term")
        if self.action != "reject" and not (self.precedent or "").strip():
            raise CounterdraftError(f"term override: {self.action} needs a precedent term")


@dataclass(frozen=True, slots=True)
class TermMap:
    mappings: tuple[TermMapping, ...]
    #: draft term name -> the precedent name it stands for (mapped terms only)
    to_precedent: Mapping[str, str]
    #: every name whose uses are tokenised as terms (both documents' terms + overrides)
    names: tuple[str, ...]

    def key(self, name: str) -> str:
        return self.to_precedent.get(name, name)


def term_key(name: str, form: str) -> str:
    """Comparison key of a use of term *name* in form *form*."""
    return "\x00T" + name + "\x00" + form


def _term_name_of_key(key: str) -> str:
    return key[2:].split("\x00", 1)[0]


def tokenize_with_terms(text: str, *, matcher: TermMatcher | None, to_key: Mapping[str, str],
                        extra: Sequence[Special] = ()) -> TokenSeq:
    """Tokens of *text* with each term use one token keyed by ``to_key`` (default: own name)."""
    specials = [Special(u.start, u.end, term_key(to_key.get(u.term, u.term), u.form), KIND_TERM)
                for u in find_term_uses(text, matcher)]
    if extra:
        specials = sorted([*specials, *extra], key=lambda s: (s.start, -s.end))
        kept: list[Special] = []
        end = -1
        for s in specials:
            if s.start >= end:
                kept.append(s)
                end = s.end
        specials = kept
    return tokenize(text, specials)


def _count_uses(info: DocInfo, names: Iterable[str], *, among: Iterable[str] = ()) -> Counter[str]:
    """Uses of *names* in *info*'s texts and headings, matching them together with the
    longer names of *among* (so "Order" inside "Purchase Order" is no use of "Order")."""
    wanted = set(names)
    matcher = term_matcher([*wanted, *among])
    c: Counter[str] = Counter()
    if matcher is None or not wanted:
        return c
    for p in info.provisions:
        for text in (p.text, p.heading or ""):
            for u in find_term_uses(text, matcher):
                if u.term in wanted:
                    c[u.term] += 1
    return c


def count_substitutions(pairs: Iterable[tuple[int, int]], *,
                        draft_seq: Callable[[int], TokenSeq],
                        precedent_seq: Callable[[int], TokenSeq],
                        draft_names: Sequence[str], precedent_names: Sequence[str]
                        ) -> Counter[tuple[str, str]]:
    """How often an aligned slot holds draft term A where the precedent holds term B, for A
    in *draft_names* and B in *precedent_names*, over the aligned provision *pairs*
    (draft position, precedent position).  *draft_seq* / *precedent_seq* give a provision's
    tokens with every term use keyed by its own name (:func:`term_key`)."""
    counts: Counter[tuple[str, str]] = Counter()
    if not draft_names or not precedent_names:
        return counts
    dset, pset = set(draft_names), set(precedent_names)
    for di, pi in pairs:
        b = draft_seq(di)
        a = precedent_seq(pi)
        if a.keys == b.keys:
            continue
        if not any(a.kinds[i] == KIND_TERM and _term_name_of_key(a.keys[i]) in pset for i in range(len(a))):
            continue
        if not any(b.kinds[j] == KIND_TERM and _term_name_of_key(b.keys[j]) in dset for j in range(len(b))):
            continue
        for op in token_ops(a, b, semantic=False):
            if op.tag != "replace":
                continue
            aterms = [a.keys[i] for i in range(op.i1, op.i2) if a.kinds[i] == KIND_TERM]
            bterms = [b.keys[j] for j in range(op.j1, op.j2) if b.kinds[j] == KIND_TERM]
            if not aterms or len(aterms) != len(bterms) or len(aterms) > 3:
                continue
            aother = sum(1 for i in range(op.i1, op.i2) if a.kinds[i] in "wn")
            bother = sum(1 for j in range(op.j1, op.j2) if b.kinds[j] in "wn")
            if aother > _SLOT_MAX_OTHER_WORDS or bother > _SLOT_MAX_OTHER_WORDS:
                continue
            for ka, kb in zip(aterms, bterms):
                pn, dn = _term_name_of_key(ka), _term_name_of_key(kb)
                if dn in dset and pn in pset:
                    counts[(dn, pn)] += 1
    return counts


def _confidence(scores: Mapping[str, float]) -> float:
    """Noisy-or of the evidence strengths: 1 - prod(1 - weight_k * strength_k)."""
    miss = 1.0
    for kind, s in scores.items():
        miss *= 1.0 - EVIDENCE_WEIGHTS.get(kind, 0.0) * max(0.0, min(1.0, s))
    return 1.0 - miss


def _definition_words(text: str, *, matcher: TermMatcher | None) -> list[str]:
    return word_keys(tokenize_with_terms(text, matcher=matcher, to_key={}))


def map_terms(draft: DocInfo, precedent: DocInfo, *, overrides: Sequence[TermOverride] = (),
              vocabulary: VocabularyModel | None = None,
              substitutions: Mapping[tuple[str, str], int] | None = None,
              uses: tuple[Mapping[str, int], Mapping[str, int]] | None = None) -> TermMap:
    """The one-to-one term map draft -> precedent (names that differ only).

    *uses* gives, for the draft and for the precedent, the uses of every name of both
    documents and of the overrides, all matched together (counted here when None)."""
    dnames = list(draft.term_names)
    pnames = list(precedent.term_names)
    pset_all = set(pnames)
    dset_all = set(dnames)
    d_only = [n for n in dnames if n not in pset_all]
    p_only = [n for n in pnames if n not in dset_all]

    forced: dict[str, tuple[str, str]] = {}  # draft -> (precedent, action)
    rejected: set[tuple[str, str | None]] = set()
    for ov in overrides:
        if ov.action == "reject":
            rejected.add((ov.draft, ov.precedent))
        elif ov.precedent is not None and ov.precedent != ov.draft:
            forced[ov.draft] = (ov.precedent, ov.action)
    forced_precedents = {p for p, _ in forced.values()}

    # Names one document defines and the other uses on its own are not renames.
    every = [*dnames, *pnames, *forced, *forced_precedents]
    if uses is None:
        uses = (_count_uses(draft, every, among=every), _count_uses(precedent, every, among=every))
    d_uses, p_uses = uses
    d_in_p = {n: p_uses.get(n, 0) for n in d_only}
    p_in_d = {n: d_uses.get(n, 0) for n in p_only}
    d_own = {n: d_uses.get(n, 0) for n in d_only}
    p_own = {n: p_uses.get(n, 0) for n in p_only}

    def foreign(n: int, own: int) -> bool:
        return n >= max(FOREIGN_USE_MIN, FOREIGN_USE_RATIO * own)

    rows = [n for n in d_only if n not in forced and not foreign(d_in_p[n], d_own[n])]
    cols = [n for n in p_only if n not in forced_precedents and not foreign(p_in_d[n], p_own[n])]

    subs = substitutions or {}
    sub_total: Counter[str] = Counter()
    for (dn, _pn), c in subs.items():
        sub_total[dn] += c

    names_all = tuple(dict.fromkeys([*dnames, *pnames]))
    m_all = term_matcher(names_all)
    dwords = {n: _definition_words(draft.definitions.get(n, ""), matcher=m_all) for n in rows}
    pwords = {n: _definition_words(precedent.definitions.get(n, ""), matcher=m_all) for n in cols}

    evidence: dict[tuple[str, str], dict[str, float]] = {}
    weight = np.zeros((len(rows), len(cols)))
    for r, dn in enumerate(rows):
        dparty = dn in draft.party_labels
        for c, pn in enumerate(cols):
            if (dn, pn) in rejected or (dn, None) in rejected:
                continue
            pparty = pn in precedent.party_labels
            if dparty != pparty:
                continue  # a party label maps only onto a party label
            if dparty:
                rd, rp = draft.party_roles.get(dn), precedent.party_roles.get(pn)
                if rd is not None and rp is not None and rd != rp:
                    continue  # never onto the other side's label
            scores: dict[str, float] = {}
            if not dparty and dwords[dn] and pwords[pn]:
                sim = Indel.normalized_similarity(dwords[dn], pwords[pn], score_cutoff=DEFINITION_MIN)
                if sim >= DEFINITION_MIN:
                    scores["definition"] = sim
            n_sub = subs.get((dn, pn), 0)
            if n_sub:
                share = n_sub / sub_total[dn]
                scores["substitution"] = share * (1.0 - math.exp(-n_sub / SUBSTITUTION_SCALE))
            if vocabulary is not None:
                emb = vocabulary.similarity(dn, pn)
                if emb is not None and emb >= EMBEDDING_MIN:
                    scores["embedding"] = float(emb)
            if scores:
                conf = _confidence(scores)
                evidence[(dn, pn)] = scores
                weight[r, c] = conf

    chosen: dict[str, tuple[str, float, tuple[str, ...]]] = {}
    if rows and cols and weight.any():
        ri, ci = linear_sum_assignment(weight, maximize=True)
        for r, c in zip(ri, ci):
            if weight[r, c] >= MAP_MIN:
                dn, pn = rows[r], cols[c]
                kinds = tuple(k for k in ("definition", "substitution", "embedding")
                              if k in evidence[(dn, pn)])
                chosen[dn] = (pn, float(weight[r, c]), kinds)
    for dn, (pn, _action) in forced.items():
        prior = evidence.get((dn, pn), {})
        kinds = tuple(k for k in ("definition", "substitution", "embedding") if k in prior)
        chosen[dn] = (pn, 1.0, kinds + ("user",))

    all_names = tuple(dict.fromkeys([*dnames, *pnames, *forced.keys(), *forced_precedents]))
    extra_uses = d_uses
    order = {n: i for i, n in enumerate(dnames)}
    mappings = []
    for dn in sorted(chosen, key=lambda n: (order.get(n, len(order)), n)):
        pn, conf, kinds = chosen[dn]
        occ = draft.term_uses.get(dn, extra_uses.get(dn, 0))
        mappings.append(TermMapping(dn, pn, round(conf, 2), kinds, occ))
    return TermMap(tuple(mappings), {m.draft: m.precedent for m in mappings}, all_names)
