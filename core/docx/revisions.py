"""Write OOXML tracked changes and comments into WordprocessingML (ECMA-376 Part 1 §17.13).

What this module writes, with the clause of ECMA-376 Part 1 it follows:

* inserted run content: ``w:ins`` around ``w:r`` (§17.13.5.18);
* deleted run content: ``w:del`` around ``w:r`` whose ``w:t`` became ``w:delText``
  (§17.13.5.14, §17.3.3.7) and ``w:instrText`` became ``w:delInstrText`` (§17.13.5.13);
* a deleted or inserted paragraph mark: ``w:pPr/w:rPr/w:del`` or ``w:ins`` (§17.13.5.15,
  §17.13.5.16);
* moved content: ``w:moveFrom``/``w:moveTo`` (§17.13.5.22, §17.13.5.25) between range
  markers ``w:moveFromRangeStart``/``End`` and ``w:moveToRangeStart``/``End`` (§17.13.5.23,
  §17.13.5.24, §17.13.5.27, §17.13.5.28) that share a ``w:name``;
* comments: ``w:commentRangeStart``/``w:commentRangeEnd``/``w:commentReference`` in the
  body and ``w:comment`` in the comments part (§17.13.4.2 - §17.13.4.5).

Every revision element carries a numeric ``w:id`` unique in the document, ``w:author`` and
``w:date`` (ISO 8601, §17.13.5 attribute tables).  :mod:`core.docx.validate` checks all of it.

Editing an existing paragraph keeps everything we do not change: runs are split at the edit
boundaries with their own ``w:rPr`` copied to both halves, deleted runs are wrapped where they
stand (inside hyperlinks, fields and content controls alike), and inserted runs copy the run
properties of their neighbour.  Offsets are in the paragraph's block text
(:attr:`core.model.Block.text`), mapped to XML through
:func:`core.docx.blocks.paragraph_pieces`.

Cost: applying k edits to a paragraph of n pieces is O((k + s) * n) where s <= 2k is the number
of run splits (the pieces are recomputed after each split); paragraphs are short, documents
are handled paragraph by paragraph.
"""

from __future__ import annotations

import copy
import re
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from typing import Literal

from lxml import etree

__all__ = [
    "W_NS",
    "XML_SPACE",
    "Comment",
    "IdAllocator",
    "RevisionStamp",
    "TextEdit",
    "anchor_comment",
    "apply_paragraph_edits",
    "build_comments_part",
    "clean_run_properties",
    "delete_paragraph",
    "followed_by_paragraph",
    "insert_paragraph_after",
    "make_runs",
    "mark_paragraph",
    "max_annotation_id",
    "paragraph_mark_deletable",
    "paragraph_runs",
    "part_bytes",
    "split_paragraph_after",
    "w",
    "wrap",
]

W_NS = "http://schemas.openxmlformats.org/wordprocessingml/2006/main"
XML_SPACE = "{http://www.w3.org/XML/1998/namespace}space"

RevisionKind = Literal["ins", "del", "moveFrom", "moveTo"]
REVISION_KINDS: tuple[str, ...] = ("ins", "del", "moveFrom", "moveTo")


def w(tag: str) -> str:
    """Clark name of a WordprocessingML element or attribute."""
    return f"{{{W_NS}}}{tag}"


def part_bytes(root: etree._Element) -> bytes:
    """A package part's XML: UTF-8 with the ``standalone="yes"`` declaration Word writes."""
    data: bytes = etree.tostring(root, xml_declaration=True, encoding="UTF-8", standalone=True)
    return data


_W_ID = w("id")
_R = w("r")
_P = w("p")
_PPR = w("pPr")
_RPR = w("rPr")
_T = w("t")

#: Children of ``w:pPr`` that must come after ``w:rPr`` (CT_PPr sequence, §17.3.1.26):
#: ``w:rPr`` is inserted before the first of them.
_PPR_AFTER_RPR = (w("sectPr"), w("pPrChange"))
#: Revision marks that may sit inside a run's or a paragraph mark's ``w:rPr`` (CT_ParaRPr,
#: §17.3.1.29; CT_RPr with w:rPrChange §17.13.5.31).  Removed when run properties are copied
#: to a new run: a new run's tracked state is given by its wrapper, not inherited.
_RPR_REVISION_TAGS = frozenset({w("ins"), w("del"), w("moveFrom"), w("moveTo"), w("rPrChange")})


@dataclass(frozen=True, slots=True)
class RevisionStamp:
    """Who made a tracked change and when: ``w:author`` and ``w:date`` (ISO 8601, UTC)."""

    author: str
    date: str  # e.g. "2024-05-01T10:00:00Z"


class IdAllocator:
    """Hands out numeric ``w:id`` values, each used once (ST_DecimalNumber, §17.13.5)."""

    def __init__(self, start: int = 1) -> None:
        self._next = max(0, int(start))

    def next(self) -> int:
        value = self._next
        self._next += 1
        return value


def max_annotation_id(*roots: etree._Element | None) -> int:
    """The largest numeric ``w:id`` found anywhere under *roots* (-1 if none).

    Starting our ids above it keeps them unique against the bookmarks, comments and earlier
    revisions a document already carries.
    """
    best = -1
    for root in roots:
        if root is None:
            continue
        for el in root.iter():
            value = el.get(_W_ID) if isinstance(el.tag, str) else None
            if value is not None and value.lstrip("-").isdigit():
                best = max(best, int(value))
    return best


@dataclass(frozen=True, slots=True)
class Comment:
    """One entry of the comments part (§17.13.4.2)."""

    id: int
    author: str
    date: str
    text: str
    initials: str = ""


@dataclass(frozen=True, slots=True)
class TextEdit:
    """Replace ``block.text[start:end]`` by ``replacement`` as a tracked change.

    ``start == end`` is a pure insertion and an empty ``replacement`` a pure deletion.
    ``comment``, when given, is the id of a comment (written to the comments part by the
    caller) anchored on the changed words.  With ``track=False`` the text is left alone and
    only the comment is anchored on ``start:end``.
    """

    start: int
    end: int
    replacement: str = ""
    comment: int | None = None
    track: bool = True
    #: Write the insertion before the deletion (both orders are valid markup; deletion first
    #: is the usual one).  See :mod:`core.docx.tracked` for when the other order is needed.
    insert_first: bool = False
    #: A ``"\\n"`` in ``replacement`` starts a new paragraph (:func:`split_paragraph_after`)
    #: instead of a line break within the paragraph.
    paragraphs: bool = False


# --------------------------------------------------------------------------------------
# Small element builders
# --------------------------------------------------------------------------------------

_SPECIAL = re.compile(r"(\t|\n)")


def clean_run_properties(rpr: etree._Element | None) -> etree._Element | None:
    """A copy of *rpr* without revision marks (or None)."""
    if rpr is None:
        return None
    out = copy.deepcopy(rpr)
    for child in list(out):
        if child.tag in _RPR_REVISION_TAGS:
            out.remove(child)
    return out


def _text_element(tag: str, text: str) -> etree._Element:
    el = etree.Element(w(tag))
    el.text = text
    if text != text.strip() or "  " in text:
        el.set(XML_SPACE, "preserve")
    return el


def make_runs(text: str, rpr: etree._Element | None = None, *, deleted: bool = False) -> list[etree._Element]:
    """Runs showing *text*; ``"\\t"`` becomes ``w:tab`` and ``"\\n"`` ``w:br``.

    With ``deleted=True`` the text is written as ``w:delText`` (for use inside ``w:del`` or
    ``w:moveFrom``).  One run holds the whole text (an empty list for empty text).
    """
    if not text:
        return []
    run = etree.Element(_R)
    if rpr is not None:
        run.append(clean_run_properties(rpr))
    for part in _SPECIAL.split(text):
        if not part:
            continue
        if part == "\t":
            run.append(etree.Element(w("tab")))
        elif part == "\n":
            run.append(etree.Element(w("br")))
        else:
            run.append(_text_element("delText" if deleted else "t", part))
    return [run]


def wrap(kind: RevisionKind, children: Iterable[etree._Element], *, stamp: RevisionStamp,
         ids: IdAllocator) -> etree._Element:
    """A ``w:ins``/``w:del``/``w:moveFrom``/``w:moveTo`` holding *children*."""
    el = etree.Element(w(kind))
    el.set(_W_ID, str(ids.next()))
    el.set(w("author"), stamp.author)
    el.set(w("date"), stamp.date)
    for child in children:
        el.append(child)
    return el


def _to_deleted(run: etree._Element) -> None:
    """Turn a run's visible text into deleted text (§17.3.3.7, §17.13.5.13)."""
    for el in run.iter(_T, w("instrText")):
        el.tag = w("delText") if el.tag == _T else w("delInstrText")


def mark_paragraph(p: etree._Element, kind: RevisionKind, *, stamp: RevisionStamp,
                   ids: IdAllocator) -> None:
    """Mark the paragraph mark of *p* as inserted/deleted/moved (``w:pPr/w:rPr/w:<kind>``)."""
    ppr = p.find(_PPR)
    if ppr is None:
        ppr = etree.Element(_PPR)
        p.insert(0, ppr)
    rpr = ppr.find(_RPR)
    if rpr is None:
        rpr = etree.Element(_RPR)
        anchor = next((c for c in ppr if c.tag in _PPR_AFTER_RPR), None)
        if anchor is None:
            ppr.append(rpr)
        else:
            anchor.addprevious(rpr)
    for old in [c for c in rpr if c.tag in (w("ins"), w("del"), w("moveFrom"), w("moveTo"))]:
        rpr.remove(old)
    mark = etree.Element(w(kind))
    mark.set(_W_ID, str(ids.next()))
    mark.set(w("author"), stamp.author)
    mark.set(w("date"), stamp.date)
    rpr.insert(0, mark)  # CT_ParaRPr: the revision marks come first (§17.3.1.29)


def _owning_paragraph(el: etree._Element) -> etree._Element | None:
    cur = el.getparent()
    while cur is not None and cur.tag != _P:
        cur = cur.getparent()
    return cur


def paragraph_runs(p: etree._Element) -> list[etree._Element]:
    """Runs of *p* itself (not of paragraphs nested in text boxes), in document order."""
    return [r for r in p.iter(_R) if _owning_paragraph(r) is p]


def _wrap_runs(runs: Sequence[etree._Element], kind: RevisionKind, *, stamp: RevisionStamp,
               ids: IdAllocator) -> list[etree._Element]:
    """Wrap each run where it stands; adjacent siblings share one wrapper.  Returns wrappers."""
    wrappers: list[etree._Element] = []
    current: etree._Element | None = None
    for run in runs:
        if kind in ("del", "moveFrom"):
            _to_deleted(run)
        prev = run.getprevious()
        if current is not None and prev is current:
            current.append(run)  # moves the run into the wrapper
            continue
        parent = run.getparent()
        index = parent.index(run)
        current = wrap(kind, (), stamp=stamp, ids=ids)
        parent.insert(index, current)
        current.append(run)
        wrappers.append(current)
    return wrappers


def _is_deleted(el: etree._Element, stop: etree._Element) -> bool:
    cur = el.getparent()
    while cur is not None and cur is not stop:
        if cur.tag in (w("del"), w("moveFrom")):
            return True
        cur = cur.getparent()
    return False


def delete_paragraph(p: etree._Element, *, stamp: RevisionStamp, ids: IdAllocator,
                     include_mark: bool = True, kind: RevisionKind = "del") -> list[etree._Element]:
    """Track the deletion of every run of *p* and, with *include_mark*, of its paragraph mark.

    The mark is kept (not deleted) when the paragraph carries a section break (``w:pPr/
    w:sectPr``: deleting it would delete the section) or is the last paragraph of a table
    cell or of the body (a container must keep a final paragraph, §17.4.66).  Returns the
    wrappers written.
    """
    runs = [r for r in paragraph_runs(p) if not _is_deleted(r, p)]
    wrappers = _wrap_runs(runs, kind, stamp=stamp, ids=ids)
    if include_mark and paragraph_mark_deletable(p):
        mark_paragraph(p, kind, stamp=stamp, ids=ids)
    return wrappers


def paragraph_mark_deletable(p: etree._Element) -> bool:
    """False for a section-break paragraph, and for a paragraph not followed by another
    paragraph (the last of its cell or of the body, or one just before a table): its mark has
    nothing to merge into, and word processors keep an empty paragraph instead (LibreOffice
    7.4 does, checked on this machine type)."""
    ppr = p.find(_PPR)
    if ppr is not None and ppr.find(w("sectPr")) is not None:
        return False
    return followed_by_paragraph(p)


def followed_by_paragraph(p: etree._Element) -> bool:
    """True when the next block-level element after *p* is a paragraph."""
    nxt = p.getnext()
    while nxt is not None and nxt.tag in _RANGE_MARKUP:
        nxt = nxt.getnext()
    return nxt is not None and nxt.tag == _P


#: Range markers that may sit between paragraphs (§17.13.6 bookmarks, §17.13.4 comments,
#: §17.13.5 move ranges, permissions, proofing marks): skipped when looking for the next one.
_RANGE_MARKUP = frozenset(w(t) for t in (
    "bookmarkStart", "bookmarkEnd", "commentRangeStart", "commentRangeEnd", "permStart",
    "permEnd", "proofErr", "moveFromRangeStart", "moveFromRangeEnd", "moveToRangeStart",
    "moveToRangeEnd"))


def insert_paragraph_after(anchor: etree._Element, text: str, *, ppr: etree._Element | None,
                           rpr: etree._Element | None, stamp: RevisionStamp, ids: IdAllocator,
                           kind: RevisionKind = "ins") -> etree._Element:
    """Insert a new paragraph after *anchor* as a tracked insertion (content and mark).

    *ppr* (copied) gives the paragraph properties -- pass a neighbour's so that numbering and
    style match -- and *rpr* (copied, revision marks removed) the run properties.
    """
    p = etree.Element(_P)
    if ppr is not None:
        new_ppr = copy.deepcopy(ppr)
        for child in list(new_ppr):
            if child.tag in (w("sectPr"), w("pPrChange")):
                new_ppr.remove(child)
        p.append(new_ppr)
    runs = make_runs(text, rpr, deleted=kind in ("del", "moveFrom"))
    if runs:
        p.append(wrap(kind, runs, stamp=stamp, ids=ids))
    mark_paragraph(p, kind, stamp=stamp, ids=ids)
    anchor.addnext(p)
    return p


def anchor_comment(first: etree._Element, last: etree._Element, comment_id: int) -> None:
    """Put ``w:commentRangeStart`` before *first*, ``w:commentRangeEnd`` after *last* and a
    run holding ``w:commentReference`` after the range end (§17.13.4.3 - §17.13.4.5).

    *first* and *last* are run-level elements (runs or revision wrappers) of one paragraph,
    *first* not after *last*.
    """
    start = etree.Element(w("commentRangeStart"))
    start.set(_W_ID, str(comment_id))
    end = etree.Element(w("commentRangeEnd"))
    end.set(_W_ID, str(comment_id))
    ref_run = etree.Element(_R)
    ref = etree.SubElement(ref_run, w("commentReference"))
    ref.set(_W_ID, str(comment_id))
    first.addprevious(start)
    last.addnext(end)
    end.addnext(ref_run)


def build_comments_part(comments: Sequence[Comment], *, existing: bytes | None = None) -> bytes:
    """The bytes of ``word/comments.xml`` (§17.13.4.2) holding *existing* comments plus ours."""
    if existing is not None:
        root = etree.fromstring(existing, parser=_PARSER)
    else:
        root = etree.Element(w("comments"), nsmap={"w": W_NS})
    for c in comments:
        el = etree.SubElement(root, w("comment"))
        el.set(_W_ID, str(c.id))
        el.set(w("author"), c.author)
        el.set(w("date"), c.date)
        if c.initials:
            el.set(w("initials"), c.initials)
        for line in c.text.split("\n") or [""]:
            p = etree.SubElement(el, _P)
            if line:
                p.extend(make_runs(line))
    return part_bytes(root)


_PARSER = etree.XMLParser(resolve_entities=False, no_network=True, huge_tree=False,
                          remove_blank_text=False)


# --------------------------------------------------------------------------------------
# Editing an existing paragraph by block-text offsets
# --------------------------------------------------------------------------------------

def _pieces(p: etree._Element) -> list[tuple[int, int, etree._Element, str]]:
    """``(start, end, content element, text)`` for every piece of *p*'s block text."""
    from .blocks import paragraph_pieces

    out = []
    pos = 0
    for piece in paragraph_pieces(p):
        text = piece.text
        el = piece.node if piece.node is not None else piece.element
        out.append((pos, pos + len(text), el, text))
        pos += len(text)
    return out


def _run_of(el: etree._Element) -> etree._Element | None:
    cur: etree._Element | None = el
    while cur is not None and cur.tag != _R:
        if cur.tag == _P:
            return None
        cur = cur.getparent()
    return cur


def _split_run_before(run: etree._Element, child: etree._Element) -> etree._Element:
    """Move *child* and every later content child of *run* into a new run (same ``w:rPr``)
    placed right after *run*; returns the new run."""
    new = etree.Element(_R)
    for name, value in run.attrib.items():
        if not name.startswith(w("rsid")):
            new.set(name, value)
    rpr = run.find(_RPR)
    if rpr is not None:
        new.append(copy.deepcopy(rpr))
    moving = []
    cur = child
    while cur is not None:
        moving.append(cur)
        cur = cur.getnext()
    for el in moving:
        new.append(el)
    run.addnext(new)
    return new


def _has_content_before(run: etree._Element, child: etree._Element) -> bool:
    cur = child.getprevious()
    while cur is not None:
        if cur.tag != _RPR:
            return True
        cur = cur.getprevious()
    return False


def _split_at(p: etree._Element, offset: int) -> None:
    """Make *offset* fall on a run boundary (no run holds text on both sides of it)."""
    for start, end, el, _text in _pieces(p):
        if start < offset < end:
            if el.tag != _T:
                return  # a one-character piece cannot be cut; offsets come from whole words
            cut = offset - start
            tail = _text_element("t", el.text[cut:] if el.text else "")
            el.text = el.text[:cut]
            if el.text != el.text.strip():
                el.set(XML_SPACE, "preserve")
            el.addnext(tail)
            run = _run_of(el)
            if run is not None:
                _split_run_before(run, tail)
            return
        if start == offset and start < end:
            run = _run_of(el)
            if run is not None and _has_content_before(run, el):
                _split_run_before(run, el)
            return
    return


def _runs_in(p: etree._Element, start: int, end: int) -> list[etree._Element]:
    """Runs of *p* between block offsets start and end (after :func:`_split_at`), including
    text-less runs (field characters, field codes) lying between two of them."""
    pieces = _pieces(p)
    inside = [_run_of(el) for s, e, el, _ in pieces if s >= start and e <= end and e > s]
    inside = [r for r in inside if r is not None]
    if not inside:
        return []
    all_runs = paragraph_runs(p)
    first = all_runs.index(inside[0])
    last = all_runs.index(inside[-1])
    return [r for r in all_runs[first:last + 1] if not _is_deleted(r, p)]


def _neighbour_run(p: etree._Element, offset: int) -> tuple[etree._Element | None, str]:
    """The run ending at *offset* ("after") or, failing that, the one starting there
    ("before"); ("", None) when the paragraph has no text run."""
    pieces = _pieces(p)
    before = [el for s, e, el, _ in pieces if e == offset and e > s]
    if before:
        run = _run_of(before[-1])
        if run is not None:
            return run, "after"
    after = [el for s, e, el, _ in pieces if s == offset and e > s]
    if after:
        run = _run_of(after[0])
        if run is not None:
            return run, "before"
    return None, ""


def _outermost_in_paragraph(el: etree._Element, p: etree._Element) -> etree._Element:
    """*el* or the wrapper (w:del/w:ins/...) directly around it that is a sibling level to use
    as an insertion point: we climb only through revision wrappers we must not split."""
    cur = el
    while cur.getparent() is not None and cur.getparent() is not p and cur.getparent().tag in (
        w("ins"), w("del"), w("moveFrom"), w("moveTo")
    ):
        cur = cur.getparent()
    return cur


def apply_paragraph_edits(p: etree._Element, edits: Sequence[TextEdit], *, stamp: RevisionStamp,
                          ids: IdAllocator) -> None:
    """Write *edits* (block-text offsets of *p*, not overlapping) into *p* as tracked changes.

    Deleted text stays in place inside ``w:del``; the replacement follows it in ``w:ins``
    with the run properties of the first deleted run (or, for a pure insertion, of the run
    before the insertion point, else the run after it).  A comment id on an edit anchors that
    comment on the changed words.
    """
    ordered = sorted(edits, key=lambda e: (e.start, e.end))
    for a, b in zip(ordered, ordered[1:]):
        if b.start < a.end:
            raise ValueError(f"overlapping edits {a} and {b}")
    total = sum(e - s for s, e, _, _ in _pieces(p)) if ordered else 0
    for e in ordered:
        if not 0 <= e.start <= e.end <= total:
            raise ValueError(f"edit {e} outside the paragraph text (length {total})")
    # Work from the end so that earlier offsets stay valid.
    for edit in reversed(ordered):
        _apply_one(p, edit, stamp=stamp, ids=ids)


def _insertion_point(p: etree._Element, at: int) -> tuple[etree._Element | None, etree._Element | None,
                                                     etree._Element | None]:
    """(run properties to copy, element to insert after, element to insert before) for new
    text at offset *at* of *p* where nothing is deleted: beside the neighbouring run, if any."""
    run, side = _neighbour_run(p, at)
    if run is None:
        return None, None, None
    target = _outermost_in_paragraph(run, p)
    if side == "after":
        return run.find(_RPR), target, None
    return run.find(_RPR), None, target


def _apply_one(p: etree._Element, edit: TextEdit, *, stamp: RevisionStamp, ids: IdAllocator) -> None:
    _split_at(p, edit.end)
    _split_at(p, edit.start)
    if not edit.track:
        if edit.comment is not None:
            _comment_on_text(p, edit.start, edit.end, edit.comment)
        return
    doomed = _runs_in(p, edit.start, edit.end) if edit.end > edit.start else []
    written: list[etree._Element] = []
    insert_before: etree._Element | None = None
    if doomed:
        rpr_source = doomed[0].find(_RPR)
        rpr_source = copy.deepcopy(rpr_source) if rpr_source is not None else None
        wrappers = _wrap_runs(doomed, "del", stamp=stamp, ids=ids)
        written.extend(wrappers)
        insert_after: etree._Element | None = wrappers[-1]
    else:
        rpr_source, insert_after, insert_before = _insertion_point(p, edit.start)
    lines = edit.replacement.split("\n") if edit.paragraphs else [edit.replacement]
    if lines[0]:
        ins = wrap("ins", make_runs(lines[0], rpr_source), stamp=stamp, ids=ids)
        if doomed and edit.insert_first:
            written[0].addprevious(ins)
            written.insert(0, ins)
        elif insert_after is not None:
            insert_after.addnext(ins)
        elif insert_before is not None:
            insert_before.addprevious(ins)
        else:
            _append_content(p, ins)
        if ins not in written:
            written.append(ins)
    if len(lines) > 1:
        cut = written[-1] if written else insert_after
        if cut is None and insert_before is not None:
            cut = insert_before.getprevious()
        written.extend(_new_paragraphs(p, cut, lines[1:], rpr_source, stamp=stamp, ids=ids))
    if edit.comment is not None:
        if written:
            anchor_comment(written[0], written[-1], edit.comment)
        else:
            _comment_on_text(p, edit.start, edit.end, edit.comment)


def _new_paragraphs(p: etree._Element, cut: etree._Element | None, lines: Sequence[str],
                    rpr: etree._Element | None, *, stamp: RevisionStamp,
                    ids: IdAllocator) -> list[etree._Element]:
    """Start a new paragraph after *cut* (a descendant of *p*; None: at the start of *p*'s
    content) for each of *lines*, each opening with that line as a tracked insertion; the
    words after *cut* end up in the last one.  Returns the insertions written."""
    written = []
    for line in lines:
        q = split_paragraph_after(p, cut, stamp=stamp, ids=ids)
        ins = wrap("ins", make_runs(line, rpr), stamp=stamp, ids=ids) if line else None
        ppr = q.find(_PPR)
        if ins is not None:
            if ppr is not None:
                ppr.addnext(ins)
            else:
                q.insert(0, ins)
            written.append(ins)
        p, cut = q, ins if ins is not None else ppr
    return written


def split_paragraph_after(p: etree._Element, cut: etree._Element | None, *, stamp: RevisionStamp,
                          ids: IdAllocator) -> etree._Element:
    """Cut paragraph *p* after its descendant *cut* (None or its ``w:pPr``: before all its
    content), as a reviewer pressing Enter there: what follows moves into a new paragraph
    placed after *p*, and *p*'s paragraph mark is tracked as inserted (ECMA-376 Part 1
    §17.13.5.16), so rejecting joins the two again.  The new paragraph copies *p*'s
    properties without numbering (it continues the provision) and without revision marks.
    Containers between *cut* and *p* (hyperlinks, content controls, revision wrappers) are
    split in two; a copied revision wrapper gets a fresh id.  Returns the new paragraph."""
    q = etree.Element(_P)
    ppr = p.find(_PPR)
    if ppr is not None:
        new_ppr = copy.deepcopy(ppr)
        for child in list(new_ppr):
            if child.tag in (w("numPr"), w("sectPr"), w("pPrChange")):
                new_ppr.remove(child)
        rpr = new_ppr.find(_RPR)
        if rpr is not None:
            for mark in [c for c in rpr if c.tag in _RPR_REVISION_TAGS]:
                rpr.remove(mark)
        q.append(new_ppr)
    if cut is None or cut is ppr:
        moving = [c for c in p if c.tag != _PPR]
    else:
        moving = []
        node = cut
        while node.getparent() is not p:
            parent = node.getparent()
            clone = etree.Element(parent.tag, attrib=dict(parent.attrib))
            if parent.tag in _REVISION_WRAPPERS:
                clone.set(_W_ID, str(ids.next()))
            for el in moving + list(node.itersiblings()):
                clone.append(el)
            moving = [clone] if len(clone) else []
            node = parent
        moving += list(node.itersiblings())
    for el in moving:
        q.append(el)
    p.addnext(q)
    mark_paragraph(p, "ins", stamp=stamp, ids=ids)
    return q


_REVISION_WRAPPERS = frozenset({w("ins"), w("del"), w("moveFrom"), w("moveTo")})


def _comment_on_text(p: etree._Element, start: int, end: int, comment_id: int) -> None:
    """Anchor a comment on the (unchanged) words ``start:end``, or at the point *start*."""
    runs = _runs_in(p, start, end) if end > start else []
    if runs:
        first = _outermost_in_paragraph(runs[0], p)
        last = _outermost_in_paragraph(runs[-1], p)
        if first.getparent() is last.getparent():
            anchor_comment(first, last, comment_id)
            return
        anchor_comment(runs[0], runs[-1], comment_id)
        return
    run, side = _neighbour_run(p, start)
    if run is None:
        marker = etree.Element(_R)
        _append_content(p, marker)
        anchor_comment(marker, marker, comment_id)
        return
    target = _outermost_in_paragraph(run, p)
    anchor_comment(target, target, comment_id)


def _append_content(p: etree._Element, el: etree._Element) -> None:
    """Append a run-level element at the end of *p*'s content."""
    p.append(el)
