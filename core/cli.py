"""The ``counterdraft`` command line: a client of :mod:`core.session`, as the window is.

Every command turns :class:`CounterdraftError` into one line on stderr and exit status 2.
"""

from __future__ import annotations

import argparse
import contextlib
import functools
import os
import sys
import textwrap
from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING

from . import CAUTION, __version__, session
from .console import write_json
from .errors import CounterdraftError
from .fileio import refuse_overwrite_of_inputs

if TYPE_CHECKING:
    from .decisions import ReviewFile
    from .library.index import Library
    from .model import Deviation, Document, Review

    Subparsers = argparse._SubParsersAction[argparse.ArgumentParser]

__all__ = ["main"]

DEMO_DIR = Path(__file__).resolve().parent.parent / "demo_agreements"


def _note(message: str, *, about: str = "counterdraft") -> None:
    print(f"{about}: note: {message}", file=sys.stderr)


def _cmd_inspect(args: argparse.Namespace) -> int:
    from .outline import format_outline
    from .serialize import document_to_dict

    if args.json and args.json != "-":
        refuse_overwrite_of_inputs(args.json, args.file)
    doc = session.read_document(args.file)
    for w in doc.warnings:
        _note(w, about=args.file)
    if args.json:
        write_json(document_to_dict(doc), args.json)
    else:
        from .console import terminal_width

        print(format_outline(doc, width=args.width or terminal_width()))
    return 0


def _cmd_review(args: argparse.Namespace) -> int:
    if args.json and args.json != "-":
        refuse_overwrite_of_inputs(args.json, args.draft, args.against)
        if args.save and Path(args.save).resolve() == Path(args.json).resolve():
            raise CounterdraftError("--json and --save name the same file", path=args.save)
    with contextlib.ExitStack() as stack:
        opened: list[Library] = []

        def prepare(long: bool) -> None:
            """While long agreements are read on the other cores: load the engine, open the
            precedent set."""
            session.prepare_review(long=long)
            if args.library:
                opened.append(stack.enter_context(_open_library(args.library)))

        docs = session.read_documents(args.draft, args.against, library=args.library, meanwhile=prepare)
        for note in docs.notes:
            _note(note, about=args.draft)
        for path, doc in ((args.draft, docs.draft), (args.against, docs.precedent)):
            for w in doc.warnings:
                _note(w, about=path)
        review = session.review(docs.draft, docs.precedent, library=opened[0] if opened else None,
                                acting_for=args.acting_for)
    if args.save:
        refuse_overwrite_of_inputs(args.save, args.draft, args.against)
        session.save(args.save, session.new_review_file(args.draft, args.against, review=review,
                                                        library=args.library))
        print(f"counterdraft: review saved to {args.save}", file=sys.stderr)
    if args.json:
        from .serialize import review_to_dict

        for note in review.notes:
            _note(note)
        write_json(review_to_dict(review), args.json)
    else:
        from .review.report import format_review

        print(format_review(review, show=args.show, width=args.width))
    return 0


def _open_library(address: str) -> Library:
    """The precedent set at *address*, opened through the session with a progress bar on
    stderr, and what its build skipped or rebuilt said there."""
    from .library.commands import note_rebuilt, progress_bar, warn_skipped

    update, close = progress_bar("indexing")

    def report(done: int, total: int | None, _message: str) -> None:
        if total is not None:  # the bar counts files; the stages without a count are not shown
            update(done, total)

    try:
        library = session.open_library(address, report=report)
    finally:
        close()
    if library.report is not None:
        note_rebuilt(library.report)
        warn_skipped(library.report.failures)
    elif library.stale:  # a shared store, opened as it is
        _note("the shared precedent set's last build did not finish; its figures may be out of date")
    return library


def _review(draft: Document, precedent: Document, *, library: str | None,
            acting_for: str | None) -> Review:
    """The review of the two documents: with the figures of the precedent set at *library*
    when given, acting for a party when given."""
    if not library:
        return session.review(draft, precedent, acting_for=acting_for)
    with _open_library(library) as opened:
        return session.review(draft, precedent, library=opened, acting_for=acting_for)


def _open_review_file(path: str) -> ReviewFile:
    record = session.open_review_file(path, open_recorded=_open_library)
    for note in record.notes:
        _note(note)
    return record


def _deviation_by_number(review: Review, given: str, path: str) -> Deviation:
    """The deviation *given* names: its number (the rank every output shows, e.g. "3") or
    its internal id (e.g. "v12", which saved scripts use)."""
    devs = review.deviations
    if given.isdigit():
        dev = next((d for d in devs if d.rank == int(given)), None)
    else:
        dev = next((d for d in devs if d.id == given), None)
    if dev is None:
        numbers = f" (numbers run 1 to {len(devs)})" if devs else " (this review has no deviation)"
        raise CounterdraftError(f"no deviation {given}{numbers}", path=path)
    return dev


def _cmd_decide(args: argparse.Namespace) -> int:
    from .labels import clause_label

    found: list[Deviation] = []

    def record_it(record: ReviewFile) -> ReviewFile:
        for note in record.notes:
            _note(note)
        dev = _deviation_by_number(record.review, args.deviation, args.review_file)
        found.append(dev)
        return session.decide(record, dev.id, args.action, text=args.text, note=args.note,
                              paragraphs=args.paragraphs)

    # read, decide and save under one lock: decisions recorded at the same moment all land
    record = session.update_review_file(args.review_file, record_it, open_recorded=_open_library)
    dev = found[-1]
    where = clause_label(record.review, dev)
    print(f"Deviation {dev.rank}{f', {where}' if where else ''}: {args.action} recorded "
          f"in {args.review_file}")
    return 0


def _export_outputs(args: argparse.Namespace) -> list[str]:
    """The outputs ``export`` was asked for, refused when none, shared or over an input."""
    outputs = [o for o in (args.counter_draft, args.redline, args.issues_list) if o]
    if not outputs:
        raise CounterdraftError("nothing to export: give --counter-draft, --redline or --issues-list")
    if len({str(Path(o).resolve()) for o in outputs}) != len(outputs):
        raise CounterdraftError("two outputs share one path")
    for out in outputs:
        refuse_overwrite_of_inputs(out, args.review_file)
    return outputs


def _counter_draft_summary(record: ReviewFile, out: str) -> str:
    from .readers import identify

    fmt = identify(record.draft.path)
    recovered = "" if fmt.name == "docx" else f"; a new .docx from the text of {fmt.noun}"
    return (f"counter-draft written to {out} "
            f"({sum(d.action != 'accept' for d in record.decisions)} changes, "
            f"{sum(bool(d.note) for d in record.decisions)} notes{recovered})")


def _cmd_export(args: argparse.Namespace) -> int:
    from .model import CATEGORIES

    _export_outputs(args)
    record = _open_review_file(args.review_file)
    export = functools.partial(session.export, record=record, author=args.author,
                               inputs=(args.review_file,))
    cautioned: list[bool] = []

    def written(message: str) -> None:
        if not cautioned:  # once, with the first output written (an output carries the caution)
            print(CAUTION, file=sys.stderr)
            cautioned.append(True)
        print(message)

    if args.counter_draft:
        notes = export("counter-draft", args.counter_draft)
        written(_counter_draft_summary(record, args.counter_draft))
        for note in notes:
            _note(note)
    if args.redline:
        export("redline", args.redline, show=args.show)
        written(f"comparison redline written to {args.redline}")
    if args.issues_list:
        export("issues-list", args.issues_list, order=args.order,
               include=CATEGORIES if args.issues_all else None)
        written(f"issues list written to {args.issues_list}")
    return 0


#: Where `counterdraft demo` writes its outputs (ignored by git).
DEMO_OUTPUT = DEMO_DIR.parent / "demo_output"
#: How many of the top-ranked deviations the demo reverts, to show a counter-draft.  These are
#: illustrative decisions made by the demo script, not recommendations.
DEMO_REVERTS = 3
#: The party the demo acts for: the precedent is the (invented) supplier's own paper.
DEMO_ACTING_FOR = "Supplier"
#: Illustrative stances the demo records in its precedent set (past agreement, provision,
#: stance): the house wording of the payment period (30 days) and a refusal of the 60 days
#: a past counterparty obtained, so that the window and the issues list show stances.
DEMO_STANCES = (("01-quenby-astrel-diagnostics.docx", "9.2", "house wording"),
                ("04-pellbrook-analytical.docx", "9.2", "refuse"))
#: What the demo writes (label, file name in the output folder, export kind or None for the
#: review file itself).
DEMO_OUTPUTS: tuple[tuple[str, str, session.ExportKind | None], ...] = (
    ("review file (decisions)", "review.json", None),
    ("counter-draft (tracked changes)", "counter-draft.docx", "counter-draft"),
    ("comparison redline", "redline.docx", "redline"),
    ("issues list (printable page)", "issues-list.html", "issues-list"),
    ("issues list (Word table)", "issues-list.docx", "issues-list"),
)


def apply_demo_stances(library_folder: str | os.PathLike[str]) -> None:
    """Record :data:`DEMO_STANCES` in the demo precedent set's index (built or refreshed
    first); the window's demo and the screenshots use the same."""
    with session.open_library(str(library_folder)) as library:
        for document, provision, stance in DEMO_STANCES:
            vid = library.variant_of(document, provision)
            if vid is not None:
                library.label_variant(vid, stance)


def _numbers(devs: Sequence[Deviation]) -> str:
    """"deviations 1, 2 and 3": the numbers every output shows, in a sentence."""
    nums = [str(d.rank) for d in devs]
    if not nums:
        return "none"
    if len(nums) == 1:
        return f"deviation {nums[0]}"
    return f"deviations {', '.join(nums[:-1])} and {nums[-1]}"


def _demo_decisions(record: ReviewFile) -> tuple[ReviewFile, list[Deviation], list[Deviation]]:
    """*record* with the demo's illustrative reverts: the top substantive deviations, plus a
    clause the draft leaves out restored and one it adds struck (so that the counter-draft
    shows its cross-references kept true across the renumbering).  Returns the record and
    the two groups reverted."""
    devs = record.review.deviations
    top = [d for d in devs if d.category == "substantive" and d.change != "move"][:DEMO_REVERTS]
    structural = []
    for kind in ("remove-provision", "add-provision"):
        first = next((d for d in devs if d.change == kind and d not in top), None)
        if first is not None:
            structural.append(first)
    structural.sort(key=lambda d: d.rank)
    for i, dev in enumerate(top + structural):
        note = ("Illustrative decision recorded by the demo script: restore the house wording."
                if i == 0 else None)
        record = session.decide(record, dev.id, "revert", note=note)
    return record, top, structural


def _demo_write(record: ReviewFile, out: Path) -> None:
    """Save the demo's review file and export every output into *out*."""
    review_file = out / "review.json"
    session.save(review_file, record)
    for _label, name, kind in DEMO_OUTPUTS:
        if kind is not None:
            for note in session.export(kind, out / name, record=record, inputs=(str(review_file),)):
                _note(note)


def _demo_summary(top: Sequence[Deviation], structural: Sequence[Deviation], out: Path, *,
                  width: int) -> None:
    print(textwrap.fill(
        f"The demo acts for the {DEMO_ACTING_FOR} (the precedent is its own paper) and records two "
        "stances of the firm in the precedent set (the 30-day payment period as house wording, "
        "a past 60-day one as refused). "
        f"As an illustration, not a recommendation, the demo reverted {_numbers(top)}, the "
        f"{len(top)} highest-ranked substantive ones, and {_numbers(structural)}, restoring a "
        "clause the draft leaves out and striking one it adds; the counter-draft updates every "
        "typed cross-reference the renumbering would otherwise break. Written:", width=width))
    for label, name, _kind in DEMO_OUTPUTS:
        print(f"  {label:34} {out / name}")
    print()
    print("Next steps on your own files (from this checkout, the command is .venv/bin/counterdraft):")
    print("  counterdraft review DRAFT.docx --against PRECEDENT.docx [--library FOLDER] [--acting-for PARTY] "
          "--save REVIEW.json")
    print("  counterdraft decide REVIEW.json NUMBER accept|revert|amend [--text ...] [--note ...]")
    print("  counterdraft export REVIEW.json --counter-draft OUT.docx --issues-list OUT.html")


def _cmd_demo(args: argparse.Namespace) -> int:
    """The main job on the bundled demo: review, save, record example decisions, export."""
    from .console import terminal_width
    from .review.report import format_review

    width = terminal_width()
    draft_path = str(DEMO_DIR / "draft.docx")
    precedent_path = str(DEMO_DIR / "precedent.docx")
    library_folder = str(DEMO_DIR / "precedent_set")
    out = Path(args.out) if args.out else DEMO_OUTPUT
    out.mkdir(parents=True, exist_ok=True)

    print(textwrap.fill(CAUTION, width=width))
    print()
    draft, precedent = session.read_document(draft_path), session.read_document(precedent_path)
    apply_demo_stances(library_folder)
    review = _review(draft, precedent, library=library_folder, acting_for=DEMO_ACTING_FOR)
    print(format_review(review, width=width))
    print()
    record = session.new_review_file(draft_path, precedent_path, review=review, library=library_folder)
    record, top, structural = _demo_decisions(record)
    _demo_write(record, out)
    _demo_summary(top, structural, out, width=width)
    return 0


def _add_inspect(sub: Subparsers) -> None:
    p = sub.add_parser("inspect", help="read one agreement and show its provisions and defined terms")
    p.add_argument("file")
    p.add_argument("--json", metavar="OUT", help="write the document object as JSON ('-' for stdout)")
    p.add_argument("--width", type=int, default=None, help=argparse.SUPPRESS)
    p.set_defaults(func=_cmd_inspect)


def _add_review(sub: Subparsers) -> None:
    p = sub.add_parser("review", help="compare a draft with the precedent and rank the deviations")
    p.add_argument("draft", metavar="DRAFT")
    p.add_argument("--against", required=True, metavar="PRECEDENT", help="the house precedent")
    p.add_argument("--json", metavar="OUT", help="write the review object as JSON ('-' for stdout)")
    p.add_argument("--show", choices=("substantive", "all"), default=None,
                   help="deviations in the table (default: substantive and term)")
    p.add_argument("--library", metavar="DIR",
                   help="folder of past agreements: say how common each wording is (indexed in DIR/.counterdraft); "
                        "or a shared store's address, postgresql://USER@HOST:PORT/DB")
    p.add_argument("--save", metavar="REVIEW.json",
                   help="also save a review file to record decisions on (see 'decide', 'export')")
    p.add_argument("--acting-for", metavar="PARTY",
                   help="the precedent's defined term for the party you act for (e.g. Supplier): "
                        "each deviation is then judged adverse, favourable, neutral or unclear for it")
    p.add_argument("--width", type=int, default=None,
                   help="columns of the table (default: COLUMNS, else the terminal's width)")
    p.set_defaults(func=_cmd_review)


def _add_decide(sub: Subparsers) -> None:
    p = sub.add_parser("decide", help="record a decision on one deviation in a review file")
    p.add_argument("review_file", metavar="REVIEW.json")
    p.add_argument("deviation", metavar="NUMBER",
                   help="the deviation's number, as the review table shows it (e.g. 3); "
                        "its internal id (e.g. v12) is accepted too")
    p.add_argument("action", choices=("accept", "revert", "amend"),
                   help="accept the draft's words, revert to the precedent's, or amend")
    p.add_argument("--text", help="the new wording (amend only)")
    p.add_argument("--note", help="a note; the counter-draft shows it as a comment")
    p.add_argument("--paragraphs", action="store_true",
                   help="amend: line breaks in --text start new paragraphs (else refused)")
    p.set_defaults(func=_cmd_decide)


def _add_export(sub: Subparsers) -> None:
    from .export.options import ISSUE_ORDERS, ISSUES_DEFAULT_ORDER

    p = sub.add_parser("export", help="write the counter-draft, the comparison redline or the issues list")
    p.add_argument("review_file", metavar="REVIEW.json")
    p.add_argument("--counter-draft", metavar="OUT.docx",
                   help="the draft with the decisions as tracked changes and notes as comments")
    p.add_argument("--redline", metavar="OUT.docx", help="precedent-to-draft comparison as tracked changes")
    p.add_argument("--show", choices=("substantive", "all"), default="substantive",
                   help="what the redline marks: the substantive deviations on the draft's text "
                        "(default) or every difference, moves as moves")
    p.add_argument("--issues-list", metavar="OUT", help="the issues list as .docx, .html or .csv")
    p.add_argument("--issues-all", action="store_true",
                   help="list formatting, numbering and punctuation differences in the issues list too")
    p.add_argument("--order", choices=ISSUE_ORDERS, default=ISSUES_DEFAULT_ORDER,
                   help="rows of the issues list in the draft's clause order (default) or by rank")
    p.add_argument("--author", help="author of the tracked changes (default: your user name)")
    p.set_defaults(func=_cmd_export)


def build_parser() -> argparse.ArgumentParser:
    from .library.commands import add_library_parser

    parser = argparse.ArgumentParser(
        prog="counterdraft",
        description="Compare a counterparty's draft with the house precedent. " + CAUTION,
    )
    parser.add_argument("--version", action="version", version=f"counterdraft {__version__}")
    sub = parser.add_subparsers(dest="command", required=True)
    for add in (_add_inspect, _add_review, _add_decide, _add_export):
        add(sub)
    p = sub.add_parser("demo", help="run Counterdraft on the bundled demo agreements")
    p.add_argument("--out", metavar="DIR", help="output folder (default: demo_output/)")
    p.set_defaults(func=_cmd_demo)
    add_library_parser(sub)
    return parser


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    try:
        status = int(args.func(args) or 0)
        sys.stdout.flush()  # a full disk or a closed pipe shows here, not at exit
        return status
    except CounterdraftError as err:
        primary = _primary_file(args)
        shown = str(err) if err.path or not primary else f"{primary}: {err}"
        print(f"counterdraft: {shown}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("counterdraft: interrupted", file=sys.stderr)
        return 2
    except BrokenPipeError:
        # The reader of our output went away (e.g. `counterdraft inspect X | head`).
        _drop_stdout()
        print("counterdraft: standard output was closed before all of it was written", file=sys.stderr)
        return 1
    except OSError as err:
        # Unwrapped I/O failures: a full disk or a device error on standard output.
        target = err.filename or "standard output"
        if err.filename is None:
            _drop_stdout()
        print(f"counterdraft: {target}: cannot write ({err.strerror or err})", file=sys.stderr)
        return 2


def _drop_stdout() -> None:
    """Point standard output at the null device, so that nothing is flushed into a closed
    pipe or a full disk at exit (which would print a second error)."""
    try:
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
    except OSError:
        pass


def _primary_file(args: argparse.Namespace) -> str | None:
    """The file a command works on, to name in a refusal that does not name one itself."""
    for name in ("review_file", "file", "draft", "dir"):
        value = getattr(args, name, None)
        if isinstance(value, str):
            return value
    return None


if __name__ == "__main__":
    sys.exit(main())
