"""Severity 0-100 of each deviation, with human-readable reasons, from an editable rule file.

The rules live in ``resources/severity.toml`` (read with :mod:`tomllib`); the file documents
the formula.  This module finds the signals a change shows:

* figures: amounts, currencies, durations, percentages and counts, including the
  words-and-figures form "thirty (30) days", with the old and new values in the reason;
* obligation strength: shall / must / will / agrees to  <->  may / should / endeavours to /
  will use reasonable efforts to ...;
* negation added or removed; qualifiers (reasonable, material, sole discretion, ...) added,
  removed or changed;
* signals found by the classifier on the tokens (the other party put in our party's place, a
  proper name replaced, a cross-reference now pointing at another provision), passed in as
  :class:`Signal`;

and weighs them by the provision's clause type, guessed from its heading with the keyword
lists of the rule file unless a better classifier is given.

Cost: each text is scanned once per phrase list (cached per text); a change then costs
O(phrases overlapping it).
"""

from __future__ import annotations

import re
import tomllib
from bisect import bisect_left, bisect_right
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path
from typing import Any, Protocol, TypeVar

from ..errors import CounterdraftError
from ..lazyre import CaselessPattern, compile_pattern
from ..model import Document, Provision
from .figures import number_skips

__all__ = [
    "DEFAULT_RULES_PATH",
    "ClauseClassifier",
    "Quantity",
    "SeverityRules",
    "Signal",
    "clause_types_for",
    "find_quantities",
    "guess_clause_type",
    "is_weight_reason",
    "load_rules",
    "provision_change_severity",
    "text_change_severity",
]

DEFAULT_RULES_PATH = Path(__file__).resolve().parent.parent.parent / "resources" / "severity.toml"
RULES_SCHEMA = "counterdraft.severity-rules/1"

_SIGNALS = (
    "number_changed", "number_added", "number_removed", "obligation_weakened",
    "obligation_strengthened", "obligation_added", "obligation_removed", "negation_added",
    "negation_removed", "qualifier_added", "qualifier_removed", "qualifier_changed",
    "party_swapped", "name_changed", "cross_reference_changed", "wording_changed", "sentence_inserted",
    "sentence_deleted", "heading_changed", "provision_added", "provision_removed",
)
_CATEGORY_KEYS = ("term", "move", "numbering", "numbering_cross_reference", "formatting",
                  "punctuation")
#: Signal keys a rule file may leave out (it was written before they existed), with the
#: points used then: a figure that fills in a blank of the precedent (a date, an address, a
#: company number) is substantive, but the precedent asked for a value there.
_OPTIONAL_SIGNALS = {
    "number_filled_in": 15.0,
    # written before the recalibration of issue 12: the points of resources/severity.toml
    "conjunction_in_obligation": 55.0, "conjunction_changed": 30.0,
    "efforts_weakened": 45.0, "efforts_strengthened": 35.0,
    "law_or_forum_changed": 65.0, "interest_rate_changed": 40.0,
}
#: Category keys a rule file may leave out (it was written before they existed), with the
#: severity used then: a blank of the precedent filled in is informational, scored like a
#: punctuation difference.
_OPTIONAL_CATEGORY_KEYS = {"completion": 2.0}
#: Values of ``headings.added_or_removed`` in the rule file.
HEADING_ADDED_OR_REMOVED_CHOICES = ("formatting", "substantive")


class ClauseClassifier(Protocol):
    """Returns a clause-type id for a provision (or None); the precedent-set engineer's
    classifier implements it."""

    def __call__(self, provision: Provision, document: Document) -> str | None: ...


@dataclass(slots=True)
class _RuleCache:
    """What a rule set computes once: its keyword index, its phrase patterns by name, and
    the phrase matches of each text by pattern name."""

    keywords: list[tuple[str, str]] | None = None
    patterns: dict[str, CaselessPattern] = field(default_factory=dict)
    texts: dict[str, dict[str, _Found]] = field(default_factory=dict)


@dataclass(frozen=True, slots=True)
class SeverityRules:
    signals: Mapping[str, float]
    categories: Mapping[str, float]
    weights: Mapping[str, float]
    kind_weights: Mapping[str, float]
    clause_type_keywords: Mapping[str, tuple[str, ...]]
    strong: tuple[str, ...]
    weak: tuple[str, ...]
    negations: tuple[str, ...]
    qualifiers: tuple[str, ...]
    other_signals: float = 0.25
    sentence_words: int = 8
    #: Category of a heading that one side only adds or removes (``[headings]`` of the rule
    #: file): "formatting" or "substantive".
    heading_added_or_removed: str = "formatting"
    source: str = "built-in"
    _cache: _RuleCache = field(default_factory=lambda: _RuleCache(), compare=False, repr=False)

    def weight(self, clause_type: str | None, kind: str) -> float:
        if kind in self.kind_weights:
            return self.kind_weights[kind]
        if clause_type and clause_type in self.weights:
            return self.weights[clause_type]
        return self.weights.get("default", 1.0)


def _fail(path: str, problem: str) -> CounterdraftError:
    return CounterdraftError(f"severity rules: {problem}", path=path)


def _str_list(path: str, where: str, value: object) -> tuple[str, ...]:
    if not isinstance(value, list) or not all(isinstance(v, str) and v.strip() for v in value):
        raise _fail(path, f"{where} must be a list of non-empty strings")
    return tuple(v.strip().lower() for v in value)


def _number(path: str, where: str, value: object, lo: float, hi: float) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not lo <= value <= hi:
        raise _fail(path, f"{where} must be a number from {lo:g} to {hi:g}")
    return float(value)


def _scores(path: str, data: Mapping[str, Any], table: str, required: Sequence[str],
            optional: Mapping[str, float]) -> dict[str, float]:
    """The points 0..100 of table *table*: every key of *required*, and those of *optional*
    with their defaults when the file leaves them out."""
    values = data[table]
    scores: dict[str, float] = {}
    for k in required:
        if k not in values:
            raise _fail(path, f"missing {table}.{k}")
        scores[k] = _number(path, f"{table}.{k}", values[k], 0, 100)
    for k, default in optional.items():
        scores[k] = _number(path, f"{table}.{k}", values.get(k, default), 0, 100)
    return scores


def load_rules(path: str | Path | None = None) -> SeverityRules:
    """Read and check a severity rule file (default: ``resources/severity.toml``)."""
    p = Path(path) if path is not None else DEFAULT_RULES_PATH
    sp = str(p)
    try:
        data = tomllib.loads(p.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise _fail(sp, "file not found") from None
    except (OSError, UnicodeDecodeError) as err:
        raise _fail(sp, f"cannot read the file ({err.__class__.__name__})") from None
    except tomllib.TOMLDecodeError as err:
        raise _fail(sp, f"not valid TOML ({err})") from None
    if data.get("schema") != RULES_SCHEMA:
        raise _fail(sp, f'schema must be "{RULES_SCHEMA}"')
    for section in ("scale", "signals", "categories", "weights", "kind_weights",
                    "clause_type_keywords", "obligation", "negation", "qualifiers"):
        if not isinstance(data.get(section), dict):
            raise _fail(sp, f"missing table [{section}]")
    signals = _scores(sp, data, "signals", _SIGNALS, _OPTIONAL_SIGNALS)
    categories = _scores(sp, data, "categories", _CATEGORY_KEYS, _OPTIONAL_CATEGORY_KEYS)
    weights = {k: _number(sp, f"weights.{k}", v, 0, 10) for k, v in data["weights"].items()}
    kind_weights = {k: _number(sp, f"kind_weights.{k}", v, 0, 10)
                    for k, v in data["kind_weights"].items()}
    keywords = {k: _str_list(sp, f"clause_type_keywords.{k}", v)
                for k, v in data["clause_type_keywords"].items()}
    scale = data["scale"]
    headings = data.get("headings", {})  # optional: a rule file written before it had it
    if not isinstance(headings, dict):
        raise _fail(sp, "[headings] must be a table")
    heading_rule = headings.get("added_or_removed", "formatting")
    if heading_rule not in HEADING_ADDED_OR_REMOVED_CHOICES:
        raise _fail(sp, "headings.added_or_removed must be "
                        + " or ".join(f'"{c}"' for c in HEADING_ADDED_OR_REMOVED_CHOICES))
    return SeverityRules(
        signals=signals, categories=categories, weights=weights, kind_weights=kind_weights,
        clause_type_keywords=keywords,
        strong=_str_list(sp, "obligation.strong", data["obligation"].get("strong")),
        weak=_str_list(sp, "obligation.weak", data["obligation"].get("weak")),
        negations=_str_list(sp, "negation.words", data["negation"].get("words")),
        qualifiers=_str_list(sp, "qualifiers.phrases", data["qualifiers"].get("phrases")),
        other_signals=_number(sp, "scale.other_signals", scale.get("other_signals"), 0, 1),
        sentence_words=int(_number(sp, "scale.sentence_words", scale.get("sentence_words"), 1, 1000)),
        heading_added_or_removed=heading_rule,
        source=sp,
    )


@lru_cache(maxsize=1)
def _default_rules() -> SeverityRules:
    return load_rules()


# ----------------------------------------------------------------------------------------
# Clause types
# ----------------------------------------------------------------------------------------

def _keyword_index(rules: SeverityRules) -> list[tuple[str, str]]:
    """(keyword with single spaces, clause type), longest keyword first (a stable sort: the
    rule file's order among keywords of one length)."""
    idx = rules._cache.keywords
    if idx is None:
        by_length = sorted(((" ".join(w.split()), ctype, len(w))
                            for ctype, words in rules.clause_type_keywords.items() for w in words),
                           key=lambda t: -t[2])
        idx = rules._cache.keywords = [(w, ctype) for w, ctype, _n in by_length]
    return idx


def _is_word_char(c: str) -> bool:
    """What a regular expression's ``\\w`` matches in a str pattern."""
    return c.isalnum() or c == "_"


def _has_phrase(text: str, phrase: str) -> bool:
    """Whether *phrase* occurs in *text* as whole words (no word character right before or
    after it).  *text* has its white space collapsed to single spaces, as *phrase* has."""
    at = text.find(phrase)
    while at >= 0:
        end = at + len(phrase)
        if not (at and _is_word_char(text[at - 1])) and not (end < len(text) and _is_word_char(text[end])):
            return True
        at = text.find(phrase, at + 1)
    return False


def guess_clause_type(heading: str | None, *, rules: SeverityRules) -> str | None:
    """The clause type whose longest keyword occurs in *heading* (lower-cased, "&" read as
    "and"), as whole words with any white space between them, or None.  Plain string
    searches: compiling a pattern per keyword (about 150) cost more than a short review."""
    if not heading:
        return None
    h = " ".join(heading.casefold().replace("&", "and").split())
    for phrase, ctype in _keyword_index(rules):
        if _has_phrase(h, phrase):
            return ctype
    return None


def clause_types_for(doc: Document, *, rules: SeverityRules,
                     classifier: Callable[[Provision, Document], str | None] | None = None
                     ) -> tuple[str | None, ...]:
    """A clause type per provision: the classifier's, else the heading's keywords, else the
    parent's type; definitions are ``definitions``."""
    pos = {p.id: i for i, p in enumerate(doc.provisions)}
    out: list[str | None] = []
    for p in doc.provisions:
        t = classifier(p, doc) if classifier is not None else None
        if t is None and p.kind == "definition":
            t = "definitions"
        if t is None:
            t = guess_clause_type(p.heading, rules=rules)
        if t is None and p.parent in pos and pos[p.parent] < len(out):
            t = out[pos[p.parent]]
        out.append(t)
    return tuple(out)


# ----------------------------------------------------------------------------------------
# Figures
# ----------------------------------------------------------------------------------------

_UNITS = {
    "zero": 0, "one": 1, "two": 2, "three": 3, "four": 4, "five": 5, "six": 6, "seven": 7,
    "eight": 8, "nine": 9, "ten": 10, "eleven": 11, "twelve": 12, "thirteen": 13,
    "fourteen": 14, "fifteen": 15, "sixteen": 16, "seventeen": 17, "eighteen": 18,
    "nineteen": 19, "twenty": 20, "thirty": 30, "forty": 40, "fifty": 50, "sixty": 60,
    "seventy": 70, "eighty": 80, "ninety": 90,
}
_SCALES = {"hundred": 100, "thousand": 1000, "million": 10**6, "billion": 10**9}
_NUMWORD = "|".join(sorted([*_UNITS, *_SCALES], key=len, reverse=True))
_WORDS = rf"(?:{_NUMWORD})(?:(?:\s+and\s+|[\s-]+)(?:{_NUMWORD}))*"
_FIG = r"\d{1,3}(?:,\d{3})+(?:\.\d+)?|\d+(?:\.\d+)?"
_CUR_PRE = r"(?P<cur1>£|\$|€|\b(?:GBP|USD|EUR|CHF|JPY|AUD|CAD)\s?)"
_CUR_POST = r"(?P<cur2>pounds(?:\s+sterling)?|sterling|dollars|euros|GBP|USD|EUR|CHF)"
_UNIT = (r"(?P<unit>(?:business\s+|working\s+|calendar\s+|clear\s+|banking\s+)?"
         r"(?:days?|weeks?|months?|years?|hours?|minutes?|quarters?))")
_QUANTITY_BODY = (
    rf"{_CUR_PRE}?"
    rf"(?:(?P<w>\b{_WORDS})\s*\(\s*(?P<wf>{_FIG})\s*\)|(?P<f>(?<![\w.]){_FIG})|(?P<wo>\b{_WORDS}\b))"
    r"(?:\s?(?P<mult>million|billion|thousand|bn|m|k)\b)?"
    rf"(?:\s*(?P<pct>%|per\s?cent\b|percent\b)|\s+{_UNIT}\b|\s?{_CUR_POST}\b)?"
)
#: A figure starts with a currency sign, a digit or at the start of a word (every branch of
#: the body does): the look-ahead says so first, and the search skips the other positions
#: about twice as fast, with the same matches (tested against the body alone).
_QUANTITY_START = r"(?=[£$€\d]|\b\w)"
_QUANTITY_RE = compile_pattern(_QUANTITY_START + _QUANTITY_BODY, re.IGNORECASE)
_MULT = {"million": 10**6, "m": 10**6, "billion": 10**9, "bn": 10**9, "thousand": 1000, "k": 1000}
_CURRENCY_CODE = {"£": "GBP", "$": "USD", "€": "EUR", "pounds": "GBP", "pounds sterling": "GBP",
                  "sterling": "GBP", "dollars": "USD", "euros": "EUR"}


def _words_value(s: str) -> float | None:
    total = current = 0
    for w in re.split(r"[\s-]+", s.casefold()):
        if not w or w == "and":
            continue
        if w in _UNITS:
            current += _UNITS[w]
        elif w == "hundred":
            current = max(current, 1) * 100
        elif w in _SCALES:
            total += max(current, 1) * _SCALES[w]
            current = 0
        else:
            return None
    return float(total + current)


@dataclass(frozen=True, slots=True)
class Quantity:
    start: int
    end: int
    kind: str  # "amount" | "percentage" | "duration" | "number"
    value: float
    unit: str  # currency code, "%", "days", "business days", ... or ""
    text: str  # verbatim

    def display(self) -> str:
        v = f"{self.value:,.2f}".rstrip("0").rstrip(".") if self.value % 1 else f"{self.value:,.0f}"
        if self.kind == "amount":
            return self.text if any(c.isdigit() for c in self.text) else f"{self.unit} {v}".strip()
        if self.kind == "percentage":
            return f"{v}%"
        if self.kind == "duration":
            return f"{v} {self.unit}"
        return self.text


#: Characters scanned on each side of a change for the figures it touches: a figure with its
#: words ("one hundred and twenty-five thousand pounds sterling (GBP 125,000)") is shorter.
QUANTITY_WINDOW = 120


class _Quantities:
    """Every figure of one text, in order (they do not overlap, so their starts and their
    ends are both sorted), found once; the figures of a window are a bisection away."""

    __slots__ = ("ends", "items", "starts")

    def __init__(self, items: list[Quantity]) -> None:
        self.items = items
        self.starts = [q.start for q in items]
        self.ends = [q.end for q in items]

    def within(self, lo: int, hi: int) -> list[Quantity]:
        """The figures that lie inside ``text[lo:hi]``."""
        return self.items[bisect_left(self.starts, lo):bisect_right(self.ends, hi)]


@lru_cache(maxsize=4096)
def _quantities_cached(text: str) -> _Quantities:
    return _Quantities(_find_quantities(text))


def _window(text: str, span: tuple[int, int]) -> tuple[int, int]:
    lo = max(0, span[0] - QUANTITY_WINDOW)
    hi = min(len(text), span[1] + QUANTITY_WINDOW)
    while lo > 0 and not text[lo - 1].isspace():  # start at a word boundary
        lo -= 1
    while hi < len(text) and not text[hi].isspace():
        hi += 1
    return lo, hi


def find_quantities(text: str, *, around: tuple[int, int] | None = None) -> list[Quantity]:
    """Every figure in *text* (see :func:`_find_quantities`), or only those near the span
    *around* (within :data:`QUANTITY_WINDOW` characters).  The text's figures are found once
    (cached per text) and a window's are picked by bisection: a long provision rewritten
    asks for the windows of hundreds of changes, and scanning each window again cost more
    than the rest of the review."""
    found = _quantities_cached(text)
    if around is None:
        return list(found.items)
    if not found.items:
        return []
    return found.within(*_window(text, around))


def _find_quantities(text: str, lo: int = 0, hi: int | None = None) -> list[Quantity]:
    """Every figure in *text*: amounts, percentages, durations and other numbers.  A
    number written only in words counts only with a unit, currency or percent sign ("one of
    the parties" is no figure)."""
    out: list[Quantity] = []
    for m in _QUANTITY_RE.finditer(text, lo, len(text) if hi is None else hi):
        g = m.groupdict()
        if g["wf"] is not None:
            value = float(g["wf"].replace(",", ""))
        elif g["f"] is not None:
            value = float(g["f"].replace(",", ""))
        else:
            wv = _words_value(g["wo"] or "")
            if wv is None:
                continue
            value = wv
        has_unit = any(g[k] for k in ("cur1", "cur2", "pct", "unit"))
        if g["wo"] is not None and not has_unit:
            continue
        mult = g["mult"]
        if mult and mult.lower() in ("m", "k", "bn") and not (g["cur1"] or g["cur2"]):
            mult = None  # "5 m" is five metres, not five million, without a currency
        if mult:
            value *= _MULT[mult.lower()]
        if g["cur1"] or g["cur2"]:
            cur = (g["cur1"] or g["cur2"]).strip()
            kind, unit = "amount", _CURRENCY_CODE.get(cur.lower(), _CURRENCY_CODE.get(cur, cur.upper()))
        elif g["pct"]:
            kind, unit = "percentage", "%"
        elif g["unit"]:
            u = " ".join(g["unit"].lower().split())
            base = u.split()[-1]
            if not base.endswith("s"):
                base += "s"
            unit = " ".join([*u.split()[:-1], base])
            kind = "duration"
        else:
            kind, unit = "number", ""
        end = m.end()
        if not (g["pct"] or g["unit"] or g["cur2"] or mult):
            end = m.end("wf") + 1 if g["wf"] is not None else (m.end("f") if g["f"] else m.end("wo"))
        out.append(Quantity(m.start(), end, kind, value, unit, text[m.start():end].strip()))
    # "ten per cent (10%)": the figures in brackets repeat the words; keep one quantity.
    merged: list[Quantity] = []
    for q in out:
        prev = merged[-1] if merged else None
        if (prev is not None and prev.value == q.value and prev.kind == q.kind
                and re.fullmatch(r"\s*\(\s*", text[prev.end:q.start])):
            close = re.match(r"\s*\)", text[q.end:])
            end = q.end + (close.end() if close else 0)
            merged[-1] = Quantity(prev.start, end, prev.kind, prev.value, prev.unit,
                                  text[prev.start:end])
        else:
            merged.append(q)
    # the numbers of references to the agreement's own provisions and of list labels ("3."
    # of "3.Scope") are no figures (core.review.figures)
    skip = number_skips(text)
    return [q for q in merged if not (q.kind == "number" and skip.covers(q.start))]


# ----------------------------------------------------------------------------------------
# Phrase lists
# ----------------------------------------------------------------------------------------

def _phrase_re(phrases: Sequence[str]) -> CaselessPattern:
    """A pattern of the rule file's *phrases*, in any letter case (fixed for an installation,
    so its compiled program is kept: :func:`core.lazyre.compile_pattern`)."""
    alts = sorted({p.lower() for p in phrases}, key=lambda p: (-len(p), p))  # one text per list: its program is kept
    body = "|".join(r"\s+".join(map(re.escape, p.split())) for p in alts)
    return CaselessPattern(r"(?<![\w'])(?:" + body + r")(?![\w])")


#: An efforts obligation in any of its drafting forms: "shall use reasonable endeavours to",
#: "will use its commercially reasonable efforts to", "agrees to use best efforts to".  The
#: words between "use" and "efforts" set the standard (:data:`EFFORTS_LEVELS`).
_EFFORTS_RE = compile_pattern(
    r"(?<![\w'])(?:(?:shall|will|must|should|agrees?\s+to|undertakes?\s+to)\s+)?use\s+"
    r"(?P<std>(?:(?:its|their|his|her|all|every|commercially|reasonable|best|good|faith|diligent|"
    r"utmost|prudent|practicable|own|and|its\s+own)\s+){0,5}?)(?:efforts|endeavou?rs)(?:\s+to\b)?",
    re.IGNORECASE)
#: Efforts standards, strongest first, with their level: the English courts read "best
#: endeavours" as the most onerous, "all reasonable endeavours" between it and "reasonable
#: endeavours" (English case law, from memory), and "commercially reasonable" lets the obligor weigh
#: its own commercial interests, so lower still (common practice, no source).  A standard
#: not listed ("diligent efforts") counts as "reasonable".
EFFORTS_LEVELS: tuple[tuple[str, int], ...] = (
    ("utmost", 5), ("best", 5), ("all reasonable", 4), ("all commercially reasonable", 3),
    ("commercially reasonable", 2), ("reasonable", 3), ("good faith", 2),
)


def efforts_level(phrase: str) -> tuple[int, str]:
    """(level, standard) of an efforts phrase: ``(3, "reasonable endeavours")`` for "shall use
    reasonable endeavours to" (see :data:`EFFORTS_LEVELS`)."""
    m = _EFFORTS_RE.search(phrase)
    std = " ".join(m.group("std").lower().split()) if m else ""
    std = re.sub(r"^(?:its own|its|their|his|her|own)\s*", "", std).strip()
    noun = "endeavours" if m and "endeav" in m.group().lower() else "efforts"
    for words, level in EFFORTS_LEVELS:
        if std == words or std.endswith(" " + words) or std.startswith(words + " "):
            return level, f"{std} {noun}".strip()
    return 3, f"{std} {noun}".strip()


@lru_cache(maxsize=256)
def _efforts_matches(text: str) -> tuple[tuple[int, int, str], ...]:
    """The efforts phrases of *text* (cached: each change of a long provision asks again)."""
    return tuple((m.start(), m.end(), " ".join(m.group().lower().split())) for m in _EFFORTS_RE.finditer(text))



_T = TypeVar("_T")
#: A phrase found in a text: (start, end, the phrase in lower case, single-spaced).
_PhraseMatch = tuple[int, int, str]
#: Where a change sits in a text: ``text[a:b]``.
Span = tuple[int, int]


class _Found:
    """The phrase matches of one text, in the order found, indexed by start so that those
    near a span are found by bisection (a long provision rewritten has hundreds of changes;
    scanning every match of the text for each was quadratic)."""

    __slots__ = ("items", "longest", "starts")

    def __init__(self, items: list[tuple[int, int, str]]) -> None:
        self.items = items
        self.starts = sorted((it[0], k) for k, it in enumerate(items))
        self.longest = max((it[1] - it[0] for it in items), default=0)

    def near(self, span: tuple[int, int]) -> list[tuple[int, int, str]]:
        """The matches that start within the longest match's length before *span*, or
        inside it, in the order found: every match that overlaps or touches the span."""
        lo = bisect_left(self.starts, (span[0] - self.longest, -1))
        hi = bisect_right(self.starts, (span[1], len(self.items)))
        return [self.items[k] for k in sorted(k for _s, k in self.starts[lo:hi])]


def _matches(rules: SeverityRules, name: str, text: str) -> _Found:
    pat = rules._cache.patterns.get(name)
    if pat is None:
        phrases = {"obligation": rules.strong + rules.weak, "negation": rules.negations,
                   "qualifier": rules.qualifiers}[name]
        pat = _phrase_re(phrases)
        rules._cache.patterns[name] = pat
    tcache = rules._cache.texts.setdefault(name, {})
    hit = tcache.get(text)
    if hit is None:
        items = [(m.start(), m.end(), " ".join(m.group().lower().split())) for m in pat.finditer(text)]
        if name == "negation":
            items += [(m.start(), m.end(), "n't") for m in re.finditer(r"n['\u2019]t\b", text)]
        elif name == "obligation":
            # an efforts obligation is one (weak) obligation phrase, whatever its standard:
            # "shall use commercially reasonable endeavours to" is no bare "shall"
            efforts = _efforts_matches(text)
            if efforts:
                items = sorted([h for h in items if not any(a < h[1] and h[0] < b for a, b, _x in efforts)]
                               + list(efforts))
        if len(tcache) > 4096:
            tcache.clear()
        hit = tcache[text] = _Found(items)
    return hit


def _inside(items: Sequence[tuple[int, int, _T]], span: Span) -> list[tuple[int, int, _T]]:
    a, b = span
    if a == b:  # an insertion point: only what strictly surrounds it
        return [it for it in items if it[0] < a < it[1]]
    return [it for it in items if it[0] < b and it[1] > a]


@dataclass(frozen=True, slots=True)
class Signal:
    name: str  # a key of [signals]
    reason: str


def _quote(s: str) -> str:
    return f"'{s}'"


def _bare(q: Quantity) -> str:
    """A duration's figure without its unit ("30" of "30 days")."""
    return q.display().rsplit(" ", len(q.unit.split()))[0]


def _change_reason(kind: str, a: Quantity, b: Quantity) -> str:
    """The words for a figure of *kind* changed from *a* to *b*."""
    label = {"amount": "amount", "percentage": "percentage", "duration": "period",
             "number": "figure"}[kind]
    trend = ""
    if a.unit == b.unit and a.value != b.value:
        trend = " (higher)" if b.value > a.value else " (lower)"
        if kind == "duration":
            trend = " (longer)" if b.value > a.value else " (shorter)"
    if kind == "duration" and a.unit != b.unit and a.value == b.value:
        return f"{label} changed from {a.display()} to {b.display()}"
    if kind == "duration" and a.unit == b.unit:
        return f"{label} changed from {_bare(a)} to {_bare(b)} {a.unit}{trend}"
    return f"{label} changed from {a.display()} to {b.display()}{trend}"


def _figure_signals(p_text: str, p_span: tuple[int, int], d_text: str, d_span: tuple[int, int]
                    ) -> list[Signal]:
    pq = _inside([(q.start, q.end, q) for q in find_quantities(p_text, around=p_span)], p_span)
    dq = _inside([(q.start, q.end, q) for q in find_quantities(d_text, around=d_span)], d_span)
    out: list[Signal] = []
    olds = [q for *_x, q in pq]
    news = [q for *_x, q in dq]
    for kind in ("amount", "percentage", "duration", "number"):
        o = [q for q in olds if q.kind == kind]
        n = [q for q in news if q.kind == kind]
        for a, b in zip(o, n):
            if a.value == b.value and a.unit == b.unit:
                continue
            out.append(Signal("number_changed", _change_reason(kind, a, b)))
        for a in o[len(n):]:
            out.append(Signal("number_removed", f"figure removed: {a.display()}"))
        for b in n[len(o):]:
            out.append(Signal("number_added", f"figure added: {b.display()}"))
    return out


def _obligation_words(rules: SeverityRules, text: str, span: Span) -> list[str]:
    """The obligation words of *text* inside *span*, in order."""
    return [m[2] for m in _inside(_matches(rules, "obligation", text).near(span), span)]


def _by_strength(words: Sequence[str], strong: set[str]) -> tuple[list[str], list[str]]:
    """*words* parted into the strong ones and the others, each in order."""
    return [w for w in words if w in strong], [w for w in words if w not in strong]


def _obligation_signals(rules: SeverityRules, p_text: str, p_span: Span, d_text: str, d_span: Span) -> list[Signal]:
    strong = set(rules.strong)
    po = _obligation_words(rules, p_text, p_span)
    do = _obligation_words(rules, d_text, d_span)
    if po == do:
        return []
    ps, pw = _by_strength(po, strong)
    ds, dw = _by_strength(do, strong)
    if ps and dw and not ds:
        return [Signal("obligation_weakened", f"obligation weakened from {_quote(ps[0])} to {_quote(dw[0])}")]
    if pw and ds and not dw:
        return [Signal("obligation_strengthened", f"obligation strengthened from {_quote(pw[0])} to {_quote(ds[0])}")]
    if po and not do:
        return [Signal("obligation_removed", f"obligation words removed: {_quote(po[0])}")]
    if do and not po:
        return [Signal("obligation_added", f"obligation words added: {_quote(do[0])}")]
    return []


def _negation_signals(rules: SeverityRules, p_text: str, p_span: Span, d_text: str, d_span: Span) -> list[Signal]:
    pn = [m[2] for m in _inside(_matches(rules, "negation", p_text).near(p_span), p_span)]
    dn = [m[2] for m in _inside(_matches(rules, "negation", d_text).near(d_span), d_span)]
    if len(dn) > len(pn):
        extra = [w for w in dn if w not in pn] or dn
        return [Signal("negation_added", f"negation added: {_quote(extra[0])}")]
    if len(pn) > len(dn):
        gone = [w for w in pn if w not in dn] or pn
        return [Signal("negation_removed", f"negation removed: {_quote(gone[0])}")]
    return []


def _qualifier_signals(rules: SeverityRules, p_text: str, p_span: Span, d_text: str, d_span: Span) -> list[Signal]:
    pm = _matches(rules, "qualifier", p_text).near(p_span)
    dm = _matches(rules, "qualifier", d_text).near(d_span)
    pq = [m[2] for m in _inside(pm, p_span)]
    dq = [m[2] for m in _inside(dm, d_span)]

    def touching(items: Sequence[_PhraseMatch], span: Span, others: Sequence[str]) -> list[str]:
        a, b = span
        if a != b:
            return []
        return [m[2] for m in items if (m[0] == a or m[1] == a)
                and any(m[2] != o and m[2] in o for o in others)]

    pq += touching(pm, p_span, dq)
    dq += touching(dm, d_span, pq)
    added = [q for q in dict.fromkeys(dq) if q not in pq]
    removed = [q for q in dict.fromkeys(pq) if q not in dq]
    if added and removed:
        return [Signal("qualifier_changed", f"qualifier changed from {_quote(removed[0])} to {_quote(added[0])}")]
    out = [Signal("qualifier_added", f"qualifier added: {_quote(q)}") for q in added[:2]]
    out += [Signal("qualifier_removed", f"qualifier removed: {_quote(q)}") for q in removed[:2]]
    return out


def _efforts_signals(rules: SeverityRules, p_text: str, p_span: Span, d_text: str, d_span: Span) -> list[Signal]:
    """An efforts standard raised or lowered ("reasonable endeavours" -> "commercially
    reasonable endeavours"): a qualifier of the obligation, reported as what it does to the
    standard, not as obligation words removed."""
    pe = [m for m in _inside(_efforts_matches(p_text), p_span)]
    de = [m for m in _inside(_efforts_matches(d_text), d_span)]
    if not (pe and de):
        return []
    (pl, pstd), (dl, dstd) = efforts_level(pe[0][2]), efforts_level(de[0][2])
    if pl == dl:
        return []
    if dl < pl:
        return [Signal("efforts_weakened", f"efforts standard lowered from {_quote(pstd)} to "
                                           f"{_quote(dstd)}: a qualifier that weakens the obligation")]
    return [Signal("efforts_strengthened", f"efforts standard raised from {_quote(pstd)} to {_quote(dstd)}")]


#: Words that join the things a provision requires or allows; swapping one for another
#: ("and" -> "or") can change who must do what, or how much (common practice, no source).
CONJUNCTIONS = frozenset({"and", "or", "and/or", "nor", "any", "all", "each", "either", "every",
                          "both", "some"})
_CONJ_TOKEN_RE = compile_pattern(r"and/or|\w+", re.IGNORECASE)
#: Sentence breaks: after ".", "!", "?" or ";" followed by white space, or a line break.
_SENTENCE_BREAK_RE = compile_pattern(r"(?<=[.!?;])\s+|\n+")


@lru_cache(maxsize=256)
def _sentence_breaks(text: str) -> tuple[list[int], list[int]]:
    """(starts, ends) of the sentence breaks of *text*, in order (cached: a long provision
    rewritten asks for the sentences of hundreds of changes)."""
    found = list(_SENTENCE_BREAK_RE.finditer(text))
    return [m.start() for m in found], [m.end() for m in found]


def sentence_bounds(text: str, span: tuple[int, int]) -> tuple[int, int]:
    """The sentence (or ";"-clause, or line) of *text* that holds *span*, as offsets."""
    a, b = span
    starts, ends = _sentence_breaks(text)
    last = bisect_left(starts, a) - 1  # the last break starting before *a* (cut at *a*)
    start = min(ends[last], a) if last >= 0 else 0
    after = _SENTENCE_BREAK_RE.search(text, max(b, start))
    end = after.start() if after else len(text)
    return start, max(end, b)


def _conjunction_signals(rules: SeverityRules, p_text: str, p_span: Span, d_text: str, d_span: Span) -> list[Signal]:
    """"and" <-> "or" (and "any"/"all", "each"/"either", ...) when it is the whole change;
    ranked high inside an obligation, where it can change who must do what."""
    pw = [w.lower() for w in _CONJ_TOKEN_RE.findall(p_text[p_span[0]:p_span[1]])]
    dw = [w.lower() for w in _CONJ_TOKEN_RE.findall(d_text[d_span[0]:d_span[1]])]
    pc = [w for w in pw if w in CONJUNCTIONS]
    dc = [w for w in dw if w in CONJUNCTIONS]
    if not (pc and dc) or pc == dc or [w for w in pw if w not in CONJUNCTIONS] != [
            w for w in dw if w not in CONJUNCTIONS]:
        return []
    old, new = " ".join(pc), " ".join(dc)
    sa, sb = sentence_bounds(d_text, d_span)
    duty = [m[2] for m in _matches(rules, "obligation", d_text).near((sa, sb)) if sa <= m[0] < sb]
    if duty:
        return [Signal("conjunction_in_obligation",
                       f"conjunction changed from {_quote(old)} to {_quote(new)} inside an obligation "
                       f"({_quote(duty[0])}): it can change who must do what")]
    return [Signal("conjunction_changed", f"conjunction changed from {_quote(old)} to {_quote(new)}")]


#: Words of a choice of law or of a forum for disputes (common practice, no source).
_LAW_FORUM_RE = compile_pattern(
    r"\b(?:governed\s+by|governing\s+law|laws?\s+of|construed\s+in\s+accordance|jurisdictions?|"
    r"courts?\s+of|tribunals?|venue|forum|arbitrat\w*|seat\s+of)\b", re.IGNORECASE)
_LAW_RE = compile_pattern(r"\b(?:governed|governing\s+law|laws?\s+of|construed)\b", re.IGNORECASE)
#: Clause types whose every change of words is a change of law or forum.
LAW_FORUM_TYPES = frozenset({"governing_law", "dispute_resolution"})
#: Characters between a changed word and a word of law or forum for the change to count as
#: a change of law or forum outside a governing-law clause ("the courts of Wexmoor have
#: exclusive jurisdiction": a dozen words apart at most; a layout choice, no source).
LAW_FORUM_WINDOW = 80


def _law_forum_signal(p_text: str, p_span: Span, d_text: str, d_span: Span, clause_type: str | None,
                      signals: Sequence[Signal]) -> Signal | None:
    """A change of the governing law or of the forum for disputes: a name or words changed
    in a sentence that chooses a law or a court, in a governing-law or dispute clause or
    within :data:`LAW_FORUM_WINDOW` characters of such words."""
    if not any(s.name in ("name_changed", "wording_changed", "negation_added", "negation_removed",
                          "qualifier_added", "qualifier_removed", "qualifier_changed",
                          "sentence_inserted", "sentence_deleted")
               for s in signals):
        return None
    sa, sb = sentence_bounds(d_text, d_span)
    if clause_type in LAW_FORUM_TYPES:
        found = _LAW_FORUM_RE.search(d_text, sa, sb)
    else:
        lo, hi = max(sa, d_span[0] - LAW_FORUM_WINDOW), min(sb, d_span[1] + LAW_FORUM_WINDOW)
        found = _LAW_FORUM_RE.search(d_text, lo, hi)
    if found is None:
        return None
    law = _LAW_RE.search(d_text, sa, sb) is not None and not re.search(
        r"courts?|jurisdiction|arbitrat|venue|forum", found.group(), re.IGNORECASE)
    what = "governing law" if law else "forum for disputes"
    pw, dw = p_text[p_span[0]:p_span[1]], d_text[d_span[0]:d_span[1]]
    if pw.strip() and dw.strip():
        return Signal("law_or_forum_changed", f"{what} changed from {_excerpt(pw)} to {_excerpt(dw)}")
    if dw.strip():
        return Signal("law_or_forum_changed", f"{what} changed: {_excerpt(dw)} added")
    return Signal("law_or_forum_changed", f"{what} changed: {_excerpt(pw)} removed")


_INTEREST_RE = compile_pattern(r"\b(?:interest|late(?:-|\s+)(?:payment\s+)?(?:charges?|fees?))\b", re.IGNORECASE)
_LATE_RE = compile_pattern(
    r"\b(?:late|overdue|unpaid|outstanding|due\s+date|arrears|not\s+paid|when\s+due|past\s+due)\b",
    re.IGNORECASE)


def _interest_signals(d_text: str, d_span: Span, signals: list[Signal]) -> list[Signal]:
    """A changed percentage in a sentence about interest is a change of the interest rate:
    it matters less than the sum or the date it runs on (statutes supply interest on late
    commercial payments where a contract gives none -- e.g. the UK's Late Payment of
    Commercial Debts (Interest) Act 1998 and the EU's Directive 2011/7/EU, from memory)."""
    sa, sb = sentence_bounds(d_text, d_span)
    if not _INTEREST_RE.search(d_text, sa, sb):
        return signals
    late = "late-payment " if _LATE_RE.search(d_text, sa, sb) else ""
    out = []
    for s in signals:
        if s.name == "number_changed" and s.reason.startswith("percentage changed"):
            out.append(Signal("interest_rate_changed",
                              f"{late}interest rate changed" + s.reason[len("percentage changed"):]))
        else:
            out.append(s)
    return out


_WORD_RE = compile_pattern(r"\w+")
#: Longest quotation of the changed words in a reason (characters): long enough for a
#: phrase, short enough that a reason stays a glance in the report and the deviation list (a
#: layout choice, no source).
REASON_QUOTE_CHARS = 60


def _excerpt(s: str) -> str:
    s = " ".join(s.split())
    if len(s) > REASON_QUOTE_CHARS:
        s = s[: REASON_QUOTE_CHARS - 1].rstrip() + "\u2026"
    return f"'{s}'"


def _heading_reason(old: str, new: str) -> str:
    if not old.strip():
        return f"heading added: {_excerpt(new)}"
    if not new.strip():
        return f"heading removed: {_excerpt(old)}"
    return f"heading changed from {_excerpt(old)} to {_excerpt(new)}"


def heading_only_reason(old: str, new: str) -> str:
    """Reason of a heading that one side only adds or removes, reported as formatting
    (``headings.added_or_removed`` of the rule file)."""
    return (_heading_reason(old, new) + " (a heading only added or removed is formatting: "
            "agreements commonly provide that headings do not affect interpretation)")


def _combine(rules: SeverityRules, signals: Sequence[Signal], weight: float) -> int:
    pts = sorted((rules.signals[s.name] for s in signals), reverse=True)
    if not pts:
        return 0
    raw = pts[0] + rules.other_signals * sum(pts[1:])
    return max(0, min(100, round(weight * raw)))


def _type_reason(clause_type: str | None, kind: str, weight: float) -> str | None:
    if kind in ("title", "parties", "recital", "signature", "schedule") and clause_type is None:
        return f"{kind} provision (weight {weight:g})"
    if clause_type:
        return f"clause type: {clause_type.replace('_', ' ')} (weight {weight:g})"
    return None


_WEIGHT_REASON = compile_pattern(r" \(weight [^()]*\)$")


def is_weight_reason(reason: str) -> bool:
    """Whether *reason* states only the weight the rule file gives the clause type ("clause
    type: payment (weight 1.2)", "parties provision (weight 0.6)"): a detail of the ranking
    that a document for readers outside the firm (the issues list) leaves out."""
    return _WEIGHT_REASON.search(reason) is not None


@dataclass(frozen=True, slots=True)
class Assessment:
    """What the rules make of one change: its severity, its reasons (the signals' reasons,
    then the clause type's weight) and the signals themselves."""

    severity: int
    reasons: tuple[str, ...]
    signals: tuple[Signal, ...]


def text_change_severity(*, p_text: str, p_span: tuple[int, int], d_text: str,
                         d_span: tuple[int, int], clause_type: str | None, kind: str,
                         rules: SeverityRules | None = None, extra: Sequence[Signal] = (),
                         heading: bool = False) -> tuple[int, tuple[str, ...]]:
    """Severity and reasons of a substantive change: ``p_text[p_span]`` (precedent) became
    ``d_text[d_span]`` (draft)."""
    got = assess_text_change(p_text=p_text, p_span=p_span, d_text=d_text, d_span=d_span,
                             clause_type=clause_type, kind=kind, rules=rules, extra=extra,
                             heading=heading)
    return got.severity, got.reasons


def assess_text_change(*, p_text: str, p_span: tuple[int, int], d_text: str,
                       d_span: tuple[int, int], clause_type: str | None, kind: str,
                       rules: SeverityRules | None = None, extra: Sequence[Signal] = (),
                       heading: bool = False) -> Assessment:
    """:func:`text_change_severity` with the signals found (what the direction of a change
    is judged from, :mod:`.direction`)."""
    rules = rules or _default_rules()
    signals: list[Signal] = list(extra)
    if heading:  # a heading is a label: only its change is reported
        signals.append(Signal("heading_changed", _heading_reason(p_text, d_text)))
    else:
        signals += _interest_signals(d_text, d_span, _figure_signals(p_text, p_span, d_text, d_span))
        signals += _obligation_signals(rules, p_text, p_span, d_text, d_span)
        efforts = _efforts_signals(rules, p_text, p_span, d_text, d_span)
        signals += efforts
        signals += _negation_signals(rules, p_text, p_span, d_text, d_span)
        qualifiers = _qualifier_signals(rules, p_text, p_span, d_text, d_span)
        if efforts:  # the efforts standard says it: not again as a qualifier
            qualifiers = [q for q in qualifiers if not re.search(r"efforts|endeavou?rs", q.reason)]
        signals += qualifiers
        signals += _conjunction_signals(rules, p_text, p_span, d_text, d_span)
        pw = p_text[p_span[0]:p_span[1]]
        dw = d_text[d_span[0]:d_span[1]]
        nw_p = len(_WORD_RE.findall(pw))
        nw_d = len(_WORD_RE.findall(dw))
        if nw_d >= rules.sentence_words and nw_d >= 2 * nw_p:
            signals.append(Signal("sentence_inserted", f"{nw_d} words added: {_excerpt(dw)}"))
        elif nw_p >= rules.sentence_words and nw_p >= 2 * nw_d:
            signals.append(Signal("sentence_deleted", f"{nw_p} words removed: {_excerpt(pw)}"))
        elif not signals:
            if nw_p == 0:
                signals.append(Signal("wording_changed", f"words added: {_excerpt(dw)}"))
            elif nw_d == 0:
                signals.append(Signal("wording_changed", f"words removed: {_excerpt(pw)}"))
            else:
                signals.append(Signal("wording_changed",
                                      f"wording changed from {_excerpt(pw)} to {_excerpt(dw)}"))
        law = _law_forum_signal(p_text, p_span, d_text, d_span, clause_type, signals)
        if law is not None:  # it says what the name or wording change means
            signals = [law, *(s for s in signals if s.name not in ("name_changed", "wording_changed"))]
    return _scored(rules, signals, clause_type=clause_type, kind=kind)


def _scored(rules: SeverityRules, signals: Sequence[Signal], *, clause_type: str | None,
            kind: str) -> Assessment:
    weight = rules.weight(clause_type, kind)
    reasons = [s.reason for s in signals]
    tr = _type_reason(clause_type, kind, weight)
    if tr:
        reasons.append(tr)
    return Assessment(_combine(rules, signals, weight), tuple(reasons), tuple(signals))


def provision_change_severity(*, added: bool, label: str, text: str, clause_type: str | None,
                              kind: str, rules: SeverityRules | None = None
                              ) -> tuple[int, tuple[str, ...]]:
    """Severity and reasons of a whole provision added to (or removed from) the draft."""
    rules = rules or _default_rules()
    name = "provision_added" if added else "provision_removed"
    weight = rules.weight(clause_type, kind)
    what = ("added: the precedent has no counterpart" if added
            else "removed: the draft has no counterpart")
    reasons = [f"{label} {what}"]
    n = len(_WORD_RE.findall(text))
    if n:
        reasons[0] += f" ({n} word{'s' * (n != 1)})"
    tr = _type_reason(clause_type, kind, weight)
    if tr:
        reasons.append(tr)
    sig = [Signal(name, reasons[0])]
    return _combine(rules, sig, weight), tuple(reasons)


def clear_caches(rules: SeverityRules | None = None) -> None:
    """Forget the cached figures and phrase matches (benchmarks measure cold runs)."""
    _quantities_cached.cache_clear()
    _efforts_matches.cache_clear()
    _sentence_breaks.cache_clear()
    for r in (rules, _default_rules()):
        if r is not None:
            r._cache.texts.clear()


def figure_severity(reasons: Sequence[str], *, clause_type: str | None, kind: str,
                    rules: SeverityRules | None = None, filled_in: bool = False,
                    interest: bool = False) -> int:
    """Severity of the figure changes *reasons* name (:func:`.figures.figure_reasons`:
    "figure changed ...", "figure added ...", "figure removed ..."), scored like the same
    changes found in words: ``number_changed`` / ``number_added`` / ``number_removed``
    times the clause type's weight; figures that fill in a blank of the precedent (*filled_in*)
    score ``number_filled_in`` instead of ``number_added``; a changed figure of an interest
    rate (*interest*: the change's own signals said so) scores ``interest_rate_changed``."""
    rules = rules or _default_rules()
    names = {"changed": "interest_rate_changed" if interest else "number_changed",
             "removed": "number_removed",
             "added": "number_filled_in" if filled_in else "number_added"}
    signals = [Signal(names[r.split()[1].rstrip(":")], r) for r in reasons]
    return _combine(rules, signals, rules.weight(clause_type, kind))


def category_severity(category: str, *, rules: SeverityRules | None = None) -> int:
    rules = rules or _default_rules()
    return round(rules.categories[category])


def phrase_matches(rules: SeverityRules, name: str, text: str) -> list[tuple[int, int, str]]:
    """(start, end, phrase) of every phrase of list *name* ("obligation": the rule file's
    obligation words and every efforts form; "negation"; "qualifier") in *text*; cached."""
    return _matches(rules, name, text).items


def number_in_words(s: str) -> float | None:
    """The number *s* writes in words ("twenty-five" -> 25), or None."""
    return _words_value(s)


def default_rules() -> SeverityRules:
    """The rules of ``resources/severity.toml`` (read once)."""
    return _default_rules()


__all__ += ["CONJUNCTIONS", "EFFORTS_LEVELS", "LAW_FORUM_TYPES", "Assessment", "assess_text_change",
            "efforts_level", "number_in_words", "phrase_matches", "sentence_bounds",
            "HEADING_ADDED_OR_REMOVED_CHOICES", "category_severity", "clear_caches", "default_rules",
            "figure_severity", "heading_only_reason"]
