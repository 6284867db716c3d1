"""The review as a ranked plain-text table for a terminal (``counterdraft review`` without
``--json``): each deviation's number (its rank, :attr:`core.model.Deviation.rank`: what
``counterdraft decide`` takes and every output shows), severity, clause number and heading
(:func:`core.labels.clause_label`), how common the draft's wording is in the precedent set
when one was used ("2/12": ``Frequency.matching`` of ``Frequency.total`` agreements), and a
one-line summary, within a given width (100 columns by default), followed by the caution.
Every cell is read from the review; nothing is recomputed."""

from __future__ import annotations

import textwrap
from collections import Counter

from .. import CAUTION
from ..labels import clause_label
from ..model import Deviation, Review

__all__ = ["NUMBER_HEADING", "SHOW_CHOICES", "format_review", "shown_deviations"]

#: ``--show`` values: the default shows substantive and term deviations and the blanks of
#: the precedent that the draft filled in (informational, but what was filled in -- a
#: party's name, a place -- is for the reader to check).
SHOW_CHOICES = ("substantive", "all")
_DEFAULT_CATEGORIES = frozenset({"substantive", "term", "completion"})
_NUMBER_W, _SEV_W, _CLAUSE_W = 4, 3, 30
#: Heading of the number column (the rank): the written form every output uses ("No. 7").
NUMBER_HEADING = "No."
#: Narrowest clause column, and the room the summary keeps before the clause column
#: narrows (columns): on a narrow terminal both stay readable.
_CLAUSE_MIN_W, _SUMMARY_MIN_W = 12, 24
#: Narrowest table the layout supports (columns).
MIN_WIDTH = 60
#: Shown in the "Common" column for a deviation without a frequency (e.g. a renamed term).
NO_FREQUENCY = "-"


def shown_deviations(review: Review, *, show: str | None = None) -> list[Deviation]:
    """The deviations ``--show`` selects, in rank order."""
    if show == "all":
        return list(review.deviations)
    cats = {"substantive"} if show == "substantive" else _DEFAULT_CATEGORIES
    return [v for v in review.deviations if v.category in cats]


def _cut(s: str, width: int) -> str:
    s = " ".join(s.split())
    return s if len(s) <= width else s[: max(0, width - 1)].rstrip() + "\u2026"


def _common(v: Deviation) -> str:
    """"2/12": agreements of the precedent set with the draft's wording, of all."""
    f = v.frequency
    return NO_FREQUENCY if f is None else f"{f.matching}/{f.total}"


def _summary(v: Deviation) -> str:
    """One line: the first reason (the term pair for a renamed term)."""
    if v.category == "term":
        return f'term: draft "{v.draft_text}" = precedent "{v.precedent_text}"'
    return v.reasons[0] if v.reasons else v.category


def format_review(review: Review, *, show: str | None = None, width: int = 100) -> str:
    """The ranked table of *review* (see the module's notes), at most *width* columns."""
    width = max(width, MIN_WIDTH)
    lines: list[str] = []
    dname = review.draft.source.replace("\\", "/").rsplit("/", 1)[-1]
    pname = review.precedent.source.replace("\\", "/").rsplit("/", 1)[-1]
    lines.append(_cut(f"Review of {dname} against the precedent {pname}", width))
    counts = Counter(v.category for v in review.deviations)
    order = ("substantive", "completion", "term", "numbering", "punctuation", "formatting")
    lines.append(_cut("Deviations: " + ", ".join(f"{counts[c]} {c}" for c in order), width))
    status = Counter(p.status for p in review.pairs)
    lines.append(_cut("Provisions: " + ", ".join(f"{n} {s}" for s, n in sorted(status.items())), width))
    for note in review.notes:
        lines.extend(textwrap.wrap(f"Note: {note}", width))
    lines.append("")
    rows = shown_deviations(review, show=show)
    common = [_common(v) for v in rows]
    with_common = any(c != NO_FREQUENCY for c in common)
    common_w = max([len("Common"), *map(len, common)]) if with_common else 0
    fixed = _NUMBER_W + 1 + _SEV_W + 2 + 2 + (common_w + 2 if with_common else 0)
    clause_w = max(_CLAUSE_MIN_W, min(_CLAUSE_W, width - fixed - _SUMMARY_MIN_W))
    summary_w = max(1, width - fixed - clause_w)
    lines.extend(textwrap.wrap(
        f"{NUMBER_HEADING} is each deviation's number (its rank by severity): the one "
        "'counterdraft decide' takes.", width))
    if with_common:
        total = next(v.frequency.total for v in rows if v.frequency is not None)
        lines.extend(textwrap.wrap(
            f"Common: agreements of the precedent set ({total}) whose clause of the same type "
            "has the draft's wording (for a provision left out: lacks it).", width))
    head = f"{NUMBER_HEADING:>{_NUMBER_W}} {'Sev':>{_SEV_W}}  {'Clause':<{clause_w}}  "
    if with_common:
        head += f"{'Common':>{common_w}}  "
    lines.append(head + "Summary")
    lines.append("-" * width)
    for v, c in zip(rows, common):
        clause = clause_label(review, v, compact=True)
        line = (f"{v.rank:>{_NUMBER_W}} {v.severity:>{_SEV_W}}  "
                f"{_cut(clause, clause_w):<{clause_w}}  ")
        if with_common:
            line += f"{c:>{common_w}}  "
        lines.append((line + _cut(_summary(v), summary_w)).rstrip())
    if not rows:
        lines.append("(no deviation to show)")
    hidden = len(review.deviations) - len(rows)
    if hidden:
        lines.append(_cut(f"{hidden} more deviation{'s' * (hidden != 1)} not shown "
                          "(formatting, numbering, punctuation or term); use --show all", width))
    lines.append("")
    lines.extend(textwrap.wrap(CAUTION, width))
    return "\n".join(lines)
