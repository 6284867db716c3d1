"""Split a document's blocks into provisions: title, parties, recitals, definitions, clauses
at every numbering level, signature block and schedules.

The input is the reader's tuple of :class:`~core.model.Block` (one per paragraph); the output
is a tuple of :class:`~core.model.Provision` in document order with ids ``"p1"``, ``"p2"``, ...

How it reads a document
-----------------------
* **Numbers** come from a block's auto-number label (``Block.label``, computed by the .docx
  reader from numbering.xml) or from a literal label typed at the start of the text
  (``"7."``, ``"7.2"``, ``"(a)"``, ``"(iv)"``, ``"a)"``, ``"1)"``, ``"A."``, ``"Article IV"``,
  ``"Section 3"``, ``"Clause 12"``, ``"Schedule 2"``); see :func:`parse_label`.
* **Levels** come from a stack of open numbered provisions, the way a reader keeps track of
  "where am I": a dotted number (``7.2``) goes under the open provision whose number is its
  prefix (``7``); a list label (``(a)``, ``(i)``, ``a)``) continues an open list of the same
  style or opens a new level under the provision above it; auto-numbered paragraphs of the
  same Word list nest by their list level (``w:ilvl``).  ``(i)``, ``(v)``, ``(x)`` and the like
  are letters when they continue a letter list (``(h)`` -> ``(i)``) and roman numerals
  otherwise.  A numbered provision's level is its parent's level plus its own depth below
  it, so inside a schedule (level 1) clause ``1`` has level 2 and clause ``1.1`` level 3;
  unnumbered provisions have level 0.
* **Headings** come from heading styles or emphasis (a whole numbered paragraph in a heading
  style, bold, underlined or capitals), from a run-in lead-in (``Block.lead``, or by text
  cues: a short title-case phrase ending in ``.``/``:``/a dash before the first sentence:
  ``"7. Limitation of Liability. The Supplier ..."``) or from a standalone heading line
  (emphasised, capitals, or a short title-case line followed by body text).  A standalone
  heading right after a numbered line that has no words of its own (``"SCHEDULE 1"`` then
  ``"SERVICES"``) becomes that line's heading; otherwise it starts an unnumbered provision
  (kind ``"other"``, or ``"parties"``/``"recital"`` for those headings) that encloses the
  numbered provisions after it until the next such heading.
* **Text** is a provision's own words: no label, no heading, no children.  Unnumbered
  paragraphs that follow belong to the preceding provision, except those that start a new
  definition, recital, signature block or heading.
* **Definitions**: inside a definitions section (a provision headed "Definitions",
  "Interpretation", ... or introduced by "the following terms have the following meanings",
  and everything under it) every paragraph that starts with a quoted (or bold) term and
  ``means``/``shall mean``/``has the meaning``/``refers to``/``includes``/``:`` becomes its own
  provision of kind ``"definition"`` with ``term`` set; anywhere else a paragraph that *starts*
  with ``"X" means`` does too.

Cost: one pass over the blocks; each block costs a few anchored regular-expression matches
plus a walk of the open-provision stack, whose height is bounded by the nesting depth of the
document's numbering (not by its length).  O(total text length) overall.
"""

from __future__ import annotations

import functools
import re
from collections.abc import Sequence
from dataclasses import dataclass, field

from .lazyre import lazy_compile
from .model import Block, Document, Provision, ProvisionKind, Segment

__all__ = [
    "Label",
    "block_owners",
    "provision_blocks",
    "clean_term",
    "definition_start",
    "fold_case",
    "is_title_case",
    "is_upper_text",
    "parse_label",
    "split_provisions",
]

# --------------------------------------------------------------------------------------
# Tunable limits (each with its reason)
# --------------------------------------------------------------------------------------

#: A heading is short.  Longest heading in the Apache, GPL v3 and MPL 2.0 texts is 10 words
#: ("Distributing Source Code Form that is Incompatible With Secondary Licenses"); 20 leaves
#: room for long headings in heading styles while keeping body sentences out.
MAX_HEADING_WORDS = 20
MAX_HEADING_CHARS = 160
#: A heading recognised by title case alone (no formatting at all) must be shorter still:
#: a title-case sentence of 13+ words is more likely a sentence than a heading.
MAX_PLAIN_HEADING_WORDS = 12
#: Emphasised (bold / capitals) lines up to this many words are headings; longer all-caps
#: paragraphs are disclaimers in capitals (the GPL's sections 15 and 16), not headings.
MAX_CAPS_HEADING_WORDS = 15
#: A run-in heading found by text cues alone ("Limitation of Liability. The ...") is at most
#: this long; from the license texts' run-in headings (longest: "Accepting Warranty or
#: Additional Liability", 5 words) with room to spare.
MAX_RUN_IN_WORDS = 10
#: A line after a candidate plain heading counts as body text when it has at least this many
#: words (or ends like a sentence).  Common practice, no source.
MIN_BODY_WORDS = 6

# Words that stay lower case in title case (common practice, no source).
_SMALL_WORDS = frozenset(
    "a an the and or nor but of in on at to for with by from as into onto upon per via vs "
    "than that this these those its is are be not under over within without between "
    "against after before during about".split()
)
# First words that begin sentences rather than headings ("In this Agreement:", "If ...").
_SENTENCE_STARTERS = frozenset(
    "a an the in on at to for by of with from as and or this that these those if unless "
    "where when whereas subject save notwithstanding except each any all neither either "
    "nothing such it its we you they he she there here upon without".split()
)
# Last words that make a run-in phrase an abbreviation rather than a heading ("No. 5").
_ABBREVIATIONS = frozenset(
    "no nos mr mrs ms dr st co inc ltd plc llc corp art sec cl para paras sch e.g i.e etc "
    "vs v approx ref".split()
)

_QUOTE_OPEN = "\"“‘«"
_QUOTE_CLOSE = "\"”’»"

# --------------------------------------------------------------------------------------
# Labels
# --------------------------------------------------------------------------------------

_ROMAN_RE = lazy_compile(r"^M{0,3}(?:CM|CD|D?C{0,3})(?:XC|XL|L?X{0,3})(?:IX|IV|V?I{0,3})$")
_ROMAN_VALUES = {"I": 1, "V": 5, "X": 10, "L": 50, "C": 100, "D": 500, "M": 1000}

_KEYWORDS = {
    # keyword -> (family, rank); lower rank = higher in the hierarchy.
    "part": ("kw", 0),
    "article": ("kw", 1),
    "section": ("kw", 2),
    "clause": ("kw", 2),
    "schedule": ("sched", 0),
    "exhibit": ("sched", 0),
    "annex": ("sched", 0),
    "annexure": ("sched", 0),
    "appendix": ("sched", 0),
    "attachment": ("sched", 0),
    "addendum": ("sched", 0),
}
#: Rank of plain decimal numbers ("7.", "7.2"): the same tier as "Section 7" / "Clause 7".
_DEC_RANK = 2
_LIST_RANK = 3

_KW_RE = lazy_compile(
    r"(?P<kw>(?:part|article|section|clause|schedule|exhibit|annexure|annex|appendix|attachment|addendum))"
    r"(?:\s+(?P<num>\d{1,3}(?:\.\d{1,3})*|[IVXLCDMivxlcdm]{1,7}|[A-Z]{1,2}))?"
    r"(?=\W|$)",
    re.IGNORECASE,
)
# What may follow a keyword label: punctuation, a dash, a tab, two spaces or the end.
_KW_TERMINATOR = lazy_compile(r"\s*[.:]\s*|\s*[-–—]\s+|\s+[-–—]\s*|\t\s*|\s{2,}|\s*$")
_DEC_RE = lazy_compile(r"(?P<dec>\d{1,3}(?:\.\d{1,3})*)(?P<dot>\.)?(?P<sep>[ \t\u00a0]+|$)")
#: A renumbered label glued to its heading: "2.Scope", "3.1.Definitions" (a trailing dot,
#: then a capitalised word; "2.5million" or "1.A" are not).  Common practice, no source.
_GLUED_DEC_RE = lazy_compile(r"(?P<dec>\d{1,3}(?:\.\d{1,3})*)\.(?=[A-Z][a-z])")
#: An all-capitals word of two letters or more: "11 EXPORT RESTRICTIONS Licensee shall".
_CAPS_WORD_RE = lazy_compile(r"[A-Z][A-Z'’&/-]*[A-Z]\b")
#: A word: a run of anything but white space.
_WORD_RE = lazy_compile(r"\S+")
_PAREN_RE = lazy_compile(r"\((?P<tok>[A-Za-z]{1,4}|\d{1,3})\)(?P<sep>[ \t\u00a0]+|$)")
_CLOSE_RE = lazy_compile(r"(?P<tok>[A-Za-z]{1,4}|\d{1,3})\)(?P<sep>[ \t\u00a0]+|$)")
_DOT_RE = lazy_compile(r"(?P<tok>[A-Za-z]{1,4})\.(?P<sep>[ \t\u00a0]+|$)")


def _roman_value(tok: str) -> int | None:
    up = tok.upper()
    if not up or not _ROMAN_RE.match(up) or (tok != up and tok != tok.lower()):
        return None
    total = 0
    for i, ch in enumerate(up):
        v = _ROMAN_VALUES[ch]
        nxt = _ROMAN_VALUES[up[i + 1]] if i + 1 < len(up) else 0
        total += -v if v < nxt else v
    return total


def _letter_value(tok: str) -> int | None:
    """``a`` -> 1 ... ``z`` -> 26, ``aa`` -> 27 (the doubled-letter style); else None."""
    if not tok.isalpha() or not tok.isascii() or len(set(tok)) != 1:
        return None
    if tok != tok.lower() and tok != tok.upper():
        return None
    return 26 * (len(tok) - 1) + (ord(tok[0].lower()) - 96)


@dataclass(frozen=True, slots=True)
class Label:
    """A number label: as written, as the JSON shows it, and how it nests.

    ``family`` is ``"dec"`` (``7``, ``7.2``), ``"kw"`` (``Article IV``, ``Section 3``),
    ``"sched"`` (``Schedule 2``) or ``"list"`` (``(a)``, ``(iv)``, ``a)``, ``1)``, ``A.``).
    ``end`` is the offset in the text where the words after a literal label start (0 for
    an auto-number label, which is not part of the text).
    """

    text: str
    number: str
    end: int
    family: str
    scheme: str
    rank: int
    comps: tuple[int, ...] | None = None
    value: int | None = None
    #: For a list token that is both a letter and a roman numeral ("i", "v", "x"):
    #: the roman reading's scheme and value.
    alt_scheme: str | None = None
    alt_value: int | None = None


def _strip_number(label: str) -> str:
    return label.strip().rstrip(".:").strip()


def _list_label(tok: str, style: str, text: str, end: int) -> Label | None:
    if tok.isdigit():
        return Label(text, _strip_number(text), end, "list", f"{style}-digit", _LIST_RANK,
                     value=int(tok))
    case = "lower" if tok == tok.lower() else "upper"
    if tok != tok.lower() and tok != tok.upper():
        return None
    letter = _letter_value(tok)
    roman = _roman_value(tok)
    if letter is None and roman is None:
        return None
    number = _strip_number(text)
    if letter is not None:
        return Label(text, number, end, "list", f"{style}-{case}-letter", _LIST_RANK, value=letter,
                     alt_scheme=f"{style}-{case}-roman" if roman is not None else None,
                     alt_value=roman)
    return Label(text, number, end, "list", f"{style}-{case}-roman", _LIST_RANK, value=roman)


def _keyword_label(text: str, start: int, *, auto: bool) -> Label | None:
    m = _KW_RE.match(text, start)
    if not m:
        return None
    kw = m.group("kw")
    if not kw[0].isupper():
        return None  # "section 4 applies" is a sentence, not a label
    family, rank = _KEYWORDS[kw.lower()]
    num = m.group("num")
    comps: tuple[int, ...] | None = None
    if num is not None:
        if num[0].isdigit():
            comps = tuple(int(c) for c in num.split("."))
        else:
            roman = _roman_value(num)
            letter = _letter_value(num) if num.isupper() else None
            # "Article IV", "Part II": roman; "Exhibit A", "Part B": letter.
            if roman is not None and (kw.lower() in ("article", "part", "section") or len(num) > 1
                                      or letter is None):
                comps = (roman,)
            elif letter is not None:
                comps = (letter,)
            else:
                return None
    elif family != "sched":
        return None
    end = m.end()
    if auto:
        rest = text[end:]
        if rest.strip(" .:\t-–—"):
            return None
        return Label(text, _strip_number(text), 0, family, f"{family}:{kw.lower()}", rank, comps=comps)
    t = _KW_TERMINATOR.match(text, end)
    if t is not None:
        words_at = t.end()
    elif num is not None and re.match(r"\s+[A-Z\"“‘(]", text[end:]):
        # "Section 4.1 The Vendor shall ..." (but not "Section 2.1 of this License ...").
        words_at = end + (len(text[end:]) - len(text[end:].lstrip()))
    else:
        # "Clause 12 Governing Law": accepted when a title-case heading follows.
        if not text[end:end + 1].isspace():
            return None
        following = text[end:].strip()
        head = re.split(r"(?<=[.:])\s", following, maxsplit=1)[0].rstrip(".:")
        if not head or not is_title_case(head.split()) or head.split()[0].lower() in _SENTENCE_STARTERS:
            return None
        words_at = end + (len(text[end:]) - len(text[end:].lstrip()))
        if num is None:
            return None
    label_text = text[start:end]
    return Label(label_text, _strip_number(label_text), words_at, family, f"{family}:{kw.lower()}",
                 rank, comps=comps)


def _decimal_label(text: str, start: int) -> Label | None:
    """A decimal label typed at *start*: "7.", "7.2", "7\tPrice", "11 EXPORT ...", "2.Scope"."""
    m = _DEC_RE.match(text, start)
    if m:
        comps = tuple(int(c) for c in m.group("dec").split("."))
        sep = m.group("sep")
        after = text[m.end():m.end() + 1]
        if m.group("dot"):
            ok = True
        elif len(comps) >= 2:
            # "7.2 The ..." yes; "2.5 million ..." no.
            ok = not after or not after.islower()
        else:
            # A bare integer needs a tab or wide gap ("7\tPrice", "7  PRICE") or a heading in
            # capitals after it ("11 EXPORT RESTRICTIONS Licensee shall").
            ok = (("\t" in sep or len(sep) >= 2 or not after
                   or _CAPS_WORD_RE.match(text, m.end()) is not None)
                  and not after.islower())
        if ok:
            label_text = text[start:m.end()].rstrip()
            return Label(label_text, _strip_number(label_text), m.end(), "dec", "dec", _DEC_RANK,
                         comps=comps)
    m = _GLUED_DEC_RE.match(text, start)
    if m:
        comps = tuple(int(c) for c in m.group("dec").split("."))
        label_text = text[start:m.end()]
        return Label(label_text, _strip_number(label_text), m.end(), "dec", "dec", _DEC_RANK,
                     comps=comps)
    return None


#: Auto-number labels remembered (:func:`_auto_label`): a document shows a few hundred
#: distinct ones ("1.1.", "(a)"), most of them many times.
AUTO_LABELS_KEPT = 4096


@functools.lru_cache(maxsize=AUTO_LABELS_KEPT)
def _auto_label(body: str) -> Label | None:
    """An auto-number label on its own (stripped), as :func:`parse_label` reads it (a label
    is immutable: the same text gives the same one)."""
    kw = _keyword_label(body, 0, auto=True)
    if kw is not None:
        return kw
    probe = body + " "
    for rx, style in ((_DEC_RE, None), (_PAREN_RE, "paren"), (_CLOSE_RE, "close"), (_DOT_RE, "dot")):
        m = rx.match(probe)
        if m and m.end() == len(probe):
            if style is None:
                comps = tuple(int(c) for c in m.group("dec").split("."))
                return Label(body, _strip_number(body), 0, "dec", "dec", _DEC_RANK, comps=comps)
            lab = _list_label(m.group("tok"), style, body, 0)
            if lab is not None:
                return lab
    return None


def parse_label(text: str, *, auto: bool = False) -> Label | None:
    """The number label at the start of *text*, or None.

    With ``auto=True`` *text* is an auto-number label on its own (``"7.2."``, ``"(a)"``,
    ``"Article IV"``) and must be a label from end to end.  Otherwise *text* is a paragraph
    and the label must be followed by white space (or a separator for keyword labels).

    >>> parse_label("7.2 The Supplier shall").number
    '7.2'
    >>> parse_label("(iv) any loss").scheme
    'paren-lower-roman'
    """
    start = len(text) - len(text.lstrip())
    if start >= len(text):
        return None
    if auto:
        return _auto_label(text.strip())
    ch = text[start]
    if ch.isalpha():
        kw = _keyword_label(text, start, auto=False)
        if kw is not None:
            return kw
    if ch.isdigit():
        dec = _decimal_label(text, start)
        if dec is not None:
            return dec
        m = _CLOSE_RE.match(text, start)
        if m:
            return _list_label(m.group("tok"), "close", text[start:m.end()].rstrip(), m.end())
        return None
    if ch == "(":
        m = _PAREN_RE.match(text, start)
        if m:
            return _list_label(m.group("tok"), "paren", text[start:m.end()].rstrip(), m.end())
        return None
    if ch.isalpha():
        m = _CLOSE_RE.match(text, start)
        if m:
            return _list_label(m.group("tok"), "close", text[start:m.end()].rstrip(), m.end())
        m = _DOT_RE.match(text, start)
        if m:
            return _list_label(m.group("tok"), "dot", text[start:m.end()].rstrip(), m.end())
    return None


# --------------------------------------------------------------------------------------
# Text cues
# --------------------------------------------------------------------------------------


def _first_letter(word: str) -> str | None:
    for ch in word:
        if ch.isalpha():
            return ch
        if ch.isdigit():
            return None
    return None


def is_title_case(words: Sequence[str]) -> bool:
    """True when every word but the small ones ("of", "the", ...) starts with a capital.

    Words without letters (numbers, "&") are ignored; the first word must be capitalised.
    """
    if not words:
        return False
    seen_letter = False
    for i, w in enumerate(words):
        core = w.strip("\"“”‘’'()[]{},.;:!?")
        first = _first_letter(core)
        if first is None:
            continue
        if first.isupper():
            seen_letter = True
            continue
        if i > 0 and core.lower() in _SMALL_WORDS:
            continue
        return False
    return seen_letter


#: The characters ``re.IGNORECASE`` takes for an ASCII letter although ``str.lower`` does
#: not turn them into it (found by trying every code point against every ASCII letter with
#: Python 3.11's ``re``): folded to that letter before lower-casing.
_IGNORECASE_ODD = {"İ": "i", "ı": "i", "ſ": "s"}
_IGNORECASE_FOLD = str.maketrans(_IGNORECASE_ODD)


def fold_case(text: str) -> str:
    """*text* lower-cased so that a word written in lower case is in it wherever a pattern
    with ``re.IGNORECASE`` can match that word (the few letters ``str.lower`` keeps apart
    folded first)."""
    if not text.isascii() and any(ch in text for ch in _IGNORECASE_ODD):
        text = text.translate(_IGNORECASE_FOLD)
    return text.lower()


def _has_letters(text: str) -> bool:
    return any(ch.isalpha() for ch in text)


def is_upper_text(text: str) -> bool:
    """Has *text* two letters or more, all in capitals?  Stops at the first letter that is
    not (a body paragraph: its second character)."""
    letters = 0
    for ch in text:
        if ch.isalpha():
            if not ch.isupper():
                return False
            letters += 1
    return letters >= 2


def _clean_heading(text: str) -> str:
    h = " ".join(text.split())
    h = h.rstrip(" .:;-–—")
    return h


_DEF_VERBS = (
    r"(?:shall\s+be\s+deemed\s+to\s+mean|shall\s+mean|shall\s+have\s+the\s+meanings?|"
    r"has\s+the\s+meanings?|have\s+the\s+meanings?|also\s+means|means|mean|refers\s+to|"
    r"refer\s+to|shall\s+refer\s+to|shall\s+include|includes|include|is\s+defined|are\s+defined)\b"
)
_TERM_Q = r"(?:[\"“](?P<t1>[^\"“”\n]{1,80}?)[\"”]|‘(?P<t2>[^‘’\n]{1,80}?)’)"
_DEF_START_RE = lazy_compile(
    r"\s*(?:(?:to|a|an|the)\s+)?" + _TERM_Q +
    r"(?:\s*\([^()\n]{0,80}\))?"
    r"(?P<colon>\s*[:–—]|\s+-\s)?"
    r"(?(colon)|(?:\s+[\w’'-]+){0,7}?\s*,?\s+" + _DEF_VERBS + ")",
    re.IGNORECASE,
)
_STRONG_DEF_RE = lazy_compile(
    r"\s*" + _TERM_Q + r"(?:\s*\([^()\n]{0,80}\))?\s+"
    r"(?:means|shall\s+mean|has\s+the\s+meaning|shall\s+have\s+the\s+meaning)\b"
)
_LEAD_DEF_RE = lazy_compile(
    r"\s*(?:\([^()\n]{0,80}\))?\s*(?:[:–—]|-\s|,?\s*" + _DEF_VERBS + ")", re.IGNORECASE
)


#: Longest defined term accepted (words); longer quoted text is a quotation, not a term.
MAX_TERM_WORDS = 8


def clean_term(raw: str) -> str | None:
    """A quoted term as a defined term, or None when it cannot be one.

    White space is collapsed and trailing punctuation inside the quotes dropped
    (``"Customer,"``); a leading "The" is dropped when a capitalised word follows (a term
    quoted at the start of a sentence, ``"The Program" refers to`` defines "Program").
    """
    term = " ".join(raw.split()).strip().rstrip(".,;:").strip()
    words = term.split()
    if len(words) >= 2 and words[0] in ("The", "the") and words[1][:1].isupper():
        words = words[1:]
        term = " ".join(words)
    if not words or len(words) > MAX_TERM_WORDS:
        return None
    if not term[:1].isalnum() or not _has_letters(term):
        return None
    return term


def definition_start(text: str, *, lead: str | None = None, strong: bool = False) -> str | None:
    """The term a paragraph defines when it *starts* with a definition, else None.

    Recognised: ``"X" means ...``, ``"X" shall mean``, ``"X" has the meaning given in``,
    ``"X" (or "Y") shall mean``, ``"X" form shall mean``, ``To "x" a work means``,
    ``"X": ...``, straight and curly quotes; and a bold lead-in term (``lead``) followed by
    ``means`` or a colon.  With ``strong=True`` only the unmistakable forms (quoted term at
    the very start followed by means / shall mean / has the meaning) count.
    """
    rx = _STRONG_DEF_RE if strong else _DEF_START_RE
    m = rx.match(text)
    if m:
        term = clean_term(m.group("t1") or m.group("t2") or "")
        if term is not None:
            return term
    if lead and not strong:
        body = text.lstrip()
        cand = lead.strip()
        if body.startswith(cand):
            term = clean_term(cand.strip(_QUOTE_OPEN + _QUOTE_CLOSE + " :–—"))
            tail = body[len(cand):]
            if term is not None and (cand.rstrip().endswith((":", "–", "—")) or _LEAD_DEF_RE.match(tail)):
                return term
    return None


_DEFINITIONS_HEADING_RE = lazy_compile(
    r"^(?:definitions?|defined\s+terms|interpretation|definitions?\s+(?:and|&)\s+\w+|"
    r"\w+\s+(?:and|&)\s+definitions?)$",
    re.IGNORECASE,
)
_DEFINITIONS_INTRO_RE = lazy_compile(
    r"\bfollowing\s+(?:words|terms|expressions|definitions)\b|\bdefinitions\b.{0,40}\bapply\b|"
    r"\bshall\s+have\s+the\s+(?:following\s+)?meanings\b|^in\s+this\s+[\w ]{3,40}:$",
    re.IGNORECASE,
)


def _definitions_intro(text: str) -> bool:
    """Does :data:`_DEFINITIONS_INTRO_RE` match somewhere in *text*?  Searched only where
    the words its branches need are ("following", "meanings", "definitions" and "apply",
    in any case); else only its last branch, anchored at the start, can match."""
    folded = fold_case(text)
    if "following" in folded or "meanings" in folded or ("definitions" in folded and "apply" in folded):
        return _DEFINITIONS_INTRO_RE.search(text) is not None
    return _DEFINITIONS_INTRO_RE.match(text) is not None


_SIGNATURE_RE = lazy_compile(
    r"^(?:in\s+witness\s+(?:whereof|of\s+which)|as\s+witness|signed\s+(?:by|for|on\s+behalf|as)\b|"
    r"executed\s+(?:as\s+a\s+deed|by|on\s+behalf|for)\b|signature\s+page\b|"
    r"this\s+(?:agreement|contract|deed)\s+has\s+been\s+(?:entered\s+into|executed|signed)\b|"
    r"signatures?\s*:?\s*$|for\s+and\s+on\s+behalf\s+of\b)",
    re.IGNORECASE,
)
_PARTIES_HEADING_RE = lazy_compile(r"^(?:the\s+)?(?:parties|between|by\s+and\s+between)\s*:?$", re.IGNORECASE)
_PARTIES_TEXT_RE = lazy_compile(
    r"^(?:this|the)\b.{0,120}?\b(?:agreement|contract|deed|licen[cs]e)\b.{0,160}?"
    r"\b(?:is\s+made|is\s+dated|is\s+entered\s+into|made\s+on|made\s+as\s+of|dated|between)\b"
    r"|^(?:between|by\s+and\s+between)\b",
    re.IGNORECASE | re.DOTALL,
)
_RECITALS_HEADING_RE = lazy_compile(
    r"^(?:recitals?|background|whereas|preliminary\s+statements?|witnesseth)\s*:?$", re.IGNORECASE
)
_RECITAL_TEXT_RE = lazy_compile(r"^(?:whereas|witnesseth)\b", re.IGNORECASE)
_OPERATIVE_RE = lazy_compile(
    r"^(?:now,?\s+therefore|now\s+it\s+is|it\s+is\s+(?:hereby\s+)?agreed|the\s+parties\s+(?:hereby\s+)?agree|"
    r"agreed\s+terms|operative\s+provisions|terms\s+and\s+conditions)\b",
    re.IGNORECASE,
)
_RUN_IN_RE = lazy_compile(r"(?P<head>[^.:;!?\n]{1,120}?)(?P<sep>[.:]|\s[-–—])\s+(?P<next>\S)")


def _heading_like_numbered(block: Block, rest: str, label: Label) -> bool:
    """Is the whole remainder of a numbered paragraph its heading ("7. LIABILITY")?"""
    if len(rest) > MAX_HEADING_CHARS:  # first: a body paragraph is not split into words
        return False
    words = rest.split()
    if not words or len(words) > MAX_HEADING_WORDS:
        return False
    if rest.endswith((",", ";")) or rest[:1] in _QUOTE_OPEN:
        return False
    title = is_title_case(words) and words[0].lower() not in _SENTENCE_STARTERS
    if block.outline_level is not None:
        return title or not rest.endswith((".", ":"))
    if block.emphasised or block.all_caps or is_upper_text(rest):
        return len(words) <= MAX_CAPS_HEADING_WORDS and not rest.endswith(":")
    if label.family == "list":
        return False  # "(b) Customer Data" in a list is an item, not a heading
    if rest.endswith(":") or len(words) > MAX_PLAIN_HEADING_WORDS:
        return False
    return title


def _numbered_heading(block: Block, label: Label, rest: str, *, schedule: bool
                      ) -> tuple[str, int] | None:
    """The heading of a numbered paragraph whose words are *rest*: (heading, offset of the
    words after it), from the emphasised lead-in, the whole line, or text cues."""
    found = _lead_heading(block.lead, label, rest) if block.lead else None
    if found is None and schedule:
        words = rest.split()
        if rest and len(words) <= MAX_CAPS_HEADING_WORDS and not re.search(r"[.;]\s", rest):
            found = (_clean_heading(rest), len(rest))
    if found is None and _heading_like_numbered(block, rest, label):
        found = (_clean_heading(rest), len(rest))
    if found is None and label.family != "list":
        found = _run_in_heading(rest) or _caps_run_in(rest)
    return found


def _run_in_heading(rest: str) -> tuple[str, int] | None:
    """A title-case run-in heading at the start of *rest*: (heading, offset of the words)."""
    m = _RUN_IN_RE.match(rest)
    if not m:
        return None
    head = m.group("head").strip()
    words = head.split()
    if not words or len(words) > MAX_RUN_IN_WORDS:
        return None
    if words[0].lower() in _SENTENCE_STARTERS or head[:1] in _QUOTE_OPEN:
        return None
    if words[-1].lower().rstrip(".") in _ABBREVIATIONS or (len(words[-1]) == 1 and words[-1].isalpha()):
        return None
    if not (is_title_case(words) or is_upper_text(head)):
        return None
    nxt = m.group("next")
    if not (nxt.isupper() or nxt.isdigit() or nxt in _QUOTE_OPEN + "(["):
        return None
    return _clean_heading(head), m.start("next")


#: Connecting words allowed inside a heading in capitals ("TERM AND TERMINATION" has them
#: in capitals too; these are the ones typed in lower case or as symbols).
_CAPS_CONNECTORS = frozenset({"&", "-", "–", "—", "/"})
#: A heading in capitals of one word needs this many letters: shorter capitals are more often
#: an acronym opening the sentence ("GDPR Compliance ...", "VAT Invoices ...") than a heading
#: (so "TERM This Agreement ..." stays unsplit).  Common practice, no source.
MIN_CAPS_HEADING_LETTERS = 5


def _caps_run_in(rest: str) -> tuple[str, int] | None:
    """A run-in heading typed in capitals with no separator: "EXPORT RESTRICTIONS Licensee
    shall ..." -> ("EXPORT RESTRICTIONS", offset of "Licensee").  The words after it must
    start a sentence (a capital, then lower case).  Reads the words only up to the first
    that is not in capitals."""
    count = 0
    last = nxt = None
    for w in _WORD_RE.finditer(rest):
        token = w.group()
        if _CAPS_WORD_RE.fullmatch(token.rstrip(",")) is None and token not in _CAPS_CONNECTORS:
            nxt = w
            break
        count += 1
        if count > MAX_RUN_IN_WORDS:
            return None
        last = w
    if last is None or nxt is None:
        return None
    head = rest[:last.end()]
    word = nxt.group()
    if not (word[:1].isupper() and any(ch.islower() for ch in word)):
        return None
    if count == 1 and sum(ch.isalpha() for ch in head) < MIN_CAPS_HEADING_LETTERS:
        return None
    if head.split()[0].lower() in _SENTENCE_STARTERS or _RECITAL_TEXT_RE.match(head):
        return None
    return _clean_heading(head), nxt.start()


def _lead_heading(lead: str, label: Label | None, rest: str, *, strict: bool = False
                  ) -> tuple[str, int] | None:
    """A run-in heading from the block's emphasised lead-in, if the text starts with it.

    The lead-in is a heading when it ends with a separator (``.``, ``:``, a dash) or the
    words after it start a new sentence ("**Limitation of Liability** The Supplier ...");
    "**The Supplier** shall ..." is emphasis, not a heading.  With ``strict`` (unnumbered
    paragraphs, where a bold start is often mere emphasis) it must also be a short
    title-case phrase that does not open a sentence.
    """
    cand = lead.strip()
    if label is not None and label.end:
        lab = label.text.strip()
        if cand.startswith(lab):
            cand = cand[len(lab):].strip()
    if not cand or cand[:1] in _QUOTE_OPEN or not rest.startswith(cand):
        return None
    words = cand.split()
    if len(words) > MAX_HEADING_WORDS or len(cand) > MAX_HEADING_CHARS:
        return None
    tail = rest[len(cand):].lstrip()
    separated = cand.endswith((".", ":", "-", "–", "—"))
    if not separated and tail and not (tail[0].isupper() or tail[0].isdigit() or tail[0] in _QUOTE_OPEN + "(["):
        return None
    if strict:
        if len(words) > MAX_RUN_IN_WORDS or words[0].lower() in _SENTENCE_STARTERS:
            return None
        if not (is_title_case(words) or is_upper_text(cand)):
            return None
    heading = _clean_heading(cand)
    if not heading or not _has_letters(heading):
        return None
    return heading, len(cand)


def _standalone_heading(block: Block, nxt: Block | None) -> bool:
    """An unnumbered line that is a heading (formatting, capitals or title case + body)."""
    if block.in_table or block.bullet:
        return False
    text = block.text.strip()
    if not text or len(text) > MAX_HEADING_CHARS or not _has_letters(text) or text[:1] in _QUOTE_OPEN:
        return False
    words = text.split()
    if len(words) > MAX_HEADING_WORDS:
        return False
    if text.endswith((",", ";")):
        return False
    if block.outline_level is not None:
        return True
    if block.emphasised or block.all_caps or is_upper_text(text):
        return len(words) <= MAX_CAPS_HEADING_WORDS and not (text.endswith(".") and len(words) > 8)
    if len(words) > MAX_PLAIN_HEADING_WORDS or text.endswith((".", ":", "!", "?")) or "," in text:
        return False
    if not is_title_case(words) or words[0].lower() in _SENTENCE_STARTERS:
        return False
    return nxt is not None and _body_like(nxt)


def _body_like(block: Block) -> bool:
    text = block.text.strip()
    if block.in_table or not text:
        return False
    return len(text.split()) >= MIN_BODY_WORDS or text.endswith((".", ";", ":"))


# --------------------------------------------------------------------------------------
# The splitter
# --------------------------------------------------------------------------------------


@dataclass(slots=True)
class _Draft:
    kind: ProvisionKind
    number: str | None
    heading: str | None
    level: int
    parent: int | None
    term: str | None = None
    segments: list[Segment] = field(default_factory=list)


@dataclass(slots=True)
class _Open:
    """An open provision on the nesting stack."""

    draft: int  # index into the drafts list
    family: str  # dec, kw, sched, list, auto, heading, parties, recital, def
    scheme: str
    rank: int
    level: int
    #: The level a numbered child directly below gets, minus one.
    base: int
    comps: tuple[int, ...] | None = None
    value: int | None = None
    list_id: str | None = None
    list_level: int | None = None
    definitions: bool = False
    #: Outline level of the paragraph (heading styles, Markdown "#"), if any.
    outline: int | None = None
    #: An item of a list inside a table cell: closed when the table ends.
    in_table: bool = False


_CONTAINERS = ("heading", "sched")


class _Splitter:
    def __init__(self, blocks: Sequence[Block]) -> None:
        self.blocks = blocks
        self.drafts: list[_Draft] = []
        self.stack: list[_Open] = []
        self.phase = "front"  # front | body | signature | schedule
        #: Numbered provisions closed by the last unnumbered heading (stack height, entries):
        #: "7.2" after "7.1" / "Exclusions" (a plain sub-heading) continues clause 7.
        self.resumable: tuple[int, list[_Open]] | None = None
        #: Draft that unnumbered paragraphs after a table go to: the provision the table's
        #: cell lists were under (None: the last provision, as usual).
        self.after_table: int | None = None

    # -- helpers ---------------------------------------------------------------------

    def _add_segment(self, draft: _Draft, block: Block, start: int) -> None:
        text = block.text
        while start < len(text) and text[start].isspace():
            start += 1
        end = len(text.rstrip())
        if start < end:
            draft.segments.append(Segment(block.index, start, end))

    def _new(self, kind: ProvisionKind, number: str | None, heading: str | None, level: int,
             parent: int | None, term: str | None = None) -> int:
        self.after_table = None
        self.drafts.append(_Draft(kind, number, heading, level, parent, term))
        return len(self.drafts) - 1

    def _in_definitions(self) -> bool:
        return any(o.definitions for o in self.stack)

    def _front_context(self) -> str | None:
        """"parties" / "recital" when the open provisions are front matter of that kind."""
        for o in reversed(self.stack):
            if o.family in ("parties", "recital"):
                return o.family
            if o.family in ("dec", "kw", "sched", "heading"):
                return None
        return None

    def _close_for_heading(self, outline: int | None) -> None:
        """Close what an unnumbered heading ends: everything down to the innermost schedule,
        except headings of a higher outline level ("Heading 1" encloses "Heading 2")."""
        floor = self._schedule_floor()
        keep = floor
        if outline is not None:
            for i in range(len(self.stack) - 1, floor - 1, -1):
                o = self.stack[i].outline
                if o is not None and o < outline:
                    keep = i + 1
                    break
        closed = self.stack[keep:]
        if any(o.comps is not None for o in closed):
            self.resumable = (keep, closed)
        del self.stack[keep:]

    def _schedule_floor(self) -> int:
        """Stack height that keeps the innermost open schedule (0 when none)."""
        for i in range(len(self.stack) - 1, -1, -1):
            if self.stack[i].family == "sched":
                return i + 1
        return 0

    # -- placing numbered provisions -----------------------------------------------

    def _resolve_ambiguous(self, label: Label) -> Label:
        """(i), (v), (x): a letter when it continues a letter list, else a roman numeral."""
        if label.alt_scheme is None or label.value is None or label.alt_value is None:
            return label
        letter_prev = roman_prev = None
        for o in reversed(self.stack):
            if o.family in ("dec", "kw", "sched", "heading", "def", "parties", "recital"):
                break
            if o.scheme == label.scheme and letter_prev is None:
                letter_prev = o.value
            if o.scheme == label.alt_scheme and roman_prev is None:
                roman_prev = o.value
        as_roman = Label(label.text, label.number, label.end, label.family, label.alt_scheme,
                         label.rank, value=label.alt_value)
        if letter_prev is not None and letter_prev + 1 == label.value:
            return label
        if roman_prev is not None and roman_prev + 1 == label.alt_value:
            return as_roman
        if label.alt_value == 1:
            return as_roman
        if len(label.number.strip("()")) > 1:
            return as_roman  # "(ii)", "(xx)" without a list to continue: roman
        return label

    def _place_auto(self, block: Block) -> tuple[_Open | None, int] | None:
        """Nest an auto-numbered paragraph by its Word list level, if its list is open."""
        lid, lvl = block.list_id, block.list_level
        if lid is None or lvl is None:
            return None
        j = next((i for i in range(len(self.stack) - 1, -1, -1) if self.stack[i].list_id == lid), None)
        if j is None:
            return None
        open_level = self.stack[j].list_level
        if open_level is not None and open_level < lvl:
            # A typed list label opened after the list's item ("(A) You may:") introduces
            # the deeper items that follow: they go under it, as they would in a typed list.
            k = next((i for i in range(len(self.stack) - 1, j, -1)
                      if self.stack[i].family == "list" and self.stack[i].list_id is None), j)
            del self.stack[k + 1:]
            parent = self.stack[k]
            return parent, parent.base + 1
        # The first open item of this list at the new item's level or deeper closes, with
        # everything opened after it (items it introduced, typed labels, definitions).
        m = next((i for i, o in enumerate(self.stack)
                  if o.list_id == lid and o.list_level is not None and o.list_level >= lvl), j)
        sibling = next((o for o in reversed(self.stack[m:]) if o.list_id == lid and o.list_level == lvl), None)
        del self.stack[m:]
        enclosing = self.stack[-1] if self.stack else None
        if sibling is not None:
            return enclosing, sibling.level  # the next item of a list keeps its item's level
        return enclosing, (enclosing.base if enclosing else 0) + 1

    def _resume(self, comps: tuple[int, ...], rank: int) -> tuple[_Open, int] | None:
        """Reopen the clause a plain heading closed when this number continues it."""
        if self.resumable is None or not comps:
            return None
        keep, closed = self.resumable
        if keep > len(self.stack):
            return None
        for k in range(len(closed) - 1, -1, -1):
            o = closed[k]
            if (o.comps is not None and o.family in ("dec", "kw", "auto") and o.rank <= rank
                    and len(o.comps) < len(comps) and comps[:len(o.comps)] == o.comps):
                del self.stack[keep:]
                self.stack.extend(closed[:k + 1])
                self.resumable = None
                return o, o.level + len(comps) - len(o.comps)
        return None

    def _place(self, label: Label, block: Block) -> tuple[_Open | None, int]:
        """Pop the stack to where *label* belongs; return (parent, level)."""
        if block.label is not None:
            placed = self._place_auto(block)
            if placed is not None:
                return placed
        if label.family == "sched":
            self.stack.clear()
            return None, 1
        if label.family in ("dec", "kw"):
            comps = label.comps or ()
            # 1. The open provision whose number is a prefix of this one ("7" for "7.2"),
            #    looking through unnumbered headings but not out of a schedule or article.
            for j in range(len(self.stack) - 1, -1, -1):
                o = self.stack[j]
                if (o.comps is not None and o.family in ("dec", "kw", "auto") and o.rank <= label.rank
                        and len(o.comps) < len(comps) and comps[:len(o.comps)] == o.comps):
                    del self.stack[j + 1:]
                    return o, o.level + len(comps) - len(o.comps)
                if o.family == "sched" or (o.family == "kw" and o.rank < label.rank):
                    break
            resumed = self._resume(comps, label.rank)
            if resumed is not None:
                return resumed
            # 2. Else the innermost enclosing heading, schedule or higher-ranked article.
            for j in range(len(self.stack) - 1, -1, -1):
                o = self.stack[j]
                if o.family in _CONTAINERS or (o.family == "kw" and o.rank < label.rank):
                    del self.stack[j + 1:]
                    return o, o.base + max(1, len(comps))
            self.stack.clear()
            return None, max(1, len(comps))
        # list labels: continue a list of the same style, else open a level below the top.
        for j in range(len(self.stack) - 1, -1, -1):
            o = self.stack[j]
            if o.scheme == label.scheme and o.family in ("list", "auto"):
                del self.stack[j:]
                parent = self.stack[-1] if self.stack else None
                return parent, o.level
            if o.family in ("dec", "kw", "sched", "heading", "def", "parties", "recital"):
                break
        parent = self.stack[-1] if self.stack else None
        return parent, (parent.base if parent else 0) + 1

    # -- block handlers ----------------------------------------------------------------

    def numbered(self, block: Block, label: Label) -> None:
        label = self._resolve_ambiguous(label)
        parent, level = self._place(label, block)
        text = block.text
        pos = label.end
        while pos < len(text) and text[pos].isspace():
            pos += 1
        rest = text[pos:].rstrip()

        kind: ProvisionKind = "clause"
        if label.family == "sched":
            kind = "schedule"
            self.phase = "schedule"
        else:
            ctx = self._front_context()
            if ctx is not None and self.phase == "front" and label.family == "list":
                kind = "parties" if ctx == "parties" else "recital"
            elif self.phase in ("front", "signature") and label.family in ("dec", "kw", "list"):
                self.phase = "body" if not self._schedule_floor() else "schedule"

        term = None
        heading: str | None = None
        if kind == "clause":
            term = definition_start(rest, lead=block.lead, strong=not self._in_definitions())
            if term is not None:
                kind = "definition"
        if term is None:
            found = _numbered_heading(block, label, rest, schedule=kind == "schedule")
            if found is not None and found[0]:
                heading = found[0]
                pos += found[1]

        idx = self._new(kind, label.number or None, heading, level,
                        parent.draft if parent is not None else None, term)
        self._add_segment(self.drafts[idx], block, pos)
        family = label.family
        scheme = label.scheme
        if block.label is not None and label.family == "list" and block.list_id is not None:
            family = "auto" if label.scheme.startswith("auto:") else family
        is_defs = (kind != "definition" and (
            (heading is not None and _DEFINITIONS_HEADING_RE.match(heading) is not None)
            or _definitions_intro(text[pos:].strip())))
        self.stack.append(_Open(
            draft=idx, family=family, scheme=scheme, rank=label.rank, level=level, base=level,
            comps=label.comps, value=label.value, list_id=block.list_id if block.label else None,
            list_level=block.list_level if block.label else None, definitions=is_defs,
            outline=block.outline_level, in_table=block.in_table,
        ))

    def unnumbered_definition(self, block: Block, term: str) -> None:
        # Close the previous unnumbered definition (and anything opened under it).
        for j in range(len(self.stack) - 1, -1, -1):
            if self.stack[j].family == "def":
                del self.stack[j:]
                break
        parent = self.stack[-1] if self.stack else None
        idx = self._new("definition", None, None, 0, parent.draft if parent else None, term)
        self._add_segment(self.drafts[idx], block, 0)
        base = parent.base if parent else 0
        self.stack.append(_Open(draft=idx, family="def", scheme="def", rank=_LIST_RANK, level=0, base=base))

    def heading(self, block: Block) -> None:
        text = block.text.strip()
        heading = _clean_heading(text)
        last = self.drafts[-1] if self.drafts else None
        if (last is not None and last.number is not None and last.heading is None
                and not last.segments and self.stack and self.stack[-1].draft == len(self.drafts) - 1):
            # "SCHEDULE 1" / "SERVICES", "ARTICLE IV" / "DEFINITIONS": the heading of the line above.
            last.heading = heading
            if _DEFINITIONS_HEADING_RE.match(heading):
                self.stack[-1].definitions = True
            return
        if not self.drafts and self.phase == "front":
            self._new("title", None, None, 0, None)
            self._add_segment(self.drafts[-1], block, 0)
            return
        family = "heading"
        kind: ProvisionKind = "other"
        if self.phase == "front" and _PARTIES_HEADING_RE.match(heading):
            kind = family = "parties"
        elif self.phase == "front" and _RECITALS_HEADING_RE.match(heading):
            kind = family = "recital"
        elif _OPERATIVE_RE.match(heading) and self.phase == "front":
            self.phase = "body"
        self._close_for_heading(block.outline_level)
        parent = self.stack[-1] if self.stack else None
        idx = self._new(kind, None, heading, 0, parent.draft if parent else None)
        base = parent.base if parent else 0
        self.stack.append(_Open(draft=idx, family=family, scheme=family, rank=-1, level=0, base=base,
                                definitions=_DEFINITIONS_HEADING_RE.match(heading) is not None,
                                outline=block.outline_level))

    def plain(self, block: Block, nxt: Block | None) -> None:
        text = block.text.strip()
        if block.in_table:
            self._append(block)
            return
        if self.phase != "signature" and self.drafts and _SIGNATURE_RE.match(text):
            self.stack.clear()
            idx = self._new("signature", None, None, 0, None)
            self._add_segment(self.drafts[idx], block, 0)
            self.phase = "signature"
            return
        if self.phase != "signature":
            term = definition_start(block.text, lead=block.lead, strong=not self._in_definitions())
            if term is not None:
                self.unnumbered_definition(block, term)
                return
            if self.phase in ("body", "schedule") and not block.bullet:
                found = (_lead_heading(block.lead, None, text, strict=True) if block.lead
                         else _caps_run_in(text))
                if found is not None:
                    self._headed_paragraph(block, found)
                    return
            if (_standalone_heading(block, nxt)
                    or (not self.drafts and _title_like(block))):
                self.heading(block)
                return
        if self.phase == "front":
            if _PARTIES_TEXT_RE.match(text) and not any(d.kind == "parties" for d in self.drafts):
                self.stack.clear()
                idx = self._new("parties", None, None, 0, None)
                self._add_segment(self.drafts[idx], block, 0)
                self.stack.append(_Open(draft=idx, family="parties", scheme="parties", rank=-1,
                                        level=0, base=0))
                return
            if _RECITAL_TEXT_RE.match(text):
                for j in range(len(self.stack) - 1, -1, -1):
                    if self.stack[j].family == "recital" and self.drafts[self.stack[j].draft].heading:
                        del self.stack[j + 1:]
                        break
                else:
                    self.stack.clear()
                parent = self.stack[-1] if self.stack else None
                idx = self._new("recital", None, None, 0, parent.draft if parent else None)
                self._add_segment(self.drafts[idx], block, 0)
                return
            if _OPERATIVE_RE.match(text):
                self.stack.clear()
                idx = self._new("other", None, None, 0, None)
                self._add_segment(self.drafts[idx], block, 0)
                self.phase = "body"
                return
        self._append(block)

    def _headed_paragraph(self, block: Block, found: tuple[str, int]) -> None:
        """An unnumbered paragraph with an emphasised run-in heading starts a provision."""
        self._close_for_heading(block.outline_level)
        parent = self.stack[-1] if self.stack else None
        idx = self._new("other", None, found[0], 0, parent.draft if parent else None)
        start = len(block.text) - len(block.text.lstrip()) + found[1]
        self._add_segment(self.drafts[idx], block, start)
        base = parent.base if parent else 0
        self.stack.append(_Open(draft=idx, family="heading", scheme="heading", rank=-1, level=0, base=base,
                                definitions=_DEFINITIONS_HEADING_RE.match(found[0]) is not None))

    def _append(self, block: Block) -> None:
        if not self.drafts:
            self._new("other", None, None, 0, None)
        target = self.after_table if self.after_table is not None else len(self.drafts) - 1
        self._add_segment(self.drafts[target], block, 0)

    def _close_table_items(self) -> None:
        """The table has ended: its cell-list items close, and words after it go back to the
        provision the table belongs to."""
        if not (self.stack and self.stack[-1].in_table):
            return
        while self.stack and self.stack[-1].in_table:
            self.stack.pop()
        self.after_table = self.stack[-1].draft if self.stack else None

    # -- driver ------------------------------------------------------------------------

    def run(self) -> tuple[Provision, ...]:
        blocks = [b for b in self.blocks if b.text.strip() or b.label is not None]
        for i, block in enumerate(blocks):
            nxt = blocks[i + 1] if i + 1 < len(blocks) else None
            if not block.in_table:
                self._close_table_items()
            label = _label_of(block)
            if label is not None:
                self.numbered(block, label)
            elif block.text.strip():
                self.plain(block, nxt)
        return self._finish()

    def _finish(self) -> tuple[Provision, ...]:
        by_index = {b.index: b for b in self.blocks}
        out = []
        for i, d in enumerate(self.drafts):
            text = "\n".join(by_index[s.block].text[s.start:s.end] for s in d.segments)
            out.append(Provision(
                id=f"p{i + 1}", kind=d.kind, number=d.number, heading=d.heading, level=d.level,
                parent=f"p{d.parent + 1}" if d.parent is not None else None, text=text,
                term=d.term if d.kind == "definition" else None, segments=tuple(d.segments),
            ))
        return tuple(out)


def _title_like(block: Block) -> bool:
    """The first line of a document is its title when it looks like one."""
    text = block.text.strip()
    words = text.split()
    if block.in_table or not _has_letters(text) or len(words) > MAX_PLAIN_HEADING_WORDS:
        return False
    if block.outline_level is not None or block.emphasised or is_upper_text(text):
        return True
    return not text.endswith((".", ",", ";", ":")) and is_title_case(words)


def _label_of(block: Block) -> Label | None:
    """The block's label: its auto-number label, else one typed at the start of its text.

    In a table cell only a list (an auto-number label) numbers a paragraph: typed text that
    looks like a label ("1.", "(a)") is a cell's content, and a cell list's items are list
    items under the provision the table belongs to, whatever their labels look like."""
    if block.label is not None and not block.bullet:
        lab = None if block.in_table else parse_label(block.label, auto=True)
        if lab is not None:
            return lab
        text = block.label.strip()
        number = _strip_number(text)
        if not number:
            return None
        scheme = f"auto:{block.list_id}:{block.list_level}"
        return Label(text, number, 0, "list", scheme, _LIST_RANK)
    if block.in_table:
        return None
    return parse_label(block.text)


def split_provisions(blocks: Sequence[Block], *, source: str) -> tuple[Provision, ...]:
    """The provisions of a document whose paragraphs are *blocks* (see the module doc).

    *source* names the document (for messages); the result depends on the blocks only.
    Provision ids are ``"p1"``, ``"p2"``, ... in document order, and every provision's
    ``segments`` locate its text in the blocks exactly.
    """
    del source  # the split depends on the blocks alone
    return _Splitter(blocks).run()


# --------------------------------------------------------------------------------------
# The blocks each provision occupies (the writers edit them; the line model learns from them)
# --------------------------------------------------------------------------------------


def _norm_heading(text: str) -> str:
    return " ".join(text.split()).strip().rstrip(".:").casefold()


#: Longest literal label typed before a heading on its own line ("12.", "Article IV",
#: "Schedule 2 -"); longer prefixes mean the line says more than the heading.
_HEADING_PREFIX_MAX = 14


def _is_heading_line(text: str, want: str) -> bool:
    got = _norm_heading(text)
    if got == want:
        return True
    return got.endswith(" " + want) and len(got) - len(want) <= _HEADING_PREFIX_MAX


def block_owners(doc: Document) -> dict[int, tuple[str, int]]:
    """block -> (provision id, part): part -1 is a standalone heading line of the provision,
    0, 1, ... its text blocks in order.

    Text blocks come from the segments.  A block holding only a provision's heading is owned
    by it: the block right before its first text block, or, for a provision with no text of
    its own ("7. PAYMENT" above 7.1), the first unowned block after the previous
    provision's blocks whose text is the heading.  O(blocks + provisions).
    """
    owners: dict[int, tuple[str, int]] = {}
    own_blocks: dict[str, list[int]] = {}
    for prov in doc.provisions:
        seen: list[int] = []
        for s in prov.segments:
            if s.block not in seen:
                seen.append(s.block)
        for k, b in enumerate(seen):
            if b not in owners:
                owners[b] = (prov.id, k)
                own_blocks.setdefault(prov.id, []).append(b)
    cursor = 0
    for prov in doc.provisions:
        blocks = sorted(own_blocks.get(prov.id, []))
        if prov.heading:
            want = _norm_heading(prov.heading)
            if blocks:
                b = blocks[0] - 1
                if b >= 0 and b not in owners and _is_heading_line(doc.blocks[b].text, want):
                    owners[b] = (prov.id, -1)
            else:
                b = cursor
                while b < len(doc.blocks) and b not in owners:
                    if _is_heading_line(doc.blocks[b].text, want):
                        owners[b] = (prov.id, -1)
                        blocks = [b]
                        break
                    b += 1
        if blocks:
            cursor = max(blocks) + 1
    return owners


def provision_blocks(doc: Document, prov: Provision, *,
                     owners: dict[int, tuple[str, int]] | None = None) -> list[int]:
    """The blocks a provision occupies, in order: a standalone heading line (if any), then
    the blocks of its segments."""
    table = owners if owners is not None else block_owners(doc)
    return sorted(b for b, (pid, _) in table.items() if pid == prov.id)
