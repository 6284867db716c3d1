"""The ``counterdraft.review/1`` JSON object of a :class:`~core.model.Review`.

Exactly this shape (``resources/schemas/review.schema.json`` is its JSON Schema)::

    {"schema": "counterdraft.review/1", "acting_for": "Supplier" | null,
     "draft": {counterdraft.document/1}, "precedent": {counterdraft.document/1},
     "term_map": [{"draft", "precedent", "confidence", "evidence", "occurrences", "stale",
                   "substitutions", "aligned"}],
     "pairs": [{"draft", "precedent", "status", "similarity", "frequency"}],
     "deviations": [{"id", "rank", "severity", "category", "change", "draft_provision",
                     "precedent_provision", "precedent_text", "draft_text", "reasons",
                     "frequency", "precedent_text_span", "draft_text_span",
                     "direction"}],
     "checks": [{"kind", "document", "provision", "text", "message", "span", "part", "term",
                 "provisions"}]}

``acting_for`` is the precedent's party term the review acts for (``--acting-for``), and
``direction`` each deviation's direction for it: "adverse", "favourable", "neutral" or
"unclear" (always "unclear" without ``acting_for``; :mod:`core.review.direction`).

``frequency`` (of a pair and of a deviation) is null until the precedent set fills it
(:mod:`core.library`).
"""

from __future__ import annotations

from typing import Any

from ..model import Deviation, Frequency, Review
from ..serialize import document_to_dict
from .checks import Check

__all__ = ["REVIEW_SCHEMA_ID", "check_to_dict", "frequency_to_dict", "review_to_dict"]

REVIEW_SCHEMA_ID = "counterdraft.review/1"


def frequency_to_dict(f: Frequency | None) -> dict[str, Any] | None:
    if f is None:
        return None
    return {
        "same_type": f.same_type,
        "matching": f.matching,
        "total": f.total,
        "closest": [{"document": c.document, "provision": c.provision, "similarity": c.similarity}
                    for c in f.closest],
        "containing": f.containing,
        "position": f.position,
    }


def _deviation(v: Deviation) -> dict[str, Any]:
    return {
        "id": v.id,
        "rank": v.rank,
        "severity": v.severity,
        "category": v.category,
        "change": v.change,
        "draft_provision": v.draft_provision,
        "precedent_provision": v.precedent_provision,
        "precedent_text": v.precedent_text,
        "draft_text": v.draft_text,
        "reasons": list(v.reasons),
        "frequency": frequency_to_dict(v.frequency),
        "precedent_text_span": list(v.precedent_text_span) if v.precedent_text_span else None,
        "draft_text_span": list(v.draft_text_span) if v.draft_text_span else None,
        "direction": v.direction,
    }


def check_to_dict(c: Check) -> dict[str, Any]:
    """The JSON object of one drafting check."""
    return {
        "kind": c.kind,
        "document": c.document,
        "provision": c.provision,
        "text": c.text,
        "message": c.message,
        "span": list(c.span) if c.span else None,
        "part": c.part,
        "term": c.term,
        "provisions": list(c.provisions),
    }


def review_to_dict(review: Review) -> dict[str, Any]:
    """The JSON-ready ``counterdraft.review/1`` object of *review*."""
    return {
        "schema": REVIEW_SCHEMA_ID,
        "acting_for": review.acting_for,
        "draft": document_to_dict(review.draft),
        "precedent": document_to_dict(review.precedent),
        "term_map": [
            {"draft": m.draft, "precedent": m.precedent, "confidence": m.confidence,
             "evidence": list(m.evidence), "occurrences": m.occurrences, "stale": m.stale,
             "substitutions": m.substitutions, "aligned": m.aligned}
            for m in review.term_map
        ],
        "pairs": [
            {"draft": p.draft, "precedent": p.precedent, "status": p.status,
             "similarity": p.similarity, "frequency": frequency_to_dict(p.frequency)}
            for p in review.pairs
        ],
        "deviations": [_deviation(v) for v in review.deviations],
        "checks": [check_to_dict(c) for c in review.checks],
    }
