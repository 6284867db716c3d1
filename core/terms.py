"""Find the defined terms of an agreement and count their uses.

A term is defined

* by a definition provision (kind ``"definition"``, found by :mod:`core.structure` in a
  definitions section: ``"X" means ...``, bold ``X`` means ...); an alternative form in the
  same breath (``"You" (or "Your") shall mean``) is defined by the same provision;
* inline, anywhere: ``"X" means`` / ``shall mean`` / ``has the meaning given in`` /
  ``refers to`` / ``includes`` (a few words may sit between: ``"Source" form shall mean``,
  ``The "source code" for a work means``); in parentheses after what it names
  (``(the "X")``, ``("X")``, ``(each a "X")``, ``(together, the "X")``,
  ``(hereinafter referred to as "X")``, ``(each a "Party" and together the "Parties")``);
  ``hereinafter "X"``; ``each a "X" and together the "Y"`` without parentheses;
  ``is called a "X"``.

Straight and curly quotes (``"X"``, ``“X”``, ``‘X’``) are recognised.  The first definition
of a term wins; a later one of the same term is ignored.

Uses are counted case-sensitively as the term is written (so ``"Customer"`` counts
capitalised uses), whole words only, in every provision's text and heading except the
defining provision's; plural (``Services``, ``Parties``, ``Liabilities``) and possessive
(``Customer's``, ``Customers'``) forms count.  All terms are matched together, longest
first, so ``Additional Services`` is a use of that term and not also of ``Services``.

Cost: one pass of a few regular expressions over the provision texts to find the
definitions, then one pass of a single alternation of all term forms to count uses:
O(total text length x number of terms) in the worst case of the regex engine, in practice
close to linear.
"""

from __future__ import annotations

import re
from collections.abc import Iterable, Sequence

from .model import DefinedTerm, Provision
from .structure import clean_term

__all__ = ["find_terms", "term_forms", "term_pattern", "terms_pattern"]

#: Longest definition text kept for an inline definition (characters): one sentence of a
#: provision is the definition; a run-on sentence is cut here.
MAX_INLINE_DEFINITION_CHARS = 600
#: An alternative form defined with the term ("You" (or "Your")) starts within this many
#: characters after the term in a definition provision.
ALIAS_WINDOW = 20
#: Words that may sit between a quoted term and "means" ("Source" form shall mean ...).
MAX_WORDS_BEFORE_VERB = 7

_TERM_Q = r"(?:[\"“](?P<t1>[^\"“”\n]{1,80}?)[\"”]|‘(?P<t2>[^‘’\n]{1,80}?)’)"
_QUOTED_RE = re.compile(r"[\"“](?P<t1>[^\"“”\n]{1,80}?)[\"”]|‘(?P<t2>[^‘’\n]{1,80}?)’")
_VERBS = (
    r"(?:shall\s+be\s+deemed\s+to\s+mean|shall\s+mean|shall\s+have\s+the\s+meanings?|"
    r"has\s+the\s+meanings?|have\s+the\s+meanings?|also\s+means|means|mean|refers\s+to|"
    r"refer\s+to|shall\s+refer\s+to|shall\s+include|includes|include|is\s+defined|are\s+defined)\b"
)
_MEANS_RE = re.compile(
    _TERM_Q
    + r"(?P<alias>\s*\([^()\n]{0,80}\))?"
    + r"(?:\s+(?!(?:means|mean|shall|has|have|refers|includes|include)\b)[\w’'-]+)"
    + r"{0,%d}?" % MAX_WORDS_BEFORE_VERB
    + r"\s*,?\s+" + _VERBS
)
_COLON_START_RE = re.compile(r"^\s*" + _TERM_Q + r"\s*[:–—]")
_PAREN_RE = re.compile(r"\((?P<inner>[^()\n]{1,200})\)")
_HEREINAFTER_RE = re.compile(
    r"\bhereinafter(?:\s+(?:referred\s+to\s+as|called|known\s+as))?\s*,?\s*(?:the\s+)?" + _TERM_Q,
    re.IGNORECASE,
)
_COLLECTIVE_RE = re.compile(
    r"\b(?:each|together|collectively|individually|jointly|both)\b(?:\s*,)?(?:\s+(?:a|an|the|being))?"
    r"(?:\s*,)?\s+" + _TERM_Q,
    re.IGNORECASE,
)
_CALLED_RE = re.compile(
    r"\b(?:is|are|be|being)\s+(?:called|referred\s+to\s+as|known\s+as|designated\s+as|termed)\s+"
    r"(?:the\s+|an?\s+)?" + _TERM_Q
)
#: Words that may stand in a parenthesis around a term being defined: (the "X"),
#: (each a "X"), (together, the "X"), (hereinafter referred to as "X"), (or "Y").
_PAREN_CUES = frozenset(
    "the a an each together collectively individually jointly severally both hereinafter "
    "hereafter herein referred to as called known also or and being in case any one".split()
)
_SENTENCE_SPLIT_RE = re.compile(r"(?<=[.;])\s+(?=[A-Z\"“‘(])")


def _group_term(m: re.Match[str]) -> str | None:
    return clean_term(m.group("t1") or m.group("t2") or "")


def _cue_words_only(text: str) -> bool:
    words = [w.strip(",;:").lower() for w in text.split()]
    return all(w in _PAREN_CUES or not w for w in words)


def _paren_terms(inner: str) -> list[str]:
    """Terms defined in a parenthesis: ("X"), (the "X"), (each a "X" and together the "Y")."""
    quotes = list(_QUOTED_RE.finditer(inner))
    if not quotes:
        return []
    pos = 0
    terms = []
    for q in quotes:
        if not _cue_words_only(inner[pos:q.start()]):
            return []
        t = _group_term(q)
        if t is None:
            return []
        terms.append(t)
        pos = q.end()
    if inner[pos:].strip(" ,;.:"):
        return []
    return terms


def _sentence_at(text: str, offset: int) -> str:
    start = 0
    for m in _SENTENCE_SPLIT_RE.finditer(text):
        if m.end() > offset:
            break
        start = m.end()
    nxt = _SENTENCE_SPLIT_RE.search(text, max(offset, start))
    end = nxt.start() if nxt else len(text)
    sentence = text[start:end].strip()
    if len(sentence) > MAX_INLINE_DEFINITION_CHARS:
        sentence = sentence[:MAX_INLINE_DEFINITION_CHARS].rstrip() + "…"
    return sentence


def _inline_definitions(text: str) -> list[tuple[int, str]]:
    """(offset, term) of every inline definition in *text*, in order."""
    found: list[tuple[int, str]] = []
    for m in _MEANS_RE.finditer(text):
        t = _group_term(m)
        if t is not None:
            found.append((m.start(), t))
        alias = m.group("alias")
        if alias:
            for a in _paren_terms(alias.strip()[1:-1]):
                found.append((m.start("alias"), a))
    m0 = _COLON_START_RE.match(text)
    if m0:
        t = _group_term(m0)
        if t is not None:
            found.append((m0.start(), t))
    for m in _PAREN_RE.finditer(text):
        for t in _paren_terms(m.group("inner")):
            found.append((m.start(), t))
    for rx in (_HEREINAFTER_RE, _COLLECTIVE_RE, _CALLED_RE):
        for m in rx.finditer(text):
            t = _group_term(m)
            if t is not None:
                found.append((m.start(), t))
    found.sort(key=lambda ft: ft[0])
    return found


# --------------------------------------------------------------------------------------
# Forms and patterns
# --------------------------------------------------------------------------------------


def _plural(word: str) -> str | None:
    if not word or not word[-1].isalpha():
        return None
    low = word.lower()
    upper = word.isupper() and len(word) > 1
    if low in ("you", "your", "we", "us", "our", "it", "its", "they", "them", "their"):
        return None
    if low.endswith(("ss", "sh", "ch", "x", "z")):
        suffix = "es"
    elif low.endswith("s"):
        return None  # already plural ("Services")
    elif low.endswith("y") and len(low) > 1 and low[-2] not in "aeiou":
        return word[:-1] + ("IES" if upper else "ies")
    else:
        suffix = "s"
    return word + (suffix.upper() if upper else suffix)


def term_forms(term: str) -> tuple[str, ...]:
    """The written forms of *term* counted as its uses: itself and its plural.

    Possessives (``Customer's``, ``Customers'``) are matched by :func:`term_pattern` on top
    of these.  ``"Party"`` -> ``("Party", "Parties")``; ``"Services"`` -> ``("Services",)``.
    """
    words = term.split(" ")
    plural_last = _plural(words[-1])
    forms = [term]
    if plural_last is not None:
        forms.append(" ".join(words[:-1] + [plural_last]))
    return tuple(forms)


_POSSESSIVE = r"(?:['’]s(?!\w)|(?<=s)['’](?!\w))?"


def _forms_regex(forms: Iterable[str]) -> str:
    alts = sorted(set(forms), key=len, reverse=True)
    body = "|".join(re.escape(f).replace(r"\ ", r"\s+") for f in alts)
    return r"(?<![\w-])(?:" + body + r")" + _POSSESSIVE + r"(?!\w)"


def term_pattern(term: str) -> re.Pattern[str]:
    """A pattern matching whole-word uses of *term*: singular, plural and possessive forms
    (``Customer``, ``Customers``, ``Customer's``, ``Customer’s``, ``Customers'``), case as
    written, any white space between the words of a multi-word term.

    It does not know other terms: to count ``Services`` without the ``Services`` inside
    ``Additional Services``, use :func:`terms_pattern` with both terms.
    """
    return re.compile(_forms_regex(term_forms(term)))


def terms_pattern(terms: Sequence[str]) -> tuple[re.Pattern[str], dict[str, str]]:
    """One pattern for all *terms*, longest form first, and a map form -> term.

    Each match's text, minus any possessive ending and with white space collapsed, is a
    key of the map.  Because the longest form is tried first at each position, a longer
    term that contains a shorter one is matched as the longer term.
    """
    owner: dict[str, str] = {}
    for t in terms:  # exact terms first, so "Services" the term beats "Service"'s plural
        owner.setdefault(t, t)
    for t in terms:
        for f in term_forms(t):
            owner.setdefault(f, t)
    if not owner:
        return re.compile(r"(?!x)x"), owner
    return re.compile(_forms_regex(owner)), owner


def _form_of(match_text: str) -> str:
    text = " ".join(match_text.split())
    for suffix in ("'s", "’s", "'", "’"):
        if text.endswith(suffix):
            return text[: -len(suffix)]
    return text


# --------------------------------------------------------------------------------------
# The finder
# --------------------------------------------------------------------------------------


def find_terms(provisions: Sequence[Provision]) -> tuple[DefinedTerm, ...]:
    """The defined terms of a document, in order of definition, with their use counts."""
    defs: dict[str, tuple[str, str]] = {}  # term -> (definition, provision id)
    order: list[str] = []

    def add(term: str, definition: str, pid: str) -> None:
        if term not in defs:
            defs[term] = (definition, pid)
            order.append(term)

    for p in provisions:
        inline = _inline_definitions(p.text)
        if p.kind == "definition" and p.term:
            add(p.term, p.text, p.id)
            head = p.text.find(p.term) + len(p.term) + ALIAS_WINDOW
            for off, t in inline:
                if t != p.term and off <= head:
                    add(t, p.text, p.id)  # an alternative form: "You" (or "Your")
        for off, t in inline:
            add(t, _sentence_at(p.text, off), p.id)

    if not order:
        return ()
    pattern, owner = terms_pattern(order)
    uses = dict.fromkeys(order, 0)
    for p in provisions:
        for text in (p.heading or "", p.text):
            if not text:
                continue
            for m in pattern.finditer(text):
                term = owner.get(_form_of(m.group(0)))
                if term is not None and defs[term][1] != p.id:
                    uses[term] += 1
    return tuple(DefinedTerm(term=t, definition=defs[t][0], provision=defs[t][1], uses=uses[t])
                 for t in order)
