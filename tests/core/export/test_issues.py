"""The issues list (core.export.issues).

Outside references, named at each check:
* the standard library's ``csv`` module reads the CSV back, ``html.parser`` the page, and
  python-docx the Word table; the three must give the same seven columns and rows;
* python-docx also reads the demo draft's paragraphs: the clause order of the rows is the
  order in which their provisions appear in the draft;
* LibreOffice headless (Debian's libreoffice-writer, through UNO: tests/support/lo_uno.py)
  lays the Word table out, converts it to PDF and reads its header words;
* ECMA-376 Part 1 §17.4 (tables) and §17.13 (our structural validator) for the .docx.
"""

from __future__ import annotations

import csv
import dataclasses
import json
import re
from html.parser import HTMLParser

import docx
import pytest

from core import CAUTION
from core.decisions import Decision
from core.docx.validate import validate_docx
from core.export import (
    CHANGE_CONTEXT_WORDS,
    CHANGE_MAX_WORDS,
    ISSUE_COLUMNS,
    ISSUE_CSV_COLUMNS,
    issue_rows,
    write_issues_list,
)
from core.model import CATEGORIES, Frequency
from tests.core.export.conftest import AUTHOR, DEMO
from tests.core.export.conftest import made_deviation as _made_deviation
from tests.support.lo_session import libreoffice

FREQ = "Past use"
#: The table's columns without the frequency column (no precedent set used).
#: The table of a review acting for no party (no "Direction" column), with and without the
#: precedent set's "Past use" column.
COLS = tuple(c for c in ISSUE_COLUMNS if c != "Direction")
NO_FREQ_COLUMNS = tuple(c for c in COLS if c != FREQ)


class _TableReader(HTMLParser):
    """The page's table as the standard library's html.parser reads it: cell text (a <br>
    as a line break), the bold words of each cell, and the paragraphs.  The drafting
    checks' table, after it, is read into ``check_rows``."""

    def __init__(self) -> None:
        super().__init__()
        self.rows: list[list[str]] = []
        self.check_rows: list[list[str]] = []
        self._tables = 0
        #: The bold (<strong>) words of each cell, row by row.
        self.strong: list[list[list[str]]] = []
        self.paragraphs: list[str] = []
        self.tags: list[str] = []
        self.style = ""
        self._cell: list[str] | None = None
        self._strong: list[str] | None = None
        self._p: list[str] | None = None
        self._in_style = False
        self.external: list[str] = []
        #: (class attribute, text) of every <strong>: the side its wash marks.
        self.strong_sides: list[tuple[str, str]] = []
        self._strong_class = ""

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        if tag == "table":
            self._tables += 1
            if self._tables == 2:  # the checks' table: its rows apart from the issues'
                self.rows, self.check_rows = self.check_rows, self.rows
        if tag == "tr":
            self.rows.append([])
            self.strong.append([])
        elif tag in ("td", "th"):
            self._cell = []
            self.strong[-1].append([])
        elif tag == "br" and self._cell is not None:
            self._cell.append("\n")
        elif tag == "strong" and self._cell is not None:
            self._strong = []
            self._strong_class = dict(attrs).get("class") or ""
        elif tag == "p":
            self._p = []
        elif tag == "style":
            self._in_style = True
        for name, value in attrs:
            if name in ("src", "href") and value:
                self.external.append(value)

    def handle_endtag(self, tag):
        if tag == "table" and self._tables == 2:
            self.rows, self.check_rows = self.check_rows, self.rows
        if tag in ("td", "th") and self._cell is not None:
            self.rows[-1].append("".join(self._cell))
            self._cell = None
        elif tag == "strong" and self._strong is not None:
            self.strong[-1][-1].append("".join(self._strong))
            self.strong_sides.append((self._strong_class, "".join(self._strong)))
            self._strong = None
        elif tag == "p" and self._p is not None:
            self.paragraphs.append("".join(self._p))
            self._p = None
        elif tag == "style":
            self._in_style = False

    def handle_data(self, data):
        if self._cell is not None:
            self._cell.append(data)
        if self._strong is not None:
            self._strong.append(data)
        if self._p is not None:
            self._p.append(data)
        if self._in_style:
            self.style += data


def _read_csv(path) -> list[list[str]]:
    with open(path, newline="", encoding="utf-8-sig") as fh:
        return list(csv.reader(fh))  # the standard library's csv module


def _issue_records(path) -> list[list[str]]:
    """The CSV's rows of deviations: after the header, the rows with a number (the
    drafting checks follow them without one)."""
    return [r for r in _read_csv(path)[1:] if r[0]]


def _read_html(path) -> _TableReader:
    parser = _TableReader()
    parser.feed(path.read_text(encoding="utf-8"))  # the standard library's html.parser
    return parser


def _read_docx_table(path) -> list[list[str]]:
    table = docx.Document(str(path)).tables[0]  # python-docx reads the issues table back (the checks follow)
    return [[c.text for c in row.cells] for row in table.rows]


def _with_frequency(review):
    devs = tuple(dataclasses.replace(d, frequency=Frequency(same_type=10, matching=3, total=12))
                 if d.id == "v1" else d for d in review.deviations)
    return dataclasses.replace(review, deviations=devs)


# --------------------------------------------------------------------------------------
# Three formats, one table
# --------------------------------------------------------------------------------------


def test_issues_list_in_three_formats_reads_back_as_one_table(scenario, tmp_path):
    review = _with_frequency(scenario.review)
    decisions = [Decision("v1", "revert", note="Thirty days is our floor."),
                 Decision("v4", "amend", text="Set-off only for undisputed sums.", note="Compromise."),
                 Decision("v6", "accept")]

    csv_path = tmp_path / "issues.csv"
    write_issues_list(review, csv_path, decisions=decisions)
    assert csv_path.read_bytes().startswith(b"\xef\xbb\xbf")  # UTF-8 byte-order mark for spreadsheets
    records = _read_csv(csv_path)
    # A clean table: the header row first, then one row per issue, and nothing else (the
    # caution is printed by the command line; it is no data row).
    # (a review acting for no party: no "Direction" column)
    assert tuple(records[0]) == tuple(c for c in ISSUE_CSV_COLUMNS if c != "Direction")
    assert ISSUE_CSV_COLUMNS[:8] == ISSUE_COLUMNS == (
        "No.", "Clause", "Direction", "What changed", "Why it matters", "Past use", "Decision", "Note")
    assert ISSUE_CSV_COLUMNS[8:] == ("Precedent's changed words", "Draft's changed words")
    assert all(len(r) == len(ISSUE_CSV_COLUMNS) - 1 for r in records)
    assert CAUTION not in csv_path.read_text(encoding="utf-8-sig")
    rows = {r[0]: dict(zip(records[0], r)) for r in records[1:]}
    # The number is the rank (handmade.py: v1 rank 1 ... v6 rank 6); the internal ids never show.
    assert sorted(rows) == ["1", "2", "3", "4", "5", "6"]
    assert not any(f"v{i}" in cell.split() for r in records for cell in r for i in range(1, 8))
    # What changed: the precedent's words, then the draft's, a few words of the scenario's own
    # sentence either side (handmade.py: "The Customer shall pay each invoice within thirty
    # (30) days of receipt.").
    pay = rows["1"]
    assert pay["Clause"] == "2.1 Payment"
    assert pay["What changed"] == ("\u201c\u2026 each invoice within thirty (30) days of receipt.\u201d\n"
                                   "\u2192 \u201c\u2026 each invoice within sixty (60) days of receipt.\u201d")
    assert (pay["Precedent's changed words"], pay["Draft's changed words"]) == ("thirty (30)", "sixty (60)")
    assert pay["Why it matters"] == "Payment period changed from 30 to 60 days"
    assert pay["Past use"] == "in 3 of 10 past agreements with such a clause"
    assert (pay["Decision"], pay["Note"]) == ("revert", "Thirty days is our floor.")
    # Added and removed provisions, and the renamed defined term, in words.
    assert rows["4"]["What changed"] == ("Provision added: \u201cThe Client may set off any amount the "
                                         "Supplier owes it.\u201d")
    assert rows["4"]["Draft's changed words"] == "The Client may set off any amount the Supplier owes it."
    assert rows["4"]["Decision"] == "amend: Set-off only for undisputed sums."
    assert rows["3"]["What changed"] == ("Provision left out: \u201cThe Supplier shall keep complete "
                                         "records for six years.\u201d")
    assert rows["3"]["Clause"] == "3.1 Audit (precedent only)"
    assert rows["6"]["What changed"] == ("Defined term \u201cCustomer\u201d\n"
                                         "\u2192 \u201cClient\u201d (3 uses in the draft)")
    assert rows["6"]["Why it matters"] == "Read as the same defined term (evidence: definition; confidence 0.95)"
    assert rows["2"]["Decision"] == "undecided" and rows["2"]["Past use"] == ""
    table_rows = [r[:len(COLS)] for r in records[1:]]

    html_path = tmp_path / "issues.html"
    write_issues_list(review, html_path, decisions=decisions)
    page = _read_html(html_path)
    assert CAUTION in page.paragraphs
    assert page.external == []  # self-contained: no linked resource
    assert tuple(page.rows[0]) == COLS
    assert page.rows[1:] == table_rows
    # The changed words are bold (<strong>), nothing else.
    what = COLS.index("What changed")
    assert page.strong[1][what] == ["thirty (30)", "sixty (60)"]
    assert [cell for i, cell in enumerate(page.strong[1]) if i != what] == [[]] * (len(COLS) - 1)
    # ... washed by side: the precedent's words before the arrow, the draft's after it, each
    # with its own background in the page's style sheet (the window's two washes).
    assert ("was", "thirty (30)") in page.strong_sides and ("now", "sixty (60)") in page.strong_sides
    assert ("was", "Customer") in page.strong_sides and ("now", "Client") in page.strong_sides
    assert {side for side, _ in page.strong_sides} == {"was", "now"}
    assert re.search(r"strong\.was \{ background: #[0-9a-f]{6}; \}", page.style)
    assert re.search(r"strong\.now \{ background: #[0-9a-f]{6}; \}", page.style)
    # The figure is explained once, in a note under the table.
    assert sum(p.startswith("Past use: of the firm's 12 past agreements") for p in page.paragraphs) == 1

    docx_path = tmp_path / "issues.docx"
    write_issues_list(review, docx_path, decisions=decisions, author=AUTHOR)
    assert validate_docx(docx_path) == []
    cells = _read_docx_table(docx_path)
    assert tuple(cells[0]) == COLS
    assert cells[1:] == table_rows
    document = docx.Document(str(docx_path))
    bold = [[r.text for p in c.paragraphs for r in p.runs if r.bold] for c in document.tables[0].rows[1].cells]
    assert bold[what] == ["thirty (30)", "sixty (60)"]
    assert CAUTION in [p.text for p in document.paragraphs]
    assert sum(p.text.startswith("Past use: of the firm's 12") for p in document.paragraphs) == 1
    view = libreoffice().inspect(docx_path, pdf=tmp_path / "issues.pdf")
    assert view.pdf_bytes and view.pdf_bytes > 1000


def test_frequency_column_only_when_a_precedent_set_was_used(scenario, tmp_path):
    for name in ("issues.csv", "issues.html", "issues.docx"):
        write_issues_list(scenario.review, tmp_path / name, author=AUTHOR)
    assert _read_csv(tmp_path / "issues.csv")[0] == [c for c in ISSUE_CSV_COLUMNS if c not in (FREQ, "Direction")]
    assert tuple(_read_html(tmp_path / "issues.html").rows[0]) == NO_FREQ_COLUMNS
    assert tuple(_read_docx_table(tmp_path / "issues.docx")[0]) == NO_FREQ_COLUMNS
    page = _read_html(tmp_path / "issues.html")
    assert not any(p.startswith("Past use") for p in page.paragraphs)


# --------------------------------------------------------------------------------------
# Order: the draft's clauses, or the rank
# --------------------------------------------------------------------------------------


def test_clause_order_and_rank_order_on_the_hand_made_scenario(scenario, tmp_path):
    """handmade.py's draft reads 1.1 (renamed term), 2.1 (payment), 2.3 (set-off, added),
    3 Notices (moved up), 4.1 (liability); the precedent's 3 Audit / 3.1, which the draft
    left out, came after 2.2, the last clause both share before it."""
    review = scenario.review
    by_clause = issue_rows(review, include=CATEGORIES)  # the default order
    assert [r.ref for r in by_clause] == ["v1", "v4", "v5", "v3", "v7", "v2", "v6"]
    assert [r.clause for r in by_clause] == [
        "2.1 Payment", "2.3 Payment", "3 Audit (precedent only)", "3.1 Audit (precedent only)",
        "3 Notices (precedent 5)", "4.1 Liability", "Defined terms"]
    by_rank = issue_rows(review, include=CATEGORIES, order="rank")
    # By rank, the renamed defined term still closes the table as its own group.
    assert [r.number for r in by_rank] == [1, 2, 3, 4, 5, 7, 6]
    assert sorted(by_rank, key=lambda r: r.ref) == sorted(by_clause, key=lambda r: r.ref)
    # Each deviation keeps its number whatever the order.
    assert {r.ref: r.number for r in by_clause} == {d.id: d.rank for d in review.deviations}

    for order, expected in (("clause", [1, 4, 5, 3, 2, 6]), ("rank", [1, 2, 3, 4, 5, 6])):
        for name in ("issues.csv", "issues.html", "issues.docx"):
            write_issues_list(review, tmp_path / name, order=order, author=AUTHOR)
        assert [int(r[0]) for r in _issue_records(tmp_path / "issues.csv")] == expected
        assert [int(r[0]) for r in _read_html(tmp_path / "issues.html").rows[1:]] == expected
        assert [int(r[0]) for r in _read_docx_table(tmp_path / "issues.docx")[1:]] == expected
        page = _read_html(tmp_path / "issues.html")
        assert any(p.startswith("Rows follow the order of the draft's clauses" if order == "clause"
                                else "Rows are in order of severity") for p in page.paragraphs)
    with pytest.raises(ValueError, match="unknown order"):
        issue_rows(review, order="alphabetical")
    with pytest.raises(ValueError, match="unknown order"):
        write_issues_list(review, tmp_path / "never.csv", order="alphabetical")
    assert not (tmp_path / "never.csv").exists()


def test_clause_order_breaks_ties_by_rank():
    """Two deviations at the same words of one provision: the higher-ranked first; within a
    provision, words in the order of the text."""
    text = "The Vendor shall deliver the Goods within ten (10) days of the order."
    a, b = text.index("ten (10)"), text.index("order")
    devs = [dataclasses.replace(_made_deviation("v1", "replace", "p1", "p1", "x", "y", (a, a + 8), (a, a + 8)), rank=3),
            dataclasses.replace(_made_deviation("v2", "replace", "p1", "p1", "x", "y", (a, a + 8), (a, a + 8)), rank=1),
            dataclasses.replace(_made_deviation("v3", "replace", "p1", "p1", "x", "y", (b, b + 5), (b, b + 5)), rank=2)]
    review = _hand_review(text, text, devs)
    assert [r.ref for r in issue_rows(review)] == ["v2", "v1", "v3"]
    assert [r.ref for r in issue_rows(review, order="rank")] == ["v2", "v3", "v1"]


def _paragraph_index(paragraphs: list[str], text: str) -> int:
    """The first python-docx paragraph of the draft holding the start of *text*."""
    probe = " ".join(text.split()[:6])
    return next(i for i, p in enumerate(paragraphs) if probe in " ".join(p.split()))


def test_demo_rows_follow_the_drafts_clauses_and_carry_the_review_tables_numbers(tmp_path, capsys):
    from core.cli import main
    from core.labels import clause_label

    review_file = tmp_path / "r.json"
    assert main(["review", str(DEMO / "draft.docx"), "--against", str(DEMO / "precedent.docx"),
                 "--save", str(review_file)]) == 0
    table = capsys.readouterr().out
    # The review table's rows: "No. Sev  Clause ... Summary" (core.review.report).
    cli = {int(m.group(1)): line for line in table.splitlines()
           if (m := re.match(r" *(\d+) +\d+  \S", line))}
    by_clause, by_rank = tmp_path / "clause.csv", tmp_path / "rank.csv"
    assert main(["export", str(review_file), "--issues-list", str(by_clause)]) == 0
    assert main(["export", str(review_file), "--issues-list", str(by_rank), "--order", "rank"]) == 0
    err = capsys.readouterr().err
    assert CAUTION in err  # the command line shows the caution when it writes the CSV
    clause_rows, rank_rows = _issue_records(by_clause), _issue_records(by_rank)

    # Both orders list the same deviations the review table shows by default (substantive
    # and renamed terms), under the same numbers.
    numbers = sorted(int(r[0]) for r in clause_rows)
    assert numbers == sorted(cli) == sorted(int(r[0]) for r in rank_rows)
    saved = json.loads(review_file.read_text(encoding="utf-8"))["deviations"]
    by_number = {d["rank"]: d for d in saved}
    record_review = _reopened(review_file)
    devs = {d.id: d for d in record_review.deviations}
    for r in clause_rows:
        dev = devs[by_number[int(r[0])]["id"]]
        # the same clause in the review table's row of that number (compact label, cut)
        assert clause_label(record_review, dev, compact=True)[:12] in cli[int(r[0])]
        assert r[1] == clause_label(record_review, dev)

    # By rank: ascending numbers, the renamed terms as the last group.
    terms = [int(r[0]) for r in rank_rows if r[2].startswith("Defined term")]
    others = [int(r[0]) for r in rank_rows if not r[2].startswith("Defined term")]
    assert [int(r[0]) for r in rank_rows] == others + terms
    assert others == sorted(others) and terms == sorted(terms) and len(terms) == 6

    # By clause: the order in which python-docx (an outside reader) meets each row's draft
    # provision in the draft; a provision only the precedent has sits before the next
    # provision both documents share.
    paragraphs = [p.text for p in docx.Document(str(DEMO / "draft.docx")).paragraphs]
    seen = []
    for r in clause_rows:
        dev = devs[by_number[int(r[0])]["id"]]
        if dev.category == "term" or dev.draft_provision is None:
            continue
        prov = record_review.draft.provision(dev.draft_provision)
        seen.append(_paragraph_index(paragraphs, prov.text or prov.heading or ""))
    assert len(seen) > 20 and seen == sorted(seen)
    left_out = [r for r in clause_rows if r[1].endswith("(precedent only)")]
    assert [r[1] for r in left_out] == [
        "25 Non-Solicitation (precedent only)",
        "signature \u201cThis Agreement has been entered into \u2026\u201d (precedent only)"]
    labels = [r[1] for r in clause_rows]
    i = labels.index("25 Non-Solicitation (precedent only)")
    assert labels[i - 1].startswith("Section 24.1 Assignment") and labels[i + 1].startswith("Article 26 Publicity")


def _reopened(review_file):
    from core.decisions import load_review_file

    return load_review_file(review_file).review


# --------------------------------------------------------------------------------------
# What changed, why it matters, how common
# --------------------------------------------------------------------------------------


def _prov(pid, text, number="1", heading=None):
    from core.model import Provision

    return Provision(id=pid, kind="clause", number=number, heading=heading, level=1, parent=None, text=text)


def _hand_review(draft_text, precedent_text, deviations):
    from core.model import Document, Pair, Review

    draft = Document(source="draft.docx", provisions=(_prov("p1", draft_text, heading="Liability"),), terms=())
    prec = Document(source="precedent.docx", provisions=(_prov("p1", precedent_text, heading="Liability"),), terms=())
    return Review(draft=draft, precedent=prec, term_map=(),
                  pairs=(Pair(draft="p1", precedent="p1", status="changed", similarity=0.9),),
                  deviations=tuple(deviations))


def _words(text: str) -> list[str]:
    """The words of *text*: tokens with a letter or digit (not "…", "→" or a lone quote)."""
    return [x for x in text.split() if any(ch.isalnum() for ch in x)]


def _sides(row) -> tuple[str, str]:
    old, new = row.what_changed.split("\n")
    return old, new.removeprefix("\u2192 ")


def _marked(row) -> list[str]:
    return [row.what_changed[a:b] for a, b in row.what_changed_marks]


def test_what_changed_quotes_the_changed_words_with_a_few_words_around_them():
    cap = ("The Vendor\u2019s total liability to the Client, whether in contract, tort (including "
           "negligence), breach of statutory duty or otherwise, arising under or in connection with "
           "this Agreement in any Contract Year shall not exceed {} of the Prices paid or "
           "payable by the Client in that Contract Year.")
    tail = "This cap does not apply to fraud, e.g. deceit by a director of the Vendor."
    draft = f"Words of art apply here. {cap.format('two hundred per cent (200%)')} {tail}"
    prec_tail = tail.replace("fraud", "fraud or death")
    prec = f"Words of art apply here. {cap.format('one hundred per cent (100%)')} {prec_tail}"
    # The engine's spans can stop inside a token ("(200" of "(200%)"); the mark covers it whole.
    d1, p1 = draft.index("two hundred"), prec.index("one hundred")
    dev = _made_deviation("v1", "replace", "p1", "p1", "one hundred per cent (100%)",
                          "two hundred per cent (200%)", (p1, prec.index("(100") + 4),
                          (d1, draft.index("(200") + 4))
    # The draft took "or death" out: an empty draft span at the place the words were.
    cut = _made_deviation("v2", "delete", "p1", "p1", "fraud or death", "fraud",
                          (prec.index(" or death"), prec.index(" or death") + 9), (draft.index("fraud") + 5,) * 2)
    by_ref = {r.ref: r for r in issue_rows(_hand_review(draft, prec, [dev, cut]))}

    row = by_ref["v1"]
    old, new = _sides(row)
    assert old == "\u201c\u2026 shall not exceed one hundred per cent (100%) of the Prices \u2026\u201d"
    assert new == "\u201c\u2026 shall not exceed two hundred per cent (200%) of the Prices \u2026\u201d"
    assert _marked(row) == ["one hundred per cent (100%)", "two hundred per cent (200%)"]
    for side in (old, new):  # the changed words and CHANGE_CONTEXT_WORDS either side
        assert len(_words(side)) == 5 + 2 * CHANGE_CONTEXT_WORDS
    assert (row.precedent_words, row.draft_words) == ("one hundred per cent (100%)", "two hundred per cent (200%)")

    row = by_ref["v2"]
    old, new = _sides(row)
    # Words taken out: the precedent's quote marks them, the draft's shows where they were;
    # a quote stays inside its sentence ("e.g." does not end it).
    assert old == "\u201c\u2026 apply to fraud or death, e.g. deceit by \u2026\u201d"
    assert new == "\u201c\u2026 not apply to fraud, e.g. deceit by \u2026\u201d"
    assert _marked(row) == ["or death"]
    assert (row.precedent_words, row.draft_words) == ("or death", "")


def test_long_changes_and_added_provisions_are_cut_with_an_ellipsis():
    from core.model import Document, Pair, Review

    first = "The Vendor shall pay service credits for each complete week of delay in Delivery."
    second = " ".join(["Credits accrue weekly."] * 30)
    draft = Document(source="d.docx", provisions=(_prov("p1", f"{first} {second}"),), terms=())
    prec = Document(source="p.docx", provisions=(), terms=())
    dev = _made_deviation("v1", "add-provision", "p1", None, "", draft.provisions[0].text, None, None,
                          part="provision")
    review = Review(draft=draft, precedent=prec, term_map=(),
                    pairs=(Pair(draft="p1", precedent=None, status="added", similarity=0.0),), deviations=(dev,))
    (row,) = issue_rows(review)
    assert row.what_changed.startswith(f"Provision added: \u201c{first} ") and row.what_changed.endswith("\u2026\u201d")
    assert len(_words(row.what_changed)) <= CHANGE_MAX_WORDS + 2
    assert row.draft_words == draft.provisions[0].text  # the whole new wording, for the CSV

    # Inserted words longer than CHANGE_MAX_WORDS: the first ones, then "…".
    long_words = " ".join(f"word{i}" for i in range(40))
    text = f"The Client may assign this Agreement, save that {long_words}."
    base = "The Client may assign this Agreement."
    at = text.index(", save")
    dev = _made_deviation("v1", "insert", "p1", "p1", "", text[at:-1], (base.index("."),) * 2, (at, len(text) - 1))
    (row,) = issue_rows(_hand_review(text, base, [dev]))
    old, new = _sides(row)
    # the insertion point falls inside "Agreement." (before its full stop): that word and
    # three before it
    assert old == "\u201c\u2026 may assign this Agreement.\u201d"
    # the engine's span starts at the comma, which "Agreement," carries: that word counts
    assert new.endswith("word16 \u2026\u201d") and _marked(row) == [text[at:text.index(" word17")]]
    assert len(text[text.index("Agreement,"):text.index(" word17")].split()) == CHANGE_MAX_WORDS
    assert row.draft_words == text[at:-1]  # every inserted word, for the CSV


def test_how_common_reads_in_words_with_the_firms_label_and_is_explained_once(scenario, tmp_path):
    from core.library.frequency import frequency_reasons

    f = {"v1": Frequency(same_type=10, matching=3, total=12, position="house wording"),
         "v2": Frequency(same_type=0, matching=0, total=12),
         "v3": Frequency(same_type=9, matching=2, total=12),  # a provision the draft left out
         "v4": Frequency(same_type=9, matching=0, total=12),
         "v5": Frequency(same_type=9, matching=0, total=12),
         "v6": Frequency(same_type=4, matching=1, total=12)}  # the renamed term
    devs = tuple(dataclasses.replace(d, frequency=f[d.id], reasons=(*d.reasons, *frequency_reasons(f[d.id])))
                 if d.id in f else d for d in scenario.review.deviations)
    review = dataclasses.replace(scenario.review, deviations=devs)
    by_ref = {r.ref: r for r in issue_rows(review)}
    assert by_ref["v1"].frequency == "in 3 of 10 past agreements with such a clause; firm's stance: house wording"
    assert by_ref["v2"].frequency == "none of the 12 past agreements has such a clause"
    assert by_ref["v3"].frequency == "absent from 2 of the 12 past agreements"
    assert by_ref["v5"].frequency == "present in all 12 past agreements"
    assert by_ref["v4"].frequency == "in none of the 9 past agreements with such a clause"
    assert by_ref["v6"].frequency == "the draft's name in 1 of 4 past agreements that define the term"
    # "Why it matters" does not repeat the figures the column gives.
    assert by_ref["v1"].why == "Payment period changed from 30 to 60 days"
    assert "past agreement" not in " ".join(r.why for r in by_ref.values())
    path = tmp_path / "issues.html"
    write_issues_list(review, path)
    page = _read_html(path)
    (note,) = [p for p in page.paragraphs if p.startswith("Past use")]
    assert "of the firm's 12 past agreements in the precedent set" in note and "house wording" in note
    col = COLS.index(FREQ)
    assert page.rows[1][col] == by_ref["v1"].frequency  # v1 is the first clause


def test_why_it_matters_leaves_out_the_rule_files_weights():
    from core.review.severity import is_weight_reason

    text = "The Client shall pay within sixty (60) days."
    a = text.index("sixty")
    dev = dataclasses.replace(
        _made_deviation("v1", "replace", "p1", "p1", "thirty (30)", "sixty (60)", (a, a + 10), (a, a + 10)),
        reasons=("period changed from 30 to 60 days (longer)", "clause type: payment (weight 1.2)"))
    (row,) = issue_rows(_hand_review(text, text.replace("sixty (60)", "thirty (30)"), [dev]))
    assert row.why == "Period changed from 30 to 60 days (longer)"
    assert is_weight_reason("parties provision (weight 0.6)")
    assert not is_weight_reason("period changed from 30 to 60 days (longer)")


# --------------------------------------------------------------------------------------
# Which rows, and the page
# --------------------------------------------------------------------------------------


def test_issues_list_shows_what_a_negotiator_needs_unless_asked_for_all(scenario, tmp_path):
    review = scenario.review  # v1-v5 substantive, v6 a renamed term, v7 a moved clause (numbering)
    assert sorted(r.ref for r in issue_rows(review)) == ["v1", "v2", "v3", "v4", "v5", "v6"]
    # Everything when asked, the renamed terms still last as their own group.
    rows = issue_rows(review, include=CATEGORIES)
    assert sorted(r.ref for r in rows) == ["v1", "v2", "v3", "v4", "v5", "v6", "v7"]
    assert [r.category for r in rows][-1] == "term"
    # A decided deviation is listed whatever its category.
    assert "v7" in [r.ref for r in issue_rows(review, [Decision("v7", "accept", note="fine")],
                                              include=("substantive",))]
    assert "v6" not in [r.ref for r in issue_rows(review, include=("substantive",))]
    with pytest.raises(ValueError, match="unknown deviation categories"):
        issue_rows(review, include=("substantive", "cosmetic"))
    with pytest.raises(ValueError):
        write_issues_list(review, tmp_path / "x.csv", include=("cosmetic",))
    assert not (tmp_path / "x.csv").exists()

    # The page and the Word table say what was left out, and set the terms apart.
    html_path, docx_path = tmp_path / "issues.html", tmp_path / "issues.docx"
    write_issues_list(review, html_path)
    write_issues_list(review, docx_path, author=AUTHOR)
    page = html_path.read_text(encoding="utf-8")
    parser = _read_html(html_path)
    assert any(p.startswith("Left out: 1 difference of formatting") for p in parser.paragraphs)
    assert page.count('<tbody class="terms">') == 1
    assert page.index('<tbody class="terms">') < page.index("Defined term \u201c")
    from tests.core.docx.test_writer import table_geometry

    (t,) = table_geometry(docx_path.read_bytes())["tables"]
    assert [r["top_rule"][0] for r in t["rows"]] == [False] * 6 + [True]  # above the term only
    document = docx.Document(str(docx_path))
    assert any(p.text.startswith("Left out: 1 difference") for p in document.paragraphs)
    write_issues_list(review, html_path, include=CATEGORIES)
    assert "Left out" not in html_path.read_text(encoding="utf-8")


def test_issues_list_page_prints_on_a4_landscape_and_is_self_contained(scenario, tmp_path):
    path = tmp_path / "issues.html"
    write_issues_list(_with_frequency(scenario.review), path)
    parser = _read_html(path)  # the standard library's html.parser
    css = " ".join(parser.style.split())
    # Printing (CSS Paged Media and CSS Fragmentation, W3C): A4 landscape pages, the header
    # row repeated on each page, no row split across pages.
    assert "@page { size: A4 landscape;" in css
    assert "thead { display: table-header-group; }" in css and "thead" in parser.tags
    assert "tr { break-inside: avoid; page-break-inside: avoid; }" in css
    # Self-contained: no linked file, script, font or image; the caution under the title.
    assert parser.external == [] and "url(" not in css and "@import" not in css
    assert not {"script", "link", "img", "iframe", "object"} & set(parser.tags)
    assert CAUTION in parser.paragraphs[:3]


# --------------------------------------------------------------------------------------
# Tables across the page
# --------------------------------------------------------------------------------------

#: Twips per centimetre (1 twip = 1/1440 inch; 1 inch = 2.54 cm).
TWIPS_PER_CM = 1440 / 2.54
#: The longest word each narrow column must hold on one line, in cm, plus the cell margins
#: (2 x 108 twips = 0.38 cm, the table style's w:tblCellMar): measured in LibreOffice's PDF
#: of the demo's tables with pdftotext -bbox (DejaVu Serif 9 pt, the font LibreOffice
#: substitutes when Liberation Serif is missing; bold in the header): bold "No." 0.61 cm,
#: plain "undecided" 1.67 cm, "agreements" 1.90 cm, "Confidentiality" 2.37 cm.
_CELL_MARGINS_CM = 2 * 108 / TWIPS_PER_CM
ISSUES_MIN_CM = {"No.": 0.61, "Decision": 1.67, FREQ: 1.90, "Clause": 2.37}
REDLINE_MIN_CM = {"Rank": 0.92, "Severity": 1.44}


def test_demo_issues_list_and_redline_tables_span_the_page(tmp_path):
    """The issues list's table covers the landscape page and its narrow columns hold their
    longest words; the redline's opening table too.  Read the tables back (ECMA-376 Part 1
    §17.4) and let LibreOffice lay them out and convert them to PDF."""
    from core.export import issues_list_docx, redline_bytes
    from core.reader import read_document
    from core.review import run_review
    from tests.core.docx.test_writer import _check_full_width_table, table_geometry

    review = run_review(read_document(str(DEMO / "draft.docx")), read_document(str(DEMO / "precedent.docx")))
    review = dataclasses.replace(review, deviations=tuple(
        dataclasses.replace(d, frequency=Frequency(same_type=12, matching=1, total=12)) for d in review.deviations))
    rows = issue_rows(review)
    # Every quote is bounded: the changed words (at most CHANGE_MAX_WORDS) and a few words
    # either side; every marked stretch is the start of that side's exact changed words.
    checked = 0
    for r in rows:
        assert len(_words(r.what_changed)) <= 2 * (CHANGE_MAX_WORDS + 2 * CHANGE_CONTEXT_WORDS) + 4, r.ref
        for marked in _marked(r):
            if r.category != "term" and not r.what_changed.startswith("Heading"):
                sides = (r.precedent_words, r.draft_words)
                assert any(" ".join(w.split()).startswith(marked) for w in sides), (r.ref, marked)
                checked += 1
    assert checked > 20
    office = libreoffice()
    for name, data, columns, minimum, landscape in (
            ("issues.docx", issues_list_docx(review, author=AUTHOR), COLS, ISSUES_MIN_CM, True),
            # the full view opens with the ranked table (the substantive view puts the renamed
            # terms first: tests/core/export/test_redline.py checks both of its tables)
            ("redline.docx", redline_bytes(review, author=AUTHOR, show="all"),
             ("Rank", "Severity", "Clause", "Deviation"), REDLINE_MIN_CM, False)):
        path = tmp_path / name
        path.write_bytes(data)
        assert validate_docx(path) == []
        g = table_geometry(data)
        assert (g["orient"] == "landscape") == landscape
        t = g["tables"][0]
        _check_full_width_table(t, g["text_width"])
        cm = {c: x / TWIPS_PER_CM for c, x in zip(columns, t["grid"])}
        for column, word_cm in minimum.items():
            assert cm[column] >= word_cm + _CELL_MARGINS_CM, (name, column, cm[column])
        if name == "issues.docx":  # what changed gets the most room, why it matters the next
            rest = [x for c, x in cm.items() if c not in ("What changed", "Why it matters")]
            assert cm["What changed"] > cm["Why it matters"] > max(rest)
        again = tmp_path / f"lo-{name}"
        view = office.inspect(path, save_as=again, pdf=tmp_path / f"{name}.pdf")
        assert view.pdf_bytes and view.pdf_bytes > 10_000
        lo = table_geometry(again.read_bytes())["tables"][0]
        assert abs(lo["tblW"][0] - g["text_width"]) <= 5
        assert all(abs(a - b) <= 5 for a, b in zip(lo["grid"], t["grid"]))
        assert lo["rows"][0]["header"] and all(r["cant_split"] for r in lo["rows"])
        (table,) = [el for el in view.body if el["type"] == "table"][:1]
        assert table["rows"][0] == list(columns)  # LibreOffice reads the header words whole


def test_export_lists_every_difference_with_issues_all(scenario, tmp_path, capsys):
    from core.cli import main

    review_file = tmp_path / "r.json"
    assert main(["review", str(scenario.draft_path), "--against", str(scenario.precedent_path),
                 "--save", str(review_file)]) == 0
    deviations = json.loads(review_file.read_text(encoding="utf-8"))["deviations"]
    short, full = tmp_path / "short.csv", tmp_path / "full.csv"
    assert main(["export", str(review_file), "--issues-list", str(short)]) == 0
    assert main(["export", str(review_file), "--issues-list", str(full), "--issues-all"]) == 0
    capsys.readouterr()
    numbers = {p: [int(r[0]) for r in _issue_records(p)] for p in (short, full)}
    assert sorted(numbers[full]) == sorted(d["rank"] for d in deviations)
    assert sorted(numbers[short]) == sorted(d["rank"] for d in deviations
                                            if d["category"] in ("substantive", "term"))
    assert len(numbers[short]) < len(numbers[full])


def test_direction_column_only_when_acting_for_a_party(scenario, tmp_path):
    """A review acting for a party shows each deviation's direction in its own column (CSV,
    HTML, .docx) and explains it under the table; without one the column is left out."""
    from core.review import run_review

    review = run_review(scenario.review.draft, scenario.review.precedent, acting_for="Customer")
    for name in ("issues.csv", "issues.html", "issues.docx"):
        write_issues_list(review, tmp_path / name, author=AUTHOR)
    records = _read_csv(tmp_path / "issues.csv")
    assert "Direction" in records[0]
    rows = [dict(zip(records[0], r)) for r in records[1:]]
    by_number = {d.rank: d.direction for d in review.deviations}
    assert all(r["Direction"] == by_number[int(r["No."])] for r in rows)
    pay = next(r for r in rows if "sixty (60)" in r["Draft's changed words"])
    assert pay["Direction"] == "favourable"  # more time for the Customer to pay
    page = _read_html(tmp_path / "issues.html")
    assert "Direction" in page.rows[0]
    assert any(p.startswith("Direction: for the Customer, the party acted for") for p in page.paragraphs)
    table = docx.Document(str(tmp_path / "issues.docx")).tables[0]
    assert "Direction" in [c.text for c in table.rows[0].cells]



def test_the_drafting_checks_follow_the_issues(tmp_path):
    """The drafting checks of the review close each issues list: a table of their own in
    the page (html.parser) and the .docx (python-docx), rows without a number in the CSV
    (csv module).  The demo draft's check: the changed definition of "Warranty Period"."""
    from core.reader import read_document
    from core.review import run_review

    review = run_review(read_document(str(DEMO / "draft.docx")), read_document(str(DEMO / "precedent.docx")))
    assert [c.term for c in review.checks] == ["Warranty Period"]
    for name in ("issues.csv", "issues.html", "issues.docx"):
        write_issues_list(review, tmp_path / name, author=AUTHOR)
    page = _read_html(tmp_path / "issues.html")
    assert page.check_rows[0] == ["Check", "Clause", "Words", "What the check found"]
    (row,) = page.check_rows[1:]
    assert row[0] == "Definition changed" and row[1].startswith("Section 13.1")
    assert "twenty-four (24) months" in row[2] and "Used in: Section 13.2" in row[3]
    tables = docx.Document(str(tmp_path / "issues.docx")).tables
    assert [c.text for c in tables[1].rows[1].cells] == row
    extra = [r for r in _read_csv(tmp_path / "issues.csv")[1:] if not r[0]]
    (csv_row,) = extra
    assert csv_row[1] == row[1] and csv_row[3].startswith("Definition changed: ")
