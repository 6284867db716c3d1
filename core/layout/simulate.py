"""Lay out a formatted document's paragraphs as printed lines, with the answers for each line:
the training examples of the line labeller.

A .docx (or .odt) agreement of the firm says where every paragraph, number label and heading
is, but not where its lines break: that depends on the page.  So each paragraph is set the
way a word processor sets it -- the number label at its list indent, a tab to the text, words
filled greedily into the column, bold and larger sizes from the paragraph's formatting, a
page every few dozen lines -- and the lines get the paragraph's answers
(:mod:`core.layout.answers`): the first line starts the paragraph (and perhaps a provision
with a label, a heading and a level), the others continue it.

One document is laid out in several **house styles** (:class:`Style`, drawn from a seeded
generator): body size, column width, hanging or flush or first-line indents, indent step,
space between paragraphs, justified or ragged lines, and plain text without fonts (columns
instead of points, blank lines for the space between paragraphs).  The model learns what
marks a paragraph's start in all of them rather than one house's habits.

Character widths come from a small table of typical proportions of a text face (narrow
"i l . ,", wide "m w", capitals and digits in between; from memory of common serif faces,
not measured): close enough for "would this word have fitted on the line above", which is
what the features ask.
"""

from __future__ import annotations

import random
from collections.abc import Iterator, Sequence
from dataclasses import dataclass

from ..model import Block, Document
from .answers import CONTINUES, block_answers
from .lines import TEXT_CHAR_WIDTH, TEXT_LINE_PITCH, Line

__all__ = ["LineAnswers", "Style", "STYLES_PER_DOCUMENT", "draw_styles", "lay_out", "training_examples"]

#: House styles each training document is laid out in (more gives more variety, linearly
#: more training lines).
STYLES_PER_DOCUMENT = 3
#: Share of the styles that are plain text (no fonts): the model reads plain text too.
PLAIN_TEXT_SHARE = 0.3

_NARROW = set("il.,;:'!|`\u2019\u2018")
_SEMI = set("fjtrI()[]{}\"\u201c\u201d-/")
_WIDE = set("mwMW@%")


def _char_em(c: str) -> float:
    if c == " ":
        return 0.28
    if c in _NARROW:
        return 0.28
    if c in _SEMI:
        return 0.36
    if c in _WIDE:
        return 0.85
    if c.isupper():
        return 0.68
    if c.isdigit():
        return 0.55
    return 0.5


@dataclass(frozen=True, slots=True)
class Style:
    """How one house sets its agreements (see the module docstring)."""

    em: float  # body font size, points
    left: float  # left margin, points
    width: float  # column width, points
    indents: str  # "hanging" | "flush" | "firstline"
    step: float  # list indent per level, in ems
    para_gap: float  # space between paragraphs, in line pitches
    justified: bool
    lines_per_page: int
    plain: bool  # plain text: no fonts, columns for x, blank lines for gaps
    bold_headings: bool  # headings in heading styles printed bold (else only larger)
    #: Number labels followed by a tab to the text (a list), or typed with one space.
    label_tab: bool = True


def draw_styles(rng: random.Random, count: int) -> list[Style]:
    """*count* house styles drawn from *rng*."""
    out = []
    for _ in range(count):
        plain = rng.random() < PLAIN_TEXT_SHARE
        out.append(Style(
            em=rng.choice((10.0, 11.0, 12.0)), left=rng.choice((54.0, 72.0, 90.0)),
            width=rng.choice((380.0, 432.0, 468.0, 504.0)),
            indents=rng.choice(("hanging", "hanging", "flush", "firstline")),
            step=rng.choice((1.5, 2.5, 3.3)),
            para_gap=rng.choice((0.0, 0.0, 0.5, 1.0)) if not plain else rng.choice((0.0, 1.0, 1.0)),
            justified=rng.random() < 0.5, lines_per_page=rng.randint(38, 56), plain=plain,
            bold_headings=rng.random() < 0.8, label_tab=rng.random() < 0.6,
        ))
    return out


@dataclass(frozen=True, slots=True)
class LineAnswers:
    """The answers of each line (parallel tuples; see :mod:`core.layout.answers`)."""

    start: tuple[int, ...]
    label: tuple[bool, ...]
    heading: tuple[bool, ...]
    level: tuple[int, ...]


def _width(text: str, em: float, *, bold: bool = False) -> float:
    w = sum(_char_em(c) for c in text) * em
    return w * 1.05 if bold else w


def _wrap(words: Sequence[str], first_room: float, room: float, em: float, bold: bool) -> list[list[str]]:
    lines: list[list[str]] = [[]]
    used = 0.0
    limit = first_room
    space = _width(" ", em)
    for w in words:
        ww = _width(w, em, bold=bold)
        if lines[-1] and used + space + ww > limit:
            lines.append([])
            used = 0.0
            limit = room
        used += (space if lines[-1] else 0.0) + ww
        lines[-1].append(w)
    return [ln for ln in lines if ln]


def _rendered(block: Block) -> tuple[str | None, str]:
    """(label as printed, text as printed) of a paragraph."""
    text = block.text.upper() if block.all_caps else block.text
    if block.bullet:
        return "\u2022", text
    return (block.label.strip() if block.label else None), text


def _block_lines(block: Block, level: int, style: Style) -> Iterator[tuple[float, str, int, float]]:
    """(x0, text, bold characters at the start, font size) of each printed line."""
    em = style.em * (1.15 if block.outline_level is not None and block.outline_level <= 2 else 1.0)
    bold_all = block.emphasised and (style.bold_headings or block.outline_level is None)
    label, text = _rendered(block)
    base = style.left + max(level - 1, 0) * style.step * style.em if label else style.left
    if style.label_tab:
        tab = max(style.step * style.em, (_width(label, em) + _width(" ", em) * 2) if label else 0.0)
    else:
        tab = (_width(label, em) + _width(" ", em)) if label else 0.0
    text_x = base + tab if label else base
    if style.indents == "firstline" and not label:
        first_x, rest_x = base + 1.5 * style.em, base
    elif style.indents == "flush":
        first_x, rest_x = base, base
    else:
        first_x, rest_x = base, text_x if label else base
    right = style.left + style.width
    lead = len(block.lead) if block.lead else 0
    parts = text.split("\n")
    for k, part in enumerate(parts):
        words = part.split()
        if not words:
            continue
        if k == 0 and label:
            first_room = right - text_x
            wrapped = _wrap(words, first_room, right - rest_x, em, bold_all)
            for j, ws in enumerate(wrapped):
                if j == 0:
                    line = f"{label}{chr(9) if style.label_tab else ' '}{' '.join(ws)}"
                    bold = len(line) if bold_all else 0
                    yield first_x, line, bold, em
                else:
                    yield rest_x, " ".join(ws), len(" ".join(ws)) if bold_all else 0, em
            continue
        start_x = first_x if k == 0 else rest_x
        wrapped = _wrap(words, right - start_x, right - rest_x, em, bold_all)
        for j, ws in enumerate(wrapped):
            line = " ".join(ws)
            if bold_all:
                bold = len(line)
            elif k == 0 and j == 0 and lead:
                bold = min(lead, len(line))
            else:
                bold = 0
            yield (start_x if j == 0 else rest_x), line, bold, em


def lay_out(doc: Document, style: Style) -> tuple[tuple[Line, ...], LineAnswers]:
    """The printed lines of *doc* in *style*, and their answers."""
    answers = block_answers(doc)
    lines: list[Line] = []
    start: list[int] = []
    label: list[bool] = []
    heading: list[bool] = []
    level: list[int] = []
    y = 0.0
    page = 0
    on_page = 0
    open_level = 0
    pitch = style.em * 1.2
    for block, ans in zip(doc.blocks, answers):
        if not block.text.strip() and block.label is None:
            continue
        if ans.label:
            open_level = max(ans.level, 1)
        printed = list(_block_lines(block, open_level if block.label else 0, style))
        for k, (x0, text, bold_chars, size) in enumerate(printed):
            gap = style.para_gap if k == 0 and lines else 0.0
            y += pitch * (1.0 + gap)
            if not style.plain and on_page >= style.lines_per_page:
                page += 1
                on_page = 0
                y = pitch
            on_page += 1
            lines.append(_line(text, x0, y, size, bold_chars, page, style, in_table=block.in_table,
                               last=k == len(printed) - 1))
            start.append(ans.start if k == 0 else CONTINUES)
            label.append(ans.label and k == 0)
            heading.append(ans.heading and k == 0)
            level.append(ans.level if k == 0 else 0)
    return tuple(lines), LineAnswers(tuple(start), tuple(label), tuple(heading), tuple(level))


def _line(text: str, x0: float, y: float, size: float, bold_chars: int, page: int, style: Style,
          *, in_table: bool, last: bool) -> Line:
    cells = (text,) if in_table else None
    if style.plain:
        col = max(style.em * 0.5, 1e-6)  # one column is an average character
        x = round((x0 - style.left) / col)
        flat = text.replace("\t", " ")
        row = round(y / (style.em * 1.2))
        return Line(text=flat, page=0, x0=float(x), x1=float(x + len(flat)), top=row * TEXT_LINE_PITCH,
                    bottom=row * TEXT_LINE_PITCH + TEXT_LINE_PITCH,
                    first_word=float(len(flat.split()[0])) if flat.split() else 0.0,
                    space=TEXT_CHAR_WIDTH, char_width=TEXT_CHAR_WIDTH, cells=cells)
    letters = [c for c in text if c.isalpha()]
    bold_letters = [c for c in text[:bold_chars] if c.isalpha()]
    words = text.replace("\t", " ").split()
    right = style.left + style.width
    bold = bold_chars >= len(text)
    if "\t" in text:  # a label, then a tab stop one list indent on
        lab, rest = text.split("\t", 1)
        tab = max(style.step * style.em, _width(lab, size) + 2 * _width(" ", size))
        x1 = x0 + tab + _width(rest, size, bold=bold)
    else:
        x1 = x0 + _width(text, size, bold=bold)
    if style.justified and not last:
        x1 = right  # a justified line fills the column, except a paragraph's last
    return Line(text=text, page=page, x0=x0, x1=min(x1, right + size), top=y - size, bottom=y,
                size=size, bold=len(bold_letters) / len(letters) if letters else 0.0, italic=0.0,
                bold_prefix=bold_chars, space=_width(" ", size), char_width=size * 0.5,
                first_word=_width(words[0], size) if words else 0.0, cells=cells)


def training_examples(doc: Document, *, seed: int, styles: int = STYLES_PER_DOCUMENT
                      ) -> list[tuple[tuple[Line, ...], LineAnswers]]:
    """*doc* laid out in *styles* house styles drawn with *seed*: the training examples of
    one formatted document."""
    rng = random.Random(seed)
    return [lay_out(doc, style) for style in draw_styles(rng, styles)]
