"""Helpers for the review engine's tests: agreements from text, the licence texts of the
PyPI package ``licensedcode-data`` (real documents from outside the project)."""

from __future__ import annotations

import importlib.resources
import re
import textwrap
from collections.abc import Sequence

from core.model import Deviation, Document, Edit, Review
from core.reader import read_text

LICENCES = ("apache-2.0", "gpl-3.0", "mpl-2.0")


def doc(text: str, source: str = "agreement.txt") -> Document:
    """The document of an agreement written as plain text (dedented)."""
    return read_text(textwrap.dedent(text).strip() + "\n", source=source)


def licence_text(key: str) -> str:
    """The text of ``licensedcode/data/licenses/<key>.LICENSE`` (licensedcode-data), without
    its YAML front matter."""
    path = importlib.resources.files("licensedcode") / "data" / "licenses" / f"{key}.LICENSE"
    raw = path.read_text(encoding="utf-8")
    if raw.startswith("---"):
        raw = raw.split("\n---", 1)[1].split("\n", 1)[1]
    return raw


def excerpt(key: str, start: str, end: str) -> str:
    """The words of licence *key* (licensedcode-data) from *start* up to and including *end*
    (both matched across line breaks), lines joined with single spaces."""
    text = " ".join(licence_text(key).split())
    i = text.index(" ".join(start.split()))
    end = " ".join(end.split())
    return text[i:text.index(end, i) + len(end)]


def substantive(review: Review) -> list[Deviation]:
    return [v for v in review.deviations if v.category == "substantive"]


def by_category(review: Review, category: str) -> list[Deviation]:
    return [v for v in review.deviations if v.category == category]


def replace_once(text: str, old: str, new: str) -> str:
    """*text* with the first *old* replaced by *new* (the words of *old* may be broken over
    lines or spaced differently in the licence); fails when *old* is not there."""
    pattern = r"\s+".join(re.escape(w) for w in old.split())
    m = re.search(pattern, text)
    assert m is not None, old
    return text[:m.start()] + new + text[m.end():]


def check_tiling(edits: Sequence[Edit], a: str, b: str) -> None:
    """core.model's invariant of Pair.edits: the hunks tile both original texts in order."""
    p = d = 0
    for e in edits:
        assert (e.p1, e.d1) == (p, d)
        if e.tag == "equal":
            assert a[e.p1:e.p2] == b[e.d1:e.d2]
        elif e.tag == "insert":
            assert e.p1 == e.p2 and e.d2 > e.d1
        elif e.tag == "delete":
            assert e.d1 == e.d2 and e.p2 > e.p1
        else:
            assert e.tag == "replace" and e.p2 > e.p1 and e.d2 > e.d1
        p, d = e.p2, e.d2
    assert (p, d) == (len(a), len(b))
    assert "".join(a[e.p1:e.p2] for e in edits) == a and "".join(b[e.d1:e.d2] for e in edits) == b
