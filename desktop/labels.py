"""Display strings for core data: clause labels, one-line summaries, frequency text.

Presentation only: every fact shown comes from the engine's objects unchanged.
"""

from __future__ import annotations

from core.model import Deviation, Document, Frequency, Provision, Review

__all__ = [
    "CATEGORY_NAMES",
    "CHANGE_NAMES",
    "DECISION_NAMES",
    "SHORT_DECISION_NAMES",
    "STATUS_NAMES",
    "clause_label",
    "frequency_text",
    "provision_caption",
    "short",
    "summary",
]

#: Longest quoted excerpt in a one-line summary, in characters (fits the table column).
EXCERPT_CHARS = 60

CATEGORY_NAMES = {
    "substantive": "Substantive",
    "term": "Defined term",
    "formatting": "Formatting",
    "numbering": "Numbering",
    "punctuation": "Punctuation",
}

CHANGE_NAMES = {
    "insert": "words added",
    "delete": "words taken out",
    "replace": "words replaced",
    "move": "provision moved",
    "add-provision": "provision added",
    "remove-provision": "provision removed",
}

STATUS_NAMES = {
    "same": "Same",
    "changed": "Changed",
    "moved": "Moved",
    "added": "Added in draft",
    "removed": "Not in draft",
    "split": "Split",
    "merged": "Merged",
}

DECISION_NAMES = {
    "accept": "Accept draft",
    "revert": "Restore precedent",
    "amend": "Amend",
}
#: The same, short enough for the list's decision column.
SHORT_DECISION_NAMES = {"accept": "Accept", "revert": "Restore", "amend": "Amend"}


def short(text: str, limit: int = EXCERPT_CHARS) -> str:
    """*text* on one line, cut at *limit* characters with an ellipsis."""
    one = " ".join(text.split())
    return one if len(one) <= limit else one[: limit - 1].rstrip() + "\u2026"


def provision_caption(p: Provision | None) -> str:
    """``"7.2 Limitation of liability"``, ``"Definition of \u201cClient\u201d"`` or ``"(untitled)"``."""
    if p is None:
        return ""
    bits = [b for b in (p.number, p.heading) if b]
    if not bits and p.term:
        return f"Definition of \u201c{p.term}\u201d"
    if not bits:
        return short(p.text, 40) or "(untitled)"
    return " ".join(bits)


def _find(doc: Document, pid: str | None) -> Provision | None:
    if pid is None:
        return None
    try:
        return doc.provision(pid)
    except KeyError:
        return None


def clause_label(review: Review, d: Deviation, *, compact: bool = False) -> str:
    """The clause a deviation concerns, by the draft's numbering, with the precedent's number
    in brackets when it differs (renumbered or moved) unless *compact*."""
    dp = _find(review.draft, d.draft_provision)
    pp = _find(review.precedent, d.precedent_provision)
    if dp is None and pp is None:
        return "Whole document" if d.category != "term" else "Defined terms"
    if dp is None:
        return f"{provision_caption(pp)} (precedent only)"
    label = provision_caption(dp)
    if not compact and pp is not None and pp.number and pp.number != dp.number:
        label += f" (precedent {pp.number})"
    return label


def summary(d: Deviation) -> str:
    """One line: the engine's first reason, or what changed quoted from the two texts."""
    if d.reasons:
        return d.reasons[0]
    old, new = short(d.precedent_text, 28), short(d.draft_text, 28)
    if d.change == "insert":
        return f"adds \u201c{short(d.draft_text)}\u201d"
    if d.change == "delete":
        return f"takes out \u201c{short(d.precedent_text)}\u201d"
    if d.change == "replace":
        return f"\u201c{old}\u201d \u2192 \u201c{new}\u201d"
    return CHANGE_NAMES.get(d.change, d.change)


def frequency_text(f: Frequency | None) -> str:
    """``"6 of 20"``: documents whose same-type provision has this wording, of the set."""
    if f is None:
        return ""
    return f"{f.matching} of {f.total}"
