"""Benchmark: the precedent-set index on 1,000 agreements of about 10 pages each.

Generates (once; cached in the system's temporary folder) 1,000 agreements of ~10 pages
(``benchmarks/_corpus.py``, real auto-numbered .docx), links them into a scratch folder (so
the index lives where ``review --library`` keeps it, ``FOLDER/.counterdraft/``) and prints,
each ratio measured side by side in the same run:

* the first build of the index (``core.library.index.build_library``, 2 workers);
* a rebuild with no change (what ``review --library`` does before each review), as a share
  of the first build;
* a rebuild after adding one agreement, after changing one and after removing one, each as a
  share of the first build;
* the whole ``counterdraft review`` process on a ~100-page pair with ``--library`` against
  the same command without it (best of 3 each, interleaved), and their ratio;
* what loading the vocabulary model costs: the numpy-only loader against importing gensim;
* the size of the index folder and the peak memory, per 1,000 agreements: this process's peak
  resident set size (``resource.getrusage``) and, during the first build, the largest sum of
  the resident set sizes of this process and its worker processes (sampled from /proc every
  0.1 s).

``--json OUT`` writes the figures; ``--before JSON`` prints them beside an earlier run's (e.g.
the same script run against an older checkout; ``benchmarks/baselines/
bench_library_before_incremental.json`` holds the figures of the index before it was made
incremental, measured on the 2-core development machine).  ``--large`` runs 10,000 agreements instead
(about 3.5 minutes to generate the first time, then cached).

Targets on a 2-core machine: no-change rebuild <= 1 % and one-file rebuild <= 2 % of the first
build, ``review --library`` <= 1.3 x ``review``, index <= 100 MB and peak memory <= 450 MB per
1,000 agreements.  Run: ``python benchmarks/bench_library.py [--documents N] [--pages P]
[--workers W] [--large] [--json OUT] [--before JSON]``.
"""

from __future__ import annotations

import argparse
import dataclasses
import json
import os
import subprocess
import sys
import tempfile
import threading
import time
from collections.abc import Callable
from pathlib import Path

from _corpus import AGREEMENT_LISTS, make_agreement_docx, make_agreement_paragraphs

# _measure first: importing it puts the repository root on sys.path.
from _measure import argument_parser, peak_rss_mb, verdict

from core.docx.compose import compose_docx
from core.library.index import build_library

#: Targets of the incremental precedent-set issue (2-core machine).
TARGET_REBUILD_SHARE = 0.01  # a no-change rebuild, as a share of the first build
TARGET_ONE_FILE_SHARE = 0.02  # adding, changing or removing one agreement
TARGET_REVIEW_RATIO = 1.3  # whole 'review --library' process over plain 'review'
#: "Well under" what the index took before it was made incremental (145 MB and about 600 MB
#: per 1,000 agreements, measured on this 2-core machine): two thirds and three quarters.
TARGET_INDEX_MB_PER_1000 = 100.0
TARGET_PEAK_MB_PER_1000 = 450.0
REPEATS = 3
#: Seeds of the library's agreements start here (the review pair uses seed 1).
LIBRARY_SEED = 1000
LARGE_DOCUMENTS = 10_000
REPO = Path(__file__).resolve().parents[1]


def _write_agreement(path: Path, pages: int, seed: int) -> None:
    tmp = path.with_suffix(".part")
    tmp.write_bytes(make_agreement_docx(pages=pages, seed=seed))
    tmp.replace(path)


def _corpus(folder: Path, documents: int, pages: int, *, workers: int) -> float:
    """Write the agreements not yet in *folder* (in *workers* processes); the seconds it took."""
    from concurrent.futures import ProcessPoolExecutor

    folder.mkdir(parents=True, exist_ok=True)
    start = time.perf_counter()
    width = 5 if documents > 9999 else 4
    todo = [(folder / f"agreement-{i:0{width}d}.docx", pages, LIBRARY_SEED + i) for i in range(documents)]
    todo = [t for t in todo if not t[0].exists()]
    if len(todo) > 50 and workers > 1:
        with ProcessPoolExecutor(max_workers=workers) as pool:
            list(pool.map(_write_agreement, *zip(*todo), chunksize=16))
    else:
        for t in todo:
            _write_agreement(*t)
    return time.perf_counter() - start


def _link_copy(source: Path, target: Path) -> None:
    """*target* gets a hard link to every agreement of *source* (a copy where links fail)."""
    target.mkdir()
    for f in sorted(source.iterdir()):
        if f.suffix == ".docx":
            try:
                os.link(f, target / f.name)
            except OSError:
                (target / f.name).write_bytes(f.read_bytes())


def _review_pair(folder: Path, pages: int) -> tuple[str, str]:
    """A ~100-page precedent and a draft with a figure changed in every 12th provision."""
    paras = make_agreement_paragraphs(pages=pages, seed=1)
    edited = []
    swaps = (("thirty (30)", "sixty (60)"), ("ten (10)", "twenty (20)"), ("shall provide", "may provide"))
    for i, p in enumerate(paras):
        if p.level == 1 and i % 12 == 0:
            text = p.text
            for a, b in swaps:
                text = text.replace(a, b)
            p = dataclasses.replace(p, text=text)
        edited.append(p)
    prec = folder / "precedent.docx"
    draft = folder / "draft.docx"
    prec.write_bytes(compose_docx(paras, lists=AGREEMENT_LISTS))
    draft.write_bytes(compose_docx(edited, lists=AGREEMENT_LISTS))
    return str(draft), str(prec)


class _TreeMemory:
    """Samples the resident set size of this process plus its child processes (the worker
    processes) from /proc every 0.1 s; ``peak_mb`` is the largest sum seen (Linux only)."""

    def __init__(self) -> None:
        self.peak_mb = 0.0
        self._stop = threading.Event()
        self._thread = threading.Thread(target=self._run, daemon=True)

    @staticmethod
    def _rss_mb(pid: int) -> float:
        try:
            with open(f"/proc/{pid}/status", encoding="ascii") as fh:
                for line in fh:
                    if line.startswith("VmRSS:"):
                        return int(line.split()[1]) / 1024
        except OSError:
            pass
        return 0.0

    def _children(self) -> list[int]:
        me, out = os.getpid(), []
        for entry in os.listdir("/proc"):
            if entry.isdigit():
                try:
                    with open(f"/proc/{entry}/stat", encoding="ascii", errors="replace") as fh:
                        if int(fh.read().rsplit(")", 1)[1].split()[1]) == me:
                            out.append(int(entry))
                except (OSError, ValueError, IndexError):
                    pass
        return out

    def _run(self) -> None:
        while not self._stop.wait(0.1):
            total = self._rss_mb(os.getpid()) + sum(self._rss_mb(c) for c in self._children())
            self.peak_mb = max(self.peak_mb, total)

    def __enter__(self) -> _TreeMemory:
        self._thread.start()
        return self

    def __exit__(self, *exc: object) -> None:
        self._stop.set()
        self._thread.join()


def _folder_mb(folder: Path) -> float:
    return sum(f.stat().st_size for f in folder.iterdir() if f.is_file()) / 1e6


def _timed(fn: Callable[[], object]) -> float:
    start = time.perf_counter()
    fn()
    return time.perf_counter() - start


def _builds(lib: Path, *, documents: int, pages: int, workers: int) -> dict[str, float]:
    """First build, no-change rebuild and one-file add, change and remove: seconds each."""
    build = lambda: build_library(lib, workers=workers)  # noqa: E731
    out: dict[str, float] = {}
    with _TreeMemory() as memory:
        out["first_build_s"] = _timed(build)
    out["build_tree_peak_mb"] = memory.peak_mb
    return out | one_file_updates(lib, build, documents=documents, pages=pages)


def one_file_updates(lib: Path, build: Callable[[], object], *, documents: int, pages: int) -> dict[str, float]:
    """After a first build of *lib*: a no-change rebuild, then one agreement added, changed
    and removed, each followed by *build*: seconds each (shared with bench_store.py)."""
    out = {"no_change_s": _timed(build)}
    (lib / "added.docx").write_bytes(make_agreement_docx(pages=pages, seed=LIBRARY_SEED + documents))
    out["add_one_s"] = _timed(build)
    middle = sorted(lib.glob("agreement-*.docx"))[documents // 2]
    middle.unlink()  # a hard link: the cached corpus keeps its copy
    middle.write_bytes(make_agreement_docx(pages=pages, seed=LIBRARY_SEED + documents + 1))
    out["change_one_s"] = _timed(build)
    (lib / "added.docx").unlink()
    out["remove_one_s"] = _timed(build)
    return out


def _cli_seconds(args: list[str]) -> float:
    """Wall-clock seconds of one ``counterdraft`` process (output discarded)."""
    start = time.perf_counter()
    subprocess.run([sys.executable, "-m", "core.cli", *args], cwd=REPO, check=True,
                   stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    return time.perf_counter() - start


def _review_processes(lib: Path, draft: str, prec: str) -> dict[str, float]:
    """Best of REPEATS whole processes each, interleaved so that both see the same machine."""
    plain, with_lib = float("inf"), float("inf")
    _cli_seconds(["review", draft, "--against", prec, "--library", str(lib)])  # warm the OS cache
    for _ in range(REPEATS):
        plain = min(plain, _cli_seconds(["review", draft, "--against", prec]))
        with_lib = min(with_lib, _cli_seconds(["review", draft, "--against", prec, "--library", str(lib)]))
    return {"review_s": plain, "review_library_s": with_lib}


def _python_seconds(code: str) -> float:
    """Best of REPEATS fresh interpreters running *code* (minus an empty interpreter)."""
    def run(c: str) -> float:
        start = time.perf_counter()
        subprocess.run([sys.executable, "-c", c], cwd=REPO, check=True)
        return time.perf_counter() - start
    return min(run(code) for _ in range(REPEATS)) - min(run("pass") for _ in range(REPEATS))


def _vocabulary_loads(lib: Path) -> dict[str, float]:
    """The library's vocabulary model loaded as ``review --library`` loads it, against the
    import of gensim alone (each in a fresh interpreter, so no module is cached)."""
    load = ("from core.library.index import open_library\n"
            f"lib = open_library({str(lib)!r}, refresh=False)\n"
            "assert lib.vocabulary is not None\n")
    return {"vocabulary_load_s": _python_seconds(load),
            "gensim_import_s": _python_seconds("import gensim.models")}


def _run(args) -> dict[str, float]:
    corpus = Path(tempfile.gettempdir()) / f"counterdraft-bench-library-{args.documents}x{args.pages}"
    made = _corpus(corpus, args.documents, args.pages, workers=args.workers)
    print(f"corpus: {args.documents} agreements of ~{args.pages} pages in {corpus} "
          f"({f'generated in {made:.1f} s' if made > 1 else 'cached'})", flush=True)
    with tempfile.TemporaryDirectory(prefix="cd-bench-library-") as tmp:
        work = Path(tmp)
        lib = work / "library"
        _link_copy(corpus, lib)
        figures = _builds(lib, documents=args.documents, pages=args.pages, workers=args.workers)
        figures["index_mb"] = _folder_mb(lib / ".counterdraft")
        figures["self_peak_mb"] = peak_rss_mb()
        draft, prec = _review_pair(work, args.review_pages)
        figures.update(_review_processes(lib, draft, prec))
        figures.update(_vocabulary_loads(lib))
    figures["documents"] = float(args.documents)
    return figures


def _derived(f: dict[str, float]) -> dict[str, float]:
    per = 1000.0 / f["documents"]
    first = f["first_build_s"]
    return {"no_change_share": f["no_change_s"] / first, "add_one_share": f["add_one_s"] / first,
            "change_one_share": f["change_one_s"] / first, "remove_one_share": f["remove_one_s"] / first,
            "review_ratio": f["review_library_s"] / f["review_s"],
            "index_mb_per_1000": f["index_mb"] * per,
            "peak_mb_per_1000": max(f["self_peak_mb"], f["build_tree_peak_mb"]) * per}


#: (key, label, unit format, target or None)
_ROWS: tuple[tuple[str, str, str, float | None], ...] = (
    ("first_build_s", "first build", "{:8.1f} s", None),
    ("no_change_s", "no-change rebuild", "{:8.2f} s", None),
    ("no_change_share", "  share of first build", "{:8.2%}", TARGET_REBUILD_SHARE),
    ("add_one_s", "add one agreement", "{:8.2f} s", None),
    ("add_one_share", "  share of first build", "{:8.2%}", TARGET_ONE_FILE_SHARE),
    ("change_one_s", "change one agreement", "{:8.2f} s", None),
    ("change_one_share", "  share of first build", "{:8.2%}", TARGET_ONE_FILE_SHARE),
    ("remove_one_s", "remove one agreement", "{:8.2f} s", None),
    ("remove_one_share", "  share of first build", "{:8.2%}", TARGET_ONE_FILE_SHARE),
    ("review_s", "review (whole process)", "{:8.2f} s", None),
    ("review_library_s", "review --library", "{:8.2f} s", None),
    ("review_ratio", "  ratio", "{:8.2f} x", TARGET_REVIEW_RATIO),
    ("vocabulary_load_s", "open index + vocabulary", "{:8.2f} s", None),
    ("gensim_import_s", "import gensim alone", "{:8.2f} s", None),
    ("index_mb_per_1000", "index per 1,000", "{:8.1f} MB", TARGET_INDEX_MB_PER_1000),
    ("build_tree_peak_mb", "build peak (with workers)", "{:8.0f} MB", None),
    ("self_peak_mb", "this process's peak", "{:8.0f} MB", None),
    ("peak_mb_per_1000", "peak memory per 1,000", "{:8.0f} MB", TARGET_PEAK_MB_PER_1000),
)


def _print(now: dict[str, float], before: dict[str, float] | None) -> None:
    print()
    head = f"{'':28}{'now':>12}" + (f"{'before':>14}" if before else "")
    print(head)
    for key, label, fmt, target in _ROWS:
        line = f"{label:28}{fmt.format(now[key]):>12}"
        if before is not None and key in before:
            line += f"  {fmt.format(before[key]):>12}"
        if target is not None:
            line += f"   (target <= {fmt.format(target).strip()})   {verdict(now[key], target)}"
        print(line)


def corpus_arguments(doc: str | None) -> argparse.ArgumentParser:
    """The options of a benchmark over a generated precedent set (shared with bench_store)."""
    parser = argument_parser(doc)
    parser.add_argument("--documents", type=int, default=1000)
    parser.add_argument("--pages", type=int, default=10)
    parser.add_argument("--review-pages", type=int, default=100)
    parser.add_argument("--workers", type=int, default=2)
    return parser


def main(argv: list[str] | None = None) -> int:
    parser = corpus_arguments(__doc__)
    parser.add_argument("--large", action="store_true", help=f"{LARGE_DOCUMENTS:,} agreements")
    parser.add_argument("--json", metavar="OUT", help="write the figures as JSON")
    parser.add_argument("--before", metavar="JSON", help="an earlier run's figures, printed beside")
    args = parser.parse_args(argv)
    if args.large:
        args.documents = LARGE_DOCUMENTS
    figures = _run(args)
    figures.update(_derived(figures))
    before = None
    if args.before:
        before = {k: v for k, v in json.loads(Path(args.before).read_text(encoding="utf-8")).items()
                  if not k.startswith("_")}
    _print(figures, before)
    if args.json:
        Path(args.json).write_text(json.dumps(figures, indent=2) + "\n", encoding="utf-8")
    return 0


if __name__ == "__main__":
    sys.exit(main())
