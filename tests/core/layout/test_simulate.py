"""Laying out a formatted document as printed lines keeps its paragraphs: every paragraph
starts exactly one line, the words of the lines are the paragraph's, and the answers follow
the provisions of the document's own reading.

Outside reference: the invented demo precedent (demo_agreements/precedent.docx, real Word
auto-numbering) as the .docx reader reads it (ECMA-376 Part 1 §17.9)."""

from __future__ import annotations

import random
from pathlib import Path

from core.layout.answers import CONTINUES, PROVISION, block_answers
from core.layout.simulate import draw_styles, lay_out
from core.readers import read_document

PRECEDENT = Path(__file__).resolve().parents[3] / "demo_agreements" / "precedent.docx"


def test_every_paragraph_starts_one_line_in_every_style():
    doc = read_document(str(PRECEDENT))
    blocks = [b for b in doc.blocks if b.text.strip() or b.label is not None]
    answers = block_answers(doc)
    for style in draw_styles(random.Random(7), 8):
        lines, ans = lay_out(doc, style)
        starts = [i for i, s in enumerate(ans.start) if s != CONTINUES]
        assert len(starts) == len(blocks)
        assert sum(s == PROVISION for s in ans.start) == sum(a.start == PROVISION for a in answers)
        # the words of each paragraph's lines are the paragraph's words (labels aside)
        bounds = starts + [len(lines)]
        for block, a, b in zip(blocks, bounds, bounds[1:]):
            words = " ".join(ln.text for ln in lines[a:b]).split()
            if block.label is not None:
                words = words[1:]
            shown = (block.text.upper() if block.all_caps else block.text).split()
            assert words == shown
        assert all(ln.has_fonts != style.plain for ln in lines)
