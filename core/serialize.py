"""The model's JSON objects, both ways, in one place.

Two published shapes (their JSON Schemas are in ``resources/schemas``, the reference):

* ``counterdraft.document/1`` (``document.schema.json``), a read document::

    {"schema": "counterdraft.document/1",
     "source": "<base name of the file>",
     "provisions": [{"id", "kind", "number", "heading", "level", "parent", "text"
                     [, "term" only when kind is "definition"]}],
     "terms": [{"term", "definition", "provision", "uses", "aliases", "span"}]}

  ``aliases`` lists the term's other names (a use of one is a use of the term); ``span`` is
  ``[start, end]`` of the definition in the defining provision's text, or null.

* ``counterdraft.review/1`` (``review.schema.json``), a :class:`~core.model.Review`::

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
  ``direction`` each deviation's direction for it (always "unclear" without ``acting_for``;
  :mod:`core.review.direction`).  ``frequency`` (of a pair and of a deviation) is null until
  the precedent set fills it (:mod:`core.library`).

The review file's own parts (``review-file.schema.json``): a term override ``{"draft",
"precedent", "action"}`` and a decision ``{"deviation", "action", "text", "note", "match"}``.

What the JSON leaves out (engine-internal, recomputed from the files): a document's blocks,
warnings and provision segments, a source's folders, a pair's word diff (``edits``) and a
deviation's ``part`` and change spans (``precedent_span``, ``draft_span``).  Reading a dict
back gives those their defaults, so ``X_from_dict(X_to_dict(x)) == x`` for every value that
carries only what the JSON holds (tests/core/test_serialize_laws.py).

Reading validates the object against its schema first (``jsonschema``, Draft 2020-12) and
raises :class:`~core.errors.CounterdraftError` naming the field and the problem.
"""

from __future__ import annotations

import functools
import json
import re
from collections.abc import Iterator, Mapping, Sequence
from pathlib import Path
from typing import Any, Literal, Protocol, cast

from .errors import CounterdraftError
from .model import (
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
    stance_named,
)

__all__ = [
    "DOCUMENT_SCHEMA_ID",
    "REVIEW_SCHEMA_ID",
    "JsonObject",
    "SchemaName",
    "SchemaValidator",
    "check_from_dict",
    "check_to_dict",
    "decision_from_dict",
    "decision_to_dict",
    "deviation_from_dict",
    "deviation_to_dict",
    "document_from_dict",
    "document_to_dict",
    "frequency_from_dict",
    "frequency_to_dict",
    "override_from_dict",
    "override_to_dict",
    "pair_from_dict",
    "pair_to_dict",
    "provision_from_dict",
    "provision_to_dict",
    "review_from_dict",
    "review_to_dict",
    "schema_problem",
    "schema_validator",
    "term_from_dict",
    "term_mapping_from_dict",
    "term_mapping_to_dict",
    "term_to_dict",
    "validate",
]

DOCUMENT_SCHEMA_ID = "counterdraft.document/1"
REVIEW_SCHEMA_ID = "counterdraft.review/1"

#: A JSON object as ``json`` reads and writes it.  Its values are of many JSON types, so
#: they are ``Any``: a reader validates the object against its schema before using them.
JsonObject = dict[str, Any]
#: The published schemas, by file name stem (resources/schemas/<name>.schema.json).
SchemaName = Literal["document", "review", "review-file"]

_SCHEMAS = Path(__file__).resolve().parent.parent / "resources" / "schemas"
_SCHEMA_FILES = ("document", "review", "review-file")
#: Longest part of a schema problem quoted in a message (a hand-edited value can be long).
_PROBLEM_QUOTE_CHARS = 120


# --------------------------------------------------------------------------------------
# Schemas
# --------------------------------------------------------------------------------------


class SchemaValidator(Protocol):
    """What this module uses of a ``jsonschema`` validator (the package ships no types)."""

    schema: Mapping[str, Any]

    def iter_errors(self, instance: object) -> Iterator[Any]: ...
    def is_valid(self, instance: object) -> bool: ...
    def validate(self, instance: object) -> None: ...


@functools.cache
def schema_validator(name: SchemaName) -> SchemaValidator:
    """The Draft 2020-12 validator of the published schema *name*, with the schemas it
    refers to (all of ``resources/schemas`` that describe the model)."""
    import jsonschema
    from referencing import Registry, Resource

    schemas = {stem: json.loads((_SCHEMAS / f"{stem}.schema.json").read_text(encoding="utf-8"))
               for stem in _SCHEMA_FILES}
    registry = Registry().with_resources(
        [(s["$id"], Resource.from_contents(s)) for s in schemas.values()])
    # cast: jsonschema's validators have no type information; this one has the protocol's methods
    return cast(SchemaValidator, jsonschema.Draft202012Validator(schemas[name], registry=registry))


def schema_problem(data: object, name: SchemaName) -> str | None:
    """The first problem of *data* against schema *name*, in one line naming the field
    (``deviations[2].rank: -1 is less than the minimum of 1``), or None when it is valid."""
    from jsonschema.exceptions import best_match

    error = best_match(schema_validator(name).iter_errors(data))
    if error is None:
        return None
    where = "".join(f"[{p}]" if isinstance(p, int) else f".{p}" for p in error.absolute_path)
    problem = " ".join(error.message.split())
    if len(problem) > _PROBLEM_QUOTE_CHARS:
        problem = problem[:_PROBLEM_QUOTE_CHARS - 1] + "\u2026"
    return f"{where.lstrip('.') or 'top level'}: {problem}"


def validate(data: object, name: SchemaName, *, path: str | None = None) -> None:
    """Raise :class:`CounterdraftError` (naming *path* when given) unless *data* is valid
    against the published schema *name*."""
    problem = schema_problem(data, name)
    if problem is not None:
        raise CounterdraftError(f"not a valid {name} object ({problem})", path=path)


# --------------------------------------------------------------------------------------
# Small shared pieces
# --------------------------------------------------------------------------------------


def _base_name(source: str) -> str:
    """The file name without folders, for either path separator."""
    return re.split(r"[\\/]", source)[-1] or source


def _span_to_list(span: tuple[int, int] | None) -> list[int] | None:
    return list(span) if span is not None else None


def _span_from(value: Any) -> tuple[int, int] | None:
    return (int(value[0]), int(value[1])) if value is not None else None


# --------------------------------------------------------------------------------------
# The document
# --------------------------------------------------------------------------------------


def provision_to_dict(p: Provision) -> JsonObject:
    d: JsonObject = {
        "id": p.id,
        "kind": p.kind,
        "number": p.number,
        "heading": p.heading,
        "level": p.level,
        "parent": p.parent,
        "text": p.text,
    }
    if p.kind == "definition":
        d["term"] = p.term
    return d


def provision_from_dict(d: Mapping[str, Any]) -> Provision:
    return Provision(id=d["id"], kind=d["kind"], number=d["number"], heading=d["heading"],
                     level=d["level"], parent=d["parent"], text=d["text"], term=d.get("term"))


def term_to_dict(t: DefinedTerm) -> JsonObject:
    return {"term": t.term, "definition": t.definition, "provision": t.provision, "uses": t.uses,
            "aliases": list(t.aliases), "span": _span_to_list(t.span)}


def term_from_dict(d: Mapping[str, Any]) -> DefinedTerm:
    return DefinedTerm(term=d["term"], definition=d["definition"], provision=d["provision"],
                       uses=d["uses"], aliases=tuple(d["aliases"]), span=_span_from(d["span"]))


def document_to_dict(doc: Document) -> JsonObject:
    """The JSON-ready ``counterdraft.document/1`` object of *doc*."""
    return {
        "schema": DOCUMENT_SCHEMA_ID,
        "source": _base_name(doc.source),
        "provisions": [provision_to_dict(p) for p in doc.provisions],
        "terms": [term_to_dict(t) for t in doc.terms],
    }


def document_from_dict(d: Mapping[str, Any], *, path: str | None = None) -> Document:
    """The :class:`Document` of a ``counterdraft.document/1`` object (validated first)."""
    validate(d, "document", path=path)
    return _document(d)


def _document(d: Mapping[str, Any]) -> Document:
    return Document(source=d["source"],
                    provisions=tuple(provision_from_dict(p) for p in d["provisions"]),
                    terms=tuple(term_from_dict(t) for t in d["terms"]))


# --------------------------------------------------------------------------------------
# The review
# --------------------------------------------------------------------------------------


def frequency_to_dict(f: Frequency | None) -> JsonObject | None:
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


def frequency_from_dict(d: Mapping[str, Any] | None) -> Frequency | None:
    if d is None:
        return None
    return Frequency(same_type=d["same_type"], matching=d["matching"], total=d["total"],
                     closest=tuple(ClosestProvision(document=c["document"], provision=c["provision"],
                                                    similarity=c["similarity"])
                                   for c in d.get("closest", ())),
                     containing=d.get("containing"), position=stance_named(d.get("position")))


def term_mapping_to_dict(m: TermMapping) -> JsonObject:
    return {"draft": m.draft, "precedent": m.precedent, "confidence": m.confidence,
            "evidence": list(m.evidence), "occurrences": m.occurrences, "stale": m.stale,
            "substitutions": m.substitutions, "aligned": m.aligned}


def term_mapping_from_dict(d: Mapping[str, Any]) -> TermMapping:
    return TermMapping(draft=d["draft"], precedent=d["precedent"], confidence=d["confidence"],
                       evidence=tuple(d["evidence"]), occurrences=d["occurrences"],
                       stale=d["stale"], substitutions=d["substitutions"], aligned=d["aligned"])


def pair_to_dict(p: Pair) -> JsonObject:
    return {"draft": p.draft, "precedent": p.precedent, "status": p.status,
            "similarity": p.similarity, "frequency": frequency_to_dict(p.frequency)}


def pair_from_dict(d: Mapping[str, Any]) -> Pair:
    return Pair(draft=d["draft"], precedent=d["precedent"], status=d["status"],
                similarity=d["similarity"], frequency=frequency_from_dict(d.get("frequency")))


#: The fields of a deviation and of a check written as they are, in the objects' order.
_DEVIATION_FIELDS = ("id", "rank", "severity", "category", "change", "draft_provision",
                     "precedent_provision", "precedent_text", "draft_text")
_CHECK_FIELDS = ("kind", "document", "provision", "text", "message")


def _fields(obj: object, names: Sequence[str]) -> JsonObject:
    return {name: getattr(obj, name) for name in names}


def deviation_to_dict(v: Deviation) -> JsonObject:
    return {**_fields(v, _DEVIATION_FIELDS),
            "reasons": list(v.reasons),
            "frequency": frequency_to_dict(v.frequency),
            "precedent_text_span": _span_to_list(v.precedent_text_span),
            "draft_text_span": _span_to_list(v.draft_text_span),
            "direction": v.direction}


def deviation_from_dict(d: Mapping[str, Any]) -> Deviation:
    return Deviation(**{name: d[name] for name in _DEVIATION_FIELDS},
                     reasons=tuple(d["reasons"]), frequency=frequency_from_dict(d["frequency"]),
                     precedent_text_span=_span_from(d.get("precedent_text_span")),
                     draft_text_span=_span_from(d.get("draft_text_span")),
                     direction=d.get("direction", "unclear"))


def check_to_dict(c: Check) -> JsonObject:
    """The JSON object of one drafting check."""
    return {**_fields(c, _CHECK_FIELDS), "span": _span_to_list(c.span), "part": c.part,
            "term": c.term, "provisions": list(c.provisions)}


def check_from_dict(d: Mapping[str, Any]) -> Check:
    return Check(**{name: d[name] for name in _CHECK_FIELDS}, span=_span_from(d.get("span")),
                 part=d.get("part", "text"), term=d.get("term"),
                 provisions=tuple(d.get("provisions", ())))


def review_to_dict(review: Review) -> JsonObject:
    """The JSON-ready ``counterdraft.review/1`` object of *review*."""
    return {
        "schema": REVIEW_SCHEMA_ID,
        "acting_for": review.acting_for,
        "draft": document_to_dict(review.draft),
        "precedent": document_to_dict(review.precedent),
        "term_map": [term_mapping_to_dict(m) for m in review.term_map],
        "pairs": [pair_to_dict(p) for p in review.pairs],
        "deviations": [deviation_to_dict(v) for v in review.deviations],
        "checks": [check_to_dict(c) for c in review.checks],
    }


def review_from_dict(d: Mapping[str, Any], *, path: str | None = None) -> Review:
    """The :class:`Review` of a ``counterdraft.review/1`` object (validated first); an
    object written before ``acting_for``, ``direction`` or ``checks`` existed reads with
    their defaults."""
    validate(d, "review", path=path)
    return Review(draft=_document(d["draft"]), precedent=_document(d["precedent"]),
                  term_map=tuple(term_mapping_from_dict(m) for m in d["term_map"]),
                  pairs=tuple(pair_from_dict(p) for p in d["pairs"]),
                  deviations=tuple(deviation_from_dict(v) for v in d["deviations"]),
                  acting_for=d.get("acting_for"),
                  checks=tuple(check_from_dict(c) for c in d.get("checks", ())))


# --------------------------------------------------------------------------------------
# The reviewer's input (parts of the review file)
# --------------------------------------------------------------------------------------


def override_to_dict(o: TermOverride) -> JsonObject:
    return {"draft": o.draft, "precedent": o.precedent, "action": o.action}


def override_from_dict(d: Mapping[str, Any]) -> TermOverride:
    """The :class:`TermOverride` of a stored override (its checks raise
    :class:`CounterdraftError` for one the engine cannot take)."""
    return TermOverride(draft=d["draft"], precedent=d.get("precedent"),
                        action=d.get("action", "confirm"))


def decision_to_dict(dec: Decision) -> JsonObject:
    return {"deviation": dec.deviation, "action": dec.action, "text": dec.text, "note": dec.note,
            "match": dict(dec.match)}


def decision_from_dict(d: Mapping[str, Any]) -> Decision:
    return Decision(deviation=d["deviation"], action=d["action"], text=d.get("text"),
                    note=d.get("note"), match=dict(d.get("match") or {}))
