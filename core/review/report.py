"""The review as a ranked plain-text table for a terminal (``counterdraft review`` without
``--json``): each deviation's number (its rank, :attr:`core.model.Deviation.rank`: what
``counterdraft decide`` takes and every output shows), severity, clause number and heading
(:func:`core.labels.clause_label`), its past use when a precedent set was used ("2/12":
``Frequency.matching`` of ``Frequency.total`` agreements), and a summary, followed by the
caution.  The table fills the terminal's width (:func:`terminal_width`: ``COLUMNS`` when
set, else the terminal's own size, else :data:`DEFAULT_WIDTH`); a clause label or a summary
longer than its column wraps onto the next lines, indented to its column, and is never cut.
Every cell is read from the review; nothing is recomputed."""

from __future__ import annotations

import textwrap
from collections import Counter

from .. import CAUTION
from ..console import DEFAULT_WIDTH, terminal_width
from ..labels import check_label, clause_label
from ..model import Category, Deviation, Review
from .checks import CHECK_KINDS, CHECK_TITLES, CHECKS_HEADING

__all__ = [
    "CHECKS_HEADING", "DEFAULT_WIDTH", "DIRECTION_HEADING", "NUMBER_HEADING", "PAST_USE_HEADING", "SHOW_CHOICES",
    "check_lines", "format_review",
    "shown_deviations", "terminal_width",
]

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
#: Heading of the past-use column (the name the window and the issues list use too).
PAST_USE_HEADING = "Past use"
#: Shown in the past-use column for a deviation without a frequency (e.g. a renamed term).
NO_FREQUENCY = "-"
#: Heading of the direction column (a review acting for a party) and its width: the longest
#: direction, "favourable".
DIRECTION_HEADING = "Direction"
_DIRECTION_W = 10


def shown_deviations(review: Review, *, show: str | None = None) -> list[Deviation]:
    """The deviations ``--show`` selects, in rank order."""
    if show == "all":
        return list(review.deviations)
    cats = {"substantive"} if show == "substantive" else _DEFAULT_CATEGORIES
    return [v for v in review.deviations if v.category in cats]


def _wrap(s: str, width: int) -> list[str]:
    """*s* on lines of at most *width* columns, broken between words (a word longer than a
    line is broken inside); at least one line."""
    return textwrap.wrap(" ".join(s.split()), max(1, width), break_on_hyphens=False) or [""]


def _common(v: Deviation) -> str:
    """"2/12": agreements of the precedent set with the draft's wording, of all."""
    f = v.frequency
    return NO_FREQUENCY if f is None else f"{f.matching}/{f.total}"


def _summary(v: Deviation) -> str:
    """The first reason, whole (the term pair for a renamed term)."""
    if v.category == "term":
        return f'term: draft "{v.draft_text}" = precedent "{v.precedent_text}"'
    return v.reasons[0] if v.reasons else v.category


def _heading_lines(review: Review, width: int) -> list[str]:
    dname = review.draft.source.replace("\\", "/").rsplit("/", 1)[-1]
    pname = review.precedent.source.replace("\\", "/").rsplit("/", 1)[-1]
    counts = Counter(v.category for v in review.deviations)
    order: tuple[Category, ...] = ("substantive", "completion", "term", "numbering", "punctuation", "formatting")
    status = Counter(p.status for p in review.pairs)
    lines: list[str] = []
    for text in (f"Review of {dname} against the precedent {pname}",
                 "Deviations: " + ", ".join(f"{counts[c]} {c}" for c in order),
                 "Provisions: " + ", ".join(f"{n} {s}" for s, n in sorted(status.items())),
                 *(f"Note: {note}" for note in review.notes)):
        lines.extend(textwrap.wrap(text, width, subsequent_indent="  "))
    return lines


def _row_lines(v: Deviation, clause: str, common: str | None, widths: tuple[int, int, int],
               direction: bool = False) -> list[str]:
    """One deviation's lines: the figures on the first, the clause and the summary wrapped
    in their columns below it; with *direction*, the direction after the severity."""
    clause_w, common_w, summary_w = widths
    clauses = _wrap(clause, clause_w)
    summaries = _wrap(_summary(v), summary_w)
    out = []
    for i in range(max(len(clauses), len(summaries))):
        number = f"{v.rank:>{_NUMBER_W}} {v.severity:>{_SEV_W}}" if i == 0 else " " * (_NUMBER_W + 1 + _SEV_W)
        if direction:
            number += f"  {(v.direction if i == 0 else ''):<{_DIRECTION_W}}"
        line = f"{number}  {(clauses[i] if i < len(clauses) else ''):<{clause_w}}  "
        if common is not None:
            line += f"{(common if i == 0 else ''):>{common_w}}  "
        out.append((line + (summaries[i] if i < len(summaries) else "")).rstrip())
    return out


def format_review(review: Review, *, show: str | None = None, width: int | None = None) -> str:
    """The ranked table of *review* (see the module's notes), at most *width* columns
    (default: :func:`terminal_width`)."""
    width = max(terminal_width() if width is None else width, MIN_WIDTH)
    lines = _heading_lines(review, width)
    lines.append("")
    rows = shown_deviations(review, show=show)
    common = [_common(v) for v in rows]
    with_common = any(c != NO_FREQUENCY for c in common)
    common_w = max([len(PAST_USE_HEADING), *map(len, common)]) if with_common else 0
    acting = review.acting_for is not None
    fixed = (_NUMBER_W + 1 + _SEV_W + 2 + 2 + (common_w + 2 if with_common else 0)
             + (_DIRECTION_W + 2 if acting else 0))
    clause_w = max(_CLAUSE_MIN_W, min(_CLAUSE_W, width - fixed - _SUMMARY_MIN_W))
    summary_w = max(1, width - fixed - clause_w)
    lines.extend(textwrap.wrap(
        f"{NUMBER_HEADING} is each deviation's number (its rank by severity): the one "
        "'counterdraft decide' takes.", width))
    if with_common:
        total = next(v.frequency.total for v in rows if v.frequency is not None)
        lines.extend(textwrap.wrap(
            f"{PAST_USE_HEADING}: agreements of the precedent set ({total}) whose clause of the "
            "same type has the draft's wording (for a provision left out: lacks it).", width))
    if acting:
        lines.extend(textwrap.wrap(
            f"{DIRECTION_HEADING}: for the {review.acting_for}, the party you act for -- adverse "
            "(against it), favourable (for it), neutral (no change of meaning, or binding each "
            "party alike), unclear (the wording does not tell). At equal severity adverse ranks "
            "first; a favourable change ranks as if half as severe.", width))
    head = f"{NUMBER_HEADING:>{_NUMBER_W}} {'Sev':>{_SEV_W}}  "
    if acting:
        head += f"{DIRECTION_HEADING:<{_DIRECTION_W}}  "
    head += f"{'Clause':<{clause_w}}  "
    if with_common:
        head += f"{PAST_USE_HEADING:>{common_w}}  "
    lines.append(head + "Summary")
    lines.append("-" * width)
    for v, c in zip(rows, common):
        clause = clause_label(review, v, compact=True)
        lines.extend(_row_lines(v, clause, c if with_common else None, (clause_w, common_w, summary_w),
                                direction=acting))
    if not rows:
        lines.append("(no deviation to show)")
    hidden = len(review.deviations) - len(rows)
    if hidden:
        lines.extend(textwrap.wrap(f"{hidden} more deviation{'s' * (hidden != 1)} not shown "
                                   "(formatting, numbering, punctuation or term); use --show all", width))
    lines.append("")
    lines.extend(check_lines(review, width=width))
    lines.extend(textwrap.wrap(CAUTION, width))
    return "\n".join(lines)


def check_lines(review: Review, *, width: int) -> list[str]:
    """The drafting checks of *review* (:attr:`core.model.Review.checks`), after the table:
    a heading with the count of each kind, then one entry per check -- its kind, the
    clause and the message -- wrapped to *width* and never cut; a blank line after."""
    checks = review.checks
    if not checks:
        return [f"{CHECKS_HEADING}: none found in the draft.", ""]
    counts = Counter(c.kind for c in checks)
    summary = ", ".join(f"{counts[k]} {CHECK_TITLES[k].lower()}" for k in CHECK_KINDS if counts[k])
    lines = textwrap.wrap(f"{CHECKS_HEADING} ({len(checks)}): {summary}", width)
    for c in checks:
        entry = f"{CHECK_TITLES[c.kind]} -- {check_label(review, c, compact=True)}: {c.message}"
        lines.extend(textwrap.wrap(entry, width, initial_indent="  ", subsequent_indent="      ",
                                   break_on_hyphens=False))
    lines.append("")
    return lines
