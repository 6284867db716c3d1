"""The tally strip: how many past agreements carry a wording, as a row of small squares.

Our own way of showing a count out of the precedent set, in the deviation list, the detail
panel, the wording chart and the usual-changes tree.  Read it like tally marks:

* one square per agreement of the precedent set, **filled** for each agreement that carries
  the wording, **empty** (outlined) for the rest, so the strip's length is the set's size and
  its filled part the count;
* squares come in **groups of five** with a gap between groups, so "two", "seven" or "all
  twelve" are read at a glance without counting square by square;
* a set larger than :data:`UNIT_MAX` agreements is drawn as ten squares, one per tenth of the
  set (the figure beside the strip stays exact).  A tenth-square is filled when its share is
  reached, rounded, but a wording that some agreements carry never shows as none and a
  wording that not every agreement carries never shows as all.

This module only turns the engine's two figures (``Frequency.matching`` and
``Frequency.total``, or a variant's count and the set's size) into squares and words: it
decides nothing.  Painting is :func:`desktop.widgets.paint_tally`.  No Qt here.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["GROUP", "TENTHS", "UNIT_MAX", "Tally", "tally", "tally_glyphs", "tally_words"]

#: Squares per group: tally marks are grouped by five (common practice, no source).
GROUP = 5
#: Largest set drawn with one square per agreement.  Twenty squares in four groups still
#: read at a glance and fit a table cell at four pixels a square; larger sets are drawn in
#: tenths (our own choice).
UNIT_MAX = 20
#: Squares of a strip drawn in tenths.
TENTHS = 10
#: The glyphs of the text form (U+25A0 BLACK SQUARE, U+25A1 WHITE SQUARE; both in DejaVu Sans).
FILLED_GLYPH, EMPTY_GLYPH = "\u25a0", "\u25a1"


@dataclass(frozen=True, slots=True)
class Tally:
    """A strip of ``cells`` squares of which the first ``filled`` are filled; each square
    stands for ``per_cell`` agreements (1.0 when there is one square per agreement)."""

    matching: int
    total: int
    cells: int
    filled: int

    @property
    def per_cell(self) -> float:
        return self.total / self.cells

    @property
    def exact(self) -> bool:
        """True when every square is one agreement."""
        return self.cells == self.total

    def groups(self) -> list[int]:
        """Sizes of the groups of squares, left to right (each :data:`GROUP` but the last)."""
        full, rest = divmod(self.cells, GROUP)
        return [GROUP] * full + ([rest] if rest else [])


def tally(matching: int, total: int) -> Tally | None:
    """The strip for *matching* agreements of *total* (None for an empty set).  *matching*
    is clipped to ``0..total``."""
    if total <= 0:
        return None
    m = min(max(matching, 0), total)
    if total <= UNIT_MAX:
        return Tally(m, total, total, m)
    filled = round(TENTHS * m / total)
    if m > 0:
        filled = max(filled, 1)
    if m < total:
        filled = min(filled, TENTHS - 1)
    return Tally(m, total, TENTHS, filled)


def tally_glyphs(t: Tally) -> str:
    """The strip as text: ``"■■□□□ □□□□□ □□"`` (groups separated by a space)."""
    out, done = [], 0
    for size in t.groups():
        out.append("".join(FILLED_GLYPH if done + i < t.filled else EMPTY_GLYPH for i in range(size)))
        done += size
    return " ".join(out)


def _agreements(n: int) -> str:
    return f"{n} past agreement{'s' * (n != 1)}"


def tally_words(t: Tally, *, verb: tuple[str, str] = ("has", "have"), rest: str = "this wording") -> str:
    """The strip in words: ``"2 past agreements out of 12 have this wording"``, ``"none of
    the 12 past agreements has this wording"``, ``"all 12 past agreements have ..."``; a strip
    in tenths says its scale ("each square about 20 agreements").  *verb* is the verb's
    (singular, plural) form, *rest* what follows it."""
    one, many = verb
    if t.matching == 0:
        text = (f"none of the {_agreements(t.total)} {one} {rest}" if t.total > 1
                else f"the one past agreement does not {_base(one)} {rest}")
    elif t.matching == t.total:
        text = f"all {_agreements(t.total)} {many} {rest}" if t.total > 1 else f"the one past agreement {one} {rest}"
    else:
        text = f"{_agreements(t.matching)} out of {t.total} {one if t.matching == 1 else many} {rest}"
    if not t.exact:
        text += f" (each square about {round(t.per_cell)} agreements)"
    return text


def _base(singular: str) -> str:
    """"have" for "has", "carry" for "carries", "contain" for "contains" (the verbs used)."""
    if singular == "has":
        return "have"
    if singular.endswith("ies"):
        return singular[:-3] + "y"
    return singular[:-1] if singular.endswith("s") else singular
