"""The ``counterdraft`` command line.  The desktop app calls the same engine functions.

Every command turns :class:`CounterdraftError` into one line on stderr and exit status 2.
"""

from __future__ import annotations

import argparse
import json
import os
import sys
from pathlib import Path

from . import CAUTION, __version__
from .errors import CounterdraftError
from .fileio import atomic_write_text

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
    from .reader import read_document
    from .serialize import document_to_dict

    doc = read_document(args.file)
    for w in doc.warnings:
        print(f"{args.file}: note: {w}", file=sys.stderr)
    if args.json:
        _write_json(document_to_dict(doc), args.json)
    else:
        print(format_outline(doc, width=args.width))
    return 0


def _cmd_review(args: argparse.Namespace) -> int:
    from .fileio import refuse_overwrite_of_inputs
    from .reader import read_document
    from .review import review_to_dict, run_review
    from .review.report import format_review

    if args.json and args.json != "-":
        refuse_overwrite_of_inputs(args.json, args.draft, args.against)
    draft = read_document(args.draft)
    precedent = read_document(args.against)
    for path, doc in ((args.draft, draft), (args.against, precedent)):
        for w in doc.warnings:
            print(f"{path}: note: {w}", file=sys.stderr)
    if args.library:
        from .library.commands import open_library_for_cli, review_options
        from .library.frequency import apply_frequency

        library = open_library_for_cli(args.library)
        try:
            review = apply_frequency(run_review(draft, precedent, **review_options(library)), library)
        finally:
            library.close()
    else:
        review = run_review(draft, precedent)
    if args.json:
        for note in review.notes:
            print(f"counterdraft: note: {note}", file=sys.stderr)
        _write_json(review_to_dict(review), args.json)
    else:
        print(format_review(review, show=args.show, width=args.width))
    return 0


def _cmd_demo(args: argparse.Namespace) -> int:
    from .outline import format_outline
    from .reader import read_document

    print(CAUTION)
    print()
    for name in ("precedent.docx", "draft.docx"):
        path = DEMO_DIR / name
        doc = read_document(str(path))
        print(f"== {name} ==")
        print(format_outline(doc, width=100))
        print()
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
    p.add_argument("--width", type=int, default=100, help=argparse.SUPPRESS)
    p.set_defaults(func=_cmd_inspect)

    p = sub.add_parser("review", help="compare a draft with the precedent and rank the deviations")
    p.add_argument("draft", metavar="DRAFT")
    p.add_argument("--against", required=True, metavar="PRECEDENT", help="the house precedent")
    p.add_argument("--json", metavar="OUT", help="write the review object as JSON ('-' for stdout)")
    p.add_argument("--show", choices=("substantive", "all"), default=None,
                   help="deviations in the table (default: substantive and term)")
    p.add_argument("--library", metavar="DIR",
                   help="folder of past agreements: say how common each wording is (indexed in DIR/.counterdraft)")
    p.add_argument("--width", type=int, default=100, help=argparse.SUPPRESS)
    p.set_defaults(func=_cmd_review)

    p = sub.add_parser("demo", help="run Counterdraft on the bundled demo agreements")
    p.set_defaults(func=_cmd_demo)

    from .library.commands import add_library_parser

    add_library_parser(sub)
    return parser


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    try:
        return int(args.func(args) or 0)
    except CounterdraftError as err:
        print(f"counterdraft: {err}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("counterdraft: interrupted", file=sys.stderr)
        return 2
    except BrokenPipeError:
        # The reader of our output went away (e.g. `counterdraft inspect X | head`): not an error.
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return 0


if __name__ == "__main__":
    sys.exit(main())
