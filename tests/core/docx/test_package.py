"""Safe opening of .docx packages (core.docx.package).

References: ECMA-376 Part 2 (Open Packaging Conventions: relationships §9.3, part names
§9.1.1), the PKWARE APPNOTE for the zip layout, [MS-CFB] §2.2 for OLE compound files, and
XML 1.0 §2.8 for the prolog/DOCTYPE.
"""

from __future__ import annotations

import hashlib
import random
import zipfile

import pytest

from core.docx import package as pkg
from core.docx.package import has_doctype, open_docx_package
from core.errors import CounterdraftError
from tests.support.bad_inputs import BAD_INPUTS, compound_file, healthy_docx, rezip

W = "http://schemas.openxmlformats.org/wordprocessingml/2006/main"


def _write(tmp_path, data: bytes, name: str = "x.docx") -> str:
    path = tmp_path / name
    path.write_bytes(data)
    return str(path)


def test_healthy_package_parts(tmp_path):
    package = open_docx_package(_write(tmp_path, healthy_docx()))
    assert package.main_part == "word/document.xml"
    assert package.document.tag == f"{{{W}}}document"
    assert package.styles is not None and package.styles.tag == f"{{{W}}}styles"
    assert package.numbering is not None and package.numbering.tag == f"{{{W}}}numbering"


def test_main_part_found_through_relationships(tmp_path):
    """ECMA-376 Part 2 §9.3: the package relationship of type officeDocument names the main
    part; it need not be word/document.xml."""
    data = healthy_docx()
    with zipfile.ZipFile(_write(tmp_path, data)) as zf:
        document = zf.read("word/document.xml")
        rels = zf.read("_rels/.rels").replace(b"word/document.xml", b"word/main.xml")
        doc_rels = zf.read("word/_rels/document.xml.rels")
    moved = rezip(data, drop=("word/document.xml", "word/_rels/document.xml.rels"),
                  replace={"word/main.xml": document, "_rels/.rels": rels,
                           "word/_rels/main.xml.rels": doc_rels})
    package = open_docx_package(_write(tmp_path, moved, "moved.docx"))
    assert package.main_part == "word/main.xml"
    assert package.styles is not None


@pytest.mark.parametrize("bad", BAD_INPUTS, ids=lambda b: b.name)
def test_bad_input_refused_with_one_line(tmp_path, bad):
    path = bad.make(tmp_path)
    before = hashlib.sha256(path.read_bytes()).hexdigest() if path.is_file() else None
    with pytest.raises(CounterdraftError) as err:
        open_docx_package(path)
    message = str(err.value)
    assert "\n" not in message
    assert message.startswith(f"{path}: ")
    assert bad.named_in(message)
    assert err.value.path == str(path)
    if before is not None:  # the input is never modified
        assert hashlib.sha256(path.read_bytes()).hexdigest() == before


def test_zip_bomb_refused_before_decompressing(tmp_path, monkeypatch):
    bomb = next(b for b in BAD_INPUTS if b.name == "zip-bomb").make(tmp_path)
    opened: list[str] = []
    real_open = zipfile.ZipFile.open

    def spy(self, name, *args, **kwargs):
        opened.append(getattr(name, "filename", name))
        return real_open(self, name, *args, **kwargs)

    monkeypatch.setattr(zipfile.ZipFile, "open", spy)
    with pytest.raises(CounterdraftError, match="zip bomb"):
        open_docx_package(bomb)
    assert opened == []


def test_total_size_limit(tmp_path, monkeypatch):
    incompressible = random.Random(7).randbytes(2 << 20)  # like an embedded photograph
    data = rezip(healthy_docx(), replace={"word/media/image1.bin": incompressible})
    monkeypatch.setattr(pkg, "MAX_TOTAL_UNCOMPRESSED", 1 << 20)
    with pytest.raises(CounterdraftError, match=r"would expand to 3 MB \(limit 1 MB\)"):
        open_docx_package(_write(tmp_path, data))


def test_part_size_limit(tmp_path, monkeypatch):
    monkeypatch.setattr(pkg, "MAX_XML_PART_BYTES", 1000)
    with pytest.raises(CounterdraftError, match="word/document.xml would expand"):
        open_docx_package(_write(tmp_path, healthy_docx()))


def test_entry_count_limit(tmp_path, monkeypatch):
    monkeypatch.setattr(pkg, "MAX_ZIP_ENTRIES", 5)
    with pytest.raises(CounterdraftError, match=r"entries \(limit 5\)"):
        open_docx_package(_write(tmp_path, healthy_docx()))


def test_ratio_checked_while_reading(tmp_path, monkeypatch):
    """The directory check is repeated while decompressing (for a directory that lies in a
    way zipfile does not catch).  Simulated by lowering the limit after the directory check."""
    data = rezip(healthy_docx(), replace={"word/document.xml": (
        b'<w:document xmlns:w="' + W.encode() + b'"><w:body>' + b" " * (3 << 20)
        + b"</w:body></w:document>")})
    path = _write(tmp_path, data)
    real_check = pkg._check_directory

    def check_then_tighten(zf, p):
        real_check(zf, p)
        monkeypatch.setattr(pkg, "MAX_COMPRESSION_RATIO", 2)

    monkeypatch.setattr(pkg, "MAX_COMPRESSION_RATIO", 10_000)
    monkeypatch.setattr(pkg, "_check_directory", check_then_tighten)
    with pytest.raises(CounterdraftError, match="expands more than 2:1"):
        open_docx_package(path)


def test_strict_ooxml_refused(tmp_path):
    data = healthy_docx()
    with zipfile.ZipFile(_write(tmp_path, data)) as zf:
        document = zf.read("word/document.xml").replace(
            W.encode(), b"http://purl.oclc.org/ooxml/wordprocessingml/main")
    strict = rezip(data, replace={"word/document.xml": document})
    with pytest.raises(CounterdraftError, match="Strict Open XML"):
        open_docx_package(_write(tmp_path, strict, "strict.docx"))


def test_other_office_package_refused(tmp_path):
    """A spreadsheet's main part is SpreadsheetML, not WordprocessingML."""
    workbook = (b'<workbook xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main">'
                b"<sheets/></workbook>")
    data = healthy_docx()
    with zipfile.ZipFile(_write(tmp_path, data)) as zf:
        rels = zf.read("_rels/.rels").replace(b"word/document.xml", b"xl/workbook.xml")
    sheet = rezip(data, drop=("word/document.xml",),
                  replace={"xl/workbook.xml": workbook, "_rels/.rels": rels})
    with pytest.raises(CounterdraftError, match="not a Word document"):
        open_docx_package(_write(tmp_path, sheet, "book.docx"))


def test_other_compound_file(tmp_path):
    """[MS-CFB]: a compound file with neither a WordDocument nor an EncryptedPackage stream."""
    with pytest.raises(CounterdraftError, match="OLE compound file"):
        open_docx_package(_write(tmp_path, compound_file(["Workbook"]), "book.docx"))


def test_compound_file_with_damaged_directory_still_told_apart(tmp_path):
    damaged = bytearray(compound_file(["EncryptionInfo", "EncryptedPackage"]))
    damaged[48:52] = b"\x00\x00\x00\x7f"  # first directory sector far outside the file
    with pytest.raises(CounterdraftError, match="password-protected"):
        open_docx_package(_write(tmp_path, bytes(damaged), "locked.docx"))


@pytest.mark.parametrize(
    ("head", "expected"),
    [
        # XML 1.0 §2.8: the doctypedecl sits in the prolog, after the XML declaration and any
        # comments or processing instructions, before the root element.
        (b'<?xml version="1.0"?><!DOCTYPE x><x/>', True),
        (b'\xef\xbb\xbf<?xml version="1.0"?>\n<!-- c -->\n<?pi x?>\n<!DOCTYPE x [ ]><x/>', True),
        ('<?xml version="1.0" encoding="UTF-16"?><!DOCTYPE x><x/>'.encode("utf-16"), True),
        (b'<?xml version="1.0"?><x><!-- <!DOCTYPE in a comment --></x>', False),
        (b'<?xml version="1.0"?><w:t>&lt;!DOCTYPE is text here</w:t>', False),
        (b'<?xml version="1.0"?><x/>', False),
    ],
)
def test_has_doctype(head, expected):
    assert has_doctype(head) is expected


def test_rtf_and_pdf_named_docx(tmp_path):
    with pytest.raises(CounterdraftError, match="RTF"):
        open_docx_package(_write(tmp_path, b"{\\rtf1\\ansi Hello}", "a.docx"))
    with pytest.raises(CounterdraftError, match="PDF"):
        open_docx_package(_write(tmp_path, b"%PDF-1.7\n...", "b.docx"))
