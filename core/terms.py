"""Find the defined terms of an agreement and count their uses.

A term is defined, in any of the forms drafters use (common practice in English-language
agreements, no source):

* **by a definition provision** (kind ``"definition"``, found by :mod:`core.structure` in a
  definitions section: ``"X" means ...``, bold ``X`` means ...);
* **subject and verb**: a term, quoted or not, followed by ``means`` / ``shall mean`` /
  ``has the meaning given in`` / ``refers to`` / ``shall refer to`` / ``includes``
  (a few words may sit between: ``"Source" form shall mean``, ``The "source code" for a
  work means``).  A quoted term must stand where a subject stands: at the start of a
  sentence or clause, after nothing but ``the`` / ``a`` / ``to`` / ``the term`` and the like
  (``Where the "Licensed Material" includes ...`` defines nothing).  An **unquoted** term
  (``1.5 Initial Developer means ...``, ``Licensee: means ...``) must be a short title-case
  name at the start of a provision or of one of its lines, and the verb must not be the
  noun "means" (``Electronic means shall include ...`` defines nothing);
* **lists of names**: ``the terms "Licensee", "You" and "Your" shall refer to``, ``"Use",
  "Used" or "Using" means``: the names are **aliases** of one term; ``The terms "reproduce"
  and "distribution" have the same meaning here as under ...`` defines separate terms;
* **in parentheses** after what they name: ``(the "X")``, ``("X")``, ``("You" or
  "Customer")`` (names joined by "or" or commas are aliases), ``(each a "X" and together
  the "Y")`` and ``(the "Supplier" and the "Customer")`` (joined by "and": separate terms),
  ``(hereinafter referred to as "X")``; ``hereinafter "X"``; ``each a "X" and together the
  "Y"``; ``is called a "X"``, ``are referred to as "You", "Your" and "Mirrorer"``,
  ``refer to "Google" as "we", "our", or "us"``; ``You (or Your) means``;
  ``Your has a corresponding meaning`` (an alias of the term the provision defines);
* **colon forms** at the start of a provision or line: ``"Customer": the buyer``,
  ``Applications: means ...``; in a definitions section also ``Customer: the buyer ...``;
* **definition tables**: two-column tables (term | meaning) read from the blocks
  (``Block.in_table``): a .docx table gives one block per cell, a Markdown table one block
  per row with the cells joined by tabs.  A table is a definition table when its header
  names its columns so ("Term" | "Meaning", "Expression" | "Definition", ...) or when most
  of its rows pair a term-like cell with a meaning that reads like one (starting with a
  defining verb or a lower-case word), or with any meaning of a few words when the term
  cell is bold or underlined (``Block.emphasised``);
* **emphasis**: a bold or underlined term (``Block.lead``) followed by ``means`` or a colon.

Straight, curly, typewriter and TeX-style quotes (``"X"``, ``“X”``, ``‘X’``, ``'X'``,
```` ``X'' ````, ``''X''``, ``«X»``) are recognised.  The first definition of a name wins;
a later one of the same name is ignored.  Definitions in schedules count like any other.

Uses are counted case-sensitively as the names are written (so ``"Customer"`` counts
capitalised uses), whole words only, in every provision's text and heading except the
defining provision's; plural (``Services``, ``Parties``, ``Liabilities``) and possessive
(``Customer's``, ``Customers'``) forms count, and a use of an alias is a use of its term.
All names are matched together, longest first, so ``Additional Services`` is a use of that
term and not also of ``Services``.

Cost: one pass of a few regular expressions over the provision texts and one over the
blocks to find the definitions, then one pass of a single alternation of all name forms to
count uses: O(total text length x number of terms) in the worst case of the regex engine,
in practice close to linear.  Each definition pattern scans only the texts that hold what it
cannot match without (an opening quote, its verb or cue word: :class:`_Cues`), a few
substring tests per text; most provisions of an agreement define nothing and hold no quote.
"""

from __future__ import annotations

import bisect
import functools
import re
from collections.abc import Callable, Iterable, Iterator, Mapping, Sequence
from dataclasses import dataclass, field

from .lazyre import LazyPattern, lazy_compile
from .model import Block, DefinedTerm, Provision
from .structure import clean_term, fold_case

__all__ = ["MAX_INLINE_DEFINITION_CHARS", "REGEX_FORMS_MAX", "CharTrie", "char_trie", "find_terms", "term_forms",
           "term_owners", "term_pattern", "terms_pattern", "walk_forms"]

#: Longest definition text kept for an inline definition (characters): one sentence of a
#: provision is the definition; a run-on sentence is cut here.
MAX_INLINE_DEFINITION_CHARS = 600
#: An alternative form defined with the term ("You" (or "Your")) starts within this many
#: characters after the term in a definition provision.
ALIAS_WINDOW = 20
#: Words that may sit between a quoted term and "means" ("Source" form shall mean ...; the
#: longest in the licence texts is GPL 3's "for a work in object code form", seven words).
MAX_WORDS_BEFORE_VERB = 7
#: Longest unquoted term (words).  Without quotes only a short title-case name reads as a
#: term; the longest unquoted names of the licence texts ("Copyright and Similar Rights",
#: "Sui Generis Database Rights") have four words, so five leave a margin.
MAX_UNQUOTED_TERM_WORDS = 5
#: Rows a table needs before its shape alone (no header) makes it a definition table, and
#: the share of its rows that must then read as term | meaning: one row is a coincidence;
#: two of three rows is a pattern (judgement values, common practice, no source).
TABLE_MIN_ROWS = 2
TABLE_DEFINITION_SHARE = 2 / 3
#: Words a meaning cell needs to read as a definition ("the buyer named in the Order"); a
#: shorter cell is a value (an amount, a date, a name).
MIN_MEANING_WORDS = 3

# --------------------------------------------------------------------------------------
# Quoted names
# --------------------------------------------------------------------------------------

#: (opening quote, body, closing quote) of each quoting style, in the order tried.
_QUOTE_STYLES = (
    (r"(?:``|'')", r"[^`'\"“”\n]{1,80}?", r"''"),  # TeX and typewriter: ``X'' and ''X''
    (r"[\"“”„]", r"[^\"“”\n]{1,80}?", r"(?:[\"”“]|'')"),  # double quotes ("You'' too)
    (r"‘", r"[^‘’\n]{1,80}?", r"[’']"),
    (r"(?<![\w'’])'(?=[^\s'])", r"[^'\n]{1,80}?", r"(?<=\S)'(?![\w'])"),  # not an apostrophe
    (r"«\s?", r"[^«»\n]{1,80}?", r"\s?»"),
)


def _quoted(tag: str | None) -> str:
    """A regex of a quoted name; with *tag*, its body is captured in a group ``<tag><k>``."""
    alts = []
    for k, (opening, body, closing) in enumerate(_QUOTE_STYLES):
        inner = f"(?P<{tag}{k}>{body})" if tag else f"(?:{body})"
        alts.append(opening + inner + closing)
    return "(?:" + "|".join(alts) + ")"


def _body(m: re.Match[str], tag: str) -> str | None:
    for k in range(len(_QUOTE_STYLES)):
        v = m.group(f"{tag}{k}")
        if v is not None:
            return v
    return None


_QN = _quoted(None)
_QUOTED_RE = lazy_compile(_quoted("q"))
#: Between two names of a list: "A", "B" or "C"; "A" and "B"; "I"/"Me"; "A," "B".
_LIST_SEP = r"\s*(?:,\s*|/\s*)?(?i:(?:and/or|and|or)\s+)?(?i:the\s+)?"
#: Most names in one list.  The licence texts have lists of four ("BugSense," "we," "us,"
#: and "our" refers to ...; amazon-redshift-jdbc's four "are defined" terms); ten leave a
#: margin and keep a run of quoted titles from reading as one list.
MAX_LIST_NAMES = 10
_NAME_LIST = _QN + r"(?:" + _LIST_SEP + _QN + r"){0," + str(MAX_LIST_NAMES - 1) + "}"

_VERBS = (
    r"(?:shall\s+be\s+deemed\s+to\s+mean|shall\s+mean|will\s+mean|shall\s+have\s+the\s+meanings?|"
    r"has\s+the\s+(?:same\s+)?meanings?|have\s+the\s+(?:same\s+)?meanings?|also\s+means|means|mean|"
    r"(?:shall|will)\s+refer\s+to|refers\s+to|refer\s+to|(?:shall|will)\s+include|includes|include|"
    r"is\s+defined|are\s+defined)\b"
)
#: Every verb of :data:`_VERBS` holds one of these (lower case): the cue of :data:`_SUBJECT_RE`.
_VERB_CUES = ("mean", "refer", "includ", "defined")
#: Verbs after which a list of names are separate terms, each with the meaning given.
_SEPARATE_VERB_RE = lazy_compile(r"meanings\b|same\s+meaning|\bdefined\b")
#: "means" the noun ("Electronic means shall include"), not the verb.  Checked after a
#: quoted term too, and more strictly without quotes, where "means that", "means which"
#: and a comma also show the noun ("Electronic means, such as email, ...").
_NOUN_MEANS_RE = lazy_compile(r"\s+(?:shall|will|may|must|is|are|was|were|of|by)\b|\s*[.;]")
_NOUN_MEANS_UNQUOTED_RE = lazy_compile(
    r"\s+(?:shall|will|may|must|is|are|was|were|of|by|that|which|whereby)\b|\s*[.,;:]")
_SUBJECT_RE = lazy_compile(
    r"(?P<list>" + _NAME_LIST + r")"
    + r"(?P<alias>\s*\([^()\n]{0,80}\))?"
    + r"(?P<between>(?:,?\s+(?!(?:means|mean|shall|will|has|have|refers|refer|includes|include)\b)"
    + r"[\w’'-]+){0," + str(MAX_WORDS_BEFORE_VERB) + "}?)"
    + r"\s*[,:]?\s+(?P<verb>(?i:" + _VERBS + r"))"  # verbs in capitals too (a notice in capitals)
)
#: Words that may precede a quoted subject of "includes" in its clause: "the term", "To",
#: "A", "and".  Stronger verbs ("means", "refers to") allow a short introduction ("For the
#: purposes of redistribution", "A section", "As used in section 3.2") without
#: :data:`_CLAUSE_BLOCKERS`.
_SUBJECT_LEAD = frozenset(
    "the a an to term terms expression expressions word words phrase phrases and or also "
    "each any".split())
#: Words that show the quoted name sits inside a clause, not at its head ("Where the",
#: "it is", "displays").
_CLAUSE_BLOCKERS = frozenset(
    "if when whenever while unless whether although though because since "
    "that which who whom whose is are was were be been being has have had shall will may "
    "must can could would should does do did not no displays display called named marked "
    "see".split())
#: Longest introduction before a quoted subject (words): "As used in section 3.2 of the
#: OPL" has seven.
MAX_SUBJECT_INTRO_WORDS = 8
#: First words of such an introduction: a preposition ("For the purposes of ...", "As used
#: in ..."), "References to", or a determiner of a noun the term qualifies ("A section
#: "Entitled XYZ" means"); "He said "this" means" is no definition.
_INTRO_STARTS = frozenset(
    "for in as under throughout within with where wherever notwithstanding solely save "
    "except references reference a an the any each every all".split())
_WEAK_VERB_RE = lazy_compile(r"\binclude")
#: Words between a quoted term and its verb that show a new clause: no definition then.
_CONNECTORS = frozenset(
    "and or but that which who whom whose if when where while then because so is are was "
    "were be been shall will may must can could would should not".split())
#: Boundaries of the clause a subject opens.
_CLAUSE_BOUNDARY_RE = lazy_compile(r"[;:(\n,]|\.(?!\d)")  # a full stop, not the one of "3.2"

#: Words that may stand in a parenthesis around a term being defined: (the "X"),
#: (each a "X"), (together, the "X"), (hereinafter referred to as "X"), (or "Y").
_PAREN_CUES = frozenset(
    "the a an each together collectively individually jointly severally both hereinafter "
    "hereafter herein referred to as called known also or and being in case any one".split()
)
#: Cue words after which a name is a term of its own ("each a X and together the Y").
_SEPARATE_CUES = frozenset("and each together collectively individually jointly severally both".split())
_PAREN_RE = lazy_compile(r"\((?P<inner>[^()\n]{1,200})\)")
_HEREINAFTER_RE = lazy_compile(
    r"\bhereinafter(?:\s+(?:referred\s+to\s+as|called|known\s+as))?\s*,?\s*(?:the\s+)?"
    r"(?P<list>" + _NAME_LIST + ")", re.IGNORECASE)
_COLLECTIVE_RE = lazy_compile(
    r"\b(?:each|together|collectively|individually|jointly|both)\b(?:\s*,)?(?:\s+(?:a|an|the|being))?"
    r"(?:\s*,)?\s+" + _quoted("q"), re.IGNORECASE)
_CALLED_RE = lazy_compile(
    r"\b(?:is|are|be|being)\s+(?:called|refer(?:red|eed|ed)\s+to\s+as|known\s+as|designated\s+as|termed)\s+"
    r"(?:the\s+|an?\s+)?(?P<list>" + _NAME_LIST + ")")
#: Cue words of :data:`_CALLED_RE` (as written) and of :data:`_COLLECTIVE_RE` (any case).
_CALLED_CUES = ("called", "refer", "known", "designated", "termed")
_COLLECTIVE_CUES = ("each", "together", "collectively", "individually", "jointly", "both")
_REFER_AS_RE = lazy_compile(
    r"\brefer\s+to\s+" + _quoted("q") + r"\s+as\s+(?:the\s+)?(?P<list>" + _NAME_LIST + ")")
#: "a "commercial item," as that term is defined in 48 C.F.R. 2.101": a term defined by
#: reference to another instrument.
_AS_DEFINED_RE = lazy_compile(
    _quoted("q") + r"\s*,?\s*as\s+(?:that|such|the|this)\s+terms?\s+(?:is|are)\s+(?:defined|used)\b")
_SENTENCE_SPLIT_RE = lazy_compile(r"(?<=[.;])\s+(?=[A-Z\"“‘(])|\n\s*")

# --------------------------------------------------------------------------------------
# Unquoted names at the start of a provision or line
# --------------------------------------------------------------------------------------

_CAP_WORD = r"[A-Z][\w’'&-]*"
_SMALL = r"(?:of|and|or|for|in|the|to|on|by|with|a|an|under)"
_TITLE_PHRASE = (_CAP_WORD + r"(?:[ \t]+(?:" + _SMALL + r"[ \t]+){0,2}" + _CAP_WORD + r"){0,"
                 + str(MAX_UNQUOTED_TERM_WORDS - 1) + "}")
#: A label typed at the start of a line the structure reader left in the text: "1.5.", "(a)".
_LINE_LABEL = r"(?:(?:\d{1,3}(?:\.\d{1,3})*\.?|\(?[a-zA-Z]{1,4}[.)]|\([a-z0-9]{1,4}\))\s+)?"
_UNQUOTED_VERBS = (
    r"(?:means|shall\s+mean|will\s+mean|shall\s+have\s+the\s+meaning|has\s+the\s+meaning|"
    r"(?:shall|will)\s+refer\s+to|refers\s+to|is\s+defined\s+as)\b"
)
_UNQUOTED_RE = lazy_compile(
    r"(?m)^[ \t]*" + _LINE_LABEL + r"(?P<name>" + _TITLE_PHRASE + r")"
    r"(?P<alias>\s*\([^()\n]{1,60}\))?"
    r"(?P<sep>[ \t]*[:–—][ \t]*|[ \t]*,?[ \t]+)(?P<verb>" + _UNQUOTED_VERBS + r")?")
#: What :data:`_QUOTED_LINE_START_RE` needs after its names: a colon or a dash.
_LINE_START_SEPARATORS = (":", "–", "—", "-")
_QUOTED_LINE_START_RE = lazy_compile(
    r"(?m)^[ \t]*" + _LINE_LABEL + r"(?:(?:the|a|an|to)\s+)?(?P<list>" + _NAME_LIST + r")"
    r"(?P<alias>\s*\([^()\n]{0,80}\))?\s*(?P<sep>[:–—]|\s-\s)")
#: First words that start a sentence, never an unquoted term (common practice, no source).
_NOT_TERM_STARTS = frozenset(
    "this that these those such each every any all no none it its if in for where when "
    "whereas while our their his her your my we they he she you'll subject notwithstanding "
    "provided unless upon on at by as to from with without".split())
_CORRESPONDING_RE = lazy_compile(
    r"(?:^|(?<=[.;]\s))(?P<names>(?:" + _QN + r"|" + _CAP_WORD + r")(?:" + _LIST_SEP
    + r"(?:" + _QN + r"|" + _CAP_WORD + r"))?)\s+(?:has|have)\s+(?:a\s+)?corresponding\s+meanings?\b")
_DEFINITIONS_HEADING_RE = lazy_compile(
    r"^\W*(?:(?:the\s+)?definitions?|defined\s+terms|interpretation|glossary|"
    r"definitions?\s+(?:and|&)\s+\w+|\w+\s+(?:and|&)\s+definitions?)\W*$", re.IGNORECASE)


# --------------------------------------------------------------------------------------
# Cues: what a text must hold for a pattern to match anywhere in it
# --------------------------------------------------------------------------------------

#: Characters that open a quoted name in one of :data:`_QUOTE_STYLES`, besides "``" and
#: "''"; the straight single quote is also an apostrophe, so alone it counts only where
#: :data:`_LONE_QUOTE_RE` (the opening of that style) finds it.
_OPENING_CHARS = "\"“”„‘«"
#: ``(?<![\w'’])'(?=[^\s'])``, the quote first so that the engine looks for it directly.
_LONE_QUOTE_RE = lazy_compile(r"'(?<![\w'’]')(?=[^\s'])")
def _may_quote(text: str) -> bool:
    """False only when no quoted name (any style of :data:`_QUOTE_STYLES`) starts anywhere
    in *text*: no opening quote.  A few substring tests, instead of a scan of the pattern."""
    for ch in _OPENING_CHARS:
        if ch in text:
            return True
    if "``" in text or "''" in text:
        return True
    return "'" in text and _LONE_QUOTE_RE.search(text) is not None


@dataclass(frozen=True, slots=True)
class _Cues:
    """What a provision's text holds that the definition patterns need, found once per
    text.  Each pattern runs only where the words it cannot match without are present (a
    quoted name, its verb, its cue word), so a text without them costs a few substring
    tests instead of a scan.  *direct* opens every gate: the scans run as written (the law
    tests compare both)."""

    text: str
    folded: str
    quoted: bool
    direct: bool = False

    def has(self, *words: str) -> bool:
        """Does the text hold one of *words* (as written)?"""
        return self.direct or any(w in self.text for w in words)

    def has_folded(self, *words: str) -> bool:
        """Does the text hold one of the lower-case *words* in any case?"""
        return self.direct or any(w in self.folded for w in words)


def _cues(text: str, *, direct: bool = False) -> _Cues:
    return _Cues(text, fold_case(text), direct or _may_quote(text), direct)


@dataclass(frozen=True, slots=True)
class _Found:
    """Names defined at one place of a text: the term first, then its aliases."""

    offset: int
    names: tuple[str, ...]


def _clean_all(raws: Iterable[str | None]) -> tuple[str, ...]:
    out: list[str] = []
    for raw in raws:
        t = clean_term(raw or "")
        if t is not None and t not in out:
            out.append(t)
    return tuple(out)


def _list_names(text: str) -> tuple[str, ...]:
    return _clean_all(_body(m, "q") for m in _QUOTED_RE.finditer(text))


def _list_is_separate(text: str) -> bool:
    """Do the names of a list stand for separate terms ("A" and "B") rather than aliases?"""
    between = _QUOTED_RE.sub("\x00", text).split("\x00")[1:-1]
    return any(w in _SEPARATE_CUES for b in between for w in re.findall(r"[a-z]+", b.lower()))


def _cue_words_only(text: str) -> bool:
    words = [w.strip(",;:").lower() for w in text.split()]
    return all(w in _PAREN_CUES or not w for w in words)


def _paren_groups(inner: str) -> list[tuple[str, ...]]:
    """Terms defined in a parenthesis, each with its aliases: ("X"), (the "X"), ("You" or
    "Customer"), (each a "X" and together the "Y")."""
    quotes = list(_QUOTED_RE.finditer(inner))
    if not quotes:
        return []
    groups: list[list[str | None]] = []
    pos = 0
    for q in quotes:
        gap = inner[pos:q.start()]
        if not _cue_words_only(gap):
            return []
        separate = any(w.strip(",;:").lower() in _SEPARATE_CUES for w in gap.split())
        if not groups or separate:
            groups.append([])
        groups[-1].append(_body(q, "q"))
        pos = q.end()
    if inner[pos:].strip(" ,;.:"):
        return []
    out = [_clean_all(g) for g in groups]
    return [g for g in out if g]


def _unquoted_alias_names(paren: str) -> tuple[str, ...]:
    """(or Your), (or "Your"), ("Your"): the other names of an unquoted term."""
    inner = paren.strip()[1:-1]
    groups = _paren_groups(inner)
    if groups:
        return tuple(n for g in groups for n in g)
    m = re.fullmatch(r"\s*(?:or|also|each\s+an?)\s+(" + _TITLE_PHRASE + r")\s*", inner)
    return _clean_all([m.group(1)]) if m else ()


def _subject_position(text: str, start: int, *, strict: bool) -> bool:
    """Is *start* where a subject stands: the start of a sentence or clause, after nothing
    but "the", "To", "the term" and the like (*strict*), or after a short introduction
    without a verb or a subordinating word?"""
    lo = max(0, start - 120)
    before = text[lo:start]
    cut = -1
    for m in _CLAUSE_BOUNDARY_RE.finditer(before):
        cut = m.end()
    if cut < 0 and lo > 0:
        return False
    words = [w.lower() for w in re.findall(r"[A-Za-z][\w'’-]*", before[max(cut, 0):])]
    if words[-1:] in (["term"], ["terms"]) or all(w in _SUBJECT_LEAD for w in words):
        return True
    if strict or len(words) > MAX_SUBJECT_INTRO_WORDS:
        return False
    while words[:1] in (["and"], ["or"]):
        words = words[1:]
    if words[:3] == ["in", "which", "case"]:  # "..., in which case "you" will mean the entity"
        words = words[3:]
    if not words:
        return True
    if words[0] not in _INTRO_STARTS and not (len(words) == 1 and len(words[0]) == 1):
        return False  # a one-letter bullet ("o") is no sentence
    return not any(w in _CLAUSE_BLOCKERS for w in words)


def _subject_definitions(text: str, cues: _Cues) -> list[_Found]:
    """Subject-and-verb definitions.  After a match that is no definition the search goes
    on one character after its start, so a long match does not hide a shorter one inside
    it (``as "X."  "X" means``: the second "X")."""
    found: list[_Found] = []
    if not (cues.quoted and cues.has_folded(*_VERB_CUES)):
        return found
    pos = 0
    while (m := _SUBJECT_RE.search(text, pos)) is not None:
        got = _subject_found(text, m)
        if got is None:
            pos = m.start() + 1
        else:
            found.extend(got)
            pos = m.end()
    return found


def _subject_found(text: str, m: re.Match[str]) -> list[_Found] | None:
    """The definitions of a subject-and-verb match, or None when it is none."""
    verb = m.group("verb").lower()
    if verb.startswith("mean") and _NOUN_MEANS_RE.match(text, m.end()):
        return None
    if not _subject_position(text, m.start(), strict=_WEAK_VERB_RE.match(verb) is not None):
        return None
    between = [w.lower() for w in m.group("between").replace(",", " ").split()]
    if between[1:2] == ["used"]:  # "X", when used in this Agreement, shall mean
        between = between[2:]
    if any(w in _CONNECTORS for w in between):
        return None
    names = _list_names(m.group("list"))
    if not names:
        return None
    aliases: tuple[str, ...] = ()
    if m.group("alias"):
        aliases = tuple(n for g in _paren_groups(m.group("alias").strip()[1:-1]) for n in g)
    if len(names) > 1 and _SEPARATE_VERB_RE.search(verb):
        return [_Found(m.start(), (n,)) for n in names]
    return [_Found(m.start(), names + aliases)]


def _line_start_matches(pattern: LazyPattern | re.Pattern[str], text: str) -> Iterator[re.Match[str]]:
    """``pattern.finditer(text)`` for a *pattern* that opens with ``(?m)^`` and never matches
    the empty string: tried only where a line starts (the search tries every character of
    the text, to find out that a line does not start there), and never inside the previous
    match.  O(lines) attempts."""
    start = done = 0  # a line's start; where the last match ended
    while True:
        if start >= done:
            m = pattern.match(text, start)
            if m is not None:
                yield m
                done = m.end()
        nl = text.find("\n", start)
        if nl < 0:
            return
        start = nl + 1


def _line_start_definitions(text: str, cues: _Cues, *, in_definitions: bool) -> list[_Found]:
    """Definitions at the start of the text or of one of its lines: unquoted terms with a
    defining verb, quoted terms with a colon or dash."""
    found: list[_Found] = []
    for m in _line_start_matches(_UNQUOTED_RE, text):
        name = m.group("name")
        first = name.split()[0].lower()
        if first in _NOT_TERM_STARTS or (first in ("a", "an") and len(name.split()) == 1):
            continue
        colon = m.group("sep").strip() != "" and m.group("sep").strip() != ","
        rest = text[m.end():m.end() + 2]
        if m.group("verb") is None and not (colon and in_definitions and rest[:1].islower()):
            continue
        if m.group("verb") is not None and _NOUN_MEANS_UNQUOTED_RE.match(text, m.end()):
            continue
        if first in ("a", "an") and len(name.split()) > 1:
            name = name.split(None, 1)[1]  # "An Apple Operating System means": the article goes
        term = _clean_all([name])
        if not term:
            continue
        aliases = _unquoted_alias_names(m.group("alias")) if m.group("alias") else ()
        found.append(_Found(m.start("name"), term + aliases))
    quoted_lines = cues.quoted and cues.has(*_LINE_START_SEPARATORS)
    for m in _line_start_matches(_QUOTED_LINE_START_RE, text) if quoted_lines else ():
        names = _list_names(m.group("list"))
        if names:
            aliases = _unquoted_alias_names(m.group("alias")) if m.group("alias") else ()
            found.append(_Found(m.start("list"), names + aliases))
    return found


def _other_definitions(text: str, cues: _Cues) -> list[_Found]:
    """Parentheses, "hereinafter", "each a ... together the", "is called", "refer to X as"
    (each pattern needs a quoted name, and most a cue word: :class:`_Cues`)."""
    found: list[_Found] = []
    if not cues.quoted:
        return found
    for m in _PAREN_RE.finditer(text) if "(" in text else ():
        found.extend(_Found(m.start(), g) for g in _paren_groups(m.group("inner")))
    for rx, cued in ((_HEREINAFTER_RE, cues.has_folded("hereinafter")), (_CALLED_RE, cues.has(*_CALLED_CUES))):
        for m in rx.finditer(text) if cued else ():
            names = _list_names(m.group("list"))
            if names and rx is _HEREINAFTER_RE and _list_is_separate(m.group("list")):
                found.extend(_Found(m.start(), (n,)) for n in names)
            elif names:
                found.append(_Found(m.start(), names))
    for rx, cued in ((_COLLECTIVE_RE, cues.has_folded(*_COLLECTIVE_CUES)), (_AS_DEFINED_RE, cues.has("term"))):
        for m in rx.finditer(text) if cued else ():
            names = _clean_all([_body(m, "q")])
            if names:
                found.append(_Found(m.start(), names))
    for m in _REFER_AS_RE.finditer(text) if cues.has("refer") else ():
        names = _clean_all([_body(m, "q")]) + _list_names(m.group("list"))
        if names:
            found.append(_Found(m.start(), names))
    return found


def _inline_definitions(text: str, *, in_definitions: bool = False, direct: bool = False) -> list[_Found]:
    """Every definition in *text*, in order of offset (*direct*: every pattern scanned, as
    :class:`_Cues` says)."""
    cues = _cues(text, direct=direct)
    found = [*_subject_definitions(text, cues), *_line_start_definitions(text, cues, in_definitions=in_definitions),
             *_other_definitions(text, cues)]
    found.sort(key=lambda f: f.offset)
    return found


def _corresponding_aliases(text: str) -> list[tuple[int, tuple[str, ...]]]:
    """"Your has a corresponding meaning": (offset, names) of the other forms of the term
    the provision defines."""
    out = []
    for m in _CORRESPONDING_RE.finditer(text) if "corresponding" in text else ():
        raw = m.group("names")
        names = _list_names(raw) or _clean_all(re.split(r"\s*,?\s*(?:and|or)\s+|\s*,\s*", raw))
        if names:
            out.append((m.start(), names))
    return out


@functools.lru_cache(maxsize=64)
def _sentence_splits(text: str) -> tuple[tuple[int, ...], tuple[int, ...]]:
    """(starts, ends) of the sentence breaks of *text*, found once per text (a provision
    holding thousands of definitions asks for thousands of sentences)."""
    found = list(_SENTENCE_SPLIT_RE.finditer(text))
    return tuple(m.start() for m in found), tuple(m.end() for m in found)


def _sentence_span(text: str, offset: int) -> tuple[int, int]:
    """The sentence of *text* around *offset*, white space trimmed.  O(log sentences)."""
    starts, ends = _sentence_splits(text)
    k = bisect.bisect_right(ends, offset)  # breaks ending at or before offset
    start = ends[k - 1] if k else 0
    j = bisect.bisect_left(starts, max(offset, start))
    end = starts[j] if j < len(starts) else len(text)
    while start < end and text[start].isspace():
        start += 1
    while end > start and text[end - 1].isspace():
        end -= 1
    return start, end


def _shown(text: str, span: tuple[int, int]) -> str:
    a, b = span
    if b - a > MAX_INLINE_DEFINITION_CHARS:
        return text[a:a + MAX_INLINE_DEFINITION_CHARS].rstrip() + "…"
    return text[a:b]


# --------------------------------------------------------------------------------------
# Definition tables and emphasised terms (from the blocks)
# --------------------------------------------------------------------------------------

_TABLE_HEADER_RE = lazy_compile(
    r"^\W*(?:defined\s+)?(?:terms?|expressions?|words?|names?|definitions?|meanings?|"
    r"interpretations?|descriptions?)\W*$", re.IGNORECASE)
_MEANING_START_RE = lazy_compile(
    r"^\W{0,2}(?:" + _UNQUOTED_VERBS + r"|[a-z])")


@dataclass(frozen=True, slots=True)
class _Place:
    """Where a block's text sits in a provision's text."""

    pid: str
    offset: int


def _places(provisions: Sequence[Provision]) -> dict[int, _Place]:
    out: dict[int, _Place] = {}
    for p in provisions:
        off = 0
        for s in p.segments:
            out.setdefault(s.block, _Place(p.id, off - s.start))
            off += s.end - s.start + 1
    return out


def _table_cell_term(cell: str) -> str | None:
    cell = cell.strip()
    m = _QUOTED_RE.fullmatch(cell.rstrip(":"))
    raw = (_body(m, "q") or "") if m else cell.rstrip(":–—").strip()
    words = raw.split()
    if not words or len(words) > MAX_UNQUOTED_TERM_WORDS or raw.endswith((".", ";")):
        return None
    if not raw[:1].isupper() and m is None:
        return None
    return clean_term(raw)


def _table_rows(run: Sequence[Block]) -> list[tuple[list[Block], str, str]]:
    """(blocks, first cell, rest) of each row of a table run: a block with tabs is a row
    (Markdown); otherwise cells alternate, a term-like cell starting a row (.docx)."""
    rows: list[tuple[list[Block], str, str]] = []
    for b in run:
        if "\t" in b.text:
            first, _, rest = b.text.partition("\t")
            rows.append(([b], first, rest.replace("\t", " ").strip()))
        elif not rows or (_table_cell_term(b.text) is not None and rows[-1][2]):
            rows.append(([b], b.text, ""))
        else:
            blocks, first, rest = rows[-1]
            rows[-1] = ([*blocks, b], first, (rest + " " + b.text).strip())
    return rows


def _reads_as_meaning(text: str) -> bool:
    return len(text.split()) >= MIN_MEANING_WORDS and _MEANING_START_RE.match(text) is not None


def _table_definitions(run: Sequence[Block], places: Mapping[int, _Place],
                       texts: Mapping[str, str]) -> list[tuple[str, _Found, tuple[int, int]]]:
    """(provision id, found, span) of the definitions of one table (a run of table blocks)."""
    rows = _table_rows(run)
    header = bool(rows) and bool(_TABLE_HEADER_RE.match(rows[0][1])) and bool(
        _TABLE_HEADER_RE.match(rows[0][2] or "x"))
    body = rows[1:] if header else rows
    good = [r for r in body if _table_cell_term(r[1]) is not None and (
        _reads_as_meaning(r[2]) or (r[0][0].emphasised and len(r[2].split()) >= MIN_MEANING_WORDS))]
    if not header and (len(good) < TABLE_MIN_ROWS or len(good) < TABLE_DEFINITION_SHARE * len(body)):
        return []
    out = []
    for blocks, first, rest in body:
        term = _table_cell_term(first)
        start, end = places.get(blocks[0].index), places.get(blocks[-1].index)
        if term is None or not rest or start is None or end is None or start.pid != end.pid:
            continue
        first_block, last_block = blocks[0].text, blocks[-1].text
        a = max(start.offset + len(first_block) - len(first_block.lstrip()), 0)
        b = min(end.offset + len(last_block.rstrip()), len(texts[start.pid]))
        if a < b:
            out.append((start.pid, _Found(a, (term,)), (a, b)))
    return out


def _block_definitions(blocks: Sequence[Block], provisions: Sequence[Provision], *,
                       in_definitions: frozenset[str]) -> list[tuple[str, _Found, tuple[int, int]]]:
    """Definitions that only the blocks show: tables and emphasised (bold) lead-in terms;
    *in_definitions* holds the ids of the provisions in a definitions section."""
    places = _places(provisions)
    texts = {p.id: p.text for p in provisions}
    out: list[tuple[str, _Found, tuple[int, int]]] = []
    run: list[Block] = []
    for b in [*blocks, None]:
        if b is not None and b.in_table:
            if b.text.strip():
                run.append(b)
            continue
        if run:
            out.extend(_table_definitions(run, places, texts))
            run = []
        if b is not None and b.lead:
            got = _lead_definition(b, places, texts, in_definitions=in_definitions)
            if got is not None:
                out.append(got)
    return out


_LEAD_VERB_RE = lazy_compile(r"\s*(?:\([^()\n]{1,60}\))?\s*[:–—]?\s*" + _UNQUOTED_VERBS)


def _lead_definition(b: Block, places: Mapping[int, _Place], texts: Mapping[str, str], *,
                     in_definitions: frozenset[str]) -> tuple[str, _Found, tuple[int, int]] | None:
    """A bold or underlined term at the start of a paragraph, then "means" (or, in a
    definitions section, a colon and the meaning).  The structure reader may have made the
    term the provision's heading: the text then starts after it."""
    place = places.get(b.index)
    lead = (b.lead or "").strip()
    k = b.text.find(lead)
    if place is None or not lead or k < 0:
        return None
    text = texts[place.pid]
    at = place.offset + k
    if at < 0 or text[at:at + len(lead)] != lead:
        at = max(at + len(lead), 0)  # the lead is the heading: the meaning starts the text
        tail = text[at:]
    else:
        tail = text[at + len(lead):]
    colon = lead.endswith((":", "–", "—")) or tail.lstrip()[:1] in (":", "–", "—")
    if _LEAD_VERB_RE.match(tail) is None and not (
            colon and place.pid in in_definitions and tail.lstrip(" :–—")[:1].islower()):
        return None
    term = _table_cell_term(lead.strip("\"“”'‘’ :–—.")) if lead[:1].isalnum() or lead[:1] in "\"“‘'" else None
    if term is None:
        return None
    return place.pid, _Found(at, (term,)), _sentence_span(text, at)


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


_POSSESSIVE = r"(?:['’][sS](?!\w)|(?<=[sS])['’](?!\w))?"


def _forms_regex(forms: Iterable[str]) -> str:
    alts = sorted(set(forms), key=len, reverse=True)
    body = "|".join(re.escape(f).replace(r"\ ", r"\s+") for f in alts)
    return r"(?<![\w-])(?:" + body + r")" + _POSSESSIVE + r"(?!\w)"


def _uses_regex(forms: Iterable[str]) -> str:
    """:func:`_forms_regex`, its alternatives grouped by their first character, each group
    behind that character and the look-behind moved after it: a pattern opening with a
    look-behind is tried at every position of the text, one opening with a choice of
    characters only where one of them stands (the regex engine skips the others with a
    set test).  The same matches: at a position only the forms starting with its
    character can match, tried in the same order (longest first)."""
    groups: dict[str, list[str]] = {}
    for f in sorted(set(forms), key=len, reverse=True):
        groups.setdefault(f[0], []).append(f[1:])
    parts = []
    for first, rests in groups.items():
        lead = re.escape(first)
        body = "|".join(re.escape(r).replace(r"\ ", r"\s+") for r in rests)
        parts.append(lead + r"(?<![\w-]" + lead + r")(?:" + body + ")")
    return r"(?:" + "|".join(parts) + r")" + _POSSESSIVE + r"(?!\w)"


def term_pattern(term: str) -> re.Pattern[str]:
    """A pattern matching whole-word uses of *term*: singular, plural and possessive forms
    (``Customer``, ``Customers``, ``Customer's``, ``Customer’s``, ``Customers'``), case as
    written, any white space between the words of a multi-word term.

    It does not know other terms: to count ``Services`` without the ``Services`` inside
    ``Additional Services``, use :func:`terms_pattern` with both terms.
    """
    return re.compile(_forms_regex(term_forms(term)))


def term_owners(terms: Sequence[str], *, aliases: Mapping[str, str] | None = None) -> dict[str, str]:
    """Every form of *terms* and *aliases* (alias -> term, the term among *terms*) mapped to
    the term it names; an exact name comes before any other name's plural form, so
    "Services" the term beats "Service"'s plural.  O(names)."""
    owner: dict[str, str] = {}
    names = [*terms, *(aliases or {})]
    for t in names:
        owner.setdefault(t, (aliases or {}).get(t, t))
    for t in names:
        for f in term_forms(t):
            owner.setdefault(f, owner[t])
    return owner


def terms_pattern(terms: Sequence[str], *, aliases: Mapping[str, str] | None = None
                  ) -> tuple[re.Pattern[str], dict[str, str]]:
    """One pattern for all *terms*, longest form first, and a map form -> term
    (:func:`term_owners`).

    Each match's text, minus any possessive ending and with white space collapsed, is a
    key of the map.  Because the longest form is tried first at each position, a longer
    term that contains a shorter one is matched as the longer term.  *aliases* maps other
    names (alias -> term, the term among *terms*): their forms are matched too and map to
    their term.
    """
    owner = term_owners(terms, aliases=aliases)
    if not owner:
        return re.compile(r"(?!x)x"), owner
    return re.compile(_forms_regex(owner)), owner


#: Most forms matched with one compiled pattern.  Compiling a pattern of the forms costs
#: about 0.35 ms per form with Python's regular-expression compiler (7 s for the 20,000
#: forms of a document defining 5,000 terms, measured on the 2-core test machine), and a
#: flat alternation is tried form by form at every position; a Python walk of a character
#: trie (:func:`walk_forms`) costs about as much per character of text as the pattern
#: costs per 10, and nothing per form.  An agreement's few hundred forms stay with the pattern.
REGEX_FORMS_MAX = 2000


@dataclass(slots=True)
class CharTrie:
    """A node of a character trie: the nodes after each next character, and the form that
    ends here (None where none does)."""

    children: dict[str, CharTrie] = field(default_factory=dict)
    form: str | None = None


def char_trie(forms: Iterable[str]) -> CharTrie:
    """A character trie of *forms*."""
    root = CharTrie()
    for f in forms:
        node = root
        for ch in f:
            nxt = node.children.get(ch)
            if nxt is None:
                nxt = node.children[ch] = CharTrie()
            node = nxt
        node.form = f
    return root


def _word_char(ch: str) -> bool:
    return ch.isalnum() or ch == "_"


def _ending(text: str, j: int) -> tuple[int, str | None] | None:
    """Where a use ending its name at *j* ends, and its possessive ending: what
    :data:`_POSSESSIVE` allows ("'s", a bare "'" after an s), or None when a word goes on."""
    n = len(text)
    if j < n and text[j] in "'\u2019":
        if j + 1 < n and text[j + 1] in "sS" and (j + 2 >= n or not _word_char(text[j + 2])):
            return j + 2, text[j:j + 2]
        if j > 0 and text[j - 1] in "sS" and (j + 1 >= n or not _word_char(text[j + 1])):
            return j + 1, text[j]
    if j < n and _word_char(text[j]):
        return None
    return j, None


def walk_forms(text: str, trie: CharTrie, *, word_start: bool = False) -> Iterable[tuple[int, int, str, str | None]]:
    """(start, end, form, possessive) of the uses in *text*, as ``pattern.finditer`` finds
    them for a pattern of the forms followed by a possessive ending: leftmost, longest form
    first, a space of a form matching any run of white space, non-overlapping; with
    *word_start*, only where no letter, digit, "_" or "-" comes before (the ``(?<![\\w-])``
    of :func:`terms_pattern`).  O(length of text x length of the longest form)."""
    i, n = 0, len(text)
    while i < n:
        if word_start and i and (_word_char(text[i - 1]) or text[i - 1] == "-"):
            i += 1
            continue
        node = trie.children.get(text[i])
        best = None
        j = i
        while node is not None:
            j += 1
            if node.form is not None:
                got = _ending(text, j)
                if got is not None:
                    best = (i, got[0], node.form, got[1])
            if j >= n:
                break
            ch = text[j]
            space = node.children.get(" ") if ch.isspace() else None
            if space is not None:
                node = space
                while j + 1 < n and text[j + 1].isspace():
                    j += 1
            else:
                node = node.children.get(ch)
        if best is None:
            i += 1
            continue
        yield best
        i = best[1]


def _use_finder(owner: Mapping[str, str]) -> Callable[[str], list[str]]:
    """A function giving the forms (white space collapsed, possessive ending dropped) of
    the uses of *owner*'s names in a text: a compiled pattern for an agreement's few names,
    the character-trie walk for many (:data:`REGEX_FORMS_MAX`)."""
    if len(owner) > REGEX_FORMS_MAX:
        trie = char_trie(owner)
        return lambda text: [f for _s, _e, f, _p in walk_forms(text, trie, word_start=True)]
    findall = re.compile(_uses_regex(owner)).findall  # the pattern has no group: whole matches
    seen: dict[str, str] = {}  # match text -> form (an agreement repeats its few names)

    def forms(text: str) -> list[str]:
        out = []
        for got in findall(text):
            form = seen.get(got)
            if form is None:
                form = seen[got] = _form_of(got)
            out.append(form)
        return out

    return forms


def _form_of(match_text: str) -> str:
    text = " ".join(match_text.split())
    for suffix in ("'s", "’s", "'S", "’S", "'", "’"):
        if text.endswith(suffix):
            return text[: -len(suffix)]
    return text


# --------------------------------------------------------------------------------------
# The finder
# --------------------------------------------------------------------------------------


class _Collector:
    """Definitions in document order; the first definition of a name wins."""

    def __init__(self) -> None:
        self.defs: dict[str, tuple[str, str, tuple[int, int]]] = {}  # term -> (definition, pid, span)
        self.aliases: dict[str, list[str]] = {}
        self.owner: dict[str, str] = {}  # every name -> its term

    def add(self, names: Sequence[str], definition: str, pid: str, span: tuple[int, int]) -> None:
        names = [n for n in dict.fromkeys(names)]
        if not names:
            return
        head = names[0]
        if head in self.owner:
            term = self.owner[head]
            if self.defs[term][1] != pid:
                return
        else:
            term = head
            self.defs[term] = (definition, pid, span)
            self.aliases[term] = []
            self.owner[term] = term
        for a in names[1:]:
            if a not in self.owner:
                self.owner[a] = term
                self.aliases[term].append(a)


def _in_definitions(p: Provision, by_id: Mapping[str, Provision]) -> bool:
    """Is *p* a definition or inside a definitions section (an ancestor headed so)?"""
    q: Provision | None = p
    seen = 0
    while q is not None and seen < 64:  # bounded: the nesting depth of a document
        if q.kind == "definition" or (q.heading and _DEFINITIONS_HEADING_RE.match(q.heading)):
            return True
        q = by_id.get(q.parent) if q.parent else None
        seen += 1
    return False


def _provision_definitions(p: Provision, c: _Collector, *, in_definitions: bool) -> None:
    text = p.text
    inline = _inline_definitions(text, in_definitions=in_definitions)
    if p.kind == "definition" and p.term:
        head = text.find(p.term) + len(p.term) + ALIAS_WINDOW
        own = [p.term]
        for f in inline:
            if f.offset <= head and p.term in f.names:
                own.extend(f.names)
        for f in inline:  # an alternative form in the same breath: "You" (or "Your")
            if f.offset <= head and p.term not in f.names:
                own.extend(f.names)
        c.add(own, text, p.id, (0, len(text)))
    for f in inline:
        span = _sentence_span(text, f.offset)
        c.add(f.names, _shown(text, span), p.id, span)
    for off, names in _corresponding_aliases(text):
        owner = next((c.owner[f.names[0]] for f in reversed(inline) if f.offset < off
                      and f.names[0] in c.owner and c.defs[c.owner[f.names[0]]][1] == p.id), None)
        if owner is not None:
            c.add([owner, *names], "", p.id, (0, 0))


def find_terms(provisions: Sequence[Provision], *, blocks: Sequence[Block] = ()
               ) -> tuple[DefinedTerm, ...]:
    """The defined terms of a document, in order of definition, with their aliases, the
    span of their definitions and their use counts.  *blocks* (the document's paragraphs,
    whose indices the provisions' segments name) add the definitions only the blocks show:
    definition tables and bold or underlined terms."""
    c = _Collector()
    by_id = {p.id: p for p in provisions}
    in_defs = frozenset(p.id for p in provisions if _in_definitions(p, by_id))
    from_blocks: dict[str, list[tuple[_Found, tuple[int, int]]]] = {}
    for pid, f, span in _block_definitions(blocks, provisions, in_definitions=in_defs) if blocks else ():
        from_blocks.setdefault(pid, []).append((f, span))
    for p in provisions:
        _provision_definitions(p, c, in_definitions=p.id in in_defs)
        for f, span in from_blocks.get(p.id, ()):
            c.add(f.names, _shown(p.text, span), p.id, span)
    order = list(c.defs)
    if not order:
        return ()
    alias_of = {a: t for t, al in c.aliases.items() for a in al}
    owner = term_owners(order, aliases=alias_of)
    find = _use_finder(owner)
    uses = dict.fromkeys(order, 0)
    for p in provisions:
        for text in (p.heading or "", p.text):
            for form in find(text) if text else ():
                term = owner.get(form)
                if term is not None and c.defs[term][1] != p.id:
                    uses[term] += 1
    return tuple(DefinedTerm(term=t, definition=c.defs[t][0], provision=c.defs[t][1], uses=uses[t],
                             aliases=tuple(c.aliases[t]), span=c.defs[t][2])
                 for t in order)
