"""The counterdraft.review/1 JSON object (core.review.serialize) against its JSON Schema
(resources/schemas/review.schema.json), validated with the ``jsonschema`` package's
Draft 2020-12 validator (JSON Schema 2020-12, the reference implementation's checks)."""

from __future__ import annotations

import copy
import dataclasses
import json
from pathlib import Path

import jsonschema
import pytest
from referencing import Registry, Resource

from core.model import ClosestProvision, Frequency
from core.reader import read_document
from core.review import review_to_dict, run_review
from core.serialize import document_to_dict

from .helpers import doc

ROOT = Path(__file__).resolve().parents[3]
SCHEMAS = ROOT / "resources" / "schemas"
DEMO = ROOT / "demo_agreements"


def validator() -> jsonschema.Draft202012Validator:
    review = json.loads((SCHEMAS / "review.schema.json").read_text(encoding="utf-8"))
    document = json.loads((SCHEMAS / "document.schema.json").read_text(encoding="utf-8"))
    registry = Registry().with_resources([
        (review["$id"], Resource.from_contents(review)),
        (document["$id"], Resource.from_contents(document)),
    ])
    jsonschema.Draft202012Validator.check_schema(review)
    return jsonschema.Draft202012Validator(review, registry=registry)


@pytest.fixture(scope="module")
def demo_review():
    # The demo is committed: a missing file is an error, never a skip.
    return run_review(read_document(str(DEMO / "draft.docx")), read_document(str(DEMO / "precedent.docx")))


def test_demo_review_is_valid_and_exactly_shaped(demo_review):
    obj = json.loads(json.dumps(review_to_dict(demo_review)))
    validator().validate(obj)
    assert list(obj) == ["schema", "acting_for", "draft", "precedent", "term_map", "pairs", "deviations", "checks"]
    assert [c["kind"] for c in obj["checks"]] == [c.kind for c in demo_review.checks]
    assert set(obj["checks"][0]) == {"kind", "document", "provision", "text", "message", "span", "part",
                                     "term", "provisions"}
    assert obj["schema"] == "counterdraft.review/1"
    assert obj["acting_for"] is None and {v["direction"] for v in obj["deviations"]} == {"unclear"}
    # an object written before the party acted for existed (no acting_for, no direction)
    # still validates: the schema's new fields are optional
    old = {k: v for k, v in obj.items() if k != "acting_for"}
    old["deviations"] = [{k: x for k, x in v.items() if k != "direction"} for v in obj["deviations"]]
    validator().validate(old)
    assert obj["draft"] == document_to_dict(demo_review.draft)
    assert obj["precedent"] == document_to_dict(demo_review.precedent)
    assert set(obj["term_map"][0]) == {"draft", "precedent", "confidence", "evidence", "occurrences",
                                       "stale", "substitutions", "aligned"}
    assert set(obj["pairs"][0]) == {"draft", "precedent", "status", "similarity", "frequency"}
    assert set(obj["deviations"][0]) == {
        "id", "rank", "severity", "category", "change", "draft_provision", "precedent_provision",
        "precedent_text", "draft_text", "reasons", "frequency", "precedent_text_span", "draft_text_span",
        "direction"}
    assert all(v["frequency"] is None for v in obj["deviations"])
    # The spans locate the words shown in the document objects' own provision texts.
    provs = {(side, p["id"]): p for side in ("draft", "precedent") for p in obj[side]["provisions"]}
    spanned = [v for v in obj["deviations"] if v["draft_text_span"] is not None]
    assert len(spanned) > 100
    for v in spanned:
        for side in ("draft", "precedent"):
            a, b = v[f"{side}_text_span"]
            p = provs[(side, v[f"{side}_provision"])]
            # the words shown, in the provision's text (or, for a heading change, its heading)
            assert v[f"{side}_text"] in (p["text"][a:b], (p["heading"] or "")[a:b])
    assert [v["rank"] for v in obj["deviations"]] == list(range(1, len(obj["deviations"]) + 1))


def test_frequency_objects_serialise_and_validate():
    r = run_review(doc("1. Orders\n\n1.1 The Supplier may accept each order."),
                   doc("1. Orders\n\n1.1 The Supplier shall accept each order."))
    f = Frequency(same_type=7, matching=2, total=12,
                  closest=(ClosestProvision("past-3.docx", "p14", 0.93),), containing=1,
                  position="can live with")
    r2 = dataclasses.replace(r, deviations=tuple(dataclasses.replace(v, frequency=f) for v in r.deviations))
    obj = review_to_dict(r2)
    validator().validate(obj)
    assert obj["deviations"][0]["frequency"] == {
        "same_type": 7, "matching": 2, "total": 12,
        "closest": [{"document": "past-3.docx", "provision": "p14", "similarity": 0.93}],
        "containing": 1, "position": "can live with"}


def test_a_review_acting_for_a_party_serialises_and_validates():
    r = run_review(doc("1. Orders\n\n1.1 The Supplier may accept each order placed by the Customer."),
                   doc("1. Orders\n\n1.1 The Supplier shall accept each order placed by the Customer."),
                   acting_for="customer")
    obj = review_to_dict(r)
    validator().validate(obj)
    assert obj["acting_for"] == "Customer"
    (v,) = [d for d in obj["deviations"] if d["category"] == "substantive"]
    assert v["direction"] == "adverse"  # the Supplier's obligation to accept orders weakened
    bad = copy.deepcopy(obj)
    bad["deviations"][0]["direction"] = "hostile"
    assert not validator().is_valid(bad)


def test_schema_rejects_what_the_fields_rule_out():
    r = run_review(doc("1. Orders\n\n1.1 The Supplier shall not accept each order."),
                   doc("1. Orders\n\n1.1 The Supplier shall accept each order."))
    obj = review_to_dict(r)
    v = validator()
    v.validate(obj)
    (ins,) = [d for d in obj["deviations"] if d["change"] == "insert"]
    assert ins["precedent_text"] == "" and ins["draft_text"] == "not"  # an insert of words
    bad = copy.deepcopy(obj)
    next(d for d in bad["deviations"] if d["id"] == ins["id"])["draft_text_span"] = [1, 2, 3]
    assert not v.is_valid(bad)  # a span is [start, end]
    bad = copy.deepcopy(obj)
    bad["deviations"][0]["category"] = "cosmetic"
    assert not v.is_valid(bad)
    bad = copy.deepcopy(obj)
    bad["extra"] = 1
    assert not v.is_valid(bad)
