"""Tokens of the review engine (core.review.tokens).

References: the quote and dash characters folded are those of Unicode general categories
Pi/Pf (quotation marks) and Pd (dashes), checked with the standard library's
``unicodedata``; term uses are checked against ``core.terms.terms_pattern`` (the reader's
own definition of a use) on the licence texts of licensedcode-data.
"""

from __future__ import annotations

import unicodedata

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from core.reader import read_text
from core.review.tokens import (
    DASHES,
    QUOTES,
    base_tokens,
    find_cross_references,
    find_term_uses,
    normalise_key,
    rekey,
    term_matcher,
    tokenize,
)
from core.terms import terms_pattern

from .helpers import LICENCES, licence_text


@given(st.text(alphabet=st.characters(blacklist_categories=("Cs",)), max_size=120))
def test_tokens_tile_the_text(text):
    seq = tokenize(text)
    assert "".join(seq.token(i) for i in range(len(seq))) == text
    assert seq.starts[0] == 0 and seq.starts[-1] == len(text)
    assert len(seq.kinds) == len(seq.keys)


def test_keys_fold_case_quotes_dashes_and_space():
    assert normalise_key("Customer") == normalise_key("CUSTOMER") == "customer"
    assert normalise_key("\u201cGoods\u201d") == normalise_key('"Goods"')
    assert normalise_key("\u2013") == normalise_key("-")
    assert normalise_key("\n\t  ") == normalise_key(" ") == " "
    assert tokenize("1,000.50 and 7.2").keys[0] == "1,000.50"


def test_folded_characters_are_unicode_quotes_and_dashes():
    for c in DASHES:
        assert unicodedata.category(c) in ("Pd", "Sm"), c  # U+2212 MINUS SIGN is Sm
    for c in QUOTES:
        assert unicodedata.category(c) in ("Pi", "Pf", "Ps", "Pe", "Po", "Sk"), c


@pytest.mark.parametrize("key", LICENCES)
def test_term_uses_match_the_readers_definition(key):
    """Source: licensedcode-data ``<key>.LICENSE``; reference: core.terms.terms_pattern."""
    d = read_text(licence_text(key), source=f"{key}.txt")
    names = [t.term for t in d.terms] + ["Additional Services", "Services"]
    ref, _owner = terms_pattern(names)
    m = term_matcher(names)
    n = 0
    for p in d.provisions:
        expected = [(x.start(), x.end()) for x in ref.finditer(p.text)]
        got = [(u.start, u.end) for u in find_term_uses(p.text, m)]
        assert got == expected
        n += len(got)
    assert n > 20


def test_term_forms():
    m = term_matcher(["Party", "Services", "Additional Services", "Customer"])
    uses = find_term_uses("the Parties' rights, a Party's Additional Services and Customers", m)
    assert [(u.term, u.form) for u in uses] == [("Party", "plpos"), ("Party", "pos"),
                                                 ("Additional Services", ""), ("Customer", "pl")]


def test_cross_references():
    text = "subject to clauses 5 and 6.2(a), Section 11.2 or Schedule 1 and paragraph 3(b)(ii)"
    got = [(text[a:b], n, k) for a, b, n, k in find_cross_references(text)]
    assert got == [("clauses 5", "5", "clause"), ("6.2(a)", "6.2(a)", "clause"),
                   ("Section 11.2", "11.2", "section"), ("Schedule 1", "1", "schedule"),
                   ("paragraph 3(b)(ii)", "3(b)(ii)", "paragraph")]


def test_cross_references_are_the_counter_draft_references():
    # gpl-3.0.LICENSE (licensedcode-data): its 14 own section references (17 numbers, counted
    # by hand in tests/core/test_xrefs.py) are the review's cross-references; "article 11 of
    # the WIPO copyright treaty" (lines 217-218) and "the GNU Affero General Public License,
    # section 13" (lines 594-595) are other instruments' and stay words.
    d = read_text(licence_text("gpl-3.0"), source="gpl-3.0.txt")
    got = [n for p in d.provisions for t in (p.heading or "", p.text)
           for _a, _b, n, _k in find_cross_references(t)]
    assert got == ["10", "7", "4", "7", "4", "7", "4", "5", "6(b)", "6(d)", "15", "16", "10",
                   "11", "10", "15", "16"]
    # inline examples: quantities, dates and other instruments are not cross-references
    for text in ("within clause 3 days", "see Schedule 1 January 2024",
                 "under Section 16 of the Companies Act 2006"):
        assert find_cross_references(text) == []


def test_rekey_maps_terms_and_references_without_retokenising():
    bt = base_tokens("The Client's duty under clause 4.2.", term_matcher(["Client", "Customer"]))
    seq = rekey(bt, term_key={"Client": "Customer"}, xref=lambda n, k: f"{k}:{n}")
    other = rekey(base_tokens("The Customer's duty under Section 4.2.", term_matcher(["Customer"])),
                  term_key={}, xref=lambda n, k: f"clause:{n}")
    assert seq.keys == other.keys
    assert bt.term_at == {4: "Client"}


def test_alias_uses_are_uses_of_their_term():
    # Inline example: "Your" is an alias of "You" (apache-2.0.LICENSE defines them so:
    # '"You" (or "Your") shall mean'); "Clients" is the plural of "Client".
    m = term_matcher(["You", "Client"], aliases={"Your": "You"})
    uses = find_term_uses("You and Your Clients' files; the Client's copy.", m)
    assert [(u.term, u.form) for u in uses] == [
        ("You", ""), ("You", ""), ("Client", "plpos"), ("Client", "pos")]


def test_capitalised_names_in_capitals_are_uses_when_asked():
    # Inline example: a disclaimer set in capitals writes "LICENSOR'S" for "Licensor's"; an
    # ordinary phrase in capitals ("SOURCE CODE") stays words.
    text = "THE LICENSOR'S LIABILITY FOR SOURCE CODE; the Licensor and the source code."
    plain = term_matcher(["Licensor", "source code"])
    caps = term_matcher(["Licensor", "source code"], capitals=True)
    assert [u.term for u in find_term_uses(text, plain)] == ["Licensor", "source code"]
    assert [(u.term, u.form) for u in find_term_uses(text, caps)] == [
        ("Licensor", "pos"), ("Licensor", ""), ("source code", "")]


def test_a_closing_quote_after_a_name_ending_in_s_is_no_possessive():
    # Inline example: ‘Services’ in single curly quotes; Services’ fees (a possessive).
    m = term_matcher(["Services"])
    uses = find_term_uses("the ‘Services’ and the Services’ fees", m)
    assert [("pos" in u.form, "the ‘Services’ and the Services’ fees"[u.start:u.end]) for u in uses] == [
        (False, "Services"), (True, "Services’")]


def test_names_keyed_as_words_compare_by_their_letters():
    # A name only one document has is keyed as its words: "Reproduce" (a term) and
    # "reproduce" (a word) share a key, as cc-by-3.0 and cc-by-2.5 write them
    # (licensedcode-data cc-by-3.0.LICENSE defines "Reproduce"; cc-by-2.5 uses the word).
    m = term_matcher(["Reproduce"])
    term = rekey(base_tokens("to Reproduce the Work", m), term_key={}, as_words={"Reproduce"})
    word = rekey(base_tokens("to reproduce the Work", m), term_key={})
    assert term.keys == word.keys
    kept = rekey(base_tokens("to Reproduce the Work", m), term_key={})
    assert kept.keys != word.keys


# --------------------------------------------------------------------------------------
# The character-trie walk for many names against the compiled pattern (the slow reference)
# --------------------------------------------------------------------------------------

_NAME_WORDS = ["Services", "Service", "Customer", "Sub-Contractor", "Data", "Group", "Price"]


@settings(max_examples=400, deadline=None)
@given(names=st.lists(st.lists(st.sampled_from(_NAME_WORDS), min_size=1, max_size=3).map(" ".join),
                      min_size=1, max_size=6, unique=True),
       pieces=st.lists(st.sampled_from([*_NAME_WORDS, "services", "s", "'s", "\u2019", "'", " ", "  ",
                                        "\n", ",", ".", "(", ")", "-", "x", "9", "Ltd"]), max_size=40))
def test_the_trie_walk_finds_what_the_pattern_finds(names, pieces):
    """Above REGEX_FORMS_MAX forms the uses are found by walking a character trie; on any
    text it finds exactly the uses the compiled pattern (Python's re, the reference) finds."""
    import dataclasses

    from core.review.tokens import find_term_uses, term_matcher
    from core.terms import char_trie

    text = "".join(pieces)
    regex = term_matcher(names, capitals=True)
    assert regex is not None and regex.pattern is not None
    walked = dataclasses.replace(regex, pattern=None, trie=char_trie(regex.owner))
    assert find_term_uses(text, walked) == find_term_uses(text, regex)


@pytest.mark.parametrize("key", LICENCES)
def test_a_term_used_as_words_is_keyed_as_its_collapsed_words(key):
    # reference: the key of a plain word (normalise_key) of the use's words, white space
    # collapsed -- what rekey gave each use before the keys were kept with the tokens
    text = licence_text(key)
    names = ["Licensor", "Licensee", "Work", "Source Code", "Contributor", "Program", "You"]
    bt = base_tokens(text, term_matcher(names, capitals=True))
    assert bt.terms
    seq = rekey(bt, term_key={}, as_words=frozenset(names))
    for i, _name, _form in bt.terms:
        assert seq.keys[i] == normalise_key(" ".join(bt.seq.token(i).split()))
        assert seq.kinds[i] == "w"
