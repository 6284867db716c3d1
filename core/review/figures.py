"""Numbers are always substance: the figures guard, the last rule of the review.

A reviewer can live with a change reported that did not matter; not with a changed figure
that went unreported.  So once every other rule has spoken (alignment, term map,
classification, severity), the review compares the figures written in the two sides of each
deviation, and of each hunk of each pair's word diff, and any difference makes a
substantive deviation whose reasons give the old and new values.  Nothing can override it:
a category, a renamed term, a filled-in blank or a rule-file setting never turns a figure
change back into noise.

A *figure* is a run of digits, with the separators figures are written with ("1,000.50",
"3.7.2", "2016/679", "10:30", "2001-2019"), anywhere: in a sentence, a title, a heading, a
table cell, a defined term's name.  Two kinds of digits are not figures, because a
renumbering changes them without changing what the agreement says:

* list labels (:func:`core.review.noise.label_spans`: "2." of "2.Scope", "(2)" opening a
  list item); the label of a provision renumbered is reported as ``numbering``;
* the numbers of cross-references to this agreement's own provisions
  (:func:`core.review.tokens.find_cross_references`): the review keys a reference by the
  provision it points at, so "Section 4" that became "Section 5" because clause 4 became
  clause 5 is a renumbering, while a reference now pointing at another provision, or a
  provision added to a list of references, is a change of words that the classifier already
  reports as substantive.

Cost: the labels and references of a text are found once (cached per text); each call then
scans its span only, O(span + log of the skipped spans); O(figures) to compare.
"""

from __future__ import annotations

import difflib
from bisect import bisect_right
from collections.abc import Sequence
from functools import lru_cache

from ..lazyre import compile_pattern
from .noise import label_spans
from .tokens import find_cross_references

__all__ = ["FIGURE_RE", "NumberSkips", "clear_skip_cache", "figure_reasons", "figures_in",
           "number_skips"]

#: A figure: digits with the separators figures are written with (thousands, decimals,
#: versions, dates, times, ranges); dashes of any style.
FIGURE_RE = compile_pattern(r"\d+(?:[.,:/\-\u2010-\u2015\u2212]\d+)*")
_DIGIT_RE = compile_pattern(r"\d")
_DASH_RE = compile_pattern(r"[\u2010-\u2015\u2212]")
#: A thousands separator: a comma followed by exactly three digits ("1,000" is 1000).
_THOUSANDS_RE = compile_pattern(r"(?<=\d),(?=\d{3}(?!\d))")


#: Characters a figure is written with (FIGURE_RE): a scan may start or stop anywhere outside
#: a run of them without cutting a figure.
_FIGURE_CHARS = frozenset("0123456789.,:/-\u2010\u2011\u2012\u2013\u2014\u2015\u2212")
#: Texts whose skipped spans are kept (a long agreement has a few thousand provision texts).
_SKIP_CACHE_SIZE = 4096


class NumberSkips:
    """The spans of a text whose digits are no figures -- list labels and the numbers of
    cross-references to the agreement's own provisions -- merged into disjoint sorted
    intervals, so that :meth:`covers` is a bisection."""

    __slots__ = ("ends", "starts")

    def __init__(self, spans: Sequence[tuple[int, int]]) -> None:
        starts: list[int] = []
        ends: list[int] = []
        for a, b in sorted(spans):
            if a >= b:
                continue
            if ends and a <= ends[-1]:
                ends[-1] = max(ends[-1], b)
            else:
                starts.append(a)
                ends.append(b)
        self.starts, self.ends = starts, ends

    def covers(self, pos: int) -> bool:
        """Whether *pos* lies in a skipped span (``start <= pos < end``)."""
        k = bisect_right(self.starts, pos) - 1
        return k >= 0 and pos < self.ends[k]


@lru_cache(maxsize=_SKIP_CACHE_SIZE)
def number_skips(text: str) -> NumberSkips:
    """The list labels (:func:`.noise.label_spans`) and cross-reference numbers
    (:func:`.tokens.find_cross_references`) of *text*, found once per text (cached): each
    change of a long provision asks about its own few characters."""
    return NumberSkips([*label_spans(text), *((s, e) for s, e, *_ in find_cross_references(text))])


def clear_skip_cache() -> None:
    """Forget the skipped spans found (benchmarks measure cold runs)."""
    number_skips.cache_clear()


def _normal(figure: str) -> str:
    return _THOUSANDS_RE.sub("", _DASH_RE.sub("-", figure))


def figures_in(text: str, span: tuple[int, int] | None = None, *,
               references: bool = False) -> tuple[str, ...]:
    """The figures of ``text[span]`` (the whole text by default) in order, written without
    thousands separators and with dashes unified; a figure that overlaps the span counts
    whole.  List labels and the numbers of cross-references within the agreement are left
    out (see the module's docstring), unless *references* is true: for a defined term's
    name, whose words are never read as a reference ("Schedule 1 Services").

    >>> figures_in("within 1,000 days of Section 4.2 under (b) of Regulation 2016/679")
    ('1000', '2016/679')
    >>> figures_in("2.Scope of version 3.7.2")
    ('3.7.2',)
    """
    a, b = span if span is not None else (0, len(text))
    if not _DIGIT_RE.search(text, max(0, a - 40), b + 40):
        return ()
    skip = None if references else number_skips(text)
    # scan from outside the run of figure characters around each end of the span: the
    # figures found are those a scan of the whole text finds there
    lo, hi = a, b
    while lo > 0 and text[lo - 1] in _FIGURE_CHARS:
        lo -= 1
    while hi < len(text) and text[hi] in _FIGURE_CHARS:
        hi += 1
    out: list[str] = []
    for m in FIGURE_RE.finditer(text, lo, hi):
        if m.end() <= a or m.start() >= b or (a == b and not m.start() < a < m.end()):
            continue
        if skip is not None and skip.covers(m.start()):
            continue
        out.append(_normal(m.group()))
    return tuple(out)


def figure_reasons(old: Sequence[str], new: Sequence[str]) -> tuple[str, ...]:
    """Reasons naming each figure changed, added or removed between *old* and *new*
    (aligned with the standard library's difflib); () when they are the same.

    >>> figure_reasons(("1.1", "2006"), ("1.2", "2006", "2019"))
    ('figure changed from 1.1 to 1.2', 'figure added: 2019')
    """
    out: list[str] = []
    sm = difflib.SequenceMatcher(None, list(old), list(new), autojunk=False)
    for tag, i1, i2, j1, j2 in sm.get_opcodes():
        if tag == "equal":
            continue
        pairs = list(zip(old[i1:i2], new[j1:j2]))
        out += [f"figure changed from {x} to {y}" for x, y in pairs]
        out += [f"figure removed: {x}" for x in old[i1 + len(pairs):i2]]
        out += [f"figure added: {y}" for y in new[j1 + len(pairs):j2]]
    return tuple(out)
