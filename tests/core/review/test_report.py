"""The ranked table (core.review.report)."""

from __future__ import annotations

from core import CAUTION
from core.review import run_review
from core.review.report import format_review, shown_deviations

from .helpers import doc

PRECEDENT = """
    1. Definitions

    1.1 "Customer" means the buyer named in the order form.

    2. Payment

    2.1 The Customer shall pay each invoice within thirty (30) days of receipt.

    2.2 Interest on late payment accrues at four per cent (4%) a year above the base rate of the central bank of Ardence, calculated daily and compounded quarterly until payment.
"""
DRAFT = """
    1. Definitions

    1.1 "Client" means the buyer named in the order form.

    2. Payment

    2.1 The Client may pay each invoice within  sixty (60) days of receipt.

    2.2 Interest on late payment accrues at two per cent (2%) a year above the base rate of the central bank of Ardence, calculated daily and compounded quarterly until payment.
"""


def test_table_fits_100_columns_ranks_and_ends_with_the_caution():
    r = run_review(doc(DRAFT), doc(PRECEDENT))
    out = format_review(r)
    lines = out.splitlines()
    assert max(len(line) for line in lines) <= 100
    assert " ".join(" ".join(lines[-3:]).split()) == CAUTION
    rows = [line for line in lines if line[:4].strip().isdigit()]
    assert [int(row[:4]) for row in rows] == [v.rank for v in shown_deviations(r)]
    assert any("2.1 Payment" in row and "period changed from 30 to 60 days" in row for row in rows)
    assert any('term: draft "Client" = precedent "Customer"' in row for row in rows)


def test_show_selects_categories():
    r = run_review(doc(DRAFT), doc(PRECEDENT))
    default = {v.category for v in shown_deviations(r)}
    assert default == {"substantive", "term"}
    assert {v.category for v in shown_deviations(r, show="substantive")} == {"substantive"}
    every = shown_deviations(r, show="all")
    assert len(every) == len(r.deviations) and "formatting" in {v.category for v in every}
    assert "not shown" in format_review(r) and "not shown" not in format_review(r, show="all")


def test_narrow_width_still_fits():
    r = run_review(doc(DRAFT), doc(PRECEDENT))
    assert max(len(line) for line in format_review(r, width=72).splitlines()) <= 72
