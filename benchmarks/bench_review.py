"""Benchmark: the review of a ~100-page draft against its precedent.

Generates a precedent of about 100 pages (~45,000 words, ~400 auto-numbered provisions;
``benchmarks/_corpus.py``) and a draft from it with 30 planted edits of seven kinds (changed
figures, "shall" -> "may", "not" inserted, sentences inserted, provisions deleted, provisions
added, qualifiers inserted), one section moved and a defined term renamed everywhere, both
written as .docx with real auto-numbering and read back with ``core.readers.read_document``.
Prints:

* each stage's time of ``core.review.run_review`` and the whole review, best of 3;
* in the same run, on the same two plain texts (the documents' paragraphs, one per line):
  the time of the standard library's word-level ``difflib.SequenceMatcher`` (opcodes) and
  of ``git diff --no-index --word-diff``, with the ratios to the review;
* peak memory: Python allocations during one review (tracemalloc) and the process's peak
  resident set size (``resource.getrusage``, interpreter and libraries included);
* how many planted edits the review found (a sanity check, not a test);
* the whole review's time for 25, 50, 100 and 200 pages, to show the growth.

Targets on a 2-core machine: the 100-page review <= 2 s, <= 300 MB peak, faster than
difflib's word diff, close to linear growth.  Run: ``python benchmarks/bench_review.py
[--pages N] [--seed S] [--no-growth]``.
"""

from __future__ import annotations

import argparse
import dataclasses
import difflib
import random
import re
import resource
import shutil
import subprocess
import sys
import tempfile
import time
import tracemalloc
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from _corpus import AGREEMENT_LISTS, make_agreement_paragraphs

from core.docx.compose import ComposeParagraph, compose_docx
from core.model import Document, Review
from core.readers import read_document
from core.review import clear_caches, run_review

#: Planted edits per pair and their kinds (cycled).
EDITS = 30
KINDS = ("number", "weaken", "negate", "sentence", "delete", "add", "qualifier")
RENAME = ("Deliverables", "Work Product")
_FIGURE_RE = re.compile(r"\b([a-z]+(?:-[a-z]+)?) \((\d+)\)")
_NEW_FIGURES = {5: "eight (8)", 7: "nine (9)", 10: "fifteen (15)", 14: "twenty-one (21)",
                20: "twenty-five (25)", 30: "forty (40)", 45: "fifty (50)", 60: "seventy (70)",
                90: "one hundred and twenty (120)"}
_SENTENCE = "The Supplier shall notify the Customer in writing of any change to its insurance cover."
_ADDED = ("The Customer shall pay the Supplier a mobilisation fee of EUR 12,500 within ten (10) "
          "Business Days of the date of each Order.")


@dataclasses.dataclass
class Plan:
    draft: list[ComposeParagraph]
    counts: dict[str, int]
    moved_heading: str


def plant(paras: list[ComposeParagraph], *, seed: int, edits: int = EDITS) -> Plan:
    """The draft: *paras* with *edits* planted edits, one moved section and the rename."""
    rng = random.Random(seed)
    out = [dataclasses.replace(p, text=re.sub(rf"\b{RENAME[0]}\b", RENAME[1], p.text)) for p in paras]
    body = [i for i, p in enumerate(out) if p.level == 1 and len(p.text.split()) > 20
            and not p.text.endswith(":")]
    chosen = sorted(rng.sample(body, min(edits, len(body))))
    counts = dict.fromkeys(KINDS, 0)
    delete: set[int] = set()
    add_after: set[int] = set()
    for n, i in enumerate(chosen):
        kind = KINDS[n % len(KINDS)]
        t = out[i].text
        if kind == "number" and (m := _FIGURE_RE.search(t)) and int(m.group(2)) in _NEW_FIGURES:
            t = t[:m.start()] + _NEW_FIGURES[int(m.group(2))] + t[m.end():]
        elif kind == "weaken" and " shall " in t:
            t = t.replace(" shall ", " may ", 1) if not t.startswith("Shall") else t
            k = t.find(" may ")
            if t[k + 5:k + 9] == "not ":
                t = out[i].text
                kind = "sentence"
                t = t + " " + _SENTENCE
        elif kind == "negate" and re.search(r"\bshall (?!not\b)", t):
            t = re.sub(r"\bshall (?!not\b)", "shall not ", t, count=1)
        elif kind == "delete":
            delete.add(i)
        elif kind == "add":
            add_after.add(i)
        elif kind == "qualifier" and re.search(r"\bshall (?!not\b|promptly\b|use\b)", t):
            t = re.sub(r"\bshall (?!not\b|promptly\b|use\b)", "shall promptly ", t, count=1)
        else:
            kind = "sentence"
            t = t + " " + _SENTENCE
        counts[kind] += 1
        out[i] = dataclasses.replace(out[i], text=t)
    draft: list[ComposeParagraph] = []
    for i, p in enumerate(out):
        if i in delete:
            continue
        draft.append(p)
        if i in add_after:
            draft.append(ComposeParagraph(_ADDED, level=1))
    # move one section (a heading and its clauses) ten sections later
    heads = [i for i, p in enumerate(draft) if p.style == "Heading 1" and i > 20]
    start = heads[len(heads) // 3]
    end = next(i for i in heads if i > start)
    section = draft[start:end]
    rest = draft[:start] + draft[end:]
    later = [i for i, p in enumerate(rest) if p.style == "Heading 1" and i > start]
    at = later[min(10, len(later) - 1)]
    draft = rest[:at] + section + rest[at:]
    return Plan(draft, counts, section[0].text)


def found(review: Review, plan: Plan) -> dict[str, int]:
    """How many deviations of each planted kind the review reports."""
    subs = [v for v in review.deviations if v.category == "substantive"]
    reasons = [" ".join(v.reasons).lower() for v in subs]
    got = {
        "number": sum("changed from" in r and ("period" in r or "figure" in r) for r in reasons),
        "weaken": sum("obligation weakened" in r for r in reasons),
        "negate": sum("negation added" in r for r in reasons),
        "sentence": sum("insurance cover" in v.draft_text for v in subs),
        "delete": sum(v.change == "remove-provision" for v in subs),
        "add": sum(v.change == "add-provision" and "mobilisation fee" in v.draft_text for v in subs),
        "qualifier": sum("qualifier added: 'promptly'" in r for r in reasons),
    }
    return got


def _plain(doc: Document) -> str:
    return "\n".join(b.text for b in doc.blocks) + "\n"


def _best(fn, repeat: int = 3) -> float:
    best = float("inf")
    for _ in range(repeat):
        t = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t)
    return best


def make_pair(pages: int, seed: int, folder: Path) -> tuple[Document, Document, Plan]:
    paras = make_agreement_paragraphs(pages=pages, seed=seed)
    plan = plant(paras, seed=seed + 1)
    pp = folder / f"precedent-{pages}.docx"
    dp = folder / f"draft-{pages}.docx"
    pp.write_bytes(compose_docx(paras, lists=AGREEMENT_LISTS))
    dp.write_bytes(compose_docx(plan.draft, lists=AGREEMENT_LISTS))
    return read_document(str(dp)), read_document(str(pp)), plan


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--pages", type=int, default=100)
    ap.add_argument("--seed", type=int, default=7)
    ap.add_argument("--no-growth", action="store_true", help="skip the 25/50/100/200-page series")
    args = ap.parse_args(argv)

    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        draft, precedent, plan = make_pair(args.pages, args.seed, folder)
        words = sum(len(p.text.split()) for p in precedent.provisions)
        print(f"precedent: {len(precedent.provisions)} provisions, {words:,} words; "
              f"draft: {len(draft.provisions)} provisions")
        print(f"planted: {sum(plan.counts.values())} edits {plan.counts}, section "
              f"'{plan.moved_heading}' moved, '{RENAME[0]}' renamed '{RENAME[1]}'")

        best: dict[str, float] | None = None
        total_best = float("inf")
        review = None
        for _ in range(3):
            timings: dict[str, float] = {}
            clear_caches()
            t = time.perf_counter()
            review = run_review(draft, precedent, timings=timings)
            total = time.perf_counter() - t
            if total < total_best:
                total_best, best = total, timings
        assert review is not None and best is not None
        print("\nreview stages (best of 3 cold runs; caches cleared before each):")
        for stage, secs in best.items():
            print(f"  {stage:<32} {secs * 1000:8.1f} ms")
        print(f"  {'whole review':<32} {total_best * 1000:8.1f} ms   (target <= 2000 ms)")

        # acting for a party: the same review, each deviation's direction judged as well
        from core.review.direction import party_terms

        parties = party_terms(precedent)
        if parties:
            secs = _best(lambda: (clear_caches(), run_review(draft, precedent, acting_for=parties[0])))
            print(f"  {'whole review acting for the ' + parties[0]:<32} {secs * 1000:8.1f} ms   "
                  "(directions judged too; same target)")

        got = found(review, plan)
        ok = sum(min(got[k], plan.counts[k]) for k in KINDS)
        moved = [p for p in review.pairs if p.status == "moved"]
        renamed = [m for m in review.term_map if (m.draft, m.precedent) == (RENAME[1], RENAME[0])]
        print(f"\nfound: {ok} of {sum(plan.counts.values())} planted edits {got}; "
              f"{len(moved)} provisions moved; rename mapped: {bool(renamed)}")

        a, b = _plain(precedent), _plain(draft)
        aw, bw = a.split(), b.split()
        t_difflib = _best(lambda: difflib.SequenceMatcher(None, aw, bw).get_opcodes(), repeat=1)
        print(f"\ndifflib word-level SequenceMatcher ({len(aw):,} / {len(bw):,} words): "
              f"{t_difflib * 1000:8.1f} ms   review / difflib = {total_best / t_difflib:.2f}")
        git = shutil.which("git")
        if git:
            (folder / "a.txt").write_text(a, encoding="utf-8")
            (folder / "b.txt").write_text(b, encoding="utf-8")

            def run_git() -> None:
                subprocess.run([git, "diff", "--no-index", "--word-diff", "a.txt", "b.txt"],
                               cwd=folder, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                               check=False)

            t_git = _best(run_git)
            print(f"git diff --no-index --word-diff:               {t_git * 1000:8.1f} ms   "
                  f"review / git = {total_best / t_git:.2f}")
        else:
            print("git not found: git diff --word-diff not timed")

        clear_caches()
        tracemalloc.start()
        run_review(draft, precedent)
        _cur, peak = tracemalloc.get_traced_memory()
        tracemalloc.stop()
        rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
        print(f"\npeak memory: {peak / 2**20:.1f} MB allocated during one review (tracemalloc); "
              f"process peak RSS {rss:.0f} MB (target <= 300 MB)")

        if not args.no_growth:
            print("\ngrowth (whole review, best of 3):")
            base = None
            for pages in (25, 50, 100, 200):
                d, p, _plan = make_pair(pages, args.seed, folder)
                secs = _best(lambda d=d, p=p: (clear_caches(), run_review(d, p)))
                base = base or secs / pages
                print(f"  {pages:4d} pages, {len(p.provisions):4d} provisions: {secs * 1000:8.1f} ms"
                      f"  ({secs * 1000 / pages:5.2f} ms/page; x{secs / pages / base:.2f} of the "
                      "25-page rate)")
            rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
            print(f"  process peak RSS after the series: {rss:.0f} MB")
    return 0


if __name__ == "__main__":
    sys.exit(main())
