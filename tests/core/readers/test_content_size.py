"""How much a file holds to parse (core.readers.content_size), which decides whether two
agreements are read side by side."""

from __future__ import annotations

from pathlib import Path


def test_content_size_counts_a_package_uncompressed(tmp_path) -> None:
    # reference: the sizes the zip directory records (APPNOTE.TXT, read by the standard
    # library's zipfile), and the file system's size for other files
    import zipfile

    from core.readers import content_size

    docx = Path(__file__).resolve().parents[3] / "demo_agreements" / "draft.docx"
    with zipfile.ZipFile(docx) as zf:
        assert content_size(docx) == sum(i.file_size for i in zf.infolist()) > docx.stat().st_size
    text = tmp_path / "draft.txt"
    text.write_text("1. Services\nThe Supplier shall provide the Services.\n")
    assert content_size(text) == text.stat().st_size
    assert content_size(tmp_path / "missing.docx") == 0
