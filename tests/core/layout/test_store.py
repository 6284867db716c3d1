"""The precedent set's own line model: trained on the set's formatted agreements when a PDF
is read with the set, kept while they stay the same, trained again when they change, and
not made for a set too small to teach it.

The agreements are the invented demo set's (.docx files written with real auto-numbering by
demo_agreements/generate.py); the PDF is hand-built (ISO 32000-1 §7.5, tests/support/minimal_pdf.py).
"""

from __future__ import annotations

import shutil
from pathlib import Path

from core.layout.labeller import LineLabeller
from core.layout.store import MIN_SET_DOCUMENTS, structure_for
from core.readers import read_document
from tests.support.minimal_pdf import pdf_bytes

DEMO_SET = Path(__file__).resolve().parents[3] / "demo_agreements" / "precedent_set"


def _set(folder: Path, count: int) -> Path:
    folder.mkdir()
    for src in sorted(DEMO_SET.glob("*.docx"))[:count]:
        shutil.copy(src, folder / src.name)
    return folder


def _pdf(folder: Path) -> Path:
    path = folder / "draft.pdf"
    path.write_bytes(pdf_bytes(content="BT /F1 12 Tf 72 700 Td (1. The Supplier shall deliver.) Tj ET", font=True))
    return path


def test_the_set_model_is_trained_kept_and_trained_again(tmp_path):
    library = _set(tmp_path / "set", MIN_SET_DOCUMENTS + 1)
    pdf = _pdf(tmp_path)
    model, notes = structure_for(pdf, library)
    assert isinstance(model, LineLabeller) and model.documents == MIN_SET_DOCUMENTS + 1
    assert notes and "trained again" in notes[0]
    stored = library / ".counterdraft" / "layout"
    lines_files = {p.name for p in stored.glob("*.npz")} - {"model.npz"}
    assert len(lines_files) == MIN_SET_DOCUMENTS + 1  # one per agreement, by SHA-256
    stamp = (stored / "model.npz").stat().st_mtime_ns

    again, notes = structure_for(pdf, library)  # nothing changed: the stored model
    assert notes == () and (stored / "model.npz").stat().st_mtime_ns == stamp
    assert again is not None and again.lines == model.lines

    victim = sorted(library.glob("*.docx"))[0]
    victim.unlink()
    changed, notes = structure_for(pdf, library)
    assert changed is not None and changed.documents == MIN_SET_DOCUMENTS and "trained again" in notes[0]
    assert len({p.name for p in stored.glob("*.npz")} - {"model.npz"}) == MIN_SET_DOCUMENTS
    # the PDF is read with it
    assert [p.number for p in read_document(str(pdf), structure=changed).provisions] == ["1"]


def test_a_small_set_leaves_the_default_model(tmp_path):
    library = _set(tmp_path / "small", MIN_SET_DOCUMENTS - 1)
    model, notes = structure_for(_pdf(tmp_path), library)
    assert model is None and "default model" in notes[0]


def test_a_docx_draft_needs_no_line_model(tmp_path):
    library = _set(tmp_path / "set", 1)
    assert structure_for(sorted(library.glob("*.docx"))[0], library) == (None, ())
