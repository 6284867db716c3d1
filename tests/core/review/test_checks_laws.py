"""Laws of the drafting checks' text helpers, each against a slow reference: the backward
read of "the word before a phrase" equals a search of its published pattern from the start of
the text (quadratic on a long provision); the indexed defined names answer "is this phrase part
of a name, or a name part of it" as a pass over every name does; the names' finder, which
searches a lower-cased text where it can, finds what Python's re finds ignoring case; the
marked names, each pattern searched only where its cue words are, are those of every pattern
searched everywhere.  Real texts: the licences of licensedcode-data (PyPI)."""

from __future__ import annotations

import re

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from core.review import checks
from core.review.checks import _PREVIOUS_WORD_RE, _NameParts, _word_before

from .helpers import LICENCES, licence_text


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


def _found_ignoring_case(forms: list[str], text: str) -> list[tuple[int, str]]:
    """The slow reference: the names' pattern searched with re.IGNORECASE in *text* itself."""
    source = checks._names_source(forms)
    assert source is not None
    return [(m.start(), checks._fold(checks._strip_possessive(m.group(0))))
            for m in re.finditer(source, text, re.IGNORECASE)]


_NAMES = ["Licensor", "Source Code", "Contributor", "Work", "Derivative Works", "You", "Covered Software",
          "Program", "Modifications"]


@pytest.mark.parametrize("key", LICENCES)
def test_names_found_as_re_finds_them_ignoring_case(key: str) -> None:
    forms = [checks._fold(n) for n in _NAMES]
    find = checks._folded_finder(forms)
    for text in licence_text(key).split("\n\n"):
        assert find(text) == _found_ignoring_case(forms, text)


@settings(max_examples=500, deadline=None)
@given(st.text(alphabet="wOrkSsK\u0131\u017f\u0130\u212a\u00e9'\u2019- \n", max_size=40))
def test_names_found_as_re_finds_them_ignoring_case_whatever_the_letters(text: str) -> None:
    # dotless i, long s, capital I with a dot and the kelvin sign are the letters whose
    # case Python's re and str.lower() treat differently
    forms = ["work", "works", "sk", "\u00e9s"]
    assert checks._folded_finder(forms)(text) == _found_ignoring_case(forms, text)


def _marked_everywhere(texts: list[str]) -> set[str]:
    """The slow reference: every pattern of :func:`checks._marked_names` searched in every
    text."""
    out: set[str] = set()
    for t in texts:
        for m in checks._QUOTED_RE.finditer(t):
            body = next(g for g in m.groups() if g is not None)
            out.add(" ".join(body.strip(" ,.;:").split()).casefold())
        for rx, _cues in checks._NAME_MARKS:
            out.update(" ".join(m.group("name").split()).casefold() for m in rx.finditer(t))
    return {n for n in out if n}


@pytest.mark.parametrize("key", [*LICENCES, "cddl-1.0", "epl-1.0", "bsd-new"])
def test_marked_names_are_those_of_every_pattern_searched_everywhere(key: str) -> None:
    texts = licence_text(key).split("\n\n")
    assert checks._marked_names(texts) == _marked_everywhere(texts)


@settings(max_examples=300, deadline=None)
@given(st.lists(st.sampled_from(["the Licensor", "(the Supplier)", "hereinafter", "is referred to as",
                                 "called", "Confidential Information", "as defined below", "set out",
                                 "set\tforth", "described", "Fees:", "known as the", "Customer", "and"]),
                max_size=8))
def test_marked_names_gated_equal_ungated_on_any_wording(parts: list[str]) -> None:
    text = " ".join(parts)
    assert checks._marked_names([text]) == _marked_everywhere([text])


def test_the_word_keys_kept_are_those_computed_afresh() -> None:
    names = ["Front-Cover Texts", "Distributing", "Licensor's", "Source Code"]
    kept = [checks._word_key(n) for n in names]
    checks.clear_name_cache()
    assert [checks._word_key.__wrapped__(n) for n in names] == kept
    assert kept[0] == ("front", "cov", "text")  # the function's documented example
