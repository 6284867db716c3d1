"""Reading and reviewing documents that define many terms: growth must stay near-linear.

    python benchmarks/bench_terms.py [N ...]   (default 2500 5000 10000 20000)

Prints, for each count of invented definitions, the time to read the text and to review it
against itself, and the growth exponent between the last two sizes (1.0 is linear).
"""

from __future__ import annotations

import math
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from core.readers import read_text
from core.review import run_review
from tests.core.test_hostile_sizes import _many_definitions

#: Growth exponent above which a step is not near-linear.
MAX_EXPONENT = 1.3


def main(sizes: list[int]) -> int:
    totals = []
    for n in sizes:
        t = time.perf_counter()
        doc = read_text(_many_definitions(n))
        read = time.perf_counter() - t
        t = time.perf_counter()
        run_review(doc, doc)
        review = time.perf_counter() - t
        totals.append(read + review)
        print(f"{n:7,} terms: read {read:6.2f} s, review {review:6.2f} s")
    if len(sizes) > 1:
        k = math.log(totals[-1] / totals[-2]) / math.log(sizes[-1] / sizes[-2])
        print(f"growth exponent {k:.2f} (target at most {MAX_EXPONENT})")
        return 0 if k <= MAX_EXPONENT else 1
    return 0


if __name__ == "__main__":
    sys.exit(main([int(a) for a in sys.argv[1:]] or [2500, 5000, 10000, 20000]))
