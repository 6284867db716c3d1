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
    "DIRECTION_MARKS",
    "DIRECTION_ORDER",
    "PAST_USE",
    "SHORT_DECISION_NAMES",
    "STATUS_NAMES",
    "clause_label",
    "direction_sentence",
    "direction_text",
    "frequency_sentence",
    "frequency_text",
    "provision_caption",
    "short",
    "summary",
]

#: Our name for how often the precedent set carries a wording (column headers, the detail
#: panel): the same name on every screen and report.
PAST_USE = "Past use"

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


#: Directions in the list's sort order (adverse first, as the engine ranks them at equal
#: severity) and the mark before each word: a downward and an upward pointing triangle, an
#: equals sign, a question mark -- shapes, so that they read without colour.
DIRECTION_ORDER = {"adverse": 0, "unclear": 1, "neutral": 2, "favourable": 3}
DIRECTION_MARKS = {"adverse": "\u25bc", "favourable": "\u25b2", "neutral": "=", "unclear": "?"}


def direction_text(d: Deviation) -> str:
    """"▼ adverse": the deviation's direction for the party acted for, with its mark."""
    return f"{DIRECTION_MARKS.get(d.direction, '')} {d.direction}".strip()


def direction_sentence(d: Deviation, acting_for: str) -> str:
    """The direction in a sentence, with the engine's reason naming the parties."""
    what = {"adverse": f"Against the {acting_for}, the party you act for.",
            "favourable": f"For the {acting_for}, the party you act for.",
            "neutral": "For neither party: no change of meaning, or a clause binding each party alike.",
            "unclear": "The wording does not tell whose side this change is on."}.get(d.direction, "")
    why = next((r for r in d.reasons if f"to the {acting_for}" in r or r.endswith("alike")
                or r.endswith(f"to {acting_for}")), "")
    return f"{what}\n{why}".strip()


def frequency_text(f: Frequency | None) -> str:
    """``"6/20"``: documents whose same-type provision has this wording, of the set (the
    figure beside the tally strip, as the command line's table writes it)."""
    if f is None:
        return ""
    return f"{f.matching}/{f.total}"


def frequency_sentence(d: Deviation) -> str:
    """The deviation's figures in a sentence: the tally strip in words
    (:func:`desktop.tally.tally_words`), what the figure counts for this kind of change,
    and the firm's stance on the wording."""
    from .tally import tally, tally_words

    f = d.frequency
    t = tally(f.matching, f.total) if f is not None else None
    if f is None or t is None:
        return "No figure for this deviation."
    if d.category == "term":
        text = tally_words(t, verb=("uses", "use"), rest="the draft's name for this defined term")
    elif d.change == "remove-provision":
        text = tally_words(t, verb=("lacks", "lack"), rest="this provision, as the draft does")
    else:
        text = tally_words(t, rest="the draft's wording")
        text += f"; {f.same_type} {'has' if f.same_type == 1 else 'have'} a provision of this type"
    text = text[:1].upper() + text[1:] + "."
    if f.position:
        text += f" The firm's stance on this wording: {f.position}."
    return text
