"""Fresh .docx files with tracked changes and tables (core.docx.writer).

References: ECMA-376 Part 1 §17.13.5 (w:ins, w:del, w:moveFrom/w:moveTo and their range
markers), §17.4 (tables: w:tbl, w:tblHeader), §22.3 (custom properties); LibreOffice headless
(Debian, via UNO) accepts and rejects every change; python-docx reads the package back.
"""

from __future__ import annotations

import io
import random
import zipfile

import docx
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
