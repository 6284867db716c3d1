"""Laws of the structure reader's fast paths, each against the direct form it replaces.

* :func:`core.structure._definitions_intro` searches its pattern only where the words the
  pattern needs are; the reference is Python's ``re`` searching the pattern over the whole
  text.
* :func:`core.structure._caps_run_in` reads words only up to the first not in capitals; the
  reference lists every word of the text first (the earlier form, kept here).
* :func:`core.structure.is_upper_text` stops at the first letter not in capitals; the
  reference lists every letter first (Python's ``str.isalpha`` / ``str.isupper``).
"""

from __future__ import annotations

import re

from hypothesis import given, settings
from hypothesis import strategies as st

from core.structure import (
    _CAPS_CONNECTORS,
    _CAPS_WORD_RE,
    _DEFINITIONS_INTRO_RE,
    _RECITAL_TEXT_RE,
    _SENTENCE_STARTERS,
    MAX_RUN_IN_WORDS,
    MIN_CAPS_HEADING_LETTERS,
    _caps_run_in,
    _clean_heading,
    _definitions_intro,
    is_upper_text,
)

_INTRO_PIECES = (" ", "  ", "\n", ":", ".", "the", "following", "FOLLOWING", "ſhall", "İn", "ın",
                 "words", "terms", "expressions", "definitions", "Definitions", "apply", "APPLY",
                 "shall", "have", "the", "meanings", "In", "in", "this", "Agreement", "x")


@settings(max_examples=1500, deadline=None)
@given(st.builds(lambda parts, sep: sep.join(parts), st.lists(st.sampled_from(_INTRO_PIECES), max_size=14),
                 st.sampled_from(["", " "])))
def test_definitions_intro_equals_a_search_of_its_pattern(text: str) -> None:
    assert _definitions_intro(text) == (_DEFINITIONS_INTRO_RE.search(text) is not None)


def _caps_run_in_direct(rest: str) -> tuple[str, int] | None:
    """The earlier form: every word listed, then the leading capitals counted."""
    words = list(re.finditer(r"\S+", rest))
    count = 0
    for w in words:
        token = w.group()
        if _CAPS_WORD_RE.fullmatch(token.rstrip(",")) is None and token not in _CAPS_CONNECTORS:
            break
        count += 1
    if count == 0 or count >= len(words) or count > MAX_RUN_IN_WORDS:
        return None
    head = rest[:words[count - 1].end()]
    nxt = words[count].group()
    if not (nxt[:1].isupper() and any(ch.islower() for ch in nxt)):
        return None
    if count == 1 and sum(ch.isalpha() for ch in head) < MIN_CAPS_HEADING_LETTERS:
        return None
    if head.split()[0].lower() in _SENTENCE_STARTERS or _RECITAL_TEXT_RE.match(head):
        return None
    return _clean_heading(head), words[count].start()


_CAPS_PIECES = (" ", "  ", "\t", "\n", ",", "EXPORT", "RESTRICTIONS", "TERM", "AND", "&", "-", "–", "/",
                "WHEREAS", "THE", "GDPR", "Licensee", "shall", "The", "x", "AB", "A", "1")


_CAPITALS = ("EXPORT", "RESTRICTIONS", "TERM", "AND", "&", "-", "GDPR", "AB", "WHEREAS", "THE,")
#: Texts opening with words in capitals more often than not (the case the reader looks for).
_CAPS_TEXTS = st.builds(lambda head, tail, sep: " ".join(head) + sep + sep.join(tail),
                        st.lists(st.sampled_from(_CAPITALS), max_size=12),
                        st.lists(st.sampled_from(_CAPS_PIECES), max_size=8), st.sampled_from(["", " "]))


@settings(max_examples=1500, deadline=None)
@given(_CAPS_TEXTS)
def test_caps_run_in_equals_the_direct_form(rest: str) -> None:
    assert _caps_run_in(rest) == _caps_run_in_direct(rest)


def test_caps_run_in_finds_a_heading() -> None:
    # Common practice, no source: a heading in capitals run into the sentence.
    assert _caps_run_in("EXPORT RESTRICTIONS Licensee shall comply") == ("EXPORT RESTRICTIONS", 20)


@settings(max_examples=1500, deadline=None)
@given(st.text(alphabet="aAbZ 1.ßÉéǅʰªΣσ", max_size=12))
def test_upper_text_equals_the_list_of_its_letters(text: str) -> None:
    # Includes letters without case (modifier letters), title case (ǅ) and ß.
    letters = [ch for ch in text if ch.isalpha()]
    assert is_upper_text(text) == (len(letters) >= 2 and all(ch.isupper() for ch in letters))
