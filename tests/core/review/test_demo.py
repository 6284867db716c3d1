"""The review of the demo pair against the demo generator's record
(``demo_agreements/scenario.json``, schema counterdraft.demo-scenario/1): every planted
departure reported with its expected reasons, each renamed term one term mapping and no
substantive deviation, the moved clauses "moved", renumbering never substantive."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from core.reader import read_document
from core.review import run_review

from .helpers import check_tiling

DEMO = Path(__file__).resolve().parents[3] / "demo_agreements"


@pytest.fixture(scope="module")
def scenario():
    # The demo is committed: a missing file is an error, never a skip.
    return json.loads((DEMO / "scenario.json").read_text(encoding="utf-8"))


@pytest.fixture(scope="module")
def review(scenario):
    draft = read_document(str(DEMO / scenario["draft"]["file"]))
    precedent = read_document(str(DEMO / scenario["precedent"]["file"]))
    return run_review(draft, precedent)


def pid(doc, number):
    """The provision with this rendered number (as the scenario's outline writes it)."""
    if number is None:
        return None
    ids = [p.id for p in doc.provisions if p.number == number]
    assert len(ids) == 1, (number, ids)
    return ids[0]


def test_every_planted_departure_is_reported_with_its_reasons(scenario, review):
    for dep in scenario["departures"]:
        d_id = pid(review.draft, dep["draft_number"])
        p_id = pid(review.precedent, dep["precedent_number"])
        hits = [v for v in review.deviations
                if v.category == "substantive" and v.change == dep["change"]
                and (d_id is None or v.draft_provision == d_id)
                and (p_id is None or v.precedent_provision == p_id)]
        hits = [v for v in hits if " ".join(dep["draft_words"].split())[:40] in " ".join(v.draft_text.split())
                and " ".join(dep["precedent_words"].split())[:40] in " ".join(v.precedent_text.split())]
        assert len(hits) == 1, (dep["id"], [(v.change, v.precedent_text, v.draft_text) for v in review.deviations
                                            if v.draft_provision == d_id or v.precedent_provision == p_id])
        (v,) = hits
        assert any(all(x in r.lower() for x in dep["expected_reasons"]) for r in v.reasons), (dep["id"], v.reasons)


def test_departures_weigh_as_the_record_says(scenario, review):
    """The record marks each departure high, medium or low: on average the high ones rank
    above the low ones."""
    sev = {}
    for dep in scenario["departures"]:
        d_id = pid(review.draft, dep["draft_number"])
        p_id = pid(review.precedent, dep["precedent_number"])
        sev.setdefault(dep["weight"], []).append(max(
            v.severity for v in review.deviations if v.category == "substantive"
            and v.change == dep["change"] and (d_id is None or v.draft_provision == d_id)
            and (p_id is None or v.precedent_provision == p_id)))
    mean = {k: sum(x) / len(x) for k, x in sev.items()}
    assert mean["high"] > mean["low"]
    assert min(sev["high"]) >= 45


def test_each_renamed_term_is_one_mapping_and_never_substantive(scenario, review):
    expected = {(t["draft"], t["precedent"]) for t in scenario["renamed_terms"]}
    assert {(m.draft, m.precedent) for m in review.term_map} == expected
    terms = [(v.draft_text, v.precedent_text) for v in review.deviations if v.category == "term"]
    assert sorted(terms) == sorted(expected)
    for v in review.deviations:
        if v.category == "substantive" and v.change in ("insert", "delete", "replace"):
            for d, p in expected:
                assert not (d in v.draft_text and p in v.precedent_text
                            and v.draft_text.replace(d, p) == v.precedent_text), v


def test_moved_clauses_are_moved(scenario, review):
    status = {(p.draft, p.precedent): p.status for p in review.pairs}
    for m in scenario["moved"]:
        key = (pid(review.draft, m["draft_number"]), pid(review.precedent, m["precedent_number"]))
        assert status.get(key) == "moved", (m, status.get(key))


#: A label or a numbered reference alone: "7.2", "(iii)", "Clause 9.2", "Section 11.2(a)".
_REFERENCE = re.compile(r"^(?:(?:clause|section|article|schedule|paragraph)\s+)?"
                        r"(?:\d+(?:\.\d+)*(?:\([0-9a-z]{1,5}\))*|\([0-9a-z]{1,5}\))\.?$", re.IGNORECASE)


def test_renumbering_is_never_substantive(review):
    numbering = [v for v in review.deviations if v.category == "numbering"]
    assert any(v.reasons[0].startswith("renumbered") for v in numbering)
    assert any("cross-reference renumbered" in v.reasons[0] for v in numbering)
    for v in review.deviations:
        if v.category == "substantive" and v.change == "replace":
            assert not (_REFERENCE.match(v.precedent_text.strip())
                        and _REFERENCE.match(v.draft_text.strip())), v


_XREF_HUNK = re.compile(r"^(?:(?:clause|section|article|schedule|paragraph)s?\s+)?\d", re.IGNORECASE)


def test_every_aligned_pair_carries_its_word_diff_on_the_original_texts(scenario, review):
    """Pair.edits rebuild both provisions' own texts exactly (the draft's own defined terms,
    not the normalised ones); a pair the engine calls "same" differs only by renamed terms
    (each use a hunk of its own, named as the term map says) and renumbered references."""
    renamed = {(m.precedent, m.draft) for m in review.term_map}
    two_sided = [p for p in review.pairs if p.draft and p.precedent]
    assert two_sided and all(p.edits for p in two_sided
                             if review.precedent.provision(p.precedent).text
                             or review.draft.provision(p.draft).text)
    term_hunks = 0
    for pair in two_sided:
        a = review.precedent.provision(pair.precedent).text
        b = review.draft.provision(pair.draft).text
        check_tiling(pair.edits, a, b)
        if pair.status != "same":
            continue
        for e in pair.edits:
            if e.tag == "equal":
                continue
            pw, dw = a[e.p1:e.p2], b[e.d1:e.d2]
            is_term = any(pw.startswith(pt) and dw.startswith(dt) and len(pw) - len(pt) <= 3
                          for pt, dt in renamed)
            is_ref = bool(_XREF_HUNK.match(pw) and _XREF_HUNK.match(dw))
            assert is_term or is_ref, (pair, pw, dw)
            term_hunks += is_term
    assert term_hunks > 10
    for pair in review.pairs:
        if pair.draft is None or pair.precedent is None:
            assert pair.edits == ()


def test_headings_the_draft_only_adds_are_formatting_and_out_of_the_substantive_list(scenario, review):
    """The draft gives its sub-clauses run-in headings the precedent lacks.  Its own
    interpretation clause says headings do not affect interpretation (the usual clause:
    common practice, no source), so those are formatting; a heading whose words changed
    stays substantive with a low severity."""
    interpretation = " ".join(p.text.lower() for p in review.draft.provisions)
    assert "headings shall not affect the interpretation" in interpretation
    heads = [v for v in review.deviations if v.part == "heading"]
    added = [v for v in heads if v.change in ("insert", "delete")]
    assert len(added) >= 12
    assert all(v.category == "formatting" and v.severity == 0 for v in added)
    assert all("headings do not affect interpretation" in v.reasons[0] for v in added)
    changed = [v for v in heads if v.change == "replace" and v.category == "substantive"]
    assert changed and all(v.severity < 20 for v in changed)
    top = sorted((v for v in review.deviations if v.category == "substantive"), key=lambda v: v.rank)
    assert not [v for v in top if v.reasons[0].startswith(("heading added", "heading removed"))]


def test_drafting_checks_on_the_demo_draft(review, scenario):
    """What the drafting checks say of the demo draft.  The generator renames six terms
    consistently (no stale name), defines every term it uses and types no reference to a
    missing clause; departure d7 lengthens the warranty period, which the warranty clause
    itself defines (the "Warranty Period"), so that definition is reported as changed, with
    the provision that uses the term."""
    d7 = next(d for d in scenario["departures"] if d["id"] == "d7")
    kinds = [(c.kind, c.term) for c in review.checks]
    assert kinds == [("definition-changed", "Warranty Period")]
    (check,) = review.checks
    assert check.provision == pid(review.draft, d7["draft_number"])
    assert d7["draft_words"] in check.text
    assert check.provisions and "1 provision uses the term" in check.message
