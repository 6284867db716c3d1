"""Fresh .docx files with tracked changes and tables (core.docx.writer).

References: ECMA-376 Part 1 §17.13.5 (w:ins, w:del, w:moveFrom/w:moveTo and their range
markers), §17.4 (tables: w:tbl, w:tblHeader), §22.3 (custom properties); LibreOffice headless
(Debian, via UNO) accepts and rejects every change; python-docx reads the package back.
"""

from __future__ import annotations

import io
import random
import zipfile
from pathlib import Path

import docx
import pytest
from lxml import etree

from core.docx.revisions import RevisionStamp, w
from core.docx.validate import validate_docx
from core.docx.writer import Para, Run, Table, build_docx
from tests.support.lo_session import libreoffice

STAMP = RevisionStamp("Ines Testwright", "2024-05-01T10:00:00Z")
_WORDS = "alpha beta gamma delta epsilon zeta eta theta iota kappa".split()


def _words(r: random.Random, n: int) -> str:
    return " ".join(r.choice(_WORDS) for _ in range(n))


def _changed_paragraph(r: random.Random) -> Para:
    """A paragraph of a matched pair: equal, inserted and deleted words, a replacement
    written as deletion then insertion, and at least one equal word."""
    runs: list[Run] = []
    for _ in range(r.randint(1, 5)):
        kind = r.choice(["equal", "equal", "ins", "del", "replace"])
        text = _words(r, r.randint(1, 3)) + r.choice(["", " "])
        if kind == "equal":
            runs.append(Run(text))
        elif kind == "replace":
            runs += [Run(text, "del"), Run(_words(r, 2), "ins")]
        else:
            runs.append(Run(text, kind))
    if not any(x.mark == "" for x in runs):
        runs.insert(r.randint(0, len(runs)), Run(_words(r, 1) + " "))
    merged: list[Run] = []
    for x in runs:
        if merged and merged[-1].mark == x.mark:
            merged[-1] = Run(merged[-1].text + x.text, x.mark)
        else:
            merged.append(x)
    return Para(tuple(merged))


def _random_group(r: random.Random) -> list[Para]:
    paras: list[Para] = []
    moved: list[Para] = []
    for _ in range(r.randint(2, 5)):
        kind = r.choice("CCCDIM")
        if kind == "C":
            paras.append(_changed_paragraph(r))
        elif kind == "D":
            paras.append(Para((Run(_words(r, 3), "del"),), mark="del"))
        elif kind == "I":
            paras.append(Para((Run(_words(r, 3), "ins"),), mark="ins"))
        else:
            name = f"move{r.randrange(10**9)}"
            text = _words(r, 3)
            paras.append(Para((Run(text, "moveFrom"),), mark="moveFrom", move=name))
            runs = [Run(text, "moveTo")]
            if r.random() < 0.5:
                runs.insert(0, Run(_words(r, 1) + " ", "ins"))
            if r.random() < 0.5:
                runs.append(Run(" " + _words(r, 1), "ins"))
            moved.append(Para(tuple(runs), mark="moveTo", move=name))
    for m in moved:
        paras.insert(r.randint(0, len(paras)), m)
    return paras


def _expected(body: list[Para], *, accept: bool) -> list[str]:
    """The text a word processor must show after accepting/rejecting, by ECMA-376 §17.13.5:
    accepting keeps inserted and moved-to content and drops deleted and moved-from content
    (paragraph marks included); rejecting does the opposite."""
    out = []
    gone = ("del", "moveFrom") if accept else ("ins", "moveTo")
    keep = {"", "ins", "moveTo"} if accept else {"", "del", "moveFrom"}
    for p in body:
        if p.mark in gone:
            continue
        out.append("".join(x.text for x in p.runs if x.mark in keep))
    return out


def test_libreoffice_accepts_and_rejects_random_change_patterns_exactly(tmp_path):
    """Every neighbourhood of changed, deleted, inserted and moved paragraphs the redline can
    produce, drawn at random (fixed seeds), round-trips through LibreOffice."""
    office = libreoffice()
    for seed in (11, 29):
        r = random.Random(seed)
        body: list[Para] = []
        for g in range(40):
            body.append(Para((Run(f"Group {g}"),)))
            body.extend(_random_group(r))
        body.append(Para((Run("End."),)))
        path = tmp_path / f"random-{seed}.docx"
        path.write_bytes(build_docx(body, stamp=STAMP, title="random"))
        assert validate_docx(path) == []  # ECMA-376 Part 1 §17.13 structure
        accepted = office.inspect(path, action="accept")
        assert accepted.redlines_before > 0 and accepted.redlines_after == 0
        assert accepted.paragraphs == _expected(body, accept=True), seed
        rejected = office.inspect(path, action="reject")
        assert rejected.redlines_after == 0
        assert rejected.paragraphs == _expected(body, accept=False), seed


def test_moves_carry_paired_named_ranges():
    body = [
        Para((Run("moved one", "moveFrom"),), mark="moveFrom", move="m1"),
        Para((Run("moved two", "moveFrom"),), mark="moveFrom", move="m1"),
        Para((Run("stays"),)),
        Para((Run("moved one", "moveTo"),), mark="moveTo", move="m1"),
        Para((Run("moved two", "moveTo"),), mark="moveTo", move="m1"),
    ]
    data = build_docx(body, stamp=STAMP, title="t")
    root = etree.fromstring(zipfile.ZipFile(io.BytesIO(data)).read("word/document.xml"))
    # One range per side around both paragraphs (§17.13.5.23/.27), paired by w:name.
    (start_from,) = root.iter(w("moveFromRangeStart"))
    (start_to,) = root.iter(w("moveToRangeStart"))
    assert start_from.get(w("name")) == start_to.get(w("name")) == "m1"
    assert start_from.get(w("author")) == STAMP.author
    assert validate_docx(data) == []


def test_table_header_row_and_properties_read_back_with_python_docx(tmp_path):
    body = [Para((Run("Caution text"),), style="Caution"),
            Table(("Clause", "Position"), (("9.1", "sixty days"), ("12.3", "two\nlines")), widths=(1, 3))]
    path = tmp_path / "t.docx"
    path.write_bytes(build_docx(body, stamp=STAMP, title="Issues", properties={"Caution": "read me"},
                                landscape=True))
    document = docx.Document(str(path))
    (table,) = document.tables
    assert [[c.text for c in row.cells] for row in table.rows] == [
        ["Clause", "Position"], ["9.1", "sixty days"], ["12.3", "two\nlines"]]
    # The first row repeats on every page (w:tblHeader, §17.4.50).
    assert table.rows[0]._tr.find(f"{w('trPr')}/{w('tblHeader')}") is not None
    assert document.paragraphs[0].style.name == "Caution"
    section = document.sections[0]
    assert section.page_width > section.page_height  # landscape
    assert document.core_properties.title == "Issues"
    view = libreoffice().inspect(path)
    assert view.user_properties["Caution"] == "read me"


# --------------------------------------------------------------------------------------
# Table layout (ECMA-376 Part 1 §17.4; section numbers as in ISO/IEC 29500-1)
# --------------------------------------------------------------------------------------

#: A4 in twips: ISO 216 gives 210 x 297 mm; 1 twip = 1/1440 inch = 25.4/1440 mm.
A4_TWIPS = (round(210 / 25.4 * 1440), round(297 / 25.4 * 1440))


def _attr(el, name: str) -> str | None:
    return None if el is None else el.get(w(name))


def table_geometry(source) -> dict:
    """The page's text width and each table's layout, read from ``word/document.xml``:
    text width = w:pgSz/@w:w less w:pgMar/@w:left and @w:right (§17.6.13, §17.6.11)."""
    data = source if isinstance(source, bytes) else Path(source).read_bytes()
    root = etree.fromstring(zipfile.ZipFile(io.BytesIO(data)).read("word/document.xml"))
    sect = root.find(f"{w('body')}/{w('sectPr')}")
    pg, mar = sect.find(w("pgSz")), sect.find(w("pgMar"))
    out = {"page": (int(_attr(pg, "w")), int(_attr(pg, "h"))), "orient": _attr(pg, "orient"),
           "text_width": int(_attr(pg, "w")) - int(_attr(mar, "left")) - int(_attr(mar, "right")),
           "tables": []}
    for tbl in root.iter(w("tbl")):
        pr = tbl.find(w("tblPr"))
        rows = []
        for tr in tbl.findall(w("tr")):
            trpr = tr.find(w("trPr"))
            rows.append({
                "cant_split": trpr is not None and trpr.find(w("cantSplit")) is not None,
                "header": trpr is not None and trpr.find(w("tblHeader")) is not None,
                "tcW": [(int(_attr(tc.find(f"{w('tcPr')}/{w('tcW')}"), "w")),
                         _attr(tc.find(f"{w('tcPr')}/{w('tcW')}"), "type")) for tc in tr.findall(w("tc"))],
                "fill": [_attr(tc.find(f"{w('tcPr')}/{w('shd')}"), "fill") for tc in tr.findall(w("tc"))],
                "top_rule": [tc.find(f"{w('tcPr')}/{w('tcBorders')}/{w('top')}") is not None
                             for tc in tr.findall(w("tc"))],
            })
        out["tables"].append({
            "tblW": (int(_attr(pr.find(w("tblW")), "w")), _attr(pr.find(w("tblW")), "type")),
            "layout": _attr(pr.find(w("tblLayout")), "type"),
            "grid": [int(g.get(w("w"))) for g in tbl.find(w("tblGrid")).findall(w("gridCol"))],
            "rows": rows,
        })
    return out


def _check_full_width_table(t: dict, text_width: int) -> None:
    """The table fills the text width with a fixed grid, header repeated, rows kept whole."""
    assert t["tblW"] == (text_width, "dxa")  # preferred table width, twips (§17.4.64)
    assert t["layout"] == "fixed"  # widths kept, not fitted to the contents (§17.4.53, §17.18.87)
    assert sum(t["grid"]) == text_width  # the grid columns tile the width (§17.4.49)
    for row in t["rows"]:
        assert [x for x, _ in row["tcW"]] == t["grid"] and {u for _, u in row["tcW"]} == {"dxa"}
        assert row["cant_split"]  # no row breaks across a page (§17.4.6)
    assert [r["header"] for r in t["rows"]] == [True] + [False] * (len(t["rows"]) - 1)  # §17.4.50


def test_tables_span_the_text_width_upright_and_landscape(tmp_path):
    rows = tuple((f"v{i}", str(90 - i), "The Client shall pay each invoice within sixty (60) days. " * 3)
                 for i in range(40))  # enough rows to run over a page
    office = libreoffice()
    for landscape in (False, True):
        table = Table(("Ref", "Severity", "Position"), rows, widths=(1.4, 2.0, 9.0))
        path = tmp_path / f"table-{landscape}.docx"
        path.write_bytes(build_docx([Para((Run("Caution"),)), table], stamp=STAMP, title="t",
                                    landscape=landscape))
        g = table_geometry(path.read_bytes())
        assert g["page"] == (A4_TWIPS[::-1] if landscape else A4_TWIPS)
        assert g["text_width"] == (14002 if landscape else 9070)  # 2.5 cm margins each side
        (t,) = g["tables"]
        _check_full_width_table(t, g["text_width"])
        # The relative widths, scaled to the text width (each within the 1-twip rounding and
        # the remainder the widest column takes).
        total = 1.4 + 2.0 + 9.0
        assert all(abs(x - g["text_width"] * r / total) <= 2 for x, r in zip(t["grid"], (1.4, 2.0, 9.0)))
        # python-docx reads the same column widths back (w:gridCol, in twips).
        document = docx.Document(str(path))
        assert [c.width.twips for c in document.tables[0].columns] == t["grid"]
        # LibreOffice (the outside word processor) lays the table out as written: saved back to
        # .docx, its table has our width and columns (to its own rounding), keeps the header
        # row and the unsplittable rows; and the document converts to PDF.
        again = tmp_path / f"table-{landscape}-lo.docx"
        view = office.inspect(path, save_as=again, pdf=tmp_path / f"table-{landscape}.pdf")
        assert view.pdf_bytes and view.pdf_bytes > 1000
        lo = table_geometry(again.read_bytes())["tables"][0]
        assert abs(lo["tblW"][0] - g["text_width"]) <= 5
        assert all(abs(a - b) <= 5 for a, b in zip(lo["grid"], t["grid"])) and len(lo["grid"]) == 3
        assert lo["rows"][0]["header"] and all(r["cant_split"] for r in lo["rows"])


def test_table_cells_carry_bold_words_and_a_set_off_group():
    from core.docx.writer import GROUP_FILL, HEADER_FILL

    table = Table(("Clause", "Position"),
                  (("9.1", (Run("within "), Run("sixty (60)", bold=True), Run(" days"))),
                   ("9.2", "plain\nsecond line"),
                   ("Terms", (Run("defined term "), Run("\u201cClient\u201d", bold=True)))),
                  widths=(1, 3), divider_before=2)
    data = build_docx([table], stamp=STAMP, title="t")
    document = docx.Document(io.BytesIO(data))  # python-docx reads the runs back
    (t,) = document.tables
    cell = t.rows[1].cells[1]
    assert cell.text == "within sixty (60) days"
    assert [r.text for p in cell.paragraphs for r in p.runs if r.bold] == ["sixty (60)"]
    assert t.rows[2].cells[1].text == "plain\nsecond line"  # two paragraphs in the cell
    assert all(r.bold for c in t.rows[0].cells for p in c.paragraphs for r in p.runs)  # header
    g = table_geometry(data)["tables"][0]
    assert g["rows"][0]["fill"] == [HEADER_FILL] * 2
    assert g["rows"][1]["fill"] == [None, None] and g["rows"][2]["fill"] == [None, None]
    assert g["rows"][3]["fill"] == [GROUP_FILL] * 2 and g["rows"][3]["top_rule"] == [True, True]
    assert not any(g["rows"][1]["top_rule"])
    assert validate_docx(data) == []


def test_table_widths_must_be_positive_and_one_per_column():
    for widths in ((0, 1), (-1, 2), (1,)):
        with pytest.raises(ValueError):
            build_docx([Table(("a", "b"), (("1", "2"),), widths=widths)], stamp=STAMP, title="t")
