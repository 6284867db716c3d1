"""Laws of the model's JSON (core.serialize), on any review hypothesis can build.

* Round trip: review -> dict -> JSON text (the ``json`` module, RFC 8259) -> dict -> review
  gives the same review, for every review that carries only what the JSON holds (the engine's
  internal fields -- blocks, segments, word diffs, change spans -- keep their defaults).
* Every dict produced validates against the published schema
  (resources/schemas/review.schema.json, with document.schema.json), checked by the
  ``jsonschema`` package's Draft 2020-12 validator (the JSON Schema reference implementation
  for Python) holding the schema files as published.
* Reading refuses an object the schema refuses, in one line naming the field.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import jsonschema
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from core.errors import CounterdraftError
from core.model import (
    CATEGORIES,
    CHANGES,
    CHECK_DOCUMENTS,
    CHECK_KINDS,
    CHECK_PARTS,
    DECISION_ACTIONS,
    DIRECTIONS,
    EVIDENCE_KINDS,
    OVERRIDE_ACTIONS,
    PAIR_STATUSES,
    PROVISION_KINDS,
    STANCES,
    Check,
    ClosestProvision,
    Decision,
    DefinedTerm,
    Deviation,
    Document,
    Frequency,
    Pair,
    Provision,
    Review,
    TermMapping,
    TermOverride,
)
from core.serialize import (
    SchemaName,
    SchemaValidator,
    decision_from_dict,
    decision_to_dict,
    document_from_dict,
    document_to_dict,
    frequency_from_dict,
    override_from_dict,
    override_to_dict,
    review_from_dict,
    review_to_dict,
    schema_validator,
)

SCHEMAS = Path(__file__).resolve().parents[2] / "resources" / "schemas"


def _validator(name: SchemaName) -> SchemaValidator:
    """core.serialize's validator, checked to hold the published schema file itself (and
    that file to be a valid Draft 2020-12 schema)."""
    published = json.loads((SCHEMAS / f"{name}.schema.json").read_text(encoding="utf-8"))
    jsonschema.Draft202012Validator.check_schema(published)
    validator = schema_validator(name)
    assert validator.schema == published
    return validator


REVIEW_SCHEMA = _validator("review")
DOCUMENT_SCHEMA = _validator("document")

# ---- strategies: values the schemas allow ----------------------------------------------

pids = st.integers(1, 10_000).map(lambda n: f"p{n}")
opt_pids = st.none() | pids
words = st.text(max_size=30)
names = st.text(min_size=1, max_size=12)
counts = st.integers(0, 10_000)
shares = st.floats(0, 1, allow_nan=False)
spans = st.none() | st.tuples(counts, counts)


@st.composite
def provisions(draw: st.DrawFn) -> Provision:
    kind = draw(st.sampled_from(PROVISION_KINDS))
    return Provision(id=draw(pids), kind=kind, number=draw(st.none() | names),
                     heading=draw(st.none() | names), level=draw(st.integers(0, 9)),
                     parent=draw(opt_pids), text=draw(words),
                     term=draw(names) if kind == "definition" else None)


terms = st.builds(DefinedTerm, term=names, definition=words, provision=pids, uses=counts,
                  aliases=st.lists(names, unique=True, max_size=3).map(tuple), span=spans)
documents = st.builds(Document, source=st.from_regex(r"[^/\\\x00]{1,20}", fullmatch=True),
                      provisions=st.lists(provisions(), max_size=4).map(tuple),
                      terms=st.lists(terms, max_size=3).map(tuple))
frequencies = st.none() | st.builds(
    Frequency, same_type=counts, matching=counts, total=counts,
    closest=st.lists(st.builds(ClosestProvision, document=words, provision=words,
                               similarity=st.floats(-1e9, 1e9, allow_nan=False)),
                     max_size=2).map(tuple),
    containing=st.none() | counts, position=st.none() | st.sampled_from(STANCES))
mappings = st.builds(TermMapping, draft=names, precedent=names, confidence=shares,
                     evidence=st.lists(st.sampled_from(EVIDENCE_KINDS), unique=True).map(tuple),
                     occurrences=counts, stale=counts, substitutions=counts, aligned=counts)


@st.composite
def pairs(draw: st.DrawFn) -> Pair:
    status = draw(st.sampled_from(PAIR_STATUSES))
    return Pair(draft=None if status == "removed" else draw(pids),
                precedent=None if status == "added" else draw(pids),
                status=status, similarity=draw(shares), frequency=draw(frequencies))


@st.composite
def deviations(draw: st.DrawFn) -> Deviation:
    change = draw(st.sampled_from(CHANGES))
    category = draw(st.sampled_from(CATEGORIES))
    draft, precedent = draw(opt_pids), draw(opt_pids)
    if change == "add-provision":
        category, draft, precedent = "substantive", draw(pids), None
    elif change == "remove-provision":
        category, draft, precedent = "substantive", None, draw(pids)
    elif change == "move":
        category = "numbering"
    return Deviation(id=f"v{draw(st.integers(1, 999))}", rank=draw(st.integers(1, 999)),
                     severity=draw(st.integers(0, 100)), category=category, change=change,
                     draft_provision=draft, precedent_provision=precedent,
                     precedent_text=draw(words), draft_text=draw(words),
                     reasons=tuple(draw(st.lists(names, max_size=3))), frequency=draw(frequencies),
                     precedent_text_span=draw(spans), draft_text_span=draw(spans),
                     direction=draw(st.sampled_from(DIRECTIONS)))


checks = st.builds(Check, kind=st.sampled_from(CHECK_KINDS), document=st.sampled_from(CHECK_DOCUMENTS),
                   provision=opt_pids, text=words, message=names, span=spans,
                   part=st.sampled_from(CHECK_PARTS), term=st.none() | words,
                   provisions=st.lists(pids, max_size=3).map(tuple))
reviews = st.builds(Review, draft=documents, precedent=documents,
                    term_map=st.lists(mappings, max_size=3).map(tuple),
                    pairs=st.lists(pairs(), max_size=4).map(tuple),
                    deviations=st.lists(deviations(), max_size=4).map(tuple),
                    acting_for=st.none() | names, checks=st.lists(checks, max_size=3).map(tuple))


def _through_json_text(obj: dict[str, Any]) -> Any:
    return json.loads(json.dumps(obj, ensure_ascii=False))


# ---- the laws ----------------------------------------------------------------------------


@settings(max_examples=150, deadline=None)
@given(reviews)
def test_review_round_trips_through_json_text_and_validates(review: Review) -> None:
    produced = review_to_dict(review)
    REVIEW_SCHEMA.validate(produced)  # source: resources/schemas/review.schema.json
    back = review_from_dict(_through_json_text(produced))
    assert back == review
    assert review_to_dict(back) == produced


@settings(max_examples=100, deadline=None)
@given(documents)
def test_document_round_trips_through_json_text_and_validates(document: Document) -> None:
    produced = document_to_dict(document)
    DOCUMENT_SCHEMA.validate(produced)  # source: resources/schemas/document.schema.json
    assert document_from_dict(_through_json_text(produced)) == document


@given(st.builds(Decision, deviation=st.integers(1, 99).map(lambda n: f"v{n}"),
                 action=st.sampled_from(DECISION_ACTIONS), text=st.none() | words,
                 note=st.none() | words))
def test_decision_round_trips(decision: Decision) -> None:
    assert decision_from_dict(_through_json_text(decision_to_dict(decision))) == decision


@given(st.builds(TermOverride, draft=names.filter(str.strip), precedent=names.filter(str.strip),
                 action=st.sampled_from(OVERRIDE_ACTIONS)))
def test_override_round_trips_and_matches_the_review_file_schema(override: TermOverride) -> None:
    produced = override_to_dict(override)
    # source: resources/schemas/review-file.schema.json, properties.overrides.items
    item_schema = _validator("review-file").schema["properties"]["overrides"]["items"]
    jsonschema.Draft202012Validator(item_schema).validate(produced)
    assert override_from_dict(_through_json_text(produced)) == override


def test_a_former_stance_name_reads_as_its_new_name() -> None:
    # the schema's own description: the last four names are the former names of the first four
    old = {"same_type": 1, "matching": 1, "total": 2, "position": "preferred"}
    frequency = frequency_from_dict(old)
    assert frequency is not None and frequency.position == "house wording"


@settings(max_examples=50, deadline=None)
@given(reviews, st.sampled_from(["rank", "category", "status", "schema"]))
def test_reading_refuses_what_the_schema_refuses_naming_the_field(review: Review, damage: str) -> None:
    obj = _through_json_text(review_to_dict(review))
    if damage == "schema":
        obj["schema"] = "counterdraft.review/0"
    elif damage == "status":
        obj["pairs"].append({"draft": "p1", "precedent": "p1", "status": "shuffled", "similarity": 0.5})
    else:
        obj["deviations"].append({**_a_deviation(), damage: -1})
    assert not REVIEW_SCHEMA.is_valid(obj)
    with pytest.raises(CounterdraftError, match=r"not a valid review object \((schema|pairs|deviations)"):
        review_from_dict(obj, path="review.json")


def _a_deviation() -> dict[str, Any]:
    return {"id": "v1", "rank": 1, "severity": 10, "category": "substantive", "change": "replace",
            "draft_provision": "p1", "precedent_provision": "p1", "precedent_text": "a",
            "draft_text": "b", "reasons": [], "frequency": None}
