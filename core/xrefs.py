"""Typed cross-references: find them in a provision's words, resolve them to provisions, and
keep them true when a change shifts the numbering.

When the reviewer restores a clause the draft deleted, or strikes one it added, the
counter-draft's automatic numbering moves, and a typed "Section 9.1" or "clause 12(b)" then
names the wrong clause.  This module finds such references, says which provision each
number names, and plans the edits (with their reasons) that keep them true; the .docx
writer turns the edits into tracked changes and the issues into comments.  Pure functions
over :mod:`core.model` dataclasses: no XML, no Qt.

What counts as a reference
--------------------------
A keyword (any case, singular or plural: clause, sub-clause, section, sub-section,
paragraph, sub-paragraph, article, part, schedule, annex, annexure, appendix, exhibit,
attachment) followed by one or more numbers:

* a clause number with its items: ``7.2``, ``9(b)``, ``3.1(a)(ii)``, ``2(a) (4)``, and the
  older ``6b`` (item b of 6); an article or part may be in roman figures (``Article IV``),
  a schedule, annex, appendix, exhibit or part a capital letter (``Annex B``);
* items alone, which are *relative* (they count among the enclosing provision's items):
  ``sub-clause (iii)``, ``paragraph (c) above``;
* lists and ranges: ``Sections 3, 4 and 7``, ``clauses 2.1, 2.3 or 2.5``, ``Sections 3 to
  5``, ``clauses 4.1 - 4.3``, ``Clauses 7 through 9``; an item after a number continues it
  (``Sections 4(a) and (b)``: the second number is 4(b)).

After the numbers a reference may say ``above``/``below`` and may be qualified: ``of this
Agreement`` (the document's own clauses), ``of this Schedule`` (the enclosing one), ``of
Schedule 2`` / ``of Part 3 of Exhibit A`` (inside that container).  A reference to another
instrument is *external* and is never rewritten: ``of the Companies Act``, ``of the GNU
GPL`` (a capitalised name with a word such as Act, Regulation, Directive, Code, Treaty, or
an acronym), ``C.F.R. Sections 730 through 774`` (after a statute citation).  Not
references: a number followed by a unit or a month (``clause 3 days``, ``Schedule 1 January
2024``), an amount (``Section 5,000``), a keyword without a number (``this clause``: it
names no number, so no renumbering can make it untrue).  Not read: a number with a capital
suffix (``clause 14A``; core.structure does not number provisions so either) and an item
parted from its number by a space (``clause 5 (a)`` is read as clause 5).

How a number is resolved
------------------------
Full numbers are :func:`core.docinfo.build_docinfo`'s (``"9.1(b)"``, keyword
removed), looked up in namespaces (clauses, articles, parts, schedules; a clause number
falls back to the articles and back, as documents mix "Article 7" and "Section 7.2").  When
several provisions carry the number (a schedule's own paragraph 1 and clause 1), the
qualifier decides, then the referring provision's own part (the body, or its schedule),
then ``above``/``below``; what remains is *ambiguous*.  A relative item is looked for among
the enclosing provision's items, then its siblings, then up the parents.  When the last
items are not provisions but a run-on list in the words (``Section 2.3(b)(i)`` where (i)
is inline), the reference resolves to the deepest provision with the rest as ``tail``.

Cost: finding is one regular-expression pass over the text.  Resolving uses an index of
the document built once (O(provisions), kept for the few documents used last) and dict
look-ups; a relative item walks up the parents (bounded by the nesting depth).  Planning the
renumbering of a whole document is O(total text length + provisions).
"""

from __future__ import annotations

import re
import threading
from collections import OrderedDict
from collections.abc import Callable, Mapping
from dataclasses import dataclass

from .docinfo import DocInfo, build_docinfo, item_label
from .labels import MAX_DEPTH
from .lazyre import compile_pattern, lazy_compile
from .model import Document, Provision, Segment

__all__ = [
    "ISSUE_KINDS",
    "RESOLUTION_STATUSES",
    "RefNumber",
    "Reference",
    "ReferenceEdit",
    "ReferenceIssue",
    "Resolution",
    "Translation",
    "find_references",
    "numbered_in",
    "renumber_references",
    "resolve",
    "translate_references",
]

RESOLUTION_STATUSES: tuple[str, ...] = ("found", "missing", "ambiguous", "external")
#: Why a reference cannot be kept true by an edit: its target is removed by the change
#: ("gone"), several provisions carry its number ("ambiguous"), no provision does, before
#: the change already ("missing"), a range now spans a different number of provisions
#: ("range"), or precedent wording names a provision the target document lacks
#: ("no-counterpart").
ISSUE_KINDS: tuple[str, ...] = ("gone", "ambiguous", "missing", "range", "no-counterpart")

# --------------------------------------------------------------------------------------
# What a reference looks like (common practice in English-language agreements, no source)
# --------------------------------------------------------------------------------------

#: Keyword as typed (lower case, any plural) -> its canonical singular.
_KEYWORDS: dict[str, str] = {
    "clause": "clause", "clauses": "clause", "sub-clause": "sub-clause",
    "sub-clauses": "sub-clause", "subclause": "sub-clause", "subclauses": "sub-clause",
    "section": "section", "sections": "section", "sub-section": "sub-section",
    "sub-sections": "sub-section", "subsection": "sub-section", "subsections": "sub-section",
    "paragraph": "paragraph", "paragraphs": "paragraph", "sub-paragraph": "sub-paragraph",
    "sub-paragraphs": "sub-paragraph", "subparagraph": "sub-paragraph",
    "subparagraphs": "sub-paragraph", "article": "article", "articles": "article",
    "part": "part", "parts": "part", "schedule": "schedule", "schedules": "schedule",
    "annex": "annex", "annexes": "annex", "annexe": "annex", "annexure": "annex",
    "annexures": "annex", "appendix": "appendix", "appendices": "appendix",
    "appendixes": "appendix", "exhibit": "exhibit", "exhibits": "exhibit",
    "attachment": "attachment", "attachments": "attachment",
}
#: Which numbering each keyword counts in.
_NAMESPACE: dict[str, str] = {
    "clause": "clause", "sub-clause": "clause", "section": "clause", "sub-section": "clause",
    "paragraph": "clause", "sub-paragraph": "clause", "article": "article", "part": "part",
    "schedule": "schedule", "annex": "schedule", "appendix": "schedule",
    "exhibit": "schedule", "attachment": "schedule",
}
#: Where to look, in order, for a number in each namespace: agreements mix "Article 7"
#: with "Section 7.2" and call an article a section ("Section 7") and back.
_LOOKUP_ORDER: dict[str, tuple[str, ...]] = {
    "clause": ("clause", "article"), "article": ("article", "clause"),
    "part": ("part",), "schedule": ("schedule",),
}
#: Namespaces whose numbers may be roman (Article IV, Part II): compared by value.
_ROMAN_NAMESPACES = frozenset({"article", "part"})
#: Namespaces whose numbers may be a capital letter (Annex B, Part A).
_LETTER_NAMESPACES = frozenset({"schedule", "part"})
#: Keywords of a label at the start of a provision number ("Article IV", "Exhibit A").
_LABEL_KEYWORD_RE = compile_pattern(r"^\s*([A-Za-z]+)\s*(?=[0-9A-Z])")

_KEYWORD_RE = compile_pattern(
    r"(?<![\w-])(?P<kw>sub-?clauses?|clauses?|sub-?sections?|sections?|sub-?paragraphs?|"
    r"paragraphs?|articles?|parts?|schedules?|annexures?|annexes|annexe|annex|appendix|"
    r"appendices|appendixes|exhibits?|attachments?)"
    r"(?:[^\S\n]+\n?[^\S\n]*|\n[^\S\n]*)",  # the gap: white space, at most one line break
    re.IGNORECASE)
#: A clause number (at most three digits a component: "Section 2006" is a year, "Section
#: 1201" a statute's) with an optional run-on item letter ("6b"), or a roman figure or a
#: capital letter (kept only where the namespace allows it).
_HEAD_RE = compile_pattern(
    r"(?P<dec>\d{1,3}(?:\.\d{1,3})*)(?P<bare>[a-z](?!\w))?|(?P<alpha>[IVXLCDM]{1,7}|[A-Z])(?!\w)")
#: An item in brackets, after at most one space or line break: "(b)", "(iv)", "(A)", "(2)".
_ITEM_RE = compile_pattern(r"(?P<gap>\s?)\((?P<tok>\d{1,3}|[a-z]{1,7}|[A-Z]{1,7})\)")
#: What joins the numbers of a list or a range.
_JOIN_RE = compile_pattern(
    r"[^\S\n]*(?:(?P<range>to|through|thru|until|[-\u2010-\u2015\u2212])|"
    r"(?P<list>,[^\S\n]*(?:and/or|and|or)?|and/or|and|or|&))[^\S\n]*", re.IGNORECASE)
#: After a number, words that make it a quantity or a date rather than a reference.
_QUANTITY_AFTER_RE = compile_pattern(
    r"\s*(?:%|per\s*cent\b|percent\b|(?:calendar\s+|business\s+|working\s+|clear\s+)?"
    r"(?:days?|weeks?|months?|years?|hours?|minutes?|times)\b)|,\d{3}(?!\d)", re.IGNORECASE)
_DATE_AFTER_RE = compile_pattern(
    r"\s+(?:January|February|March|April|May|June|July|August|September|October|November|"
    r"December)(?:\s+|,\s*)\d{2,4}\b")
_DIRECTION_RE = compile_pattern(r"[^\S\n]*,?[^\S\n]*(?P<dir>above|below)\b", re.IGNORECASE)
_HERE_RE = compile_pattern(r"[^\S\n]+(?:hereof|hereto|herein|hereunder)\b", re.IGNORECASE)
_QUALIFIER_RE = compile_pattern(r"[^\S\n]*,?\s+(?:of|in|under|to|from)\s+", re.IGNORECASE)
_THIS_RE = compile_pattern(r"(?:this|these)\s+(?P<word>[A-Za-z-]+)", re.IGNORECASE)
#: A capitalised name after "of": "the Companies Act 2006", "the GNU GPL", "the Treaty on
#: the Functioning of the European Union", "Regulation (EU) 2016/679".
_NAME_RE = lazy_compile(  # compiling it takes longer than most reviews' use of it
    r"(?:(?i:the|that|such|said)\s+)?(?P<name>(?:[A-Z][\w.&'\u2019/-]*)"
    r"(?:\s+(?:[A-Z][\w.&'\u2019/-]*|\([A-Z][\w.]*\)|of|and|for|on|the|in|\d{1,4}(?:/\d+)?))*)")
#: Words that make a name another instrument (common practice, no source).
_INSTRUMENT_WORDS = frozenset(
    "Act Acts Regulation Regulations Directive Code Treaty Convention Rules Order Statute "
    "Statutes Law Laws Ordinance Constitution Decree Recommendation Protocol".split())
#: Names a document gives itself ("of the Agreement"): the document's own clauses.
_SELF_WORDS = frozenset(
    "Agreement Contract Deed License Licence Terms Conditions Document Schedule".split())
_ACRONYM_RE = compile_pattern(r"[A-Z][A-Z0-9.&-]*[A-Z0-9]\.?")
#: Another instrument named right before the keyword: a code citation ("C.F.R. Sections
#: 730 through 774") or a capitalised name and a comma ("the Companies Act 2006, section
#: 16", "the GNU Affero General Public License, section 13", "... License version 2,
#: section 3"), unless "this" names it.
_CITATION_BEFORE_RE = compile_pattern(
    r"(?:\bU\.?\s?S\.?\s?C\.?|\bC\.?\s?F\.?\s?R\.?)\s*$|(?:(?P<pre>\w+)\s+)?"
    r"(?:(?:[A-Z][\w-]*\s+){0,8}(?:Act|Acts|Code|Regulations?|Directive|Treaty|Convention|Rules|"
    r"Order)|(?:[A-Z][\w-]*\s+){1,8}(?:License|Licence|Agreement|Contract))"
    r"(?:\s+\d{4}|\s+(?:version|v\.?)\s*\d+(?:\.\d+)?)?\s*,\s*$")
#: How far back another instrument's name is looked for (characters: eight words).
_CITATION_WINDOW = 80
#: An acronym right before the keyword names another instrument: "FAR Part 27", "GDPR
#: Article 28" (not in a passage set in capitals, where every word is in capitals).
_ACRONYM_BEFORE_RE = compile_pattern(r"(?<![\w.])[A-Z][A-Z0-9&-]*[A-Z0-9]\s+$")
#: A number followed by a colon and figures is a statute's ("article 7:900 Civil Code").
_STATUTE_NUMBER_AFTER_RE = compile_pattern(r":\d")

_ROMAN_RE = compile_pattern(r"^M{0,3}(?:CM|CD|D?C{0,3})(?:XC|XL|L?X{0,3})(?:IX|IV|V?I{0,3})$")
_ROMAN_VALUES = (("M", 1000), ("CM", 900), ("D", 500), ("CD", 400), ("C", 100), ("XC", 90),
                 ("L", 50), ("XL", 40), ("X", 10), ("IX", 9), ("V", 5), ("IV", 4), ("I", 1))


# --------------------------------------------------------------------------------------
# The results
# --------------------------------------------------------------------------------------

@dataclass(frozen=True, slots=True)
class RefNumber:
    """One number of a reference.  ``text[start:end]`` is the number as typed (``"9.1(b)"``,
    ``"(iii)"``, ``"6b"``, ``"IV"``); ``number`` is it normalised: without spaces, a run-on
    item in brackets (``"6(b)"``) and an item that continues the previous number completed
    (``"4(b)"`` for the ``"(b)"`` of ``"Sections 4(a) and (b)"``)."""

    start: int
    end: int
    number: str
    #: True for items that count among the enclosing provision's ("(c) above").
    relative: bool = False
    #: How it joins the previous number: "" (the first), "list" or "range".
    link: str = ""


@dataclass(frozen=True, slots=True)
class Reference:
    """A typed cross-reference: ``text[start:end]`` runs from the keyword to the last number
    (``"Sections 3.1, 3.2, 3.3, and 3.4"``)."""

    start: int
    end: int
    keyword: str  # canonical singular: "section", "sub-clause", "schedule", ...
    numbers: tuple[RefNumber, ...]
    #: A reference to another instrument ("Section 16 of the Companies Act"): never rewritten.
    external: bool = False
    direction: str = ""  # "above", "below" or ""
    #: The qualifier, when there is one: ("document", "") for "of this Agreement",
    #: ("enclosing", namespace) for "of this Schedule", (namespace, number) for "of
    #: Schedule 2" (namespace one of "clause", "article", "part", "schedule").
    scope: tuple[str, str] | None = None

    @property
    def is_range(self) -> bool:
        return any(n.link == "range" for n in self.numbers)


@dataclass(frozen=True, slots=True)
class Resolution:
    """What one number of a reference names (``status`` one of RESOLUTION_STATUSES)."""

    number: RefNumber
    status: str
    target: str | None = None  # provision id when found
    candidates: tuple[str, ...] = ()  # provision ids when ambiguous
    #: Items below the target that are words of its text, not provisions: "(i)".
    tail: str = ""


@dataclass(frozen=True, slots=True)
class ReferenceEdit:
    """Replace ``old`` by ``new`` to keep a reference true.  ``start``/``end`` are offsets in
    the provision's ``text`` (``part == "text"``) or ``heading``; ``at`` is the same span in
    the blocks (``doc.blocks[at.block].text[at.start:at.end] == old``), None when the blocks
    do not show it (a document without blocks, a heading not found in them)."""

    provision: str
    part: str  # "text" or "heading"
    start: int
    end: int
    old: str  # "12" of "clause 12(b)": only the part of the number that changes
    new: str  # "13"
    target: str  # id of the provision referred to
    reason: str  # "clause 12(b) is now clause 13(b)"
    at: Segment | None = None


@dataclass(frozen=True, slots=True)
class ReferenceIssue:
    """A reference that no edit can keep true; ``start``/``end`` span the whole reference
    (keyword to last number) in the part, ``at`` the same in the blocks when known."""

    provision: str
    part: str  # "text" or "heading"
    start: int
    end: int
    words: str  # the reference as typed: "Sections 5.1 or 5.2"
    number: str  # the number concerned ("5.2"); "" for the reference as a whole
    kind: str  # one of ISSUE_KINDS
    why: str
    at: Segment | None = None


@dataclass(frozen=True, slots=True)
class Translation:
    """Wording with its references rewritten (``edits`` and ``issues`` give offsets in the
    wording as it was given, with ``provision`` the source provision's id)."""

    text: str
    edits: tuple[ReferenceEdit, ...]
    issues: tuple[ReferenceIssue, ...]


# --------------------------------------------------------------------------------------
# Numbers
# --------------------------------------------------------------------------------------

def _roman_value(tok: str) -> int | None:
    up = tok.upper()
    if not up or not _ROMAN_RE.match(up) or (tok != up and tok != tok.lower()):
        return None
    total, i = 0, 0
    for sym, val in _ROMAN_VALUES:
        while up.startswith(sym, i):
            total += val
            i += len(sym)
    return total


#: Single letters read as roman figures after "Article" or "Part"; any other single capital
#: there is a letter ("Part C" is the third part, not the hundredth).
_ROMAN_LETTERS = frozenset("IVX")


def _roman_head(head: str) -> int | None:
    """The value of an article's or part's roman number ("IV" -> 4), None for a letter."""
    if len(head) == 1 and head.upper() not in _ROMAN_LETTERS:
        return None
    return _roman_value(head)


def _roman(value: int, *, upper: bool) -> str:
    out = []
    for sym, val in _ROMAN_VALUES:
        while value >= val:
            out.append(sym)
            value -= val
    s = "".join(out)
    return s if upper else s.lower()


def _item_ok(tok: str) -> bool:
    """A bracketed item label: digits, a letter, a doubled letter ("aa") or a roman figure."""
    if tok.isdigit():
        return True
    if len(set(tok)) == 1 and len(tok) <= 2:
        return True
    return _roman_value(tok) is not None


def _split(number: str) -> tuple[str, tuple[str, ...]]:
    """``"9.1(b)(ii)"`` -> ``("9.1", ("b", "ii"))``; a relative ``"(c)"`` has head ``""``."""
    cut = number.find("(")
    head = number if cut < 0 else number[:cut]
    items = tuple(re.findall(r"\(([^()]*)\)", number[len(head):]))
    return head, items


def _join(head: str, items: tuple[str, ...]) -> str:
    return head + "".join(f"({t})" for t in items)


def _canonical(number: str, namespace: str) -> str:
    """The look-up form of a full number: roman articles and parts by value ("IV" -> "4")."""
    head, items = _split("".join(number.split()))
    if namespace in _ROMAN_NAMESPACES and head.isalpha() and head.isupper():
        value = _roman_head(head)
        if value is not None:
            head = str(value)
    return _join(head, items)


# --------------------------------------------------------------------------------------
# Finding references
# --------------------------------------------------------------------------------------

def find_references(text: str) -> tuple[Reference, ...]:
    """Every typed cross-reference in *text*, in order (see the module's notes for the forms).

    >>> [(r.keyword, [n.number for n in r.numbers]) for r in find_references(
    ...     "subject to clauses 4(a) and (b) and Schedule 2")]
    [('clause', ['4(a)', '4(b)']), ('schedule', ['2'])]
    """
    out: list[Reference] = []
    for km in _KEYWORD_RE.finditer(text):
        ref = _read_reference(text, km)
        if ref is not None:
            out.append(ref)
    return tuple(out)


def _read_reference(text: str, km: re.Match[str]) -> Reference | None:
    keyword = _KEYWORDS[km.group("kw").lower()]
    namespace = _NAMESPACE[keyword]
    first = _read_number(text, km.end(), namespace, previous=None, link="")
    if first is None:
        return None
    numbers = [first]
    while True:
        jm = _JOIN_RE.match(text, numbers[-1].end)
        if jm is None:
            break
        link = "range" if jm.group("range") else "list"
        nxt = _read_number(text, jm.end(), namespace, previous=numbers[-1], link=link)
        if nxt is None:
            break
        numbers.append(nxt)
    end = numbers[-1].end
    direction = ""
    dm = _DIRECTION_RE.match(text, end)
    after = end
    if dm is not None:
        direction = dm.group("dir").lower()
        after = dm.end()
    scope, external = _qualifier(text, after, capitals=km.group("kw").isupper())
    before = text[max(0, km.start() - _CITATION_WINDOW):km.start()]
    cm = _CITATION_BEFORE_RE.search(before)
    if cm is not None and (cm.group("pre") or "").lower() not in ("this", "these"):
        external = True
    if not km.group("kw").isupper() and _ACRONYM_BEFORE_RE.search(before):
        external = True
    return Reference(km.start(), end, keyword, tuple(numbers), external=external,
                     direction=direction, scope=None if external else scope)


def _read_number(text: str, pos: int, namespace: str, *, previous: RefNumber | None,
                 link: str) -> RefNumber | None:
    """The number at *pos* (None when there is none, or it reads as a quantity or a date)."""
    head = ""
    end = pos
    hm = _HEAD_RE.match(text, pos)
    if hm is not None and hm.group("alpha") is not None:
        alpha = hm.group("alpha")
        roman_ok = namespace in _ROMAN_NAMESPACES and _roman_head(alpha) is not None
        letter_ok = namespace in _LETTER_NAMESPACES and len(alpha) == 1
        if not (roman_ok or letter_ok):
            hm = None
    if hm is not None:
        head = hm.group("dec") or hm.group("alpha")
        end = hm.end()
    items: list[str] = [hm.group("bare")] if hm is not None and hm.group("bare") else []
    while True:
        im = _ITEM_RE.match(text, end)
        if im is None or not _item_ok(im.group("tok")) or (im.group("gap") and not items):
            break  # a space may part two items ("2(a) (4)"), not a number from its first item
        items.append(im.group("tok"))
        end = im.end()
    if not head and not items:
        return None
    if end < len(text) and (text[end].isalnum() or text[end] == "_"
                            or _STATUTE_NUMBER_AFTER_RE.match(text, end)):
        return None
    if head and (_QUANTITY_AFTER_RE.match(text, end) or _DATE_AFTER_RE.match(text, end)):
        return None
    relative = False
    if head:
        number = _join(head, tuple(items))
    elif previous is not None and not previous.relative:
        # "Sections 4(a) and (b)": the item continues the previous number.
        p_head, p_items = _split(previous.number)
        number = _join(p_head, (p_items[:-1] if p_items else p_items) + tuple(items))
    else:
        number, relative = _join("", tuple(items)), True
    return RefNumber(pos, end, number, relative=relative, link=link)


def _qualifier(text: str, pos: int, *, capitals: bool) -> tuple[tuple[str, str] | None, bool]:
    """(scope, external) from the words after the numbers.  In a passage set in capitals
    (*capitals*) every name looks like an acronym, so acronyms do not count there."""
    if _HERE_RE.match(text, pos):
        return ("document", ""), False
    qm = _QUALIFIER_RE.match(text, pos)
    if qm is None:
        return None, False
    at = qm.end()
    tm = _THIS_RE.match(text, at)
    if tm is not None:
        word = _KEYWORDS.get(tm.group("word").lower())
        return (("enclosing", _NAMESPACE[word]) if word else ("document", "")), False
    km = _KEYWORD_RE.match(text, at)
    if km is not None:
        namespace = _NAMESPACE[_KEYWORDS[km.group("kw").lower()]]
        num = _read_number(text, km.end(), namespace, previous=None, link="")
        if num is not None and not num.relative:
            return (namespace, num.number), False
        return None, False
    if re.match(r"title\s+\d", text[at:at + 12], re.IGNORECASE):
        return None, True  # "of title 17 of the United States Code"
    nm = _NAME_RE.match(text, at)
    if nm is None:
        return None, False
    words = [w.strip("().,").capitalize() if capitals else w.strip("().,")
             for w in nm.group("name").split()]
    capitalised = [w for w in words if w[:1].isupper()]
    if any(w in _INSTRUMENT_WORDS for w in words):
        return None, True
    if len(capitalised) == 1 and capitalised[0] in _SELF_WORDS:
        return ("document", ""), False
    if len(capitalised) > 1 and capitalised[-1] in _SELF_WORDS:
        return None, True  # "of the Escrow Agreement": another document
    if not capitals and _ACRONYM_RE.fullmatch(words[0]):
        return None, True  # "of the GNU GPL", "of the WIPO Copyright Treaty"
    return None, False


# --------------------------------------------------------------------------------------
# The document's numbers, indexed once
# --------------------------------------------------------------------------------------

#: Documents whose index is kept: resolve() is called once per reference, and a
#: counter-draft involves two documents at a time (the draft and the precedent).
INDEX_CACHE_SIZE = 4
#: Blocks searched, back from a provision's own words, for its heading line (a heading sits
#: on the label line or the line or two above; the bound keeps the search local).
HEADING_SEARCH_BLOCKS = 8
#: Clause references are the body's, paragraph references a schedule's own ("references to
#: clauses are to the clauses of this agreement, to paragraphs to the paragraphs of the
#: relevant schedule": common interpretation wording, no source).
_BODY_KEYWORDS = frozenset({"clause", "sub-clause"})


@dataclass(frozen=True, slots=True)
class _Index:
    doc: Document
    info: DocInfo
    namespace: tuple[str, ...]  # per position: the numbering the provision counts in
    keyword: tuple[str, ...]  # per position: its label's keyword ("article"; "" for "7.2")
    key: tuple[str | None, ...]  # per position: the full number in its look-up form
    by_key: dict[tuple[str, str], tuple[int, ...]]  # (namespace, key) -> positions
    items: dict[tuple[int, str], tuple[int, ...]]  # (parent position or -1, "(c)") -> positions
    schedule_of: tuple[int | None, ...]  # the schedule a provision sits in (itself for one)
    window: tuple[tuple[int, int], ...]  # blocks (first, last) where the heading may sit


def _label_keyword(prov: Provision, parent_keyword: str | None, is_item: bool) -> str:
    """The keyword a provision's number is labelled with ("Article IV" -> "article"), an
    item's being its parent's ("(a)" under Article IV counts among the articles); "" for a
    bare number ("7.2")."""
    if is_item and parent_keyword is not None:
        return parent_keyword
    m = _LABEL_KEYWORD_RE.match(prov.number or "")
    return _KEYWORDS.get(m.group(1).lower(), "") if m else ""


def _build_index(doc: Document) -> _Index:
    info = build_docinfo(doc)
    parent = info.parent_pos
    spaces: list[str] = []
    keywords: list[str] = []
    keys: list[str | None] = []
    by_key: dict[tuple[str, str], list[int]] = {}
    items: dict[tuple[int, str], list[int]] = {}
    schedule_of: list[int | None] = []
    for i, prov in enumerate(info.provisions):
        par = parent[i]
        label = item_label(prov.number) if prov.number else None
        keyword = _label_keyword(prov, keywords[par] if par is not None else None, label is not None)
        space = "schedule" if prov.kind == "schedule" else _NAMESPACE.get(keyword, "clause")
        full = info.full_number[i]
        key = _canonical(full, space) if full else None
        spaces.append(space)
        keywords.append(keyword)
        keys.append(key)
        if key:
            by_key.setdefault((space, key), []).append(i)
        if label is not None:
            items.setdefault((par if par is not None else -1, label), []).append(i)
        schedule_of.append(i if prov.kind == "schedule" else
                           (schedule_of[par] if par is not None else None))
    return _Index(doc, info, tuple(spaces), tuple(keywords), tuple(keys),
                  {k: tuple(v) for k, v in by_key.items()},
                  {k: tuple(v) for k, v in items.items()}, tuple(schedule_of),
                  _heading_windows(info.provisions, len(doc.blocks)))


def _heading_windows(provisions: tuple[Provision, ...], blocks: int) -> tuple[tuple[int, int], ...]:
    """For each provision, the blocks after the words of the provisions before it and up to
    its own first words (or, without words, up to the next provision's)."""
    first: list[int] = []
    last_seen = -1
    for p in provisions:
        first.append(last_seen + 1)
        for s in p.segments:
            last_seen = max(last_seen, s.block)
    out: list[tuple[int, int]] = [(0, -1)] * len(provisions)
    next_first = blocks
    for i in range(len(provisions) - 1, -1, -1):
        segs = provisions[i].segments
        hi = segs[0].block if segs else next_first - 1
        out[i] = (max(first[i], hi - HEADING_SEARCH_BLOCKS + 1), hi)
        if segs:
            next_first = segs[0].block
    return tuple(out)


_CACHE: OrderedDict[int, _Index] = OrderedDict()
_CACHE_LOCK = threading.Lock()


def _index_of(doc: Document) -> _Index:
    """The index of *doc*, built once for the documents used last (kept by identity: the
    cached index holds the document, so its id cannot be reused while it is cached)."""
    with _CACHE_LOCK:
        hit = _CACHE.get(id(doc))
        if hit is not None and hit.doc is doc:
            _CACHE.move_to_end(id(doc))
            return hit
    index = _build_index(doc)
    with _CACHE_LOCK:
        _CACHE[id(doc)] = index
        _CACHE.move_to_end(id(doc))
        while len(_CACHE) > INDEX_CACHE_SIZE:
            _CACHE.popitem(last=False)
    return index


# --------------------------------------------------------------------------------------
# Resolving
# --------------------------------------------------------------------------------------

def resolve(ref: Reference, doc: Document, *, within: Provision) -> tuple[Resolution, ...]:
    """What each number of *ref* names in *doc*, *ref* being typed in *within*'s words (its
    text or heading): one :class:`Resolution` per number, in order.  ValueError when
    *within* is not a provision of *doc*."""
    index = _index_of(doc)
    pos = index.info.position.get(within.id)
    if pos is None:
        raise ValueError(f"provision {within.id} is not a provision of {doc.source}")
    return _resolve(index, ref, pos)


def numbered_in(ref: Reference, doc: Document) -> bool:
    """Does *doc* number any provision, by a clause number of its own and not only as a
    list item, in the numbering *ref*'s keyword counts in (clauses or articles for
    "Section", schedules for "Exhibit", ...)?  A reference in a numbering the document
    lacks names something outside it (an exhibit sent separately, an unnumbered text)."""
    index = _index_of(doc)
    spaces = _LOOKUP_ORDER[_NAMESPACE[ref.keyword]]
    return any(ns in spaces and _split(key)[0] for ns, key in index.by_key)


def _resolve(index: _Index, ref: Reference, pos: int) -> tuple[Resolution, ...]:
    if ref.external:
        return tuple(Resolution(n, "external") for n in ref.numbers)
    return tuple(_resolve_relative(index, ref, n, pos) if n.relative
                 else _resolve_absolute(index, ref, n, pos) for n in ref.numbers)


def _candidates(index: _Index, space: str, number: str) -> tuple[int, ...]:
    for ns in _LOOKUP_ORDER[space]:
        hit = index.by_key.get((ns, _canonical(number, ns)))
        if hit:
            return hit
    return ()


def _resolve_absolute(index: _Index, ref: Reference, n: RefNumber, pos: int) -> Resolution:
    """The whole number, else its longest prefix whose remaining items are words of the
    provision's text ("2.3(b)(i)" with (i) inline)."""
    space = _NAMESPACE[ref.keyword]
    head, items = _split(n.number)
    for cut in range(len(items), -1, -1):
        found = _narrow(index, ref, _candidates(index, space, _join(head, items[:cut])), pos)
        if not found:
            continue
        if len(found) > 1:
            return Resolution(n, "ambiguous", candidates=_ids(index, found))
        tail = _join("", items[cut:])
        if tail and not _inline_item(index.info.provisions[found[0]].text, f"({items[cut]})"):
            return Resolution(n, "missing")
        return Resolution(n, "found", target=index.info.provisions[found[0]].id, tail=tail)
    return Resolution(n, "missing")


def _ids(index: _Index, positions: tuple[int, ...]) -> tuple[str, ...]:
    return tuple(index.info.provisions[p].id for p in positions)


def _descends(index: _Index, pos: int, ancestor: int) -> bool:
    cur: int | None = pos
    for _ in range(MAX_DEPTH):
        if cur is None:
            return False
        if cur == ancestor:
            return True
        cur = index.info.parent_pos[cur]
    return False


def _enclosing(index: _Index, pos: int, space: str) -> int | None:
    """The provision "this clause" / "this Schedule" names from inside *pos*: the nearest
    numbered provision up the chain in that numbering (a schedule for "schedule")."""
    cur: int | None = pos
    for _ in range(MAX_DEPTH):
        if cur is None:
            return None
        prov = index.info.provisions[cur]
        if space == "schedule" and prov.kind == "schedule":
            return cur
        if (space != "schedule" and index.key[cur] and index.namespace[cur] == space
                and item_label(prov.number or "") is None):
            return cur
        cur = index.info.parent_pos[cur]
    return None


def _narrow(index: _Index, ref: Reference, found: tuple[int, ...], pos: int) -> tuple[int, ...]:
    """Candidates kept by the qualifier, then the referring provision's part of the document,
    then the one labelled with the reference's own keyword ("Section 2" is the provision
    labelled "Section 2", not a list item "2." elsewhere), then above/below."""
    cands = list(found)
    if ref.scope is not None:
        kind, value = ref.scope
        if kind == "document":
            cands = [c for c in cands if index.schedule_of[c] in (None, c)]
        elif kind == "enclosing":
            box = _enclosing(index, pos, value)
            cands = [c for c in cands if box is not None and _descends(index, c, box)]
        else:
            boxes = _candidates(index, kind, value)
            cands = [c for c in cands if any(_descends(index, c, b) for b in boxes)]
    elif len(cands) > 1:
        part = None if ref.keyword in _BODY_KEYWORDS else index.schedule_of[pos]
        same = [c for c in cands if index.schedule_of[c] == part]
        cands = same or cands
    if len(cands) > 1:
        labelled = [c for c in cands if index.keyword[c] == ref.keyword]
        cands = labelled or cands
    if len(cands) > 1 and ref.direction:
        side = [c for c in cands if (c < pos if ref.direction == "above" else c > pos)]
        cands = side or cands
    return tuple(cands)


def _resolve_relative(index: _Index, ref: Reference, n: RefNumber, pos: int) -> Resolution:
    """Items counted among the enclosing provision's items, then its siblings', then up."""
    _head, items = _split(n.number)
    first = f"({items[0]})"
    box, cur = _relative_start(index, ref, pos)
    for _ in range(MAX_DEPTH):
        hits = index.items.get((cur if cur is not None else -1, first), ())
        if hits and ref.direction and len(hits) > 1:
            side = tuple(h for h in hits if (h < pos if ref.direction == "above" else h > pos))
            hits = side or hits
        if len(hits) > 1:
            return Resolution(n, "ambiguous", candidates=_ids(index, hits))
        if hits:
            return _descend(index, n, hits[0], items[1:])
        if cur is None or cur == box:
            break
        cur = index.info.parent_pos[cur]
    # Not a provision: an item in the words of this provision or one of its parents.
    cur = pos
    for _ in range(MAX_DEPTH):
        if cur is None:
            break
        if _inline_item(index.info.provisions[cur].text, first):
            return Resolution(n, "found", target=index.info.provisions[cur].id,
                              tail=_join("", items))
        cur = None if cur == box else index.info.parent_pos[cur]
    return Resolution(n, "missing")


def _relative_start(index: _Index, ref: Reference, pos: int) -> tuple[int | None, int | None]:
    """(the provision the search may not climb above, where it starts) for a relative item:
    from *pos* itself, inside "this clause" for "of this clause", and from the container
    for "paragraph (a) of Schedule 2"."""
    if ref.scope is None or ref.scope[0] == "document":
        return None, pos
    if ref.scope[0] == "enclosing":
        return _enclosing(index, pos, ref.scope[1]), pos
    boxes = _candidates(index, *ref.scope)
    return (boxes[0], boxes[0]) if len(boxes) == 1 else (None, pos)


def _descend(index: _Index, n: RefNumber, start: int, rest: tuple[str, ...]) -> Resolution:
    cur = start
    for k, tok in enumerate(rest):
        hits = index.items.get((cur, f"({tok})"), ())
        if len(hits) > 1:
            return Resolution(n, "ambiguous", candidates=_ids(index, hits))
        if not hits:
            if not _inline_item(index.info.provisions[cur].text, f"({tok})"):
                return Resolution(n, "missing")
            return Resolution(n, "found", target=index.info.provisions[cur].id,
                              tail=_join("", rest[k:]))
        cur = hits[0]
    return Resolution(n, "found", target=index.info.provisions[cur].id)


def _inline_item(text: str, label: str) -> bool:
    """True when *label* ("(i)") numbers an item in the words of *text* (not inside a
    reference, such as the one being resolved)."""
    if label not in text:
        return False
    taken = [(n.start, n.end) for r in find_references(text) for n in r.numbers]
    return any(not any(a <= m.start() < b for a, b in taken)
               for m in re.finditer(re.escape(label), text))


# --------------------------------------------------------------------------------------
# Keeping references true
# --------------------------------------------------------------------------------------

@dataclass(frozen=True, slots=True)
class _Change:
    start: int
    end: int
    old: str
    new: str
    target: int
    reason: str


@dataclass(frozen=True, slots=True)
class _Problem:
    number: str
    kind: str
    why: str


#: How a reason reads, from (keyword as typed, old number, new number).
_Phrase = Callable[[str, str, str], str]


def _renumber_phrase(kw: str, old: str, new: str) -> str:
    return f"{kw} {old} is now {kw} {new}"


def _translate_phrase(kw: str, old: str, new: str) -> str:
    return f"{kw} {old} of the precedent is {kw} {new} here"


def _components(typed: str) -> list[tuple[int, int, str]]:
    """The parts of a number as typed: (start, end, kind) with kind "head" ("9.1", "IV"),
    "bare" (the b of "6b") or "item" ("(b)", brackets included)."""
    out: list[tuple[int, int, str]] = []
    pos = 0
    hm = _HEAD_RE.match(typed)
    if hm is not None:
        h = "dec" if hm.group("dec") else "alpha"
        out.append((hm.start(h), hm.end(h), "head"))
        if hm.group("bare"):
            out.append((hm.start("bare"), hm.end("bare"), "bare"))
        pos = hm.end()
    for im in _ITEM_RE.finditer(typed, pos):
        out.append((im.start("tok") - 1, im.end(), "item"))
    return out


def _styled(kind: str, typed: str, token: str) -> str:
    """*token* written as *typed* is: roman stays roman, an item keeps its brackets."""
    if kind == "head":
        if typed.isalpha() and token.isdigit() and _roman_head(typed) is not None:
            return _roman(int(token), upper=typed.isupper())
        return token
    return token if kind == "bare" else f"({token})"


def _parts(full: str) -> list[str]:
    head, items = _split(full)
    return ([head] if head else []) + list(items)


def _shown(full: str, typed: str) -> str:
    """A full number written the way *typed* writes numbers: a roman head stays roman, a
    run-on item stays run-on ("6b"); *typed* may be shorter (a relative "(c)")."""
    parts = _parts(full)
    comps = _components(typed)
    offset = len(parts) - len(comps)
    out: list[str] = []
    for k, part in enumerate(parts):
        natural = "head" if k == 0 and not full.startswith("(") else "item"
        kind, typed_part = natural, ""
        if 0 <= k - offset < len(comps):
            start, end, kind = comps[k - offset]
            typed_part = typed[start:end].strip("()")
            if (kind == "head") != (natural == "head"):
                kind, typed_part = natural, ""
        out.append(_styled(kind, typed_part, part))
    return "".join(out)


def _rewrite(text: str, n: RefNumber, old_full: str, new_full: str,
             previous_new: str | None) -> tuple[int, int, str] | None:
    """The smallest edit of the number *n* as typed in *text* that makes it say *new_full*
    instead of *old_full*: (start, end, replacement), None when nothing changes."""
    typed = text[n.start:n.end]
    comps = _components(typed)
    old_p, new_p = _parts(old_full), _parts(new_full)
    m = len(comps)
    continuation = bool(not n.relative and n.link and comps and comps[0][2] == "item")
    if (continuation and previous_new is not None and len(new_p) >= m
            and _parts(previous_new)[:len(new_p) - m] != new_p[:len(new_p) - m]):
        return n.start, n.end, new_full  # "(b)" can no longer ride on the number before
    if len(old_p) != len(new_p) or m > len(old_p):
        # The depth changed (an item became a clause): write the whole number anew.
        return None if old_full == new_full else (n.start, n.end, _shown(new_full, typed))
    differ = [j for j in range(m) if old_p[len(old_p) - m + j] != new_p[len(new_p) - m + j]]
    if not differ:
        return None
    a, b = comps[differ[0]][0], comps[differ[-1]][1]
    pieces: list[str] = []
    at = a
    for j in range(differ[0], differ[-1] + 1):
        start, end, kind = comps[j]
        pieces.append(typed[at:start])
        inner = typed[start:end].strip("()")
        token = new_p[len(new_p) - m + j]
        pieces.append(_styled(kind, inner, token) if j in differ else typed[start:end])
        at = end
    return n.start + a, n.start + b, "".join(pieces)


def _keyword_shown(text: str, ref: Reference) -> str:
    """The reference's keyword as typed, made singular ("Sections" -> "Section")."""
    km = _KEYWORD_RE.match(text, ref.start)
    word = km.group("kw") if km is not None else ref.keyword
    low = word.lower()
    if low.endswith("ices"):
        return word[:-4] + ("IX" if word.isupper() else "ix")
    if low.endswith("xes"):
        return word[:-2]
    return word[:-1] if low.endswith("s") else word


def _ordinal(part: str) -> int | None:
    """The value of a number's last part, for comparing the two ends of a range."""
    tok = part.rsplit(".", 1)[-1]
    if tok.isdigit():
        return int(tok)
    if tok.isalpha() and len(set(tok)) == 1 and len(tok) <= 2 and tok not in ("i", "I"):
        return 26 * (len(tok) - 1) + ord(tok[0].lower()) - 96
    return _roman_value(tok)


def _range_width(old_a: str, old_b: str) -> int | None:
    pa, pb = _parts(old_a), _parts(old_b)
    if len(pa) != len(pb) or pa[:-1] != pb[:-1]:
        return None
    if "." in pa[-1] and pa[-1].rsplit(".", 1)[0] != pb[-1].rsplit(".", 1)[0]:
        return None
    oa, ob = _ordinal(pa[-1]), _ordinal(pb[-1])
    return None if oa is None or ob is None else ob - oa


def _plan(index: _Index, text: str, ref: Reference, resolutions: tuple[Resolution, ...],
          new_of: Callable[[int], str | None], *, phrase: _Phrase,
          gone_kind: str) -> tuple[list[_Change], list[_Problem]]:
    """The edits and issues that keep one reference true, given each target's new number
    (``new_of(position)``, None when it has none)."""
    kw = _keyword_shown(text, ref)
    changes: list[_Change] = []
    problems: list[_Problem] = []
    ends: list[tuple[str, str] | None] = []  # per number: (old full, new full) when kept
    previous_new: str | None = None  # what an item continuing this number rides on
    for r in resolutions:
        n = r.number
        ends.append(None)
        t = index.info.position[r.target] if r.status == "found" and r.target else None
        new_key = new_of(t) if t is not None else None
        if t is None or new_key is None:
            problem = _problem(index, kw, r, t, gone_kind=gone_kind, typed=text[n.start:n.end])
            problems.extend([problem] if problem is not None else [])
            previous_new = None
            continue
        typed = text[n.start:n.end]
        old_full, new_full = (index.key[t] or "") + r.tail, new_key + r.tail
        ends[-1] = (old_full, new_full)
        edit = _rewrite(text, n, old_full, new_full, previous_new)
        previous_new = new_full
        if edit is not None:
            start, end, new = edit
            changes.append(_Change(start, end, text[start:end], new, t,
                                   phrase(kw, _shown(old_full, typed), _shown(new_full, typed))))
    problems.extend(_range_problems(ref, kw, ends))
    return changes, problems


def _problem(index: _Index, kw: str, r: Resolution, t: int | None, *, gone_kind: str,
             typed: str) -> _Problem | None:
    """Why the number of *r* cannot be kept true (None for an external reference)."""
    n = r.number
    if r.status == "ambiguous":
        return _Problem(n.number, "ambiguous", f"{kw} {n.number} could mean any of "
                                               f"{len(r.candidates)} provisions numbered {n.number}")
    if r.status == "missing":
        return _Problem(n.number, "missing", f"no provision is numbered {kw} {n.number}")
    if t is None:
        return None
    shown = _shown((index.key[t] or "") + r.tail, typed)
    heading = index.info.provisions[t].heading
    named = f' ("{heading}")' if heading else ""
    why = (f"{kw} {shown}{named} is removed by the change" if gone_kind == "gone"
           else f"{kw} {shown}{named} of the precedent has no counterpart here")
    return _Problem(n.number, gone_kind, why)


def _range_problems(ref: Reference, kw: str, ends: list[tuple[str, str] | None]) -> list[_Problem]:
    """A range whose two ends, renumbered, span a different number of provisions: the
    provisions inserted into it or taken out of it change what it covers."""
    out: list[_Problem] = []
    for j in range(1, len(ref.numbers)):
        a, b = ends[j - 1], ends[j]
        if ref.numbers[j].link != "range" or a is None or b is None:
            continue
        before, after = _range_width(a[0], b[0]), _range_width(a[1], b[1])
        if before is not None and after is not None and before != after:
            out.append(_Problem("", "range",
                                f"{kw} {ref.numbers[j - 1].number} to {ref.numbers[j].number} "
                                f"covered {before + 1} provisions and now covers {after + 1} "
                                "after renumbering: check that the range still means what "
                                "it should"))
    return out


def _bare_number(value: str) -> str:
    """A full number as given by a caller, without a keyword or spaces ("Section 13" -> "13")."""
    m = _LABEL_KEYWORD_RE.match(value)
    if m is not None and m.group(1).lower() in _KEYWORDS:
        value = value[m.end():]
    return "".join(value.split()).rstrip(".:")


def _new_numbers(index: _Index, new_numbers: Mapping[str, str | None]) -> list[str | None]:
    """Each provision's look-up number after the change; None for a removed provision.  A
    provision the mapping leaves out keeps its number, except that it follows its parent:
    removed with it, or renumbered with it when its number extends the parent's ("12.1"
    and "12(b)" under 12 become "13.1" and "13(b)" when 12 becomes 13)."""
    provisions, parent = index.info.provisions, index.info.parent_pos
    new: list[str | None] = []
    gone: list[bool] = []
    for i, prov in enumerate(provisions):
        old, par = index.key[i], parent[i]
        if prov.id in new_numbers:
            value = new_numbers[prov.id]
            gone.append(value is None)
            new.append(None if value is None else _canonical(_bare_number(value), index.namespace[i]))
            continue
        if par is not None and gone[par]:
            gone.append(True)
            new.append(None)
            continue
        gone.append(False)
        pk = index.key[par] if par is not None else None
        npk = new[par] if par is not None else None
        if old and pk and npk and npk != pk and old.startswith(pk) and old[len(pk):][:1] in (".", "("):
            new.append(npk + old[len(pk):])
        else:
            new.append(old)
    return new


def _text_at(doc: Document, prov: Provision, start: int, end: int) -> Segment | None:
    """Where ``prov.text[start:end]`` sits in the blocks (None across a line or without
    blocks); see the segments invariant in core.model."""
    if not doc.blocks:
        return None
    off = 0
    for s in prov.segments:
        length = s.end - s.start
        if off <= start and end <= off + length:
            return Segment(s.block, s.start + start - off, s.start + end - off)
        off += length + 1
    return None


def _heading_at(index: _Index, pos: int, start: int, end: int) -> Segment | None:
    """Where ``heading[start:end]`` sits in the blocks: the heading is found (white space
    collapsed, as core.structure cleans it) in the blocks just before the provision's own
    words, the nearest occurrence first."""
    prov, blocks = index.info.provisions[pos], index.doc.blocks
    if not blocks or not prov.heading or start >= end:
        return None
    pattern = re.compile(r"\s+".join(re.escape(w) for w in prov.heading.split()))
    lo, hi = index.window[pos]
    for b in range(min(hi, len(blocks) - 1), lo - 1, -1):
        text = blocks[b].text
        limit = prov.segments[0].start if prov.segments and prov.segments[0].block == b else len(text)
        found = [m.start() for m in pattern.finditer(text, 0, limit)]
        if not found:
            continue
        i, j = 0, found[-1]
        spots: dict[int, int] = {}
        while i < len(prov.heading):
            if prov.heading[i] == " ":
                while j < len(text) and text[j].isspace():
                    j += 1
            else:
                spots[i] = j
                j += 1
            i += 1
        if start in spots and end - 1 in spots:
            return Segment(b, spots[start], spots[end - 1] + 1)
        return None
    return None


def renumber_references(doc: Document, new_numbers: Mapping[str, str | None]
                        ) -> tuple[tuple[ReferenceEdit, ...], tuple[ReferenceIssue, ...]]:
    """The edits that keep every typed reference of *doc* (texts and headings) true after a
    renumbering, and the references no edit can keep true.

    *new_numbers* maps a provision id to its full number after the change, written as
    :func:`core.docinfo.build_docinfo` writes full numbers (``"13"``, ``"13.2(b)"``,
    ``"IV"``, ``"A"``; a leading keyword such as ``"Section 13"`` is accepted), or to None
    when the change removes the provision.  A provision it leaves out keeps its number,
    except that it follows its parent: removed with it, or renumbered with it when its
    number extends the parent's ("12.1" and "12(b)" become "13.1" and "13(b)" when 12
    becomes 13), so the top-level numbers are enough for a top-level shift.  Every edit replaces only the part of a
    number that changes and carries its reason; references to removed provisions, ambiguous
    or missing ones and ranges that now span a different number of provisions come back as
    issues.  External references are never touched.  Edits and issues are in document
    order (provision, heading before text, then offset).
    """
    index = _index_of(doc)
    new = _new_numbers(index, new_numbers)
    edits: list[ReferenceEdit] = []
    issues: list[ReferenceIssue] = []
    for pos, prov in enumerate(index.info.provisions):
        for part, text in (("heading", prov.heading or ""), ("text", prov.text)):
            for ref in find_references(text):
                if ref.external:
                    continue
                changes, problems = _plan(index, text, ref, _resolve(index, ref, pos), new.__getitem__,
                                          phrase=_renumber_phrase, gone_kind="gone")
                where = _heading_at if part == "heading" else None
                for c in changes:
                    at = (where(index, pos, c.start, c.end) if where is not None
                          else _text_at(doc, prov, c.start, c.end))
                    edits.append(ReferenceEdit(prov.id, part, c.start, c.end, c.old, c.new,
                                               index.info.provisions[c.target].id, c.reason, at))
                for p in problems:
                    at = (where(index, pos, ref.start, ref.end) if where is not None
                          else _text_at(doc, prov, ref.start, ref.end))
                    issues.append(ReferenceIssue(prov.id, part, ref.start, ref.end,
                                                 text[ref.start:ref.end], p.number, p.kind, p.why, at))
    return tuple(edits), tuple(issues)


def translate_references(text: str, *, source_doc: Document, source_provision: Provision,
                         number_of: Callable[[str], str | None]) -> Translation:
    """*text*, wording of *source_provision* in *source_doc* (the precedent), with its
    references rewritten to the numbers of the document it is written into.

    ``number_of(source id)`` gives the full number, in the target document, of the
    provision that stands for the source provision (as in :func:`renumber_references`), or
    None when it has none: such a reference is left as it is and reported
    (``"no-counterpart"``), as are ambiguous and missing ones.  The edits' and issues'
    offsets are in *text* as given; their ``target`` is the source provision referred to.
    """
    index = _index_of(source_doc)
    pos = index.info.position.get(source_provision.id)
    if pos is None:
        raise ValueError(f"provision {source_provision.id} is not a provision of {source_doc.source}")
    cache: dict[int, str | None] = {}

    def new_of(t: int) -> str | None:
        if t not in cache:
            value = number_of(index.info.provisions[t].id)
            cache[t] = None if value is None else _canonical(_bare_number(value), index.namespace[t])
        return cache[t]

    edits: list[ReferenceEdit] = []
    issues: list[ReferenceIssue] = []
    for ref in find_references(text):
        if ref.external:
            continue
        changes, problems = _plan(index, text, ref, _resolve(index, ref, pos), new_of,
                                  phrase=_translate_phrase, gone_kind="no-counterpart")
        edits.extend(ReferenceEdit(source_provision.id, "text", c.start, c.end, c.old, c.new,
                                   index.info.provisions[c.target].id, c.reason) for c in changes)
        issues.extend(ReferenceIssue(source_provision.id, "text", ref.start, ref.end,
                                     text[ref.start:ref.end], p.number, p.kind, p.why)
                      for p in problems)
    out = text
    for e in sorted(edits, key=lambda e: e.start, reverse=True):
        out = out[:e.start] + e.new + out[e.end:]
    return Translation(out, tuple(edits), tuple(issues))
