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

Cost: one pass of two regular expressions over the text per call; O(figures) to compare.
"""

from __future__ import annotations

import difflib
import re
from collections.abc import Sequence

from .noise import label_spans
from .tokens import find_cross_references

__all__ = ["FIGURE_RE", "figure_reasons", "figures_in"]

#: A figure: digits with the separators figures are written with (thousands, decimals,
#: versions, dates, times, ranges); dashes of any style.
FIGURE_RE = re.compile(r"\d+(?:[.,:/\-\u2010-\u2015\u2212]\d+)*")
_DASH_RE = re.compile(r"[\u2010-\u2015\u2212]")
#: A thousands separator: a comma followed by exactly three digits ("1,000" is 1000).
_THOUSANDS_RE = re.compile(r"(?<=\d),(?=\d{3}(?!\d))")


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
    if not any(c.isdigit() for c in text[max(0, a - 40):b + 40]):
        return ()
    skip = [] if references else (label_spans(text)
                                  + [(s, e) for s, e, *_ in find_cross_references(text)])
    out: list[str] = []
    for m in FIGURE_RE.finditer(text):
        if m.end() <= a or m.start() >= b or (a == b and not m.start() < a < m.end()):
            continue
        if any(s <= m.start() < e for s, e in skip):
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
