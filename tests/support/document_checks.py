"""Invariants every :class:`core.model.Document` read by Counterdraft must satisfy
(core/model.py, "Invariants"); the reader tests call :func:`check_document` on every
document they read."""

from __future__ import annotations

import re

from core.model import PROVISION_KINDS, Document

__all__ = ["check_document"]


def check_document(doc: Document) -> None:
    """Assert the model's invariants on *doc* (AssertionError naming the first failure)."""
    for i, b in enumerate(doc.blocks):
        assert b.index == i, f"block {i} has index {b.index}"
    by_id = {}
    used: list[tuple[int, int, int]] = []
    for n, p in enumerate(doc.provisions, start=1):
        assert p.id == f"p{n}", f"provision {n} has id {p.id}"
        # The segments invariant: the text is exactly the segments joined by newlines.
        joined = "\n".join(doc.blocks[s.block].text[s.start:s.end] for s in p.segments)
        assert p.text == joined, f"{p.id}: text does not match its segments"
        assert list(p.segments) == sorted(p.segments, key=lambda s: (s.block, s.start)), \
            f"{p.id}: segments out of document order"
        for s in p.segments:
            assert 0 <= s.start < s.end <= len(doc.blocks[s.block].text), f"{p.id}: bad segment {s}"
            used.append((s.block, s.start, s.end))
        assert p.text == p.text.strip() or "\n" in p.text, f"{p.id}: untrimmed text"
        assert p.kind in PROVISION_KINDS, f"{p.id}: kind {p.kind!r}"
        assert (p.term is not None) == (p.kind == "definition"), f"{p.id}: term/kind mismatch"
        assert p.level >= 0
        assert (p.level == 0) == (p.number is None), f"{p.id}: level {p.level} with number {p.number!r}"
        if p.number is not None:
            assert p.number == p.number.strip() and not p.number.endswith((".", ":")), p.number
        if p.heading is not None:
            assert p.heading.strip() and p.heading == " ".join(p.heading.split()), f"{p.id}: heading"
        if p.parent is not None:
            assert p.parent in by_id, f"{p.id}: parent {p.parent} is not an earlier provision"
            parent = by_id[p.parent]
            if p.number is not None:
                assert p.level > parent.level, f"{p.id}: level {p.level} not below parent's {parent.level}"
        by_id[p.id] = p
    # No two provisions claim the same words, and the words come in document order.
    used.sort()
    for a, b in zip(used, used[1:]):
        assert a[0] < b[0] or a[2] <= b[1], f"segments overlap: {a} {b}"
    for t in doc.terms:
        assert t.provision in by_id, f"term {t.term!r} points at {t.provision}"
        assert t.uses >= 0 and t.term.strip()
    assert len({t.term for t in doc.terms}) == len(doc.terms), "a term is listed twice"
    assert all(re.fullmatch(r"p[1-9][0-9]*", p.id) for p in doc.provisions)
