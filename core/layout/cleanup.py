"""Page clean-up: what a printed page adds to an agreement's words, taken away again.

* **Running headers and footers, page numbers** (:func:`drop_running`): a line among the first
  or last :data:`EDGE_LINES` lines of its page whose text -- in a short line digits read as
  one sign, so "Page 3 of 12" and "Page 4 of 12" are the same -- comes back at the same height (within
  :data:`SAME_HEIGHT_EM`) on at least :data:`MIN_PAGE_SHARE` of the pages (and on two pages
  at least).  A page number of a one-page document cannot repeat; it stays.
* **End-of-line hyphenation** (:func:`join_lines`): a line that ends in a letter and a hyphen,
  followed by a line starting with a letter, is joined to it without a space.  Before a lower
  case letter the hyphen was either a word cut by the hyphenation of the
  line-breaking program ("agree-" / "ment") or a compound that happened to break at its
  hyphen ("royalty-" / "free").  The document's own vocabulary decides: the joined word
  ("agreement") counts as a word when the document writes it elsewhere, and the hyphen goes;
  otherwise, or when the document writes the hyphenated compound as often, the hyphen
  stays.  A soft hyphen (U+00AD) always goes.  Two more places where a line breaks without a
  space: inside a cross-reference between its brackets ("4(c)" / "(i) above") and in a web
  address after a slash.
* **Tables** stay as rows: the PDF reader gives one line per table row with its cells, and a
  row is always a paragraph of its own.

Cost: O(lines) with dictionary look-ups.
"""

from __future__ import annotations

import re
from collections import Counter
from collections.abc import Iterable, Sequence

from ..lazyre import compile_pattern
from .lines import Line, geometry

__all__ = ["EDGE_LINES", "MIN_PAGE_SHARE", "SAME_HEIGHT_EM", "drop_running", "join_lines", "vocabulary"]

#: Running headers and footers sit among the first or last lines of a page (a header of up
#: to two lines and a footer of up to two lines above or below a page number).
EDGE_LINES = 3
#: ... and come back on at least this share of the pages (a first page without the header,
#: a last page without the footer, still leave well over half).
MIN_PAGE_SHARE = 0.5
#: Running lines whose numbers change from page to page are short; a longer line must come
#: back word for word (a body line that differs only in its figures is text).
MAX_NUMBERED_RUNNING_WORDS = 8
#: ... at the same height: within this many body font sizes.
SAME_HEIGHT_EM = 0.8

#: The joined word must be written this many times more often than the hyphenated compound
#: for the hyphen to go ("email" twice and "e-mail" once: a tie, the hyphen stays).
HYPHEN_EVIDENCE = 2

_DIGITS_RE = compile_pattern(r"\d+")
#: A cross-reference's bracketed part at a line end ("4(c)", "(c)(1)") and the next
#: bracketed part at the start of the next line ("(i)", "(1)(C)"): no space between them.
_REFERENCE_END_RE = compile_pattern(r"\w\([A-Za-z0-9]{1,4}\)$")
_REFERENCE_START_RE = compile_pattern(r"\([A-Za-z0-9]{1,4}\)(?:\W|$)")
_URL_END_RE = compile_pattern(r"(?:https?://|www\.)\S*/$", re.IGNORECASE)
_ROMAN_PAGE_RE = compile_pattern(r"^[\W_]*[ivxlcdm]{1,6}[\W_]*$", re.IGNORECASE)
_WORD_RE = compile_pattern(r"[^\W\d_](?:[^\W\d_]|['’-](?=[^\W\d_]))*")


def _signature(text: str) -> str:
    """The text as a running line's: case and spacing ignored, and in a short line (a page
    number, "Page 3 of 12", "Draft 2 - Confidential") digits read as one sign."""
    t = text.casefold()
    if len(t.split()) <= MAX_NUMBERED_RUNNING_WORDS:
        t = _DIGITS_RE.sub("#", t)
    if _ROMAN_PAGE_RE.match(t):
        t = "#"
    return " ".join(t.split())


def drop_running(lines: Sequence[Line]) -> tuple[tuple[Line, ...], int]:
    """*lines* without running headers, footers and page numbers, and how many were dropped."""
    pages: dict[int, list[int]] = {}
    for i, ln in enumerate(lines):
        pages.setdefault(ln.page, []).append(i)
    if len(pages) < 2:
        return tuple(lines), 0
    em = geometry(lines).em
    edge: dict[int, str] = {}  # line index -> "top" | "bottom"
    for idx in pages.values():
        running = [i for i in idx if lines[i].cells is None]
        for i in running[:EDGE_LINES]:
            edge[i] = "top"
        for i in running[-EDGE_LINES:]:
            edge.setdefault(i, "bottom")
    groups: dict[tuple[str, str], list[int]] = {}
    for i, where in edge.items():
        groups.setdefault((where, _signature(lines[i].text)), []).append(i)
    needed = max(2, MIN_PAGE_SHARE * len(pages))
    dropped: set[int] = set()
    for members in groups.values():
        # The members at a common height: the largest set within SAME_HEIGHT_EM of one top.
        best: list[int] = []
        for i in members:
            near = [j for j in members if abs(lines[j].top - lines[i].top) <= SAME_HEIGHT_EM * em]
            if len({lines[j].page for j in near}) > len({lines[j].page for j in best}):
                best = near
        if len({lines[j].page for j in best}) >= needed:
            dropped.update(best)
    kept = tuple(ln for i, ln in enumerate(lines) if i not in dropped)
    return kept, len(dropped)


def vocabulary(lines: Iterable[Line]) -> Counter[str]:
    """How often the document writes each word (case-folded), words cut at a line end's
    hyphen left out (they are what is being decided)."""
    counts: Counter[str] = Counter()
    for ln in lines:
        text = ln.text
        words = _WORD_RE.findall(text)
        if words and text.rstrip().endswith(("-", "\u00ad")):
            words = words[:-1]
        counts.update(w.casefold() for w in words)
    return counts


def _hyphen_join(before: str, after: str, vocab: Counter[str]) -> str | None:
    """*before* + *after* joined across a hyphenated line end, or None when the line end is
    not a hyphenation (see the module docstring)."""
    if before.endswith("\u00ad"):
        return before[:-1] + after.lstrip()
    b = before.rstrip()
    a = after.lstrip()
    if len(b) >= 2 and b[-1] == ")" and _REFERENCE_END_RE.search(b) and _REFERENCE_START_RE.match(a):
        return b + a  # "4(c)" / "(i)": a reference broken between its brackets
    if _URL_END_RE.search(b) and a[:1].isalnum():
        return b + a  # a web address broken after a slash
    if not (len(b) >= 2 and b.endswith("-") and b[-2].isalnum() and a[:1].isalnum()):
        return None
    m1 = re.search(r"([^\W\d_]+)-$", b)
    m2 = re.match(r"[^\W\d_]+", a)
    if m1 is not None and m2 is not None and a[:1].islower():
        joined = (m1.group(1) + m2.group(0)).casefold()
        compound = (m1.group(1) + "-" + m2.group(0)).casefold()
        if vocab.get(joined, 0) > HYPHEN_EVIDENCE * vocab.get(compound, 0):
            return b[:-1] + a
    return b + a  # a compound broken at its hyphen ("Named-" / "User"): the hyphen stays


def join_lines(texts: Sequence[str], vocab: Counter[str]) -> str:
    """The lines of one paragraph as one text: a space between lines, none across a
    hyphenation (undone when the document's vocabulary knows the joined word)."""
    out = ""
    for t in texts:
        t = t.strip()
        if not out:
            out = t
            continue
        joined = _hyphen_join(out, t, vocab)
        out = joined if joined is not None else out + " " + t
    return out
