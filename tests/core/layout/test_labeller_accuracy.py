"""The learned line labeller against the fixed rules, on plain text of documents it was not
trained on.

Plain text here is the text layer of a PDF with its fonts thrown away: each printed line as
a text line, its indent as spaces, a blank line where the page leaves space between lines
(:func:`core.layout.assemble.lines_as_text`) -- what a PDF-to-text export gives.  The fixed
rules read it as any .txt (core.text_reader, then core.structure); the labeller reads the
same lines (:func:`core.layout.lines.lines_from_text`), then core.structure.  Both are scored
against the .docx reading of the document the PDF was printed from, provision by provision
(tests/support/structure_match.py, difflib as the reference).

Split between training and test documents: the shipped model was trained on the licence
texts of ``tests.support.layout_corpus.training_keys()`` (90 texts, the keys are in the
model's ``trained_on``); these tests use ``TEST_KEYS``, of families none of the training texts
belongs to (and sharing at most a fifth of their word 5-grams with any of them).
Outside references: licensedcode-data's texts, LibreOffice headless (tests/support/printed.py).
"""

from __future__ import annotations

import pytest

from core.layout.assemble import blocks_from_lines, lines_as_text
from core.layout.cleanup import drop_running
from core.layout.lines import lines_from_text
from core.readers import document_from_blocks, read_document, read_text
from core.readers.pdf import pdf_lines
from tests.support.structure_match import match_provisions


def _plain_scores(printed):
    rules = [0, 0]
    model = [0, 0]
    for docx in printed.values():
        reference = read_document(str(docx))
        lines, _ = pdf_lines(str(docx.with_suffix(".pdf")))
        text = lines_as_text(drop_running(lines)[0])
        by_rules = match_provisions(reference, read_text(text, source="plain.txt"))
        blocks, _notes = blocks_from_lines(lines_from_text(text))
        by_model = match_provisions(reference, document_from_blocks(blocks, source="plain.txt"))
        for acc, m in ((rules, by_rules), (model, by_model)):
            acc[0] += m.matched
            acc[1] += m.total
    return rules, model


def test_the_model_beats_the_fixed_rules_on_plain_text(printed_licences):
    rules, model = _plain_scores(printed_licences)
    assert model[0] / model[1] > rules[0] / rules[1]
    assert model[0] / model[1] >= 0.95


@pytest.mark.slow
def test_the_model_beats_the_fixed_rules_on_every_test_text(printed_licences_all):
    rules, model = _plain_scores(printed_licences_all)
    print(f"plain text: fixed rules {rules[0]}/{rules[1]} = {rules[0] / rules[1]:.4f}, "
          f"line model {model[0]}/{model[1]} = {model[0] / model[1]:.4f}")
    assert model[0] / model[1] > rules[0] / rules[1]
