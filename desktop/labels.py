"""Display strings for core data: clause labels, one-line summaries, frequency text.

Presentation only: every fact shown comes from the engine's objects unchanged.
"""

from __future__ import annotations

# clause_label is the engine's one clause label, re-exported for the views.
from core.labels import clause_label, provision_label
from core.model import Deviation, Frequency, Provision

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
    "completion": "Blank filled in",
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
    """``"7.2 Limitation of liability"``, ``"Definition of \u201cClient\u201d"``: one provision's own
    number and heading (:func:`core.labels.provision_label`)."""
    if p is None:
        return ""
    return provision_label(p)


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
