"""Page clean-up: running headers, footers and page numbers dropped; hyphenation undone by
the document's own vocabulary.

The pages here are built line by line (positions in points as a PDF gives them); which
lines are running heads and which breaks are hyphenations is stated by each test (common
practice of typesetting, no source)."""

from __future__ import annotations

from collections import Counter

from core.layout.cleanup import drop_running, join_lines, vocabulary
from core.layout.lines import Line


def _line(text: str, page: int, top: float) -> Line:
    return Line(text=text, page=page, x0=72.0, x1=72.0 + 5 * len(text), top=top, bottom=top + 11,
                size=11.0, bold=0.0, italic=0.0)


def _pages(n: int) -> list[Line]:
    out = []
    for p in range(n):
        out.append(_line("Master Supply Agreement \u2013 Draft 3", p, 36))
        for k in range(5):
            out.append(_line(f"Body line {k} of page {p} with the words of the agreement.", p, 72 + 14 * k))
        out.append(_line(f"Page {p + 1} of {n}", p, 750))
    return out


def test_running_header_and_page_numbers_are_dropped():
    lines = _pages(4)
    kept, dropped = drop_running(lines)
    assert dropped == 8
    assert [ln.text for ln in kept] == [ln.text for ln in lines if ln.text.startswith("Body")]


def test_a_line_repeated_at_another_height_stays():
    lines = _pages(3)
    # The same words inside the body of one page are text, not a running head.
    lines.insert(3, _line("Master Supply Agreement \u2013 Draft 3", 0, 100))
    kept, _ = drop_running(lines)
    assert sum(ln.text.startswith("Master") for ln in kept) == 1


def test_a_one_page_document_keeps_everything():
    lines = _pages(1)
    kept, dropped = drop_running(lines)
    assert dropped == 0 and len(kept) == len(lines)


def test_hyphenation_is_undone_when_the_document_knows_the_word():
    vocab = Counter({"agreement": 3, "royalty-free": 2})
    assert join_lines(["This Agree-", "ment binds"], vocab) == "This Agreement binds"
    assert join_lines(["the Named-", "User licence"], vocab) == "the Named-User licence"  # a capital: kept
    assert join_lines(["this agree-", "ment binds"], vocab) == "this agreement binds"
    assert join_lines(["a royalty-", "free licence"], vocab) == "a royalty-free licence"
    assert join_lines(["a non-", "exclusive licence"], vocab) == "a non-exclusive licence"  # unknown word
    assert join_lines(["95110-", "2704"], vocab) == "95110-2704"
    assert join_lines(["soft\u00ad", "hyphen"], vocab) == "softhyphen"


def test_the_joined_word_must_be_clearly_more_common_than_the_compound():
    vocab = Counter({"email": 2, "e-mail": 1})
    assert join_lines(["by e-", "mail"], vocab) == "by e-mail"


def test_references_and_web_addresses_break_without_a_space():
    vocab = Counter()
    assert join_lines(["under Section 4(c)", "(i) above"], vocab) == "under Section 4(c)(i) above"
    assert join_lines(["see HTTP://EXAMPLE.INVALID/TERMS/", "LICENSING.HTML"], vocab) == \
        "see HTTP://EXAMPLE.INVALID/TERMS/LICENSING.HTML"
    assert join_lines(["two", "lines"], vocab) == "two lines"


def test_vocabulary_leaves_out_the_cut_word():
    counts = vocabulary([_line("the agree-", 0, 0), _line("ment of the parties", 0, 14)])
    assert counts["agree"] == 0 and counts["the"] == 2
