"""The counter-draft: the counterparty's own .docx with the decisions as tracked changes.

:func:`plan_counter_draft` turns the decisions into block-level changes (pure data: which
words of which paragraph become what, which paragraphs are deleted or inserted), through the
span-edit layer :mod:`.spans`; :func:`counter_draft_bytes` has :mod:`core.docx.tracked` write
them into a copy of the draft.
"""

from __future__ import annotations

import dataclasses
import datetime as _dt
import os
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path

from .. import CAUTION
from ..decisions import ACCEPT_ONLY, Decision, is_renamed_term
from ..docx.tracked import BlockDeletion, BlockEdit, BlockInsertion, unsafe_part_names
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
)
from .references import Wording, accepted_view, counter_numbering, reference_updates
from .spans import SpanEdit, amend_edits, revert_edits, seam, to_blocks

__all__ = [
    "CounterDraftPlan",
    "counter_draft_bytes",
    "plan_counter_draft",
    "write_counter_draft",
]



@dataclass(frozen=True, slots=True)
class CounterDraftPlan:
    """The block-level changes the decisions call for, before any XML is touched."""

    edits: tuple[BlockEdit, ...]
    deletions: tuple[BlockDeletion, ...]
    insertions: tuple[BlockInsertion, ...]
    #: The precedent block each insertion copies (-1 for the reviewer's own words).
    sources: tuple[int, ...]
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


def _heading_change(review: Review, dec: Decision, dprov: Provision, pprov: Provision | None,
                    to_draft_terms: Callable[[str], str]) -> BlockEdit | BlockDeletion | None:
    """The change that puts the precedent's heading (revert) or the reviewer's (amend) in
    place of the draft's whole heading, or anchors a note on it (accept).  Returns a
    BlockEdit, a BlockDeletion (a heading line to remove) or None when not found."""
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
        return _heading_edit(head_line, text, start, end, replacement)
    return _run_in_heading_change(draft, dprov, dh, replacement, revert=dec.action == "revert")


def _run_in_heading_change(draft: Document, dprov: Provision, dh: str, replacement: str | None, *,
                           revert: bool) -> BlockEdit | None:
    """:func:`_heading_change` for a heading run in before the text of *dprov*'s first
    segment (no heading line of its own): *dh* is the draft's heading, *replacement* the new
    one (None: anchor a note only)."""
    if not dprov.segments:
        return None
    seg = dprov.segments[0]
    lead = draft.blocks[seg.block].text[:seg.start]
    i = lead.find(dh) if dh else -1
    if i < 0:
        if not dh and replacement:  # the draft has no heading: add the precedent's, run in
            return BlockEdit(seg.block, seg.start, seg.start, f"{replacement}. ")
        return None
    if replacement == "" and revert:
        # No heading in the precedent: remove the run-in heading and what separates it from
        # the text (". ", " - ").
        return BlockEdit(seg.block, i, seg.start, "")
    return _heading_edit(seg.block, draft.blocks[seg.block].text, i, i + len(dh), replacement)


def _heading_edit(block: int, text: str, start: int, end: int, replacement: str | None) -> BlockEdit:
    """The heading ``text[start:end]`` replaced by *replacement* with the smallest tracked
    change (untracked, for a note only, when *replacement* is None or the same words)."""
    found = amend_edits(text, (start, end), replacement) if replacement is not None else []
    if not found:
        return BlockEdit(block, start, end, "", tracked=False)
    (edit,) = found
    return BlockEdit(block, edit.start, edit.end, edit.new)


def _subtree(doc: Document, root: Provision, *, keep: Callable[[Provision], bool]) -> list[Provision]:
    """*root* and its descendants for which ``keep(provision)`` holds, in document order.
    One pass over the provisions (parents come before their children)."""
    inside = {root.id}
    out = [root]
    for prov in doc.provisions:
        if prov.parent in inside and prov.id not in inside and keep(prov):
            inside.add(prov.id)
            out.append(prov)
    return out


_WORD_CHANGES = ("insert", "delete", "replace")


def _who(review: Review, dev: Deviation) -> str:
    """How notes name a deviation: its number and clause."""
    return f"deviation {dev.rank} ({clause_label(review, dev) or dev.id})"


class _Planner:
    """Collects the block-level changes of the decisions, one decision at a time, refusing a
    change that overlaps one already planned."""

    def __init__(self, review: Review, wording: Wording) -> None:
        self.review = review
        self.wording = wording
        self.to_draft_terms = wording.to_terms
        self.d_owners = block_owners(review.draft)
        self.p_owners = block_owners(review.precedent)
        self.in_draft = {p.precedent for p in review.pairs if p.precedent and p.draft}
        self.in_precedent = {p.draft for p in review.pairs if p.precedent and p.draft}
        self.by_id = {d.id: d for d in review.deviations}
        self.edits: list[BlockEdit] = []
        self.deletions: list[BlockDeletion] = []
        self.restored: list[tuple[tuple[int, int, int], BlockInsertion, int]] = []
        self.restored_ids: set[str] = set()
        self.notes: list[str] = []
        self.claimed: dict[int, list[tuple[int, int]]] = {}
        self.deleted_blocks: set[int] = set()

    # -- bookkeeping ----------------------------------------------------------------------
    def free(self, block: int, a: int, b: int) -> bool:
        if block in self.deleted_blocks:
            return False
        for x, y in self.claimed.get(block, []):
            if a < y and x < b or (a == b == x) or (a == b and x < a < y) or (x == y and a < x < b):
                return False
        return True

    def add_edits(self, planned: Sequence[BlockEdit], dev: Deviation) -> None:
        if not all(self.free(x.block, x.start, x.end) for x in planned):
            self.notes.append(f"{_who(self.review, dev)}: overlaps another decision; skipped")
            return
        for x in planned:
            self.edits.append(x)
            self.claimed.setdefault(x.block, []).append((x.start, x.end))

    def plan(self) -> CounterDraftPlan:
        restored = sorted(self.restored, key=lambda x: x[0])
        return CounterDraftPlan(tuple(self.edits), tuple(self.deletions),
                                tuple(ins for _, ins, _ in restored), tuple(src for _, _, src in restored),
                                tuple(self.notes))

    # -- one decision ---------------------------------------------------------------------
    def add(self, dec: Decision) -> None:
        review = self.review
        dev = self.by_id.get(dec.deviation)
        if dev is None:
            self.notes.append(f"{dec.deviation}: no such deviation in this review; skipped")
            return
        if dec.action == "accept" and not dec.note:
            return
        dprov = find_provision(review.draft, dev.draft_provision)
        pprov = find_provision(review.precedent, dev.precedent_provision)
        if dec.action != "accept" and (is_renamed_term(dev) or dev.change == "move"
                                       or dev.category in ACCEPT_ONLY):
            self.notes.append(f"{_who(review, dev)}: a {dev.category} difference can only be "
                              "accepted; skipped")
        elif dev.change == "remove-provision" or (dprov is None and pprov is not None):
            self.restore(dev, dec, pprov)
        elif dprov is None:
            self.notes.append(f"{_who(review, dev)}: no draft provision to change; skipped")
        elif dev.change == "add-provision" and dec.action == "revert":
            self.strike(dev, dec, dprov)
        elif dev.part == "heading" and dev.change in _WORD_CHANGES:
            self.heading(dev, dec, dprov, pprov)
        else:
            self.words(dev, dec, dprov, pprov)

    def restore(self, dev: Deviation, dec: Decision, pprov: Provision | None) -> None:
        """A provision the draft left out: revert inserts the precedent's paragraphs (with its
        sub-provisions the draft also lacks) after the draft counterpart of the provision
        before it; amend inserts the reviewer's text there; a note on accept sits there."""
        review, draft, precedent = self.review, self.review.draft, self.review.precedent
        if pprov is None:
            self.notes.append(f"{_who(review, dev)}: provision not found; skipped")
            return
        anchor = _draft_anchor(review, pprov.id)
        if dec.action == "accept":
            n = len(draft.blocks[anchor].text) if anchor >= 0 else 0
            if anchor >= 0 and self.free(anchor, n, n):
                self.add_edits([BlockEdit(anchor, n, n, comment=dec.note, tracked=False)], dev)
            return
        provs = [p for p in _subtree(precedent, pprov, keep=lambda p: p.id not in self.in_draft)
                 if p.id not in self.restored_ids]
        if not provs:
            return  # already restored by another decision
        self.restored_ids.update(p.id for p in provs)
        blocks = sorted({b for p in provs for b in provision_blocks(precedent, p, owners=self.p_owners)})
        checks: list[str] = []
        first = blocks[0] if blocks else -1
        if dec.action == "revert":
            lines = []  # (precedent block copied, its block as a model, the words)
            for b in blocks:
                words, found = self.wording.precedent(find_provision(precedent, self.p_owners[b][0]),
                                                      precedent.blocks[b].text)
                lines.append((b, precedent.blocks[b], words))
                checks += found
        else:
            model = precedent.blocks[first] if blocks else Block(0, "")
            lines = [(-1, model, line) for line in (dec.text or "").split("\n")]
        comment = _joined(dec.note, checks)
        for k, (source, model, text) in enumerate(lines):
            like, numbered = _like_block(draft.blocks, anchor, model)
            # restored paragraphs sharing an anchor keep the precedent's order
            order = (anchor, source if source >= 0 else first, k)
            self.restored.append((order, BlockInsertion(
                anchor, text, like=like, numbered=numbered, comment=comment if k == 0 else None), source))

    def strike(self, dev: Deviation, dec: Decision, dprov: Provision) -> None:
        """A provision the draft added: delete its paragraphs, marks included, with its
        sub-provisions that have no counterpart in the precedent."""
        provs = _subtree(self.review.draft, dprov, keep=lambda p: p.id not in self.in_precedent)
        blocks = sorted({b for p in provs
                         for b in provision_blocks(self.review.draft, p, owners=self.d_owners)})
        if any(b in self.claimed or b in self.deleted_blocks for b in blocks):
            self.notes.append(f"{_who(self.review, dev)}: overlaps another decision; skipped")
            return
        for k, b in enumerate(blocks):
            self.deletions.append(BlockDeletion(b, comment=dec.note if k == 0 else None))
            self.deleted_blocks.add(b)

    def heading(self, dev: Deviation, dec: Decision, dprov: Provision, pprov: Provision | None) -> None:
        result = _heading_change(self.review, dec, dprov, pprov, self.to_draft_terms)
        who = _who(self.review, dev)
        if result is None:
            self.notes.append(f"{who}: the heading could not be located in the draft; skipped")
        elif isinstance(result, BlockDeletion):
            if result.block in self.deleted_blocks:
                return  # the same heading, already reverted by another decision
            if result.block in self.claimed:
                self.notes.append(f"{who}: overlaps another decision; skipped")
                return
            self.deletions.append(BlockDeletion(result.block, comment=dec.note))
            self.deleted_blocks.add(result.block)
        elif any((e.block, e.start, e.end, e.replacement) == (result.block, result.start, result.end,
                                                             result.replacement) for e in self.edits):
            return  # the same heading, already reverted by another decision
        else:
            self.add_edits([dataclasses.replace(result, comment=dec.note)], dev)

    def words(self, dev: Deviation, dec: Decision, dprov: Provision, pprov: Provision | None) -> None:
        """Words inside the provision: the span the review showed, reverted or amended; a note
        on accept is anchored on it."""
        review = self.review
        checks: list[str] = []
        span_edits = _span_edits(review, dev, dec, dprov, pprov, self.wording, checks)
        if span_edits is None:
            self.notes.append(f"{_who(review, dev)}: the review gives no place for this change; skipped")
            return
        if dec.action == "accept":
            self.note_on(dev, dec, dprov, span_edits[0] if span_edits else None)
            return
        planned: list[BlockEdit] = []
        comment = _joined(dec.note, checks)
        for se in span_edits:
            for b, s, e, text in to_blocks(dprov, se):
                planned.append(BlockEdit(b, s, e, text, comment=comment if not planned else None,
                                         paragraphs="\n" in text))
        if span_edits and not planned:
            self.notes.append(f"{_who(review, dev)}: its words could not be located in the draft; skipped")
            return
        self.add_edits(planned, dev)

    def note_on(self, dev: Deviation, dec: Decision, dprov: Provision, where: SpanEdit | None) -> None:
        ranges = block_ranges(dprov, where.start, where.end) if where is not None else []
        if not ranges:
            blocks = provision_blocks(self.review.draft, dprov, owners=self.d_owners)
            if blocks:  # a provision without words of its own (a heading): note on it
                ranges = [(blocks[0], 0, len(self.review.draft.blocks[blocks[0]].text))]
        if not ranges:
            self.notes.append(f"{_who(self.review, dev)}: its words could not be located in the draft; skipped")
            return
        b, s, e = ranges[0]
        if self.free(b, s, e):
            self.add_edits([BlockEdit(b, s, e, comment=dec.note, tracked=False)], dev)
        else:
            self.notes.append(f"{_who(self.review, dev)}: its note overlaps another decision; skipped")


def _draft_span(review: Review, dev: Deviation, dprov: Provision, pprov: Provision | None
                ) -> tuple[int, int] | None:
    """The span of the draft's text the decision applies to: the words the review showed
    (``draft_text_span``); for a review without it, the changed words, or the insertion point
    the pair's diff gives; the whole provision for an added one (amend)."""
    if dev.change == "add-provision":
        return 0, len(dprov.text)
    if dev.draft_text_span is not None:
        return dev.draft_text_span
    if dev.draft_span is not None:
        return dev.draft_span
    if dev.precedent_span is not None and pprov is not None:
        at = map_offset(edits_of_pair(review, dprov.id, pprov.id), dev.precedent_span[0])
        if at is not None:
            return at, at
    return None


def _joined(note: str | None, checks: Sequence[str]) -> str | None:
    """A decision's comment: the reviewer's note, then any cross-reference to check."""
    return "\n".join(([note] if note else []) + list(checks)) or None


def _span_edits(review: Review, dev: Deviation, dec: Decision, dprov: Provision,
                pprov: Provision | None, wording: Wording, checks: list[str]) -> list[SpanEdit] | None:
    """The edits of the draft provision's text that carry out *dec* (for accept: one empty
    edit marking where a note goes); None when the review gives no place for it.  Notes on
    cross-references in restored words that need checking are added to *checks*."""
    span = _draft_span(review, dev, dprov, pprov)
    if span is None:
        return [SpanEdit(0, len(dprov.text), "")] if dec.action == "accept" else None
    if dec.action == "accept":
        return [SpanEdit(span[0], span[1], "")]
    if dec.action == "amend":
        return amend_edits(dprov.text, span, dec.text or "")
    def precedent_words(text: str) -> str:
        words, found = wording.precedent(pprov, text)
        checks.extend(found)
        return words

    pair = edits_of_pair(review, dprov.id, pprov.id) if pprov is not None else ()
    if pprov is not None and pair and dev.precedent_text_span is not None and dev.draft_text_span is not None:
        ptext = pprov.text
        return revert_edits(pair, ptext, dprov.text, precedent=dev.precedent_text_span,
                            draft=dev.draft_text_span,
                            translate=lambda a, b: precedent_words(ptext[a:b]),
                            keep=lambda a, b: wording.draft(dprov, a, b))
    # A review without corresponding spans (built by hand): the precedent's changed words.
    if pprov is not None and dev.precedent_span is not None:
        words = pprov.text[dev.precedent_span[0]:dev.precedent_span[1]]
    else:
        words = "" if dev.change == "insert" else dev.precedent_text
    return [seam(dprov.text, span[0], span[1], precedent_words(words))]


def plan_counter_draft(review: Review, decisions: Sequence[Decision], *,
                       wording: Wording | None = None) -> CounterDraftPlan:
    """Block-level edits, deletions and insertions for *decisions* on the draft.

    * revert/amend of words: the span the review showed (``Deviation.draft_text_span``) is
      reverted hunk by hunk to the precedent's words, with the draft's names for mapped
      defined terms, or replaced by the reviewer's words (:mod:`.spans`); a heading change
      (``part == "heading"``) replaces the heading;
    * a provision the draft added: revert deletes its paragraphs (marks included), with its
      sub-provisions that have no counterpart in the precedent; amend replaces its words;
    * a provision the draft removed: revert inserts the precedent's paragraphs (with its
      sub-provisions the draft also lacks) after the draft counterpart of the provision that
      precedes it, with the paragraph properties of a neighbour at the same list level;
      amend inserts the reviewer's text there;
    * a note becomes a comment on the changed words (on the draft's words for accept);
    * *wording* says how precedent and draft words are written (default: precedent words
      with the draft's names for defined terms); :func:`counter_draft_bytes` passes one
      that also knows the counter-draft's numbering (:mod:`.references`);
    * renamed defined terms, moved provisions and formatting, punctuation or numbering
      differences are only accepted (:data:`core.decisions.ACCEPT_ONLY`); decisions that cannot
      be placed, or that overlap an earlier one, are skipped and reported in ``notes``.
    """
    planner = _Planner(review, wording or Wording(review))
    for dec in decisions:
        planner.add(dec)
    return planner.plan()


def counter_draft_bytes(review: Review, decisions: Sequence[Decision], *, draft_path: str,
                        author: str, date: _dt.datetime | None = None) -> tuple[bytes, tuple[str, ...]]:
    """The counter-draft as bytes, and notes on decisions that could not be written.

    Written in two passes when the decisions change paragraphs (:mod:`.references`): the
    first pass, read back with every change accepted, gives the counter-draft's numbering;
    the second writes the decisions with restored words numbered accordingly, plus a tracked
    change with a comment for every typed cross-reference that would otherwise point
    elsewhere."""
    from ..readers import identify

    fmt = identify(draft_path)
    if fmt.name != "docx":
        return _counter_draft_on_recovered_text(review, decisions, fmt_noun=fmt.noun,
                                                author=author, date=date)
    plan = plan_counter_draft(review, decisions)
    data = _tracked_copy(review, plan, draft_path=draft_path, author=author, date=date)
    notes = list(plan.notes)
    if plan.insertions or plan.deletions or any(e.tracked for e in plan.edits):
        try:
            accepted = accepted_view(data)
        except CounterdraftError:  # e.g. nothing left once every change is accepted
            accepted = None
            notes.append("the cross-references could not be checked: the counter-draft has no "
                         "text once every change is accepted")
        if accepted is not None:
            numbering = counter_numbering(review, plan, accepted)
            second = plan_counter_draft(review, decisions, wording=Wording(review, numbering))
            updates = reference_updates(review, numbering, second.edits, {d.block for d in second.deletions})
            second = dataclasses.replace(second, edits=second.edits + tuple(updates))
            if second != plan:
                data = _tracked_copy(review, second, draft_path=draft_path, author=author, date=date)
    left_out = unsafe_part_names(draft_path)
    if left_out:
        notes.append(f"{len(left_out)} zip member(s) of the draft with names no .docx part can have "
                     f"(e.g. {left_out[0]!r}) were left out of the counter-draft")
    own = [w for w in review.draft.warnings if "tracked change" in w]
    if own:
        notes.append(f"the draft already holds tracked changes of its own ({own[0]}); rejecting "
                     "all changes in a word processor rejects those too")
    return data, tuple(notes)


def recovered_text_note(fmt_noun: str) -> str:
    """What the export says when the draft was not a .docx."""
    return (f"the draft is {fmt_noun}, not a .docx: the counter-draft is a new .docx written "
            "from the draft's text as Counterdraft read it (paragraphs, number labels and "
            "headings as recovered), with the decisions as tracked changes; it does not keep "
            "the draft's layout, and its numbers are fixed text that does not renumber")


def _counter_draft_on_recovered_text(review: Review, decisions: Sequence[Decision], *, fmt_noun: str,
                                     author: str, date: _dt.datetime | None) -> tuple[bytes, tuple[str, ...]]:
    """The counter-draft of a draft that is not a .docx: a .docx made from the draft's blocks
    (:func:`core.docx.compose.docx_from_blocks`, which reads back as the same blocks), with
    the decisions written on it as on a counterparty's .docx."""
    import tempfile

    from ..docx.compose import docx_from_blocks

    with tempfile.TemporaryDirectory(prefix="counterdraft-") as work:
        base = Path(work) / "recovered-draft.docx"
        base.write_bytes(docx_from_blocks(review.draft.blocks))
        recovered = dataclasses.replace(review.draft, warnings=())
        data, notes = counter_draft_bytes(dataclasses.replace(review, draft=recovered), decisions,
                                          draft_path=str(base), author=author, date=date)
    return data, (recovered_text_note(fmt_noun), *notes)


def _tracked_copy(review: Review, plan: CounterDraftPlan, *, draft_path: str, author: str,
                  date: _dt.datetime | None) -> bytes:
    from ..docx.revisions import RevisionStamp
    from ..docx.tracked import write_tracked_copy

    return write_tracked_copy(
        draft_path, edits=plan.edits, deletions=plan.deletions, insertions=plan.insertions,
        stamp=RevisionStamp(author=author, date=stamp_date(date)), properties={CAUTION_PROPERTY: CAUTION},
        expected_blocks=len(review.draft.blocks),
        block_texts={e.block: review.draft.blocks[e.block].text for e in plan.edits},
    )


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


