"""The one place that assembles the engine: the command line and the window are its clients.

Every client step goes through a function here: read the two documents (a PDF draft with
the precedent set's learned line layout), open the precedent set (a folder's index built or
refreshed; a shared store's address opened as it is), review (with the set's vocabulary,
clause typing and wording frequencies when a set is open), open a saved review file, record
decisions, save, export, and count the set's negotiation patterns.  So the command line and
the window cannot drift apart: the same inputs give the same review.

Long steps take two keyword callbacks, the same for every client:

* ``report(done, total, message)`` (:class:`Report`) says what is happening (``total`` None
  when unknown);
* ``cancelled()`` (:data:`IsCancelled`) says whether the user asked to stop; the step then
  raises :class:`Cancelled` at its next stage boundary (reading each document, indexing the
  set, comparing, counting frequencies).  The index build also checks between files.

The engine's modules are imported inside the functions, so that importing this module (and
``counterdraft inspect``) loads none of the review's heavy dependencies.

Usage (the command line's ``review --library``)::

    docs = read_documents(draft_path, precedent_path, library=folder)
    with open_library(folder) as library:
        result = review(docs.draft, docs.precedent, library=library, acting_for="Supplier")
"""

from __future__ import annotations

import dataclasses
import enum
import os
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from functools import partial
from pathlib import Path
from typing import TYPE_CHECKING, Literal, Protocol

from .errors import CounterdraftError
from .parallel import cycles_uncollected, each_beside, side_by_side

if TYPE_CHECKING:
    from .decisions import Decision, ReviewFile
    from .export.redline import RedlineShow
    from .library.index import Library
    from .library.patterns import PatternGroup
    from .library.slots import SlotVariants
    from .model import Deviation, Document, Review
    from .review.termmap import TermOverride

__all__ = [
    "SAME_PARTY",
    "Cancelled",
    "Documents",
    "ExportKind",
    "IsCancelled",
    "LibraryOpener",
    "Party",
    "Report",
    "check_cancelled",
    "compute_patterns",
    "decide",
    "export",
    "never_cancelled",
    "new_review_file",
    "open_library",
    "open_review_file",
    "party_terms",
    "read_document",
    "read_documents",
    "recorded_library",
    "rerun",
    "review",
    "save",
    "silent",
    "slot_variants",
    "undecide",
    "update_review_file",
]


# ------------------------------------------------------------------------------------------
# progress and cancelling
# ------------------------------------------------------------------------------------------
class Report(Protocol):
    """Progress of a long step: *done* of *total* (None when unknown), and what it is doing."""

    def __call__(self, done: int, total: int | None, message: str, /) -> None: ...


#: Whether the user asked to stop (checked between stages).
IsCancelled = Callable[[], bool]


class Cancelled(Exception):
    """The user cancelled the operation."""

    def __init__(self) -> None:
        super().__init__("cancelled")


def check_cancelled(cancelled: IsCancelled) -> None:
    """Raise :class:`Cancelled` when the user has asked to stop."""
    if cancelled():
        raise Cancelled()


def silent(done: int, total: int | None, message: str) -> None:
    """The default :class:`Report`: progress goes nowhere."""


def never_cancelled() -> bool:
    """The default :data:`IsCancelled`: the step runs to its end."""
    return False


# ------------------------------------------------------------------------------------------
# reading
# ------------------------------------------------------------------------------------------
@dataclass(frozen=True, slots=True)
class Documents:
    """The two agreements of a review, read; *notes* come from reading the draft with the
    precedent set's learned layout (each document's own warnings are on it)."""

    draft: Document
    precedent: Document
    notes: tuple[str, ...] = ()


def read_document(path: str | os.PathLike[str]) -> Document:
    """One agreement, read (through the parsed-document cache)."""
    from .readers import read_document as read

    return read(path, cache=True)


#: Two agreements with at least this much to parse each (bytes: a .docx's parts uncompressed,
#: about 25 pages) are read side by side on two processor cores (:mod:`core.parallel`); two
#: shorter ones take about as long to read as a process takes to fork and send one back.
PARALLEL_READ_MIN_BYTES = 100_000


def read_documents(draft: str | os.PathLike[str], precedent: str | os.PathLike[str], *,
                   library: str | None = None, meanwhile: Callable[[bool], object] | None = None,
                   report: Report = silent, cancelled: IsCancelled = never_cancelled) -> Documents:
    """Both agreements; a page-format draft (PDF) read with the line layout learned from the
    precedent set at *library* (a folder or a shared store's address) when one is given.

    *meanwhile* is called once, in this process: with True while long agreements are read on
    the other processor cores (the caller opens the precedent set, loads what the review
    needs), with False after reading short ones."""
    from .readers import content_size, learns_layout
    from .readers import read_document as read

    structure = None
    notes: tuple[str, ...] = ()
    if learns_layout(draft, library):
        from .layout.store import structure_for

        report(0, None, "Reading the precedent set's formatted agreements")
        structure, notes = structure_for(draft, library)
        check_cancelled(cancelled)
    report(0, None, f"Reading {Path(draft).name} and {Path(precedent).name}")
    read_draft = partial(read, draft, structure=structure, cache=True)
    read_precedent = partial(read, precedent, cache=True)
    if min(content_size(draft), content_size(precedent)) < PARALLEL_READ_MIN_BYTES:
        with cycles_uncollected():  # reading leaves a few hundred objects in cycles, whatever the size
            draft_doc, precedent_doc = read_draft(), read_precedent()
        if meanwhile is not None:
            meanwhile(False)
    elif meanwhile is None:
        precedent_doc, draft_doc = side_by_side(read_precedent, read_draft)
    else:
        (draft_doc, precedent_doc), _done = each_beside([read_draft, read_precedent], partial(meanwhile, True))
    check_cancelled(cancelled)
    return Documents(draft_doc, precedent_doc, tuple(notes))


def prepare_review(*, long: bool) -> None:
    """Load the review engine now (while documents are read: :func:`read_documents`'s
    *meanwhile*); *long* documents need what the engine needs for many provisions."""
    with cycles_uncollected():  # loading modules leaves little to collect
        from .review import preload

        preload(long=long)


def party_terms(path: str) -> tuple[str, ...]:
    """The party terms of the agreement at *path* (its defined terms that name a party), for
    an "acting for" choice; () when it cannot be read (the review will say why)."""
    from .review.direction import party_terms as terms_of

    try:
        return terms_of(read_document(path))
    except (CounterdraftError, OSError):
        return ()


# ------------------------------------------------------------------------------------------
# the precedent set
# ------------------------------------------------------------------------------------------
def open_library(address: str, *, report: Report = silent,
                 cancelled: IsCancelled = never_cancelled) -> Library:
    """Open the precedent set at *address*: a folder's index is built or refreshed first
    (cancellable between files); a shared store's address is opened as it is (its builders
    keep it up to date).  The caller closes it (``with`` or ``close()``); ``library.report``
    holds what the build skipped or rebuilt, ``library.stale`` whether a shared store's last
    build did not finish."""
    from .library.index import Library
    from .library.index import open_library as open_index
    from .library.store import is_server_address

    if is_server_address(address):
        return Library(address)
    if not Path(address).is_dir():
        raise CounterdraftError("the precedent-set folder does not exist", path=address)
    report(0, None, "Indexing the precedent set")

    def files(done: int, total: int, _path: str) -> None:
        # The path is not passed on: file names of client agreements stay out of a progress
        # display (and of a screen recording of it); the count is enough.
        report(done, total, f"Indexing the precedent set: {done} of {total} files")

    def stage(what: str) -> None:  # the steps after the files, which have no count
        report(0, None, f"Indexing the precedent set: {what}")

    library = open_index(address, progress=files, cancel=cancelled, stage=stage)
    if cancelled():
        library.close()
        raise Cancelled()
    return library


def recorded_library(review_file: str | os.PathLike[str]) -> str | None:
    """The precedent set (folder or shared store's address) a review file records, if any,
    read without re-running anything: open it with :func:`open_library` to reopen the file
    as it was reviewed."""
    from .decisions import read_library_folder

    return read_library_folder(review_file)


def slot_variants(library: Library, review: Review, deviation: Deviation) -> SlotVariants:
    """The wording variants, across the precedent set, of the provision *deviation* is on."""
    from .library.slots import slot_variants as variants

    return variants(library, review, deviation)


# ------------------------------------------------------------------------------------------
# reviewing
# ------------------------------------------------------------------------------------------
def review(draft: Document, precedent: Document, *, library: Library | None = None,
           overrides: Sequence[TermOverride] = (), acting_for: str | None = None,
           report: Report = silent, cancelled: IsCancelled = never_cancelled) -> Review:
    """Compare *draft* with *precedent* (acting for *acting_for* when given).  With an open
    *library*, the review uses the set's vocabulary and clause typing and each deviation
    carries how common its wording is in the set."""
    from .review import run_review

    report(0, None, "Comparing provisions")
    vocabulary, clause_type = None, None
    if library is not None:
        from .library.frequency import clause_type_function

        vocabulary, clause_type = library.vocabulary, clause_type_function(library)
    result = run_review(draft, precedent, overrides=tuple(overrides), vocabulary=vocabulary,
                        clause_type=clause_type, acting_for=acting_for,
                        stage=lambda what: report(0, None, f"Comparing provisions: {what}"))
    check_cancelled(cancelled)
    if library is not None:
        from .library.frequency import apply_frequency

        report(0, None, "Counting wordings in the precedent set")
        result = apply_frequency(result, library)
        check_cancelled(cancelled)
    return result


class _Runner(Protocol):
    def __call__(self, draft: Document, precedent: Document, *,
                 overrides: Sequence[TermOverride] = (), acting_for: str | None = None) -> Review: ...


def _runner(library: Library | None, report: Report, cancelled: IsCancelled) -> _Runner:
    """:func:`review` in the shape :mod:`core.decisions` re-runs a review file with."""

    def run(draft: Document, precedent: Document, *, overrides: Sequence[TermOverride] = (),
            acting_for: str | None = None) -> Review:
        return review(draft, precedent, library=library, overrides=overrides,
                      acting_for=acting_for, report=report, cancelled=cancelled)

    return run


def new_review_file(draft: str | os.PathLike[str], precedent: str | os.PathLike[str], *,
                    review: Review, overrides: Sequence[TermOverride] = (),
                    library: str | None = None) -> ReviewFile:
    """A review file for *review* of the agreements at *draft* and *precedent*, recording
    the precedent set (folder or address) it used, ready for decisions."""
    from .decisions import new_review_file as start

    return start(draft, precedent, review=review, overrides=tuple(overrides), library=library)


class Party(enum.Enum):
    """A default party: the one the review already acts for."""

    SAME = "the party the review already acts for"


#: :func:`rerun`'s default party: the one the review already acts for.
SAME_PARTY = Party.SAME


def rerun(record: ReviewFile, *, overrides: Sequence[TermOverride], library: Library | None = None,
          acting_for: str | None | Party = SAME_PARTY, report: Report = silent,
          cancelled: IsCancelled = never_cancelled) -> ReviewFile:
    """Review *record*'s two documents again, without re-reading them: with new term
    *overrides*, an open precedent set, or for another party (*acting_for*; by default the
    review's own).  The decisions that still apply are kept; ``notes`` says which were not."""
    from .decisions import remap_decisions

    old = record.review
    party = old.acting_for if acting_for is SAME_PARTY else acting_for
    result = review(old.draft, old.precedent, library=library, overrides=overrides,
                    acting_for=party, report=report, cancelled=cancelled)
    decisions, notes = remap_decisions(record.decisions, result)
    return dataclasses.replace(record, review=result, overrides=tuple(overrides),
                               decisions=decisions, notes=tuple(notes))


#: Opens a precedent set by its address for a client (e.g. with its own progress display).
LibraryOpener = Callable[[str], "Library"]


def _recorded_runner(path: str | os.PathLike[str], opener: LibraryOpener, report: Report,
                     cancelled: IsCancelled) -> _Runner:
    """A runner that opens the precedent set the review file at *path* records (with
    *opener*) only when the review runs -- after the file itself was checked -- and closes
    it after."""
    address = recorded_library(path)

    def run(draft: Document, precedent: Document, *, overrides: Sequence[TermOverride] = (),
            acting_for: str | None = None) -> Review:
        if not address:
            return review(draft, precedent, overrides=overrides, acting_for=acting_for,
                          report=report, cancelled=cancelled)
        with opener(address) as library:
            return review(draft, precedent, library=library, overrides=overrides,
                          acting_for=acting_for, report=report, cancelled=cancelled)

    return run


def open_review_file(path: str | os.PathLike[str], *, library: Library | None = None,
                     open_recorded: LibraryOpener | None = None, report: Report = silent,
                     cancelled: IsCancelled = never_cancelled) -> ReviewFile:
    """Reopen a review file: both documents re-read, the review re-run and the decisions
    that still apply kept (``notes`` says what changed).  The review uses *library*'s figures
    when given, or, with *open_recorded*, those of the precedent set the file records
    (opened with it for the run)."""
    from .decisions import load_review_file

    report(0, None, f"Opening {Path(path).name}")
    run = (_recorded_runner(path, open_recorded, report, cancelled) if open_recorded is not None
           else _runner(library, report, cancelled))
    record = load_review_file(path, runner=run)
    check_cancelled(cancelled)
    return record


def update_review_file(path: str | os.PathLike[str], change: Callable[[ReviewFile], ReviewFile], *,
                       open_recorded: LibraryOpener = open_library) -> ReviewFile:
    """Reopen the review file at *path* (with the precedent set it records, opened with
    *open_recorded*), apply *change* and save it, under one exclusive lock (decisions recorded
    at the same moment all land).  Returns the saved record."""
    from .decisions import update_review_file as update

    return update(path, change, runner=_recorded_runner(path, open_recorded, silent, never_cancelled))


# ------------------------------------------------------------------------------------------
# decisions and saving
# ------------------------------------------------------------------------------------------
def decide(record: ReviewFile, deviation_id: str, action: str, *, text: str | None = None,
           note: str | None = None, paragraphs: bool = False) -> ReviewFile:
    """*record* with the reviewer's decision on *deviation_id* (the engine checks it; see
    :func:`core.decisions.decide`)."""
    from .decisions import decide as record_decision

    return record_decision(record, deviation_id, action, text=text, note=note, paragraphs=paragraphs)


def undecide(record: ReviewFile, deviation_id: str) -> ReviewFile:
    """*record* without any decision on *deviation_id*."""
    kept = tuple(d for d in record.decisions if d.deviation != deviation_id)
    return dataclasses.replace(record, decisions=kept)


def save(path: str | os.PathLike[str], record: ReviewFile, *,
         base: Sequence[Decision] | None = None) -> ReviewFile:
    """Save *record* (atomically).  With *base* (the decisions as this session last read or
    saved that file) the decisions someone else recorded there meanwhile are kept.  Returns
    the record as saved."""
    from .decisions import save_review_file, save_review_file_merged

    if base is None:
        save_review_file(path, record)
        return record
    return save_review_file_merged(path, record, base=base)


# ------------------------------------------------------------------------------------------
# outputs
# ------------------------------------------------------------------------------------------
ExportKind = Literal["counter-draft", "redline", "issues-list"]


def export(kind: ExportKind, path: str | os.PathLike[str], *, record: ReviewFile,
           author: str | None = None, inputs: Sequence[str] = (),
           show: RedlineShow | None = None, order: str | None = None,
           include: Sequence[str] | None = None) -> tuple[str, ...]:
    """Write the counter-draft, the comparison redline or the issues list of *record* to
    *path* (atomically; never over the two documents nor any of *inputs*).  *author* of the
    tracked changes defaults to the user's name; *show* is the redline's view, *order* and
    *include* the issues list's rows (each defaults to the engine's).  Returns the engine's
    notes (e.g. decisions the counter-draft could not write)."""
    from .export import (
        ISSUES_DEFAULT_INCLUDE,
        ISSUES_DEFAULT_ORDER,
        REDLINE_DEFAULT_SHOW,
        default_author,
        write_counter_draft,
        write_issues_list,
        write_redline,
    )

    author = author or default_author()
    inputs = (record.draft.path, record.precedent.path, *inputs)
    if kind == "counter-draft":
        return tuple(write_counter_draft(record.review, record.decisions, path,
                                         draft_path=record.draft.path, author=author, inputs=inputs))
    if kind == "redline":
        write_redline(record.review, path, author=author, inputs=inputs,
                      show=show or REDLINE_DEFAULT_SHOW)
    elif kind == "issues-list":
        write_issues_list(record.review, path, decisions=record.decisions, author=author,
                          inputs=inputs, include=ISSUES_DEFAULT_INCLUDE if include is None else include,
                          order=order or ISSUES_DEFAULT_ORDER)
    else:
        raise ValueError(f"unknown export {kind!r}")
    return ()


def compute_patterns(library: Library, precedent: Document, *, precedent_path: str | None = None,
                     report: Report = silent, cancelled: IsCancelled = never_cancelled
                     ) -> tuple[PatternGroup, ...]:
    """The precedent set's negotiation patterns against the house *precedent*: every past
    agreement reviewed with the same engine, the moves counted per clause type.  The
    precedent itself (at *precedent_path*, or a copy of it) is left out when it lies in the
    set."""
    from .library.patterns import negotiation_patterns

    skip: tuple[str, ...] = ()
    if precedent_path is not None:
        from .fileio import file_sha256

        skip = tuple(library.paths(sha256=file_sha256(precedent_path)))  # also a copy of it
        if library.root is not None:
            try:
                skip += (Path(precedent_path).resolve().relative_to(Path(library.root).resolve()).as_posix(),)
            except ValueError:  # the precedent lies outside the set
                pass
    report(0, None, "Comparing every past agreement with the precedent")
    groups = negotiation_patterns(
        library, precedent, skip=skip, cancel=cancelled,
        progress=lambda done, total: report(done, total, f"Compared {done} of {total} past agreements"),
    )
    check_cancelled(cancelled)
    return groups
