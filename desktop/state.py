"""The window's session state and the one "what changed" value broadcast after an operation.

:class:`Workspace` holds plain data only (paths, the engine's :class:`core.model.Review`, the
term overrides and the decisions).  After any operation the window mutates the workspace and
broadcasts one :class:`Change` (a set of flags); each view looks at the flags and decides
whether it needs to refresh.  View state (sorting, filters, display toggles) lives in small
separate objects, not in the models.
"""

from __future__ import annotations

import enum
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING, Any

from core.model import CATEGORIES, Deviation, Review

if TYPE_CHECKING:
    from core.decisions import Decision, ReviewFile
    from core.library.index import Library
    from core.library.patterns import PatternGroup
    from core.review.termmap import TermOverride

__all__ = [
    "Change",
    "DeviationFilter",
    "DisplayOptions",
    "Inputs",
    "Workspace",
]


class Change(enum.Flag):
    """What an operation changed; views refresh only for the flags they show."""

    NONE = 0
    REVIEW = enum.auto()  # a new Review object: pairs, deviations, term map
    DECISIONS = enum.auto()  # a decision or note was recorded or cleared
    SELECTION = enum.auto()  # the selected deviation or provision
    DISPLAY = enum.auto()  # display toggles (term, numbering, formatting changes)
    LIBRARY = enum.auto()  # a precedent set was loaded, refreshed or dropped
    PATTERNS = enum.auto()  # negotiation patterns were computed
    FILES = enum.auto()  # input paths, review file path, unsaved-changes flag
    BUSY = enum.auto()  # a background operation started or ended

    EVERYTHING = REVIEW | DECISIONS | SELECTION | DISPLAY | LIBRARY | PATTERNS | FILES | BUSY


@dataclass(frozen=True, slots=True)
class Inputs:
    """The files a review compares."""

    draft: str
    precedent: str
    library: str | None = None
    #: The precedent's party term the reviewer acts for (core.review.direction), or None.
    acting_for: str | None = None


@dataclass(frozen=True, slots=True)
class DisplayOptions:
    """Which classes of change are shown (in the side-by-side marks and the deviation list).

    Substantive changes and blanks of the precedent filled in are always shown.  The
    defaults match the command line's default listing (substantive, completion and term
    changes).
    """

    terms: bool = True
    numbering: bool = False
    formatting: bool = False  # formatting and punctuation

    def shown_categories(self) -> frozenset[str]:
        shown = {"substantive", "completion"}
        if self.terms:
            shown.add("term")
        if self.numbering:
            shown.add("numbering")
        if self.formatting:
            shown.update(("formatting", "punctuation"))
        assert shown <= set(CATEGORIES)
        return frozenset(shown)


@dataclass(frozen=True, slots=True)
class DeviationFilter:
    """View state of the deviation list: sort column and order, a text filter, and whether to
    list only deviations still waiting for a decision."""

    sort_column: int = 0
    descending: bool = False
    text: str = ""
    undecided_only: bool = False

    def with_(self, **changes: Any) -> DeviationFilter:
        return replace(self, **changes)


@dataclass(slots=True)
class Workspace:
    """Everything the window currently shows, as plain data.

    ``record`` is the engine's review record (:class:`core.decisions.ReviewFile`): both
    documents with their hashes, the review, the term overrides and the decisions.  The
    window never edits it by hand; it asks :mod:`desktop.engine` for a new one.
    """

    inputs: Inputs | None = None
    record: ReviewFile | None = None
    #: The opened precedent set (the engine's library handle), or None.
    library: Library | None = None
    #: Negotiation patterns of the precedent set against this precedent, once computed.
    patterns: tuple[PatternGroup, ...] | None = None
    review_path: str | None = None  # where the review file was last saved or opened
    #: The decisions as that file held them when last opened or saved here: saving merges
    #: with what others recorded in it since (core.decisions.save_review_file_merged).
    saved_decisions: tuple[Decision, ...] = ()
    unsaved: bool = False
    selected: str | None = None  # id of the selected deviation
    display: DisplayOptions = DisplayOptions()
    busy: str | None = None  # name of the running background operation

    @property
    def review(self) -> Review | None:
        return None if self.record is None else self.record.review

    @property
    def overrides(self) -> tuple[TermOverride, ...]:
        return () if self.record is None else tuple(self.record.overrides)

    @property
    def decisions(self) -> dict[str, Decision]:
        """Deviation id -> the engine's decision on it."""
        return {} if self.record is None else {d.deviation: d for d in self.record.decisions}

    def deviation(self, did: str | None) -> Deviation | None:
        review = self.review
        if did is None or review is None:
            return None
        for d in review.deviations:
            if d.id == did:
                return d
        return None
