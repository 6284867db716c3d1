"""Laws of the alignment (core.review.align through core.review.run_review).

Real texts: licence texts of the PyPI package ``licensedcode-data`` (keys named below).  The
law: a draft that only reorders a licence's top-level sections (each section kept whole,
its label with it) holds the same provisions as the precedent, so the review pairs every
provision, reports nothing substantive, and reports each section that left its place as a
move.  The permutation is drawn by hypothesis; the expected pairing is the identity of the
section texts, computed here from the text alone.
"""

from __future__ import annotations

import re
from functools import cache

from hypothesis import given, settings
from hypothesis import strategies as st

from core.review import run_review

from .helpers import doc, licence_text, substantive

#: Licences whose top-level sections start lines as "N. Heading" (checked below).
SECTIONED = ("apache-2.0", "cddl-1.0", "epl-1.0")
_SECTION_START = re.compile(r"^[ \t]*(\d{1,2})\. \S", re.M)


@cache
def sections(key: str) -> tuple[str, tuple[str, ...]]:
    """(preamble, sections) of licence *key*: each section from its "N. " line up to the next
    one, in the licence's order, numbers 1, 2, 3 ... in sequence; the text after the last
    section's body stays with it."""
    text = licence_text(key)
    starts, expected = [], 1
    for m in _SECTION_START.finditer(text):
        if int(m.group(1)) == expected:
            starts.append(m.start())
            expected += 1
    assert len(starts) >= 5, key
    bounds = starts + [len(text)]
    return text[:starts[0]], tuple(text[a:b].rstrip() + "\n\n" for a, b in zip(bounds, bounds[1:]))


def test_the_licences_have_sections_in_sequence():
    for key in SECTIONED:
        _, parts = sections(key)
        assert [int(p.split(".", 1)[0]) for p in parts] == list(range(1, len(parts) + 1))


@settings(max_examples=12, deadline=None)
@given(st.sampled_from(SECTIONED), st.data())
def test_reordered_sections_are_moves_and_nothing_else(key, data):
    preamble, parts = sections(key)
    order = data.draw(st.permutations(range(len(parts))))
    precedent = doc(preamble + "".join(parts), source=f"{key}.txt")
    draft = doc(preamble + "".join(parts[i] for i in order), source=f"{key}-reordered.txt")
    review = run_review(draft, precedent)

    assert substantive(review) == []
    paired = [p for p in review.pairs if p.draft and p.precedent]
    assert len(paired) == len(draft.provisions) == len(precedent.provisions)
    # each pair joins provisions of the same text: the identity of the permutation
    for p in paired:
        assert draft.provision(p.draft).text == precedent.provision(p.precedent).text
    if list(order) != sorted(order):
        assert any(p.status == "moved" for p in review.pairs)
    else:
        assert all(p.status == "same" for p in review.pairs)
