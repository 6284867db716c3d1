"""From printed lines to the reader's paragraphs (:class:`core.model.Block`).

:func:`blocks_from_lines` runs the page clean-up (:mod:`core.layout.cleanup`), asks the line
labeller where paragraphs start (:mod:`core.layout.labeller`; the model of the precedent set
when the caller has one, else the shipped default, :mod:`core.layout.store`) and joins the
lines of each paragraph, undoing end-of-line hyphenation.  Each paragraph keeps what the page
shows of its formatting, in the fields the provision splitter (:mod:`core.structure`) reads:

* ``emphasised`` when (nearly) all its letters are bold; without fonts (plain text), when it
  is one short line the labeller reads as a heading with confidence
  :data:`HEADING_CONFIDENCE` (with fonts, the page shows what is a heading);
* ``lead``: the bold words its first line starts with (a run-in heading: "**Term.** This
  Agreement ...");
* ``outline_level`` for a heading set larger than the body text: 1 for the largest size, 2
  for the next (a heading style);
* ``all_caps`` when all its letters are capitals; ``in_table`` for a table row (its cells
  separated by tabs).

Number labels stay in the text, as typed labels do in a plain-text file: the splitter reads
them there.  Without a usable model the fixed rules of :mod:`core.text_reader` join the lines
(the lines written out as plain text, a blank line where the page leaves a gap), with a note.

Cost: O(lines).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from ..model import Block
from .answers import CONTINUES
from .cleanup import drop_running, join_lines, vocabulary
from .lines import Geometry, Line, geometry

__all__ = ["BOLD_SHARE", "HEADING_CONFIDENCE", "blocks_from_lines", "lines_as_text"]

#: A paragraph is emphasised when at least this share of its letters is bold (a bold label
#: or a word in italics inside a bold heading still counts).
BOLD_SHARE = 0.85
#: A one-line paragraph without bold is taken for a heading when the labeller gives a heading
#: at least this probability (it is then marked ``emphasised`` for the splitter).  High: a
#: wrong heading splits a provision in two.
HEADING_CONFIDENCE = 0.8
#: Longest paragraph (words) the labeller alone can make a heading.
MAX_LABELLED_HEADING_WORDS = 12
#: A heading this much larger than the body (ratio of font sizes) gets an outline level.
HEADING_SIZE_RATIO = 1.1
#: A gap between lines larger than this many line pitches is written as a blank line when
#: lines are handed to the fixed rules.
BLANK_LINE_GAP = 0.4


def _is_caps(text: str) -> bool:
    letters = [c for c in text if c.isalpha()]
    return len(letters) >= 2 and all(c.isupper() for c in letters)


def _size_levels(lines: Sequence[Line], g: Geometry) -> dict[float, int]:
    """Outline level of each font size larger than the body's (largest first)."""
    sizes = sorted({round(ln.size, 1) for ln in lines
                    if ln.size > g.em * HEADING_SIZE_RATIO}, reverse=True)
    return {s: k + 1 for k, s in enumerate(sizes[:6])}


def lines_as_text(lines: Sequence[Line], g: Geometry | None = None) -> str:
    """*lines* as plain text: indents as spaces, a blank line where the page leaves a gap
    (the input of the fixed rules)."""
    g = g if g is not None else geometry(lines)
    out: list[str] = []
    for i, ln in enumerate(lines):
        if i and (ln.page != lines[i - 1].page
                  or (ln.top - lines[i - 1].top) / g.pitch - 1.0 > BLANK_LINE_GAP):
            out.append("")
        indent = int(round(max(ln.x0 - g.left, 0.0) / max(ln.char_width, 1e-6))) if g.fonts else int(ln.x0)
        out.append(" " * indent + ln.text)
    return "\n".join(out) + "\n"


def _rule_blocks(lines: Sequence[Line], g: Geometry) -> tuple[Block, ...]:
    from ..text_reader import read_text_blocks

    return read_text_blocks(lines_as_text(lines, g))


def _make_block(index: int, group: Sequence[Line], text: str, *, heading_p: float,
                sizes: dict[float, int]) -> Block:
    first = group[0]
    if first.cells is not None:
        return Block(index=index, text=text, in_table=True, all_caps=_is_caps(text))
    fonts = first.has_fonts
    letters = sum(sum(c.isalpha() for c in ln.text) for ln in group)
    bold_letters = sum((ln.bold or 0.0) * sum(c.isalpha() for c in ln.text) for ln in group)
    emphasised = fonts and letters > 0 and bold_letters / letters >= BOLD_SHARE
    words = text.split()
    if (not fonts and len(group) == 1 and heading_p >= HEADING_CONFIDENCE
            and len(words) <= MAX_LABELLED_HEADING_WORDS and not text.rstrip().endswith((".", ";", ","))):
        emphasised = True
    lead = None
    if fonts and not emphasised and 0 < first.bold_prefix < len(first.text):
        cand = first.text[:first.bold_prefix]
        nxt = first.text[first.bold_prefix:first.bold_prefix + 1]
        if cand.strip() and (nxt.isspace() or not cand[-1:].isalnum()):
            lead = cand.replace("\t", " ").strip()
    level = None
    if fonts and emphasised:
        level = sizes.get(round(max(ln.size for ln in group), 1))
    return Block(index=index, text=text, lead=lead, emphasised=emphasised,
                 all_caps=_is_caps(text), outline_level=level)


def blocks_from_lines(lines: Sequence[Line], *, structure: Any = None
                      ) -> tuple[tuple[Block, ...], tuple[str, ...]]:
    """The paragraphs of a document printed as *lines*, and notes (see the module docstring).
    *structure* is a :class:`~core.layout.labeller.LineLabeller` (None: the default)."""
    kept, dropped = drop_running(lines)
    notes: list[str] = []
    if dropped:
        notes.append(f"{dropped} running header, footer and page-number lines were left out")
    if not kept:
        return (), tuple(notes)
    g = geometry(kept)
    model = structure
    if model is None:
        from .store import default_labeller

        model = default_labeller()
    if model is None:
        notes.append("no line model could be loaded; paragraphs were found by the fixed rules")
        return _rule_blocks(kept, g), tuple(notes)
    answers = model.label(kept, g)
    vocab = vocabulary(kept)
    sizes = _size_levels(kept, g)
    blocks: list[Block] = []
    group: list[Line] = []
    heading_p = 0.0

    def flush() -> None:
        if not group:
            return
        if group[0].cells is not None:
            text = "\t".join(group[0].cells)
        else:
            text = join_lines([ln.text for ln in group], vocab)
        if text.strip():
            blocks.append(_make_block(len(blocks), group, text, heading_p=heading_p, sizes=sizes))
        group.clear()

    for i, ln in enumerate(kept):
        starts = answers.start[i] != CONTINUES or ln.cells is not None or (
            group and group[-1].cells is not None)
        if starts:
            flush()
            heading_p = float(answers.heading_p[i])
        group.append(ln)
    flush()
    return tuple(blocks), tuple(notes)
