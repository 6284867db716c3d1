"""Marks in a provision's text that the review reads as layout, not as words: list labels
written into a sentence ("... utilizing: (i) the name ...") and the blanks of a form that a
draft fills in ("[●]", "[insert date]", "____", an empty "Name:" line).

Both are common practice in English-language agreements and templates (no source).  A
change that only touches list labels is ``numbering``; a change that only fills in blanks of
the precedent is ``completion`` (see :mod:`.classify`).  Cost: one regular-expression pass
over the text per call.
"""

from __future__ import annotations

import re
from functools import lru_cache

from ..lazyre import compile_pattern

__all__ = [
    "BLANK_RE",
    "blank_at",
    "clear_label_cache",
    "empty_field_at",
    "is_blank_fill",
    "label_spans",
]

# A list item's own token: one or two letters ("a", "aa"), a roman numeral ("iv"), or a
# number of at most three digits.  Longer numbers are figures, never labels.
_LETTER_ITEM = r"(?:[a-z]{1,2}|[ivxlc]{1,6})"
_ITEM = rf"(?:{_LETTER_ITEM}|\d{{1,3}})"
#: Words after which an item in brackets is referred to, not labelled ("clause (b) above").
_REFERRING = ("clause", "clauses", "section", "sections", "paragraph", "paragraphs",
              "sub-clause", "subclause", "sub-paragraph", "subparagraph", "item", "items",
              "limb", "point", "points", "article", "schedule", "part", "annex", "exhibit")
#: A lettered or roman label in brackets, "(ii)", standing alone (not "4(b)"), except where
#: a reference keyword names the item ("clause (b) above").  Every pattern here starts with
#: the label itself, so that the regular-expression engine skips to the candidates (a
#: pattern that starts with a look-behind is tried at every position: ten times slower);
#: the context before it is checked apart.
_LETTER_LABEL_RE = compile_pattern(rf"\(\s?{_LETTER_ITEM}\s?\)(?=[\s,;:.]|$)", re.IGNORECASE)
_REFERRING_BEFORE_RE = compile_pattern(r"\b(?:" + "|".join(map(re.escape, _REFERRING)) + r")\s*$",
                                       re.IGNORECASE)
#: A numbered label in brackets, "(2)", only where a list item starts: at the start of the
#: text or a line, or after ":", ";", "," or "and" / "or" ("thirty (30) days" repeats a
#: figure; "Section 4(2)" refers to an item).
_NUMBER_LABEL_RE = compile_pattern(r"\(\s?\d{1,3}\s?\)(?=[\s,;:]|$)")
_LIST_START_BEFORE_RE = compile_pattern(r"(?:^|[\n:;,]|\band|\bor|\bnor)[ \t\u00a0]*$")
#: A label ending in "." or ")" ("b.", "iv)", "2.", "2.1", "2.1.3"), at the start of the
#: text or a line, or after the end of a sentence (:data:`_SENTENCE_START_RE`); also when
#: glued to the next word ("2.Scope").  A bare letter needs the full stop or bracket ("a"
#: alone is a word).
_DOTTED_LABEL_RE = compile_pattern(
    rf"[ \t\u00a0]*(?P<label>{_ITEM}[.)](?:\d{{1,3}}[.)]?)*|\d{{1,3}}(?:\.\d{{1,3}})+)"
    r"(?=\s|[A-Z]|$)", re.IGNORECASE)
_SENTENCE_START_RE = compile_pattern(r"\n|[.:;]\s")
#: Characters looked at before a label in brackets for its context.
_CONTEXT_CHARS = 20


def label_spans(text: str) -> list[tuple[int, int]]:
    """Character spans of the list labels written into *text*, sorted (cached per text).

    >>> t = "utilizing: (i) the name, and (ii) the title. b. Each time"
    >>> [t[a:b] for a, b in label_spans(t)]
    ['(i)', '(ii)', 'b.']
    """
    return list(_label_spans(text))


def clear_label_cache() -> None:
    """Forget the labels found (benchmarks measure cold runs)."""
    _label_spans.cache_clear()


#: Texts whose labels are kept (a long agreement has a few thousand provision texts).
_LABEL_CACHE_SIZE = 4096


@lru_cache(maxsize=_LABEL_CACHE_SIZE)
def _label_spans(text: str) -> tuple[tuple[int, int], ...]:
    spans: set[tuple[int, int]] = set()
    for m in _LETTER_LABEL_RE.finditer(text):
        before = text[max(0, m.start() - _CONTEXT_CHARS):m.start()]
        if not (before[-1:].isalnum() or before[-1:] in (")", "]", "_")
                or _REFERRING_BEFORE_RE.search(before)):
            spans.add(m.span())
    for m in _NUMBER_LABEL_RE.finditer(text):
        if _LIST_START_BEFORE_RE.search(text, max(0, m.start() - _CONTEXT_CHARS), m.start()):
            spans.add(m.span())
    for k in (0, *(m.end() for m in _SENTENCE_START_RE.finditer(text))):
        label = _DOTTED_LABEL_RE.match(text, k)
        if label:
            spans.add(label.span("label"))
    return tuple(sorted(spans))


#: A blank of a form: a placeholder in square brackets ("[●]", "[•]", "[ ]", "[insert date]",
#: "[CUSTOMER NAME]") or in angle brackets as licence templates write them ("<year>",
#: "<name of author>"), a line of at least three underscores or of at least four dots (or
#: two ellipsis characters), as templates leave them to be filled in.
_BLANK = r"\[[^\[\]\n]{0,80}\]|<[^<>\n]{1,80}>|_{3,}|\.{4,}|\u2026{2,}"
BLANK_RE = compile_pattern(_BLANK)
#: The changed words are blanks only (several blanks with separators between them count).
_BLANKS_ONLY_RE = compile_pattern(rf"(?:(?:{_BLANK})[\s,;:.]*(?:(?:and|or)\s+)?)+")
#: An empty field of a form: "Name:" (a label of at most four words and a colon) with
#: nothing after it on its line.
_FIELD_RE = compile_pattern(r"[ \t]*[A-Za-z][\w.'\u2019 ]{0,40}:")
_FIELD_AFTER_RE = compile_pattern(r"[ \t]*(?:\n|$)")


def blank_at(text: str, span: tuple[int, int]) -> tuple[int, int] | None:
    """The span of the blank(s) that ``text[span]`` is, or lies inside; None otherwise.

    >>> t = "within [\u25cf] days"
    >>> blank_at(t, (8, 9)), blank_at(t, (7, 10)), blank_at(t, (0, 6))
    ((7, 10), (7, 10), None)
    """
    a, b = span
    words = text[a:b].strip()
    if words and _BLANKS_ONLY_RE.fullmatch(words):
        return a, b
    if a == b:
        return None
    for m in BLANK_RE.finditer(text, max(0, a - 82), min(len(text), b + 82)):
        if m.start() <= a and b <= m.end():
            return m.start(), m.end()
    return None


def empty_field_at(text: str, point: int) -> bool:
    """Whether *point* of *text* is the empty value of a form field: "Name:" and nothing
    else on its line (the point may sit before or after the line break).

    >>> empty_field_at("Signed by:\\nName:\\nTitle:", 16), empty_field_at("Name: A\\nB", 7)
    (True, False)
    """
    q = point
    while q > 0 and text[q - 1] in " \t":
        q -= 1
    if q > 0 and text[q - 1] == "\n":
        q -= 1  # the point is just after the line break that ends the field
        while q > 0 and text[q - 1] in " \t":
            q -= 1
    line = text[text.rfind("\n", 0, q) + 1:q]
    return (_FIELD_RE.fullmatch(line) is not None
            and _FIELD_AFTER_RE.match(text, q) is not None)


def is_blank_fill(p_text: str, p_span: tuple[int, int]) -> tuple[int, int] | None:
    """The blank of the precedent that a change of ``p_text[p_span]`` fills in: the blank
    itself, or the empty field at an insertion point; None when the change fills none."""
    if p_span[0] == p_span[1]:
        return p_span if empty_field_at(p_text, p_span[0]) else None
    return blank_at(p_text, p_span)
