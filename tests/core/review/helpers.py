"""Helpers for the review engine's tests: agreements from text, the licence texts of the
PyPI package ``licensedcode-data`` (real documents from outside the project)."""

from __future__ import annotations

import importlib.resources
import re
import textwrap

from core.model import Deviation, Document, Review
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
