"""PDF and OpenDocument drafts recover the structure of the .docx they were printed from.

Outside references: licence and EULA texts of ``licensedcode-data`` (the ScanCode licence
database; keys in tests/core/conftest.py and tests/support/layout_corpus.py) written to .docx
with real auto-numbering (ECMA-376 Part 1 §17.9) in two house styles, converted to PDF and
.odt by LibreOffice headless (tests/support/printed.py); the .docx reading is the reference,
compared provision by provision with ``difflib.SequenceMatcher`` (tests/support/structure_match.py).
None of these texts, nor any of their family, trained the shipped line model.
"""

from __future__ import annotations

import pytest

from core.readers import read_document
from tests.support.structure_match import match_provisions

#: Share of provisions (boundaries, labels, headings, levels) the PDF reading must recover
#: over a set of documents (the issue's acceptance figure).
MIN_PDF_SHARE = 0.98
#: ... and in any one document (one merged or split paragraph in a short licence costs two
#: or three points).
MIN_PDF_SHARE_EACH = 0.93
#: An .odt carries its paragraphs and list labels: its reading must equal the .docx's.
MIN_ODT_SHARE = 1.0


def _scores(printed, suffix):
    out = {}
    for (key, style), docx in printed.items():
        out[(key, style)] = match_provisions(read_document(str(docx)),
                                             read_document(str(docx.with_suffix(suffix))))
    return out


def _check(scores, minimum, each):
    matched = sum(m.matched for m in scores.values())
    total = sum(m.total for m in scores.values())
    worst = {k: m for k, m in scores.items() if m.share < each}
    assert matched / total >= minimum, (matched, total, {k: m.missed[:3] for k, m in scores.items() if m.missed})
    assert not worst, {k: (round(m.share, 3), m.missed[:3]) for k, m in worst.items()}
    return matched, total


def test_pdf_structure_matches_the_docx_reading(printed_licences):
    _check(_scores(printed_licences, ".pdf"), MIN_PDF_SHARE, MIN_PDF_SHARE_EACH)


def test_odt_structure_equals_the_docx_reading(printed_licences):
    _check(_scores(printed_licences, ".odt"), MIN_ODT_SHARE, MIN_ODT_SHARE)


@pytest.mark.slow
def test_pdf_and_odt_structure_on_every_test_text(printed_licences_all):
    m, t = _check(_scores(printed_licences_all, ".pdf"), MIN_PDF_SHARE, MIN_PDF_SHARE_EACH)
    print(f"PDF: {m}/{t} provisions recovered ({m / t:.4f})")
    m, t = _check(_scores(printed_licences_all, ".odt"), MIN_ODT_SHARE, MIN_ODT_SHARE)
    print(f"ODT: {m}/{t} provisions recovered ({m / t:.4f})")


def test_a_pdf_draft_keeps_the_docx_labels_and_words(printed_licences):
    """Every number label of the .docx (auto-numbering, rendered by our ECMA-376 reader) is a
    provision number of the PDF reading, in the same order."""
    docx = printed_licences[("mpl-2.0", "dense")]
    ref = [p.number for p in read_document(str(docx)).provisions if p.number]
    got = [p.number for p in read_document(str(docx.with_suffix(".pdf"))).provisions if p.number]
    assert got == ref
