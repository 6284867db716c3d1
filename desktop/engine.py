"""The window's only door into the engine: work functions and small adapters.  No Qt.

Work functions (``load_and_review``, ``rerun_review``, ``open_review_file``, ``export``,
``compute_patterns``) take plain inputs plus the ``report`` / ``cancelled`` callbacks of
:mod:`desktop.tasks` and run on a worker thread.  They import the engine lazily, so that the
window itself opens without loading scipy or gensim.

Cancellation: the engine's review has no cancel hook, so a review is abandoned between its
stages (reading, indexing the precedent set, comparing, counting frequencies); the window is
usable again the moment Cancel is pressed, and a result that arrives afterwards is dropped.
The precedent-set index build takes the cancel flag itself.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from core.errors import CounterdraftError
from core.model import Deviation, Edit, Pair, Review, TermMapping
from core.readers import formats_summary

from .state import Inputs
from .tasks import IsCancelled, Report, check_cancelled

__all__ = [
    "Outcome",
    "add_override",
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


@dataclass(frozen=True, slots=True)
class Outcome:
    """A finished review: the engine's review record and what came with it."""

    record: Any  # core.decisions.ReviewFile
    library: Any = None  # the engine's precedent-set handle, or None
    library_total: int | None = None
    notes: tuple[str, ...] = ()

    @property
    def review(self) -> Review:
        return self.record.review


def unsupported_file(path: str) -> CounterdraftError:
    return CounterdraftError(f"not an agreement Counterdraft can read (use {formats_summary(last='or')})", path=path)


# ------------------------------------------------------------------------------------------
# reviewing
# ------------------------------------------------------------------------------------------
def _open_library(folder: str, report: Report, cancelled: IsCancelled) -> Any:
    """Build or refresh the precedent set's index (cancellable between files) and open it.
    A shared store's address is opened as it is: its builders keep it up to date."""
    from core.library.index import Library, open_library
    from core.library.store import is_server_address

    if is_server_address(folder):
        return Library(folder)

    def progress(done: int, total: int, _path: str) -> None:
        # The path is not shown: file names of client agreements stay out of the screen
        # recording of a progress bar; the count is enough.
        report(done, total, f"Indexing the precedent set: {done} of {total} files")

    def stage(what: str) -> None:  # the steps after the files, which have no count
        report(0, None, f"Indexing the precedent set: {what}")

    library = open_library(folder, progress=progress, cancel=cancelled, stage=stage)
    if cancelled():
        library.close()
        check_cancelled(cancelled)
    return library


def close_library(library: Any) -> None:
    """Close a precedent-set index the window no longer shows."""
    close = getattr(library, "close", None)
    if close is not None:
        close()


def _library_total(library: Any) -> int | None:
    return None if library is None else int(library.total)


def _library_notes(library: Any) -> tuple[str, ...]:
    report = getattr(library, "report", None)
    if report is None:
        return ()
    notes: tuple[str, ...] = ()
    if getattr(report, "rebuilt", None):
        notes += (report.rebuilt[:1].upper() + report.rebuilt[1:],)
    if report.failures:
        n = len(report.failures)
        notes += (f"{n} file{'s' if n != 1 else ''} of the precedent set could not be read and "
                  f"{'were' if n != 1 else 'was'} skipped",)
    return notes


def _runner(library: Any, report: Report, cancelled: IsCancelled):
    """A review runner in the shape :mod:`core.decisions` expects, adding the precedent
    set's vocabulary and frequencies when a library is open."""

    def run(draft: Any, precedent: Any, *, overrides: Sequence[Any] = (),
            acting_for: str | None = None) -> Review:
        from core.review import run_review

        report(0, None, "Comparing provisions")
        vocabulary = getattr(library, "vocabulary", None) if library is not None else None
        review = run_review(draft, precedent, overrides=tuple(overrides), vocabulary=vocabulary,
                            acting_for=acting_for,
                            stage=lambda what: report(0, None, f"Comparing provisions: {what}"))
        check_cancelled(cancelled)
        if library is not None:
            from core.library.frequency import apply_frequency

            report(0, None, "Counting wordings in the precedent set")
            review = apply_frequency(review, library)
            check_cancelled(cancelled)
        return review

    return run


def load_and_review(
    inputs: Inputs,
    report: Report,
    cancelled: IsCancelled,
    *,
    overrides: Sequence[Any] = (),
) -> Outcome:
    """Read both documents, index the precedent set if any, review, add frequencies."""
    from core.decisions import new_review_file
    from core.readers import learns_layout, read_document

    structure = None
    layout_notes: tuple[str, ...] = ()
    if learns_layout(inputs.draft, inputs.library):
        from core.layout.store import structure_for

        report(0, None, "Reading the precedent set's formatted agreements")
        structure, layout_notes = structure_for(inputs.draft, inputs.library)
        check_cancelled(cancelled)
    report(0, None, f"Reading {Path(inputs.draft).name}")
    draft = read_document(inputs.draft, structure=structure, cache=True)
    check_cancelled(cancelled)
    report(0, None, f"Reading {Path(inputs.precedent).name}")
    precedent = read_document(inputs.precedent, cache=True)
    check_cancelled(cancelled)
    library = None
    if inputs.library:
        report(0, None, "Indexing the precedent set")
        library = _open_library(inputs.library, report, cancelled)
        check_cancelled(cancelled)
    review = _runner(library, report, cancelled)(draft, precedent, overrides=overrides,
                                                 acting_for=inputs.acting_for)
    record = new_review_file(inputs.draft, inputs.precedent, overrides=tuple(overrides), review=review)
    return Outcome(record=record, library=library, library_total=_library_total(library),
                   notes=tuple(review.notes) + layout_notes + _library_notes(library))


def _remap(decisions: Sequence[Any], review: Review) -> tuple[tuple[Any, ...], list[str]]:
    import core.decisions as cd

    remap = getattr(cd, "remap_decisions", None) or cd._remap
    kept, notes = remap(decisions, review)
    return tuple(kept), list(notes)


def rerun_review(
    record: Any,
    report: Report,
    cancelled: IsCancelled,
    *,
    overrides: Sequence[Any],
    library: Any = None,
    library_folder: str | None = None,
    acting_for: str | None | object = ...,
) -> Outcome:
    """Review the same two documents again (new term overrides, a precedent set opened
    since, or another party acted for: *acting_for*, by default the review's own), without
    re-reading them; the decisions that still apply are kept."""
    import dataclasses

    if library_folder is not None:
        report(0, None, "Indexing the precedent set")
        library = _open_library(library_folder, report, cancelled)
        check_cancelled(cancelled)
    old = record.review
    party = old.acting_for if acting_for is ... else acting_for
    review = _runner(library, report, cancelled)(old.draft, old.precedent, overrides=overrides,
                                                 acting_for=party)
    decisions, notes = _remap(record.decisions, review)
    new = dataclasses.replace(record, review=review, overrides=tuple(overrides), decisions=decisions,
                              notes=tuple(notes))
    return Outcome(record=new, library=library, library_total=_library_total(library),
                   notes=tuple(review.notes) + tuple(notes) + (_library_notes(library) if library_folder else ()))


def party_terms(path: str) -> tuple[str, ...]:
    """The party terms of the agreement at *path* (its defined terms that name a party), for
    the "acting for" choice; () when it cannot be read (the review will say why)."""
    from core.readers import read_document
    from core.review.direction import party_terms as terms_of

    try:
        return terms_of(read_document(path))
    except (CounterdraftError, OSError):
        return ()


def pair_edits(review: Review, pair: Pair) -> Sequence[Edit]:
    """The word-diff hunks of one aligned pair: the engine's own, carried in the review
    (:attr:`core.model.Pair.edits`, term-aware; never recomputed here)."""
    if pair.draft is None or pair.precedent is None:
        return ()
    return pair.edits


# ------------------------------------------------------------------------------------------
# term overrides
# ------------------------------------------------------------------------------------------
def add_override(overrides: Sequence[Any], kind: str, draft: str, precedent: str) -> tuple[Any, ...]:
    """*overrides* with the reviewer's call on (draft, precedent) replacing any earlier call on
    the same draft term."""
    from core.review.termmap import TermOverride

    new = TermOverride(draft=draft, precedent=precedent, action=kind)  # type: ignore[arg-type]
    return tuple(o for o in overrides if o.draft != draft) + (new,)


def term_status(overrides: Sequence[Any]):  # -> (status function, rejected pairs)
    """How the terms view labels each mapping, from the overrides the review ran with.

    Returns ``status(mapping) -> "confirmed" | "added" | "rejected" | ""`` and the
    (draft, precedent) pairs the reviewer rejected (the engine no longer lists them)."""
    calls = {o.draft: o for o in overrides}

    def status(m: TermMapping) -> str:
        o = calls.get(m.draft)
        if o is None or o.precedent not in (None, m.precedent):
            return ""
        return {"confirm": "confirmed", "add": "added", "reject": "rejected"}.get(o.action, "")

    rejected = [(o.draft, o.precedent or "") for o in overrides if o.action == "reject"]
    return status, rejected


# ------------------------------------------------------------------------------------------
# decisions and the review file
# ------------------------------------------------------------------------------------------
def decide(record: Any, deviation_id: str, action: str, *, text: str = "", note: str = "") -> Any:
    """The record with the reviewer's decision on *deviation_id* (the engine checks it)."""
    from core.decisions import decide as core_decide

    # The amend box shows line breaks as typed, so they are new paragraphs on purpose.
    return core_decide(record, deviation_id, action, text=text if action == "amend" else None,
                       note=note or None, paragraphs=True)


def can_change(deviation: Any) -> bool:
    """Can the reviewer revert or amend *deviation* (else only accept it)?"""
    from core.decisions import ACCEPT_ONLY, is_renamed_term

    return not (deviation.category in ACCEPT_ONLY or is_renamed_term(deviation)
                or deviation.change == "move")


def undecide(record: Any, deviation_id: str) -> Any:
    """The record without any decision on *deviation_id*."""
    import dataclasses

    return dataclasses.replace(record, decisions=tuple(d for d in record.decisions if d.deviation != deviation_id))


def decision_view(decision: Any) -> tuple[str, str, str]:
    """(action, note, amended text) of an engine decision, for display."""
    return (decision.action, decision.note or "", decision.text or "")


def save_review_file(path: str, record: Any, *, base: Any = None) -> Any:
    """Save the review; with *base* (the decisions as this window last read or saved that
    file) the file's own decisions recorded meanwhile by someone else are kept.  Returns the
    record as saved."""
    from core.decisions import save_review_file as save
    from core.decisions import save_review_file_merged

    if base is None:
        save(path, record)
        return record
    return save_review_file_merged(path, record, base=base)


def open_review_file(path: str, report: Report, cancelled: IsCancelled, *, library: Any = None) -> Outcome:
    """Reopen a review file: the engine re-reads both documents, re-runs the review and keeps
    the decisions that still apply (its notes say what changed)."""
    from core.decisions import load_review_file

    report(0, None, f"Opening {Path(path).name}")
    record = load_review_file(path, runner=_runner(library, report, cancelled))
    check_cancelled(cancelled)
    return Outcome(record=record, library=library, library_total=_library_total(library),
                   notes=tuple(record.notes))


def export(kind: str, path: str, report: Report, cancelled: IsCancelled, *, record: Any,
           order: str = "clause") -> tuple[str, tuple[str, ...]]:
    """Write the counter-draft, the comparison redline or the issues list of *record* (its
    rows in *order*: ``"clause"`` or ``"rank"``).  Returns the path and the engine's notes
    (e.g. decisions it could not write)."""
    from core import export as ex

    report(0, None, f"Writing {Path(path).name}")
    inputs = (record.draft.path, record.precedent.path)
    notes: tuple[str, ...] = ()
    if kind == "counter-draft":
        notes = tuple(ex.write_counter_draft(record.review, record.decisions, path,
                                             draft_path=record.draft.path, inputs=inputs))
    elif kind == "redline":
        # The export dialog has no options: the window writes the default (substantive) view.
        ex.write_redline(record.review, path, inputs=inputs, show=ex.REDLINE_DEFAULT_SHOW)
    elif kind == "issues-list":
        ex.write_issues_list(record.review, path, decisions=record.decisions, inputs=inputs,
                             order=order)
    else:
        raise ValueError(f"unknown export {kind!r}")
    return path, notes


# ------------------------------------------------------------------------------------------
# precedent set: variants and patterns
# ------------------------------------------------------------------------------------------
def variants_content(library: Any, review: Review | None, d: Deviation) -> dict[str, Any] | str:
    """What the variants view shows for deviation *d* (the engine's wording variants of the
    provision's slot, as they come), or a one-line reason why there is nothing."""
    from core.library.slots import slot_variants

    if review is None:
        return "No review is open."
    if d.draft_provision is not None:
        prov = review.draft.provision(d.draft_provision)
    elif d.precedent_provision is not None:
        prov = review.precedent.provision(d.precedent_provision)
    else:
        return "This deviation concerns the whole document, not one provision."
    name = " ".join(x for x in (prov.number, prov.heading) if x) or prov.term or prov.id
    return {"slot": slot_variants(library, review, d), "provision": name, "deviation": d}


def compute_patterns(library: Any, report: Report, cancelled: IsCancelled, *, precedent: Any,
                     precedent_path: str | None = None) -> Any:
    """The precedent set's negotiation patterns against the house *precedent* (a Document):
    every agreement reviewed with the same engine, the moves counted per clause type."""
    from core.library.patterns import negotiation_patterns

    skip: tuple[str, ...] = ()
    if precedent_path is not None:  # the precedent itself may lie inside the precedent set
        from core.fileio import file_sha256

        skip = tuple(library.paths(sha256=file_sha256(precedent_path)))  # also a copy of it
        try:
            if library.root is not None:
                skip += (Path(precedent_path).resolve().relative_to(Path(library.root).resolve()).as_posix(),)
        except ValueError:
            pass
    report(0, None, "Comparing every past agreement with the precedent")
    groups = negotiation_patterns(
        library, precedent, skip=skip, cancel=cancelled,
        progress=lambda done, total: report(done, total, f"Compared {done} of {total} past agreements"),
    )
    check_cancelled(cancelled)
    return groups


def pattern_groups(patterns: Any) -> list[Any]:
    """The engine's negotiation patterns (``core.library.patterns.PatternGroup``) as the
    patterns view shows them: as they come, in the engine's order."""
    return list(patterns)
