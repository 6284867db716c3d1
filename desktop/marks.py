"""Where to mark a provision's text: plain ranges, no Qt.

The side-by-side view paints each provision's text with *marks* (character ranges of a kind).
The ranges come from the engine: the word diff's :class:`core.model.Edit` hunks, the
deviations' spans and the term map.  This module only turns them into non-overlapping runs
that a painter can format; it decides nothing about the agreement.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from functools import lru_cache
from typing import TYPE_CHECKING

from core.model import Edit

if TYPE_CHECKING:
    from core.review.tokens import TermMatcher

__all__ = [
    "DELETED",
    "FOCUS",
    "INSERTED",
    "TERM",
    "Mark",
    "edit_marks",
    "runs",
    "term_marks",
    "without",
]

INSERTED = "inserted"  # words only the draft has
DELETED = "deleted"  # words only the precedent has
TERM = "term"  # a defined term the two documents name differently
FOCUS = "focus"  # the words of the deviation the reviewer selected


@dataclass(frozen=True, slots=True)
class Mark:
    """``text[start:end]`` is shown as *kind*."""

    start: int
    end: int
    kind: str


def edit_marks(edits: Iterable[Edit]) -> tuple[list[Mark], list[Mark]]:
    """Marks for the precedent's text and the draft's text from one pair's word diff.

    A deleted or replaced precedent range is marked DELETED on the precedent side; an inserted
    or replaced draft range is marked INSERTED on the draft side.  Cost O(number of edits).
    """
    precedent: list[Mark] = []
    draft: list[Mark] = []
    for e in edits:
        if e.tag in ("delete", "replace") and e.p2 > e.p1:
            precedent.append(Mark(e.p1, e.p2, DELETED))
        if e.tag in ("insert", "replace") and e.d2 > e.d1:
            draft.append(Mark(e.d1, e.d2, INSERTED))
    return precedent, draft


def term_marks(text: str, names: Iterable[str]) -> list[Mark]:
    """TERM marks on every use of the defined terms *names* in *text*, as the engine finds
    them (:func:`core.review.tokens.find_term_uses`: singular, plural and possessive forms,
    longest term first)."""
    from core.review.tokens import find_term_uses

    return [Mark(u.start, u.end, TERM) for u in find_term_uses(text, _matcher(tuple(names)))]


@lru_cache(maxsize=8)
def _matcher(names: tuple[str, ...]) -> TermMatcher | None:
    """The engine's matcher of *names*, built once per set of names: a review's side-by-side
    view marks every row's two texts with the same names (building the matcher for each cell
    took longer than the rest of showing a review)."""
    from core.review.tokens import term_matcher

    return term_matcher(names)


def without(marks: Iterable[Mark], hidden: Sequence[tuple[int, int]]) -> list[Mark]:
    """The marks that do not lie wholly inside one of the *hidden* ranges.

    Used by the display toggles: a diff hunk that the engine classed as a formatting,
    numbering or term change is left unmarked when that class of change is switched off.
    """
    kept = []
    for m in marks:
        if any(a <= m.start and m.end <= b for a, b in hidden):
            continue
        kept.append(m)
    return kept


def runs(length: int, marks: Iterable[Mark]) -> list[tuple[int, int, frozenset[str]]]:
    """Cut ``range(length)`` into consecutive runs, each with the set of mark kinds covering it.

    Runs are gap-free, in order, and together cover ``0..length`` exactly, so joining the run
    texts gives back the text unchanged.  Marks are clipped to the text.  Cost
    O((n + m) log m) for m marks: a sweep over the sorted boundaries.
    """
    clipped = [
        Mark(max(0, m.start), min(length, m.end), m.kind) for m in marks if m.end > m.start
    ]
    clipped = [m for m in clipped if m.end > m.start]
    cuts = sorted({0, length, *(m.start for m in clipped), *(m.end for m in clipped)})
    out: list[tuple[int, int, frozenset[str]]] = []
    if length == 0:
        return out
    # Sweep: events sorted by position, counting how many marks of each kind are open.
    opens: dict[int, list[str]] = {}
    closes: dict[int, list[str]] = {}
    for m in clipped:
        opens.setdefault(m.start, []).append(m.kind)
        closes.setdefault(m.end, []).append(m.kind)
    active: dict[str, int] = {}
    for a, b in zip(cuts, cuts[1:]):
        for k in closes.get(a, ()):
            active[k] -= 1
        for k in opens.get(a, ()):
            active[k] = active.get(k, 0) + 1
        kinds = frozenset(k for k, n in active.items() if n > 0)
        if out and out[-1][2] == kinds:
            out[-1] = (out[-1][0], b, kinds)
        else:
            out.append((a, b, kinds))
    return out
