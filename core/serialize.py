"""The ``counterdraft.document/1`` JSON object of a read document.

Exactly this shape (``resources/schemas/document.schema.json`` is its JSON Schema)::

    {"schema": "counterdraft.document/1",
     "source": "<base name of the file>",
     "provisions": [{"id", "kind", "number", "heading", "level", "parent", "text"
                     [, "term" only when kind is "definition"]}],
     "terms": [{"term", "definition", "provision", "uses", "aliases", "span"}]}

``aliases`` lists the term's other names (a use of one is a use of the term); ``span`` is
``[start, end]`` of the definition in the defining provision's text, or null.
"""

from __future__ import annotations

import re
from typing import Any

from .model import Document, Provision

__all__ = ["DOCUMENT_SCHEMA_ID", "document_to_dict", "provision_to_dict"]

DOCUMENT_SCHEMA_ID = "counterdraft.document/1"


def _base_name(source: str) -> str:
    """The file name without folders, for either path separator."""
    return re.split(r"[\\/]", source)[-1] or source


def provision_to_dict(p: Provision) -> dict[str, Any]:
    d: dict[str, Any] = {
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


def document_to_dict(doc: Document) -> dict[str, Any]:
    """The JSON-ready ``counterdraft.document/1`` object of *doc*."""
    return {
        "schema": DOCUMENT_SCHEMA_ID,
        "source": _base_name(doc.source),
        "provisions": [provision_to_dict(p) for p in doc.provisions],
        "terms": [
            {"term": t.term, "definition": t.definition, "provision": t.provision, "uses": t.uses,
             "aliases": list(t.aliases), "span": list(t.span) if t.span is not None else None}
            for t in doc.terms
        ],
    }
