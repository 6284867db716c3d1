"""The issues list (core.export.issues).

Outside references, named at each check:
* LibreOffice headless (Debian's libreoffice-writer, through UNO: tests/support/lo_uno.py)
  accepts or rejects every tracked change, reports comments, list labels and custom
  properties, and converts each .docx to PDF;
* ECMA-376 Part 1 §17.13 (revisions and comments) through our structural validator, run
  on every .docx written here;
* the standard library's ``html.parser`` and ``csv`` modules and python-docx read the issues
  list back.
"""

from __future__ import annotations

import csv
import dataclasses
import io
from html.parser import HTMLParser

import docx
import pytest

from core import CAUTION
from core.decisions import Decision
from core.docx.validate import validate_docx
from core.export import (
    CSV_MARK_CLOSE,
    CSV_MARK_OPEN,
    ISSUE_COLUMNS,
    ISSUE_CSV_COLUMNS,
    issue_rows,
    write_issues_list,
)
from core.model import Frequency
from tests.core.export.conftest import AUTHOR, DEMO
from tests.core.export.conftest import made_deviation as _made_deviation
from tests.support.lo_session import libreoffice

# --------------------------------------------------------------------------------------
# Issues list
# --------------------------------------------------------------------------------------


class _TableReader(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.rows: list[list[str]] = []
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

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        if tag == "tr":
            self.rows.append([])
            self.strong.append([])
        elif tag in ("td", "th"):
            self._cell = []
            self.strong[-1].append([])
        elif tag == "strong" and self._cell is not None:
            self._strong = []
        elif tag == "p":
            self._p = []
        elif tag == "style":
            self._in_style = True
        for name, value in attrs:
            if name in ("src", "href") and value:
                self.external.append(value)

    def handle_endtag(self, tag):
        if tag in ("td", "th") and self._cell is not None:
            self.rows[-1].append("".join(self._cell))
            self._cell = None
        elif tag == "strong" and self._strong is not None:
            self.strong[-1][-1].append("".join(self._strong))
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


def _with_frequency(review):
    devs = tuple(dataclasses.replace(d, frequency=Frequency(same_type=10, matching=3, total=12))
                 if d.id == "v1" else d for d in review.deviations)
    return dataclasses.replace(review, deviations=devs)


def _expected_rows(review, decisions):
    return issue_rows(review, decisions)


def _unmarked(text: str) -> str:
    """A CSV position without the marks around its changed words."""
    return text.replace(CSV_MARK_OPEN, "").replace(CSV_MARK_CLOSE, "")


def _as_table(records: list[list[str]]) -> list[list[str]]:
    """CSV rows reduced to the table's columns (ISSUE_COLUMNS), positions unmarked: the text
    the .docx and HTML tables show."""
    header = records[1]
    return [[_unmarked(r[header.index(c)]) for c in ISSUE_COLUMNS] for r in records[2:]]


def test_issues_list_in_three_formats_reads_back(scenario, tmp_path):
    review = _with_frequency(scenario.review)
    decisions = [Decision("v1", "revert", note="Thirty days is our floor."),
                 Decision("v4", "amend", text="Set-off only for undisputed sums.", note="Compromise."),
                 Decision("v6", "accept")]
    rows = issue_rows(review, decisions)
    # Substantive deviations by rank, then the renamed defined term (v6) as the last group.
    assert [r.ref for r in rows] == ["v1", "v2", "v3", "v4", "v5", "v6"]

    csv_path = tmp_path / "issues.csv"
    write_issues_list(review, csv_path, decisions=decisions)
    assert csv_path.read_bytes().startswith(b"\xef\xbb\xbf")  # UTF-8 byte-order mark for spreadsheets
    with open(csv_path, newline="", encoding="utf-8-sig") as fh:
        records = list(csv.reader(fh))  # read back with the standard library
    assert records[0] == [CAUTION]
    # The CSV has the table's columns, with each side's exact changed words after the positions.
    assert tuple(records[1]) == ISSUE_CSV_COLUMNS
    assert tuple(c for c in records[1] if c in ISSUE_COLUMNS) == ISSUE_COLUMNS
    by_ref = {r[0]: dict(zip(records[1], r)) for r in records[2:]}
    assert list(by_ref) == [r.ref for r in rows]
    v1 = scenario.deviation("v1")
    # Each position quotes the sentence holding the change (the scenario's own sentences), the
    # changed words between the CSV's marks; it contains the deviation's words with context.
    assert by_ref["v1"]["Draft position"] == (
        "The Client shall pay each invoice within {sixty (60)} days of receipt.")
    assert by_ref["v1"]["House position"] == (
        "The Customer shall pay each invoice within {thirty (30)} days of receipt.")
    assert v1.draft_text in _unmarked(by_ref["v1"]["Draft position"])  # "within sixty (60) days"
    assert v1.precedent_text in _unmarked(by_ref["v1"]["House position"])
    assert by_ref["v1"]["Draft's changed words"] == "sixty (60)"
    assert by_ref["v1"]["House's changed words"] == "thirty (30)"
    # An insertion: the draft's words are marked, the house sentence lacks them.
    assert by_ref["v2"]["Draft position"] == "Neither party limits its liability for fraud {or death}."
    assert by_ref["v2"]["House position"] == "Neither party limits its liability for fraud."
    assert (by_ref["v2"]["Draft's changed words"], by_ref["v2"]["House's changed words"]) == ("or death", "")
    # Added and removed provisions: their sentences on their side, nothing on the other.
    assert by_ref["v3"]["House position"] == "The Supplier shall keep complete records for six years."
    assert by_ref["v3"]["Draft position"] == "(no such provision)"
    assert by_ref["v4"]["Draft position"] == "The Client may set off any amount the Supplier owes it."
    assert by_ref["v6"]["Draft position"] == "defined term {\u201cClient\u201d} (3 uses)"
    assert by_ref["v6"]["House position"] == "defined term {\u201cCustomer\u201d}"
    assert by_ref["v1"]["Severity"] == "80"
    assert by_ref["v1"]["How common in the precedent set"].startswith("3 of 10")
    assert by_ref["v1"]["How common in the precedent set"] == "3 of 10"  # short; explained once
    assert by_ref["v1"]["Note"] == "Thirty days is our floor."
    assert by_ref["v4"]["Decision"] == "amend: Set-off only for undisputed sums."
    assert by_ref["v2"]["Decision"] == "undecided"
    table_rows = _as_table(records)

    html_path = tmp_path / "issues.html"
    write_issues_list(review, html_path, decisions=decisions)
    parser = _TableReader()
    parser.feed(html_path.read_text(encoding="utf-8"))  # html.parser from the standard library
    assert CAUTION in parser.paragraphs
    assert parser.external == []  # self-contained: no linked resource
    assert tuple(parser.rows[0]) == ISSUE_COLUMNS
    assert parser.rows[1:] == table_rows
    # The changed words of each position are bold (<strong>), nothing else.
    draft_col, house_col = ISSUE_COLUMNS.index("Draft position"), ISSUE_COLUMNS.index("House position")
    assert parser.strong[1][draft_col] == ["sixty (60)"] and parser.strong[1][house_col] == ["thirty (30)"]
    assert parser.strong[2][draft_col] == ["or death"] and parser.strong[2][house_col] == []
    # The figure is explained once, in a note under the table.
    assert sum("\u201c3 of 10\u201d" in p for p in parser.paragraphs) == 1

    docx_path = tmp_path / "issues.docx"
    write_issues_list(review, docx_path, decisions=decisions, author=AUTHOR)
    assert validate_docx(docx_path) == []
    document = docx.Document(str(docx_path))  # python-docx reads the Word table back
    (table,) = document.tables
    cells = [[c.text for c in row.cells] for row in table.rows]
    assert tuple(cells[0]) == ISSUE_COLUMNS
    assert cells[1:] == table_rows
    bold = [[r.text for p in c.paragraphs for r in p.runs if r.bold] for c in table.rows[1].cells]
    assert bold[draft_col] == ["sixty (60)"] and bold[house_col] == ["thirty (30)"]
    assert CAUTION in [p.text for p in document.paragraphs]
    assert sum("\u201c3 of 10\u201d" in p.text for p in document.paragraphs) == 1
    view = libreoffice().inspect(docx_path, pdf=tmp_path / "issues.pdf")
    assert view.pdf_bytes and view.pdf_bytes > 1000


def test_frequency_column_only_when_a_precedent_set_was_used(scenario, tmp_path):
    path = tmp_path / "issues.csv"
    write_issues_list(scenario.review, path)
    header = list(csv.reader(io.StringIO(path.read_text(encoding="utf-8-sig"))))[1]
    assert "How common in the precedent set" not in header
    assert header == [c for c in ISSUE_CSV_COLUMNS if c != "How common in the precedent set"]



# --------------------------------------------------------------------------------------
# The issues list as a negotiator reads it: positions in context, short figures, only the
# rows that matter, tables across the page
# --------------------------------------------------------------------------------------

#: Twips per centimetre (1 twip = 1/1440 inch; 1 inch = 2.54 cm).
TWIPS_PER_CM = 1440 / 2.54
#: The longest word each narrow column must hold on one line, in cm, plus the cell margins
#: (2 x 108 twips = 0.38 cm, the table style's w:tblCellMar): measured in LibreOffice's PDF
#: of these tables on the development machine with pdftotext -bbox (DejaVu Serif 9 pt, the
#: font LibreOffice substitutes when Liberation Serif is missing; bold in the header).
_CELL_MARGINS_CM = 2 * 108 / TWIPS_PER_CM
ISSUES_MIN_CM = {"Ref": 0.78, "Severity": 1.44, "Decision": 1.67, "How common in the precedent set": 1.78}
REDLINE_MIN_CM = {"Rank": 0.92, "Severity": 1.44}


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
    return [x for x in text.split() if x != "\u2026"]


def test_positions_quote_the_sentence_holding_the_change():
    from core.export import POSITION_LEAD_WORDS, POSITION_MAX_WORDS

    cap = ("The Vendor\u2019s total liability to the Client, whether in contract, tort (including "
           "negligence), breach of statutory duty or otherwise, arising under or in connection with "
           "this Agreement in any Contract Year, and whether or not the loss was foreseeable on the "
           "date of this Agreement or on any later date, shall not exceed {} of the Prices paid or "
           "payable by the Client in that Contract Year.")
    tail = "This cap does not apply to fraud, e.g. deceit by a director of the Vendor."
    draft = f"Words of art apply here. {cap.format('two hundred per cent (200%)')} {tail}"
    prec = f"Words of art apply here. {cap.format('one hundred per cent (100%)')} {tail.replace('fraud', 'fraud or death')}"
    assert len(cap.split()) > POSITION_MAX_WORDS  # the sentence must be cut
    # The engine's spans can stop inside a token ("(200" of "(200%)"); the mark covers it whole.
    d1 = draft.index("two hundred")
    p1 = prec.index("one hundred")
    dev = _made_deviation("v1", "replace", "p1", "p1", "one hundred per cent (100%)",
                          "two hundred per cent (200%)", (p1, prec.index("(100") + 4),
                          (d1, draft.index("(200") + 4))
    # The draft took "or death" out: an empty draft span at the place the words were.
    cut = _made_deviation("v2", "delete", "p1", "p1", "fraud or death", "fraud",
                          (prec.index(" or death"), prec.index(" or death") + 9), (draft.index("fraud") + 5,) * 2)
    review = _hand_review(draft, prec, [dev, cut])
    by_ref = {r.ref: r for r in issue_rows(review)}

    row = by_ref["v1"]
    for position, marks, words in ((row.draft_position, row.draft_marks, "two hundred per cent (200%)"),
                                   (row.house_position, row.house_marks, "one hundred per cent (100%)")):
        # Bounded, the sentence's start (whose obligation) kept, then a cut to the change.
        assert len(_words(position)) <= POSITION_MAX_WORDS
        lead = " ".join(cap.split()[:POSITION_LEAD_WORDS])
        assert position.startswith(lead + " \u2026 ")
        assert [position[a:b] for a, b in marks] == [words]
        assert "Words of art" not in position and "This cap" not in position  # one sentence only
        assert position.endswith("Contract Year.") or position.endswith("\u2026")
    assert (row.draft_words, row.house_words) == ("two hundred per cent (200%)", "one hundred per cent (100%)")

    row = by_ref["v2"]
    # A short sentence is quoted whole ("e.g." does not end it); the missing words are marked
    # on the side that has them.
    assert row.house_position == tail.replace("fraud", "fraud or death")
    assert [row.house_position[a:b] for a, b in row.house_marks] == ["or death"]
    assert row.draft_position == tail and row.draft_marks == ()
    assert (row.draft_words, row.house_words) == ("", "or death")


def test_a_long_added_provision_is_quoted_from_its_start():
    from core.export import POSITION_MAX_WORDS
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
    assert row.draft_position.startswith(first) and row.draft_position.endswith("\u2026")
    assert len(_words(row.draft_position)) <= POSITION_MAX_WORDS
    assert row.house_position == "(no such provision)"
    assert row.draft_words == draft.provisions[0].text  # the whole new wording, for the CSV


def test_issues_list_shows_what_a_negotiator_needs_unless_asked_for_all(scenario, tmp_path):
    from core.model import CATEGORIES

    review = scenario.review  # v1-v5 substantive, v6 a renamed term, v7 a moved clause (numbering)
    assert [r.ref for r in issue_rows(review)] == ["v1", "v2", "v3", "v4", "v5", "v6"]
    # Everything when asked: by rank, the renamed terms still last as their own group.
    rows = issue_rows(review, include=CATEGORIES)
    assert [r.ref for r in rows] == ["v1", "v2", "v3", "v4", "v5", "v7", "v6"]
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
    parser = _TableReader()
    parser.feed(page)
    assert any(p.startswith("Left out: 1 difference of formatting") for p in parser.paragraphs)
    assert page.count('<tbody class="terms">') == 1
    assert page.index('<tbody class="terms">') < page.index(">v6<")
    from tests.core.docx.test_writer import table_geometry

    (t,) = table_geometry(docx_path.read_bytes())["tables"]
    assert [r["top_rule"][0] for r in t["rows"]] == [False] * 6 + [True]  # above v6 only
    document = docx.Document(str(docx_path))
    assert any(p.text.startswith("Left out: 1 difference") for p in document.paragraphs)
    write_issues_list(review, html_path, include=CATEGORIES)
    assert "Left out" not in html_path.read_text(encoding="utf-8")


def test_how_common_reads_short_with_the_label_and_is_explained_once(scenario, tmp_path):
    f = {"v1": Frequency(same_type=10, matching=3, total=12, position="preferred"),
         "v2": Frequency(same_type=0, matching=0, total=12)}
    devs = tuple(dataclasses.replace(d, frequency=f.get(d.id)) for d in scenario.review.deviations)
    review = dataclasses.replace(scenario.review, deviations=devs)
    by_ref = {r.ref: r for r in issue_rows(review)}
    assert by_ref["v1"].frequency == "3 of 10; preferred"
    assert by_ref["v2"].frequency == "none"  # no agreement of the set has such a clause
    assert by_ref["v3"].frequency is None
    path = tmp_path / "issues.html"
    write_issues_list(review, path)
    parser = _TableReader()
    parser.feed(path.read_text(encoding="utf-8"))
    (note,) = [p for p in parser.paragraphs if p.startswith("How common")]
    assert "\u201c3 of 10\u201d means that 3 of the 10 agreements" in note
    assert "the set holds 12 agreements" in note and "preferred" in note
    col = ISSUE_COLUMNS.index("How common in the precedent set")
    assert [r[col] for r in parser.rows[1:3]] == ["3 of 10; preferred", "none"]


def test_issues_list_page_prints_on_a4_landscape_and_is_self_contained(scenario, tmp_path):
    path = tmp_path / "issues.html"
    write_issues_list(_with_frequency(scenario.review), path)
    page = path.read_text(encoding="utf-8")
    parser = _TableReader()
    parser.feed(page)  # the standard library's html.parser
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


def test_demo_issues_list_and_redline_tables_span_the_page(tmp_path):
    """The lead's finding on the demo: the landscape issues list's table covered two thirds of
    the page and its narrow columns broke words letter by letter; the redline's opening table
    broke "Rank".  Read the tables back (ECMA-376 Part 1 §17.4) and let LibreOffice lay them
    out and convert them to PDF."""
    from core.export import POSITION_MAX_WORDS, issues_list_docx, redline_bytes
    from core.reader import read_document
    from core.review import run_review
    from tests.core.docx.test_writer import _check_full_width_table, table_geometry

    review = run_review(read_document(str(DEMO / "draft.docx")), read_document(str(DEMO / "precedent.docx")))
    review = dataclasses.replace(review, deviations=tuple(
        dataclasses.replace(d, frequency=Frequency(same_type=12, matching=1, total=12)) for d in review.deviations))
    rows = issue_rows(review)
    assert rows and all(len(_words(r.draft_position)) <= POSITION_MAX_WORDS
                        and len(_words(r.house_position)) <= POSITION_MAX_WORDS for r in rows)
    # every word-level position marks exactly its changed words (the start of them when
    # they alone are longer than a position)
    checked = 0
    for r in rows:
        for position, marks, words in ((r.draft_position, r.draft_marks, r.draft_words),
                                       (r.house_position, r.house_marks, r.house_words)):
            if r.category != "term" and marks:
                marked = position[slice(*marks[0])]
                assert " ".join(words.split()).startswith(marked), (r.ref, marked, words)
                checked += 1
    assert checked > 20
    office = libreoffice()
    for name, data, columns, minimum, landscape in (
            ("issues.docx", issues_list_docx(review, author=AUTHOR), ISSUE_COLUMNS, ISSUES_MIN_CM, True),
            # the full view opens with the ranked table (the substantive view puts the renamed
            # terms first: tests/core/export/test_redline.py checks both of its tables)
            ("redline.docx", redline_bytes(review, author=AUTHOR, show="all"), ("Rank", "Severity", "Clause", "Deviation"),
             REDLINE_MIN_CM, False)):
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
        if name == "issues.docx":  # the positions get the room
            others = [x for c, x in cm.items() if c not in ("Draft position", "House position")]
            assert min(cm["Draft position"], cm["House position"]) > max(others)
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
    import json

    deviations = json.loads(review_file.read_text(encoding="utf-8"))["deviations"]
    short, full = tmp_path / "short.csv", tmp_path / "full.csv"
    assert main(["export", str(review_file), "--issues-list", str(short)]) == 0
    assert main(["export", str(review_file), "--issues-list", str(full), "--issues-all"]) == 0
    capsys.readouterr()
    refs = {p: [r[0] for r in list(csv.reader(io.StringIO(p.read_text(encoding="utf-8-sig"))))[2:]]
            for p in (short, full)}
    assert sorted(refs[full]) == sorted(d["id"] for d in deviations)
    assert sorted(refs[short]) == sorted(d["id"] for d in deviations if d["category"] in ("substantive", "term"))
    assert len(refs[short]) < len(refs[full])

