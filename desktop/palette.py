"""Colours and text cues of the desktop window (a palette of our own).

Every change is marked twice: by colour *and* by a cue that needs no colour, so that a reader
with a colour-vision deficiency or a black-and-white printout still sees it:

====================  ==========================  =========================================
mark                  colour family               non-colour cue
====================  ==========================  =========================================
words in the draft    teal green on a light mint  solid underline
words of precedent    violet on a mid lavender    strikethrough
renamed defined term  dark grey on pale sand     dotted underline
selected change       a deeper shade of the above bold type and a frame round the row
added / removed       teal / violet side stripe   caption text and a hatched empty side
moved                 grey side stripe            caption text ("moved from ... to ...")
====================  ==========================  =========================================

Teal against violet is our own pair: it is neither the blue/orange nor the red/blue pair of
other comparison screens, nor the red/green of text diffs (which collapses for the commonest
colour-vision deficiencies).  It keeps apart for the three dichromacies because the two
families differ on both opponent axes (teal is green-blue, violet red-blue) *and* in
lightness: the deletion wash is about ten CIE L* units darker than the insertion wash, so
a greyscale print still shows two different greys, besides the underline and the strike.
The test ``tests/desktop/test_palette.py`` checks these claims with published formulas:
contrast ratio of text against its background (WCAG 2.1), simulated dichromat vision
(Machado, Oliveira & Fernandes 2009) and greyscale lightness (CIE L*).  The hex values
themselves are our own choice.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "BAR", "CAUTION_BAND", "CHECKS", "DELETED", "INK", "INSERTED", "MUTED_INK", "ROW", "TALLY", "TERM", "MarkStyle",
]


@dataclass(frozen=True, slots=True)
class MarkStyle:
    """How one kind of marked text looks: text colour, background, and a stronger background
    for the change the reviewer has selected."""

    ink: str
    background: str
    strong_background: str


#: Words the draft has and the precedent does not (shown in the draft column).
INSERTED = MarkStyle(ink="#00564a", background="#e1f6ec", strong_background="#a8e5cc")
#: Words the precedent has and the draft does not (shown in the precedent column).
DELETED = MarkStyle(ink="#4a1a6c", background="#e0cdef", strong_background="#c3a4e0")
#: A defined term the draft calls by another name (both columns).
TERM = MarkStyle(ink="#2b2b2b", background="#f0e6cc", strong_background="#e3d5a8")

#: Ordinary text and secondary text.
INK = "#1d1d1f"
MUTED_INK = "#5b5e66"


@dataclass(frozen=True, slots=True)
class RowColours:
    """Side stripes and fills of the aligned rows."""

    added_stripe: str = "#117a68"
    removed_stripe: str = "#774ba0"
    moved_stripe: str = "#6d6f78"
    changed_stripe: str = "#9aa3b5"
    hatch: str = "#b9bcc4"
    focus_frame: str = "#1d1d1f"
    gutter: str = "#f3f3f1"


ROW = RowColours()


@dataclass(frozen=True, slots=True)
class BarColours:
    """Inline bars (severity, confidence)."""

    track: str = "#e4e5e9"
    fill: str = "#4d6a8f"


@dataclass(frozen=True, slots=True)
class TallyColours:
    """The tally strip (:mod:`desktop.tally`): one square per past agreement, filled when the
    agreement carries the wording.  The filled squares of the draft's and the precedent's
    wording take the colours of their columns in the side-by-side view; the outline of an
    empty square is kept at 3:1 or more against white (WCAG 2.1 SC 1.4.11, non-text
    contrast), so the strip's length reads as well as its filled part."""

    filled: str = "#3b4a63"
    draft: str = "#117a68"
    precedent: str = "#774ba0"
    outline: str = "#7d8390"
    empty: str = "#ffffff"
    #: Under the hatching of the agreements that have no such provision.
    hatch_ground: str = "#e4e5e9"


@dataclass(frozen=True, slots=True)
class CheckColours:
    """The drafting checks list (:mod:`desktop.checks`): each kind's heading line, dark
    slate on a pale stone ground (contrast above 7:1, WCAG 2.1 AAA), set apart from the
    entries by its ground and bold type rather than by colour alone."""

    heading_ink: str = "#2f3a48"
    heading_ground: str = "#e9e6df"


BAR = BarColours()
TALLY = TallyColours()
CHECKS = CheckColours()

#: The caution band across the top of the window: quiet, but always there.
CAUTION_BAND = ("#2b2f38", "#eef0f4")  # (ink, background)
