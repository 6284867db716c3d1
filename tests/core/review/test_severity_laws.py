"""Laws of the severity helpers that long provisions lean on: the cached, bisected sentence
bounds equal a direct scan of the text (the slow reference below, which re-reads the text from
its start for every span)."""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st

from core.review.severity import _SENTENCE_BREAK_RE, sentence_bounds


def _direct_sentence_bounds(text: str, span: tuple[int, int]) -> tuple[int, int]:
    a, b = span
    start = 0
    for m in _SENTENCE_BREAK_RE.finditer(text, 0, a):
        start = m.end()
    m = _SENTENCE_BREAK_RE.search(text, max(b, start))
    end = m.start() if m else len(text)
    return start, max(end, b)


_TEXT = st.text(alphabet="ab .;!?\n\t", max_size=80)


@settings(max_examples=400, deadline=None)
@given(_TEXT, st.data())
def test_sentence_bounds_equal_a_direct_scan(text: str, data: st.DataObject) -> None:
    a = data.draw(st.integers(0, len(text)))
    b = data.draw(st.integers(a, len(text)))
    assert sentence_bounds(text, (a, b)) == _direct_sentence_bounds(text, (a, b))
