"""The readers registry: a reader picked by content first, by suffix otherwise.

Outside references: the zip signature ``PK\\x03\\x04`` (PKWARE APPNOTE §4.3.7), a .docx
package's main part ``word/document.xml`` (ECMA-376 Part 2), the ODF ``mimetype`` member
(ISO/IEC 26300-3 §3.3) and the PDF header ``%PDF-`` (ISO 32000-1 §7.5.2).
"""

from __future__ import annotations

import io
import zipfile

import pytest

from core.errors import CounterdraftError
from core.readers import (
    FORMATS,
    PRECEDENT_SET_SUFFIXES,
    SUPPORTED_SUFFIXES,
    accepts_name,
    dialog_filter,
    identify,
    read_document,
)
from tests.support.bad_inputs import healthy_docx


def _zip(members: dict[str, bytes]) -> bytes:
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w") as zf:
        for name, data in members.items():
            zf.writestr(name, data)
    return out.getvalue()


def test_every_suffix_belongs_to_one_format_and_is_lower_case():
    assert len(SUPPORTED_SUFFIXES) == len(set(SUPPORTED_SUFFIXES))
    assert all(s.startswith(".") and s == s.lower() for s in SUPPORTED_SUFFIXES)
    assert set(PRECEDENT_SET_SUFFIXES) <= set(SUPPORTED_SUFFIXES)
    assert {f.name for f in FORMATS} == {"docx", "odt", "pdf", "text", "markdown"}
    assert ".pdf" not in PRECEDENT_SET_SUFFIXES  # a set holds the firm's editable agreements


def test_a_docx_named_txt_is_read_as_a_docx_with_a_warning(tmp_path):
    path = tmp_path / "sent-as.txt"
    path.write_bytes(healthy_docx())  # a zip holding word/document.xml: ECMA-376 Part 2
    assert identify(path).name == "docx"
    doc = read_document(str(path))
    assert [p.text for p in doc.provisions][:2] == ["The Supplier shall supply the Goods.",
                                                    "The Customer shall pay the Price."]
    assert any("Word document" in w and ".txt" in w for w in doc.warnings)


def test_a_plain_text_file_named_docx_still_gets_the_docx_readers_message(tmp_path):
    path = tmp_path / "notes.docx"
    path.write_bytes(b"Just some plain text, not a package.\n")
    assert identify(path).name == "docx"  # nothing in the content says otherwise: by suffix
    with pytest.raises(CounterdraftError, match="not a zip"):
        read_document(str(path))


def test_other_opendocument_types_are_refused_by_their_mimetype(tmp_path):
    path = tmp_path / "figures.odt"
    # ISO/IEC 26300-3 §3.3: the first member "mimetype" names the document's media type.
    path.write_bytes(_zip({"mimetype": b"application/vnd.oasis.opendocument.spreadsheet",
                           "content.xml": b"<x/>"}))
    with pytest.raises(CounterdraftError, match="OpenDocument spreadsheet") as info:
        identify(path)
    assert str(info.value).startswith(str(path))


def test_the_text_pdf_header_alone_does_not_make_a_text_file_a_pdf(tmp_path):
    path = tmp_path / "notes.txt"
    path.write_text("Our notes: the file format signature %PDF-1.7 appears here.\n", encoding="utf-8")
    assert identify(path).name == "text"


def test_names_the_window_accepts_are_the_registrys():
    for suffix in SUPPORTED_SUFFIXES:
        assert accepts_name(f"Agreement{suffix.upper()}")
        assert f"*{suffix}" in dialog_filter()
    assert not accepts_name("budget.xlsx")


def test_pdf_and_odt_are_told_by_content_whatever_their_name(tmp_path):
    from tests.support.minimal_pdf import pdf_bytes
    from tests.support.odt_fixtures import odt_bytes

    pdf = tmp_path / "draft.docx"
    pdf.write_bytes(pdf_bytes(content="BT /F1 12 Tf 72 700 Td (1. Goods.) Tj ET", font=True))
    assert identify(pdf).name == "pdf"  # ISO 32000-1 §7.5.2: the header
    doc = read_document(str(pdf))
    assert any("PDF" in w and ".docx" in w for w in doc.warnings)
    odt = tmp_path / "draft.txt"
    odt.write_bytes(odt_bytes("<text:p>1. Goods.</text:p>"))
    assert identify(odt).name == "odt"  # ISO/IEC 26300-3 §3.3: the mimetype member
