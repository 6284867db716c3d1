"""Frequency figures in a review, and the ranking that uses them.

Outside references:
* the demo generator's record (demo_agreements/scenario.json): ``precedent_set_matching`` per
  planted departure and the precedent set's ``total``, written by the generator that chose
  which past agreement carries which wording;
* ``scipy.spatial.distance.jaccard`` on boolean shingle vectors, computed provision by
  provision over freshly read library files, for the pairs' ``matching`` (brute force against
  the index's sparse cache).
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from scipy.spatial.distance import jaccard

from core.library.clausetypes import classify_provisions, document_term_replacer
from core.library.commands import review_options
from core.library.frequency import ACCEPTED_WEIGHT, POSITION_ADJUSTMENT, apply_frequency, review_types
from core.library.index import bucket_of, normalised_wording
from core.library.normalise import shingle_set
from core.reader import read_document
from core.review import run_review

from .conftest import DEMO
from .conftest import find_departure as _find


@pytest.fixture(scope="module")
def documents():
    return read_document(str(DEMO / "draft.docx")), read_document(str(DEMO / "precedent.docx"))


@pytest.fixture(scope="module")
def reviews(demo_set, documents, backend):
    draft, prec = documents
    with backend.open(demo_set) as lib:
        plain = run_review(draft, prec, **review_options(lib))
        return plain, apply_frequency(plain, lib)


def test_departures_have_the_frequencies_the_demo_generator_recorded(reviews, scenario):
    _plain, review = reviews
    total = scenario["precedent_set"]["total"]
    assert total == 12
    for dep in scenario["departures"]:
        v = _find(review, dep)
        f = v.frequency
        assert f is not None
        assert f.total == total, dep["id"]
        # Reference: the generator's record of how many past agreements carry the draft's wording.
        assert f.matching == dep["precedent_set_matching"], (dep["id"], f)
        assert f.matching <= total and f.same_type <= total
        assert bool(f.closest) == (f.same_type > 0)
        assert all(0.0 <= c.similarity <= 1.0 for c in f.closest)
        if dep["change"] in ("insert", "delete", "replace"):
            assert f.containing is not None


def test_same_type_counts_follow_the_record(reviews, scenario):
    _plain, review = reviews
    variants = scenario["precedent_set"]["variants"]

    def docs_with(clause_type: str, heading: str) -> int:
        return len({d for v in variants if v["clause_type"] == clause_type and v["heading"] == heading
                    and v["text"] for d in v["documents"]})

    by_id = {d["id"]: d for d in scenario["departures"]}
    # Non-solicitation: kept by 10 agreements, removed from 2 (the draft removes it too).
    assert _find(review, by_id["d13"]).frequency.same_type == docs_with("non_solicitation", "Non-Solicitation") == 10
    # Service credits: no past agreement has them.
    assert _find(review, by_id["d14"]).frequency.same_type == docs_with("service_levels", "Service Credits") == 0
    assert _find(review, by_id["d1"]).frequency.same_type == 12


def test_every_pair_carries_a_frequency_and_matching_equals_brute_force_jaccard(reviews, demo_set, backend):
    _plain, review = reviews
    assert all(p.frequency is not None and p.frequency.total == 12 for p in review.pairs)
    with backend.open(demo_set) as lib:
        types = review_types(review, lib)
        aliases = lib.aliases()
        cutoff = lib.config.cutoff
        library_docs = []
        for path in sorted(demo_set.glob("*.docx")):
            doc = read_document(str(path))
            terms = document_term_replacer(doc, aliases=aliases)
            typed = classify_provisions(doc, neighbours=lib.neighbours(), terms=terms)
            library_docs.append([(bucket_of(t.clause_type, p.kind),
                                  shingle_set(normalised_wording(p.text, p.heading, terms=terms)))
                                 for p, t in zip(doc.provisions, typed)])
    draft = {p.id: p for p in review.draft.provisions}
    checked = 0
    for pair in review.pairs[::7]:
        if pair.draft is None:
            continue
        t = (types.precedent_types.get(pair.precedent) if pair.precedent else None)
        ctype = t.clause_type if t and t.clause_type else types.draft_types[pair.draft].clause_type
        bucket = bucket_of(ctype, (review.precedent.provision(pair.precedent) if pair.precedent
                                   else draft[pair.draft]).kind)
        mine = shingle_set(normalised_wording(draft[pair.draft].text, draft[pair.draft].heading,
                                              terms=types.draft_terms))
        matching = same = 0
        for provisions in library_docs:
            dists = []
            for b, sh in provisions:
                if b != bucket:
                    continue
                universe = sorted(mine | sh)
                u = np.array([x in mine for x in universe], dtype=bool)
                v = np.array([x in sh for x in universe], dtype=bool)
                # Reference: scipy's Jaccard dissimilarity of the boolean shingle vectors.
                dists.append(jaccard(u, v) if universe else 0.0)
            same += bool(dists)
            matching += bool(dists) and min(dists) <= cutoff
        assert (pair.frequency.same_type, pair.frequency.matching) == (same, matching), pair
        checked += 1
    assert checked >= 20


def test_ranking_reasons_and_ranks(reviews, scenario):
    plain, review = reviews
    by_id = {d["id"]: d for d in scenario["departures"]}
    d1 = _find(review, by_id["d1"])
    assert "accepted in 2 of 12 past agreements" in d1.reasons
    d8 = _find(review, by_id["d8"])
    assert "never accepted in the 12 past agreements" in d8.reasons
    # Severity scaled by 1 - ACCEPTED_WEIGHT * matching / total.
    before = {v.id: v for v in plain.deviations}
    assert d1.severity == round(before[d1.id].severity * (1 - ACCEPTED_WEIGHT * 2 / 12))
    assert d8.severity == before[d8.id].severity
    # Ranks 1..N, by descending severity, ties in draft order (the ids' order).
    assert [v.rank for v in review.deviations] == list(range(1, len(review.deviations) + 1))
    keys = [(-v.severity, int(v.id[1:])) for v in review.deviations]
    assert keys == sorted(keys)
    assert {v.id for v in review.deviations} == set(before)
    # Term and formatting deviations carry figures but keep their severity.
    for v in review.deviations:
        if v.category != "substantive":
            assert v.severity == before[v.id].severity and v.frequency is not None
    # The reasons the figures add are frequency_reasons' (the issues list leaves them out).
    from core.library.frequency import frequency_reasons

    for v in review.deviations:
        if v.category == "substantive":
            added = frequency_reasons(v.frequency)
            assert added and v.reasons == (*before[v.id].reasons, *added)


def test_a_departure_accepted_often_ranks_below_one_never_accepted(reviews, scenario, demo_set, backend):
    plain, _ = reviews
    by_id = {d["id"]: d for d in scenario["departures"]}
    accepted, never = _find(plain, by_id["d3"]), _find(plain, by_id["d8"])  # 3 of 12; 0 of 12
    same = tuple(dataclasses.replace(v, severity=60) if v.id in (accepted.id, never.id) else v
                 for v in plain.deviations)
    with backend.open(demo_set) as lib:
        out = apply_frequency(dataclasses.replace(plain, deviations=same), lib)
    rank = {v.id: v.rank for v in out.deviations}
    assert rank[never.id] < rank[accepted.id]


def test_the_firms_position_is_reported_and_weighs(tmp_path, scenario, documents, demo_set, backend):
    folder = backend.copy(demo_set, tmp_path / "set")  # with its index: labelling writes to it
    draft, prec = documents
    by_id = {d["id"]: d for d in scenario["departures"]}
    with backend.open(folder) as lib:
        plain = run_review(draft, prec, **review_options(lib))
        before = _find(apply_frequency(plain, lib), by_id["d1"])
        vid = lib.variant_of("04-pellbrook-analytical.docx", "9.2")  # the 60-day wording
        lib.label_variant(vid, "refuse")
    with backend.open(folder) as lib:
        after = _find(apply_frequency(plain, lib), by_id["d1"])
    assert after.frequency.position == "refuse"
    assert "the firm's stance on this wording: refuse" in after.reasons
    assert after.severity == min(100, before.severity + POSITION_ADJUSTMENT["refuse"])


def test_containing_counts_library_provisions_with_the_words(reviews, scenario, demo_library):
    _plain, review = reviews
    by_id = {d["id"]: d for d in scenario["departures"]}
    v = _find(review, by_id["d9"])  # "not" inserted in an acceptance clause
    # Reference: Python's substring test over the stored normalised wordings of that clause type.
    ids = [r[0] for r in demo_library.store.provision_rows() if r[6] == "acceptance"]
    expected = sum(" not " in f" {norm} " for norm in demo_library.norms(ids).values())
    assert v.frequency.containing == expected > 0
