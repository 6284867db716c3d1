"""Cross-references kept true in the counter-draft.

Restoring a clause the draft deleted, or striking one it added, moves the automatic
numbering of everything after it, and a typed "Section 9.1" then names the wrong clause.
The counter-draft is therefore written in two passes (:func:`core.export.counter_draft.
counter_draft_bytes`):

1. the decisions are written once, and the result is read back with every change accepted
   (the project's reader numbers paragraphs as ECMA-376 Part 1 §17.9 prescribes);
   :func:`counter_numbering` lines its paragraphs up with the draft's and the restored ones
   (:class:`Numbering`: every draft provision's number in the counter-draft, or None when
   struck, and the same for the precedent's provisions through their counterparts);
2. the decisions are written again with :class:`Wording`: restored and reverted precedent
   words get the counter-draft's numbers for their references (and the draft's names for
   defined terms), draft words inside a revert get their references renumbered, and
   :func:`reference_updates` turns every other reference whose target moved into a tracked
   change with a comment saying why (:mod:`core.xrefs` plans them).  A reference whose target
   is gone, or that cannot be told apart, is left as it is with a comment saying so: no
   reference is changed silently.

Timing: one extra write and read of the counter-draft, plus :mod:`core.xrefs`' near-linear
planning; the line-up is a ``difflib.SequenceMatcher`` over paragraph texts that are nearly
all equal (near linear).
"""

from __future__ import annotations

import difflib
import os
import tempfile
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Literal

from ..docinfo import build_docinfo
from ..docx.tracked import BlockEdit
from ..model import Document, Provision, Review
from ..xrefs import (
    ReferenceEdit,
    ReferenceIssue,
    renumber_references,
    translate_references,
)
from .common import block_owners, provision_blocks, term_translator

if TYPE_CHECKING:  # the plan's module imports this one
    from .counter_draft import CounterDraftPlan

__all__ = [
    "Numbering",
    "Wording",
    "accepted_view",
    "counter_numbering",
    "reference_updates",
]

#: Issue kinds of :mod:`core.xrefs` a reviewer must see once the decisions move numbers: the
#: target struck or without counterpart, a range now spanning a different number of
#: provisions, a number that could name several provisions.  "missing" (a reference that
#: named no provision before the decisions either) is a drafting point about the draft
#: itself, not about our changes, and is left alone.
_CAUSED_KINDS = ("gone", "range", "no-counterpart", "ambiguous")


@dataclass(frozen=True, slots=True)
class Numbering:
    """Full numbers (``core.docinfo`` style: "13", "13.2(b)") in the counter-draft
    once every change is accepted."""

    #: draft provision id -> its number in the counter-draft (None: struck).
    draft: Mapping[str, str | None]
    #: precedent provision id -> the number of the provision standing for it in the
    #: counter-draft (its draft counterpart, or its restored copy); None when there is none.
    precedent: Mapping[str, str | None]
    #: draft provision id -> its number in the draft, for telling what moved.
    before: Mapping[str, str | None]

    @property
    def moved(self) -> bool:
        """Did any draft provision change number (or go)?"""
        return any(self.draft.get(k) != v for k, v in self.before.items() if v)


def accepted_view(data: bytes) -> Document:
    """The counter-draft *data* read back with every tracked change accepted."""
    from ..readers import read_document

    folder = tempfile.mkdtemp(prefix="counterdraft-")
    path = os.path.join(folder, "accepted.docx")
    try:
        with open(path, "wb") as fh:
            fh.write(data)
        return read_document(path)
    finally:
        if os.path.exists(path):
            os.remove(path)
        os.rmdir(folder)


#: Where a counter-draft paragraph comes from: ("draft", draft block) or ("restored", insertion).
_Origin = tuple[Literal["draft", "restored"], int]


def _expected_paragraphs(review: Review, plan: CounterDraftPlan) -> list[tuple[_Origin, str | None]]:
    """The counter-draft's paragraphs as the plan makes them, in order, each with its
    origin -- ("draft", block), ("restored", insertion) -- and its text when known."""
    deleted = {d.block for d in plan.deletions}
    edited = {e.block for e in plan.edits if e.tracked}
    after: dict[int, list[int]] = {}
    for k, ins in enumerate(plan.insertions):
        after.setdefault(ins.after, []).append(k)
    out: list[tuple[_Origin, str | None]] = [(("restored", k), plan.insertions[k].text) for k in after.get(-1, [])]
    for i, block in enumerate(review.draft.blocks):
        if i not in deleted:
            out.append((("draft", i), None if i in edited else block.text))
        out += [(("restored", k), plan.insertions[k].text) for k in after.get(i, [])]
    return out


def _line_up(expected: Sequence[tuple[_Origin, str | None]], accepted: Document) -> dict[_Origin, int]:
    """origin -> accepted block index: equal texts matched in order, the paragraphs between
    two matches paired in order (an edited paragraph stays where it was)."""
    keys = [t if t is not None else f"\x00{n}" for n, (_, t) in enumerate(expected)]
    texts = [b.text for b in accepted.blocks]
    out: dict[_Origin, int] = {}
    for tag, i1, i2, j1, j2 in difflib.SequenceMatcher(None, keys, texts, autojunk=False).get_opcodes():
        if tag in ("equal", "replace"):
            for i, j in zip(range(i1, i2), range(j1, j2)):
                out[expected[i][0]] = j
    return out


def counter_numbering(review: Review, plan: CounterDraftPlan, accepted: Document) -> Numbering:
    """Every draft and precedent provision's number in the counter-draft *accepted* (the
    first pass read back), by lining up its paragraphs with what *plan* wrote."""
    where = _line_up(_expected_paragraphs(review, plan), accepted)
    info = build_docinfo(accepted)
    owner = block_owners(accepted)

    def number_at(block: int | None) -> str | None:
        if block is None or block not in owner:
            return None
        return info.full_number[info.position[owner[block][0]]]

    draft, d_owner = review.draft, block_owners(review.draft)
    numbers: dict[str, str | None] = {}
    for prov in draft.provisions:
        blocks = [where.get(("draft", b)) for b in provision_blocks(draft, prov, owners=d_owner)]
        numbers[prov.id] = next((number_at(b) for b in blocks if b is not None), None)
    restored = _restored_numbers(review, plan, where, number_at)
    counterpart = {p.precedent: p.draft for p in review.pairs if p.precedent and p.draft}
    prec = {pid: numbers.get(counterpart[pid]) if pid in counterpart else restored.get(pid)
            for pid in (p.id for p in review.precedent.provisions)}
    before = build_docinfo(draft)
    return Numbering(numbers, prec, {p.id: before.full_number[i] for i, p in enumerate(draft.provisions)})


def _restored_numbers(review: Review, plan: CounterDraftPlan, where: Mapping[_Origin, int],
                      number_at: Callable[[int | None], str | None]) -> dict[str, str | None]:
    """precedent provision id -> number of its restored copy, through the precedent block
    each insertion copies (``plan.sources``)."""
    owner = block_owners(review.precedent)
    out: dict[str, str | None] = {}
    for k, source in enumerate(plan.sources):
        if source in owner and owner[source][0] not in out:
            out[owner[source][0]] = number_at(where.get(("restored", k)))
    return out


class Wording:
    """How words go into the counter-draft.  Precedent words take the draft's names for
    defined terms and, once the counter-draft's :class:`Numbering` is known, its numbers for
    cross-references; draft words keep theirs, their references renumbered."""

    def __init__(self, review: Review, numbering: Numbering | None = None) -> None:
        self.review = review
        self.numbering = numbering
        self.to_terms = term_translator(review.term_map)
        self.draft_edits: dict[str, list[ReferenceEdit]] = {}
        if numbering is not None and numbering.moved:
            for e in renumber_references(review.draft, numbering.draft)[0]:
                if e.part == "text":
                    self.draft_edits.setdefault(e.provision, []).append(e)

    def precedent(self, prov: Provision | None, text: str) -> tuple[str, list[str]]:
        """Precedent words of *prov* for the counter-draft, and notes on references no
        number can be given."""
        words = self.to_terms(text)
        if self.numbering is None or prov is None:
            return words, []
        t = translate_references(words, source_doc=self.review.precedent, source_provision=prov,
                                 number_of=self.numbering.precedent.get)
        return t.text, [_issue_note(i) for i in t.issues if i.kind in _CAUSED_KINDS]

    def draft(self, prov: Provision, start: int, end: int) -> str:
        """``prov.text[start:end]`` with the renumbering of the references wholly inside."""
        out, pos = [], start
        for e in sorted(self.draft_edits.get(prov.id, ()), key=lambda e: e.start):
            if start <= e.start and e.end <= end:
                out += [prov.text[pos:e.start], e.new]
                pos = e.end
        out.append(prov.text[pos:end])
        return "".join(out)


def _issue_note(issue: ReferenceIssue) -> str:
    return f"Cross-reference to check: \u201c{issue.words}\u201d -- {issue.why}"


def reference_updates(review: Review, numbering: Numbering, edits: Sequence[BlockEdit],
                      deleted: set[int]) -> list[BlockEdit]:
    """Tracked changes, each with a comment saying why, that keep the draft's typed
    references true after the decisions (not inside a paragraph the decisions strike or a
    stretch they already rewrite), and comments on the references no change can keep true
    (their target struck, or a range that now spans a different number of provisions)."""
    if not numbering.moved:
        return []
    taken: dict[int, list[tuple[int, int]]] = {}
    for e in edits:
        taken.setdefault(e.block, []).append((e.start, e.end))

    def free(block: int, a: int, b: int) -> bool:
        return block not in deleted and all(b <= x or y <= a for x, y in taken.get(block, []))

    changes, issues = renumber_references(review.draft, numbering.draft)
    out: list[BlockEdit] = []
    for c in changes:
        if c.at is not None and free(c.at.block, c.at.start, c.at.end):
            out.append(BlockEdit(c.at.block, c.at.start, c.at.end, c.new,
                                 comment=f"Cross-reference updated: {c.reason}."))
            taken.setdefault(c.at.block, []).append((c.at.start, c.at.end))
    for i in issues:
        if i.kind in _CAUSED_KINDS and i.at is not None and free(i.at.block, i.at.start, i.at.end):
            out.append(BlockEdit(i.at.block, i.at.start, i.at.end, comment=_issue_note(i), tracked=False))
            taken.setdefault(i.at.block, []).append((i.at.start, i.at.end))
    return out
