"""Colours and text cues of the desktop window (a palette of our own).

Every change is marked twice: by colour *and* by a cue that needs no colour, so that a reader
with a colour-vision deficiency or a black-and-white printout still sees it:

====================  ==========================  =========================================
mark                  colour family               non-colour cue
====================  ==========================  =========================================
words in the draft    blue                        solid underline
words of precedent    orange                      strikethrough
renamed defined term  neutral grey                dotted underline
selected change       a darker shade of the above bold type and a frame round the row
added / removed       blue / orange side stripe   caption text and a hatched empty side
moved                 grey side stripe            caption text ("moved from ... to ...")
====================  ==========================  =========================================

Blue against orange is the pair that stays apart for the three common dichromacies
(protanopia, deuteranopia, tritanopia); red against green is the pair that does not.  The
test ``tests/desktop/test_palette.py`` checks both claims with published formulas: contrast
ratio of text against its background (WCAG 2.1) and simulated dichromat vision
(Machado, Oliveira & Fernandes 2009).  The hex values themselves are our own choice.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["MarkStyle", "INSERTED", "DELETED", "TERM", "ROW", "BAR", "CAUTION_BAND", "INK", "MUTED_INK"]


@dataclass(frozen=True, slots=True)
class MarkStyle:
    """How one kind of marked text looks: text colour, background, and a stronger background
    for the change the reviewer has selected."""

    ink: str
    background: str
    strong_background: str


#: Words the draft has and the precedent does not (shown in the draft column).
INSERTED = MarkStyle(ink="#0b3f73", background="#d9e8f8", strong_background="#9fc5ee")
#: Words the precedent has and the draft does not (shown in the precedent column).
DELETED = MarkStyle(ink="#7a3300", background="#fde3cb", strong_background="#f6b47a")
#: A defined term the draft calls by another name (both columns).
TERM = MarkStyle(ink="#2b2b2b", background="#e8e8e3", strong_background="#cfcfc6")

#: Ordinary text and secondary text.
INK = "#1d1d1f"
MUTED_INK = "#5b5e66"


@dataclass(frozen=True, slots=True)
class RowColours:
    """Side stripes and fills of the aligned rows."""

    added_stripe: str = "#2f6fb3"
    removed_stripe: str = "#c4661f"
    moved_stripe: str = "#6d6f78"
    changed_stripe: str = "#9aa3b5"
    hatch: str = "#b9bcc4"
    focus_frame: str = "#1d1d1f"
    gutter: str = "#f3f3f1"


ROW = RowColours()


@dataclass(frozen=True, slots=True)
class BarColours:
    """Inline bars (severity, how common, confidence)."""

    track: str = "#e4e5e9"
    fill: str = "#4d6a8f"
    draft_variant: str = "#2f6fb3"
    other_variant: str = "#9aa3b5"


BAR = BarColours()

#: The caution band across the top of the window: quiet, but always there.
CAUTION_BAND = ("#2b2f38", "#eef0f4")  # (ink, background)
