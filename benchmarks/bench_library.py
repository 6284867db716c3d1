"""Benchmark: the precedent-set index on 1,000 agreements of about 10 pages each.

Generates (once; cached in the system's temporary folder) 1,000 agreements of ~10 pages
(``benchmarks/_corpus.py``, real auto-numbered .docx) and prints:

* the first build of the index (``core.library.index.build_library``, 2 reading processes):
  reading, clause typing, term aliases, variants, frequency cache and vocabulary model;
* a rebuild with no change (what ``review --library`` does before each review);
* the time the library adds to the review of a ~100-page pair: refreshing and opening the
  index, clause typing with the library's neighbours, the vocabulary model in the term mapper
  and :func:`core.library.frequency.apply_frequency`, against the same review without a
  library (best of 3 each);
* the size of the index folder and the peak memory: this process's peak resident set size
  (``resource.getrusage``) and, during the first build, the largest sum of the resident set
  sizes of this process and its reading workers (sampled from /proc every 0.1 s).

Targets on a 2-core machine: first build <= 120 s, no-change rebuild <= 5 s, added review
time <= 1 s, peak memory <= 1 GB.  Run: ``python benchmarks/bench_library.py [--documents N]
[--pages P] [--workers W]``.
"""

from __future__ import annotations

import dataclasses
import os
import sys
import tempfile
import threading
import time
from pathlib import Path

# _measure first: importing it puts the repository root on sys.path.
from _measure import argument_parser, best_of, peak_rss_mb, verdict

from _corpus import AGREEMENT_LISTS, make_agreement_docx, make_agreement_paragraphs
from core.docx.compose import compose_docx
from core.library.commands import review_options
from core.library.frequency import apply_frequency
from core.library.index import build_library, open_library
from core.reader import read_document
from core.review import run_review

#: Targets from the precedent-set issue (2-core machine).
TARGET_FIRST_BUILD_S = 120.0
TARGET_REBUILD_S = 5.0
TARGET_ADDED_REVIEW_S = 1.0
TARGET_PEAK_MB = 1024.0
REPEATS = 3
#: Seeds of the library's agreements start here (the review pair uses seed 1).
LIBRARY_SEED = 1000


def _corpus(folder: Path, documents: int, pages: int) -> float:
    """Write the agreements not yet in *folder*; the seconds it took."""
    folder.mkdir(parents=True, exist_ok=True)
    start = time.perf_counter()
    for i in range(documents):
        path = folder / f"agreement-{i:04d}.docx"
        if not path.exists():
            tmp = path.with_suffix(".part")
            tmp.write_bytes(make_agreement_docx(pages=pages, seed=LIBRARY_SEED + i))
            tmp.replace(path)
    return time.perf_counter() - start


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
    """Samples the resident set size of this process plus its child processes (the reading
    workers) from /proc every 0.1 s; ``peak_mb`` is the largest sum seen (Linux only)."""

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


def main(argv: list[str] | None = None) -> int:
    parser = argument_parser(__doc__)
    parser.add_argument("--documents", type=int, default=1000)
    parser.add_argument("--pages", type=int, default=10)
    parser.add_argument("--review-pages", type=int, default=100)
    parser.add_argument("--workers", type=int, default=2)
    args = parser.parse_args(argv)

    corpus = Path(tempfile.gettempdir()) / f"counterdraft-bench-library-{args.documents}x{args.pages}"
    made = _corpus(corpus, args.documents, args.pages)
    print(f"corpus: {args.documents} agreements of ~{args.pages} pages in {corpus} "
          f"({'generated in %.1f s' % made if made > 1 else 'cached'})")

    with tempfile.TemporaryDirectory(prefix="cd-bench-library-") as tmp:
        work = Path(tmp)
        index_dir = work / "index"
        index_dir.mkdir(mode=0o700)
        db = index_dir / "library.sqlite"

        with _TreeMemory() as build_memory:
            start = time.perf_counter()
            report = build_library(corpus, db_path=db, workers=args.workers)
            first = time.perf_counter() - start
        start = time.perf_counter()
        again = build_library(corpus, db_path=db, workers=args.workers)
        rebuild = time.perf_counter() - start
        print(f"indexed {report.documents} agreements ({len(report.failures)} skipped); "
              f"no-change rebuild read {again.read} files")

        draft_path, prec_path = _review_pair(work, args.review_pages)
        draft, prec = read_document(draft_path), read_document(prec_path)
        plain = best_of(lambda: run_review(draft, prec), repeats=REPEATS)

        def with_library() -> None:
            library = open_library(corpus, db_path=db, workers=args.workers)
            try:
                apply_frequency(run_review(draft, prec, **review_options(library)), library)
            finally:
                library.close()

        library_time = best_of(with_library, repeats=REPEATS)
        library = open_library(corpus, db_path=db, refresh=False)
        review = run_review(draft, prec, **review_options(library))
        start = time.perf_counter()
        reviewed = apply_frequency(review, library)
        freq_only = time.perf_counter() - start
        library.close()
        added = library_time - plain
        size_mb = _folder_mb(index_dir)
        self_mb = peak_rss_mb()
        peak = max(self_mb, build_memory.peak_mb)

        print(f"review pair: {len(draft.provisions)} draft provisions, {len(reviewed.deviations)} deviations, "
              f"{len(reviewed.pairs)} pairs")
        print()
        print(f"first build             {first:8.1f} s   (target <= {TARGET_FIRST_BUILD_S:.0f} s)   "
              f"{verdict(first, TARGET_FIRST_BUILD_S)}")
        print(f"no-change rebuild       {rebuild:8.2f} s   (target <= {TARGET_REBUILD_S:.0f} s)   "
              f"{verdict(rebuild, TARGET_REBUILD_S)}")
        print(f"review without library  {plain:8.2f} s")
        print(f"review with library     {library_time:8.2f} s   (refresh, open, typing, vocabulary, frequency)")
        print(f"  added by the library  {added:8.2f} s   (target <= {TARGET_ADDED_REVIEW_S:.0f} s)   "
              f"{verdict(added, TARGET_ADDED_REVIEW_S)}")
        print(f"  of which frequency    {freq_only:8.2f} s   (apply_frequency alone, index open)")
        print(f"index size              {size_mb:8.1f} MB  (database, frequency cache, models)")
        print(f"peak memory             {peak:8.0f} MB  (this process's peak {self_mb:.0f} MB; this process "
              f"plus reading workers during the build {build_memory.peak_mb:.0f} MB; target <= "
              f"{TARGET_PEAK_MB:.0f} MB)   {verdict(peak, TARGET_PEAK_MB)}")
    return 0


if __name__ == "__main__":
    sys.exit(main())

