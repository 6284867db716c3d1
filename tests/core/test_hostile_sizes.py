"""Hostile sizes: a document defining 20,000 terms is read and reviewed, not hung.

Every step over terms and provisions is near-linear (a quadratic step made this document
hang).  The figures are measured by benchmarks/bench_terms.py; here the check is only that
the job finishes within a generous limit (an alarm, POSIX) and finds every term.
"""

from __future__ import annotations

import signal

from core.reader import read_text
from core.review import run_review

#: Seconds allowed; the document takes about 6 s on the 2-core test machine.
LIMIT_S = 120
TERMS = 20_000


def _many_definitions(n: int) -> str:
    lines = ["1. Definitions"] + [f'1.{i + 1} "Term{i:05d} Alpha" means the thing number {i}.' for i in range(n)]
    lines += ["2. Obligations", "2.1 The Supplier shall deliver Term00001 Alpha and Term00002 Alpha."]
    return "\n\n".join(lines)


def _alarm(_signum, _frame):
    raise AssertionError(f"over {LIMIT_S} s: a step is not near-linear")


def test_twenty_thousand_defined_terms_are_read_and_reviewed():
    previous = signal.signal(signal.SIGALRM, _alarm)
    signal.alarm(LIMIT_S)
    try:
        doc = read_text(_many_definitions(TERMS))  # invented definitions
        review = run_review(doc, doc)
    finally:
        signal.alarm(0)
        signal.signal(signal.SIGALRM, previous)
    assert len(doc.terms) == TERMS
    assert not [d for d in review.deviations if d.category == "substantive"]
