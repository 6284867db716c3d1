"""Clause typing: the taxonomy, heading keywords, parents and neighbours.

Outside references:
* scikit-learn's ``TfidfVectorizer(sublinear_tf=True, norm="l2")``: the classifier's own
  query weighting (used after loading a saved model) must give the same vectors;
* the demo generator's record (demo_agreements/scenario.json): the clause type it gives each
  planted departure must be the type of that provision in the precedent;
* the agreed clause-type ids (the engineers' interface list) and the severity rules'
  ``[weights]`` (resources/severity.toml) use the same ids.
"""

from __future__ import annotations

import tomllib

import numpy as np
import pytest
from sklearn.feature_extraction.text import TfidfVectorizer

from core.library.clausetypes import (
    NeighbourClassifier,
    _english_stop_words,
    _ngrams,
    classifier_text,
    classify_document,
    classify_provisions,
    heading_type,
    load_taxonomy,
)
from core.library.normalise import match_tokens
from core.reader import read_document, read_text

from .conftest import DEMO, ROOT

#: The clause-type ids agreed between the engineers (interface list), in order.
AGREED_IDS = (
    "definitions interpretation term supply ordering delivery acceptance title_and_risk price "
    "payment taxes service_levels warranties limitation_of_liability indemnity insurance "
    "intellectual_property confidentiality data_protection audit compliance termination "
    "consequences_of_termination force_majeure assignment subcontracting non_solicitation "
    "governing_law dispute_resolution notices entire_agreement variation waiver severance "
    "counterparts third_party_rights relationship further_assurance costs publicity"
).split()


def test_taxonomy_has_exactly_the_agreed_ids_with_keywords_and_seeds():
    tax = load_taxonomy()
    assert list(tax.ids) == AGREED_IDS
    assert 30 <= len(tax.ids) <= 40
    for t in tax.types:
        assert t.headings and t.seeds and t.label
    rules = tomllib.loads((ROOT / "resources" / "severity.toml").read_text(encoding="utf-8"))
    assert set(rules["weights"]) - {"default"} <= set(tax.ids)


@pytest.mark.parametrize(("heading", "expected"), [
    ("Limitation of Liability", "limitation_of_liability"),
    ("LIABILITY", "limitation_of_liability"),
    ("Consequences of termination", "consequences_of_termination"),
    ("Definitions and Interpretation", "definitions"),
    ("Governing Law and Jurisdiction", "governing_law"),
    ("Order of precedence", "interpretation"),
    ("Title & Risk", "title_and_risk"),
    ("Payment Terms", "payment"),
    ("Non-Solicitation", "non_solicitation"),
    ("Terms of Reference", None),  # "term" must match as a whole word only
    ("Our promises", None),
    (None, None),
])
def test_heading_keywords(heading, expected):
    assert heading_type(heading) == expected


def test_query_weighting_equals_scikit_learn():
    texts = [" ".join(match_tokens(s)) for t in load_taxonomy().types for s in t.seeds]
    clf = NeighbourClassifier.fit([(x, "payment") for x in texts[:20]])
    queries = texts[20:40] + ["the customer shall pay the invoice within thirty days"]
    # Reference: scikit-learn's TfidfVectorizer fitted on the classifier's own examples.
    vec = TfidfVectorizer(analyzer=_ngrams, sublinear_tf=True, norm="l2")
    seeds = [" ".join(match_tokens(" . ".join(t.seeds))) for t in load_taxonomy().types]
    examples = []
    for i, t in enumerate(load_taxonomy().types):
        examples.append(seeds[i])
        if t.id == "payment":
            examples.extend(sorted(set(texts[:20])))
    vec.fit(examples)
    ref = vec.transform(queries).toarray()
    ours = clf.transform(queries).toarray()
    order = [clf._index[t] for t in vec.get_feature_names_out()]
    np.testing.assert_allclose(ours[:, order], ref, atol=1e-9)
    # A saved and loaded model predicts the same.
    again = NeighbourClassifier.from_npz_bytes(clf.to_npz_bytes())
    assert again.predict(queries) == clf.predict(queries)


def test_fitting_equals_scikit_learn_and_the_stop_words_are_its_list():
    from sklearn.feature_extraction.text import ENGLISH_STOP_WORDS

    texts = [" ".join(match_tokens(s)) for t in load_taxonomy().types for s in t.seeds]
    clf = NeighbourClassifier.fit([(x, "payment") for x in texts[:30]])
    seeds = [" ".join(match_tokens(" . ".join(t.seeds))) for t in load_taxonomy().types]
    examples = []
    for i, t in enumerate(load_taxonomy().types):
        examples.append(seeds[i])
        if t.id == "payment":
            examples.extend(sorted(set(texts[:30])))
    # Reference: scikit-learn's TfidfVectorizer fit_transform on the same examples.
    vec = TfidfVectorizer(analyzer=_ngrams, sublinear_tf=True, norm="l2")
    ref = vec.fit_transform(examples).toarray()
    assert clf._terms == list(vec.get_feature_names_out())
    np.testing.assert_allclose(clf._idf, vec.idf_, atol=1e-12)
    np.testing.assert_allclose(clf._matrix.toarray(), ref, atol=1e-12)
    # Reference: scikit-learn's English stop words, read without importing the package.
    assert _english_stop_words() == ENGLISH_STOP_WORDS


def test_demo_departures_have_the_recorded_clause_types(scenario):
    prec = read_document(str(DEMO / "precedent.docx"))
    types = classify_document(prec)
    by_number = {p.number: p for p in prec.provisions}
    checked = 0
    for dep in scenario["departures"]:
        if dep["precedent_number"] is None:
            continue
        p = by_number[dep["precedent_number"]]
        assert types[p.id] == dep["clause_type"], (dep["id"], p.heading)
        checked += 1
    assert checked >= 15


def test_unheaded_subclauses_take_their_parents_type_and_kinds_are_respected():
    doc = read_text("SUPPLY AGREEMENT\n\n"
                    "1. Payment\n\n1.1 The Customer shall pay each invoice within 30 days.\n\n"
                    "1.2 Late payments bear interest.\n\n"
                    "2. Definitions\n\n2.1 \"Goods\" means the goods in the Order.\n")
    typed = {p.text or p.heading: t for p, t in zip(doc.provisions, classify_provisions(doc))}
    assert typed["The Customer shall pay each invoice within 30 days."].clause_type == "payment"
    assert typed["The Customer shall pay each invoice within 30 days."].source == "parent"
    assert typed["Late payments bear interest."].clause_type == "payment"
    title = next(t for p, t in zip(doc.provisions, classify_provisions(doc)) if p.kind == "title")
    assert title.clause_type is None


def test_unheaded_clauses_are_typed_by_their_library_neighbours(demo_library):
    doc = read_text(
        "SUPPLY AGREEMENT\n\n"
        "1. The obligations of confidentiality in this Agreement shall continue in force for a period "
        "of five (5) years after termination, and each party shall keep the other party's Confidential "
        "Information secret.\n\n"
        "2. Lorem ipsum dolor sit amet, consectetur adipiscing elit, sed do eiusmod tempor.\n")
    clauses = [p for p in doc.provisions if p.kind == "clause"]
    typed = {t.provision: t for t in classify_provisions(doc, neighbours=demo_library.neighbours())}
    assert typed[clauses[0].id].clause_type == "confidentiality"
    assert typed[clauses[0].id].source == "neighbour"
    assert typed[clauses[1].id].clause_type is None
    assert classifier_text(clauses[0]).startswith("the obligations of confidentiality")
