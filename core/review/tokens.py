"""Tokens for the review engine: words, numbers, spaces and punctuation, with defined-term
uses and cross-references kept whole.

A provision text is cut into tokens whose concatenation is the text again.  Every token has
a *key*: the form that the aligner and the word diff compare.  Keys ignore what the
classifier later reports as formatting (letter case, quote style, dash style, the kind and
amount of white space), and they replace a defined-term use by the precedent's name of the
term, so that "Client's" in the draft and "Customer's" in the precedent compare equal once
the term map says Client = Customer.

Cost: one regular-expression pass over the text for the plain tokens, one for term uses and
one for cross-references, so O(length of text).
"""

from __future__ import annotations

import re
from collections.abc import Callable, Collection, Container, Iterable, Mapping, Sequence
from dataclasses import dataclass
from itertools import accumulate
from operator import itemgetter
from typing import cast

from ..lazyre import compile_pattern
from ..terms import REGEX_FORMS_MAX, CharTrie, char_trie, term_owners, walk_forms

__all__ = [
    "DASHES",
    "QUOTES",
    "TEX_QUOTES",
    "XREF_KEYWORD_RE",
    "BaseTokens",
    "Special",
    "TermMatcher",
    "TermUse",
    "TokenSeq",
    "base_tokens",
    "clear_token_cache",
    "count_term_uses",
    "find_cross_references",
    "find_term_uses",
    "fold_text",
    "normalise_key",
    "plain_terms",
    "rekey",
    "term_matcher",
    "term_name",
    "tokenize",
    "word_keys",
]

#: Quote characters folded onto the ASCII apostrophe / double quote (Unicode general
#: categories Pi/Pf and the primes that word processors substitute for them).
QUOTES = {
    "\u2018": "'", "\u2019": "'", "\u201a": "'", "\u201b": "'", "\u2032": "'", "`": "'",
    "\u201c": '"', "\u201d": '"', "\u201e": '"', "\u201f": '"', "\u2033": '"',
    "\u00ab": '"', "\u00bb": '"',
}
#: Dash characters folded onto the ASCII hyphen-minus (Unicode category Pd plus the minus
#: sign U+2212).
DASHES = {c: "-" for c in "\u2010\u2011\u2012\u2013\u2014\u2015\u2212\ufe58\ufe63\uff0d"}
_FOLD = str.maketrans({**QUOTES, **DASHES})

# Numbers first ("1,000.50" and "7.2" are one token), then words (an apostrophe joins the
# parts of "party's"), then runs of white space, then the typewriter and TeX spelling of
# double quotation marks (two backticks open, two apostrophes close: ``x''), then any other
# single character.
_TOKEN_RE = compile_pattern(r"\d+(?:[.,]\d+)*|\w+(?:['\u2019]\w+)*|\s+|``|''|[^\w\s]")
#: Two-character spellings of a double quotation mark (TeX and typewriter usage: ``x''),
#: folded onto '"' like the curly quotes.
TEX_QUOTES = {"``": '"', "''": '"'}

#: Token kinds: w word, n number, s space, p punctuation, t defined-term use, x cross-ref.
KIND_WORD, KIND_NUMBER, KIND_SPACE, KIND_PUNCT, KIND_TERM, KIND_XREF = "wnsptx"


def normalise_key(token: str) -> str:
    """Comparison key of a plain token: case-folded, quotes and dashes folded, white space
    collapsed to one space."""
    if token[:1].isspace():
        return " "
    tex = TEX_QUOTES.get(token)
    if tex is not None:
        return tex
    return token.translate(_FOLD).casefold()


def fold_text(text: str) -> str:
    """*text* with what the review reports as formatting taken out: letter case, quote and
    dash style (TeX-style ````x''`` included) and white space (removed)."""
    for tex, plain in TEX_QUOTES.items():
        text = text.replace(tex, plain)
    return "".join(text.translate(_FOLD).casefold().split())


def _kind_of(tok: str) -> str:
    c = tok[0]
    if c.isspace():
        return KIND_SPACE
    if c.isdigit():
        return KIND_NUMBER
    if c.isalnum() or c == "_":
        return KIND_WORD
    return KIND_PUNCT


@dataclass(frozen=True, slots=True)
class Special:
    """A span to keep as one token with a given key (a term use or a cross-reference)."""

    start: int
    end: int
    key: str
    kind: str  # KIND_TERM or KIND_XREF


@dataclass(frozen=True, slots=True)
class TokenSeq:
    """``text[starts[i]:starts[i+1]]`` is token i; ``keys[i]`` its comparison key."""

    text: str
    starts: tuple[int, ...]  # n + 1 offsets, the last one len(text)
    keys: tuple[str, ...]
    kinds: str  # one kind letter per token

    def __len__(self) -> int:
        return len(self.keys)

    def token(self, i: int) -> str:
        return self.text[self.starts[i]:self.starts[i + 1]]

    def span(self, i: int, j: int) -> tuple[int, int]:
        """Character offsets of tokens i..j-1."""
        return self.starts[i], self.starts[j]


_TOKEN_INFO: dict[str, tuple[str, str]] = {}
#: Bound of the token -> (key, kind) cache (distinct tokens; a long agreement has ~10,000).
_TOKEN_INFO_MAX = 200_000


def _info(tok: str) -> tuple[str, str]:
    r = _TOKEN_INFO.get(tok)
    if r is None:
        if len(_TOKEN_INFO) >= _TOKEN_INFO_MAX:
            _TOKEN_INFO.clear()
        r = _TOKEN_INFO[tok] = (normalise_key(tok), _kind_of(tok))
    return r


def clear_token_cache() -> None:
    """Forget the token -> key caches (benchmarks measure cold runs)."""
    _TOKEN_INFO.clear()
    _TERM_WORDS.clear()


def tokenize(text: str, specials: Sequence[Special] = ()) -> TokenSeq:
    """Cut *text* into tokens; *specials* (sorted, non-overlapping) become single tokens."""
    starts: list[int] = []
    keys: list[str] = []
    kinds: list[str] = []

    def plain(a: int, b: int) -> None:
        toks = _TOKEN_RE.findall(text, a, b)
        if not toks:
            return
        # the loops run in map(), over the cache of known tokens (most of a text's tokens)
        cached = list(map(_TOKEN_INFO.get, toks))
        got: list[tuple[str, str]] = (
            [g if g is not None else _info(t) for g, t in zip(cached, toks, strict=True)]
            if None in cached else cast("list[tuple[str, str]]", cached))  # no None: all found
        starts.extend(accumulate(map(len, toks[:-1]), initial=a))
        keys.extend(map(itemgetter(0), got))
        kinds.extend(map(itemgetter(1), got))

    pos = 0
    for sp in specials:
        if sp.start < pos:  # overlapping special: keep the earlier one
            continue
        plain(pos, sp.start)
        starts.append(sp.start)
        keys.append(sp.key)
        kinds.append(sp.kind)
        pos = sp.end
    plain(pos, len(text))
    starts.append(len(text))
    return TokenSeq(text, tuple(starts), tuple(keys), "".join(kinds))


@dataclass(frozen=True, slots=True)
class BaseTokens:
    """A text tokenised once, with its term uses and cross-references as single tokens, so
    that keys for any term map and any alignment are a cheap :func:`rekey` away."""

    seq: TokenSeq
    terms: tuple[tuple[int, str, str], ...]  # (token index, term name, form)
    xrefs: tuple[tuple[int, str, str], ...]  # (token index, number, keyword)
    term_at: Mapping[int, str]  # character offset of a term use -> term name
    #: each term use's key as the words it is written with (in the order of ``terms``)
    term_words: tuple[str, ...] = ()


def base_tokens(text: str, matcher: TermMatcher | None, *, xrefs: bool = True) -> BaseTokens:
    """Tokens of *text*: term uses keyed by their own name, cross-references by number."""
    specials: list[Special] = []
    term_meta: dict[int, tuple[str, str]] = {}
    xref_meta: dict[int, tuple[str, str]] = {}
    for u in find_term_uses(text, matcher):
        specials.append(Special(u.start, u.end, "\x00T" + u.term + "\x00" + u.form, KIND_TERM))
        term_meta[u.start] = (u.term, u.form)
    if xrefs:
        for a, b, number, keyword in find_cross_references(text):
            specials.append(Special(a, b, "\x00X" + number, KIND_XREF))
            xref_meta.setdefault(a, (number, keyword))
        specials.sort(key=lambda sp: (sp.start, -sp.end))
    kept: list[Special] = []
    end = -1
    for sp in specials:
        if sp.start >= end:
            kept.append(sp)
            end = sp.end
    seq = tokenize(text, kept)
    terms: list[tuple[int, str, str]] = []
    refs: list[tuple[int, str, str]] = []
    term_at: dict[int, str] = {}
    if kept:
        index = {st: i for i, st in enumerate(seq.starts)}
        for sp in kept:
            i = index[sp.start]
            if sp.kind == KIND_TERM:
                name, form = term_meta[sp.start]
                terms.append((i, name, form))
                term_at[sp.start] = name
            else:
                number, keyword = xref_meta[sp.start]
                refs.append((i, number, keyword))
    words = tuple(_as_word(seq.token(i)) for i, _name, _form in terms)
    return BaseTokens(seq, tuple(terms), tuple(refs), term_at, words)


_TERM_WORDS: dict[str, str] = {}


def _as_word(tok: str) -> str:
    """The key of a term use compared as the words it is written with (white space
    collapsed); kept with the token cache (a document writes its terms the same few ways)."""
    r = _TERM_WORDS.get(tok)
    if r is None:
        if len(_TERM_WORDS) >= _TOKEN_INFO_MAX:
            _TERM_WORDS.clear()
        r = _TERM_WORDS[tok] = normalise_key(" ".join(tok.split()))
    return r


def rekey(bt: BaseTokens, *, term_key: Mapping[str, str],
          xref: Callable[[str, str], str] | None = None,
          as_words: Collection[str] = frozenset()) -> TokenSeq:
    """*bt*'s tokens with each term use keyed by ``term_key.get(name, name)`` and form, and
    each cross-reference by ``xref(number, keyword)`` ("#" for all when *xref* is None).

    The uses of the names in *as_words* are words (kind and key of a plain word): a term
    that is not renamed is compared as the words it is written with, so that the draft's
    defined "Reproduce" and the precedent's plain "reproduce" differ in letter case only."""
    if not bt.terms and not bt.xrefs:
        return bt.seq
    keys = list(bt.seq.keys)
    words: list[int] = []
    for (i, name, form), word in zip(bt.terms, bt.term_words, strict=True):
        if name in as_words:
            keys[i] = word
            words.append(i)
            continue
        keys[i] = "\x00T" + term_key.get(name, name) + "\x00" + form
    for i, number, keyword in bt.xrefs:
        keys[i] = "\x00X" + (xref(number, keyword) if xref is not None else "#")
    seq = bt.seq
    kinds = seq.kinds
    if words:
        chars = list(kinds)
        for i in words:
            chars[i] = KIND_WORD
        kinds = "".join(chars)
    return TokenSeq(seq.text, seq.starts, tuple(keys), kinds)


def term_name(key: str) -> str:
    """The term a defined-term token's key names (the key is ``"\\x00T" + name + "\\x00" +
    form``)."""
    return key[2:].split("\x00", 1)[0]


def plain_terms(seq: TokenSeq, *, keep: Container[str]) -> TokenSeq:
    """*seq* with each use of a defined term that is not in *keep* keyed by its words as a
    plain word would be (letter case, quotes, dashes folded, white space collapsed), so that
    "Services" used as a defined term on one side and "SERVICES" or "services" written as a
    word on the other compare equal and show as a change of letter case.  The uses of the
    terms in *keep* (renamed terms, party labels) keep their term keys.  O(tokens)."""
    if KIND_TERM not in seq.kinds:
        return seq
    keys = list(seq.keys)
    for i, kind in enumerate(seq.kinds):
        if kind == KIND_TERM and term_name(keys[i]) not in keep:
            keys[i] = " ".join(normalise_key(seq.token(i)).split())
    return TokenSeq(seq.text, seq.starts, tuple(keys), seq.kinds)


def word_keys(seq: TokenSeq) -> list[str]:
    """The keys of the word-like tokens (words, numbers, terms, cross-references)."""
    return [k for k, kind in zip(seq.keys, seq.kinds) if kind not in (KIND_SPACE, KIND_PUNCT)]


# ----------------------------------------------------------------------------------------
# Defined-term uses
# ----------------------------------------------------------------------------------------

@dataclass(frozen=True, slots=True)
class TermUse:
    start: int
    end: int
    term: str  # the defined term as named in its definition (singular)
    form: str  # "" singular, "pl" plural, "pos" possessive, "plpos" plural possessive


@dataclass(frozen=True, slots=True)
class TermMatcher:
    """One pattern for the uses of many terms and the map from a matched form to its term.

    The forms are those of :func:`core.terms.terms_pattern` (singular and plural, possessive
    endings, any white space between words, whole words, longest form first so that
    "Additional Services" is one use and not a use of "Services"); the pattern is built as a
    trie of the forms so that the regular-expression engine can skip every position whose
    first character starts no form (about ten times faster on an agreement's text).  An
    alias's forms belong to its term (``owner``); ``written`` maps each form to the name it
    is a form of, so that "Your" (an alias of "You") is a singular use and "Clients" a
    plural one."""

    pattern: re.Pattern[str] | None
    owner: Mapping[str, str]
    written: Mapping[str, str]
    #: For many names (over :data:`core.terms.REGEX_FORMS_MAX` forms) a character trie
    #: walked in Python (:func:`core.terms.walk_forms`) instead of the pattern, whose
    #: compilation grows too slow.
    trie: CharTrie | None = None




_POSSESSIVE = r"(?P<pos>['\u2019][sS](?!\w)|(?<=[sS])['\u2019](?!\w))?(?!\w)"


def _trie_regex(forms: Iterable[str]) -> str:
    """A regex matching any of *forms*, the longest first at each position.  Built with an
    explicit stack (depth bounded by the longest form, at most a few dozen characters)."""
    root = char_trie(forms)

    def render(node: CharTrie, parts: dict[int, str]) -> str:
        alts = [(r"\s+" if ch == " " else re.escape(ch)) + parts[id(child)]
                for ch, child in sorted(node.children.items())]
        if not alts:
            return ""
        if len(alts) == 1 and node.form is None:
            return alts[0]
        return "(?:" + "|".join(alts) + ")" + ("?" if node.form is not None else "")

    # post-order over the trie without recursion
    parts: dict[int, str] = {}
    stack: list[tuple[CharTrie, bool]] = [(root, False)]
    while stack:
        node, done = stack.pop()
        if done:
            parts[id(node)] = render(node, parts)
            continue
        stack.append((node, True))
        stack.extend((child, False) for child in node.children.values())
    return parts[id(root)]


def term_matcher(terms: Iterable[str], *, aliases: Mapping[str, str] | None = None,
                 capitals: bool = False) -> TermMatcher | None:
    """The matcher of *terms* and of *aliases* (alias -> its term; a use of an alias is a
    use of its term); None when there is no name.  With *capitals*, a capitalised name
    written all in capitals ("LICENSOR", in a disclaimer set in capitals) is a use of it
    too; an ordinary phrase ("source code") in capitals is left as words."""
    alias_of = {a: t for a, t in (aliases or {}).items() if a.strip() and a != t}
    names = list(dict.fromkeys(t for t in terms if t.strip() and t not in alias_of))
    if not names and not alias_of:
        return None
    if capitals:
        known = set(names)
        for n in [*names, *alias_of]:
            up = n.upper()
            if n[:1].isupper() and up != n and up not in alias_of and up not in known:
                alias_of[up] = alias_of.get(n, n)
    owner = term_owners(names, aliases=alias_of)
    written = term_owners([*names, *alias_of])
    if len(owner) > REGEX_FORMS_MAX:
        return TermMatcher(None, owner, written, char_trie(owner))
    pattern = re.compile(r"(?P<form>" + _trie_regex(owner) + r")" + _POSSESSIVE)
    return TermMatcher(pattern, owner, written)


def _matches(text: str, matcher: TermMatcher) -> Iterable[tuple[int, int, str, str | None]]:
    if matcher.trie is not None:
        yield from walk_forms(text, matcher.trie)
        return
    assert matcher.pattern is not None
    for m in matcher.pattern.finditer(text):
        yield m.start(), m.end(), m.group("form"), m.group("pos")


def find_term_uses(text: str, matcher: TermMatcher | None) -> list[TermUse]:
    """Every use of a term of *matcher* in *text*, with the term it names and its form."""
    if matcher is None or not text:
        return []
    uses: list[TermUse] = []
    owner = matcher.owner
    for start, end, f, pos in _matches(text, matcher):
        if start and (text[start - 1].isalnum() or text[start - 1] in "_-"):
            continue  # not the start of a word (core.terms: (?<![\w-]))
        term = owner.get(f)
        if term is None:
            f = " ".join(f.split())
            term = owner.get(f)
            if term is None:
                continue
        if pos in ("'", "\u2019") and text[start - 1:start] in ("'", "\u2018"):
            pos, end = None, end - 1  # 'Services': a closing quote, not a plural possessive
        form = ("pl" if f != matcher.written.get(f, term) else "") + ("pos" if pos else "")
        uses.append(TermUse(start, end, term, form))
    return uses


def count_term_uses(bts: Iterable[BaseTokens]) -> dict[str, int]:
    """Uses of each term in tokenised texts (plural and possessive forms included)."""
    c: dict[str, int] = {}
    for bt in bts:
        for _i, name, _form in bt.terms:
            c[name] = c.get(name, 0) + 1
    return c


# ----------------------------------------------------------------------------------------
# Cross-references: "Clause 7.2", "Sections 5 and 6", "paragraph 3(b)"
# ----------------------------------------------------------------------------------------

#: Words that introduce a reference to a numbered part of the agreement (common practice
#: in English-language contracts, no source).  The references themselves are found by
#: :func:`core.xrefs.find_references`, which knows more keywords and forms.
XREF_KEYWORD_RE = compile_pattern(
    r"\b(?:[Cc]lauses?|CLAUSES?|[Ss]ections?|SECTIONS?|[Pp]aragraphs?|[Ss]ub-?clauses?|"
    r"[Ss]ub-?paragraphs?|[Aa]rticles?|[Ss]chedules?|[Aa]nnex(?:es)?|[Aa]ppendi(?:x|ces)|"
    r"[Pp]arts?)\s+(?=\d)"
)


def find_cross_references(text: str) -> list[tuple[int, int, str, str]]:
    """``(start, end, number, keyword)`` of every numbered reference in *text*; *number* is
    the reference without spaces ("7.2(a)") and *keyword* the lower-case introducing word,
    singular ("clause", "sub-clause", "schedule").  The first reference of a list spans its
    keyword too ("Clause 7.2"), so that "clause 9.2" -> "Section 11.2" is one token; the
    others of the list ("and 6") span their number only.

    These are the references of :func:`core.xrefs.find_references` (the ones the
    counter-draft keeps true), less those the review cannot key by a full number: other
    instruments' ("Section 16 of the Companies Act"), relative items ("paragraph (c)") and
    numbers that do not start with a figure ("Annex B", "Article IV") stay words.
    """
    # imported when first needed: core.xrefs compiles many patterns, which a review of a
    # document without references need not pay for at start-up
    from ..xrefs import find_references

    out: list[tuple[int, int, str, str]] = []
    for ref in find_references(text):
        if ref.external:
            continue
        first = True
        for n in ref.numbers:
            if n.relative or not n.number[:1].isdigit():
                continue
            out.append((ref.start if first else n.start, n.end, n.number, ref.keyword))
            first = False
    return out
