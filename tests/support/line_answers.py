"""The answers for the printed lines of a PDF made from a .docx: where each line falls in
the .docx's paragraphs.

Outside reference: the .docx as our reader reads it (paragraphs and auto-numbering labels
straight from WordprocessingML, ECMA-376 Part 1 §17.3, §17.9) and the PDF LibreOffice
prints from it.  The letters and digits of both are lined up (:func:`align`: in step while they agree, and
where they differ the nearest place where the next :data:`ANCHOR` characters agree again;
checked against the standard library's ``difflib.SequenceMatcher`` in
tests/support/test_line_answers.py); a line whose first letter or digit falls on the first letter or
digit of a paragraph (its label included) starts that paragraph and gets the paragraph's
answers (:func:`core.layout.answers.block_answers`), every other line continues one.

Used to train the shipped default model on real printed pages besides simulated ones
(``scripts/train_layout_model.py``) and to score the labeller and the fixed rules line by line
(tests/core/layout/test_labeller_accuracy.py).
"""

from __future__ import annotations

import bisect
from collections.abc import Sequence

from core.layout.answers import CONTINUES, block_answers
from core.layout.lines import Line
from core.layout.simulate import LineAnswers
from core.model import Document

__all__ = ["ANCHOR", "MIN_ALIGNED", "align", "line_answers"]

#: Characters that must agree for the two texts to be in step again after a difference.
ANCHOR = 12
#: How far ahead a difference is looked past (characters): a dropped header line or a label
#: the other side lacks is far shorter.
LOOKAHEAD = 4000

#: A document whose lines line up with its paragraphs for less than this share is not used
#: (its answers would be guesses).
MIN_ALIGNED = 0.97


def _chars(text: str) -> str:
    return "".join(c for c in text.casefold() if c.isalnum())


def align(a: str, b: str) -> list[int]:
    """For each character of *b*, its position in *a*, or -1 where the two differ."""
    out = [-1] * len(b)
    i = j = 0
    while i < len(a) and j < len(b):
        if a[i] == b[j]:
            out[j] = i
            i += 1
            j += 1
            continue
        best: tuple[int, int, int] | None = None  # (skipped characters, i', j')
        for dj in range(0, min(LOOKAHEAD, len(b) - j)):
            if best is not None and dj >= best[0]:
                break
            probe = b[j + dj:j + dj + ANCHOR]
            if len(probe) < ANCHOR and j + dj + len(probe) < len(b):
                break
            k = a.find(probe, i, i + LOOKAHEAD + ANCHOR)
            if k >= 0 and (best is None or (k - i) + dj < best[0]):
                best = ((k - i) + dj, k, j + dj)
        if best is None:
            break
        i, j = best[1], best[2]
    return out


def line_answers(lines: Sequence[Line], doc: Document) -> tuple[LineAnswers, float]:
    """The answers of *lines* (a printed form of *doc*), and the share of lines placed."""
    answers = block_answers(doc)
    a_parts: list[str] = []
    a_block: list[int] = []  # start offset in A of each block
    pos = 0
    for block in doc.blocks:
        rendered = _chars((block.label or "") + block.text)
        a_block.append(pos)
        a_parts.append(rendered)
        pos += len(rendered)
    a = "".join(a_parts)
    b_parts = [_chars(ln.text) for ln in lines]
    b_start = []
    pos = 0
    for part in b_parts:
        b_start.append(pos)
        pos += len(part)
    b = "".join(b_parts)
    where = align(a, b)
    start: list[int] = []
    label: list[bool] = []
    heading: list[bool] = []
    level: list[int] = []
    placed = 0
    for i, part in enumerate(b_parts):
        a_pos = where[b_start[i]] if part else -1
        if a_pos < 0:
            start.append(CONTINUES)
            label.append(False)
            heading.append(False)
            level.append(0)
            continue
        placed += 1
        j = bisect.bisect_right(a_block, a_pos) - 1  # the last block starting at or before
        if a_block[j] == a_pos:
            ans = answers[j]
            start.append(ans.start)
            label.append(ans.label)
            heading.append(ans.heading)
            level.append(ans.level)
        else:
            start.append(CONTINUES)
            label.append(False)
            heading.append(False)
            level.append(0)
    share = placed / max(sum(1 for p in b_parts if p), 1)
    return LineAnswers(tuple(start), tuple(label), tuple(heading), tuple(level)), share
