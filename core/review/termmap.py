"""Term mapping: which of the draft's names is which of the precedent's.

The draft may call "Client" what the precedent calls "Customer".  A mapping draft name ->
precedent name is proposed from three kinds of evidence, each recorded in
:attr:`TermMapping.evidence`:

``definition``
    The two definitions say the same thing (rapidfuzz Indel similarity of their word
    sequences, after both documents' term uses are reduced to the term names), or give the
    term a common name (the draft's "Licensee" (or "You") is the precedent's "You").
``substitution``
    In provisions the aligner paired, the same slot holds the precedent's name in the
    precedent and the draft's name in the draft; counted over the whole document.  This
    also finds renames from the text itself, when neither name is defined
    (:func:`scan_slots`): a name (a capitalised name, or an ordinary phrase of two to four
    words without function words) that the draft replaces by another of the same shape in
    at least :data:`RENAME_MIN_SLOTS` aligned places and in at least
    :data:`RENAME_MIN_SHARE` of the places the precedent uses it; the strength is that
    share (consistency) times the same count factor as for defined names.
``embedding``
    A vocabulary model of the firm's precedent set (:class:`VocabularyModel`) finds the
    two names close.  Optional: the mapper works without it.

The evidences are combined as independent signals (noisy-or, see :func:`_confidence`), and
the mapping is made one-to-one by a maximum-weight assignment
(:func:`.assignment.max_weight_assignment`, the optimum scipy's ``linear_sum_assignment``
finds) over the candidate pairs.  User overrides
confirm, reject or add mappings (:class:`TermOverride`).

Traps handled:

* the parties' own labels: a party label maps only onto a party label of the same side of
  the deal (:func:`core.docinfo.party_role`) and never on a definition alone, since
  the parties' definitions all read alike ("a company incorporated in ...");
* plural and possessive uses ("Clients'", "Client's") are uses of the singular term, and a
  use of an alias ("Your" of "You") is a use of its term: a term is all its names;
* two names whose words say opposite sides of the deal never map ("Licensor" onto
  "Licensee", found from the text or defined);
* a term defined in one document and used undefined in the other is not a rename: the name
  already exists on the other side (:data:`FOREIGN_USE_RATIO`); a few such uses of the
  precedent's name left in a draft that otherwise uses its own are *stale* uses, counted on
  the mapping (:attr:`TermMapping.stale`) so that a drafting check can report them;
* similar names are not evidence: "Services" and "Additional Services" are different terms
  unless their definitions or their slots say otherwise, and longer names are matched
  first, so a use of "Additional Services" is not a use of "Services".

Cost: O(T_d × T_p) rapidfuzz comparisons of definitions for T terms, plus one exact word
diff of each aligned pair that differs and one pass of the replaced names over the aligned
precedent texts; the assignment is cubic in the number of candidate names (tens).
"""

from __future__ import annotations

import math
from collections import Counter
from collections.abc import Callable, Collection, Iterable, Mapping, Sequence
from dataclasses import dataclass
from typing import Protocol, runtime_checkable

from rapidfuzz.distance import Indel

from ..docinfo import DocInfo, party_role
from ..model import Evidence, TermMapping, TermOverride  # TermOverride: re-exported (it lived here)
from ..parallel import in_halves
from ..terms import term_forms
from .assignment import max_weight_assignment
from .tokens import (
    KIND_PUNCT,
    KIND_SPACE,
    KIND_TERM,
    Special,
    TermMatcher,
    TokenSeq,
    find_term_uses,
    term_matcher,
    tokenize,
    word_keys,
)
from .worddiff import TokenOp, token_ops

__all__ = [
    "DEFINITION_MIN",
    "EVIDENCE_WEIGHTS",
    "FOREIGN_USE_MIN",
    "FOREIGN_USE_RATIO",
    "MAP_MIN",
    "MAX_NAME_WORDS",
    "RENAME_MIN_SHARE",
    "RENAME_MIN_SLOTS",
    "Rename",
    "SlotScan",
    "TermMap",
    "TermOverride",
    "VocabularyModel",
    "map_terms",
    "scan_slots",
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
#: A name found from the text is a rename when the draft replaces it in at least this share
#: of the aligned places where the precedent uses it: three in four, so that a drafter's
#: few leftovers (stale uses, counted on the mapping) do not hide a rename, while a word
#: changed in one clause and kept in others is an edit.  Judgement value (common practice,
#: no source).  On the 75 licence version pairs of ``benchmarks/measure_false_deviations.py``
#: every value from 0.5 to 1 gives the same term maps (MAP_MIN already refuses weak
#: evidence at low counts: two slots at a share of 0.5 give 0.30); the share decides when a
#: name is replaced in many places and kept in many (ten of sixteen: 0.56 without it).
RENAME_MIN_SHARE = 0.75
#: ... and in at least this many aligned places: one replacement is an edit, not a rename
#: (the same count as SUBSTITUTION_SCALE, where the evidence reaches 1 - 1/e).  The version
#: pairs give the same term maps for 1-4 (one slot alone stays under MAP_MIN).
RENAME_MIN_SLOTS = 2
#: Longest name found from the text (words): the longest names of the licence texts have
#: three or four ("Copyright and Similar Rights"); a longer replaced run is a rewrite.  On
#: the version pairs, 1 leaves 22 false substantive deviations, 2-6 leave 13.
MAX_NAME_WORDS = 4


@runtime_checkable
class VocabularyModel(Protocol):
    """A model of the precedent set's vocabulary, e.g. gensim Word2Vec (precedent-set
    engineer).  ``similarity`` is about 0..1, or None when a word is unknown."""

    def similarity(self, a: str, b: str) -> float | None: ...


@dataclass(frozen=True, slots=True)
class TermMap:
    mappings: tuple[TermMapping, ...]
    #: draft term name -> the precedent name it stands for (mapped terms only)
    to_precedent: Mapping[str, str]
    #: every name whose uses are tokenised as terms: both documents' terms and aliases, the
    #: overrides' names and the names of the renames found from the text
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
    longer names of *among* (so "Order" inside "Purchase Order" is no use of "Order"), the
    document's aliases as their terms and capitalised names in capitals too (as the review
    tokenises them)."""
    wanted = set(names)
    matcher = term_matcher([*wanted, *among], aliases=info.alias_of, capitals=True)
    c: Counter[str] = Counter()
    if matcher is None or not wanted:
        return c
    for p in info.provisions:
        for text in (p.text, p.heading or ""):
            for u in find_term_uses(text, matcher):
                if u.term in wanted:
                    c[u.term] += 1
    return c


@dataclass(frozen=True, slots=True)
class Rename:
    """A name of the precedent that the aligned provisions of the draft write otherwise.

    ``slots``: aligned places where the draft writes ``draft`` where the precedent writes
    ``precedent``; ``aligned``: uses of ``precedent`` in the aligned precedent provisions
    (so ``share`` is how consistently it was replaced); ``mid``: slots away from the start
    of a sentence (a capital there is no sign of a name)."""

    draft: str
    precedent: str
    slots: int
    aligned: int
    mid: int

    @property
    def share(self) -> float:
        return self.slots / max(self.aligned, self.slots, 1)


@dataclass(frozen=True, slots=True)
class SlotScan:
    """What the aligned provisions show (:func:`scan_slots`): defined names that take each
    other's slots (``terms``: (draft name, precedent name) -> slots) and the consistent
    replacements of any name, defined or not (``renames``)."""

    terms: Counter[tuple[str, str]]
    renames: tuple[Rename, ...]


#: Words that never belong to a name found from the text: articles, pronouns, prepositions,
#: conjunctions, auxiliaries and modal verbs, negations and quantifiers ("shall" -> "may"
#: or "all" -> "any" is a change of meaning, never a rename; common practice, no source).
_FUNCTION_WORDS = frozenset(
    "a an the this that these those such its it their them they he she his her we us our you "
    "your i me my of in on at to by for from with without within into onto upon under over "
    "between among about against through during before after above below and or nor but if "
    "unless whether than then so as not no none never only also any all each every either "
    "neither both some other another same shall will may must can could would should might "
    "is are was were be been being has have had do does did which who whom whose what when "
    "where while here there hereby herein hereof hereunder thereof therein".split())
#: Words that may stand inside a capitalised name ("Statement of Work").
_NAME_JOINERS = frozenset("of and for the in on to".split())
_POSSESSIVE_END = ("'s", "\u2019s", "'", "\u2019")


def _without_possessive(word: str) -> str:
    """*word* without its possessive ending ("Licensor's" -> "Licensor")."""
    for end in _POSSESSIVE_END:
        if word.endswith(end) and len(word) > len(end):
            return word[: -len(end)]
    return word


def _name_words(words: Sequence[str], *, lone_word: bool = False) -> str | None:
    """*words* (a replaced run of one side) as a name, or None when they cannot be one: a
    capitalised name of up to :data:`MAX_NAME_WORDS` words ("Licensor", "Statement of
    Work"), or an ordinary phrase of two to four words without function words ("source
    code"), or with *lone_word* a single ordinary word (where the other side writes a
    defined term: "distribute" -> the defined "convey"); a possessive ending on the last
    word is dropped."""
    if not words or len(words) > MAX_NAME_WORDS:
        return None
    ws = [*words[:-1], _without_possessive(words[-1])]
    if any(not w.replace("-", "").isalpha() or len(w) < 2 for w in ws):
        return None  # figures, apostrophes inside, punctuation, a variant letter ("-P", "-W")
    caps = [w[:1].isupper() for w in ws]
    if caps[0] and caps[-1] and all(c or w in _NAME_JOINERS for c, w in zip(caps, ws)):
        return " ".join(ws) if ws[0].lower() not in _FUNCTION_WORDS else None
    if (len(ws) >= 2 or lone_word) and not any(caps) and not any(w in _FUNCTION_WORDS for w in ws):
        return " ".join(ws)
    return None


def _words_of(seq: TokenSeq, lo: int, hi: int) -> list[int] | None:
    """The word-like tokens lo..hi-1 of *seq*, when nothing but white space parts them."""
    idx = [i for i in range(lo, hi) if seq.kinds[i] not in (KIND_SPACE, KIND_PUNCT)]
    if not idx or any(seq.kinds[i] == KIND_PUNCT for i in range(idx[0], idx[-1])):
        return None
    return idx


def _side_name(seq: TokenSeq, idx: Sequence[int], *, lone_word: bool) -> tuple[str, bool] | None:
    """The name the tokens *idx* of *seq* write (a defined name or words), and whether it
    is capitalised; None when they are no name."""
    if len(idx) == 1 and seq.kinds[idx[0]] == KIND_TERM:
        term = _term_name_of_key(seq.keys[idx[0]])
        return term, term[:1].isupper()
    if any(seq.kinds[i] not in ("w", KIND_TERM) for i in idx):
        return None
    # a defined name inside a longer one ("Apache License") counts as the words it writes
    words = [w for i in idx for w in seq.token(i).split()]
    name = _name_words(words, lone_word=lone_word)
    return (name, name[:1].isupper()) if name is not None else None


def _sentence_start(seq: TokenSeq, i: int) -> bool:
    j = i - 1
    while j >= 0 and seq.kinds[j] == KIND_SPACE:
        if "\n" in seq.token(j):
            return True
        j -= 1
    return j < 0 or seq.token(j) in (".", ";", ":", "(", '"', "\u201c")


def _term_slots(a: TokenSeq, b: TokenSeq, op: TokenOp, dset: set[str], pset: set[str],
                counts: Counter[tuple[str, str]]) -> None:
    """Defined names of the draft in the slots of the precedent's (same number of term uses
    on both sides, few other words): "the Vendor's" -> "the Supplier's"."""
    aterms = [a.keys[i] for i in range(op.i1, op.i2) if a.kinds[i] == KIND_TERM]
    bterms = [b.keys[j] for j in range(op.j1, op.j2) if b.kinds[j] == KIND_TERM]
    if not aterms or len(aterms) != len(bterms) or len(aterms) > 3:
        return
    aother = sum(1 for i in range(op.i1, op.i2) if a.kinds[i] in "wn")
    bother = sum(1 for j in range(op.j1, op.j2) if b.kinds[j] in "wn")
    if aother > _SLOT_MAX_OTHER_WORDS or bother > _SLOT_MAX_OTHER_WORDS:
        return
    for ka, kb in zip(aterms, bterms):
        pn, dn = _term_name_of_key(ka), _term_name_of_key(kb)
        if dn in dset and pn in pset:
            counts[(dn, pn)] += 1


def _name_slot(a: TokenSeq, b: TokenSeq, op: TokenOp) -> tuple[str, str, bool] | None:
    """(draft name, precedent name, away from a sentence start) when a replaced run is one
    name replaced by another of the same shape (both capitalised or both lower case)."""
    ia, ib = _words_of(a, op.i1, op.i2), _words_of(b, op.j1, op.j2)
    if ia is None or ib is None:
        return None
    a_term = len(ia) == 1 and a.kinds[ia[0]] == KIND_TERM
    b_term = len(ib) == 1 and b.kinds[ib[0]] == KIND_TERM
    x = _side_name(a, ia, lone_word=b_term)
    y = _side_name(b, ib, lone_word=a_term)
    if x is None or y is None or x[1] != y[1] or x[0].casefold() == y[0].casefold():
        return None
    return y[0], x[0], not _sentence_start(a, ia[0])


def _replaced_runs(a: TokenSeq, ops: Sequence[TokenOp]) -> list[TokenOp]:
    """The changed runs of a word diff of *a* (*ops*) that replace something: the changes
    separated by white space alone are one run, so "Digital Creations" -> "Zope
    Corporation" (two replaced words around an unchanged space) and "Apache License" ->
    "Kaka" (a word replaced, a word deleted) are single runs."""
    runs: list[TokenOp] = []
    cur: TokenOp | None = None
    for op in ops:
        if op.tag != "equal":
            cur = op if cur is None else TokenOp("replace", cur.i1, op.i2, cur.j1, op.j2)
        elif cur is not None and all(a.kinds[i] == KIND_SPACE for i in range(op.i1, op.i2)):
            continue  # a space between two changes: the run goes on
        else:
            if cur is not None and cur.i1 < cur.i2 and cur.j1 < cur.j2:
                runs.append(cur)
            cur = None
    if cur is not None and cur.i1 < cur.i2 and cur.j1 < cur.j2:
        runs.append(cur)
    return runs


def _singular(name: str) -> str | None:
    """The singular whose plural form (:func:`core.terms.term_forms`) *name* is, if any."""
    if not name.endswith(("s", "S")):
        return None
    for cand in (name[:-1], name[:-2], name[:-3] + ("Y" if name.isupper() else "y")):
        if cand and len(term_forms(cand)) > 1 and term_forms(cand)[1] == name:
            return cand
    return None


def _fold_variants(slots: Counter[tuple[str, str]], mid: Counter[tuple[str, str]], *,
                   known: Collection[str]) -> tuple[Counter[tuple[str, str]], Counter[tuple[str, str]]]:
    """Count a rename written in the plural ("the Licensors" -> "the Grantors") or in
    capitals ("LICENSOR" -> "GRANTOR", in a disclaimer) with the same rename as the
    documents otherwise write it: the singular, in the documents' own letter case.  The
    documents' own names (*known*: "Goods", "Products") are never folded."""
    def fold(pair: tuple[str, str]) -> tuple[str, str]:
        y, x = pair
        if y in known or x in known:
            return pair
        ys, xs = _singular(y), _singular(x)
        return (ys, xs) if ys is not None and xs is not None else pair

    rep: dict[tuple[str, str], tuple[str, str]] = {}
    for y, x in sorted({fold(k) for k in slots}, key=lambda k: (k[0].isupper() or k[1].isupper(), k)):
        rep.setdefault((y.casefold(), x.casefold()), (y, x))
    out: Counter[tuple[str, str]] = Counter()
    out_mid: Counter[tuple[str, str]] = Counter()
    for pair, n in slots.items():
        y, x = fold(pair)
        key = rep[(y.casefold(), x.casefold())]
        out[key] += n
        out_mid[key] += mid[pair]
    return out, out_mid


def scan_slots(pairs: Iterable[tuple[int, int]], *, draft_seq: Callable[[int], TokenSeq],
               precedent_seq: Callable[[int], TokenSeq], draft_names: Sequence[str],
               precedent_names: Sequence[str], known: Sequence[str] = ()) -> SlotScan:
    """What the aligned provision *pairs* (draft position, precedent position) show.

    *draft_seq* / *precedent_seq* give a provision's tokens with every term use keyed by
    its own name (:func:`term_key`).  ``terms`` counts the slots where draft name A (of
    *draft_names*) stands where the precedent has B (of *precedent_names*); ``renames``
    lists every name (defined or not) replaced by another in at least one slot, with the
    uses of the precedent's name in the aligned precedent provisions, matched together
    with *known* (the documents' names) so that a longer name is not a use of a shorter.

    Cost: one exact word diff per aligned pair that differs, then one pass of the
    precedent names over the aligned precedent texts."""
    dset, pset = set(draft_names), set(precedent_names)
    pairs = list(pairs)
    seen_p = [pi for _di, pi in pairs]
    differing = [(b, a) for b, a in ((draft_seq(di), precedent_seq(pi)) for di, pi in pairs) if a.keys != b.keys]
    halves = in_halves(differing, [len(a.text) + len(b.text) for b, a in differing],
                       lambda part: _slot_counts(part, dset, pset), min_work=PARALLEL_SCAN_MIN_CHARS)
    terms, slots, mid = halves[0]
    for later in halves[1:]:
        for mine, theirs in zip((terms, slots, mid), later, strict=True):
            for key, n in theirs.items():  # in order: keys first met in the second half come last
                mine[key] += n
    if not slots:
        return SlotScan(terms, ())
    slots, mid = _fold_variants(slots, mid, known=set(known))
    wanted = {x for _y, x in slots}
    matcher = term_matcher([*wanted, *known], capitals=True)
    aligned: Counter[str] = Counter()
    for pi in dict.fromkeys(seen_p):
        for u in find_term_uses(precedent_seq(pi).text, matcher):
            if u.term in wanted:
                aligned[u.term] += 1
    renames = tuple(Rename(y, x, n, aligned[x], mid[(y, x)]) for (y, x), n in slots.items())
    return SlotScan(terms, renames)


#: Characters of the aligned pairs whose words differ (both sides) from which the term map's
#: scan diffs the second half of them in a forked child (:func:`core.parallel.in_halves`), as
#: the review's word diffs do (``core.review.PARALLEL_BUILD_MIN_CHARS``, the same measure):
#: two unrelated 50-page agreements hold about 260,000 and their scan takes 0.1 s.
PARALLEL_SCAN_MIN_CHARS = 150_000

_Counts = tuple[Counter[tuple[str, str]], Counter[tuple[str, str]], Counter[tuple[str, str]]]


def _slot_counts(differing: Sequence[tuple[TokenSeq, TokenSeq]], dset: set[str], pset: set[str]) -> _Counts:
    """(terms, slots, mid) of :func:`scan_slots` over the (draft, precedent) token sequences
    of aligned pairs whose keys differ."""
    terms: Counter[tuple[str, str]] = Counter()
    slots: Counter[tuple[str, str]] = Counter()
    mid: Counter[tuple[str, str]] = Counter()
    for b, a in differing:
        ops = token_ops(a, b, semantic=False)
        if dset and pset:
            for op in ops:
                if op.tag == "replace":
                    _term_slots(a, b, op, dset, pset, terms)
        for op in _replaced_runs(a, ops):
            got = _name_slot(a, b, op)
            if got is not None:
                slots[got[:2]] += 1
                mid[got[:2]] += got[2]
    return terms, slots, mid


def _confidence(scores: Mapping[str, float]) -> float:
    """Noisy-or of the evidence strengths: 1 - prod(1 - weight_k * strength_k)."""
    miss = 1.0
    for kind, s in scores.items():
        miss *= 1.0 - EVIDENCE_WEIGHTS.get(kind, 0.0) * max(0.0, min(1.0, s))
    return 1.0 - miss


def _definition_words(text: str, *, matcher: TermMatcher | None) -> list[str]:
    return word_keys(tokenize_with_terms(text, matcher=matcher, to_key={}))


@dataclass(slots=True)
class _Names:
    """The candidate names of one side: rows (draft) or columns (precedent)."""

    own: dict[str, int]  # name -> uses in its own document
    other: dict[str, int]  # name -> uses in the other document
    defined: set[str]


def _forced(overrides: Sequence[TermOverride]
            ) -> tuple[dict[str, tuple[str, str]], set[tuple[str, str | None]]]:
    forced: dict[str, tuple[str, str]] = {}  # draft -> (precedent, action)
    rejected: set[tuple[str, str | None]] = set()
    for ov in overrides:
        if ov.action == "reject":
            rejected.add((ov.draft, ov.precedent))
        elif ov.precedent is not None and ov.precedent != ov.draft:
            forced[ov.draft] = (ov.precedent, ov.action)
    return forced, rejected


def _usable_renames(renames: Sequence[Rename], draft: DocInfo, precedent: DocInfo
                    ) -> dict[tuple[str, str], Rename]:
    """The renames consistent enough to be evidence (:data:`RENAME_MIN_SHARE`,
    :data:`RENAME_MIN_SLOTS`; a capitalised name must be met once away from a sentence
    start), between names that are not aliases (an alias follows its term)."""
    out: dict[tuple[str, str], Rename] = {}
    for r in renames:
        if r.slots < RENAME_MIN_SLOTS or r.share < RENAME_MIN_SHARE:
            continue
        if r.precedent[:1].isupper() and r.mid < 1:
            continue
        if r.draft in draft.alias_of or r.precedent in precedent.alias_of:
            continue
        out[(r.draft, r.precedent)] = r
    return out


def _foreign(n: int, own: int) -> bool:
    """Is a name used *n* times by the other document (against *own* in its own) a name
    of both documents rather than a renamed one?"""
    return n >= max(FOREIGN_USE_MIN, FOREIGN_USE_RATIO * own)


def _party_compatible(dn: str, pn: str, draft: DocInfo, precedent: DocInfo) -> bool:
    """Party labels map side to side: a label onto a label of the same side, or onto a
    name found from the text whose words do not say the other side; two names whose words
    say opposite sides never map ("Licensor" onto "Licensee")."""
    dparty, pparty = dn in draft.party_labels, pn in precedent.party_labels
    rd = draft.party_roles.get(dn) if dparty else party_role(dn)
    rp = precedent.party_roles.get(pn) if pparty else party_role(pn)
    if rd is not None and rp is not None and rd != rp:
        return False
    if dparty != pparty:
        other_defined = pn in precedent.definitions if dparty else dn in draft.definitions
        return not other_defined  # a label never maps onto an ordinary defined term
    return True


def _shared_name(dn: str, pn: str, draft: DocInfo, precedent: DocInfo) -> bool:
    """Do the two terms share a name ("Licensee" (also "You") and "You")?"""
    return bool(set(draft.names_of(dn)) & set(precedent.names_of(pn)))


class _Evidence:
    """The evidence of every candidate pair (draft name, precedent name)."""

    def __init__(self, draft: DocInfo, precedent: DocInfo, *, vocabulary: VocabularyModel | None,
                 substitutions: Mapping[tuple[str, str], int], renames: Mapping[tuple[str, str], Rename],
                 rows: Sequence[str], cols: Sequence[str]) -> None:
        self.draft, self.precedent, self.vocabulary = draft, precedent, vocabulary
        self.subs, self.renames = substitutions, renames
        self.sub_total: Counter[str] = Counter()
        for (dn, _pn), c in substitutions.items():
            self.sub_total[dn] += c
        names_all = tuple(dict.fromkeys([*draft.all_names, *precedent.all_names]))
        dm = term_matcher(names_all, aliases=draft.alias_of)
        pm = term_matcher(names_all, aliases=precedent.alias_of)
        self.dwords = {n: _definition_words(draft.definitions.get(n, ""), matcher=dm) for n in rows}
        self.pwords = {n: _definition_words(precedent.definitions.get(n, ""), matcher=pm) for n in cols}

    def scores(self, dn: str, pn: str) -> dict[str, float]:
        d, p = self.draft, self.precedent
        scores: dict[str, float] = {}
        defined = dn in d.definitions and pn in p.definitions
        if defined and _shared_name(dn, pn, d, p):
            scores["definition"] = 1.0  # the two definitions give the term a common name
        elif defined and dn not in d.party_labels and self.dwords[dn] and self.pwords[pn]:
            sim = Indel.normalized_similarity(self.dwords[dn], self.pwords[pn], score_cutoff=DEFINITION_MIN)
            if sim >= DEFINITION_MIN:
                scores["definition"] = sim
        n_sub = self.subs.get((dn, pn), 0)
        strength = 0.0
        if n_sub:
            strength = n_sub / self.sub_total[dn] * (1.0 - math.exp(-n_sub / SUBSTITUTION_SCALE))
        r = self.renames.get((dn, pn))
        if r is not None:
            strength = max(strength, r.share * (1.0 - math.exp(-r.slots / SUBSTITUTION_SCALE)))
        if strength:
            scores["substitution"] = strength
        if self.vocabulary is not None and defined:
            emb = self.vocabulary.similarity(dn, pn)
            if emb is not None and emb >= EMBEDDING_MIN:
                scores["embedding"] = float(emb)
        return scores


def _candidates(draft: DocInfo, precedent: DocInfo, uses: tuple[Mapping[str, int], Mapping[str, int]],
                renames: Mapping[tuple[str, str], Rename], forced: Mapping[str, tuple[str, str]]
                ) -> tuple[list[str], list[str]]:
    """Rows (draft names) and columns (precedent names) that may be renames: defined on
    one side only, or found from the text, and not used as often by the other document."""
    d_uses, p_uses = uses
    pset, dset = set(precedent.term_names), set(draft.term_names)
    forced_p = {pn for pn, _a in forced.values()}
    rows = [n for n in draft.term_names if n not in pset]
    cols = [n for n in precedent.term_names if n not in dset]
    rows += [dn for dn, _pn in renames if dn not in pset and dn not in precedent.alias_of]
    cols += [pn for _dn, pn in renames if pn not in dset and pn not in draft.alias_of]
    rows = [n for n in dict.fromkeys(rows)
            if n not in forced and not _foreign(p_uses.get(n, 0), d_uses.get(n, 0))]
    cols = [n for n in dict.fromkeys(cols)
            if n not in forced_p and not _foreign(d_uses.get(n, 0), p_uses.get(n, 0))]
    return rows, cols


def _proposed_names(pairs: Iterable[tuple[str, str]]) -> dict[str, list[str]]:
    """The precedent names proposed for each draft name by (draft, precedent) *pairs*, in order."""
    by_row: dict[str, list[str]] = {}
    for dn, pn in pairs:
        by_row.setdefault(dn, []).append(pn)
    return by_row


def _assign(rows: Sequence[str], cols: Sequence[str], ev: _Evidence, draft: DocInfo,
            precedent: DocInfo, rejected: set[tuple[str, str | None]],
            renames: Mapping[tuple[str, str], Rename]) -> dict[str, tuple[str, float, tuple[Evidence, ...]]]:
    """The one-to-one choice (maximum-weight assignment) among the candidate pairs."""
    col_of = {n: c for c, n in enumerate(cols)}
    weight = [[0.0] * len(cols) for _ in rows]
    evidence: dict[tuple[str, str], dict[str, float]] = {}
    by_row = _proposed_names([*renames, *ev.subs])
    pdefined = [n for n in cols if n in precedent.definitions]
    for r, dn in enumerate(rows):
        pool = pdefined if dn in draft.definitions else []
        for pn in dict.fromkeys([*pool, *by_row.get(dn, ())]):
            c = col_of.get(pn)
            if c is None or (dn, pn) in rejected or (dn, None) in rejected:
                continue
            if not _party_compatible(dn, pn, draft, precedent):
                continue
            scores = ev.scores(dn, pn)
            if scores:
                evidence[(dn, pn)] = scores
                weight[r][c] = _confidence(scores)
    chosen: dict[str, tuple[str, float, tuple[Evidence, ...]]] = {}
    if rows and cols and evidence:
        for r, c in max_weight_assignment(weight):
            if weight[r][c] >= MAP_MIN:
                dn, pn = rows[r], cols[c]
                kinds = tuple(k for k in _EVIDENCE_ORDER if k in evidence[(dn, pn)])
                chosen[dn] = (pn, weight[r][c], kinds)
    return chosen


_EVIDENCE_ORDER: tuple[Evidence, ...] = ("definition", "substitution", "embedding")


def _user_choices(forced: Mapping[str, tuple[str, str]],
                  ev: _Evidence) -> dict[str, tuple[str, float, tuple[Evidence, ...]]]:
    """The pairs the user forced, at full confidence, with the evidence found for them."""
    out: dict[str, tuple[str, float, tuple[Evidence, ...]]] = {}
    for dn, (pn, _action) in forced.items():
        prior = ev.scores(dn, pn) if dn in ev.dwords and pn in ev.pwords else {}
        kinds = tuple(k for k in _EVIDENCE_ORDER if k in prior)
        out[dn] = (pn, 1.0, kinds + ("user",))
    return out


def map_terms(draft: DocInfo, precedent: DocInfo, *, overrides: Sequence[TermOverride] = (),
              vocabulary: VocabularyModel | None = None,
              substitutions: Mapping[tuple[str, str], int] | None = None,
              uses: tuple[Mapping[str, int], Mapping[str, int]] | None = None,
              renames: Sequence[Rename] = ()) -> TermMap:
    """The one-to-one term map draft -> precedent (names that differ only).

    *substitutions* counts the slots where a defined draft name stands for a defined
    precedent name (:func:`scan_slots`); *renames* are the names, defined or not, that the
    aligned provisions replace; *uses* gives, for the draft and for the precedent, the uses
    of every name of both documents and of the overrides, each document's aliases counted
    as its terms (counted here when None).  Each mapping records the stale uses of the
    precedent's name left in the draft."""
    forced, rejected = _forced(overrides)
    usable = _usable_renames(renames, draft, precedent)
    found = {n for pair in usable for n in pair}
    every = list(dict.fromkeys([*draft.term_names, *precedent.term_names, *forced,
                                *(p for p, _a in forced.values()), *found]))
    if uses is None or any(n not in uses[0] and n not in uses[1] for n in found):
        uses = (_count_uses(draft, every, among=every), _count_uses(precedent, every, among=every))
    rows, cols = _candidates(draft, precedent, uses, usable, forced)
    ev = _Evidence(draft, precedent, vocabulary=vocabulary, substitutions=substitutions or {},
                   renames=usable, rows=rows, cols=cols)
    chosen = _assign(rows, cols, ev, draft, precedent, rejected, usable)
    chosen.update(_user_choices(forced, ev))

    all_names = tuple(dict.fromkeys([*draft.all_names, *precedent.all_names, *forced.keys(),
                                     *(p for p, _a in forced.values()), *(n for dn in chosen for n in
                                                                         (dn, chosen[dn][0]))]))
    d_uses = uses[0]
    order = {n: i for i, n in enumerate(draft.term_names)}
    scanned = {(r.draft, r.precedent): r for r in renames}
    mappings = []
    for dn in sorted(chosen, key=lambda n: (order.get(n, len(order)), n)):
        pn, conf, kinds = chosen[dn]
        occ = draft.term_uses.get(dn, d_uses.get(dn, 0))
        r = scanned.get((dn, pn))
        n_sub = r.slots if r is not None else (substitutions or {}).get((dn, pn), 0)
        mappings.append(TermMapping(dn, pn, round(conf, 2), kinds, occ, stale=d_uses.get(pn, 0),
                                    substitutions=n_sub, aligned=r.aligned if r is not None else 0))
    return TermMap(tuple(mappings), {m.draft: m.precedent for m in mappings}, all_names)
