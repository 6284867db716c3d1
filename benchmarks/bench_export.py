"""Benchmark: writing the outputs of a review of a ~100-page pair.

Builds the pair of ``benchmarks/bench_review.py`` (a ~100-page precedent and a draft with 30
planted edits, a moved section and a renamed term), reviews it, reverts every substantive
deviation, and prints the time (best of 3) of:

* the counter-draft (planning the block edits and writing tracked changes into the draft's
  own .docx), and our structural check of its revision markup;
* the comparison redline in its two views: substantive deviations only, and every
  difference (.docx with insertions, deletions and moves);
* the issues list as .docx, .html and .csv;

with the peak of Python allocations (tracemalloc) while writing the counter-draft and the
redline.  No target is set by the issue; writing should stay well under the review's own
2 s.  Run: ``python benchmarks/bench_export.py [--pages N] [--seed S]``.
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
import tracemalloc
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench_review import make_pair

from core.decisions import Decision
from core.docx.validate import validate_docx
from core.export import (
    counter_draft_bytes,
    issues_list_csv,
    issues_list_docx,
    issues_list_html,
    redline_bytes,
)
from core.review import run_review


def _best(fn, repeat: int = 3):
    best, result = float("inf"), None
    for _ in range(repeat):
        t = time.perf_counter()
        result = fn()
        best = min(best, time.perf_counter() - t)
    return best, result


def _peak(fn) -> float:
    tracemalloc.start()
    try:
        fn()
        return tracemalloc.get_traced_memory()[1] / 2**20
    finally:
        tracemalloc.stop()


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--pages", type=int, default=100)
    ap.add_argument("--seed", type=int, default=7)
    args = ap.parse_args(argv)
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        draft, precedent, _ = make_pair(args.pages, args.seed, folder)
        review = run_review(draft, precedent)
        decisions = [Decision(d.id, "revert", note="House position." if i % 5 == 0 else None)
                     for i, d in enumerate(d for d in review.deviations if d.category == "substantive")]
        draft_path = str(folder / f"draft-{args.pages}.docx")
        print(f"{args.pages} pages: {len(draft.blocks)} draft paragraphs, {len(review.deviations)} "
              f"deviations, {len(decisions)} reverted")

        t, (data, notes) = _best(lambda: counter_draft_bytes(review, decisions, draft_path=draft_path,
                                                             author="Bench"))
        print(f"  counter-draft          {t * 1000:8.1f} ms  ({len(data) / 1024:.0f} KB, "
              f"{len(notes)} decisions not written)")
        t, problems = _best(lambda: validate_docx(data))
        print(f"  validate counter-draft {t * 1000:8.1f} ms  ({len(problems)} problems)")
        for show in ("substantive", "all"):
            t, red = _best(lambda show=show: redline_bytes(review, author="Bench", show=show))
            label = f"redline ({show})"
            print(f"  {label:<22} {t * 1000:8.1f} ms  ({len(red) / 1024:.0f} KB)")
        t, _ = _best(lambda: validate_docx(red))
        print(f"  validate redline (all) {t * 1000:8.1f} ms")
        for name, fn in (("issues list .docx", lambda: issues_list_docx(review, decisions, author="Bench")),
                         ("issues list .html", lambda: issues_list_html(review, decisions)),
                         ("issues list .csv", lambda: issues_list_csv(review, decisions))):
            t, _ = _best(fn)
            print(f"  {name:<22} {t * 1000:8.1f} ms")
        peak_cd = _peak(lambda: counter_draft_bytes(review, decisions, draft_path=draft_path, author="Bench"))
        peak_rl = _peak(lambda: redline_bytes(review, author="Bench", show="all"))
        print(f"  peak Python allocations: counter-draft {peak_cd:.0f} MB, redline (all) {peak_rl:.0f} MB")
    return 0


if __name__ == "__main__":
    sys.exit(main())
