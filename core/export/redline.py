"""The comparison redline: precedent to draft as tracked changes in a new .docx.

Two views (``show``):

* ``"substantive"`` (the default): the draft's own text, with only the substantive
  deviations (``Deviation.category == "substantive"``) as tracked changes -- the changed
  words of a provision (its ``draft_span``, with the precedent's ``precedent_span`` words
  deleted before them), a changed heading (``part == "heading"``), an added or a removed
  provision.  Renamed defined terms, renumbered labels and cross-references, quote, case,
  whitespace, dash and other formatting or punctuation differences are shown as the draft
  has them, and a moved provision appears once, at the draft's position.  A short section
  after the caution lists the renamed terms and counts what was not marked.  Accepting all
  changes gives the draft; rejecting all gives the draft with its substantive deviations
  undone.
* ``"all"``: every difference as a tracked change, moved provisions as OOXML moves
  (``w:moveFrom``/``w:moveTo`` inside their range markers, ECMA-376 Part 1 §17.13.5).
  Accepting all gives the draft, rejecting all the precedent.

Both views lay the paragraphs out the same way (:func:`_steps`); only the rendering differs.
Word changes are the review's own (``Pair.edits`` and the deviations' spans): nothing here
diffs the texts again.
"""


import datetime as _dt
import difflib
import os
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Literal

from rapidfuzz.distance import Indel

from .. import CAUTION, __version__
from ..docx.revisions import RevisionKind, RevisionStamp
from ..docx.writer import Element, Para, Run, Table, build_docx
from ..fileio import atomic_write_bytes
from ..labels import clause_label
from ..model import Block, Deviation, Edit, Provision, Review
from .common import (
    CAUTION_PROPERTY,
    block_owners,
    block_ranges,
    check_output,
    default_author,
    provision_blocks,
    stamp_date,
)

__all__ = [
    "BRACKET_TAIL_MAX",
    "PAIR_GAP_MAX_CELLS",
    "PAIR_PARAGRAPH_MIN_RATIO",
    "REDLINE_BODY_HEADING",
    "REDLINE_BODY_HEADINGS",
    "REDLINE_DEFAULT_SHOW",
    "REDLINE_END",
    "REDLINE_SHOW_CHOICES",
    "REDLINE_TABLE_MAX",
    "REDLINE_TABLE_WIDTHS_CM",
    "REDLINE_TERMS_WIDTHS_CM",
    "RedlineShow",
    "redline_body",
    "redline_bytes",
    "write_redline",
]

#: What the comparison marks: the substantive deviations only, or every difference.
RedlineShow = Literal["substantive", "all"]
REDLINE_SHOW_CHOICES: tuple[str, ...] = ("substantive", "all")
#: The substantive view by default: in the demo the full comparison marks 862 runs for 30
#: substantive deviations (renamed terms, renumbering and quote styles make up the rest), so
#: the few changes that matter are hard to find in it.
REDLINE_DEFAULT_SHOW: RedlineShow = "substantive"

#: Heading that opens the comparison body of the redline (after the caution and the
#: tables), per view.
REDLINE_BODY_HEADINGS: Mapping[str, str] = {
    "substantive": "Comparison: the draft, its substantive deviations as tracked changes",
    "all": "Comparison: precedent to draft, as tracked changes",
}
#: The full comparison's heading (the ``"all"`` view).
REDLINE_BODY_HEADING = REDLINE_BODY_HEADINGS["all"]

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
#: Column widths of the renamed-terms table of the substantive view (same units): the two
#: names share most of the width (defined terms run to a few words, "Confidential
#: Information"); the count of uses needs only its header, "Uses in the draft" (about
#: 2.9 cm in bold 9 pt DejaVu Serif, by the measure above) plus the cell margins.
REDLINE_TERMS_WIDTHS_CM = (6.25, 6.25, 3.5)

#: The review's word spans stop at the changed word, so a changed figure in brackets often
#: leaves its bracket open ("ninety (90" then ") days").  The substantive view carries the
#: mark on to the closing bracket when at most this many identical characters without a
#: space lead to it on both sides: the bracket itself and a unit sign before it, as in
#: "(4%)" (the demo's figures; common drafting practice, no source).
BRACKET_TAIL_MAX = 2


# --------------------------------------------------------------------------------------
# Paragraph layout shared by both views
# --------------------------------------------------------------------------------------


def _line(block: Block) -> str:
    """A block as the redline shows it: its auto-number label, a tab, its text."""
    return f"{block.label}\t{block.text}" if block.label else block.text


@dataclass(frozen=True, slots=True)
class _Layout:
    """What the paragraph layout needs to know of a review (built once by :func:`_layout`).

    ``powners``/``downers`` map a block to (provision id, part) as
    :func:`core.export.common.block_owners` does; ``aligned`` maps a draft provision to the
    precedent provision it is aligned with one to one in place, ``moved`` one aligned but
    moved; ``move_names`` names each move by its precedent provision."""

    review: Review
    plines: tuple[str, ...]
    dlines: tuple[str, ...]
    powners: dict[int, tuple[str, int]]
    downers: dict[int, tuple[str, int]]
    aligned: Mapping[str, str]
    moved: Mapping[str, str]
    move_names: Mapping[str, str]
    pprovs: Mapping[str, Provision]
    dprovs: Mapping[str, Provision]
    #: (draft pid, precedent pid) -> the pair's word diff, for the pairs that have one.
    edits: Mapping[tuple[str, str], tuple[Edit, ...]]


def _one_to_one(review: Review) -> tuple[dict[str, str], dict[str, str]]:
    """(draft pid -> precedent pid) of the pairs aligned one to one in place, and of those
    moved; split and merged provisions are compared paragraph by paragraph in the gaps."""
    counts_d: dict[str, int] = {}
    counts_p: dict[str, int] = {}
    for pair in review.pairs:
        if pair.draft and pair.precedent:
            counts_d[pair.draft] = counts_d.get(pair.draft, 0) + 1
            counts_p[pair.precedent] = counts_p.get(pair.precedent, 0) + 1
    aligned: dict[str, str] = {}
    moved: dict[str, str] = {}
    for pair in review.pairs:
        if not (pair.draft and pair.precedent):
            continue
        if counts_d[pair.draft] != 1 or counts_p[pair.precedent] != 1:
            continue
        (moved if pair.status == "moved" else aligned)[pair.draft] = pair.precedent
    return aligned, moved


def _layout(review: Review) -> _Layout:
    aligned, moved = _one_to_one(review)
    by_order = sorted(moved.values(), key=lambda pid: (len(pid), pid))
    return _Layout(
        review=review,
        plines=tuple(_line(b) for b in review.precedent.blocks),
        dlines=tuple(_line(b) for b in review.draft.blocks),
        powners=block_owners(review.precedent), downers=block_owners(review.draft),
        aligned=aligned, moved=moved,
        move_names={ppid: f"cdMove{n}" for n, ppid in enumerate(by_order, 1)},
        pprovs={p.id: p for p in review.precedent.provisions},
        dprovs={p.id: p for p in review.draft.provisions},
        edits={(p.draft, p.precedent): p.edits for p in review.pairs
               if p.draft and p.precedent and p.edits},
    )


#: A paragraph's key for :func:`_steps`: ("text", casefolded text) or (kind, (provision id, part)).
_Key = tuple[str, str | tuple[str, int]]


def _keys(lay: _Layout) -> tuple[list[_Key], list[_Key]]:
    """The paragraph keys :func:`_steps` matches: a precedent paragraph by its provision and
    its place in it; a draft paragraph by the precedent provision it is aligned with, so
    aligned provisions match whatever their numbers; paragraphs outside any provision by
    their text.  Paragraphs of moved provisions get keys that never match in place."""
    moved_p = set(lay.moved.values())

    def by_text(line: str) -> _Key:
        return ("text", line.split("\t", 1)[-1].strip().casefold())

    pkeys: list[_Key] = []
    for i, line in enumerate(lay.plines):
        own = lay.powners.get(i)
        pkeys.append(by_text(line) if own is None else
                     ("moved-from", own) if own[0] in moved_p else ("prov", own))
    dkeys: list[_Key] = []
    for j, line in enumerate(lay.dlines):
        own = lay.downers.get(j)
        if own is None:
            dkeys.append(by_text(line))
        elif own[0] in lay.moved:
            dkeys.append(("moved-to", own))
        elif own[0] in lay.aligned:
            dkeys.append(("prov", (lay.aligned[own[0]], own[1])))
        else:
            dkeys.append(("draft-only", own))
    return pkeys, dkeys


def _moved_sources(lay: _Layout) -> dict[int, int]:
    """Draft paragraph of a moved provision -> the precedent paragraph it was moved from."""
    p_index = {own: i for i, own in lay.powners.items()}
    out: dict[int, int] = {}
    for j, own in lay.downers.items():
        if own[0] in lay.moved:
            src = p_index.get((lay.moved[own[0]], own[1]))
            if src is not None:
                out[j] = src
    return out


#: One step of the layout: ("same", i, j) precedent paragraph i shown as draft paragraph j;
#: ("del", i, None) and ("ins", None, j) a paragraph of one side only; ("moveFrom", i, None)
#: a paragraph moved away from here and ("moveTo", j, i) moved here from precedent i.
_Step = (tuple[Literal["same"], int, int] | tuple[Literal["del", "moveFrom"], int, None]
         | tuple[Literal["ins"], None, int] | tuple[Literal["moveTo"], int, int])


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


def _gap_steps(lay: _Layout, pkeys: Sequence[_Key], dkeys: Sequence[_Key],
               i_range: range, j_range: range, sources: Mapping[int, int]) -> list[_Step]:
    """The steps of one gap between matched paragraphs.  The pairing is monotone in both
    documents; moved paragraphs are slotted in at their own document's position, so
    accepting gives the draft's order and rejecting the precedent's."""
    targets = set(sources.values())
    pa = [i for i in i_range if pkeys[i][0] != "moved-from"]
    da = [j for j in j_range if dkeys[j][0] != "moved-to"]
    moved_from = [i for i in i_range if pkeys[i][0] == "moved-from"]
    moved_to = [j for j in j_range if dkeys[j][0] == "moved-to"]

    def away(i: int) -> _Step:
        return ("moveFrom", i, None) if i in targets else ("del", i, None)

    def here(j: int) -> _Step:
        return ("moveTo", j, sources[j]) if j in sources else ("ins", None, j)

    out: list[_Step] = []
    for pi, dj in _pair_gap(pa, da, lay.plines, lay.dlines):
        while pi is not None and moved_from and moved_from[0] < pi:
            out.append(away(moved_from.pop(0)))
        while dj is not None and moved_to and moved_to[0] < dj:
            out.append(here(moved_to.pop(0)))
        if pi is not None and dj is not None:
            out.append(("same", pi, dj))
        elif pi is not None:
            out.append(("del", pi, None))
        elif dj is not None:
            out.append(("ins", None, dj))
    out.extend(away(i) for i in moved_from)
    out.extend(here(j) for j in moved_to)
    return out


def _steps(lay: _Layout) -> list[_Step]:
    """Both documents' paragraphs in one sequence: ``difflib.SequenceMatcher`` over the
    paragraph keys (:func:`_keys`) gives the matched paragraphs, and the gaps (paragraphs of
    one side, paired by similarity when close; moved ones at their own positions).  Every
    draft paragraph appears once, in the draft's order, and every precedent paragraph once,
    in the precedent's."""
    pkeys, dkeys = _keys(lay)
    sources = _moved_sources(lay)
    out: list[_Step] = []
    sm = difflib.SequenceMatcher(None, pkeys, dkeys, autojunk=False)
    for tag, i1, i2, j1, j2 in sm.get_opcodes():
        if tag == "equal":
            out.extend(("same", i, j) for i, j in zip(range(i1, i2), range(j1, j2)))
        else:
            out.extend(_gap_steps(lay, pkeys, dkeys, range(i1, i2), range(j1, j2), sources))
    return out


# --------------------------------------------------------------------------------------
# The "all" view: every difference, word by word, moves as moves
# --------------------------------------------------------------------------------------

#: One piece of a redline paragraph: (unchanged?, the precedent's text, the draft's text);
#: an unchanged piece has the same text on both sides.
_Piece = tuple[bool, str, str]


def _inside_word(x: str, y: str, k: int) -> bool:
    """Position *k* of *x* (whose first *k* characters *y* shares) cuts a word."""
    return k > 0 and x[k - 1].isalnum() and ((k < len(x) and x[k].isalnum())
                                             or (k < len(y) and y[k].isalnum()))


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
    while _inside_word(a, b, c1):
        c1 -= 1
    c2 = 0
    while c2 < n - c1 and a[la - 1 - c2] == b[lb - 1 - c2]:
        c2 += 1
    ra, rb = a[::-1], b[::-1]  # the common end, read backwards, must not cut a word either
    while _inside_word(ra, rb, c2):
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


def _piece_runs(pieces: Sequence[_Piece], *, moved: bool = False) -> tuple[Run, ...]:
    """Runs showing the pieces: unchanged text plain (or moveTo when *moved*), the
    precedent's side of a changed piece ``del``, the draft's ``ins``.  In a moved paragraph
    deleted words are left out (they show in the moveFrom copy)."""
    runs: list[Run] = []
    for same, a, b in pieces:
        if same:
            runs.append(Run(b, "moveTo" if moved else ""))
            continue
        if a and not moved:
            runs.append(Run(a, "del"))
        if b:
            runs.append(Run(b, "ins"))
    return _merge_runs(runs)


def _merge_runs(runs: Sequence[Run]) -> tuple[Run, ...]:
    """The runs without empty ones, neighbours with the same mark joined."""
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


def _word_pieces(lay: _Layout, i: int, j: int) -> list[_Piece]:
    """Precedent paragraph *i* turned into draft paragraph *j*: the aligned pair's word diff
    (``Pair.edits``) restricted to the paragraph's stretch of each provision; what the
    review does not diff -- number labels, run-in headings, heading lines and paragraphs
    outside any aligned pair -- as a common beginning and end around a changed middle."""
    review = lay.review
    pl, dl = lay.plines[i], lay.dlines[j]
    po, do = lay.powners.get(i), lay.downers.get(j)
    if po is None or do is None or po[1] < 0 or do[1] < 0:
        return _affix_pieces(pl, dl)
    edits = lay.edits.get((do[0], po[0]))
    pprov, dprov = lay.pprovs[po[0]], lay.dprovs[do[0]]
    ps, ds = _segment_in_block(pprov, i), _segment_in_block(dprov, j)
    if edits is None or ps is None or ds is None:
        return _affix_pieces(pl, dl)
    # the line is: label, tab, the block's text; the segment sits inside the text
    pb = len(pl) - len(review.precedent.blocks[i].text)
    db = len(dl) - len(review.draft.blocks[j].text)
    p_off, p_start, p_end = ps
    d_off, d_start, d_end = ds
    return (_affix_pieces(pl[:pb + p_start], dl[:db + d_start])
            + _clipped_pieces(edits, pprov.text, dprov.text, (p_off, p_off + p_end - p_start),
                              (d_off, d_off + d_end - d_start))
            + _affix_pieces(pl[pb + p_end:], dl[db + d_end:]))


def _whole(text: str, mark: RevisionKind, *, move: str | None = None) -> Para:
    """A paragraph of one side only: all its text and its paragraph mark carry *mark*."""
    return Para((Run(text, mark),) if text else (), mark=mark, move=move)


def _all_paragraphs(lay: _Layout, steps: Sequence[_Step]) -> list[Para]:
    """The ``"all"`` view of the steps: word changes, whole deleted and inserted paragraphs,
    and moves (``moveFrom`` at the precedent's position, ``moveTo`` at the draft's, named
    per aligned pair, with the word changes inside the move)."""
    out: list[Para] = []
    for step in steps:
        if step[0] == "same":
            _, a, b = step
            pl, dl = lay.plines[a], lay.dlines[b]
            if pl == dl:
                out.append(Para((Run(dl),) if dl else ()))
            elif not pl or not dl:
                # An empty paragraph against a full one: a deleted and an inserted paragraph
                # read better, and a paragraph whose words are all inserted (or all deleted)
                # behind an untracked mark leaves an empty paragraph behind.
                out.extend((_whole(pl, "del"), _whole(dl, "ins")))
            else:
                out.append(Para(_piece_runs(_word_pieces(lay, a, b))))
        elif step[0] == "ins":
            out.append(_whole(lay.dlines[step[2]], "ins"))
        elif step[0] == "moveTo":
            _, j, i = step
            name = lay.move_names[lay.moved[lay.downers[j][0]]]
            out.append(Para(_piece_runs(_word_pieces(lay, i, j), moved=True), mark="moveTo", move=name))
        elif step[0] == "del":
            out.append(_whole(lay.plines[step[1]], "del"))
        else:  # moveFrom
            i = step[1]
            out.append(_whole(lay.plines[i], "moveFrom", move=lay.move_names[lay.powners[i][0]]))
    return out


# --------------------------------------------------------------------------------------
# The "substantive" view: the draft's text, its substantive deviations tracked
# --------------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class _Mark:
    """A tracked change inside one draft paragraph: the block's ``text[start:end]`` is
    inserted and ``deleted`` (the precedent's words) is deleted just before it."""

    start: int
    end: int
    deleted: str


@dataclass(frozen=True, slots=True)
class _Substance:
    """Where the substantive deviations show: marks per draft block (sorted, disjoint),
    draft blocks shown as inserted paragraphs, precedent blocks shown as deleted ones."""

    marks: Mapping[int, tuple[_Mark, ...]]
    inserted: frozenset[int]
    deleted: frozenset[int]


def _substantive(review: Review) -> list[Deviation]:
    return [d for d in review.deviations if d.category == "substantive"]


def _joined_spans(devs: Sequence[Deviation]) -> list[tuple[int, int, tuple[int, int] | None]]:
    """The draft and precedent spans of one pair's word deviations, those that overlap or
    touch on either side joined into one change (so that one stretch of words is marked
    once): (draft start, draft end, precedent span or None)."""
    out: list[tuple[int, int, tuple[int, int] | None]] = []
    for d in sorted(devs, key=lambda d: d.draft_span):  # type: ignore[arg-type, return-value]
        d1, d2 = d.draft_span  # type: ignore[misc]
        p = d.precedent_span
        if out:
            a1, a2, q = out[-1]
            if d1 <= a2 or (p is not None and q is not None and p[0] < q[1]):
                joined = q if p is None else p if q is None else (min(q[0], p[0]), max(q[1], p[1]))
                out[-1] = (a1, max(a2, d2), joined)
                continue
        out.append((d1, d2, p))
    return out


def _close_bracket(ptext: str, dtext: str, pspan: tuple[int, int],
                   dspan: tuple[int, int]) -> tuple[tuple[int, int], tuple[int, int]]:
    """Both spans carried on to the closing bracket of a figure they open and leave open
    ("ninety (90" and "thirty (30" before ") days" become "ninety (90)" and "thirty (30)")
    when the same few characters without a space lead to it on both sides
    (:data:`BRACKET_TAIL_MAX`); otherwise the spans as they are."""
    (p1, p2), (d1, d2) = pspan, dspan
    opened = all(t.count("(") > t.count(")") for t in (ptext[p1:p2], dtext[d1:d2]))
    close = dtext.find(")", d2, d2 + BRACKET_TAIL_MAX)
    if not opened or close < 0:
        return pspan, dspan
    tail = dtext[d2:close + 1]
    if any(c.isspace() for c in tail) or ptext[p2:p2 + len(tail)] != tail:
        return pspan, dspan
    return (p1, p2 + len(tail)), (d1, d2 + len(tail))


def _text_marks(lay: _Layout) -> list[tuple[int, _Mark]]:
    """(draft block, mark) of each substantive deviation in a provision's words: the draft's
    words of its ``draft_span`` inserted, the precedent's words of its ``precedent_span``
    deleted before them (split at paragraph ends, the deleted words with the first piece)."""
    groups: dict[tuple[str, str], list[Deviation]] = {}
    for d in _substantive(lay.review):
        if d.part == "text" and d.draft_span is not None and d.draft_provision in lay.dprovs \
                and d.precedent_provision in lay.pprovs:
            groups.setdefault((d.draft_provision, d.precedent_provision), []).append(d)  # type: ignore[arg-type]
    out: list[tuple[int, _Mark]] = []
    for (dpid, ppid), devs in groups.items():
        dprov, pprov = lay.dprovs[dpid], lay.pprovs[ppid]
        for d1, d2, pspan in _joined_spans(devs):
            if pspan is not None:
                pspan, (d1, d2) = _close_bracket(pprov.text, dprov.text, pspan, (d1, d2))
            deleted = pprov.text[pspan[0]:pspan[1]] if pspan else ""
            for k, (block, start, end) in enumerate(block_ranges(dprov, d1, d2)):
                out.append((block, _Mark(start, end, deleted if k == 0 else "")))
    return out


def _heading_place(lay: _Layout, dprov: Provision) -> tuple[int, int, bool] | None:
    """(block, offset in its text, standalone?) of the draft provision's heading: on a line
    of its own (block part -1) or run in before the first line of its text; None when the
    heading cannot be found there."""
    heading = dprov.heading or ""
    blocks = lay.review.draft.blocks
    line = next((b for b, own in lay.downers.items() if own == (dprov.id, -1)), None)
    if line is not None:
        k = blocks[line].text.find(heading)
        return (line, k, True) if k >= 0 else None
    if not dprov.segments:
        return None
    seg = dprov.segments[0]
    k = blocks[seg.block].text.rfind(heading, 0, seg.start)
    return (seg.block, k, False) if k >= 0 else None


def _heading_marks(lay: _Layout) -> tuple[list[tuple[int, _Mark]], set[int], set[int]]:
    """Marks of the substantive heading deviations (``part == "heading"``): the draft's
    heading inserted and the precedent's deleted before it.  A heading line only the draft
    has is an inserted paragraph; one only the precedent has, a deleted paragraph."""
    marks: list[tuple[int, _Mark]] = []
    inserted: set[int] = set()
    deleted: set[int] = set()
    for d in _substantive(lay.review):
        dprov = lay.dprovs.get(d.draft_provision or "")
        if d.part != "heading" or dprov is None:
            continue
        pprov = lay.pprovs.get(d.precedent_provision or "")
        old = (pprov.heading if pprov else None) or ""
        if not dprov.heading:
            deleted.update(b for b, own in lay.powners.items() if pprov and own == (pprov.id, -1))
            continue
        place = _heading_place(lay, dprov)
        if place is None:
            continue
        block, k, standalone = place
        if standalone and not old:
            inserted.add(block)
        else:
            marks.append((block, _Mark(k, k + len(dprov.heading), old)))
    return marks, inserted, deleted


def _disjoint(marks: Sequence[_Mark]) -> tuple[_Mark, ...]:
    """The marks of one block in order, overlapping or touching ones joined."""
    out: list[_Mark] = []
    for m in sorted(marks, key=lambda m: (m.start, m.end)):
        if out and m.start <= out[-1].end:
            last = out[-1]
            out[-1] = _Mark(last.start, max(last.end, m.end), last.deleted + m.deleted)
        else:
            out.append(m)
    return tuple(out)


def _substance(lay: _Layout) -> _Substance:
    """Where each substantive deviation shows in the substantive view.  O(deviations x
    blocks) at worst (each added or removed provision looks its blocks up)."""
    heading, inserted, deleted = _heading_marks(lay)
    by_block: dict[int, list[_Mark]] = {}
    for block, mark in _text_marks(lay) + heading:
        by_block.setdefault(block, []).append(mark)
    review = lay.review
    for d in _substantive(review):
        if d.change == "add-provision" and d.draft_provision in lay.dprovs:
            prov = lay.dprovs[d.draft_provision]  # type: ignore[index]
            inserted.update(provision_blocks(review.draft, prov, owners=lay.downers))
        elif d.change == "remove-provision" and d.precedent_provision in lay.pprovs:
            prov = lay.pprovs[d.precedent_provision]  # type: ignore[index]
            deleted.update(provision_blocks(review.precedent, prov, owners=lay.powners))
    return _Substance(marks={b: _disjoint(ms) for b, ms in by_block.items()},
                      inserted=frozenset(inserted), deleted=frozenset(deleted))


def _marked_paragraph(lay: _Layout, sub: _Substance, j: int) -> Para:
    """Draft paragraph *j* as the substantive view shows it: its line as plain text, each
    mark's words inserted after the precedent's words deleted; the whole paragraph inserted
    when it belongs to an added provision."""
    line = lay.dlines[j]
    if j in sub.inserted:
        return _whole(line, "ins")
    offset = len(line) - len(lay.review.draft.blocks[j].text)  # the label and its tab
    runs: list[Run] = []
    pos = 0
    for m in sub.marks.get(j, ()):
        a, b = offset + m.start, offset + m.end
        runs.extend((Run(line[pos:a]), Run(m.deleted, "del"), Run(line[a:b], "ins")))
        pos = b
    runs.append(Run(line[pos:]))
    return Para(_merge_runs(runs))


def _substantive_paragraphs(lay: _Layout, steps: Sequence[_Step], sub: _Substance) -> list[Para]:
    """The ``"substantive"`` view of the steps: every draft paragraph in the draft's order
    (a moved one once, at the draft's position), the precedent's paragraphs only where a
    substantive deviation removed them, as deleted paragraphs."""
    out: list[Para] = []
    for step in steps:
        if step[0] in ("same", "del", "moveFrom") and step[1] in sub.deleted:
            out.append(_whole(lay.plines[step[1]], "del"))
        if step[0] in ("same", "ins"):
            out.append(_marked_paragraph(lay, sub, step[2]))
        elif step[0] == "moveTo":
            out.append(_marked_paragraph(lay, sub, step[1]))
    return out


def redline_body(review: Review, *, show: RedlineShow = REDLINE_DEFAULT_SHOW) -> list[Para]:
    """The comparison paragraphs (``core.docx.writer.Para``) of precedent -> draft.

    Both views share one layout of the two documents' paragraphs (:func:`_steps`).  With
    ``show="all"`` every difference is a tracked change: matched paragraphs with the
    review's own word changes (``Pair.edits`` restricted to each paragraph), unmatched ones
    deleted or inserted, moved provisions as moves.  With ``show="substantive"`` the body is
    the draft's text and only the substantive deviations are tracked (their spans, their
    headings, added and removed provisions).  Either way accepting all changes gives the
    draft's lines (label, tab, text); in the ``"all"`` view rejecting all gives the
    precedent's.
    """
    if show not in REDLINE_SHOW_CHOICES:
        raise ValueError(f"show must be one of {REDLINE_SHOW_CHOICES}, not {show!r}")
    lay = _layout(review)
    steps = _steps(lay)
    if show == "all":
        return _all_paragraphs(lay, steps)
    return _substantive_paragraphs(lay, steps, _substance(lay))


# --------------------------------------------------------------------------------------
# The document: heading, caution, tables, comparison
# --------------------------------------------------------------------------------------


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


def _plural(n: int, one: str, many: str) -> str:
    return f"{n} {one if n == 1 else many}"


def _listed(parts: Sequence[str]) -> str:
    """"a", "a and b", "a, b and c"."""
    return parts[0] if len(parts) == 1 else ", ".join(parts[:-1]) + " and " + parts[-1]


def _ranked_section(review: Review) -> list[Element]:
    """The ranked table of substantive deviations (the first :data:`REDLINE_TABLE_MAX`)."""
    subs = sorted(_substantive(review), key=lambda d: d.rank)
    shown = subs[:REDLINE_TABLE_MAX]
    out: list[Element] = [Para((Run("Ranked substantive deviations"),), style="Heading1")]
    if not shown:
        return out + [Para((Run("No substantive deviation was found."),))]
    rows = tuple((str(d.rank), str(d.severity), clause_label(review, d) or "-", _summary(d))
                 for d in shown)
    out.append(Table(("Rank", "Severity", "Clause", "Deviation"), rows, widths=REDLINE_TABLE_WIDTHS_CM))
    if len(subs) > len(shown):
        out.append(Para((Run(f"{len(subs) - len(shown)} further substantive deviations are in "
                             "the issues list."),)))
    return out


def _left_out_counts(review: Review) -> str:
    """One sentence counting the other differences the substantive view leaves unmarked:
    numbering (labels and cross-references), formatting and punctuation, blanks filled in,
    moves."""
    devs = review.deviations
    numbering = [d for d in devs if d.category == "numbering" and d.change != "move"]
    refs = sum(d.part == "text" for d in numbering)
    other = sum(d.category in ("formatting", "punctuation") for d in devs)
    moves = sum(d.change == "move" for d in devs)
    filled = sum(d.category == "completion" for d in devs)
    parts: list[str] = []
    if numbering:
        detail = (f" ({_plural(len(numbering) - refs, 'label', 'labels')}, "
                  f"{_plural(refs, 'cross-reference', 'cross-references')})"
                  if 0 < refs < len(numbering) else "")
        parts.append(_plural(len(numbering), "numbering difference", "numbering differences") + detail)
    if other:
        parts.append(_plural(other, "formatting or punctuation difference",
                             "formatting and punctuation differences"))
    if filled:
        parts.append(_plural(filled, "blank of the precedent filled in",
                             "blanks of the precedent filled in"))
    if moves:
        parts.append(_plural(moves, "moved provision", "moved provisions")
                     + " (shown once, where the draft has " + ("it)" if moves == 1 else "them)"))
    if not parts:
        return "No other difference was found."
    return (f"Shown as the draft has them, without marks: {_listed(parts)}. The full "
            "comparison (counterdraft export --show all) marks every difference.")


def _left_out_section(review: Review) -> list[Element]:
    """What the substantive view does not mark: the renamed defined terms, then counts."""
    out: list[Element] = [
        Para((Run("Not marked in the comparison"),), style="Heading1"),
        Para((Run("The comparison below is the draft's own text: only its substantive "
                  "deviations from the precedent are tracked changes."),)),
    ]
    if review.term_map:
        out.append(Para((Run("The draft's names for these defined terms are shown without marks:"),)))
        rows = tuple((m.draft, m.precedent, str(m.occurrences)) for m in review.term_map)
        out.append(Table(("Draft's term", "Precedent's term", "Uses in the draft"), rows,
                         widths=REDLINE_TERMS_WIDTHS_CM))
    out.append(Para((Run(_left_out_counts(review)),)))
    return out


def redline_bytes(review: Review, *, author: str, date: _dt.datetime | None = None,
                  show: RedlineShow = REDLINE_DEFAULT_SHOW) -> bytes:
    """The comparison redline as .docx bytes: title, caution, (in the substantive view) what
    is not marked, the ranked substantive deviations, then the comparison."""
    body_paras = redline_body(review, show=show)
    stamp = RevisionStamp(author=author, date=stamp_date(date))
    pname = Path(review.precedent.source).name
    dname = Path(review.draft.source).name
    body: list[Element] = [
        Para((Run("Comparison redline"),), style="Title"),
        Para((Run(f"Precedent: {pname}. Draft: {dname}. Written by Counterdraft {__version__} "
                  f"on {stamp.date[:10]}."),)),
        Para((Run(CAUTION),), style="Caution"),
    ]
    if show == "substantive":
        body.extend(_left_out_section(review))
    body.extend(_ranked_section(review))
    body.append(Para((Run(REDLINE_BODY_HEADINGS[show]),), style="Heading1"))
    body.extend(body_paras)
    # A plain closing line: the body's last paragraph mark cannot be deleted, so without it a
    # deleted or moved last paragraph would leave an empty paragraph behind on acceptance.
    body.append(Para((Run(REDLINE_END),)))
    return build_docx(body, stamp=stamp, title=f"Comparison redline: {dname} against {pname}",
                      properties={CAUTION_PROPERTY: CAUTION})


def write_redline(review: Review, out: str | os.PathLike[str], *, author: str | None = None,
                  date: _dt.datetime | None = None, inputs: Sequence[str] = (),
                  show: RedlineShow = REDLINE_DEFAULT_SHOW) -> None:
    """Write the comparison redline (.docx) atomically; *show* picks the view."""
    path = check_output(out, (".docx",), [review.draft.source, review.precedent.source, *inputs])
    atomic_write_bytes(path, redline_bytes(review, author=author or default_author(), date=date,
                                           show=show))
