"""The comparison redline: precedent to draft as tracked changes in a new .docx."""


import datetime as _dt
import difflib
import os
from collections.abc import Sequence
from pathlib import Path

from rapidfuzz.distance import Indel

from .. import CAUTION, __version__
from ..fileio import atomic_write_bytes
from ..labels import clause_label
from ..model import Block, Deviation, Edit, Provision, Review
from .common import (
    CAUTION_PROPERTY,
    block_owners,
    check_output,
    default_author,
    stamp_date,
)

__all__ = [
    "PAIR_GAP_MAX_CELLS",
    "PAIR_PARAGRAPH_MIN_RATIO",
    "REDLINE_BODY_HEADING",
    "REDLINE_END",
    "REDLINE_TABLE_MAX",
    "REDLINE_TABLE_WIDTHS_CM",
    "redline_body",
    "redline_bytes",
    "write_redline",
]


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
    from ..docx.writer import Run

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
    from ..docx.writer import Para, Run

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
    from ..docx.writer import Table

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
    from ..docx.revisions import RevisionStamp
    from ..docx.writer import Para, Run, build_docx

    stamp = RevisionStamp(author=author, date=stamp_date(date))
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
    path = check_output(out, (".docx",), [review.draft.source, review.precedent.source, *inputs])
    atomic_write_bytes(path, redline_bytes(review, author=author or default_author(), date=date))


