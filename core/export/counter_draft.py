"""The counter-draft: the counterparty's own .docx with the decisions as tracked changes."""


import dataclasses
import datetime as _dt
import os
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

from .. import CAUTION
from ..decisions import Decision
from ..errors import CounterdraftError
from ..fileio import atomic_write_bytes
from ..labels import clause_label, find_provision
from ..model import Block, Deviation, Document, Provision, Review
from .common import (
    CAUTION_PROPERTY,
    block_owners,
    block_ranges,
    check_output,
    default_author,
    edits_of_pair,
    map_offset,
    provision_blocks,
    stamp_date,
    term_translator,
)

__all__ = [
    "CounterDraftPlan",
    "counter_draft_bytes",
    "plan_counter_draft",
    "write_counter_draft",
]



@dataclass(frozen=True, slots=True)
class CounterDraftPlan:
    """The block-level changes the decisions call for, before any XML is touched."""

    edits: tuple  # tuple[core.docx.tracked.BlockEdit, ...]
    deletions: tuple  # tuple[BlockDeletion, ...]
    insertions: tuple  # tuple[BlockInsertion, ...]
    #: Decisions that could not be written, with the reason (shown to the user).
    notes: tuple[str, ...]


def _deviation(review: Review, dev_id: str) -> Deviation | None:
    return next((d for d in review.deviations if d.id == dev_id), None)


def _draft_anchor(review: Review, precedent_pid: str) -> int:
    """The draft block after which a precedent provision missing from the draft belongs:
    the end of the draft counterpart of the nearest preceding precedent provision that has
    one (-1 when none precedes)."""
    matched = {p.precedent: p.draft for p in review.pairs if p.precedent and p.draft}
    owners = block_owners(review.draft)
    order = [p.id for p in review.precedent.provisions]
    try:
        i = order.index(precedent_pid)
    except ValueError:
        return len(review.draft.blocks) - 1
    for prev in reversed(order[:i]):
        dpid = matched.get(prev)
        dprov = find_provision(review.draft, dpid)
        blocks = provision_blocks(review.draft, dprov, owners=owners) if dprov is not None else []
        if blocks:
            return max(blocks)
    for nxt in order[i + 1:]:
        dprov = find_provision(review.draft, matched.get(nxt))
        blocks = provision_blocks(review.draft, dprov, owners=owners) if dprov is not None else []
        if blocks:
            return min(blocks) - 1
    return len(review.draft.blocks) - 1


def _like_block(blocks: Sequence[Block], anchor: int, model: Block) -> tuple[int | None, bool]:
    """A draft block whose paragraph properties a restored paragraph can copy: the nearest
    one to *anchor* (looking back first) at the same list level as *model*, preferring the
    same style.  Returns (block index, numbered)."""
    if not blocks:
        return None, False
    order = list(range(min(max(anchor, 0), len(blocks) - 1), -1, -1)) + list(range(anchor + 1, len(blocks)))
    same_level = [i for i in order if blocks[i].list_level == model.list_level
                  and (blocks[i].label is None) == (model.label is None) and blocks[i].text.strip()]
    for i in same_level:
        if blocks[i].style == model.style:
            return i, model.label is not None
    if same_level:
        return same_level[0], model.label is not None
    return max(anchor, 0), False


_WORD_CHANGES = ("insert", "delete", "replace")
#: Characters before which a word needs no space of its own.
_CLOSING = ",.;:)]}”’'\"!?"


def _tidy_spaces(text: str, start: int, end: int, replacement: str) -> tuple[int, int, str]:
    """Keep single spaces around words removed or put back.

    The review's spans cover the changed words only.  Removing "not" from "shall not be"
    must also remove one of the spaces around it, and putting "not" back into "shall be"
    must add one.
    """
    if not replacement and end > start:
        if start > 0 and text[start - 1] == " " and (end == len(text) or text[end] == " " or text[end] in _CLOSING):
            return start - 1, end, replacement
        if start == 0 and end < len(text) and text[end] == " ":
            return start, end + 1, replacement
        return start, end, replacement
    if replacement and start == end:
        before = text[start - 1] if start > 0 else ""
        after = text[start] if start < len(text) else ""
        if before and not before.isspace() and not replacement[0].isspace() and before not in "([{“‘":
            replacement = " " + replacement
        elif after and not after.isspace() and after not in _CLOSING and not replacement[-1].isspace():
            replacement = replacement + " "
    return start, end, replacement


def _heading_change(review: Review, dev: Deviation, dec: Decision, dprov: Provision,
                    pprov: Provision | None, to_draft_terms):
    """The change that puts the precedent's heading (revert) or the reviewer's (amend) in
    place of the draft's whole heading, or anchors a note on it (accept).  Returns a
    BlockEdit, a BlockDeletion (a heading line to remove) or None when not found."""
    from ..docx.tracked import BlockDeletion, BlockEdit

    draft = review.draft
    dh = dprov.heading or ""
    ph = (pprov.heading if pprov is not None else None) or ""
    owners = block_owners(draft)
    blocks = provision_blocks(draft, dprov, owners=owners)
    head_line = next((b for b in blocks if owners[b] == (dprov.id, -1)), None)
    if dec.action == "accept":
        replacement = None
    elif dec.action == "amend":
        replacement = dec.text or ""
    else:
        replacement = to_draft_terms(ph)
    if head_line is not None:
        text = draft.blocks[head_line].text
        if replacement == "" and dec.action == "revert":
            return BlockDeletion(head_line)
        i = text.find(dh) if dh else -1
        start, end = (i, i + len(dh)) if i >= 0 else (0, len(text))
        return BlockEdit(head_line, start, end, replacement or "", tracked=replacement is not None)
    if not dprov.segments:
        return None
    seg = dprov.segments[0]
    lead = draft.blocks[seg.block].text[:seg.start]
    i = lead.find(dh) if dh else -1
    if i < 0:
        if not dh and replacement:  # the draft has no heading: add the precedent's, run in
            return BlockEdit(seg.block, seg.start, seg.start, f"{replacement}. ")
        return None
    if replacement == "" and dec.action == "revert":
        # No heading in the precedent: remove the run-in heading and what separates it from
        # the text (". ", " - ").
        return BlockEdit(seg.block, i, seg.start, "")
    return BlockEdit(seg.block, i, i + len(dh), replacement or "", tracked=replacement is not None)


def _subtree(doc: Document, root: Provision, *, keep) -> list[Provision]:
    """*root* and its descendants for which ``keep(provision)`` holds, in document order.
    One pass over the provisions (parents come before their children)."""
    inside = {root.id}
    out = [root]
    for prov in doc.provisions:
        if prov.parent in inside and prov.id not in inside and keep(prov):
            inside.add(prov.id)
            out.append(prov)
    return out


def plan_counter_draft(review: Review, decisions: Sequence[Decision]) -> CounterDraftPlan:
    """Block-level edits, deletions and insertions for *decisions* on the draft.

    * revert/amend of words: the draft's changed words (``draft_span``) are replaced by the
      precedent's (``precedent_span``, with the draft's names for mapped defined terms) or by
      the reviewer's text; a pure deletion in the draft is restored at the draft's empty
      span (its insertion point; for a deviation without one, the place the pair's word
      diff, ``Pair.edits``, gives); a heading change (``part == "heading"``) replaces the
      whole heading;
    * a provision the draft added: revert deletes its paragraphs (marks included), with its
      sub-provisions that have no counterpart in the precedent; amend replaces its words;
    * a provision the draft removed: revert inserts the precedent's paragraphs (with its
      sub-provisions the draft also lacks) after the draft counterpart of the provision that
      precedes it, with the paragraph properties of a neighbour at the same list level;
      amend inserts the reviewer's text there;
    * a note becomes a comment on the changed words (on the draft's words for accept);
    * renamed defined terms and moved provisions are not written (the decision module
      refuses them); decisions that cannot be placed, or that overlap an earlier one, are
      skipped and reported in ``notes``.
    """
    from ..docx.tracked import BlockDeletion, BlockEdit, BlockInsertion

    to_draft_terms = term_translator(review.term_map)
    edits: list[BlockEdit] = []
    deletions: list[BlockDeletion] = []
    notes: list[str] = []
    claimed: dict[int, list[tuple[int, int]]] = {}  # block -> edited ranges
    deleted_blocks: set[int] = set()
    draft = review.draft
    precedent = review.precedent
    d_owners, p_owners = block_owners(draft), block_owners(precedent)
    in_draft = {p.precedent for p in review.pairs if p.precedent and p.draft}
    in_precedent = {p.draft for p in review.pairs if p.precedent and p.draft}
    # Restored paragraphs sharing an anchor are written in the precedent's order.
    restored: list[tuple[tuple[int, int, int], BlockInsertion]] = []
    restored_ids: set[str] = set()
    seen_heading_edits: set[BlockEdit] = set()

    def free(block: int, a: int, b: int) -> bool:
        if block in deleted_blocks:
            return False
        for x, y in claimed.get(block, []):
            if a < y and x < b or (a == b == x) or (a == b and x < a < y) or (x == y and a < x < b):
                return False
        return True

    def add_edit(edit: BlockEdit) -> None:
        edits.append(edit)
        claimed.setdefault(edit.block, []).append((edit.start, edit.end))

    for dec in decisions:
        dev = _deviation(review, dec.deviation)
        if dev is None:
            notes.append(f"{dec.deviation}: no such deviation in this review; skipped")
            continue
        note = dec.note
        if dec.action == "accept" and not note:
            continue
        dprov = find_provision(draft, dev.draft_provision)
        pprov = find_provision(precedent, dev.precedent_provision)
        where = clause_label(review, dev) or dev.id
        if dec.action != "accept" and (dev.category == "term" or dev.change == "move"):
            notes.append(f"deviation {dev.rank} ({where}): a renamed term or a moved provision is not "
                         "written as a tracked change; skipped")
            continue

        # -- a provision the draft left out -------------------------------------------
        if dev.change == "remove-provision" or (dprov is None and pprov is not None):
            if pprov is None:
                notes.append(f"deviation {dev.rank} ({where}): provision not found; skipped")
                continue
            anchor = _draft_anchor(review, pprov.id)
            if dec.action == "accept":
                if anchor >= 0 and free(anchor, len(draft.blocks[anchor].text), len(draft.blocks[anchor].text)):
                    n = len(draft.blocks[anchor].text)
                    add_edit(BlockEdit(anchor, n, n, comment=note, tracked=False))
                continue
            # The provision with its sub-provisions the draft also lacks; parts another
            # decision already restored are not written twice.
            provs = [p for p in _subtree(precedent, pprov, keep=lambda p: p.id not in in_draft)
                     if p.id not in restored_ids]
            if not provs:
                continue
            restored_ids.update(p.id for p in provs)
            blocks = sorted({b for p in provs for b in provision_blocks(precedent, p, owners=p_owners)})
            if dec.action == "revert":
                lines = [(b, precedent.blocks[b], to_draft_terms(precedent.blocks[b].text)) for b in blocks]
            else:
                first = blocks[0] if blocks else -1
                model = precedent.blocks[first] if blocks else Block(0, "")
                lines = [(first, model, line) for line in (dec.text or "").split("\n")]
            for k, (b, model, text) in enumerate(lines):
                like, numbered = _like_block(draft.blocks, anchor, model)
                restored.append(((anchor, b, k), BlockInsertion(
                    anchor, text, like=like, numbered=numbered, comment=note if k == 0 else None)))
            continue

        if dprov is None:
            notes.append(f"deviation {dev.rank} ({where}): no draft provision to change; skipped")
            continue

        # -- a provision the draft added ------------------------------------------------
        if dev.change == "add-provision" and dec.action == "revert":
            provs = _subtree(draft, dprov, keep=lambda p: p.id not in in_precedent)
            blocks = sorted({b for p in provs for b in provision_blocks(draft, p, owners=d_owners)})
            if any(b in claimed or b in deleted_blocks for b in blocks):
                notes.append(f"deviation {dev.rank} ({where}): overlaps another decision; skipped")
                continue
            for k, b in enumerate(blocks):
                deletions.append(BlockDeletion(b, comment=note if k == 0 else None))
                deleted_blocks.add(b)
            continue

        # -- the heading -------------------------------------------------------------------
        if dev.part == "heading" and dev.change in _WORD_CHANGES:
            result = _heading_change(review, dev, dec, dprov, pprov, to_draft_terms)
            if result is None:
                notes.append(f"deviation {dev.rank} ({where}): the heading could not be located in the draft; skipped")
            elif isinstance(result, BlockDeletion):
                if result.block in deleted_blocks:
                    continue  # the same heading, already reverted by another decision
                if result.block in claimed:
                    notes.append(f"deviation {dev.rank} ({where}): overlaps another decision; skipped")
                    continue
                deletions.append(BlockDeletion(result.block, comment=note))
                deleted_blocks.add(result.block)
            elif result in seen_heading_edits:
                continue  # the same heading, already reverted by another decision
            elif not free(result.block, result.start, result.end):
                notes.append(f"deviation {dev.rank} ({where}): overlaps another decision; skipped")
            else:
                seen_heading_edits.add(result)
                add_edit(dataclasses.replace(result, comment=note))
            continue

        # -- words inside the provision ------------------------------------------------
        if dev.change == "add-provision":
            d1, d2 = 0, len(dprov.text)  # amend: the reviewer's words replace the provision's
        elif dev.draft_span is not None:
            d1, d2 = dev.draft_span  # empty at the insertion point for a delete
        elif (dev.precedent_span is not None and pprov is not None and (at := map_offset(
                edits_of_pair(review, dprov.id, pprov.id), dev.precedent_span[0])) is not None):
            d1 = d2 = at  # a deviation made without a draft span: place it by the pair's diff
        elif dec.action == "accept":
            d1, d2 = 0, len(dprov.text)  # a note on the provision as a whole
        else:
            notes.append(f"deviation {dev.rank} ({where}): the review gives no place for this change; skipped")
            continue
        if dec.action == "accept":
            replacement = None
        elif dec.action == "amend":
            replacement = dec.text or ""
        elif pprov is not None and dev.precedent_span is not None:
            p1, p2 = dev.precedent_span
            replacement = to_draft_terms(pprov.text[p1:p2])
        elif dev.change == "insert" or not dev.precedent_text:
            replacement = ""
        else:
            replacement = to_draft_terms(dev.precedent_text)
        ranges = block_ranges(dprov, d1, d2)
        if not ranges and dec.action == "accept":
            blocks = provision_blocks(draft, dprov, owners=d_owners)
            if blocks:  # a provision without words of its own (a heading): note on it
                ranges = [(blocks[0], 0, len(draft.blocks[blocks[0]].text))]
        if not ranges:
            notes.append(f"deviation {dev.rank} ({where}): its words could not be located in the draft; skipped")
            continue
        if replacement is None:
            b, s, e = ranges[0]
            if free(b, s, e):
                add_edit(BlockEdit(b, s, e, comment=note, tracked=False))
            else:
                notes.append(f"deviation {dev.rank} ({where}): its note overlaps another decision; skipped")
            continue
        parts = replacement.split("\n")
        if len(parts) != len(ranges):
            parts = [replacement] + [""] * (len(ranges) - 1)
        planned = []
        for k, ((b, s, e), text) in enumerate(zip(ranges, parts)):
            if s == e and not text:
                continue
            s, e, text = _tidy_spaces(draft.blocks[b].text, s, e, text)
            planned.append(BlockEdit(b, s, e, text, comment=note if not planned else None))
        if not all(free(x.block, x.start, x.end) for x in planned):
            notes.append(f"deviation {dev.rank} ({where}): overlaps another decision; skipped")
            continue
        for x in planned:
            add_edit(x)
    insertions = [ins for _, ins in sorted(restored, key=lambda x: x[0])]
    return CounterDraftPlan(tuple(edits), tuple(deletions), tuple(insertions), tuple(notes))


def counter_draft_bytes(review: Review, decisions: Sequence[Decision], *, draft_path: str,
                        author: str, date: _dt.datetime | None = None) -> tuple[bytes, tuple[str, ...]]:
    """The counter-draft as bytes, and notes on decisions that could not be written."""
    from ..docx.revisions import RevisionStamp
    from ..docx.tracked import write_tracked_copy

    if Path(draft_path).suffix.lower() != ".docx":
        raise CounterdraftError("the counter-draft is written on the counterparty's own .docx; "
                                "this draft is not a .docx", path=draft_path)
    plan = plan_counter_draft(review, decisions)
    stamp = RevisionStamp(author=author, date=stamp_date(date))
    data = write_tracked_copy(
        draft_path, edits=plan.edits, deletions=plan.deletions, insertions=plan.insertions,
        stamp=stamp, properties={CAUTION_PROPERTY: CAUTION},
        expected_blocks=len(review.draft.blocks),
        block_texts={e.block: review.draft.blocks[e.block].text for e in plan.edits},
    )
    notes = list(plan.notes)
    own = [w for w in review.draft.warnings if "tracked change" in w]
    if own:
        notes.append(f"the draft already holds tracked changes of its own ({own[0]}); rejecting "
                     "all changes in a word processor rejects those too")
    return data, tuple(notes)


def write_counter_draft(review: Review, decisions: Sequence[Decision], out: str | os.PathLike[str], *,
                        draft_path: str, author: str | None = None, date: _dt.datetime | None = None,
                        inputs: Sequence[str] = ()) -> tuple[str, ...]:
    """Write the counter-draft to *out* (.docx, atomically); returns notes on decisions that
    could not be written.  *inputs* are further paths *out* must not overwrite."""
    path = check_output(out, (".docx",), [draft_path, review.draft.source, review.precedent.source, *inputs])
    data, notes = counter_draft_bytes(review, decisions, draft_path=draft_path,
                                      author=author or default_author(), date=date)
    atomic_write_bytes(path, data)
    return notes


