"""Tests of core.docx.compose: the writer of fresh .docx files with real auto-numbering.

Outside references:
* ECMA-376 Part 1 (ISO/IEC 29500-1), §17.9 Numbering: the structure of word/numbering.xml
  (w:abstractNum / w:lvl / w:num / w:lvlOverride / w:startOverride) and §17.3.1.19 /
  §17.9.18 w:numPr on paragraphs; §17.7 for styles; §17.3.2 for runs.
* LibreOffice (Debian's ``soffice``, headless), which renders the number labels of the
  composed file into plain text: the labels it shows must be the ones we intended.
"""

from __future__ import annotations

import io
import shutil
import subprocess
import tempfile
import zipfile
from pathlib import Path

import docx
import pytest
from lxml import etree

from core.docx.compose import DEFAULT_LISTS, compose_docx
from core.docx.compose import ComposeParagraph as P

W = "http://schemas.openxmlformats.org/wordprocessingml/2006/main"
NS = {"w": W}

LISTS = {
    "article": [("decimal", "Article %1"), ("decimal", "Section %1.%2"),
                ("lowerRoman", "(%3)"), ("upperLetter", "(%4)")],
    "schedule": [("upperRoman", "%1."), ("decimalZero", "%1-%2")],
}

# (paragraph, the label we intend a word processor to show, or None)
CASES: list[tuple[P, str | None]] = [
    (P("MASTER SUPPLY AGREEMENT", style="Title"), None),
    (P("Definitions", level=0, style="Heading 1"), "1."),
    (P("The definitions in this clause apply.", level=1), "1.1"),
    (P("first item", level=2), "(a)"),
    (P("first sub-item", level=3), "(i)"),
    (P("second sub-item", level=3), "(ii)"),
    (P("second item", level=2), "(b)"),
    (P("Time is not of the essence.", level=1, lead="Delivery."), "1.2"),
    (P("An unnumbered paragraph that continues clause 1.2."), None),
    (P("Payment", level=0, style="Heading 1"), "2."),
    (P("lower levels restart under a new parent", level=1), "2.1"),
    (P("third level restarts", level=2), "(a)"),
    (P("Supply", level=0, list="article", style="Heading 2"), "Article 1"),
    (P("section one", level=1, list="article"), "Section 1.1"),
    (P("section two", level=1, list="article"), "Section 1.2"),
    (P("Orders", level=0, list="article", style="Heading 2"), "Article 2"),
    (P("section", level=1, list="article"), "Section 2.1"),
    (P("roman", level=2, list="article"), "(i)"),
    (P("roman two", level=2, list="article"), "(ii)"),
    (P("capital letter", level=3, list="article"), "(A)"),
    (P("the main list continues", level=0), "3."),
    (P("Products", level=0, list="schedule", style="Heading 3"), "I."),
    (P("zero-padded", level=1, list="schedule"), "I-01"),
    (P("zero-padded two", level=1, list="schedule"), "I-02"),
    (P("Prices", level=0, list="schedule"), "II."),
    (P("ten", level=1, list="schedule"), "II-01"),
    (P("the main list starts again", level=0, restart=True), "1."),
    (P("and its lower levels", level=1), "1.1"),
    (P("Signed for the Supplier", bold=True), None),
]


def _compose() -> bytes:
    return compose_docx([p for p, _ in CASES], lists=LISTS)


@pytest.fixture(scope="module")
def docx_bytes() -> bytes:
    return _compose()


@pytest.fixture(scope="module")
def libreoffice_lines(docx_bytes: bytes) -> list[str]:
    """The composed file converted to text by LibreOffice (one soffice run for the module)."""
    soffice = shutil.which("soffice")
    assert soffice, "LibreOffice (soffice) is needed: apt-get install libreoffice-writer python3-uno"
    with tempfile.TemporaryDirectory(prefix="cd-compose-") as tmp:
        src = Path(tmp) / "composed.docx"
        src.write_bytes(docx_bytes)
        out = Path(tmp) / "out"
        subprocess.run(
            [soffice, f"-env:UserInstallation=file://{tmp}/profile", "--headless",
             "--convert-to", "txt:Text (encoded):UTF8", "--outdir", str(out), str(src)],
            check=False, capture_output=True, timeout=180,
        )
        result = out / "composed.txt"
        # soffice exits with status 0 even when it could not load the file.
        assert result.exists(), "LibreOffice did not convert the composed .docx"
        text = result.read_text(encoding="utf-8")
    assert text.startswith("\ufeff")  # LibreOffice writes a UTF-8 byte order mark first
    return text[1:].splitlines()


def _part(data: bytes, name: str) -> etree._Element:
    with zipfile.ZipFile(io.BytesIO(data)) as z:
        return etree.fromstring(z.read(name))


# --------------------------------------------------------------------------------------
# LibreOffice renders the labels we intended
# --------------------------------------------------------------------------------------


def test_libreoffice_renders_the_intended_labels(libreoffice_lines: list[str]) -> None:
    # Reference: LibreOffice's text export writes each numbered paragraph as 4 spaces of
    # indent per list level (level 0 included), the rendered label, one space, the text.
    assert len(libreoffice_lines) == len(CASES)
    for line, (para, label) in zip(libreoffice_lines, CASES):
        body = f"{para.lead} {para.text}" if para.lead else para.text
        if label is None:
            assert line == body
        else:
            assert line == " " * (4 * (para.level + 1)) + label + " " + body


# --------------------------------------------------------------------------------------
# ECMA-376 Part 1 §17.9: numbering.xml and w:numPr
# --------------------------------------------------------------------------------------


def test_numbering_part_follows_ecma_376_17_9(docx_bytes: bytes) -> None:
    numbering = _part(docx_bytes, "word/numbering.xml")
    assert numbering.tag == f"{{{W}}}numbering"
    children = [etree.QName(c).localname for c in numbering]
    # §17.9.16 CT_Numbering: all w:abstractNum elements precede the w:num elements.
    assert children == sorted(children, key=lambda t: {"abstractNum": 0, "num": 1}[t])
    abstracts = numbering.findall("w:abstractNum", NS)
    assert len(abstracts) == 3  # main, article, schedule: one per list used
    ids = [a.get(f"{{{W}}}abstractNumId") for a in abstracts]
    assert len(set(ids)) == len(ids)
    expected = [DEFAULT_LISTS["main"], LISTS["article"], LISTS["schedule"]]
    for abstract, levels in zip(abstracts, expected):
        lvls = abstract.findall("w:lvl", NS)
        assert [lv.get(f"{{{W}}}ilvl") for lv in lvls] == [str(i) for i in range(len(levels))]
        for lvl, (fmt, text) in zip(lvls, levels):
            order = [etree.QName(c).localname for c in lvl]
            # §17.9.6 CT_Lvl sequence: start, numFmt, ..., lvlText, ..., lvlJc, pPr
            assert order == ["start", "numFmt", "lvlText", "lvlJc", "pPr"]
            assert lvl.find("w:start", NS).get(f"{{{W}}}val") == "1"
            assert lvl.find("w:numFmt", NS).get(f"{{{W}}}val") == fmt
            assert lvl.find("w:lvlText", NS).get(f"{{{W}}}val") == text
            ind = lvl.find("w:pPr/w:ind", NS)
            assert int(ind.get(f"{{{W}}}left")) > 0 and int(ind.get(f"{{{W}}}hanging")) > 0
    nums = numbering.findall("w:num", NS)
    num_ids = [n.get(f"{{{W}}}numId") for n in nums]
    assert len(set(num_ids)) == len(num_ids) and "0" not in num_ids  # §17.9.18: 0 = none
    for num in nums:
        assert num.find("w:abstractNumId", NS).get(f"{{{W}}}val") in ids
    # The restart made exactly one extra instance, with a w:startOverride on each level
    # (§17.9.27 w:lvlOverride, §17.9.28 w:startOverride).
    restarted = [n for n in nums if n.find("w:lvlOverride", NS) is not None]
    assert len(restarted) == 1 and len(nums) == 4
    overrides = restarted[0].findall("w:lvlOverride", NS)
    assert [o.get(f"{{{W}}}ilvl") for o in overrides] == ["0", "1", "2", "3"]
    assert all(o.find("w:startOverride", NS).get(f"{{{W}}}val") == "1" for o in overrides)


def test_paragraphs_carry_numpr_with_level_and_instance(docx_bytes: bytes) -> None:
    document = _part(docx_bytes, "word/document.xml")
    numbering = _part(docx_bytes, "word/numbering.xml")
    known = {n.get(f"{{{W}}}numId") for n in numbering.findall("w:num", NS)}
    paragraphs = document.findall("w:body/w:p", NS)
    assert len(paragraphs) == len(CASES)
    for p, (para, _) in zip(paragraphs, CASES):
        numpr = p.find("w:pPr/w:numPr", NS)
        if para.level is None:
            assert numpr is None
            continue
        assert numpr.find("w:ilvl", NS).get(f"{{{W}}}val") == str(para.level)
        assert numpr.find("w:numId", NS).get(f"{{{W}}}val") in known
        ppr = [etree.QName(c).localname for c in p.find("w:pPr", NS)]
        if "pStyle" in ppr:  # §17.3.1.26 CT_PPrBase: pStyle comes before numPr
            assert ppr.index("pStyle") < ppr.index("numPr")


# --------------------------------------------------------------------------------------
# python-docx reads it back; styles and run-in headings
# --------------------------------------------------------------------------------------


def test_opens_in_python_docx_with_styles_and_bold_leads(docx_bytes: bytes) -> None:
    d = docx.Document(io.BytesIO(docx_bytes))
    assert len(d.paragraphs) == len(CASES)
    for got, (para, _) in zip(d.paragraphs, CASES):
        assert got.text == (f"{para.lead} {para.text}" if para.lead else para.text)
        assert got.style.name == (para.style or "Normal")
        if para.lead:
            assert got.runs[0].text == para.lead and got.runs[0].bold
            assert not got.runs[1].bold and got.runs[1].text == " " + para.text
        if para.bold:
            assert all(r.bold for r in got.runs)
    names = {s.name for s in d.styles}
    assert {"Title", "Heading 1", "Heading 2", "Heading 3"} <= names


def test_tabs_breaks_and_spaces_survive() -> None:
    data = compose_docx([P("a\tb\nc  d ")])
    p = docx.Document(io.BytesIO(data)).paragraphs[0]
    assert p.text == "a\tb\nc  d "  # python-docx reads w:tab as "\t" and w:br as "\n"
    xml = _part(data, "word/document.xml")
    assert xml.find(".//w:tab", NS) is not None and xml.find(".//w:br", NS) is not None


# --------------------------------------------------------------------------------------
# Determinism and size
# --------------------------------------------------------------------------------------


def test_same_input_gives_the_same_bytes(docx_bytes: bytes) -> None:
    assert _compose() == docx_bytes
    with zipfile.ZipFile(io.BytesIO(docx_bytes)) as z:
        assert {i.date_time for i in z.infolist()} == {(1980, 1, 1, 0, 0, 0)}
        assert z.namelist()[0] == "[Content_Types].xml"
        assert "docProps/thumbnail.jpeg" not in z.namelist()
        core = z.read("docProps/core.xml").decode()
    assert "2024-01-01T09:00:00Z" in core


def test_small_file_for_a_small_document(docx_bytes: bytes) -> None:
    # The template's unused styles are pruned: a short agreement is a small file.
    assert len(docx_bytes) < 15_000
    styles = _part(docx_bytes, "word/styles.xml")
    assert len(styles.findall("w:style", NS)) < 20


def test_bad_arguments_raise_value_error() -> None:
    with pytest.raises(ValueError, match="unknown list"):
        compose_docx([P("x", level=0, list="nope")])
    with pytest.raises(ValueError, match="levels 0..3"):
        compose_docx([P("x", level=4)])
    with pytest.raises(ValueError, match="style"):
        compose_docx([P("x", style="No Such Style")])
    with pytest.raises(ValueError, match="number format"):
        compose_docx([P("x", level=0, list="l")], lists={"l": [("hexagonal", "%1")]})
    with pytest.raises(ValueError, match="deeper level"):
        compose_docx([P("x", level=0, list="l")], lists={"l": [("decimal", "%2")]})
