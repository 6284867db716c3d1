"""The three outputs of a review: the counter-draft, the comparison redline and the issues list.

* **Counter-draft** (:func:`write_counter_draft`): the counterparty's own .docx with every
  *revert* and *amend* decision written as tracked changes and every note as a comment on the
  changed words.  Nothing else in the file changes (see :mod:`core.docx.tracked`).
* **Comparison redline** (:func:`write_redline`): a new .docx showing the precedent-to-draft
  comparison as tracked changes -- insertions, deletions and moved provisions as
  ``w:moveFrom``/``w:moveTo`` -- after a short table of the ranked substantive deviations.
  Accepting all its changes gives the draft's paragraphs, rejecting all gives the precedent's.
* **Issues list** (:func:`write_issues_list`): the negotiating table -- clause, the draft's
  position, the house position, severity, how common in the precedent set (when a library
  was used), decision, note -- as a Word table (.docx), a self-contained printable page
  (.html) or CSV (.csv), by the output's suffix.  Each position quotes the sentence of that
  side's provision holding the change (bounded by :data:`POSITION_MAX_WORDS`) with the
  changed words in bold (in the CSV between :data:`CSV_MARK_OPEN` and
  :data:`CSV_MARK_CLOSE`, the exact words in columns of their own).  By default it lists the
  substantive deviations, then the renamed defined terms as a short group for information
  (:data:`ISSUES_DEFAULT_INCLUDE`).

Every output carries :data:`core.CAUTION` and is written atomically; an output path equal
to one of the inputs is refused.  Where the caution goes in the counter-draft is explained
at :data:`CAUTION_PROPERTY`.

Cost: the counter-draft is linear in the draft's XML; the redline is one
``difflib.SequenceMatcher`` over the paragraph keys (O(B^2) worst case for B paragraphs, near
linear for similar documents) plus, per matched paragraph pair, its share of the review's word
diff (``Pair.edits``: the outputs never diff the texts again); the issues list is linear in
the deviations times the length of their provisions' texts (each position scans its
provision's sentences once).  ``benchmarks/bench_export.py`` measures them.
"""

from __future__ import annotations

import bisect
import csv
import dataclasses
import datetime as _dt
import difflib
import getpass
import html
import io
import os
import re
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from pathlib import Path

from rapidfuzz.distance import Indel

from . import CAUTION, __version__
from .decisions import Decision
from .errors import CounterdraftError
from .fileio import atomic_write_bytes, atomic_write_text, refuse_overwrite_of_inputs
from .labels import clause_label, find_provision
from .model import CATEGORIES, Block, Deviation, Document, Edit, Provision, Review, TermMapping

__all__ = [
    "CAUTION_PROPERTY",
    "CSV_MARK_CLOSE",
    "CSV_MARK_OPEN",
    "ISSUES_DEFAULT_INCLUDE",
    "ISSUE_COLUMNS",
    "ISSUE_CSV_COLUMNS",
    "ISSUE_WIDTHS_CM",
    "POSITION_LEAD_WORDS",
    "POSITION_MAX_WORDS",
    "REDLINE_BODY_HEADING",
    "REDLINE_END",
    "REDLINE_TABLE_WIDTHS_CM",
    "CounterDraftPlan",
    "Excerpt",
    "IssueRow",
    "block_owners",
    "counter_draft_bytes",
    "default_author",
    "issue_rows",
    "issues_list_csv",
    "issues_list_docx",
    "issues_list_html",
    "plan_counter_draft",
    "provision_blocks",
    "redline_body",
    "redline_bytes",
    "write_counter_draft",
    "write_issues_list",
    "write_redline",
]

#: Name of the custom file property (ECMA-376 Part 1 §22.3) that carries the caution in the
#: counter-draft.  The counter-draft goes back to the other side on the counterparty's own
#: paper: its body must hold the agreed words and our tracked changes only, and a comment
#: would travel to the other side and would also change an undecided paragraph.  So the
#: caution sits in the file's properties (File > Properties in a word processor), where the
#: reviewer's copy keeps it without touching the text; the command line and the desktop app
#: show the caution whenever they write the file.  The redline and the issues list are
#: internal documents and carry the caution as their first paragraph.
CAUTION_PROPERTY = "Counterdraft caution"

#: Heading that opens the comparison body of the redline (after the caution and the table).
REDLINE_BODY_HEADING = "Comparison: precedent to draft, as tracked changes"

#: Closing line of the redline, after the comparison body.
REDLINE_END = "End of comparison."

#: Rows shown in the redline's opening table; the issues list has them all.  A reviewer scans
#: a page or two of top issues before reading the marked-up text (common practice, no source).
REDLINE_TABLE_MAX = 30

#: Two unmatched paragraphs in the same gap of the comparison are shown as one paragraph
#: with word changes when their texts are at least this similar (Indel similarity, as
#: difflib's ratio: 2 x matching characters / total characters); below it
#: they are shown as a deleted and an inserted paragraph.  0.5 means at least half of the
#: characters agree -- below that a word-level mark-up is harder to read than the two
#: versions (common practice, no source).
PAIR_PARAGRAPH_MIN_RATIO = 0.5
#: Largest gap (precedent paragraphs x draft paragraphs) in which unmatched paragraphs are
#: paired by similarity (the pairing is quadratic); larger gaps are shown as deletions
#: followed by insertions.
PAIR_GAP_MAX_CELLS = 2500

#: Relative column widths of the redline's opening table, in centimetres of the upright A4
#: text width (16.0 cm; scaled exactly to it).  The narrow columns hold their header word on
#: one line in bold 9 pt in a wide serif (DejaVu Serif, LibreOffice's stand-in when Liberation
#: Serif is missing: "Rank" 0.92 cm, "Severity" 1.44 cm, measured in LibreOffice's PDF of the
#: table with pdftotext -bbox) plus the cell margins (2 x 0.19 cm) and some slack; the
#: summary gets the rest.
REDLINE_TABLE_WIDTHS_CM = (1.5, 2.0, 3.8, 8.7)

ISSUE_COLUMNS = ("Ref", "Clause", "Draft position", "House position", "Severity",
                 "How common in the precedent set", "Decision", "Note")

# --------------------------------------------------------------------------------------
# Small shared helpers
# --------------------------------------------------------------------------------------


def default_author() -> str:
    """The reviewer's name for ``w:author``: $COUNTERDRAFT_AUTHOR, else the login name."""
    name = os.environ.get("COUNTERDRAFT_AUTHOR", "").strip()
    if name:
        return name
    try:
        return getpass.getuser() or "Counterdraft"
    except (KeyError, OSError):  # no user database entry (containers)
        return "Counterdraft"


def _stamp_date(when: _dt.datetime | None) -> str:
    when = when or _dt.datetime.now(_dt.timezone.utc)
    if when.tzinfo is not None:
        when = when.astimezone(_dt.timezone.utc)
    return when.replace(microsecond=0, tzinfo=None).isoformat() + "Z"


def _check_output(out: str | os.PathLike[str], suffixes: Iterable[str], inputs: Iterable[str]) -> Path:
    path = Path(out)
    if path.suffix.lower() not in tuple(suffixes):
        raise CounterdraftError(f"the output must end in {' or '.join(suffixes)}", path=str(out))
    refuse_overwrite_of_inputs(path, *[i for i in inputs if i])
    return path


def _norm_heading(text: str) -> str:
    return " ".join(text.split()).strip().rstrip(".:").casefold()


#: Longest literal label typed before a heading on its own line ("12.", "Article IV",
#: "Schedule 2 -"); longer prefixes mean the line says more than the heading.
_HEADING_PREFIX_MAX = 14


def _is_heading_line(text: str, want: str) -> bool:
    got = _norm_heading(text)
    if got == want:
        return True
    return got.endswith(" " + want) and len(got) - len(want) <= _HEADING_PREFIX_MAX


def block_owners(doc: Document) -> dict[int, tuple[str, int]]:
    """block -> (provision id, part): part -1 is a standalone heading line of the provision,
    0, 1, ... its text blocks in order.

    Text blocks come from the segments.  A block holding only a provision's heading is owned
    by it: the block right before its first text block, or, for a provision with no text of
    its own ("7. PAYMENT" above 7.1), the first unowned block after the previous
    provision's blocks whose text is the heading.  O(blocks + provisions).
    """
    owners: dict[int, tuple[str, int]] = {}
    own_blocks: dict[str, list[int]] = {}
    for prov in doc.provisions:
        seen: list[int] = []
        for s in prov.segments:
            if s.block not in seen:
                seen.append(s.block)
        for k, b in enumerate(seen):
            if b not in owners:
                owners[b] = (prov.id, k)
                own_blocks.setdefault(prov.id, []).append(b)
    cursor = 0
    for prov in doc.provisions:
        blocks = sorted(own_blocks.get(prov.id, []))
        if prov.heading:
            want = _norm_heading(prov.heading)
            if blocks:
                b = blocks[0] - 1
                if b >= 0 and b not in owners and _is_heading_line(doc.blocks[b].text, want):
                    owners[b] = (prov.id, -1)
            else:
                b = cursor
                while b < len(doc.blocks) and b not in owners:
                    if _is_heading_line(doc.blocks[b].text, want):
                        owners[b] = (prov.id, -1)
                        blocks = [b]
                        break
                    b += 1
        if blocks:
            cursor = max(blocks) + 1
    return owners


def provision_blocks(doc: Document, prov: Provision, *,
                     owners: dict[int, tuple[str, int]] | None = None) -> list[int]:
    """The blocks a provision occupies, in order: a standalone heading line (if any), then
    the blocks of its segments."""
    table = owners if owners is not None else block_owners(doc)
    return sorted(b for b, (pid, _) in table.items() if pid == prov.id)


def _block_ranges(prov: Provision, start: int, end: int) -> list[tuple[int, int, int]]:
    """(block, start, end) pieces of the provision-text range ``start:end``; an empty range
    gives one empty piece at its position."""
    out: list[tuple[int, int, int]] = []
    pos = 0
    for s in prov.segments:
        length = s.end - s.start
        seg_start, seg_end = pos, pos + length
        if start == end:
            if seg_start <= start <= seg_end:
                return [(s.block, s.start + start - seg_start, s.start + start - seg_start)]
        else:
            a, b = max(start, seg_start), min(end, seg_end)
            if a < b:
                out.append((s.block, s.start + a - seg_start, s.start + b - seg_start))
        pos = seg_end + 1  # the "\n" joining segments
    return out


def _pair_edits(review: Review, draft_pid: str, precedent_pid: str) -> tuple[Edit, ...]:
    """The review's word diff of an aligned pair (:attr:`core.model.Pair.edits`; ``()`` when
    the two provisions are not aligned or the review has no diff for them)."""
    for pair in review.pairs:
        if pair.draft == draft_pid and pair.precedent == precedent_pid:
            return pair.edits
    return ()


def _map_offset(edits: Sequence[Edit], offset: int) -> int | None:
    """Where character *offset* of a pair's precedent text falls in its draft text, by the
    pair's word diff (*edits*, which tile both texts): inside equal text it maps one to one;
    inside changed text it maps to the start of the other side's change.  None without a
    diff."""
    if not edits:
        return None
    for e in edits:
        if e.p1 <= offset < e.p2 or (offset == e.p2 == edits[-1].p2 and e.p1 < e.p2):
            if e.tag == "equal":
                return e.d1 + (offset - e.p1)
            return e.d1
        if offset == e.p1 == e.p2 and e.tag == "insert":
            continue  # words inserted at this very place belong before it
    return edits[-1].d2


def _term_translator(term_map: Sequence[TermMapping]):
    """Replace the precedent's names of mapped defined terms by the draft's, keeping plural
    and possessive endings, so restored house wording uses the draft's own defined terms."""
    pairs = sorted(((m.precedent, m.draft) for m in term_map if m.precedent and m.draft),
                   key=lambda x: -len(x[0]))
    if not pairs:
        return lambda text: text

    def plural(name: str) -> str:
        if name.endswith("y") and len(name) > 1 and name[-2] not in "aeiou":
            return name[:-1] + "ies"
        return name + ("es" if name.endswith(("s", "x", "ch", "sh")) else "s")

    forms: dict[str, str] = {}
    for prec, draft in pairs:
        forms.setdefault(plural(prec), plural(draft))
        forms.setdefault(prec, draft)
    alternatives = sorted(forms, key=len, reverse=True)
    pattern = re.compile(r"(?<!\w)(" + "|".join(re.escape(a) for a in alternatives) + r")(?!\w)")
    return lambda text: pattern.sub(lambda m: forms[m.group(1)], text)


# --------------------------------------------------------------------------------------
# Counter-draft
# --------------------------------------------------------------------------------------


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
    from .docx.tracked import BlockDeletion, BlockEdit

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
    from .docx.tracked import BlockDeletion, BlockEdit, BlockInsertion

    to_draft_terms = _term_translator(review.term_map)
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
            notes.append(f"{dev.id} ({where}): a renamed term or a moved provision is not "
                         "written as a tracked change; skipped")
            continue

        # -- a provision the draft left out -------------------------------------------
        if dev.change == "remove-provision" or (dprov is None and pprov is not None):
            if pprov is None:
                notes.append(f"{dev.id} ({where}): provision not found; skipped")
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
            notes.append(f"{dev.id} ({where}): no draft provision to change; skipped")
            continue

        # -- a provision the draft added ------------------------------------------------
        if dev.change == "add-provision" and dec.action == "revert":
            provs = _subtree(draft, dprov, keep=lambda p: p.id not in in_precedent)
            blocks = sorted({b for p in provs for b in provision_blocks(draft, p, owners=d_owners)})
            if any(b in claimed or b in deleted_blocks for b in blocks):
                notes.append(f"{dev.id} ({where}): overlaps another decision; skipped")
                continue
            for k, b in enumerate(blocks):
                deletions.append(BlockDeletion(b, comment=note if k == 0 else None))
                deleted_blocks.add(b)
            continue

        # -- the heading -------------------------------------------------------------------
        if dev.part == "heading" and dev.change in _WORD_CHANGES:
            result = _heading_change(review, dev, dec, dprov, pprov, to_draft_terms)
            if result is None:
                notes.append(f"{dev.id} ({where}): the heading could not be located in the draft; skipped")
            elif isinstance(result, BlockDeletion):
                if result.block in deleted_blocks:
                    continue  # the same heading, already reverted by another decision
                if result.block in claimed:
                    notes.append(f"{dev.id} ({where}): overlaps another decision; skipped")
                    continue
                deletions.append(BlockDeletion(result.block, comment=note))
                deleted_blocks.add(result.block)
            elif result in seen_heading_edits:
                continue  # the same heading, already reverted by another decision
            elif not free(result.block, result.start, result.end):
                notes.append(f"{dev.id} ({where}): overlaps another decision; skipped")
            else:
                seen_heading_edits.add(result)
                add_edit(dataclasses.replace(result, comment=note))
            continue

        # -- words inside the provision ------------------------------------------------
        if dev.change == "add-provision":
            d1, d2 = 0, len(dprov.text)  # amend: the reviewer's words replace the provision's
        elif dev.draft_span is not None:
            d1, d2 = dev.draft_span  # empty at the insertion point for a delete
        elif (dev.precedent_span is not None and pprov is not None and (at := _map_offset(
                _pair_edits(review, dprov.id, pprov.id), dev.precedent_span[0])) is not None):
            d1 = d2 = at  # a deviation made without a draft span: place it by the pair's diff
        elif dec.action == "accept":
            d1, d2 = 0, len(dprov.text)  # a note on the provision as a whole
        else:
            notes.append(f"{dev.id} ({where}): the review gives no place for this change; skipped")
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
        ranges = _block_ranges(dprov, d1, d2)
        if not ranges and dec.action == "accept":
            blocks = provision_blocks(draft, dprov, owners=d_owners)
            if blocks:  # a provision without words of its own (a heading): note on it
                ranges = [(blocks[0], 0, len(draft.blocks[blocks[0]].text))]
        if not ranges:
            notes.append(f"{dev.id} ({where}): its words could not be located in the draft; skipped")
            continue
        if replacement is None:
            b, s, e = ranges[0]
            if free(b, s, e):
                add_edit(BlockEdit(b, s, e, comment=note, tracked=False))
            else:
                notes.append(f"{dev.id} ({where}): its note overlaps another decision; skipped")
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
            notes.append(f"{dev.id} ({where}): overlaps another decision; skipped")
            continue
        for x in planned:
            add_edit(x)
    insertions = [ins for _, ins in sorted(restored, key=lambda x: x[0])]
    return CounterDraftPlan(tuple(edits), tuple(deletions), tuple(insertions), tuple(notes))


def counter_draft_bytes(review: Review, decisions: Sequence[Decision], *, draft_path: str,
                        author: str, date: _dt.datetime | None = None) -> tuple[bytes, tuple[str, ...]]:
    """The counter-draft as bytes, and notes on decisions that could not be written."""
    from .docx.revisions import RevisionStamp
    from .docx.tracked import write_tracked_copy

    if Path(draft_path).suffix.lower() != ".docx":
        raise CounterdraftError("the counter-draft is written on the counterparty's own .docx; "
                                "this draft is not a .docx", path=draft_path)
    plan = plan_counter_draft(review, decisions)
    stamp = RevisionStamp(author=author, date=_stamp_date(date))
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
    path = _check_output(out, (".docx",), [draft_path, review.draft.source, review.precedent.source, *inputs])
    data, notes = counter_draft_bytes(review, decisions, draft_path=draft_path,
                                      author=author or default_author(), date=date)
    atomic_write_bytes(path, data)
    return notes


# --------------------------------------------------------------------------------------
# Comparison redline
# --------------------------------------------------------------------------------------


def _line(block: Block) -> str:
    """A block as the redline shows it: its auto-number label, a tab, its text."""
    return f"{block.label}\t{block.text}" if block.label else block.text


#: One piece of a redline paragraph: (unchanged?, the precedent's text, the draft's text);
#: an unchanged piece has the same text on both sides.
_Piece = tuple[bool, str, str]


def _affix_pieces(a: str, b: str) -> list[_Piece]:
    """*a* turned into *b* as an unchanged common beginning and end around one changed middle,
    never cutting a word.  For the parts of a paragraph the review does not diff (number
    labels, run-in headings, heading lines, paragraphs outside any aligned pair): O(len)."""
    if a == b:
        return [(True, a, b)] if a else []
    la, lb = len(a), len(b)
    n = min(la, lb)
    c1 = 0
    while c1 < n and a[c1] == b[c1]:
        c1 += 1

    def inside_word(x: str, y: str, k: int) -> bool:
        return k > 0 and x[k - 1].isalnum() and ((k < len(x) and x[k].isalnum()) or (k < len(y) and y[k].isalnum()))

    while inside_word(a, b, c1):
        c1 -= 1
    c2 = 0
    while c2 < n - c1 and a[la - 1 - c2] == b[lb - 1 - c2]:
        c2 += 1

    def cuts_word(k2: int) -> bool:
        sa, sb = la - k2, lb - k2
        return k2 > 0 and a[sa].isalnum() and ((sa > 0 and a[sa - 1].isalnum()) or (sb > 0 and b[sb - 1].isalnum()))

    while cuts_word(c2):
        c2 -= 1
    out: list[_Piece] = []
    if c1:
        out.append((True, a[:c1], b[:c1]))
    out.append((False, a[c1:la - c2], b[c1:lb - c2]))
    if c2:
        out.append((True, a[la - c2:], b[lb - c2:]))
    return out


def _clipped_pieces(edits: Sequence[Edit], ptext: str, dtext: str, p_range: tuple[int, int],
                    d_range: tuple[int, int]) -> list[_Piece]:
    """A pair's word diff (*edits*, tiling *ptext* and *dtext*) restricted to one stretch of
    each text (one paragraph of each provision).  The pieces tile both stretches exactly; an
    equal hunk stays unchanged where its two sides line up inside the stretches, and what
    lies outside that is shown deleted or inserted.  O(hunks)."""
    a0, a1 = p_range
    b0, b1 = d_range
    out: list[_Piece] = []

    def changed(pa: int, pb: int, da: int, db: int) -> None:
        if pa < pb or da < db:
            out.append((False, ptext[pa:pb] if pa < pb else "", dtext[da:db] if da < db else ""))

    for e in edits:
        pa, pb = max(e.p1, a0), min(e.p2, a1)
        da, db = max(e.d1, b0), min(e.d2, b1)
        pb, db = max(pa, pb), max(da, db)
        if e.tag == "equal":
            lo, hi = max(pa - e.p1, da - e.d1), min(pb - e.p1, db - e.d1)
            if lo < hi:
                changed(pa, e.p1 + lo, da, e.d1 + lo)
                out.append((True, ptext[e.p1 + lo:e.p1 + hi], dtext[e.d1 + lo:e.d1 + hi]))
                changed(e.p1 + hi, pb, e.d1 + hi, db)
                continue
        changed(pa, pb, da, db)
    return out


def _piece_runs(pieces: Sequence[_Piece], *, moved: bool = False):
    """Runs showing the pieces: unchanged text plain (or moveTo when *moved*), the
    precedent's side of a changed piece ``del``, the draft's ``ins``.  In a moved paragraph
    deleted words are left out (they show in the moveFrom copy)."""
    from .docx.writer import Run

    runs: list[Run] = []
    for same, a, b in pieces:
        if same:
            runs.append(Run(b, "moveTo" if moved else ""))
            continue
        if a and not moved:
            runs.append(Run(a, "del"))
        if b:
            runs.append(Run(b, "ins"))
    merged: list[Run] = []
    for r in runs:
        if not r.text:
            continue
        if merged and merged[-1].mark == r.mark:
            merged[-1] = Run(merged[-1].text + r.text, r.mark)
        else:
            merged.append(r)
    return tuple(merged)


def _segment_in_block(prov: Provision, block: int) -> tuple[int, int, int] | None:
    """(offset in the provision's text, start, end in the block's text) of the provision's one
    segment in *block*; None when it has none there or several."""
    found = None
    pos = 0
    for seg in prov.segments:
        if seg.block == block:
            if found is not None:
                return None
            found = (pos, seg.start, seg.end)
        pos += seg.end - seg.start + 1
    return found


def _pair_gap(pa: Sequence[int], da: Sequence[int], plines: Sequence[str], dlines: Sequence[str]
              ) -> list[tuple[int | None, int | None]]:
    """Order-preserving pairing of unmatched paragraphs of one gap by similarity (a small
    dynamic programme over O(len(pa) x len(da)) similarities: rapidfuzz's Indel normalised
    similarity, the same measure as difflib's ``ratio``); unpaired ones get None."""
    n, m = len(pa), len(da)
    if n == 0 or m == 0 or n * m > PAIR_GAP_MAX_CELLS:
        return [(i, None) for i in pa] + [(None, j) for j in da]
    sim = [[0.0] * m for _ in range(n)]
    for x in range(n):
        for y in range(m):
            r = Indel.normalized_similarity(plines[pa[x]], dlines[da[y]])
            sim[x][y] = r if r >= PAIR_PARAGRAPH_MIN_RATIO else 0.0
    best = [[0.0] * (m + 1) for _ in range(n + 1)]
    for x in range(n - 1, -1, -1):
        for y in range(m - 1, -1, -1):
            best[x][y] = max(best[x + 1][y], best[x][y + 1],
                             best[x + 1][y + 1] + sim[x][y] if sim[x][y] else 0.0)
    out: list[tuple[int | None, int | None]] = []
    x = y = 0
    while x < n and y < m:
        if sim[x][y] and best[x][y] == best[x + 1][y + 1] + sim[x][y]:
            out.append((pa[x], da[y]))
            x += 1
            y += 1
        elif best[x][y] == best[x + 1][y]:
            out.append((pa[x], None))
            x += 1
        else:
            out.append((None, da[y]))
            y += 1
    out.extend((pa[i], None) for i in range(x, n))
    out.extend((None, da[j]) for j in range(y, m))
    return out


def redline_body(review: Review):
    """The comparison paragraphs (``core.docx.writer.Para``) of precedent -> draft.

    Paragraph keys: a precedent paragraph is keyed by its provision and its place in it; a
    draft paragraph by the precedent provision it is aligned with (statuses same/changed),
    so aligned provisions match whatever their numbers; paragraphs outside any provision are
    keyed by their text.  ``difflib.SequenceMatcher`` over the two key sequences gives the
    matched paragraphs (shown with word changes), and the gaps (deleted and inserted
    paragraphs, paired by similarity when close).  Paragraphs of moved provisions never
    match in place: they are shown as moveFrom at the precedent's position and moveTo at the
    draft's, named per aligned pair.

    Word changes are the review's own (``Pair.edits``, no second diff): a paragraph of an
    aligned pair shows the pair's hunks restricted to its stretch of each provision's text;
    what the review does not diff -- number labels, run-in headings, heading lines and
    paragraphs outside any aligned pair -- shows its common beginning and end unchanged and
    the middle as changed (:func:`_affix_pieces`).
    """
    from .docx.writer import Para, Run

    pdoc, ddoc = review.precedent, review.draft
    plines = [_line(b) for b in pdoc.blocks]
    dlines = [_line(b) for b in ddoc.blocks]
    powners, downers = block_owners(pdoc), block_owners(ddoc)
    one_to_one: dict[str, str] = {}
    moved: dict[str, str] = {}  # draft pid -> precedent pid
    counts_d: dict[str, int] = {}
    counts_p: dict[str, int] = {}
    for pair in review.pairs:
        if pair.draft and pair.precedent:
            counts_d[pair.draft] = counts_d.get(pair.draft, 0) + 1
            counts_p[pair.precedent] = counts_p.get(pair.precedent, 0) + 1
    for pair in review.pairs:
        if not (pair.draft and pair.precedent):
            continue
        if counts_d[pair.draft] != 1 or counts_p[pair.precedent] != 1:
            continue  # split or merged: compared paragraph by paragraph in the gap
        if pair.status == "moved":
            moved[pair.draft] = pair.precedent
        else:
            one_to_one[pair.draft] = pair.precedent
    moved_p = {v: k for k, v in moved.items()}
    move_names = {ppid: f"cdMove{n}" for n, ppid in enumerate(sorted(moved_p, key=lambda x: (len(x), x)), 1)}

    def pkey(i: int) -> tuple:
        own = powners.get(i)
        if own is None:
            return ("text", plines[i].split("\t", 1)[-1].strip().casefold())
        if own[0] in moved_p:
            return ("moved-from", own)
        return ("prov", own)

    def dkey(j: int) -> tuple:
        own = downers.get(j)
        if own is None:
            return ("text", dlines[j].split("\t", 1)[-1].strip().casefold())
        if own[0] in moved:
            return ("moved-to", own)
        if own[0] in one_to_one:
            return ("prov", (one_to_one[own[0]], own[1]))
        return ("draft-only", own)

    pprovs = {p.id: p for p in pdoc.provisions}
    dprovs = {p.id: p for p in ddoc.provisions}
    pair_edits = {(pair.draft, pair.precedent): pair.edits for pair in review.pairs
                  if pair.draft and pair.precedent and pair.edits}

    def pieces(i: int, j: int) -> list[_Piece]:
        """Precedent paragraph *i* turned into draft paragraph *j*."""
        pl, dl = plines[i], dlines[j]
        po, do = powners.get(i), downers.get(j)
        edits = pair_edits.get((do[0], po[0])) if po is not None and do is not None else None
        if edits and po[1] >= 0 and do[1] >= 0:
            pprov, dprov = pprovs[po[0]], dprovs[do[0]]
            ps, ds = _segment_in_block(pprov, i), _segment_in_block(dprov, j)
            if ps is not None and ds is not None:
                # the line is: label, tab, the block's text; the segment sits inside the text
                pb, db = len(pl) - len(pdoc.blocks[i].text), len(dl) - len(ddoc.blocks[j].text)
                p_off, p_start, p_end = ps
                d_off, d_start, d_end = ds
                return (_affix_pieces(pl[:pb + p_start], dl[:db + d_start])
                        + _clipped_pieces(edits, pprov.text, dprov.text,
                                          (p_off, p_off + p_end - p_start),
                                          (d_off, d_off + d_end - d_start))
                        + _affix_pieces(pl[pb + p_end:], dl[db + d_end:]))
        return _affix_pieces(pl, dl)

    pkeys = [pkey(i) for i in range(len(plines))]
    dkeys = [dkey(j) for j in range(len(dlines))]
    # Precedent text of each moved draft paragraph, for the word changes inside the move.
    moved_source: dict[int, int] = {}
    p_index = {powners[i]: i for i in powners}
    for j, own in downers.items():
        if own[0] in moved:
            src = p_index.get((moved[own[0]], own[1]))
            if src is not None:
                moved_source[j] = src
    moved_targets = set(moved_source.values())

    out: list[Para] = []

    def same(i: int, j: int) -> None:
        if (not plines[i] or not dlines[j]) and plines[i] != dlines[j]:
            # An empty paragraph against a full one: a deleted and an inserted paragraph
            # read better, and a paragraph whose words are all inserted (or all deleted)
            # behind an untracked mark leaves an empty paragraph behind.
            deleted(i)
            inserted(j)
            return
        if plines[i] == dlines[j]:
            if dlines[j]:
                out.append(Para((Run(dlines[j]),)))
            else:
                out.append(Para(()))
        else:
            out.append(Para(_piece_runs(pieces(i, j))))

    def deleted(i: int) -> None:
        own = powners.get(i)
        if own is not None and own[0] in moved_p and i in moved_targets:
            out.append(Para((Run(plines[i], "moveFrom"),) if plines[i] else (), mark="moveFrom",
                            move=move_names[own[0]]))
        else:
            out.append(Para((Run(plines[i], "del"),) if plines[i] else (), mark="del"))

    def inserted(j: int) -> None:
        own = downers.get(j)
        src = moved_source.get(j)
        if own is not None and own[0] in moved and src is not None:
            runs = _piece_runs(pieces(src, j), moved=True)
            out.append(Para(runs, mark="moveTo", move=move_names[moved[own[0]]]))
        else:
            out.append(Para((Run(dlines[j], "ins"),) if dlines[j] else (), mark="ins"))

    sm = difflib.SequenceMatcher(None, pkeys, dkeys, autojunk=False)
    for tag, i1, i2, j1, j2 in sm.get_opcodes():
        if tag == "equal":
            for i, j in zip(range(i1, i2), range(j1, j2)):
                same(i, j)
            continue
        pa = [i for i in range(i1, i2) if pkeys[i][0] != "moved-from"]
        da = [j for j in range(j1, j2) if dkeys[j][0] != "moved-to"]
        moved_from = [i for i in range(i1, i2) if pkeys[i][0] == "moved-from"]
        moved_to = [j for j in range(j1, j2) if dkeys[j][0] == "moved-to"]
        # The pairing is monotone in both documents; moved paragraphs are slotted in at
        # their own document's position, so accepting gives the draft's order and
        # rejecting the precedent's.
        for pi, dj in _pair_gap(pa, da, plines, dlines):
            if pi is not None:
                while moved_from and moved_from[0] < pi:
                    deleted(moved_from.pop(0))
            if dj is not None:
                while moved_to and moved_to[0] < dj:
                    inserted(moved_to.pop(0))
            if pi is not None and dj is not None:
                same(pi, dj)
            elif pi is not None:
                deleted(pi)
            elif dj is not None:
                inserted(dj)
        for i in moved_from:
            deleted(i)
        for j in moved_to:
            inserted(j)
    return out


def _severity_table(review: Review):
    from .docx.writer import Table

    subs = [d for d in sorted(review.deviations, key=lambda d: d.rank) if d.category == "substantive"]
    shown = subs[:REDLINE_TABLE_MAX]
    rows = tuple(
        (str(d.rank), str(d.severity), clause_label(review, d) or "-", _summary(d)) for d in shown
    )
    return (Table(("Rank", "Severity", "Clause", "Deviation"), rows, widths=REDLINE_TABLE_WIDTHS_CM),
            len(subs) - len(shown))


def _summary(d: Deviation) -> str:
    if d.reasons:
        return "; ".join(d.reasons)
    if d.change == "add-provision":
        return "provision added by the draft"
    if d.change == "remove-provision":
        return "provision of the precedent left out of the draft"
    return f"\u201c{_shorten(d.precedent_text)}\u201d \u2192 \u201c{_shorten(d.draft_text)}\u201d"


def _shorten(text: str, limit: int = 120) -> str:
    text = " ".join(text.split())
    return text if len(text) <= limit else text[: limit - 1] + "\u2026"


def redline_bytes(review: Review, *, author: str, date: _dt.datetime | None = None) -> bytes:
    from .docx.revisions import RevisionStamp
    from .docx.writer import Para, Run, build_docx

    stamp = RevisionStamp(author=author, date=_stamp_date(date))
    table, more = _severity_table(review)
    pname = Path(review.precedent.source).name
    dname = Path(review.draft.source).name
    body: list = [
        Para((Run("Comparison redline"),), style="Title"),
        Para((Run(f"Precedent: {pname}. Draft: {dname}. Written by Counterdraft {__version__} "
                  f"on {stamp.date[:10]}."),)),
        Para((Run(CAUTION),), style="Caution"),
        Para((Run("Ranked substantive deviations"),), style="Heading1"),
    ]
    if table.rows:
        body.append(table)
        if more:
            body.append(Para((Run(f"{more} further substantive deviations are in the issues list."),)))
    else:
        body.append(Para((Run("No substantive deviation was found."),)))
    body.append(Para((Run(REDLINE_BODY_HEADING),), style="Heading1"))
    body.extend(redline_body(review))
    # A plain closing line: the body's last paragraph mark cannot be deleted, so without it a
    # deleted or moved last paragraph would leave an empty paragraph behind on acceptance.
    body.append(Para((Run(REDLINE_END),)))
    return build_docx(body, stamp=stamp, title=f"Comparison redline: {dname} against {pname}",
                      properties={CAUTION_PROPERTY: CAUTION})


def write_redline(review: Review, out: str | os.PathLike[str], *, author: str | None = None,
                  date: _dt.datetime | None = None, inputs: Sequence[str] = ()) -> None:
    """Write the comparison redline (.docx) atomically."""
    path = _check_output(out, (".docx",), [review.draft.source, review.precedent.source, *inputs])
    atomic_write_bytes(path, redline_bytes(review, author=author or default_author(), date=date))


# --------------------------------------------------------------------------------------
# Issues list
# --------------------------------------------------------------------------------------

#: Deviation categories the issues list shows unless asked for more: what a negotiator needs
#: -- the substantive deviations, and the renamed defined terms as a short informational group
#: at the end.  Formatting, numbering and punctuation differences are left out by default
#: (``include=CATEGORIES`` or ``counterdraft export --issues-all`` shows them).
ISSUES_DEFAULT_INCLUDE: tuple[str, ...] = ("substantive", "term")

#: Most words a position quotes.  A position is the sentence that holds the change; a longer
#: sentence is cut to this many words around the change, with "…" where it was cut, and an
#: added or removed provision shows its first sentence(s) up to this many words.  50 words are
#: some six or seven lines of the issues list's position column (5.6 cm at 9 pt) -- a
#: clause-sized excerpt a negotiator reads at a glance (common practice, no source).
POSITION_MAX_WORDS = 50
#: Words of a long sentence's start kept before a cut in its middle ("The Vendor's total
#: liability to the Client, whether … shall not exceed …"): the subject and its verb usually
#: sit there, and a position without them does not say whose obligation it is (common
#: practice, no source).
POSITION_LEAD_WORDS = 8
#: Marks around the changed words inside a position in the CSV (plain text, no bold).  Not
#: square brackets: drafts and precedents use them for placeholders and open points ("[DATE]"
#: in the demo precedent), so a bracket would read as the agreement's own (common practice,
#: no source).  Braces are plain ASCII -- any spreadsheet shows them -- and agreements hardly
#: use them.  The exact changed words are in columns of their own too.
CSV_MARK_OPEN, CSV_MARK_CLOSE = "{", "}"

_FREQUENCY_COLUMN = "How common in the precedent set"
_DRAFT_WORDS_COLUMN = "Draft's changed words"
_HOUSE_WORDS_COLUMN = "House's changed words"
#: The CSV's columns: the table's, with the exact changed words of each side after the two
#: positions (a spreadsheet can filter and sort on them; its cells cannot show bold).
ISSUE_CSV_COLUMNS = ("Ref", "Clause", "Draft position", "House position", _DRAFT_WORDS_COLUMN,
                     _HOUSE_WORDS_COLUMN, "Severity", _FREQUENCY_COLUMN, "Decision", "Note")

_ELLIPSIS = "\u2026"
_NO_PROVISION = "(no such provision)"
_NO_HEADING = "(no heading)"
_NO_TEXT = "(no text)"
#: Abbreviations whose full stop does not end a sentence (lower case, without the stop);
#: single letters (initials) are treated alike (common practice, no source).
_ABBREVIATIONS = frozenset({"e.g", "i.e", "etc", "no", "nos", "art", "arts", "cl", "para", "paras",
                            "inc", "ltd", "co", "corp", "plc", "llc", "mr", "mrs", "ms", "dr", "st",
                            "vs", "viz", "approx", "sec", "sch"})
#: A sentence ends at ".", "!" or "?" (after any closing quotes or brackets) followed by
#: white space and a capital, a digit or an opening quote or bracket; a line break (the
#: "\n" joining a provision's paragraphs) ends one too.
_SENTENCE_END = re.compile(r"[.!?][\"'\u201d\u2019)\]]*\s+(?=[\"'\u201c\u2018(\[]?[A-Z0-9])|\n")
_WORD = re.compile(r"\S+")


@dataclass(frozen=True, slots=True)
class Excerpt:
    """Words quoted from one side, with the changed words at ``marks`` (offsets into
    ``text``, shown in bold in the .docx and the HTML, between braces in the CSV)."""

    text: str
    marks: tuple[tuple[int, int], ...] = ()

    def marked(self, open_: str = CSV_MARK_OPEN, close: str = CSV_MARK_CLOSE) -> str:
        """The text with *open_* and *close* around each marked stretch."""
        out, pos = [], 0
        for a, b in self.marks:
            out += [self.text[pos:a], open_, self.text[a:b], close]
            pos = b
        out.append(self.text[pos:])
        return "".join(out)

    def pieces(self) -> list[tuple[str, bool]]:
        """(text, marked) pieces in order."""
        out, pos = [], 0
        for a, b in self.marks:
            if a > pos:
                out.append((self.text[pos:a], False))
            out.append((self.text[a:b], True))
            pos = b
        if pos < len(self.text):
            out.append((self.text[pos:], False))
        return out


@dataclass(frozen=True, slots=True)
class IssueRow:
    """One row of the issues list.  ``draft_position``/``house_position`` are each side's
    words in context as plain text (see :data:`POSITION_MAX_WORDS`), the changed words at
    ``draft_marks``/``house_marks``; ``draft_words``/``house_words`` are the exact changed
    words (empty on the side that has none)."""

    ref: str
    rank: int
    clause: str
    draft_position: str
    house_position: str
    severity: int
    frequency: str | None
    decision: str
    note: str
    draft_marks: tuple[tuple[int, int], ...] = ()
    house_marks: tuple[tuple[int, int], ...] = ()
    draft_words: str = ""
    house_words: str = ""
    category: str = "substantive"

    @property
    def draft_excerpt(self) -> Excerpt:
        return Excerpt(self.draft_position, self.draft_marks)

    @property
    def house_excerpt(self) -> Excerpt:
        return Excerpt(self.house_position, self.house_marks)


def _sentences(text: str) -> list[tuple[int, int]]:
    """(start, end) of each sentence of *text*, tiling it (see :data:`_SENTENCE_END`).  O(len)."""
    out: list[tuple[int, int]] = []
    start = 0
    for m in _SENTENCE_END.finditer(text):
        if m.group() != "\n":
            token_start = max(text.rfind(" ", 0, m.start()), text.rfind("\n", 0, m.start())) + 1
            token = text[token_start:m.start()].lstrip("(\"'\u201c\u2018").casefold()
            if token in _ABBREVIATIONS or (len(token) == 1 and token.isalpha()):
                continue
        out.append((start, m.end()))
        start = m.end()
    if start < len(text) or not out:
        out.append((start, len(text)))
    return out


def _assemble(parts: Sequence[tuple[str, bool]]) -> Excerpt:
    """Join (text, marked) parts with white space collapsed to single spaces; a marked part
    gives its leading and trailing spaces to its neighbours, so only words are marked."""
    text = ""
    marks: list[tuple[int, int]] = []
    for raw, marked in parts:
        piece = re.sub(r"\s+", " ", raw)
        if not piece:
            continue
        if text.endswith(" ") and piece.startswith(" "):
            piece = piece[1:]
        if not text and piece.startswith(" "):
            piece = piece[1:]
        if marked:
            core = piece.strip()
            lead = piece[: len(piece) - len(piece.lstrip())]
            if core:
                text += lead
                marks.append((len(text), len(text) + len(core)))
                text += core + piece[len(lead) + len(core):]
                continue
        text += piece
    stripped = text.rstrip()
    marks = [(a, min(b, len(stripped))) for a, b in marks if a < len(stripped)]
    return Excerpt(stripped, tuple(marks))


def _whole_words(text: str, span: tuple[int, int]) -> tuple[int, int]:
    """*span* widened to whole words: a span that starts with a letter or digit reaches back
    to the white space before it, one that ends with a letter or digit reaches on to the white
    space after it, less the sentence punctuation (".,;:") it would end with.  The review's
    spans can stop inside a token ("(200" of "(200%)" where only the figure differs); a reader
    expects the whole "(200%)" marked, but not the "party" before an inserted ", save that".
    An empty span (an insertion point) stays as it is."""
    s, e = span
    while s < e and text[s].isspace():
        s += 1
    while e > s and text[e - 1].isspace():
        e -= 1
    if s >= e:
        return span
    if text[s].isalnum():
        while s > 0 and not text[s - 1].isspace():
            s -= 1
    end = e
    if text[e - 1].isalnum():
        while end < len(text) and not text[end].isspace():
            end += 1
    while end > e and text[end - 1] in ".,;:":
        end -= 1
    return s, end


def _excerpt(text: str, span: tuple[int, int], *, max_words: int = POSITION_MAX_WORDS) -> Excerpt:
    """The sentence(s) of *text* holding ``text[span]``, cut to *max_words* words around the
    span with "…" where cut; the span's words marked.  An empty span marks nothing (the
    words are missing on this side) but still chooses the sentence.  O(len(text))."""
    n_text = len(text)
    s = min(max(span[0], 0), n_text)
    e = min(max(span[1], s), n_text)
    sentences = _sentences(text)
    a = next((x for x, y in sentences if x <= s < y), sentences[-1][0])
    last = max(e - 1, s)
    b = next((y for x, y in sentences if x <= last < y), n_text)
    words = [(m.start(), m.end()) for m in _WORD.finditer(text, a, b)]
    if not words:
        return _assemble([(text[s:e], True)])
    n = len(words)
    changed = [i for i, (x, y) in enumerate(words) if x < e and y > s]
    if changed:
        lo, hi = changed[0], changed[-1] + 1
    else:
        lo = hi = next((i for i, (x, _) in enumerate(words) if x >= s), n)

    def window(budget: int) -> tuple[int, int]:
        if n <= budget:
            return 0, n
        if hi - lo >= budget:
            return lo, lo + budget
        spare = budget - (hi - lo)
        before = min(lo, spare // 2)
        after = min(n - hi, spare - before)
        return lo - min(lo, spare - after), hi + after

    w0, w1 = window(max_words)
    lead = 0  # words kept from the sentence's start before a cut in its middle
    if w0 > 0 and max_words > 2 * POSITION_LEAD_WORDS:
        w0, w1 = window(max_words - POSITION_LEAD_WORDS)
        if w0 <= POSITION_LEAD_WORDS:
            w0, w1 = 0, min(n, w1 + w0)  # the lead reaches the window: no cut at all
        else:
            lead = POSITION_LEAD_WORDS
    c0, c1 = words[w0][0], words[w1 - 1][1]
    parts: list[tuple[str, bool]] = []
    if lead:
        parts.append((text[words[0][0]:words[lead - 1][1]] + " " + _ELLIPSIS + " ", False))
    elif w0 > 0:
        parts.append((_ELLIPSIS + " ", False))
    m0, m1 = max(s, c0), min(e, c1)
    if m0 < m1:
        parts += [(text[c0:m0], False), (text[m0:m1], True), (text[m1:c1], False)]
    else:
        parts.append((text[c0:c1], False))
    if w1 < n:
        parts.append((" " + _ELLIPSIS, False))
    return _assemble(parts)


def _opening(text: str, *, max_words: int = POSITION_MAX_WORDS) -> Excerpt:
    """The first sentence(s) of *text*, as many whole ones as fit in *max_words* words (the
    first one cut to *max_words* when longer), "…" when more follows.  O(len(text))."""
    words = [(m.start(), m.end()) for m in _WORD.finditer(text)]
    if not words:
        return Excerpt(_NO_TEXT)
    starts = [a for a, _ in words]
    end = None
    for _, y in _sentences(text):
        if bisect.bisect_left(starts, y) > max_words:  # words starting before y
            break
        end = y
    if end is None:
        end = words[min(max_words, len(words)) - 1][1]
    more = any(a >= end for a, _ in words)
    return _assemble([(text[:end], False)] + ([(" " + _ELLIPSIS, False)] if more else []))


def _swap(edits: Sequence[Edit]) -> tuple[Edit, ...]:
    """A pair's word diff read the other way round (draft to precedent)."""
    flip = {"insert": "delete", "delete": "insert"}
    return tuple(Edit(flip.get(e.tag, e.tag), e.d1, e.d2, e.p1, e.p2) for e in edits)


def _side_position(prov: Provision | None, span: tuple[int, int] | None, verbatim: str,
                   at: int | None) -> tuple[Excerpt, str]:
    """One side's position of a word-level deviation, and its exact changed words.  Without
    a span (a review built by hand), the side's verbatim words are looked up in the text,
    else *at* (the other side's change mapped through the pair's diff) places it, else the
    provision's opening sentence(s) stand for it."""
    if prov is None:
        return Excerpt(_NO_PROVISION), ""
    text = prov.text
    if span is None and verbatim:
        i = text.find(verbatim)
        if i >= 0:
            span = (i, i + len(verbatim))
    if span is None and at is not None:
        span = (at, at)
    if span is None:
        return _opening(text), verbatim
    span = _whole_words(text, span)
    return _excerpt(text, span), text[span[0]:span[1]]


def _whole(text: str) -> Excerpt:
    return Excerpt(text, ((0, len(text)),) if text else ())


def _labelled(label: str, value: str) -> Excerpt:
    """``"label value"`` with the value marked."""
    return Excerpt(f"{label}{value}", ((len(label), len(label) + len(value)),))


def _positions(review: Review, dev: Deviation) -> tuple[Excerpt, Excerpt, str, str]:
    """(draft position, house position, draft's changed words, house's changed words)."""
    dp = find_provision(review.draft, dev.draft_provision)
    pp = find_provision(review.precedent, dev.precedent_provision)
    if dev.category == "term":
        uses = next((m.occurrences for m in review.term_map
                     if m.draft == dev.draft_text and m.precedent == dev.precedent_text), None)
        draft = _labelled("defined term ", f"\u201c{dev.draft_text}\u201d")
        if uses:
            draft = Excerpt(f"{draft.text} ({uses} uses)", draft.marks)
        return draft, _labelled("defined term ", f"\u201c{dev.precedent_text}\u201d"), dev.draft_text, dev.precedent_text
    if dev.part == "heading":
        dh = (dp.heading if dp is not None else None) or dev.draft_text
        ph = (pp.heading if pp is not None else None) or dev.precedent_text
        return (_labelled("Heading: ", dh) if dh else Excerpt(_NO_HEADING),
                _labelled("Heading: ", ph) if ph else Excerpt(_NO_HEADING), dh or "", ph or "")
    whole_provision = dev.change in ("add-provision", "remove-provision", "move")
    if dev.part == "text" and not whole_provision and (dp is not None or pp is not None):
        edits = _pair_edits(review, dp.id, pp.id) if dp is not None and pp is not None else ()
        d_at = (_map_offset(edits, dev.precedent_span[0])
                if dev.draft_span is None and dev.precedent_span is not None else None)
        p_at = (_map_offset(_swap(edits), dev.draft_span[0])
                if dev.precedent_span is None and dev.draft_span is not None else None)
        draft, dwords = _side_position(dp, dev.draft_span, dev.draft_text, d_at)
        house, pwords = _side_position(pp, dev.precedent_span, dev.precedent_text, p_at)
        return draft, house, dwords, pwords
    if whole_provision or dp is None or pp is None:
        draft = _opening(dp.text) if dp is not None else Excerpt(_NO_PROVISION)
        house = _opening(pp.text) if pp is not None else Excerpt(_NO_PROVISION)
        if dp is not None and not dp.text.strip() and dp.heading:
            draft = Excerpt(f"Heading: {dp.heading}")
        if pp is not None and not pp.text.strip() and pp.heading:
            house = Excerpt(f"Heading: {pp.heading}")
        dwords = dp.text if dp is not None and dev.change == "add-provision" else ""
        pwords = pp.text if pp is not None and dev.change == "remove-provision" else ""
        return draft, house, dwords, pwords
    # the provision as a whole otherwise (its number): the deviation's own words
    return (_whole(dev.draft_text) if dev.draft_text else Excerpt(_NO_TEXT),
            _whole(dev.precedent_text) if dev.precedent_text else Excerpt(_NO_TEXT),
            dev.draft_text, dev.precedent_text)


def _frequency_text(dev: Deviation) -> str | None:
    """``"3 of 10"`` (and the reviewer's label of the wording: ``"3 of 10; preferred"``);
    ``"none"`` when no agreement of the set has such a clause.  Explained under the table."""
    f = dev.frequency
    if f is None:
        return None
    text = f"{f.matching} of {f.same_type}" if f.same_type else "none"
    if f.position:
        text += f"; {f.position}"
    return text


def _decision_text(dec: Decision | None) -> str:
    if dec is None:
        return "undecided"
    if dec.action == "amend":
        return f"amend: {dec.text or ''}"
    return dec.action


def _included(include: Iterable[str]) -> frozenset[str]:
    chosen = frozenset(include)
    unknown = sorted(chosen - set(CATEGORIES))
    if unknown:
        raise ValueError(f"unknown deviation categories {unknown}; choose from {CATEGORIES}")
    return chosen


def _shown(review: Review, decisions: Sequence[Decision], include: Iterable[str]) -> list[Deviation]:
    """The deviations the issues list shows, in order: those of the included categories (and
    every decided one), by rank; renamed defined terms last, as a group of their own."""
    chosen = _included(include)
    decided = {d.deviation for d in decisions}
    devs = [d for d in sorted(review.deviations, key=lambda d: (d.rank, d.id))
            if d.category in chosen or d.id in decided]
    return [d for d in devs if d.category != "term"] + [d for d in devs if d.category == "term"]


def issue_rows(review: Review, decisions: Sequence[Decision] = (), *,
               include: Iterable[str] = ISSUES_DEFAULT_INCLUDE) -> list[IssueRow]:
    """The rows of the issues list: one per deviation of the *include* categories (by
    default the substantive ones and the renamed defined terms) and per decided deviation,
    by rank, with the renamed defined terms last.  Each position is the sentence (or a
    bounded excerpt) of that side's provision holding the change.  O(deviations x
    provision length)."""
    by_id = {d.deviation: d for d in decisions}
    rows = []
    for dev in _shown(review, decisions, include):
        dec = by_id.get(dev.id)
        draft, house, dwords, pwords = _positions(review, dev)
        rows.append(IssueRow(
            ref=dev.id, rank=dev.rank, clause=clause_label(review, dev),
            draft_position=draft.text, house_position=house.text,
            severity=dev.severity, frequency=_frequency_text(dev), decision=_decision_text(dec),
            note=(dec.note or "") if dec else "",
            draft_marks=draft.marks, house_marks=house.marks,
            draft_words=dwords, house_words=pwords, category=dev.category,
        ))
    return rows


def _left_out(review: Review, rows: Sequence[IssueRow]) -> int:
    return len(review.deviations) - len(rows)


def _columns(rows: Sequence[IssueRow], columns: Sequence[str] = ISSUE_COLUMNS) -> tuple[str, ...]:
    if any(r.frequency is not None for r in rows):
        return tuple(columns)
    return tuple(c for c in columns if c != _FREQUENCY_COLUMN)


def _cells(row: IssueRow, columns: Sequence[str], *, marked: bool = False) -> list[str]:
    """Plain-text cells; with *marked*, the positions carry the CSV's marks."""
    values = {
        "Ref": row.ref, "Clause": row.clause,
        "Draft position": row.draft_excerpt.marked() if marked else row.draft_position,
        "House position": row.house_excerpt.marked() if marked else row.house_position,
        _DRAFT_WORDS_COLUMN: row.draft_words, _HOUSE_WORDS_COLUMN: row.house_words,
        "Severity": str(row.severity),
        _FREQUENCY_COLUMN: row.frequency or "", "Decision": row.decision, "Note": row.note,
    }
    return [values[c] for c in columns]


def _first_term_row(rows: Sequence[IssueRow]) -> int | None:
    return next((i for i, r in enumerate(rows) if r.category == "term"), None)


def _table_notes(review: Review, rows: Sequence[IssueRow]) -> list[str]:
    """The notes under the table (.docx and HTML): what the positions quote, the "how
    common" figures (explained once, with the first row's), the renamed-terms group and what
    was left out."""
    notes = [f"Positions quote the sentence of each side's provision that holds the change (at "
             f"most {POSITION_MAX_WORDS} words; \u201c{_ELLIPSIS}\u201d marks a cut); the changed "
             "words are in bold. An added or removed provision is quoted from its start."]
    by_id = {d.id: d for d in review.deviations}
    freq = next((by_id[r.ref].frequency for r in rows
                 if r.ref in by_id and by_id[r.ref].frequency is not None), None)
    if freq is not None:
        total = max(d.frequency.total for d in review.deviations if d.frequency is not None)
        x, y = freq.matching, freq.same_type
        notes.append(
            f"How common in the precedent set: \u201c{x} of {y}\u201d means that {x} of the {y} "
            f"agreements of the precedent set that have a clause of this type take the draft's "
            f"position; the set holds {total} agreements. \u201cnone\u201d: no agreement of the set "
            "has such a clause. A word after the figure (preferred, acceptable, fallback, not "
            "acceptable) is the label the firm gave that wording.")
    if _first_term_row(rows) is not None:
        notes.append("The last rows are renamed defined terms, for information: the draft calls "
                     "a defined term differently, and the comparison reads both names as one term.")
    left = _left_out(review, rows)
    if left:
        notes.append(f"Left out: {left} difference{'s' if left != 1 else ''} of formatting, "
                     "numbering or punctuation only (an export with all differences lists them).")
    return notes


def issues_list_csv(review: Review, decisions: Sequence[Decision] = (), *,
                    include: Iterable[str] = ISSUES_DEFAULT_INCLUDE) -> str:
    """CSV (RFC 4180 quoting by the csv module): the caution on the first line, then the
    header (:data:`ISSUE_CSV_COLUMNS`, without the frequency column when no precedent set
    was used) and one row per issue.  The caution is its own single-cell row so a
    spreadsheet shows it above the table and ``csv.reader`` reads it back as one field.
    The positions mark the changed words with :data:`CSV_MARK_OPEN` / :data:`CSV_MARK_CLOSE`;
    the exact changed words have columns of their own."""
    rows = issue_rows(review, decisions, include=include)
    cols = _columns(rows, ISSUE_CSV_COLUMNS)
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\r\n")
    writer.writerow([CAUTION])
    writer.writerow(cols)
    for r in rows:
        writer.writerow(_cells(r, cols, marked=True))
    return buf.getvalue()


#: Relative column widths of the issues-list table, in centimetres of the landscape A4 text
#: width (24.7 cm; scaled exactly to it).  The narrow columns hold their longest word on one
#: line at 9 pt in a wide serif (DejaVu Serif, LibreOffice's stand-in when Liberation Serif is
#: missing; measured in LibreOffice's PDF of the table with pdftotext -bbox: bold "Severity"
#: 1.44 cm, "Decision" 1.53 cm, "precedent" 1.78 cm, plain "undecided" 1.67 cm, "v122"
#: 0.78 cm) plus the cell margins (2 x 0.19 cm) and some slack; the two positions get most
#: of the room.  Without the frequency column the others share its width.
ISSUE_WIDTHS_CM = {"Ref": 1.4, "Clause": 3.3, "Draft position": 5.6, "House position": 5.6,
                   "Severity": 2.0, _FREQUENCY_COLUMN: 2.2, "Decision": 2.2, "Note": 2.4}

#: The page's palette (ours): ink, secondary text, rules, header fill, the fill of the
#: renamed-terms group and the wash behind the changed words.  Black-on-pale throughout so a
#: greyscale print stays legible; the changed words are bold as well as washed.
_PALETTE = {"ink": "#1e2b29", "muted": "#56625f", "rule": "#8a9a95", "head": "#dde6e2",
            "group": "#f3f5f4", "mark": "#f3e4c0"}

_HTML_STYLE = """
body {{ font-family: "Liberation Serif", "DejaVu Serif", Georgia, serif; margin: 2em; color: {ink}; }}
h1 {{ font-size: 1.4em; margin-bottom: 0.2em; }}
p.meta {{ margin-top: 0; color: {muted}; }}
p.caution {{ border-top: 1px solid {rule}; border-bottom: 1px solid {rule}; padding: 0.5em 0;
            font-style: italic; }}
table {{ border-collapse: collapse; width: 100%; table-layout: fixed; font-size: 0.85em; }}
th, td {{ border: 1px solid {rule}; padding: 0.3em 0.4em; vertical-align: top; text-align: left;
          overflow-wrap: break-word; }}
th {{ background: {head}; }}
td.num {{ text-align: right; }}
strong {{ background: {mark}; }}
tbody.terms tr:first-child td {{ border-top: 2px solid {ink}; }}
tbody.terms td {{ background: {group}; }}
thead {{ display: table-header-group; }}
tr {{ break-inside: avoid; page-break-inside: avoid; }}
p.note {{ font-size: 0.85em; color: {muted}; margin: 0.4em 0; }}
@page {{ size: A4 landscape; margin: 12mm; }}
@media print {{ body {{ margin: 0; }} th, td, strong {{ -webkit-print-color-adjust: exact; print-color-adjust: exact; }} }}
""".format(**_PALETTE)


def _html_excerpt(excerpt: Excerpt) -> str:
    return "".join(f"<strong>{html.escape(t)}</strong>" if m else html.escape(t)
                   for t, m in excerpt.pieces())


def issues_list_html(review: Review, decisions: Sequence[Decision] = (), *,
                     date: _dt.datetime | None = None,
                     include: Iterable[str] = ISSUES_DEFAULT_INCLUDE) -> str:
    """A self-contained printable HTML page: no external resources, print CSS inline (A4
    landscape, the header row repeated on each page, no row split), the caution under the
    title, the changed words of each position in bold."""
    rows = issue_rows(review, decisions, include=include)
    cols = _columns(rows)
    e = html.escape
    title = f"Issues list: {Path(review.draft.source).name} against {Path(review.precedent.source).name}"
    total_cm = sum(ISSUE_WIDTHS_CM[c] for c in cols)
    out = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        f"<title>{e(title)}</title>",
        f"<style>{_HTML_STYLE}</style></head><body>",
        f"<h1>{e(title)}</h1>",
        f'<p class="meta">Written by Counterdraft {e(__version__)} on {e(_stamp_date(date)[:10])}.</p>',
        f'<p class="caution">{e(CAUTION)}</p>',
        # border="1" and valign="top" repeat the style sheet for word processors that open the
        # page and read HTML attributes but little CSS (LibreOffice 7.4, checked on this machine).
        '<table border="1"><colgroup>' + "".join(
            f'<col style="width: {100 * ISSUE_WIDTHS_CM[c] / total_cm:.1f}%">' for c in cols) + "</colgroup>",
        "<thead><tr>" + "".join(f'<th scope="col">{e(c)}</th>' for c in cols) + "</tr></thead><tbody>",
    ]
    first_term = _first_term_row(rows)
    for i, r in enumerate(rows):
        if i == first_term:
            out.append('</tbody><tbody class="terms">')
        cells = []
        for c, v in zip(cols, _cells(r, cols)):
            if c == "Draft position":
                cells.append(f"<td>{_html_excerpt(r.draft_excerpt)}</td>")
            elif c == "House position":
                cells.append(f"<td>{_html_excerpt(r.house_excerpt)}</td>")
            else:
                cls = ' class="num"' if c == "Severity" else ""
                cells.append(f"<td{cls}>{e(v)}</td>")
        out.append('<tr valign="top">' + "".join(cells) + "</tr>")
    out.append("</tbody></table>")
    if rows:
        out.extend(f'<p class="note">{e(n)}</p>' for n in _table_notes(review, rows))
    else:
        out.append("<p>No substantive deviation was found.</p>")
    out.append("</body></html>")
    return "\n".join(out) + "\n"


def _docx_excerpt(excerpt: Excerpt):
    from .docx.writer import Run

    return tuple(Run(t, bold=m) for t, m in excerpt.pieces())


def issues_list_docx(review: Review, decisions: Sequence[Decision] = (), *, author: str,
                     date: _dt.datetime | None = None,
                     include: Iterable[str] = ISSUES_DEFAULT_INCLUDE) -> bytes:
    """The issues list as a Word table (ECMA-376 Part 1 §17.4) on landscape A4 pages: the
    full text width, fixed column widths, the header row repeated on each page, no row split
    across pages; the changed words of each position in bold; notes under the table."""
    from .docx.revisions import RevisionStamp
    from .docx.writer import Para, Run, Table, build_docx

    rows = issue_rows(review, decisions, include=include)
    cols = _columns(rows)
    stamp = RevisionStamp(author=author, date=_stamp_date(date))
    title = f"Issues list: {Path(review.draft.source).name} against {Path(review.precedent.source).name}"

    def cells(r: IssueRow) -> tuple:
        out = []
        for c, v in zip(cols, _cells(r, cols)):
            if c == "Draft position":
                out.append(_docx_excerpt(r.draft_excerpt))
            elif c == "House position":
                out.append(_docx_excerpt(r.house_excerpt))
            else:
                out.append(v)
        return tuple(out)

    body: list = [
        Para((Run(title),), style="Title"),
        Para((Run(f"Written by Counterdraft {__version__} on {stamp.date[:10]}."),)),
        Para((Run(CAUTION),), style="Caution"),
        Table(tuple(cols), tuple(cells(r) for r in rows),
              widths=tuple(ISSUE_WIDTHS_CM[c] for c in cols), divider_before=_first_term_row(rows)),
    ]
    if rows:
        body.extend(Para((Run(n),), style="TableNote") for n in _table_notes(review, rows))
    else:
        body.append(Para((Run("No substantive deviation was found."),)))
    return build_docx(body, stamp=stamp, title=title, properties={CAUTION_PROPERTY: CAUTION},
                      landscape=True)


def write_issues_list(review: Review, out: str | os.PathLike[str], *,
                      decisions: Sequence[Decision] = (), author: str | None = None,
                      date: _dt.datetime | None = None, inputs: Sequence[str] = (),
                      include: Iterable[str] = ISSUES_DEFAULT_INCLUDE) -> None:
    """Write the issues list as .docx, .html or .csv (by the suffix of *out*), atomically.
    *include* names the deviation categories listed (:data:`ISSUES_DEFAULT_INCLUDE`; pass
    :data:`core.model.CATEGORIES` for every difference); decided deviations are always listed."""
    include = tuple(_included(include))
    path = _check_output(out, (".docx", ".html", ".htm", ".csv"),
                         [review.draft.source, review.precedent.source, *inputs])
    suffix = path.suffix.lower()
    if suffix == ".csv":
        # A byte-order mark first: spreadsheet programs then read the file as UTF-8 rather
        # than a legacy code page, so curly quotes and ellipses survive (common practice, no
        # source).  Python reads it back with encoding="utf-8-sig".
        atomic_write_bytes(path, issues_list_csv(review, decisions, include=include).encode("utf-8-sig"))
    elif suffix in (".html", ".htm"):
        atomic_write_text(path, issues_list_html(review, decisions, date=date, include=include))
    else:
        atomic_write_bytes(path, issues_list_docx(review, decisions, author=author or default_author(),
                                                  date=date, include=include))
