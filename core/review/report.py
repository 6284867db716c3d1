"""The review as a ranked plain-text table for a terminal (``counterdraft review`` without
``--json``): rank, severity, clause number and heading, one-line summary, within a given
width (100 columns by default), followed by the caution."""

from __future__ import annotations

import re
import textwrap
from collections import Counter

from .. import CAUTION
from ..model import Deviation, Document, Review

__all__ = ["SHOW_CHOICES", "format_review", "shown_deviations"]

#: ``--show`` values: the default shows substantive and term deviations.
SHOW_CHOICES = ("substantive", "all")
_DEFAULT_CATEGORIES = frozenset({"substantive", "term"})
_RANK_W, _SEV_W, _CLAUSE_W = 4, 3, 30
#: Narrowest table the layout supports (columns).
MIN_WIDTH = 60


def shown_deviations(review: Review, *, show: str | None = None) -> list[Deviation]:
    """The deviations ``--show`` selects, in rank order."""
    if show == "all":
        return list(review.deviations)
    cats = {"substantive"} if show == "substantive" else _DEFAULT_CATEGORIES
    return [v for v in review.deviations if v.category in cats]


def _cut(s: str, width: int) -> str:
    s = " ".join(s.split())
    return s if len(s) <= width else s[: max(0, width - 1)].rstrip() + "\u2026"


def _number(num: str | None) -> str:
    if not num:
        return ""
    return re.sub(r"^(?:Article|Section|Clause|Schedule|Part)\s+", "", num.strip(), flags=re.I)


def _clause(doc: Document, pid: str | None) -> str:
    """"14.3 Liability Cap": the provision's number (with its parents') and the nearest
    heading up its chain."""
    if pid is None:
        return ""
    by_id = {p.id: p for p in doc.provisions}
    p = by_id.get(pid)
    if p is None:
        return pid
    numbers: list[str] = []
    heading = None
    cur = p
    depth = 0
    while cur is not None and depth < 64:  # bounded walk up the parent chain
        n = _number(cur.number)
        if n and (not numbers or numbers[0].startswith("(")):
            numbers.insert(0, n)
        if heading is None and cur.heading:
            heading = cur.heading
        cur = by_id.get(cur.parent) if cur.parent else None
        depth += 1
    label = "".join(numbers) if numbers else ("def." if p.kind == "definition" else p.kind)
    if p.kind == "definition" and p.term:
        heading = f'"{p.term}"'
    return f"{label} {heading}" if heading else label


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
    order = ("substantive", "term", "numbering", "punctuation", "formatting")
    lines.append(_cut("Deviations: " + ", ".join(f"{counts[c]} {c}" for c in order), width))
    status = Counter(p.status for p in review.pairs)
    lines.append(_cut("Provisions: " + ", ".join(f"{n} {s}" for s, n in sorted(status.items())), width))
    for note in review.notes:
        lines.extend(textwrap.wrap(f"Note: {note}", width))
    lines.append("")
    rows = shown_deviations(review, show=show)
    summary_w = width - (_RANK_W + 1 + _SEV_W + 2 + _CLAUSE_W + 2)
    lines.append(f"{'Rank':>{_RANK_W}} {'Sev':>{_SEV_W}}  {'Clause':<{_CLAUSE_W}}  Summary")
    lines.append("-" * width)
    for v in rows:
        if v.draft_provision is not None:
            clause = _clause(review.draft, v.draft_provision)
        else:
            clause = "precedent " + _clause(review.precedent, v.precedent_provision)
        lines.append(f"{v.rank:>{_RANK_W}} {v.severity:>{_SEV_W}}  "
                     f"{_cut(clause, _CLAUSE_W):<{_CLAUSE_W}}  {_cut(_summary(v), summary_w)}".rstrip())
    if not rows:
        lines.append("(no deviation to show)")
    hidden = len(review.deviations) - len(rows)
    if hidden:
        lines.append(_cut(f"{hidden} more deviation{'s' * (hidden != 1)} not shown "
                          "(formatting, numbering, punctuation or term); use --show all", width))
    lines.append("")
    lines.extend(textwrap.wrap(CAUTION, width))
    return "\n".join(lines)
