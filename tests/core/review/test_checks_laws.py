"""Laws of the drafting checks' text helpers, each against a slow reference: the backward
read of "the word before a phrase" equals a search of its published pattern from the start of
the text (quadratic on a long provision); the indexed defined names answer "is this phrase part
of a name, or a name part of it" as a pass over every name does."""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st

from core.review.checks import _PREVIOUS_WORD_RE, _NameParts, _word_before


@settings(max_examples=500, deadline=None)
@given(st.text(alphabet="aZé \t\n.", max_size=40), st.data())
def test_word_before_equals_a_search_of_its_pattern(text: str, data: st.DataObject) -> None:
    end = data.draw(st.integers(0, len(text)))
    m = _PREVIOUS_WORD_RE.search(text, 0, end)
    assert _word_before(text, end) == (m.group("word") if m else None)


def _overlaps_directly(words: tuple[str, ...], names: set[tuple[str, ...]]) -> bool:
    """The slow reference: every name compared with the phrase, shorter inside longer."""
    for n in names:
        short, long_ = (words, n) if len(words) <= len(n) else (n, words)
        if any(long_[i:i + len(short)] == short for i in range(len(long_) - len(short) + 1)):
            return True
    return False


_KEYS = st.lists(st.sampled_from("abcd"), max_size=4).map(tuple)


@settings(max_examples=500, deadline=None)
@given(st.sets(_KEYS, max_size=6), _KEYS)
def test_name_parts_answer_as_a_pass_over_every_name(names: set[tuple[str, ...]], words: tuple[str, ...]) -> None:
    assert _NameParts(names).overlaps(words) == _overlaps_directly(words, names)
