"""Laws of the term finder's fast paths, each against the direct scan it replaces.

* The definition patterns run only where their cues are (:class:`core.terms._Cues`): an
  opening quote for every pattern holding a quoted name, a verb or cue word for most.  With
  every gate open (``direct=True``) each pattern scans the whole text as written; both give
  the same definitions, on generated texts made of the patterns' own words and on the
  provisions of real licence texts (``licensedcode-data``, the ScanCode licence database).
* :func:`core.structure.fold_case` holds a lower-case word wherever ``re.IGNORECASE`` finds
  it (Python's ``re`` is the reference), including the letters ``str.lower`` keeps apart
  (dotted and dotless i, long s).
* The cue of a quoted name (:func:`core.terms._may_quote`) is never False where the quoted
  name pattern finds one.
* The patterns of definitions at the start of a line are tried only where a line starts
  (:func:`core.terms._line_start_matches`): the same matches as ``finditer``.
* The pattern counting uses (:func:`core.terms._uses_regex`) finds what the pattern of
  :func:`core.terms._forms_regex` finds, match for match.
"""

from __future__ import annotations

import re

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from core.reader import read_text
from core.structure import fold_case
from core.terms import (
    _COLLECTIVE_CUES,
    _LONE_QUOTE_RE,
    _QUOTED_LINE_START_RE,
    _QUOTED_RE,
    _UNQUOTED_RE,
    _VERB_CUES,
    _forms_regex,
    _inline_definitions,
    _line_start_matches,
    _may_quote,
    _uses_regex,
)
from tests.support.legal_texts import license_text

#: Pieces of definitional text: quotes of every style, the verbs and cue words the patterns
#: look for (in several cases), names, labels, punctuation and the letters re.IGNORECASE
#: and str.lower treat differently.
_PIECES = (
    " ", " ", "  ", "\n", "\t", '"', "“", "”", "„", "'", "‘", "’", "``", "''", "«", "»", "(", ")", ",",
    ":", ";", ".", "-", "–", "—", "/", "Licensee", "Customer", "Services", "You", "Your", "the", "The",
    "a", "an", "each", "Each", "together", "both", "collectively", "and", "or", "as", "is", "are",
    "means", "MEANS", "mean", "shall mean", "refers to", "refer to", "includes", "is defined",
    "has the meaning", "have the same meanings", "hereinafter", "HEREINAFTER", "hereınafter",
    "called", "referred to as", "known as", "termed", "designated as", "as that term is defined",
    "terms", "corresponding meaning", "has a", "1.1", "(a)", "For the purposes of", "Where",
    "x", "ſ", "İ", "ı", "K",
)
#: Quoting styles (opening, closing) the finder reads, and names to quote.
_QUOTE_PAIRS = (('"', '"'), ("“", "”"), ("‘", "’"), ("'", "'"), ("``", "''"), ("''", "''"), ("«", "»"),
                ("„", "“"), ('"', "''"))
_NAMES = ("Licensee", "Customer Data", "You", "Your", "Services", "the Agreement", "x")
_QUOTED = st.builds(lambda q, n: q[0] + n + q[1], st.sampled_from(_QUOTE_PAIRS), st.sampled_from(_NAMES))
#: Texts of pieces and quoted names, glued or spaced (about one in ten defines a term).
_TEXTS = st.builds(lambda parts, sep: sep.join(parts),
                   st.lists(st.one_of(st.sampled_from(_PIECES), _QUOTED), max_size=30),
                   st.sampled_from(["", " "]))


@settings(max_examples=1500, deadline=None)
@given(_TEXTS, st.booleans())
def test_gated_definitions_equal_the_direct_scan(text: str, in_definitions: bool) -> None:
    assert (_inline_definitions(text, in_definitions=in_definitions)
            == _inline_definitions(text, in_definitions=in_definitions, direct=True))


@pytest.mark.parametrize("name", ["apache-2.0", "gpl-3.0", "mpl-2.0", "cddl-1.0", "eupl-1.2",
                                  "cc-by-4.0", "cecill-2.1", "oracle-mysql-foss-exception-2.0"])
def test_gated_definitions_equal_the_direct_scan_on_licence_texts(name: str) -> None:
    # Source of the words: licensedcode-data's <name>.LICENSE (tests.support.legal_texts).
    doc = read_text(license_text(name), source=f"{name}.txt")
    found = 0
    for p in doc.provisions:
        for flag in (False, True):
            fast = _inline_definitions(p.text, in_definitions=flag)
            assert fast == _inline_definitions(p.text, in_definitions=flag, direct=True)
            found += len(fast)
    assert found > 0  # the check saw definitions, not only texts without any


@settings(max_examples=1500, deadline=None)
@given(_TEXTS, st.sampled_from(["hereinafter", "following", "meanings", "definitions", "apply",
                                "means", "is", "refer", *_VERB_CUES, *_COLLECTIVE_CUES]))
def test_fold_case_holds_every_word_ignorecase_finds(text: str, word: str) -> None:
    # The reference: Python's own re.IGNORECASE matching.
    if re.search(re.escape(word), text, re.IGNORECASE):
        assert word in fold_case(text)


@pytest.mark.parametrize("text,word", [("HEREıNAFTER", "hereinafter"), ("İn this", "in this"),
                                       ("ſhall", "shall"), ("\u212aNOWN", "known")])
def test_fold_case_of_the_letters_lower_keeps_apart(text: str, word: str) -> None:
    assert re.search(word, text, re.IGNORECASE)  # Python's re takes them for the ASCII letter
    assert word in fold_case(text)


@settings(max_examples=1500, deadline=None)
@given(_TEXTS)
def test_quote_cue_is_set_wherever_a_quoted_name_is(text: str) -> None:
    if _QUOTED_RE.search(text) is not None:
        assert _may_quote(text)


@settings(max_examples=800, deadline=None)
@given(st.text(alphabet="a_'’ \n\tx-", max_size=12))
def test_lone_quote_pattern_equals_its_look_behind_form(text: str) -> None:
    direct = re.compile(r"(?<![\w'’])'(?=[^\s'])")
    assert (_LONE_QUOTE_RE.search(text) is None) == (direct.search(text) is None)


_FORM = st.text(alphabet="ABab -'’s", min_size=1, max_size=6).map(lambda s: " ".join(s.split()))


@settings(max_examples=800, deadline=None)
@given(st.lists(_FORM.filter(bool), min_size=1, max_size=6),
       st.text(alphabet="ABab -'’s_\n\t1", max_size=40))
def test_uses_pattern_finds_what_the_forms_pattern_finds(forms: list[str], text: str) -> None:
    slow = [(m.start(), m.group()) for m in re.finditer(_forms_regex(forms), text)]
    fast = [(m.start(), m.group()) for m in re.finditer(_uses_regex(forms), text)]
    assert fast == slow


_LINE_PIECES = ("\n", "\n", " ", "\t", "1.5", "(a)", "a)", "Licensee", "Initial Developer", "You", "of", "the",
                "means", "shall mean", ":", "–", " - ", "(or Your)", '"Customer"', "“Data”", ",", ".", "x")


#: Texts of a few lines, each a few pieces (several line-start definitions in one text).
_LINES = st.lists(st.lists(st.sampled_from(_LINE_PIECES), max_size=6).map("".join), max_size=6).map("\n".join)


@settings(max_examples=1500, deadline=None)
@given(_LINES)
def test_line_start_matches_equal_finditer(text: str) -> None:
    for rx in (_UNQUOTED_RE, _QUOTED_LINE_START_RE):
        direct = [(m.span(), m.groupdict()) for m in rx.finditer(text)]
        assert [(m.span(), m.groupdict()) for m in _line_start_matches(rx, text)] == direct
