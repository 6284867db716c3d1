"""The ``counterdraft`` command line.  The desktop app calls the same engine functions.

Every command turns :class:`CounterdraftError` into one line on stderr and exit status 2.
"""

from __future__ import annotations

import argparse
import json
import os
import sys
import textwrap
from pathlib import Path

from . import CAUTION, __version__
from .errors import CounterdraftError
from .fileio import atomic_write_text, refuse_overwrite_of_inputs

__all__ = ["main"]

DEMO_DIR = Path(__file__).resolve().parent.parent / "demo_agreements"


def _write_json(obj: object, out: str) -> None:
    text = json.dumps(obj, ensure_ascii=False, indent=2) + "\n"
    if out == "-":
        sys.stdout.write(text)
    else:
        atomic_write_text(out, text)


def _cmd_inspect(args: argparse.Namespace) -> int:
    from .outline import format_outline
    from .readers import read_document
    from .serialize import document_to_dict


    if args.json and args.json != "-":
        refuse_overwrite_of_inputs(args.json, args.file)
    doc = read_document(args.file, cache=True)
    for w in doc.warnings:
        print(f"{args.file}: note: {w}", file=sys.stderr)
    if args.json:
        _write_json(document_to_dict(doc), args.json)
    else:
        from .console import terminal_width

        print(format_outline(doc, width=args.width or terminal_width()))
    return 0


def _cmd_review(args: argparse.Namespace) -> int:
    from .readers import read_document
    from .review import review_to_dict
    from .review.report import format_review

    if args.json and args.json != "-":
        refuse_overwrite_of_inputs(args.json, args.draft, args.against)
        if args.save and Path(args.save).resolve() == Path(args.json).resolve():
            raise CounterdraftError("--json and --save name the same file", path=args.save)
    from .readers import learns_layout

    structure, notes = None, ()
    if learns_layout(args.draft, args.library):
        from .layout.store import structure_for

        structure, notes = structure_for(args.draft, args.library)
    for note in notes:
        print(f"{args.draft}: note: {note}", file=sys.stderr)
    draft = read_document(args.draft, structure=structure, cache=True)
    precedent = read_document(args.against, cache=True)
    for path, doc in ((args.draft, draft), (args.against, precedent)):
        for w in doc.warnings:
            print(f"{path}: note: {w}", file=sys.stderr)
    review = _run_review(draft, precedent, library_folder=args.library, acting_for=args.acting_for)
    if args.save:
        from .decisions import new_review_file, save_review_file

        refuse_overwrite_of_inputs(args.save, args.draft, args.against)
        save_review_file(args.save, new_review_file(args.draft, args.against, review=review,
                                                    library=args.library))
        print(f"counterdraft: review saved to {args.save}", file=sys.stderr)
    if args.json:
        for note in review.notes:
            print(f"counterdraft: note: {note}", file=sys.stderr)
        _write_json(review_to_dict(review), args.json)
    else:
        print(format_review(review, show=args.show, width=args.width))
    return 0


def _run_review(draft, precedent, *, library_folder: str | None, overrides=(),
                acting_for: str | None = None):
    """The one place the CLI runs the engine: with the precedent set's figures when given,
    acting for a party when given."""
    from .review import run_review

    if not library_folder:
        return run_review(draft, precedent, overrides=tuple(overrides), acting_for=acting_for)
    from .library.commands import open_library_for_cli, review_options
    from .library.frequency import apply_frequency

    library = open_library_for_cli(library_folder)
    try:
        return apply_frequency(run_review(draft, precedent, overrides=tuple(overrides),
                                          acting_for=acting_for, **review_options(library)), library)
    finally:
        library.close()


def _review_runner(library_folder: str | None):
    """The runner that reopens a review file: with its precedent set when it recorded one."""
    if not library_folder:
        return None

    def run(draft, precedent, *, overrides=(), acting_for=None):
        return _run_review(draft, precedent, library_folder=library_folder, overrides=overrides,
                           acting_for=acting_for)

    return run


def _open_review_file(path: str):
    from .decisions import load_review_file, read_library_folder

    record = load_review_file(path, runner=_review_runner(read_library_folder(path)))
    for note in record.notes:
        print(f"counterdraft: note: {note}", file=sys.stderr)
    return record


def _deviation_by_number(review, given: str, path: str):
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
    from .decisions import clause_label, decide, read_library_folder, update_review_file

    found = []

    def record_it(record):
        for note in record.notes:
            print(f"counterdraft: note: {note}", file=sys.stderr)
        dev = _deviation_by_number(record.review, args.deviation, args.review_file)
        found.append(dev)
        return decide(record, dev.id, args.action, text=args.text, note=args.note,
                      paragraphs=args.paragraphs)

    # read, decide and save under one lock: decisions recorded at the same moment all land
    record = update_review_file(args.review_file, record_it,
                                runner=_review_runner(read_library_folder(args.review_file)))
    dev = found[-1]
    where = clause_label(record.review, dev)
    print(f"Deviation {dev.rank}{f', {where}' if where else ''}: {args.action} recorded "
          f"in {args.review_file}")
    return 0


def _cmd_export(args: argparse.Namespace) -> int:
    from .export import default_author, write_counter_draft, write_issues_list, write_redline
    outputs = [o for o in (args.counter_draft, args.redline, args.issues_list) if o]
    if not outputs:
        raise CounterdraftError("nothing to export: give --counter-draft, --redline or --issues-list")
    if len({str(Path(o).resolve()) for o in outputs}) != len(outputs):
        raise CounterdraftError("two outputs share one path")
    for out in outputs:
        refuse_overwrite_of_inputs(out, args.review_file)
    record = _open_review_file(args.review_file)
    inputs = (record.draft.path, record.precedent.path, args.review_file)
    author = args.author or default_author()
    cautioned = []

    def written(message: str) -> None:
        if not cautioned:  # once, with the first output written (an output carries the caution)
            print(CAUTION, file=sys.stderr)
            cautioned.append(True)
        print(message)

    if args.counter_draft:
        notes = write_counter_draft(record.review, record.decisions, args.counter_draft,
                                    draft_path=record.draft.path, author=author, inputs=inputs)
        from .readers import identify

        fmt = identify(record.draft.path)
        recovered = "" if fmt.name == "docx" else f"; a new .docx from the text of {fmt.noun}"
        written(f"counter-draft written to {args.counter_draft} "
                f"({sum(d.action != 'accept' for d in record.decisions)} changes, "
                f"{sum(bool(d.note) for d in record.decisions)} notes{recovered})")
        for note in notes:
            print(f"counterdraft: note: {note}", file=sys.stderr)
    if args.redline:
        write_redline(record.review, args.redline, author=author, inputs=inputs, show=args.show)
        written(f"comparison redline written to {args.redline}")
    if args.issues_list:
        from .export import ISSUES_DEFAULT_INCLUDE
        from .model import CATEGORIES

        write_issues_list(record.review, args.issues_list, decisions=record.decisions,
                          author=author, inputs=inputs,
                          include=CATEGORIES if args.issues_all else ISSUES_DEFAULT_INCLUDE,
                          order=args.order)
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


def apply_demo_stances(library_folder: str | os.PathLike[str]) -> None:
    """Record :data:`DEMO_STANCES` in the demo precedent set's index (built or refreshed
    first); the window's demo and the screenshots use the same."""
    from .library.index import open_library

    with open_library(library_folder) as library:
        for document, provision, stance in DEMO_STANCES:
            vid = library.variant_of(document, provision)
            if vid is not None:
                library.label_variant(vid, stance)


def _numbers(devs) -> str:
    """"deviations 1, 2 and 3": the numbers every output shows, in a sentence."""
    nums = [str(d.rank) for d in devs]
    if not nums:
        return "none"
    if len(nums) == 1:
        return f"deviation {nums[0]}"
    return f"deviations {', '.join(nums[:-1])} and {nums[-1]}"


def _cmd_demo(args: argparse.Namespace) -> int:
    """The main job on the bundled demo: review, save, record example decisions, export."""
    from .console import terminal_width
    from .decisions import decide, new_review_file, save_review_file
    from .export import default_author, write_counter_draft, write_issues_list, write_redline
    from .readers import read_document
    from .review.report import format_review

    width = terminal_width()
    draft_path = str(DEMO_DIR / "draft.docx")
    precedent_path = str(DEMO_DIR / "precedent.docx")
    library_folder = str(DEMO_DIR / "precedent_set")
    out = Path(args.out) if args.out else DEMO_OUTPUT
    out.mkdir(parents=True, exist_ok=True)

    print(textwrap.fill(CAUTION, width=width))
    print()
    draft, precedent = read_document(draft_path, cache=True), read_document(precedent_path, cache=True)
    apply_demo_stances(library_folder)
    review = _run_review(draft, precedent, library_folder=library_folder, acting_for=DEMO_ACTING_FOR)
    print(format_review(review, width=width))
    print()

    record = new_review_file(draft_path, precedent_path, review=review, library=library_folder)
    top = [d for d in review.deviations if d.category == "substantive"
           and d.change not in ("move",)][:DEMO_REVERTS]
    # A clause the draft leaves out restored and one it adds struck, so that the counter-draft
    # shows its cross-references kept true across the renumbering.
    structural = []
    for kind in ("remove-provision", "add-provision"):
        first = next((d for d in review.deviations if d.change == kind and d not in top), None)
        if first is not None:
            structural.append(first)
    structural.sort(key=lambda d: d.rank)
    for i, dev in enumerate(top + structural):
        note = ("Illustrative decision recorded by the demo script: restore the house wording."
                if i == 0 else None)
        record = decide(record, dev.id, "revert", note=note)
    review_file = out / "review.json"
    save_review_file(str(review_file), record)
    inputs = (draft_path, precedent_path, str(review_file))
    author = default_author()
    written = {
        "review file (decisions)": review_file,
        "counter-draft (tracked changes)": out / "counter-draft.docx",
        "comparison redline": out / "redline.docx",
        "issues list (printable page)": out / "issues-list.html",
        "issues list (Word table)": out / "issues-list.docx",
    }
    for note in write_counter_draft(record.review, record.decisions, written["counter-draft (tracked changes)"],
                                    draft_path=draft_path, author=author, inputs=inputs):
        print(f"counterdraft: note: {note}", file=sys.stderr)
    write_redline(record.review, written["comparison redline"], author=author, inputs=inputs)
    for key in ("issues list (printable page)", "issues list (Word table)"):
        write_issues_list(record.review, written[key], decisions=record.decisions,
                          author=author, inputs=inputs)
    print(textwrap.fill(
        f"The demo acts for the {DEMO_ACTING_FOR} (the precedent is its own paper) and records two "
        "stances of the firm in the precedent set (the 30-day payment period as house wording, "
        "a past 60-day one as refused). "
        f"As an illustration, not a recommendation, the demo reverted {_numbers(top)}, the "
        f"{len(top)} highest-ranked substantive ones, and {_numbers(structural)}, restoring a "
        "clause the draft leaves out and striking one it adds; the counter-draft updates every "
        "typed cross-reference the renumbering would otherwise break. Written:", width=width))
    for label, path in written.items():
        print(f"  {label:34} {path}")
    print()
    print("Next steps on your own files (from this checkout, the command is .venv/bin/counterdraft):")
    print("  counterdraft review DRAFT.docx --against PRECEDENT.docx [--library FOLDER] [--acting-for PARTY] "
          "--save REVIEW.json")
    print("  counterdraft decide REVIEW.json NUMBER accept|revert|amend [--text ...] [--note ...]")
    print("  counterdraft export REVIEW.json --counter-draft OUT.docx --issues-list OUT.html")
    return 0


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="counterdraft",
        description="Compare a counterparty's draft with the house precedent. " + CAUTION,
    )
    parser.add_argument("--version", action="version", version=f"counterdraft {__version__}")
    sub = parser.add_subparsers(dest="command", required=True)

    p = sub.add_parser("inspect", help="read one agreement and show its provisions and defined terms")
    p.add_argument("file")
    p.add_argument("--json", metavar="OUT", help="write the document object as JSON ('-' for stdout)")
    p.add_argument("--width", type=int, default=None, help=argparse.SUPPRESS)
    p.set_defaults(func=_cmd_inspect)

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
    from .export.options import ISSUE_ORDERS, ISSUES_DEFAULT_ORDER

    p.add_argument("--order", choices=ISSUE_ORDERS, default=ISSUES_DEFAULT_ORDER,
                   help="rows of the issues list in the draft's clause order (default) or by rank")
    p.add_argument("--author", help="author of the tracked changes (default: your user name)")
    p.set_defaults(func=_cmd_export)

    p = sub.add_parser("demo", help="run Counterdraft on the bundled demo agreements")
    p.add_argument("--out", metavar="DIR", help="output folder (default: demo_output/)")
    p.set_defaults(func=_cmd_demo)

    from .library.commands import add_library_parser

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
