"""A review of a PDF or .odt draft against the .docx precedent finds what a review of the
same draft as .docx finds: every planted substantive edit, and at most one substantive
deviation more per document.

Outside references: licence and EULA texts of ``licensedcode-data`` (mpl-2.0, gpl-3.0,
apache-2.0, altova-eula) with substantive edits planted by hand (the cases of
tests/core/export/test_counter_draft_licences.py), written to .docx with real auto-numbering
in two house styles and converted to PDF and .odt by LibreOffice headless
(tests/support/printed.py); LibreOffice also accepts the tracked changes of the counter-draft
written for a PDF draft.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from core.decisions import Decision
from core.docx.validate import validate_docx
from core.export import write_counter_draft
from core.readers import read_document
from core.review import run_review
from tests.core.export.test_counter_draft_licences import CASES, _draft_text, _renamed
from tests.support.legal_texts import license_text
from tests.support.licence_docx import licence_docx, smart_quotes
from tests.support.lo_session import libreoffice
from tests.support.printed import STYLES, print_licences

#: Substantive deviations a PDF or .odt review may report beyond the .docx review of the
#: same draft (the issue's acceptance figure).
MAX_FALSE_SUBSTANTIVE = 1


@pytest.fixture(scope="module")
def drafts(tmp_path_factory) -> dict[tuple[str, str], Path]:
    """(key, style) -> the planted draft as .docx (with .pdf and .odt beside it), and the
    precedent for each key as ``(key, "precedent")``."""
    root = tmp_path_factory.mktemp("planted")
    texts = {key: _draft_text(key, case) for key, case in CASES.items()}
    out: dict[tuple[str, str], Path] = {}
    for style in STYLES:
        for key, path in print_licences(root / style, sorted(CASES), style=style, texts=texts, seed=11).items():
            out[(key, style)] = path
    for key in CASES:
        precedent = root / f"{key}-precedent.docx"
        precedent.write_bytes(licence_docx(key, text=smart_quotes(license_text(key))))
        out[(key, "precedent")] = precedent
    return out


def _words(text: str) -> list[str]:
    return re.findall(r"\w+", text.casefold())


def _substantive(review):
    return [d for d in review.deviations if d.category == "substantive"]


def _found(devs, old: str, new: str) -> bool:
    """A planted edit is found when one substantive deviation shows its changed words: the
    words only the draft's phrase has among the deviation's draft words, and the words only
    the precedent's among its precedent words."""
    added = set(_words(new)) - set(_words(old))
    removed = set(_words(old)) - set(_words(new))
    return any(added <= set(_words(d.draft_text)) and removed <= set(_words(d.precedent_text)) for d in devs)


def _shown(d) -> tuple[str, str]:
    return (" ".join(_words(d.precedent_text)), " ".join(_words(d.draft_text)))


@pytest.mark.parametrize("style", sorted(STYLES))
@pytest.mark.parametrize("suffix", [".pdf", ".odt"])
@pytest.mark.parametrize("key", sorted(CASES))
def test_planted_edits_are_found_with_at_most_one_false_deviation(drafts, key, style, suffix):
    precedent = read_document(str(drafts[(key, "precedent")]))
    docx = drafts[(key, style)]
    reference = _substantive(run_review(read_document(str(docx)), precedent))
    review = _substantive(run_review(read_document(str(docx.with_suffix(suffix))), precedent))
    case = CASES[key]
    for old, new in case.plants:
        new = smart_quotes(_renamed(new, case.rename))
        assert _found(reference, smart_quotes(old), new), f"the .docx review misses {old!r}"
        assert _found(review, smart_quotes(old), new), f"{key}{suffix} ({style}): {old!r} -> {new!r} not found"
    expected = {_shown(d) for d in reference}
    extra = [d for d in review if _shown(d) not in expected]
    assert len(extra) <= MAX_FALSE_SUBSTANTIVE, [(d.precedent_text, d.draft_text, d.reasons) for d in extra]


def test_the_counter_draft_of_a_pdf_draft_gives_back_the_precedent(drafts, tmp_path):
    """gpl-3.0 (no renamed term): reverting every substantive deviation of the PDF draft
    and accepting all tracked changes in LibreOffice gives the precedent's provisions."""
    precedent_path = drafts[("gpl-3.0", "dense")].parent.parent / "gpl-3.0-precedent.docx"
    pdf = drafts[("gpl-3.0", "dense")].with_suffix(".pdf")
    precedent = read_document(str(precedent_path))
    review = run_review(read_document(str(pdf)), precedent)
    out = tmp_path / "counter.docx"
    notes = write_counter_draft(review, [Decision(d.id, "revert") for d in _substantive(review)], out,
                                draft_path=str(pdf), author="Counterdraft Test")
    assert "the draft is a PDF" in notes[0] and "new .docx" in notes[0]
    assert validate_docx(out) == []  # our ECMA-376 §17.13 markup check
    accepted = tmp_path / "accepted.docx"
    view = libreoffice().inspect(out, action="accept", save_as=accepted)  # LibreOffice accepts all
    assert view.redlines_before > 0 and view.redlines_after == 0
    got = read_document(str(accepted))
    assert [_words(p.text) for p in got.provisions if p.text] == \
        [_words(p.text) for p in precedent.provisions if p.text]
