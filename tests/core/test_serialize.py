"""Tests of core.serialize against the JSON Schema of the document object.

Outside reference: JSON Schema draft 2020-12 (https://json-schema.org/draft/2020-12), as
implemented by the ``jsonschema`` package (Draft202012Validator); the schema file is
``resources/schemas/document.schema.json``.  The documents validated are the three license
texts of the PyPI package licensedcode-data and a .docx written with real auto-numbering.
"""

from __future__ import annotations

import json
from pathlib import Path

import jsonschema
import pytest

from core.docx.compose import ComposeParagraph as P
from core.docx.compose import compose_docx
from core.model import Document, Provision
from core.reader import read_document, read_text
from core.serialize import document_to_dict
from tests.support.document_checks import check_document
from tests.support.legal_texts import license_text

SCHEMA_PATH = Path(__file__).resolve().parents[2] / "resources" / "schemas" / "document.schema.json"


@pytest.fixture(scope="module")
def validator() -> jsonschema.Draft202012Validator:
    schema = json.loads(SCHEMA_PATH.read_text(encoding="utf-8"))
    jsonschema.Draft202012Validator.check_schema(schema)
    return jsonschema.Draft202012Validator(schema)


@pytest.mark.parametrize("name", ["apache-2.0", "gpl-3.0", "mpl-2.0"])
def test_license_documents_validate(validator, name):
    doc = read_text(license_text(name), source=f"/some/folder/{name}.txt")
    check_document(doc)
    obj = document_to_dict(doc)
    validator.validate(obj)
    # JSON round trip: plain JSON types only.
    assert json.loads(json.dumps(obj, ensure_ascii=False)) == obj
    assert obj["schema"] == "counterdraft.document/1"
    assert obj["source"] == f"{name}.txt"


def test_docx_document_validates_and_has_exactly_the_agreed_keys(validator, tmp_path):
    path = tmp_path / "precedent.docx"
    path.write_bytes(compose_docx([
        P("SUPPLY AGREEMENT", style="Title"),
        P("Definitions", level=0, style="Heading 1"),
        P('"Goods" means lamp housings supplied by Quillmere (the "Supplier").'),
        P("The Supplier delivers the Goods.", level=1),
    ]))
    doc = read_document(str(path))
    check_document(doc)
    obj = document_to_dict(doc)
    validator.validate(obj)
    assert list(obj) == ["schema", "source", "provisions", "terms"]
    assert obj["source"] == "precedent.docx"
    for p in obj["provisions"]:
        keys = ["id", "kind", "number", "heading", "level", "parent", "text"]
        assert list(p) == (keys + ["term"] if p["kind"] == "definition" else keys)
    assert obj["provisions"][2] == {
        "id": "p3", "kind": "definition", "number": None, "heading": None, "level": 0, "parent": "p2",
        "text": '"Goods" means lamp housings supplied by Quillmere (the "Supplier").', "term": "Goods",
    }
    whole = [0, len(obj["provisions"][2]["text"])]  # each definition is the whole provision
    assert obj["terms"] == [
        {"term": "Goods", "definition": obj["provisions"][2]["text"], "provision": "p3", "uses": 1,
         "aliases": [], "span": whole},
        {"term": "Supplier", "definition": obj["provisions"][2]["text"], "provision": "p3", "uses": 1,
         "aliases": [], "span": whole},
    ]


def test_source_is_the_base_name_for_either_separator():
    doc = Document(source="C:\\Deals\\draft v2.docx", provisions=(), terms=())
    assert document_to_dict(doc)["source"] == "draft v2.docx"


def test_schema_refuses_what_the_format_does_not_allow(validator):
    good = {"schema": "counterdraft.document/1", "source": "a.docx", "terms": [],
            "provisions": [{"id": "p1", "kind": "clause", "number": "1", "heading": None, "level": 1,
                            "parent": None, "text": "Words."}]}
    validator.validate(good)
    bad_cases = [
        {**good, "extra": 1},
        {**good, "source": "folder/a.docx"},
        {**good, "provisions": [{**good["provisions"][0], "term": "X"}]},  # term on a clause
        {**good, "provisions": [{**good["provisions"][0], "kind": "definition"}]},  # definition without term
        {**good, "provisions": [{**good["provisions"][0], "id": "7"}]},
        {**good, "provisions": [{**good["provisions"][0], "kind": "article"}]},
        {**good, "provisions": [{**good["provisions"][0], "level": -1}]},
        {**good, "terms": [{"term": "X", "definition": "", "provision": "p1"}]},
    ]
    for bad in bad_cases:
        assert not validator.is_valid(bad), bad


def test_term_key_only_for_definitions():
    defn = Provision(id="p1", kind="definition", number=None, heading=None, level=0, parent=None,
                     text='"X" means y.', term="X")
    clause = Provision(id="p2", kind="clause", number="1", heading=None, level=1, parent=None, text="z")
    obj = document_to_dict(Document(source="a.txt", provisions=(defn, clause), terms=()))
    assert obj["provisions"][0]["term"] == "X" and "term" not in obj["provisions"][1]
