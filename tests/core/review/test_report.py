"""The ranked table (core.review.report)."""

from __future__ import annotations

import shutil

import pytest

from core import CAUTION
from core.review import run_review
from core.review.report import format_review, shown_deviations, terminal_width

from .helpers import doc

PRECEDENT = """
    1. Definitions

    1.1 "Customer" means the buyer named in the order form.

    2. Payment

    2.1 The Customer shall pay each invoice within thirty (30) days of receipt.

    2.2 Interest on late payment accrues at four per cent (4%) a year above the base rate of the central bank of Ardence, calculated daily and compounded quarterly until payment.
"""  # noqa: E501 (a provision is one line of the text)
DRAFT = """
    1. Definitions

    1.1 "Client" means the buyer named in the order form.

    2. Payment

    2.1 The Client may pay each invoice within  sixty (60) days of receipt.

    2.2 Interest on late payment accrues at two per cent (2%) a year above the base rate of the central bank of Ardence, calculated daily and compounded quarterly until payment.
"""  # noqa: E501 (a provision is one line of the text)


def test_table_fits_100_columns_ranks_and_ends_with_the_caution():
    r = run_review(doc(DRAFT), doc(PRECEDENT))
    out = format_review(r, width=100)
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
    assert "not shown" in format_review(r, width=100)
    assert "not shown" not in format_review(r, show="all", width=100)


def test_narrow_width_still_fits():
    r = run_review(doc(DRAFT), doc(PRECEDENT))
    assert max(len(line) for line in format_review(r, width=72).splitlines()) <= 72


def _rows(out: str) -> list[str]:
    return [line for line in out.splitlines() if line[:4].strip().isdigit()]


def _header(out: str) -> str:
    return next(line for line in out.splitlines() if line.split()[:2] == ["No.", "Sev"])


def test_each_row_shows_the_number_that_decide_takes(tmp_path, capsys):
    """The number column is the rank (Deviation.rank) and nothing else names a deviation:
    no internal id is shown; `counterdraft decide` takes the number."""
    import json

    from core.cli import main
    from core.decisions import new_review_file, save_review_file
    from core.labels import clause_label

    r = run_review(doc(DRAFT), doc(PRECEDENT))
    out = format_review(r, show="all")
    header = _header(out)
    assert header.split()[:3] == ["No.", "Sev", "Clause"] and "Past use" not in header and "Id" not in header
    by_rank = {v.rank: v for v in r.deviations}
    rows = _rows(out)
    assert len(rows) == len(r.deviations)
    for row in rows:
        number, sev = row.split()[:2]
        v = by_rank[int(number)]
        assert int(sev) == v.severity
        assert clause_label(r, v, compact=True)[:20] in row
    assert not any(word in {v.id for v in r.deviations} for row in rows for word in row.split())
    # the number is what `counterdraft decide` records a decision on
    draft_path, precedent_path = tmp_path / "draft.txt", tmp_path / "precedent.txt"
    draft_path.write_text(DRAFT, encoding="utf-8")
    precedent_path.write_text(PRECEDENT, encoding="utf-8")
    review_file = tmp_path / "r.json"
    save_review_file(review_file, new_review_file(str(draft_path), str(precedent_path)))
    first = int(rows[0].split()[0])
    assert main(["decide", str(review_file), str(first), "accept"]) == 0
    assert capsys.readouterr().out.startswith(f"Deviation {first}, ")
    (decision,) = json.loads(review_file.read_text(encoding="utf-8"))["decisions"]
    assert decision["deviation"] == by_rank[first].id  # the review file keeps the internal id


def test_with_a_precedent_set_the_table_says_how_common_the_drafts_wording_is():
    import dataclasses

    from core.model import Frequency

    r = run_review(doc(DRAFT), doc(PRECEDENT))
    devs = tuple(dataclasses.replace(v, frequency=Frequency(same_type=9, matching=2, total=12))
                 if v.category == "substantive" else v for v in r.deviations)
    r = dataclasses.replace(r, deviations=devs)
    for width in (100, 72, 60):
        out = format_review(r, width=width)
        assert max(len(line) for line in out.splitlines()) <= width
    out = format_review(r, width=100)
    assert "Past use" in _header(out)
    assert "precedent set (12)" in out
    for row in _rows(out):
        v = next(v for v in r.deviations if v.rank == int(row.split()[0]))
        assert ("2/12" in row.split()) == (v.category == "substantive")
        if v.category == "term":
            assert " - " in row


# -- the terminal's width ----------------------------------------------------------------
#
# Outside reference: Python's shutil.get_terminal_size, documented to read the COLUMNS
# environment variable first, then the terminal of standard output, then the fallback.

LONG_REASON = ("interest on late payment changed from four per cent (4%) to two per cent (2%) "
               "a year above the base rate of the central bank of Ardence, calculated daily")


def _long_review():
    import dataclasses

    r = run_review(doc(DRAFT), doc(PRECEDENT))
    first = r.deviations[0]
    devs = (dataclasses.replace(first, reasons=(LONG_REASON, *first.reasons[1:])), *r.deviations[1:])
    return dataclasses.replace(r, deviations=devs), first.rank


def _row_block(out: str, rank: int) -> list[str]:
    """The lines of deviation *rank*: its numbered line and the continuation lines below."""
    lines = out.splitlines()
    start = next(i for i, line in enumerate(lines) if line[:4].strip() == str(rank))
    block = [lines[start]]
    for line in lines[start + 1:]:
        if line[:8].strip() or not line.strip():
            break
        block.append(line)
    return block


@pytest.mark.parametrize("columns", [80, 160])
def test_the_table_fills_the_width_columns_gives_and_wraps_long_wording(monkeypatch, columns):
    monkeypatch.setenv("COLUMNS", str(columns))
    assert terminal_width() == columns == shutil.get_terminal_size().columns
    r, rank = _long_review()
    out = format_review(r)  # no width given: the terminal's
    lines = out.splitlines()
    assert max(len(line) for line in lines) <= columns
    assert max(len(line) for line in lines) >= columns - 10  # the rule under the header fills it
    block = _row_block(out, rank)
    # the summary column starts where the header's "Summary" does; every wrapped line of the
    # reason sits in that column, and together they give the reason whole, uncut
    at = _header(out).index("Summary")
    text = " ".join(line[at:].strip() for line in block)
    assert text == LONG_REASON and "\u2026" not in text
    assert (len(block) > 1) == (len(LONG_REASON) > columns - at)


def test_cli_review_uses_columns(monkeypatch, tmp_path, capsys):
    from core.cli import main

    draft, precedent = tmp_path / "draft.txt", tmp_path / "precedent.txt"
    draft.write_text(DRAFT, encoding="utf-8")
    precedent.write_text(PRECEDENT, encoding="utf-8")
    widths = {}
    for columns in (80, 160):
        monkeypatch.setenv("COLUMNS", str(columns))
        assert main(["review", str(draft), "--against", str(precedent)]) == 0
        out = capsys.readouterr().out
        widths[columns] = max(len(line) for line in out.splitlines())
        assert widths[columns] <= columns
    assert widths[80] < widths[160]


def test_the_drafting_checks_follow_the_table():
    house = doc("""
        1. Definitions

        1.1 "Products" means the goods in the Order.

        2. Supply

        2.1 The Seller shall deliver the Products under clause 9.
    """)
    text = format_review(run_review(house, house), width=100)
    lines = text.splitlines()
    start = lines.index(next(line for line in lines if line.startswith("Drafting checks")))
    assert "1 reference to no provision" in lines[start]
    assert "2.1" in lines[start + 1] and "clause 9" in lines[start + 1]
    assert start < lines.index(next(line for line in lines if line.startswith("Counterdraft supports")))
    assert all(len(line) <= 100 for line in lines)
    assert "Drafting checks: none found" in format_review(run_review(doc("1. The Seller shall deliver."),
                                                                     doc("1. The Seller shall deliver.")))
