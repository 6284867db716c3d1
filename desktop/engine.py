"""The window's adapter to :mod:`core.session`, the engine's one door.  No Qt.

Work functions (``load_and_review``, ``rerun_review``, ``open_review_file``, ``export``,
``compute_patterns``) take plain inputs plus the ``report`` / ``cancelled`` callbacks of
:mod:`core.session` (which :mod:`desktop.tasks` passes in) and run on a worker thread; they
bundle what the session returns into an :class:`Outcome` for the window.  The session imports
the engine lazily, so that the window itself opens without loading scipy or gensim.

Cancellation: a review is abandoned between its stages (reading, indexing the precedent set,
comparing, counting frequencies); the window is usable again the moment Cancel is pressed,
and a result that arrives afterwards is dropped.  The precedent-set index build takes the
cancel flag itself.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Literal, cast

from core import session
from core.errors import CounterdraftError
from core.model import Deviation, Document, Edit, Pair, Review, TermMapping
from core.readers import formats_summary
from core.session import IsCancelled, Report

from .state import Inputs

if TYPE_CHECKING:
    from core.decisions import Decision, ReviewFile
    from core.library.index import Library
    from core.library.patterns import PatternGroup
    from core.library.slots import SlotVariants
    from core.model import OverrideAction
    from core.review.termmap import TermOverride

__all__ = [
    "Outcome",
    "VariantsContent",
    "add_override",
    "can_change",
    "close_library",
    "compute_patterns",
    "decide",
    "decision_view",
    "export",
    "load_and_review",
    "open_review_file",
    "pair_edits",
    "party_terms",
    "pattern_groups",
    "rerun_review",
    "save_review_file",
    "term_status",
    "undecide",
    "unsupported_file",
    "variants_content",
]

#: What the terms view says about a mapping the reviewer ruled on.
TermStatus = Literal["confirmed", "added", "rejected", ""]
_STATUS_OF_ACTION: dict[str, TermStatus] = {"confirm": "confirmed", "add": "added", "reject": "rejected"}


@dataclass(frozen=True, slots=True)
class Outcome:
    """A finished review: the engine's review record and what came with it."""

    record: ReviewFile
    library: Library | None = None
    library_total: int | None = None
    notes: tuple[str, ...] = ()

    @property
    def review(self) -> Review:
        return self.record.review


def _outcome(record: ReviewFile, library: Library | None, notes: Sequence[str]) -> Outcome:
    total = None if library is None else int(library.total)
    return Outcome(record=record, library=library, library_total=total, notes=tuple(notes))


def unsupported_file(path: str) -> CounterdraftError:
    return CounterdraftError(f"not an agreement Counterdraft can read (use {formats_summary(last='or')})", path=path)


# ------------------------------------------------------------------------------------------
# reviewing
# ------------------------------------------------------------------------------------------
def close_library(library: Library | None) -> None:
    """Close a precedent-set index the window no longer shows."""
    if library is not None:
        library.close()


def _library_notes(library: Library | None) -> tuple[str, ...]:
    """What the index build did that the reviewer should know, as sentences."""
    report = None if library is None else library.report
    if report is None:
        return ()
    notes: tuple[str, ...] = ()
    if report.rebuilt:
        notes += (report.rebuilt[:1].upper() + report.rebuilt[1:],)
    if report.failures:
        n = len(report.failures)
        notes += (f"{n} file{'s' if n != 1 else ''} of the precedent set could not be read and "
                  f"{'were' if n != 1 else 'was'} skipped",)
    return notes


def load_and_review(
    inputs: Inputs,
    report: Report,
    cancelled: IsCancelled,
    *,
    overrides: Sequence[TermOverride] = (),
) -> Outcome:
    """Read both documents, index the precedent set if any, review, add frequencies."""
    docs = session.read_documents(inputs.draft, inputs.precedent, library=inputs.library,
                                  report=report, cancelled=cancelled)
    library = None
    if inputs.library:
        library = session.open_library(inputs.library, report=report, cancelled=cancelled)
    review = session.review(docs.draft, docs.precedent, library=library, overrides=overrides,
                            acting_for=inputs.acting_for, report=report, cancelled=cancelled)
    record = session.new_review_file(inputs.draft, inputs.precedent, review=review,
                                     overrides=overrides, library=inputs.library)
    return _outcome(record, library, review.notes + docs.notes + _library_notes(library))


def rerun_review(
    record: ReviewFile,
    report: Report,
    cancelled: IsCancelled,
    *,
    overrides: Sequence[TermOverride],
    library: Library | None = None,
    library_folder: str | None = None,
    acting_for: str | None | session.Party = session.SAME_PARTY,
) -> Outcome:
    """Review the same two documents again (new term overrides, a precedent set opened
    since -- *library_folder*, opened here --, or another party acted for: *acting_for*, by
    default the review's own), without re-reading them; the decisions that still apply are
    kept."""
    if library_folder is not None:
        library = session.open_library(library_folder, report=report, cancelled=cancelled)
    new = session.rerun(record, overrides=overrides, library=library, acting_for=acting_for,
                        report=report, cancelled=cancelled)
    opened = _library_notes(library) if library_folder is not None else ()
    return _outcome(new, library, new.review.notes + new.notes + opened)


def open_review_file(path: str, report: Report, cancelled: IsCancelled, *,
                     library: Library | None = None) -> Outcome:
    """Reopen a review file: the engine re-reads both documents, re-runs the review (with the
    precedent set the window has open) and keeps the decisions that still apply (its notes
    say what changed)."""
    record = session.open_review_file(path, library=library, report=report, cancelled=cancelled)
    return _outcome(record, library, record.notes)


def party_terms(path: str) -> tuple[str, ...]:
    """The party terms of the agreement at *path*, for the "acting for" choice."""
    return session.party_terms(path)


def pair_edits(review: Review, pair: Pair) -> Sequence[Edit]:
    """The word-diff hunks of one aligned pair: the engine's own, carried in the review
    (:attr:`core.model.Pair.edits`, term-aware; never recomputed here)."""
    if pair.draft is None or pair.precedent is None:
        return ()
    return pair.edits


# ------------------------------------------------------------------------------------------
# term overrides
# ------------------------------------------------------------------------------------------
def add_override(overrides: Sequence[TermOverride], kind: str, draft: str,
                 precedent: str) -> tuple[TermOverride, ...]:
    """*overrides* with the reviewer's call *kind* (``confirm``, ``reject`` or ``add``) on
    (draft, precedent) replacing any earlier call on the same draft term."""
    from core.review.termmap import TermOverride

    # cast: TermOverride refuses any other action with a one-line error
    new = TermOverride(draft=draft, precedent=precedent, action=cast("OverrideAction", kind))
    return tuple(o for o in overrides if o.draft != draft) + (new,)


def term_status(overrides: Sequence[TermOverride]
                ) -> tuple[Callable[[TermMapping], TermStatus], list[tuple[str, str]]]:
    """How the terms view labels each mapping, from the overrides the review ran with.

    Returns ``status(mapping) -> "confirmed" | "added" | "rejected" | ""`` and the
    (draft, precedent) pairs the reviewer rejected (the engine no longer lists them)."""
    calls = {o.draft: o for o in overrides}

    def status(m: TermMapping) -> TermStatus:
        o = calls.get(m.draft)
        if o is None or o.precedent not in (None, m.precedent):
            return ""
        return _STATUS_OF_ACTION.get(o.action, "")

    rejected = [(o.draft, o.precedent or "") for o in overrides if o.action == "reject"]
    return status, rejected


# ------------------------------------------------------------------------------------------
# decisions and the review file
# ------------------------------------------------------------------------------------------
def decide(record: ReviewFile, deviation_id: str, action: str, *, text: str = "",
           note: str = "") -> ReviewFile:
    """The record with the reviewer's decision on *deviation_id* (the engine checks it)."""
    # The amend box shows line breaks as typed, so they are new paragraphs on purpose.
    return session.decide(record, deviation_id, action, text=text if action == "amend" else None,
                          note=note or None, paragraphs=True)


def can_change(deviation: Deviation) -> bool:
    """Can the reviewer revert or amend *deviation* (else only accept it)?"""
    from core.decisions import ACCEPT_ONLY, is_renamed_term

    return not (deviation.category in ACCEPT_ONLY or is_renamed_term(deviation)
                or deviation.change == "move")


def undecide(record: ReviewFile, deviation_id: str) -> ReviewFile:
    """The record without any decision on *deviation_id*."""
    return session.undecide(record, deviation_id)


def decision_view(decision: Decision) -> tuple[str, str, str]:
    """(action, note, amended text) of an engine decision, for display."""
    return (decision.action, decision.note or "", decision.text or "")


def save_review_file(path: str, record: ReviewFile, *,
                     base: Sequence[Decision] | None = None) -> ReviewFile:
    """Save the review; with *base* (the decisions as this window last read or saved that
    file) the file's own decisions recorded meanwhile by someone else are kept.  Returns the
    record as saved."""
    return session.save(path, record, base=base)


def export(kind: session.ExportKind, path: str, report: Report, cancelled: IsCancelled, *,
           record: ReviewFile, order: str = "clause") -> tuple[str, tuple[str, ...]]:
    """Write the counter-draft, the comparison redline (its default, substantive view: the
    export dialog has no options) or the issues list of *record* (its rows in *order*:
    ``"clause"`` or ``"rank"``).  Returns the path and the engine's notes (e.g. decisions it
    could not write)."""
    report(0, None, f"Writing {Path(path).name}")
    return path, session.export(kind, path, record=record, order=order)


# ------------------------------------------------------------------------------------------
# precedent set: variants and patterns
# ------------------------------------------------------------------------------------------
@dataclass(frozen=True, slots=True)
class VariantsContent:
    """What the variants view shows for a deviation: the engine's wording variants of its
    provision's slot, the provision's name and the deviation."""

    slot: SlotVariants
    provision: str
    deviation: Deviation


def variants_content(library: Library, review: Review | None, d: Deviation) -> VariantsContent | str:
    """What the variants view shows for deviation *d* (as the engine gives it), or a
    one-line reason why there is nothing."""
    if review is None:
        return "No review is open."
    if d.draft_provision is not None:
        prov = review.draft.provision(d.draft_provision)
    elif d.precedent_provision is not None:
        prov = review.precedent.provision(d.precedent_provision)
    else:
        return "This deviation concerns the whole document, not one provision."
    name = " ".join(x for x in (prov.number, prov.heading) if x) or prov.term or prov.id
    return VariantsContent(session.slot_variants(library, review, d), name, d)


def compute_patterns(library: Library, report: Report, cancelled: IsCancelled, *, precedent: Document,
                     precedent_path: str | None = None) -> tuple[PatternGroup, ...]:
    """The precedent set's negotiation patterns against the house *precedent*."""
    return session.compute_patterns(library, precedent, precedent_path=precedent_path,
                                    report=report, cancelled=cancelled)


def pattern_groups(patterns: Sequence[PatternGroup]) -> list[PatternGroup]:
    """The engine's negotiation patterns as the patterns view shows them: as they come, in
    the engine's order."""
    return list(patterns)
