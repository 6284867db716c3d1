"""List labels written into sentences and blanks of a form (core.review.noise).

Texts: excerpts of the licences shipped in the PyPI package ``licensedcode-data`` (the
ScanCode licence database: ``cc-by-3.0``, ``cc-by-2.5``, ``apache-2.0``, ``gpl-2.0``), their
lines joined as the text reader joins them.  Where a check rests on drafting usage rather
than on a text, it says so (common practice, no source).
"""

from __future__ import annotations

from core.review.noise import blank_at, empty_field_at, is_blank_fill, label_spans

from .helpers import excerpt


def labels(text: str) -> list[str]:
    return [text[a:b] for a, b in label_spans(text)]


def test_labels_of_items_listed_in_a_sentence():
    # cc-by-3.0, section 4(b): "(i) the name of the Original Author ... ; (ii) the title
    # of the Work if supplied; (iii) to the extent reasonably practicable, the URI"
    text = excerpt("cc-by-3.0", "You are utilizing: (i)", "(iii) to the extent")
    assert labels(text) == ["(i)", "(ii)", "(iii)"]


def test_labels_that_open_a_line_or_follow_a_sentence():
    # cc-by-3.0, section 8: items "b." and "c." follow the end of the previous sentence
    # once the lines are joined.
    text = excerpt("cc-by-3.0", "8. Miscellaneous", "c. If any provision")
    assert labels(text) == ["8.", "b.", "c."]
    assert labels("2.Scope of this Licence") == ["2."]  # glued to its heading


def test_references_to_items_and_figures_in_brackets_are_not_labels():
    # cc-by-2.5, section 4(b): "credit as required by clause 4(b), as requested"
    assert labels(excerpt("cc-by-2.5", "credit as required by", "as requested")) == []
    # a figure repeated in brackets, an item named by a reference word, a version number
    # after a word (common practice in English-language agreements, no source)
    assert labels("within thirty (30) days of the notice") == []
    assert labels("the costs under clause (b) above") == []
    assert labels("under version 2. The Licensee") == []


def test_blanks_of_licence_templates():
    # apache-2.0, appendix: "Copyright [yyyy] [name of copyright owner]"
    apache = excerpt("apache-2.0", "Copyright [yyyy]", "copyright owner]")
    assert blank_at(apache, (10, 16)) == (10, 16)
    assert blank_at(apache, (11, 15)) == (10, 16)  # inside the blank: the whole blank
    assert blank_at(apache, (10, len(apache))) == (10, len(apache))  # both blanks
    assert blank_at(apache, (0, 9)) is None  # "Copyright" is no blank
    # gpl-2.0, "How to Apply These Terms": "Copyright (C) <year>  <name of author>"
    gpl = excerpt("gpl-2.0", "Copyright (C) <year>", "<name of author>")
    assert blank_at(gpl, (gpl.index("<year>"), gpl.index("<year>") + 6)) is not None


def test_blanks_of_agreement_forms():
    # "[●]", a line of underscores and an empty "Name:" line (common practice in
    # agreement templates, no source)
    text = "The Term is [●] months.\nSigned: ____________\nName:\nTitle: Director"
    assert is_blank_fill(text, (12, 15)) == (12, 15)
    k = text.index("_")
    assert is_blank_fill(text, (k, k + 12)) == (k, k + 12)
    after_name = text.index("Name:") + 5
    assert empty_field_at(text, after_name)
    assert empty_field_at(text, after_name + 1)  # just after the line break
    assert not empty_field_at(text, len(text))  # "Title: Director" is filled
    assert is_blank_fill(text, (after_name, after_name)) == (after_name, after_name)
