"""Benchmark: keeping the cross-references of a long agreement true (core.xrefs).

Builds, deterministically, a ~100-page plain-text agreement (top-level clauses with
sub-clauses and lettered items, every sub-clause citing other clauses in the forms drafters
use: "clause 12.3(b)", "Sections 4 to 6", "clauses 2.1, 2.3 or 2.5", "paragraph (c)
above", "Schedule 2"), reads it with ``core.readers.read_text`` and prints:

* the number of references and of numbers they carry;
* the time of ``find_references`` over every provision's text and heading, best of 3;
* the time of ``renumber_references`` when a clause is inserted before clause 2 (every
  top-level number moves, so nearly every reference is rewritten), best of 3, cold index;
* peak Python allocations during one renumbering (tracemalloc).

Target on a 2-core machine: <= 1.0 s for the renumbering, a small part of writing the
counter-draft (common practice for an interactive export, no source).  Run: ``python
benchmarks/bench_xrefs.py [--pages N] [--seed S]``.
"""

from __future__ import annotations

import random

# _measure first: importing it puts the repository root on sys.path.
from _measure import argument_parser, best_of, traced_peak_mb, verdict

from core import xrefs
from core.readers import read_text
from core.xrefs import find_references, renumber_references

#: Target for one renumbering of a ~100-page agreement (see the module doc).
TARGET_SECONDS = 1.0
REPEATS = 3
#: Shape of the generated agreement: each clause has SUBCLAUSES sub-clauses of ITEMS items,
#: about 600 words, so at benchmarks/_corpus.py's 450 words a page 100 pages hold 75
#: clauses (~1,900 provisions, every sub-clause and item citing others: a dense case).
CLAUSES_PER_PAGE = 0.75
SUBCLAUSES = 6
ITEMS = 3

_FORMS = ("subject to clause {a}.{b}({c})", "as set out in Sections {a} to {a2}",
          "under clauses {a}.1, {a}.2 or {a2}.3", "save as paragraph (b) above provides",
          "as described in Schedule 2 and Part 1 of Schedule 1", "within 30 days of notice under clause {a}")


def make_agreement_text(pages: int, seed: int) -> str:
    """A plain-text agreement of about *pages* pages whose clauses cite one another."""
    rnd = random.Random(seed)
    clauses = max(3, round(pages * CLAUSES_PER_PAGE))
    lines = ["MASTER SERVICES AGREEMENT", ""]
    for k in range(1, clauses + 1):
        lines += [f"{k}. Clause Heading {k}", ""]
        for s in range(1, SUBCLAUSES + 1):
            a = rnd.randint(1, clauses)
            refs = [rnd.choice(_FORMS).format(a=a, a2=min(clauses, a + 2), b=rnd.randint(1, SUBCLAUSES),
                                              c="abc"[rnd.randint(0, ITEMS - 1)]) for _ in range(2)]
            lines += [f"{k}.{s} The Supplier shall perform the obligations {refs[0]} and the Customer "
                      f"shall cooperate {refs[1]}, acting reasonably and in good faith at all times:", ""]
            for item in "abc"[:ITEMS]:
                lines += [f"({item}) in each case promptly and {rnd.choice(_FORMS).format(a=a, a2=a, b=1, c='a')};",
                          ""]
    for n in (1, 2):
        lines += [f"SCHEDULE {n}", f"SCHEDULE HEADING {n}", "", "Part 1", "",
                  "1. The services are described here.", ""]
    return "\n".join(lines) + "\n"


def main(argv: list[str] | None = None) -> int:
    args = argument_parser(__doc__, pages=100, seed=1).parse_args(argv)
    text = make_agreement_text(args.pages, args.seed)
    doc = read_text(text, source="bench.txt")
    parts = [t for p in doc.provisions for t in (p.heading or "", p.text)]
    refs = [r for t in parts for r in find_references(t)]
    new = {p.id: str(int(p.number) + 1) for p in doc.provisions
           if p.level == 1 and p.kind == "clause" and p.number and p.number.isdigit()
           and int(p.number) >= 2}
    print(f"input: {len(text.split()):,} words, {len(doc.provisions)} provisions, "
          f"{len(refs)} references carrying {sum(len(r.numbers) for r in refs)} numbers")

    def renumber() -> tuple:
        xrefs._CACHE.clear()  # a cold run: the index is built as in a first export
        return renumber_references(doc, new)

    edits, issues = renumber()
    t_find = best_of(lambda: [find_references(t) for t in parts], repeats=REPEATS)
    t_renumber = best_of(renumber, repeats=REPEATS)
    peak = traced_peak_mb(renumber)
    print(f"renumbering: {len(edits)} edits, {len(issues)} issues")
    print(f"find_references (all texts)  best of {REPEATS}: {t_find:6.3f} s")
    print(f"renumber_references          best of {REPEATS}: {t_renumber:6.3f} s   "
          f"(target <= {TARGET_SECONDS:.1f} s: {verdict(t_renumber, TARGET_SECONDS)})")
    print(f"peak Python allocations (tracemalloc, one renumbering): {peak:6.1f} MB")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
