"""Normalisation of wordings: quotes, case, defined terms, shingles, aliases.

Outside references:
* the Unicode Standard's characters (U+201C/U+201D quotation marks, U+2019 apostrophe, U+2013
  en dash, U+00A0 no-break space) and Python's ``unicodedata`` NFKC normalisation;
* ``scipy.spatial.distance.jaccard`` on boolean vectors for the hashed shingle sets;
* the Apache-2.0, GPL-3.0 and MPL-2.0 license texts of licensedcode-data (real text from
  outside the project; Apache-2.0 section 1 defines the terms used below).
"""

from __future__ import annotations

import unicodedata

import numpy as np
import pytest
from scipy.spatial.distance import jaccard

from core.library.normalise import (
    PARTY_ROLE_GROUPS,
    TERM_MARK,
    TermReplacer,
    canonical_role,
    fold,
    learn_aliases,
    match_tokens,
    shingle_hashes,
    shingle_set,
    term_slug,
    token_spans,
    vocab_tokens,
)
from core.library.variants import set_distance
from tests.support.legal_texts import license_text


def test_fold_unifies_quotes_dashes_and_spaces():
    text = "\u201cGoods\u201d \u2013 the Supplier\u2019s\u00a0goods \ufb01le"
    # NFKC (unicodedata) turns the ligature U+FB01 into "fi"; quotes, dash and space unified.
    assert fold(text) == '"Goods" - the Supplier\'s goods file'
    assert fold(text) == unicodedata.normalize("NFKC", fold(text))


def test_match_tokens_ignore_quotes_case_whitespace_and_punctuation():
    a = match_tokens("The  \u201cSupplier\u201d SHALL deliver\nthe Goods; promptly.")
    b = match_tokens('the "supplier" shall deliver the goods promptly')
    assert a == b == ["the", "supplier", "shall", "deliver", "the", "goods", "promptly"]
    # Figures and section references stay one token each.
    assert match_tokens("within 1,000.50 days of Section 5.2") == ["within", "1,000.50", "days", "of", "section", "5.2"]


def test_term_replacer_counts_plural_and_possessive_uses_and_prefers_longer_names():
    terms = TermReplacer({"Client": "Customer", "Party": "Party", "Services": "Services",
                          "Additional Services": "Additional Services"})
    toks = match_tokens("The Client's and the Clients' Parties and each Party; Additional Services "
                        "differ from Services; client is a plain word.", terms=terms)
    t = TERM_MARK
    assert toks == ["the", f"{t}customer", "and", "the", f"{t}customer", f"{t}party", "and", "each",
                    f"{t}party", f"{t}additional_services", "differ", "from", f"{t}services",
                    "client", "is", "a", "plain", "word"]


def test_renamed_terms_give_the_same_wording():
    house = TermReplacer({"Customer": "Customer"})
    theirs = TermReplacer({"Client": "Customer"})
    assert match_tokens("The Customer shall pay.", terms=house) == match_tokens("The Client shall pay.", terms=theirs)


def test_vocab_tokens_join_defined_terms_into_one_token():
    terms = TermReplacer({"Intellectual Property Rights": "Intellectual Property Rights", "Goods": "Goods"})
    toks = vocab_tokens("All Intellectual Property Rights in the Goods vest in the buyer.", terms=terms)
    assert toks == ["all", "Intellectual_Property_Rights", "in", "the", "Goods", "vest", "in", "the", "buyer"]


def test_party_roles():
    assert canonical_role("Client") == "Customer"
    assert canonical_role("service provider") == "Supplier"
    assert canonical_role("Licensor") is None
    assert all(canonical_role(n) == g[0] for g in PARTY_ROLE_GROUPS for n in g)
    assert term_slug("Additional  Services") == "additional_services"


def test_shingles_of_short_and_empty_texts():
    assert shingle_set([]) == frozenset()
    assert shingle_set(["a", "b"]) == frozenset({("a", "b")})
    assert shingle_set(["a", "b", "c", "d"]) == frozenset({("a", "b", "c"), ("b", "c", "d")})
    assert shingle_hashes([]).size == 0
    # A 2-word text is not a 3-word shingle of another text.
    assert not np.intersect1d(shingle_hashes(["a", "b"]), shingle_hashes(["a", "b", "c"])).size


def test_hashed_shingles_match_the_reference_sets_on_a_real_text():
    words = match_tokens(license_text("apache-2.0"))
    a, b = words[:400], words[200:700]
    sa, sb = shingle_set(a), shingle_set(b)
    assert shingle_hashes(a).size == len(sa) and shingle_hashes(b).size == len(sb)
    universe = sorted(sa | sb)
    u = np.array([x in sa for x in universe])
    v = np.array([x in sb for x in universe])
    # Reference: scipy.spatial.distance.jaccard on boolean vectors of the exact shingle sets.
    assert set_distance(shingle_hashes(a), shingle_hashes(b)) == pytest.approx(jaccard(u, v), abs=1e-12)
    # Same words, same hashes, in any process: the hash is blake2b, not Python's salted hash.
    assert shingle_hashes(a).tolist() == shingle_hashes(list(a)).tolist()


@pytest.mark.parametrize("name", ["apache-2.0", "gpl-3.0", "mpl-2.0"])
def test_token_spans_give_the_match_tokens_and_quote_their_words(name):
    text = license_text(name)
    # Terms Apache-2.0 section 1 defines ("Licensor", "Work", "Derivative Works", ...).
    terms = TermReplacer({t: t for t in ("License", "Licensor", "Legal Entity", "Work", "Derivative Works",
                                         "Contribution", "Contributor", "You")})
    for replacer in (None, terms):
        folded, spans = token_spans(text, terms=replacer)
        assert folded == fold(text)
        assert [t for t, _, _ in spans] == match_tokens(text, terms=replacer)
        starts = [a for _, a, _ in spans]
        assert starts == sorted(starts) and all(a < b for _, a, b in spans)
        for token, a, b in spans:
            if token.startswith(TERM_MARK):
                assert term_slug(folded[a:b].removesuffix("'s").removesuffix("'")).startswith(token[1:])
            else:
                assert folded[a:b].lower() == token
    if name == "apache-2.0":
        assert any(t == TERM_MARK + "derivative_works" for t, _, _ in token_spans(text, terms=terms)[1])


def test_learn_aliases_maps_roles_and_same_definitions_but_not_co_defined_terms():
    defs = [
        (1, "Customer", "Ulverack Tessmoor Limited"),
        (1, "Deliverables", "all documents, products and materials developed by the Supplier in the Services"),
        (2, "Client", "Pennoch Straive Limited"),
        (2, "Deliverables", "all documents, products and materials developed by the Supplier in the Services"),
        (3, "Work Product", "all documents, products and materials developed by the Supplier in the Services"),
        (4, "Products", "the goods described in Schedule 1"),
        (4, "Goods", "the goods described in Schedule 1 to this Agreement"),
    ]
    aliases = learn_aliases(defs)
    assert aliases["Client"] == "Customer"
    assert aliases["Work Product"] == "Deliverables"  # defined by fewer documents
    # "Products" and "Goods" are both defined in document 4: never one another's alias.
    assert "Goods" not in aliases and "Products" not in aliases
    assert learn_aliases(list(reversed(defs))) == aliases
