"""The PDF reader: what it refuses, and the lines it reads.

Outside references: hand-built PDF files (ISO 32000-1 §7.5 file structure, §9.4 text
objects; tests/support/minimal_pdf.py), and PDFs printed by LibreOffice headless from .docx
files (tests/support/printed.py) whose words the .docx reader gives.
"""

from __future__ import annotations

import subprocess
import sys

import pytest

from core.errors import CounterdraftError
from core.readers import read_document
from core.readers.pdf import pdf_lines
from tests.support.minimal_pdf import pdf_bytes

SCAN = "0.5 g 72 72 468 648 re f"  # a grey rectangle where a scanned page's image would be
TEXT = "BT /F1 12 Tf 72 700 Td (1. The Supplier shall deliver the Goods.) Tj ET"


def test_a_pdf_without_a_text_layer_is_refused_in_one_line(tmp_path):
    path = tmp_path / "scan.pdf"
    path.write_bytes(pdf_bytes(content=SCAN))
    with pytest.raises(CounterdraftError) as info:
        read_document(str(path))
    message = str(info.value)
    assert message.startswith(str(path)) and "no text layer" in message and "OCR" in message
    assert "\n" not in message


def test_the_command_line_exits_2_naming_the_file(tmp_path):
    path = tmp_path / "scan.pdf"
    path.write_bytes(pdf_bytes(content=SCAN))
    before = path.read_bytes()
    proc = subprocess.run([sys.executable, "-m", "core.cli", "inspect", str(path)],
                          capture_output=True, text=True, check=False)
    assert proc.returncode == 2
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1 and str(path) in lines[0] and "no text layer" in lines[0]
    assert "Traceback" not in proc.stderr
    assert path.read_bytes() == before  # the input is never changed


def test_a_damaged_pdf_is_refused_in_one_line(tmp_path):
    path = tmp_path / "cut.pdf"
    path.write_bytes(pdf_bytes(content=TEXT, font=True)[:120])
    with pytest.raises(CounterdraftError) as info:
        read_document(str(path))
    assert str(info.value).startswith(str(path))


def test_a_hand_built_text_layer_is_read(tmp_path):
    path = tmp_path / "one.pdf"
    path.write_bytes(pdf_bytes(content=TEXT, font=True))
    doc = read_document(str(path))
    assert [(p.number, p.text) for p in doc.provisions] == [("1", "The Supplier shall deliver the Goods.")]


def test_lines_carry_positions_and_fonts(printed_licences):
    """LibreOffice prints mpl-2.0's title in bold and its "1.1." items with a hanging indent:
    the label's line starts left of the lines that continue it."""
    pdf = printed_licences[("mpl-2.0", "spaced")].with_suffix(".pdf")
    lines, warnings = pdf_lines(str(pdf))
    assert warnings == ()
    title = lines[0]
    assert title.text == "Mozilla Public License Version 2.0" and title.bold == 1.0
    first = next(i for i, ln in enumerate(lines) if ln.text.startswith("1.1."))
    assert lines[first + 1].x0 > lines[first].x0 + 10  # points
    assert all(ln.size > 0 and ln.bold is not None for ln in lines)
