"""Text normalisation shared by the precedent set's index, variants and vocabulary.

Two provisions have "the same wording" when they read the same after:

* Unicode compatibility folding (NFKC), curly quotes made straight, dashes unified, non-breaking
  spaces made plain, case folded and whitespace collapsed (punctuation is dropped by the
  tokeniser);
* term normalisation: every use of a defined term (singular, plural or possessive) becomes one
  token naming the term's *canonical* name, so "the Client's" in one agreement and "the
  Customer's" in another both read ``§customer``.

Canonical names come from :data:`PARTY_ROLE_GROUPS` (the common names of the two sides of a
supply agreement) and from aliases learnt over the precedent set by :func:`learn_aliases`
(terms whose definitions read the same).  In a review, the draft's terms are first mapped onto
the precedent's through the review's term map, then through the same aliases.

Cost: tokenising a text of n characters is O(n) for the regular expressions (one alternation
per document for its defined terms, O(n * t) in the worst case for t terms); shingle hashing is
O(w) for w words with a cached 64-bit hash per distinct word.
"""

from __future__ import annotations

import hashlib
import re
import threading
import unicodedata
from collections import Counter, defaultdict
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from .sparse import unique_sorted

__all__ = [
    "ALIAS_MIN_DEFINITION_SIMILARITY",
    "MAX_ALIAS_CANONICALS",
    "PARTY_ROLE_GROUPS",
    "SHINGLE_SIZE",
    "TERM_MARK",
    "TermReplacer",
    "canonical_role",
    "fold",
    "learn_aliases",
    "match_tokens",
    "shingle_hashes",
    "shingle_set",
    "term_slug",
    "token_spans",
    "vocab_tokens",
]

#: Word shingle length: 3-word shingles are common practice for near-duplicate detection of
#: short texts (no single source); with 3, one changed word in a 40-word clause moves the
#: Jaccard distance by about 0.15, a whole different clause is above 0.8.
SHINGLE_SIZE = 3

#: Prefix of a defined-term token in :func:`match_tokens` (a character the tokeniser never
#: produces from ordinary text, so a term never collides with the plain word).
TERM_MARK = "\u00a7"

#: Party labels that name the same side of a commercial agreement (common practice, no
#: source): the first name of each group is the canonical one.  Only exact defined-term names
#: are mapped, never ordinary words.
PARTY_ROLE_GROUPS: tuple[tuple[str, ...], ...] = (
    ("Customer", "Client", "Buyer", "Purchaser"),
    ("Supplier", "Vendor", "Provider", "Service Provider", "Seller", "Contractor"),
)

#: Two definitions "read the same" when rapidfuzz's token_sort_ratio of their normalised words
#: is at least this (0..100): high enough that "the goods described in the Order" and "the
#: products described in the Order" (ratio ~ 80) are not merged, low enough that a re-ordered
#: or lightly edited definition is.  Chosen on the demo set; adjust with care.
ALIAS_MIN_DEFINITION_SIMILARITY = 90.0

#: Only the most frequent defined-term names (by number of documents defining them) can be a
#: canonical name; bounds :func:`learn_aliases` to O(T * MAX_ALIAS_CANONICALS) comparisons.
MAX_ALIAS_CANONICALS = 300

_FOLD = str.maketrans({
    "\u201c": '"', "\u201d": '"', "\u201e": '"', "\u201f": '"', "\u00ab": '"', "\u00bb": '"',
    "\u2018": "'", "\u2019": "'", "\u201a": "'", "\u201b": "'", "\u2032": "'",
    "\u2010": "-", "\u2011": "-", "\u2012": "-", "\u2013": "-", "\u2014": "-", "\u2015": "-",
    "\u2212": "-", "\u00a0": " ", "\u202f": " ", "\u2007": " ", "\u00ad": None, "\u200b": None,
})

# Words and numbers; internal "." "," "'" "-" keep "5.2", "1,000", "party's", "non-solicitation"
# together.  Term tokens (after substitution) are TERM_MARK + [a-z0-9_]+.
_TOKEN_RE = re.compile(TERM_MARK + r"[a-z0-9_]+|[^\W_]+(?:['.,\-][^\W_]+)*")
_SLUG_RE = re.compile(r"[^0-9a-z]+")


def fold(text: str) -> str:
    """NFKC, straight quotes, one dash, plain spaces (case is kept)."""
    return unicodedata.normalize("NFKC", text).translate(_FOLD)


@lru_cache(maxsize=4096)  # a document names each of its terms many times
def term_slug(name: str) -> str:
    """``"Additional Services"`` -> ``"additional_services"``."""
    return _SLUG_RE.sub("_", fold(name).lower()).strip("_")


_ROLE_OF: dict[str, str] = {term_slug(n): g[0] for g in PARTY_ROLE_GROUPS for n in g}


def canonical_role(name: str) -> str | None:
    """The canonical party label for *name* ("Client" -> "Customer"), or None."""
    return _ROLE_OF.get(term_slug(name))


def _forms(term: str) -> list[str]:
    """Singular, plural and possessive surface forms of a defined term."""
    forms = {term, term + "s", term + "es"}
    if term.endswith("y") and len(term) > 1 and term[-2].lower() not in "aeiou":
        forms.add(term[:-1] + "ies")
    out: set[str] = set()
    for f in forms:
        out.update((f, f + "'s", f + "'"))
    return sorted(out, key=len, reverse=True)


class TermReplacer:
    """Replaces the uses of a document's defined terms by one token per canonical name.

    *names* maps every surface name that should be recognised (the document's own defined
    terms, in singular form) to the canonical name the token should carry.  Matching is
    case-sensitive, as defined terms are capitalised, and whole-word; longer names win
    ("Additional Services" before "Services").
    """

    __slots__ = ("_regex", "_canon", "_tokens")

    def __init__(self, names: Mapping[str, str], *, remember: bool = False) -> None:
        #: With *remember*, :func:`match_tokens` keeps each text's tokens (see
        #: :func:`shared_replacer`).
        self._tokens: dict[str, list[str]] | None = {} if remember else None
        canon: dict[str, str] = {}
        for name, target in names.items():
            name = fold(name).strip()
            if not name:
                continue
            for form in _forms(name):
                canon.setdefault(form, target)
        self._canon = canon
        if canon:
            alts = "|".join(re.escape(f) for f in sorted(canon, key=len, reverse=True))
            # Every form starts with one of these characters: the look-ahead lets the engine
            # skip other positions at once instead of trying each form there (same matches,
            # about twice as fast on an agreement's provisions).
            first = "".join(re.escape(c) for c in sorted({f[0] for f in canon}))
            self._regex: re.Pattern[str] | None = re.compile(rf"(?<![\w])(?=[{first}])(?:{alts})(?![\w])")
        else:
            self._regex = None

    def sub(self, text: str, make_token: Callable[[str], str]) -> str:
        """*text* (already folded) with each term use replaced by ``make_token(canonical)``."""
        if self._regex is None:
            return text
        canon = self._canon
        return self._regex.sub(lambda m: f" {make_token(canon[m.group(0)])} ", text)


#: Texts whose tokens a shared replacer keeps (:func:`shared_replacer`): a few long
#: agreements' provisions, read with and without headings.
TOKEN_MEMO = 20_000
#: Shared replacers kept: a review's two documents, with and without the review's renames,
#: and a few more.
SHARED_REPLACERS = 8
_shared: dict[tuple[tuple[str, str], ...], TermReplacer] = {}
_shared_lock = threading.Lock()


def shared_replacer(names: Mapping[str, str]) -> TermReplacer:
    """``TermReplacer(names)``, the same object for the same *names* (in the same order) while
    among the last ``SHARED_REPLACERS`` asked for, remembering its texts' tokens: a review
    reads each provision's words several times (to type it, to compare its wording), each
    time through a replacer of the same names."""
    key = tuple(names.items())
    with _shared_lock:  # the desktop app reviews in a worker thread
        found = _shared.pop(key, None)
        if found is None:
            found = TermReplacer(names, remember=True)
        _shared[key] = found  # the most recent last
        while len(_shared) > SHARED_REPLACERS:
            del _shared[next(iter(_shared))]
    return found


def match_tokens(text: str, *, terms: TermReplacer | None = None) -> list[str]:
    """Normalised tokens for comparing wordings: lower case, punctuation dropped, each defined
    term one ``§slug`` token of its canonical name."""
    memo = terms._tokens if terms is not None else None
    if memo is None:
        return _match_tokens(text, terms)
    found = memo.get(text)
    if found is None:
        if len(memo) >= TOKEN_MEMO:
            memo.clear()
        found = memo[text] = _match_tokens(text, terms)
    return list(found)


def _match_tokens(text: str, terms: TermReplacer | None) -> list[str]:
    t = fold(text)
    if terms is not None:
        t = terms.sub(t, lambda c: TERM_MARK + term_slug(c))
    return _TOKEN_RE.findall(t.lower())


def token_spans(text: str, *, terms: TermReplacer | None = None) -> tuple[str, list[tuple[str, int, int]]]:
    """The folded *text* (:func:`fold`) and its :func:`match_tokens` tokens, each with its
    ``(start, end)`` in the folded text, so that a comparison of tokens can quote the words
    (a defined term's span covers its whole use, e.g. "Client's")."""
    t = fold(text)
    out: list[tuple[str, int, int]] = []

    def plain(a: int, b: int) -> None:
        seg = t[a:b]
        low = seg.lower()
        if len(low) != len(seg):  # a rare letter whose lower case is longer: keep the offsets
            low = seg
        for m in _TOKEN_RE.finditer(low):
            out.append((m.group(0).lower(), a + m.start(), a + m.end()))

    pos = 0
    regex = terms._regex if terms is not None else None
    if regex is not None:
        canon = terms._canon  # type: ignore[union-attr]
        for m in regex.finditer(t):
            plain(pos, m.start())
            out.append((TERM_MARK + term_slug(canon[m.group(0)]), m.start(), m.end()))
            pos = m.end()
    plain(pos, len(t))
    return t, out


_VOCAB_WORD_RE = re.compile(r"[A-Za-z][A-Za-z0-9_]*(?:'[a-z]+)?|[0-9]+(?:[.,][0-9]+)*")


def vocab_tokens(text: str, *, terms: TermReplacer | None = None) -> list[str]:
    """Tokens for the vocabulary model: every defined term joined into one token that keeps
    its capitals ("Additional_Services"), other words lower-cased."""
    t = fold(text)
    if terms is not None:
        t = terms.sub(t, lambda c: "\x00" + re.sub(r"\W+", "_", c).strip("_") + "\x00")
    out: list[str] = []
    for i, part in enumerate(t.split("\x00")):
        if i % 2:  # a joined defined term
            if part:
                out.append(part)
        else:
            out.extend(w.lower() for w in _VOCAB_WORD_RE.findall(part))
    return out


# ----------------------------------------------------------------------------------------
# Shingles
# ----------------------------------------------------------------------------------------

#: Odd 64-bit multipliers for combining word hashes into an ordered shingle hash.
_MULTIPLIERS = np.array([0x9E3779B97F4A7C15, 0xC2B2AE3D27D4EB4F, 0x165667B19E3779F9,
                         0x27D4EB2F165667C5, 0x94D049BB133111EB], dtype=np.uint64)


@lru_cache(maxsize=1 << 18)
def _word_hash(word: str) -> int:
    return int.from_bytes(hashlib.blake2b(word.encode("utf-8"), digest_size=8).digest(), "little")


def shingle_set(tokens: Iterable[str], *, size: int = SHINGLE_SIZE) -> frozenset[tuple[str, ...]]:
    """The set of *size*-word shingles of *tokens* (the reference definition).

    A text shorter than *size* words has one shingle, the whole text; an empty text none.
    """
    toks = list(tokens)
    if not toks:
        return frozenset()
    if len(toks) <= size:
        return frozenset({tuple(toks)})
    return frozenset(tuple(toks[i:i + size]) for i in range(len(toks) - size + 1))


def shingle_hashes(tokens: Iterable[str], *, size: int = SHINGLE_SIZE) -> np.ndarray:
    """Sorted unique 64-bit hashes of :func:`shingle_set` (same shingles, same hashes in every
    process: blake2b per word, combined by position with fixed odd multipliers)."""
    if size < 1 or size > len(_MULTIPLIERS):
        raise ValueError(f"shingle size must be 1..{len(_MULTIPLIERS)}")
    toks = list(tokens)
    if not toks:
        return np.zeros(0, dtype=np.uint64)
    h = np.fromiter((_word_hash(w) for w in toks), dtype=np.uint64, count=len(toks))
    if len(toks) <= size:
        acc = np.zeros(1, dtype=np.uint64)
        for i in range(len(toks)):
            acc = acc + h[i:i + 1] * _MULTIPLIERS[i]
        acc = acc ^ np.uint64(len(toks))  # a 2-word text never equals a 3-word shingle
        return acc
    n = len(toks) - size + 1
    acc = np.zeros(n, dtype=np.uint64)
    for i in range(size):
        acc = acc + h[i:i + n] * _MULTIPLIERS[i]
    acc = acc ^ np.uint64(size)
    return unique_sorted(acc)


# ----------------------------------------------------------------------------------------
# Aliases learnt from the precedent set
# ----------------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class _Defn:
    document: int
    term: str
    definition: str


def _definition_words(term: str, definition: str) -> str:
    words = [w for w in _TOKEN_RE.findall(fold(definition).lower())
             if w not in {"means", "mean", "shall", "the", "a", "an"}]
    own = set(term_slug(term).split("_"))
    return " ".join(w for w in words if w not in own)


def learn_aliases(definitions: Iterable[tuple[int, str, str]]) -> dict[str, str]:
    """Aliases ``{name: canonical name}`` from ``(document id, term, definition)`` triples.

    Party labels map through :data:`PARTY_ROLE_GROUPS`.  Any other name maps onto a name
    defined by more documents (ties: alphabetical) when the two are never defined in the same
    document and their most common definitions read the same (rapidfuzz token_sort_ratio >=
    :data:`ALIAS_MIN_DEFINITION_SIMILARITY`).  Chains resolve to the most frequent name.
    Deterministic.  Cost O(T * C) ratio computations for T distinct names and
    C = min(T, :data:`MAX_ALIAS_CANONICALS`).
    """
    from rapidfuzz import fuzz

    docs_of: dict[str, set[int]] = defaultdict(set)
    defs_of: dict[str, Counter[str]] = defaultdict(Counter)
    words_of: dict[tuple[str, str], tuple[str, str]] = {}  # agreements repeat their definitions
    for doc, term, definition in definitions:
        known = words_of.get((term, definition))
        if known is None:
            name = fold(term).strip()
            known = words_of[(term, definition)] = (name, _definition_words(name, definition) if name else "")
        name, words = known
        if not name:
            continue
        docs_of[name].add(doc)
        defs_of[name][words] += 1
    aliases: dict[str, str] = {}
    for name in docs_of:
        role = canonical_role(name)
        if role is not None and role != name:
            aliases[name] = role
    order = sorted((n for n in docs_of if canonical_role(n) is None),
                   key=lambda n: (-len(docs_of[n]), n))
    rep = {n: defs_of[n].most_common(1)[0][0] for n in order}
    canonicals: list[str] = []
    for name in order:
        target = None
        for c in canonicals:
            if docs_of[c] & docs_of[name]:
                continue
            if rep[name] and rep[c] and fuzz.token_sort_ratio(rep[name], rep[c]) >= ALIAS_MIN_DEFINITION_SIMILARITY:
                target = c
                break
        if target is None:
            if len(canonicals) < MAX_ALIAS_CANONICALS:
                canonicals.append(name)
        else:
            aliases[name] = target
            docs_of[target] = docs_of[target] | docs_of[name]
    return aliases
