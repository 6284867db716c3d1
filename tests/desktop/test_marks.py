"""desktop.marks: cutting a provision's text into marked runs.

Outside reference: the standard library's difflib.SequenceMatcher supplies the edits
(character opcodes); the runs must tile the text exactly and carry the marks the opcodes
imply."""

from __future__ import annotations

import difflib

from core.model import Edit
from desktop import marks as mk


def _difflib_edits(a: str, b: str) -> list[Edit]:
    sm = difflib.SequenceMatcher(a=a, b=b, autojunk=False)
    return [Edit(tag, i1, i2, j1, j2) for tag, i1, i2, j1, j2 in sm.get_opcodes()]


def test_runs_tile_the_text_and_follow_difflib_opcodes():
    a = "The Customer shall pay each invoice within 30 days of receipt."
    b = "The Client shall pay every invoice within 60 days after receipt."
    edits = _difflib_edits(a, b)
    pm, dm = mk.edit_marks(edits)
    for text, marks_, kind, side in ((a, pm, mk.DELETED, 0), (b, dm, mk.INSERTED, 1)):
        runs = mk.runs(len(text), marks_)
        assert "".join(text[s:e] for s, e, _ in runs) == text  # gap-free tiling
        marked = {i for s, e, kinds in runs if kind in kinds for i in range(s, e)}
        # difflib: a position is changed on this side iff an opcode other than "equal" covers it
        changed = set()
        for tag, i1, i2, j1, j2 in difflib.SequenceMatcher(a=a, b=b, autojunk=False).get_opcodes():
            if tag != "equal":
                changed.update(range(i1, i2) if side == 0 else range(j1, j2))
        assert marked == changed


def test_overlapping_marks_combine_and_adjacent_equal_runs_merge():
    runs = mk.runs(10, [mk.Mark(2, 6, mk.INSERTED), mk.Mark(4, 8, mk.FOCUS), mk.Mark(8, 9, mk.FOCUS)])
    assert runs == [
        (0, 2, frozenset()),
        (2, 4, frozenset({mk.INSERTED})),
        (4, 6, frozenset({mk.INSERTED, mk.FOCUS})),
        (6, 9, frozenset({mk.FOCUS})),
        (9, 10, frozenset()),
    ]


def test_marks_outside_the_text_are_clipped_and_empty_text_has_no_runs():
    assert mk.runs(3, [mk.Mark(-5, 2, mk.DELETED), mk.Mark(2, 99, mk.TERM)]) == [
        (0, 2, frozenset({mk.DELETED})), (2, 3, frozenset({mk.TERM}))]
    assert mk.runs(0, [mk.Mark(0, 3, mk.DELETED)]) == []


def test_term_marks_find_plural_and_possessive_uses_only_as_whole_words():
    text = "The Client's staff and all Clients' agents; Clientele and the Clients."
    found = [text[m.start:m.end] for m in mk.term_marks(text, ["Client"])]
    assert found == ["Client's", "Clients'", "Clients"]


def test_without_drops_marks_inside_hidden_ranges_only():
    ms = [mk.Mark(0, 3, mk.INSERTED), mk.Mark(5, 9, mk.INSERTED)]
    assert mk.without(ms, [(4, 9)]) == [mk.Mark(0, 3, mk.INSERTED)]
    assert mk.without(ms, [(6, 9)]) == ms  # a partly hidden hunk stays marked
