"""The ``counterdraft library ...`` commands and the ``review --library`` helpers.

``core.cli`` registers the subcommands with :func:`add_library_parser`; every handler returns
the exit status (0) and lets :class:`~core.errors.CounterdraftError` reach ``core.cli.main``
(one line on stderr, exit status 2).  Progress goes to stderr as a tqdm bar (counts and time
left; hidden when stderr is not a terminal); skipped files are warnings on stderr naming the
file and the problem, never quoting it.

A precedent set is named by its folder (its index kept inside, ``DIR/.counterdraft``) or by
the address of a shared store (``postgresql://USER@HOST:PORT/DB``, built with ``library build
DIR --store ADDRESS``); every command takes either, and an address is shown without any
password.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

from .. import CAUTION
from ..errors import CounterdraftError
from ..fileio import write_json
from .store import is_server_address

if TYPE_CHECKING:  # the index and the clustering are imported when a command runs
    from .index import BuildReport, Failure, Library
    from .variants import VariantConfig

__all__ = ["add_library_parser", "note_rebuilt", "open_library_for_cli", "progress_bar", "review_options",
           "warn_skipped"]


def progress_bar(description: str) -> tuple[Callable[..., None], Callable[[], None]]:
    """A ``(done, total, *_)`` callback drawing a tqdm bar on stderr, and its closer.  tqdm
    draws nothing when stderr is not a terminal (``disable=None``): then it is not even
    imported (a review with a precedent set saves its import, a few hundredths of a second)."""
    state: dict[str, Any] = {}

    def update(done: int, total: int, *_: object) -> None:
        if hasattr(sys.stderr, "isatty") and not sys.stderr.isatty():
            return
        bar = state.get("bar")
        if bar is None:
            from tqdm import tqdm

            # no monitor thread: a process with a second thread reads and reviews on one core
            # only (core.parallel), and the bar's own refresh is enough
            tqdm.monitor_interval = 0
            bar = tqdm(total=total, desc=description, unit="file", file=sys.stderr, disable=None,
                       leave=False, dynamic_ncols=True)
            state["bar"] = bar
        bar.update(done - bar.n)

    def close() -> None:
        bar = state.pop("bar", None)
        if bar is not None:
            bar.close()

    return update, close


def warn_skipped(failures: Sequence[Failure]) -> None:
    for f in failures:
        print(f"counterdraft: warning: skipped {f.path}: {f.problem}", file=sys.stderr)


def note_rebuilt(report: BuildReport) -> None:
    """One line on stderr when the build set a damaged index aside and rebuilt it."""
    if report.rebuilt:
        print(f"counterdraft: note: {report.rebuilt}", file=sys.stderr)


def open_library_for_cli(folder: str, *, db: str | None = None, refresh: bool = True,
                         workers: int = 2) -> Library:
    """Open (building or refreshing when *refresh*) the index of *folder*, with a progress
    bar, warning about skipped files.  *folder* may be a shared store's address: it is read
    as it is (its builders refresh it)."""
    from .index import Library, open_library

    if is_server_address(folder):
        library = Library(folder)
        if library.stale:
            print("counterdraft: note: the shared precedent set's last build did not finish; "
                  "its figures may be out of date", file=sys.stderr)
        return library
    if not Path(folder).is_dir():
        raise CounterdraftError("the precedent-set folder does not exist", path=folder)
    update, close = progress_bar("indexing")
    try:
        library = open_library(folder, db_path=db, refresh=refresh, progress=update, workers=workers)
    finally:
        close()
    if library.report is not None:
        note_rebuilt(library.report)
        warn_skipped(library.report.failures)
    return library


def review_options(library: Library) -> dict[str, Any]:
    """Keyword arguments for ``run_review`` with a library: its vocabulary and clause typing."""
    from .frequency import clause_type_function

    return {"vocabulary": library.vocabulary, "clause_type": clause_type_function(library)}


# ----------------------------------------------------------------------------------------
# Handlers
# ----------------------------------------------------------------------------------------


def _variant_config(args: argparse.Namespace) -> VariantConfig | None:
    from .variants import VariantConfig

    if args.cutoff is None and args.linkage is None and args.metric is None:
        return None
    d = VariantConfig()
    try:
        return VariantConfig(metric=args.metric or d.metric, linkage=args.linkage or d.linkage,
                             cutoff=d.cutoff if args.cutoff is None else args.cutoff)
    except ValueError as err:
        raise CounterdraftError(str(err)) from None


def _target(args: argparse.Namespace) -> tuple[str | None, str]:
    """(folder or None, store address) named by a command's DIR and --store."""
    from .index import default_db_path

    if is_server_address(args.dir):
        return None, args.dir
    return args.dir, args.store or str(default_db_path(args.dir))


def _cmd_build(args: argparse.Namespace) -> int:
    from .index import build_library

    if is_server_address(args.dir):
        raise CounterdraftError("give the folder of agreements to index, and the store with --store ADDRESS")
    if not Path(args.dir).is_dir():
        raise CounterdraftError("not a folder", path=args.dir)
    update, close = progress_bar("indexing")
    try:
        report = build_library(args.dir, store=args.store, progress=update, workers=args.workers,
                               config=_variant_config(args), replace_root=args.replace)
    finally:
        close()
    note_rebuilt(report)
    warn_skipped(report.failures)
    print(f"{report.documents} agreement{'s' * (report.documents != 1)} indexed "
          f"({report.read} read, {report.unchanged} unchanged, {report.removed} removed, "
          f"{len(report.failures)} skipped) in {report.seconds:.1f} s")
    print(f"index: {report.db_path}")
    return 0


def _cmd_stats(args: argparse.Namespace) -> int:
    from .index import Library
    from .stats import format_stats, format_variants, library_stats, stats_to_dict

    root, address = _target(args)
    with Library(address, root=root) as library:
        if args.variants:
            print(format_variants(library.variants(bucket=args.variants), total=library.total, width=args.width))
        else:
            stats = library_stats(library)
            if args.json:
                write_json(stats_to_dict(stats), args.json)
                return 0
            print(format_stats(stats, width=args.width))
    print()
    print(CAUTION)
    return 0


def _cmd_label(args: argparse.Namespace) -> int:
    from .index import Library, position_name

    position = None
    if args.position.strip().casefold() != "none":
        position, notice = position_name(args.position)
        if notice:
            print(f"counterdraft: note: {notice}", file=sys.stderr)
    root, address = _target(args)
    with Library(address, root=root) as library:
        if args.variant is not None:
            vid = args.variant
        else:
            if not (args.document and args.provision):
                raise CounterdraftError("give --variant ID, or --document PATH and --provision NUMBER")
            vid = library.variant_of(args.document, args.provision)
            if vid is None:
                raise CounterdraftError(f"provision {args.provision!r} of {args.document!r} is not in the index",
                                        path=library.address)
        n = library.label_variant(vid, position)
    what = f"labelled {position}" if position else "unlabelled"
    print(f"variant {vid} {what} ({n} wording{'s' * (n != 1)})")
    return 0


def _cmd_calibrate(args: argparse.Namespace) -> int:
    from .calibrate import DEFAULT_CUTOFFS, calibrate, format_calibration, read_labels
    from .index import Library

    cutoffs = DEFAULT_CUTOFFS
    if args.cutoffs:
        try:
            cutoffs = tuple(float(x) for x in args.cutoffs.split(",") if x.strip())
        except ValueError:
            raise CounterdraftError("--cutoffs takes numbers separated by commas, e.g. 0.1,0.2,0.3") from None
        if not cutoffs or any(not 0 <= c <= 1 for c in cutoffs):
            raise CounterdraftError("cut-offs must be between 0 and 1")
    labelled = read_labels(args.labels) if args.labels else None
    root, address = _target(args)
    with Library(address, root=root) as library:
        rows = calibrate(library, labelled, cutoffs=cutoffs, linkage=args.linkage, metric=args.metric)
    print(format_calibration(rows))
    return 0


def _cmd_patterns(args: argparse.Namespace) -> int:
    from ..fileio import file_sha256
    from ..readers import read_document
    from .patterns import format_patterns, negotiation_patterns, patterns_to_dict

    precedent = read_document(args.against)
    library = open_library_for_cli(args.dir, db=args.store, workers=args.workers)
    try:
        skip = library.paths(sha256=file_sha256(args.against))
        update, close = progress_bar("reviewing")
        try:
            groups = negotiation_patterns(library, precedent, progress=update, workers=args.workers, skip=skip)
        finally:
            close()
        total = library.total - len(skip)
    finally:
        library.close()
    if args.json:
        write_json(patterns_to_dict(groups, total=total), args.json)
    else:
        print(format_patterns(groups, total=total, width=args.width))
        print()
        print(CAUTION)
    return 0


def _add_common(p: argparse.ArgumentParser, *, dir_optional: bool) -> None:
    if dir_optional:
        p.add_argument("dir", metavar="DIR", nargs="?", default=".",
                       help="the precedent-set folder (default: .), or a shared store's address (postgresql://...)")
    else:
        p.add_argument("dir", metavar="DIR", help="the precedent-set folder")
    p.add_argument("--store", metavar="ADDRESS",
                   help="where the index is kept: a file (default: DIR/.counterdraft/library.sqlite) or a "
                        "PostgreSQL address, postgresql://USER@HOST:PORT/DB (password from ~/.pgpass, a service "
                        "file or PGPASSWORD, never in the address)")
    p.add_argument("--db", dest="store", metavar="PATH", help=argparse.SUPPRESS)  # earlier name of --store


def add_library_parser(sub: argparse._SubParsersAction[argparse.ArgumentParser]) -> None:
    """Register ``counterdraft library build|stats|label|calibrate|patterns``."""
    from .options import LINKAGES, METRICS, POSITIONS

    lib = sub.add_parser("library", help="index the firm's past agreements (the precedent set)")
    lsub = lib.add_subparsers(dest="library_command", required=True)

    p = lsub.add_parser("build", help="build or refresh the index of a folder of agreements")
    _add_common(p, dir_optional=False)
    p.add_argument("--workers", type=int, default=2, help="processes reading files (default: 2)")
    p.add_argument("--cutoff", type=float, help="variant cut-off, Jaccard distance 0..1 (default: 0.2)")
    p.add_argument("--linkage", choices=LINKAGES, help="variant clustering linkage (default: average)")
    p.add_argument("--metric", choices=METRICS, help="variant distance (default: jaccard)")
    p.add_argument("--replace", action="store_true",
                   help="let a shared store built from another folder hold this folder's agreements instead")
    p.set_defaults(func=_cmd_build)

    p = lsub.add_parser("stats", help="summarise the index: documents, clause types, variants")
    _add_common(p, dir_optional=True)
    p.add_argument("--variants", metavar="TYPE", help="list the variants of one clause type (with their ids)")
    p.add_argument("--json", metavar="OUT", help="write the summary as JSON ('-' for stdout)")
    p.add_argument("--width", type=int, default=100, help=argparse.SUPPRESS)
    p.set_defaults(func=_cmd_stats)

    p = lsub.add_parser("label", help="record the firm's position on a wording variant")
    _add_common(p, dir_optional=True)
    p.add_argument("--variant", type=int, metavar="ID", help="variant id (see 'library stats --variants TYPE')")
    p.add_argument("--document", metavar="PATH", help="a document of the variant (path inside DIR)")
    p.add_argument("--provision", metavar="NUMBER", help="its provision (number, heading or id)")
    p.add_argument("--position", required=True, metavar="STANCE",
                   help="the firm's stance on the wording: " + ", ".join(f"'{x}'" for x in POSITIONS)
                        + " (hyphens for spaces are fine); 'none' removes the label")
    p.set_defaults(func=_cmd_label)

    p = lsub.add_parser("calibrate", help="clusters and mixed clusters per variant cut-off")
    _add_common(p, dir_optional=True)
    p.add_argument("--labels", metavar="CSV",
                   help="labelled provisions: columns document,provision,label (default: the stored positions)")
    p.add_argument("--cutoffs", metavar="LIST", help="cut-offs to try, e.g. 0.1,0.2,0.3")
    p.add_argument("--linkage", choices=LINKAGES)
    p.add_argument("--metric", choices=METRICS)
    p.set_defaults(func=_cmd_calibrate)

    p = lsub.add_parser("patterns", help="what counterparties usually change in the precedent")
    _add_common(p, dir_optional=True)
    p.add_argument("--against", required=True, metavar="PRECEDENT", help="the house precedent")
    p.add_argument("--json", metavar="OUT", help="write the patterns as JSON ('-' for stdout)")
    p.add_argument("--workers", type=int, default=2, help="processes (default: 2)")
    p.add_argument("--width", type=int, default=100, help=argparse.SUPPRESS)
    p.set_defaults(func=_cmd_patterns)
