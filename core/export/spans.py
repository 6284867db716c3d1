"""The span-edit layer: what a decision does to the words of one draft provision.

A decision applies to the exact span the review showed (``Deviation.draft_text_span``, the
place of ``draft_text`` in the provision's text, recorded at review time; the text is never
searched again):

* **revert** puts back the precedent's words over the two corresponding spans
  (``precedent_text_span`` / ``draft_text_span``, see :mod:`core.review.spans`): each changed
  hunk of the pair's word diff (``Pair.edits``) inside them takes the precedent's words,
  while hunks that are only a renamed defined term, a renumbered reference or a change of
  style (``Edit.restyle``) keep the draft's words -- so the restored wording uses the
  draft's own defined terms and numbering;
* **amend** replaces the draft's span by the reviewer's words, written as the smallest edit
  that gives that text (the words both share at either end, cut at word boundaries, stay
  untouched, so "sixty (60) days" amended to "forty-five (45) days" strikes "sixty (60)" only).

Each decision gives one :class:`SpanEdit` of the provision's text (so a note can be anchored
on it), cut to the words that differ; :func:`to_blocks` places it in
the paragraphs through ``Provision.segments``.  Applying every edit of a decision to the
draft's text gives exactly the decided text: no word is left behind or doubled, and spaces
at the seams are kept single (:func:`seam`).

Timing: O(hunks of the pair) per revert, O(length of the span) per amend.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass

from ..model import Edit, Provision
from .common import block_ranges

__all__ = [
    "SpanEdit",
    "amend_edits",
    "apply_span_edits",
    "revert_edits",
    "seam",
    "to_blocks",
]

Span = tuple[int, int]

#: Characters before which an inserted word needs no space of its own.
_CLOSING = ",.;:)]}\u201d\u2019'\"!?"
#: Characters after which an inserted word needs no space of its own.
_OPENING = "([{\u201c\u2018"


@dataclass(frozen=True, slots=True)
class SpanEdit:
    """Replace ``text[start:end]`` of one provision's text by ``new``."""

    start: int
    end: int
    new: str


def apply_span_edits(text: str, edits: Sequence[SpanEdit]) -> str:
    """*text* with *edits* (not overlapping) applied: the decided text."""
    out, pos = [], 0
    for e in sorted(edits, key=lambda e: (e.start, e.end)):
        out += [text[pos:e.start], e.new]
        pos = e.end
    out.append(text[pos:])
    return "".join(out)


def _hunk_inside(e: Edit, precedent: Span, draft: Span) -> bool:
    """Does changed hunk *e* belong to the corresponding spans?  A hunk lies wholly inside or
    wholly outside them (their ends are aligned points of the diff, up to white space), so
    any overlap on either side means inside."""
    (x0, x1), (y0, y1) = precedent, draft
    return e.p1 < x1 and x0 < e.p2 or e.d1 < y1 and y0 < e.d2


def revert_edits(edits: Sequence[Edit], precedent_text: str, draft_text: str, *, precedent: Span,
                 draft: Span, translate: Callable[[int, int], str] | None = None,
                 keep: Callable[[int, int], str] | None = None) -> list[SpanEdit]:
    """The edit of the draft's text that puts back the precedent's words over the
    corresponding spans *precedent* and *draft*, from the pair's word diff *edits* (which
    tile both texts): every changed hunk inside the spans takes the precedent's words
    ``precedent_text[p1:p2]`` as ``translate(p1, p2)`` gives them for the draft (its
    defined-term names, its numbering); restyled hunks and unchanged words keep the draft's,
    as ``keep(d1, d2)`` gives them (default: as they are).  One edit (so a note can sit on
    it), cut to the words that differ; none when nothing differs."""
    translate = translate or (lambda a, b: precedent_text[a:b])
    keep = keep or (lambda a, b: draft_text[a:b])
    inside = [e for e in edits if e.tag != "equal" and not e.restyle and _hunk_inside(e, precedent, draft)]
    if not inside:
        return []
    start, end = min(draft[0], inside[0].d1), max(draft[1], inside[-1].d2)
    out, pos = [], start
    for e in inside:
        out += [keep(pos, e.d1), translate(e.p1, e.p2)]
        pos = e.d2
    out.append(keep(pos, end))
    return amend_edits(draft_text, (start, end), "".join(out), tidy=False)


def _boundary(s: str, k: int) -> bool:
    """Is offset *k* of *s* a word boundary (an end, or next to white space)?"""
    return k in (0, len(s)) or s[k - 1].isspace() or s[k].isspace()


def _shared_ends(old: str, new: str) -> tuple[int, int]:
    """Lengths of the longest common beginning and end of *old* and *new* that cut both at
    word boundaries and do not overlap."""
    limit = min(len(old), len(new))
    k = 0
    while k < limit and old[k] == new[k]:
        k += 1
    while k > 0 and not (_boundary(old, k) and _boundary(new, k)):
        k -= 1
    m = 0
    while m < limit - k and old[-1 - m] == new[-1 - m]:
        m += 1
    while m > 0 and not (_boundary(old, len(old) - m) and _boundary(new, len(new) - m)):
        m -= 1
    return k, m


def seam(text: str, start: int, end: int, new: str) -> SpanEdit:
    """Replace ``text[start:end]`` by *new*, keeping single spaces at the two seams.

    Taking words out of "shall not be" must also take one of the spaces around them, and
    putting words into "shall be" must add one; nothing else changes.
    """
    if not new and end > start:
        before = text[start - 1] if start > 0 else ""
        after = text[end] if end < len(text) else ""
        if before == " " and (after in ("", " ") or after in _CLOSING):
            return SpanEdit(start - 1, end, "")
        if not before and after == " ":
            return SpanEdit(start, end + 1, "")
        return SpanEdit(start, end, "")
    if new and start == end:
        before = text[start - 1] if start > 0 else ""
        after = text[start] if start < len(text) else ""
        if before and not before.isspace() and before not in _OPENING and not new[0].isspace() \
                and new[0] not in _CLOSING:
            new = " " + new
        elif after and not after.isspace() and after not in _CLOSING and not new[-1].isspace():
            new = new + " "
    return SpanEdit(start, end, new)


def amend_edits(text: str, span: Span, new: str, *, tidy: bool = True) -> list[SpanEdit]:
    """The smallest edit of *text* that replaces ``text[span]`` by *new*.  With *tidy*, words
    put in at a bare insertion point (an empty span) or a span emptied get single spaces at
    their seams (:func:`seam`); otherwise the result is exactly ``text`` with the span
    replaced."""
    start, end = span
    old = text[start:end]
    if old == new:
        return []
    if tidy and (not old or not new):
        return [seam(text, start, end, new)]
    k, m = _shared_ends(old, new)
    return [SpanEdit(start + k, end - m, new[k:len(new) - m])]


def to_blocks(prov: Provision, edit: SpanEdit) -> list[tuple[int, int, int, str]]:
    """(block, start, end, new words) pieces of *edit* in the paragraphs of *prov*: the new
    words go into the first paragraph the span touches (one line per paragraph when the new
    words have as many lines as the span has paragraphs; else every line there, each
    further line starting a new paragraph); the rest of the span is deleted.  An empty list
    when the span lies outside the provision's segments."""
    ranges = block_ranges(prov, edit.start, edit.end)
    if not ranges:
        return []
    parts = edit.new.split("\n")
    if len(parts) != len(ranges):
        parts = [edit.new] + [""] * (len(ranges) - 1)
    return [(b, s, e, t) for (b, s, e), t in zip(ranges, parts) if s < e or t]
