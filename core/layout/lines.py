"""Lines of a page: the unit the page clean-up and the line labeller work on.

A :class:`Line` is one printed line as a reader sees it on the page -- its words, where it
sits (points from the page's top-left corner) and the fonts it uses -- and nothing else: no
paragraph, no numbering, no style.  The PDF reader (:mod:`core.readers.pdf`) makes them from
the characters of the text layer; :func:`lines_from_text` makes them from plain text (one
line per text line, columns as positions, no fonts); :mod:`core.layout.simulate` lays out a
formatted document's paragraphs as lines for training.

:func:`geometry` measures what the features are relative to: the body font size, the left
and right edges of the text column and the usual distance between the lines of a paragraph.
Relative measures make a model learnt on one layout carry over to another.
"""

from __future__ import annotations

import statistics
from collections.abc import Sequence
from dataclasses import dataclass

__all__ = [
    "Geometry",
    "Line",
    "TEXT_CHAR_WIDTH",
    "TEXT_LINE_PITCH",
    "geometry",
    "lines_from_text",
]

#: Plain text has no fonts: one column is one unit of width and one text line one unit of
#: height below the previous; a blank line adds a unit.  Font size is reported as 0.
TEXT_CHAR_WIDTH = 1.0
TEXT_LINE_PITCH = 1.0
#: Lines of one paragraph are at most this many font sizes apart (single to one-and-a-half
#: line spacing is 1.15-1.75 em in common text faces; double spacing is 2.3 em and over);
#: a few such tight steps show that the document has paragraphs of several lines, even
#: when nearly all its paragraphs are one line (common practice of typesetting, no source).
TIGHT_PITCH_EM = 1.9
MIN_TIGHT_STEPS = 3
#: The right edge of the text column is the width reached by this share of the lines: the
#: longest lines of a justified or ragged column end near it, a few longer ones are
#: overhanging words.  Not lower: in a document of short hard-wrapped lines (a disclaimer
#: typed line by line) most lines end well before the edge, which is what shows that they
#: are paragraphs of their own.
RIGHT_EDGE_QUANTILE = 0.98


@dataclass(frozen=True, slots=True)
class Line:
    """One printed line.  Positions are in points (PDF) or columns and lines (plain text)."""

    text: str
    page: int  # 0-based
    x0: float
    x1: float
    top: float
    bottom: float
    #: Median font size of its letters (0 when unknown: plain text).
    size: float = 0.0
    #: Share of its letters set in a bold font (None when unknown: plain text).
    bold: float | None = None
    #: Share of its letters set in an italic font (None when unknown).
    italic: float | None = None
    #: How many characters at its start are bold, for a run-in heading (0 when unknown).
    bold_prefix: int = 0
    #: Width of one space in its font (points; 1 column for plain text).
    space: float = TEXT_CHAR_WIDTH
    #: Average width of a character of its words (points; 1 column for plain text).
    char_width: float = TEXT_CHAR_WIDTH
    #: Width of its first word (to tell whether it would have fitted on the line above).
    first_word: float = 0.0
    #: A table row: the text of each cell (None for a line of running text).
    cells: tuple[str, ...] | None = None

    @property
    def has_fonts(self) -> bool:
        return self.bold is not None


@dataclass(frozen=True, slots=True)
class Geometry:
    """The measures a document's lines are compared with (see the module docstring)."""

    #: Body font size (points; 1 for plain text): the unit of indents and gaps.
    em: float
    #: Left and right edge of the text column.
    left: float
    right: float
    #: The usual distance from one line's top to the next line's top inside a paragraph.
    pitch: float
    #: Whether the lines carry fonts (PDF) or not (plain text).
    fonts: bool


def _mode(values: Sequence[float], *, step: float) -> float:
    counts: dict[float, int] = {}
    for v in values:
        key = round(v / step) * step
        counts[key] = counts.get(key, 0) + 1
    best = max(counts.items(), key=lambda kv: (kv[1], -kv[0]))
    return best[0]


def geometry(lines: Sequence[Line]) -> Geometry:
    """The body measures of *lines* (at least one line of running text)."""
    body = [ln for ln in lines if ln.cells is None and ln.text.strip()] or list(lines)
    fonts = any(ln.has_fonts for ln in body)
    sizes = [ln.size for ln in body if ln.size > 0]
    em = statistics.median(sizes) if sizes else TEXT_CHAR_WIDTH
    left = min((ln.x0 for ln in body), default=0.0)
    ends = sorted(ln.x1 for ln in body)
    right = ends[int(RIGHT_EDGE_QUANTILE * (len(ends) - 1))] if ends else left + 1.0
    steps = [b.top - a.top for a, b in zip(body, body[1:])
             if a.page == b.page and b.top - a.top > 0]
    # The line distance inside a paragraph: the commonest step among the tight ones (in a
    # document of one-line paragraphs the commonest step of all is the paragraph distance).
    tight = [s for s in steps if s <= TIGHT_PITCH_EM * em] if fonts else []
    if len(tight) >= MIN_TIGHT_STEPS:
        pitch = _mode(tight, step=0.1 * em)
    else:
        pitch = _mode(steps, step=0.1 * em) if steps else (em * 1.2 if fonts else TEXT_LINE_PITCH)
    return Geometry(em=em, left=left, right=max(right, left + em), pitch=max(pitch, 1e-6), fonts=fonts)


def lines_from_text(text: str) -> tuple[Line, ...]:
    """The lines of a plain text: columns as x, line numbers as y, blank lines kept as gaps
    (a blank line moves the next line one pitch further down).  Tabs count 8 columns."""
    out: list[Line] = []
    y = 0.0
    for raw in text.replace("\r\n", "\n").replace("\r", "\n").split("\n"):
        expanded = raw.expandtabs(8).rstrip()
        if not expanded.strip():
            y += TEXT_LINE_PITCH
            continue
        indent = len(expanded) - len(expanded.lstrip())
        words = expanded.split()
        out.append(Line(text=" ".join(words), page=0, x0=float(indent), x1=float(len(expanded)),
                        top=y, bottom=y + TEXT_LINE_PITCH, first_word=float(len(words[0]))))
        y += TEXT_LINE_PITCH
    return tuple(out)
