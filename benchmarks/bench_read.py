"""Benchmark: reading a ~100-page agreement (.docx with real auto-numbering).

Generates, into a temporary folder, a ~100-page agreement (~45,000 words, ~400
auto-numbered provisions; see ``benchmarks/_corpus.py``) and prints:

* the time of ``core.readers.read_document`` (the whole reader: package checks, paragraphs,
  numbering labels, provisions, defined terms), best of 3;
* the time of ``core.docx.blocks.read_docx_blocks`` alone (paragraphs and labels), best of 3;
* peak memory: Python allocations during one read (tracemalloc) and the process's peak
  resident set size (``resource.getrusage``, which includes the interpreter and libraries).

Targets on a 2-core machine: <= 1.0 s and <= 200 MB.  Run: ``python benchmarks/bench_read.py
[--pages N] [--seed S]``.
"""

from __future__ import annotations

import tempfile
from pathlib import Path

from _corpus import make_agreement_docx

# _measure first: importing it puts the repository root on sys.path.
from _measure import argument_parser, best_of, peak_rss_mb, traced_peak_mb, verdict

from core.docx.blocks import read_docx_blocks
from core.readers import read_document

#: Targets from the foundation issue (2-core machine).
TARGET_SECONDS = 1.0
TARGET_MB = 200.0
REPEATS = 3


def main(argv: list[str] | None = None) -> int:
    args = argument_parser(__doc__, pages=100, seed=1).parse_args(argv)

    with tempfile.TemporaryDirectory(prefix="cd-bench-read-") as tmp:
        path = Path(tmp) / f"agreement-{args.pages}p.docx"
        path.write_bytes(make_agreement_docx(pages=args.pages, seed=args.seed))
        doc = read_document(str(path))  # warm-up, and the figures describing the input
        blocks, _ = read_docx_blocks(str(path))
        words = sum(len(b.text.split()) for b in blocks)
        numbered = sum(b.label is not None for b in blocks)
        print(f"input: {path.name}, {path.stat().st_size / 1024:.0f} KiB, {len(blocks)} paragraphs, "
              f"{words:,} words, {numbered} auto-numbered, {len(doc.provisions)} provisions, "
              f"{len(doc.terms)} defined terms")

        t_read = best_of(lambda: read_document(str(path)), repeats=REPEATS)
        t_blocks = best_of(lambda: read_docx_blocks(str(path)), repeats=REPEATS)
        peak_mb = traced_peak_mb(lambda: read_document(str(path)))
        rss_mb = peak_rss_mb()

    print(f"read_document     best of {REPEATS}: {t_read:6.3f} s   "
          f"(target <= {TARGET_SECONDS:.1f} s: {verdict(t_read, TARGET_SECONDS)})")
    print(f"read_docx_blocks  best of {REPEATS}: {t_blocks:6.3f} s")
    # tracemalloc sees Python's allocations only, not libxml2's (lxml's parsed trees).
    print(f"peak Python allocations (tracemalloc, one read_document): {peak_mb:6.1f} MB   "
          f"(target <= {TARGET_MB:.0f} MB: {verdict(peak_mb, TARGET_MB)})")
    print(f"peak resident set size of this process (getrusage):      {rss_mb:6.1f} MB   "
          f"(target <= {TARGET_MB:.0f} MB: {verdict(rss_mb, TARGET_MB)})")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
