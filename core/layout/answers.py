"""What a formatted document says about each of its paragraphs: the answers the line
labeller learns from.

A document read from a file that carries its structure (.docx, .odt: paragraphs, auto-number
labels, heading styles) has been split into provisions by :mod:`core.structure`; for each
block (paragraph) this module says whether it starts a provision, whether that provision has
a number label and a heading, and its level.  :mod:`core.layout.simulate` gives the answers
to every printed line of the paragraph (the first line carries them; the others continue it).

Classes of a line's ``start`` answer: :data:`CONTINUES` (the line continues the paragraph
above), :data:`PARAGRAPH` (a new paragraph of the same provision), :data:`PROVISION` (a new
provision).  Levels above :data:`MAX_LEVEL` count as MAX_LEVEL.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..model import Document

__all__ = ["BlockAnswer", "CONTINUES", "MAX_LEVEL", "PARAGRAPH", "PROVISION", "block_answers"]

CONTINUES, PARAGRAPH, PROVISION = 0, 1, 2
#: Deepest level told apart: agreements rarely nest deeper than "1.1.1(a)(i)"; deeper levels
#: are rare enough that one class holds them.
MAX_LEVEL = 5


@dataclass(frozen=True, slots=True)
class BlockAnswer:
    start: int  # PARAGRAPH or PROVISION (a block always starts a paragraph)
    label: bool
    heading: bool
    level: int


def block_answers(doc: Document) -> tuple[BlockAnswer, ...]:
    """One answer per block of *doc* (see the module docstring)."""
    from ..structure import block_owners

    owners = block_owners(doc)
    by_id = {p.id: p for p in doc.provisions}
    heading_lines = {pid for pid, part in owners.values() if part == -1}
    out = []
    for block in doc.blocks:
        owner = owners.get(block.index)
        starts = False
        prov = None
        if owner is not None:
            pid, part = owner
            prov = by_id[pid]
            starts = part == -1 or (part == 0 and pid not in heading_lines)
        if not starts or prov is None:
            out.append(BlockAnswer(PARAGRAPH, False, False, 0))
            continue
        out.append(BlockAnswer(PROVISION, prov.number is not None, prov.heading is not None,
                               min(prov.level, MAX_LEVEL)))
    return tuple(out)
