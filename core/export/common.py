"""Helpers the three outputs share: where a provision sits in the blocks, the author and
date of tracked changes, output checks and the defined-term translator."""


import datetime as _dt
import getpass
import os
import re
from collections.abc import Callable, Iterable, Sequence
from pathlib import Path

from ..errors import CounterdraftError
from ..fileio import refuse_overwrite_of_inputs
from ..model import Edit, Provision, Review, TermMapping
from ..structure import block_owners, provision_blocks

__all__ = [
    "CAUTION_PROPERTY",
    "block_owners",
    "block_ranges",
    "check_output",
    "default_author",
    "edits_of_pair",
    "map_offset",
    "provision_blocks",
    "stamp_date",
    "term_translator",
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




def default_author() -> str:
    """The reviewer's name for ``w:author``: $COUNTERDRAFT_AUTHOR, else the login name."""
    name = os.environ.get("COUNTERDRAFT_AUTHOR", "").strip()
    if name:
        return name
    try:
        return getpass.getuser() or "Counterdraft"
    except (KeyError, OSError):  # no user database entry (containers)
        return "Counterdraft"


def stamp_date(when: _dt.datetime | None) -> str:
    when = when or _dt.datetime.now(_dt.UTC)
    if when.tzinfo is not None:
        when = when.astimezone(_dt.UTC)
    return when.replace(microsecond=0, tzinfo=None).isoformat() + "Z"


def check_output(out: str | os.PathLike[str], suffixes: Iterable[str], inputs: Iterable[str]) -> Path:
    path = Path(out)
    if path.suffix.lower() not in tuple(suffixes):
        raise CounterdraftError(f"the output must end in {' or '.join(suffixes)}", path=str(out))
    refuse_overwrite_of_inputs(path, *[i for i in inputs if i])
    return path


def block_ranges(prov: Provision, start: int, end: int) -> list[tuple[int, int, int]]:
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


def edits_of_pair(review: Review, draft_pid: str, precedent_pid: str) -> tuple[Edit, ...]:
    """The review's word diff of an aligned pair (:attr:`core.model.Pair.edits`; ``()`` when
    the two provisions are not aligned or the review has no diff for them)."""
    for pair in review.pairs:
        if pair.draft == draft_pid and pair.precedent == precedent_pid:
            return pair.edits
    return ()


def map_offset(edits: Sequence[Edit], offset: int) -> int | None:
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


def term_translator(term_map: Sequence[TermMapping]) -> Callable[[str], str]:
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


