"""The ``counterdraft library ...`` commands and ``review --library``.

Outside references:
* the ``jsonschema`` package validates ``review --json`` output against
  resources/schemas/review.schema.json (JSON Schema 2020-12), frequency objects included;
* the demo generator's record (scenario.json) for the precedent set's total;
* Python's ``csv`` module writes the calibration labels.
"""

from __future__ import annotations

import csv
import json
import shutil

import jsonschema
import pytest
from referencing import Registry, Resource

from core.cli import main

from .conftest import DEMO, ROOT

DRAFT = str(DEMO / "draft.docx")
PRECEDENT = str(DEMO / "precedent.docx")


def _validator() -> jsonschema.Draft202012Validator:
    schemas = ROOT / "resources" / "schemas"
    review = json.loads((schemas / "review.schema.json").read_text(encoding="utf-8"))
    document = json.loads((schemas / "document.schema.json").read_text(encoding="utf-8"))
    registry = Registry().with_resources([(review["$id"], Resource.from_contents(review)),
                                          (document["$id"], Resource.from_contents(document))])
    return jsonschema.Draft202012Validator(review, registry=registry)


@pytest.fixture()
def library_copy(tmp_path, demo_set, backend):
    """The indexed demo set plus a corrupt .docx (a copy of a real one, truncated)."""
    folder = backend.copy(demo_set, tmp_path / "set")
    data = (folder / "03-saltreach-water-services.docx").read_bytes()
    (folder / "zz-broken.docx").write_bytes(data[:2000])
    return folder


def _refreshed(backend, folder, capsys) -> str:
    """Bring the precedent set up to date as its users do, and return what went to stderr:
    'review --library DIR' refreshes a folder's own index itself; a shared store is
    refreshed by 'library build DIR --store ADDRESS' (its reviewers read it as it is)."""
    if backend.name == "sqlite":
        return ""
    assert main(["library", "build", str(folder), *backend.build_args(folder)]) == 0
    return capsys.readouterr().err


def test_review_with_library_writes_frequencies(library_copy, capsys, scenario, backend):
    build_err = _refreshed(backend, library_copy, capsys)
    assert main(["review", DRAFT, "--against", PRECEDENT, "--library", backend.target(library_copy),
                 "--json", "-"]) == 0
    out, err = capsys.readouterr()
    err = build_err + err
    review = json.loads(out)
    _validator().validate(review)  # reference: the review JSON schema, checked by jsonschema
    # The corrupt file is skipped with a warning naming it; the exit status stays 0.
    assert "warning: skipped zz-broken.docx" in err
    total = scenario["precedent_set"]["total"]
    assert all(p["frequency"] is not None and p["frequency"]["total"] == total for p in review["pairs"])
    assert all(d["frequency"] is not None for d in review["deviations"])
    assert any(r.startswith("accepted in ") for d in review["deviations"] for r in d["reasons"])


def test_draft_inside_the_library_is_counted(library_copy, capsys, scenario, backend):
    shutil.copy(DRAFT, library_copy / "draft-copy.docx")
    _refreshed(backend, library_copy, capsys)
    assert main(["review", DRAFT, "--against", PRECEDENT, "--library", backend.target(library_copy),
                 "--json", "-"]) == 0
    review = json.loads(capsys.readouterr().out)
    assert {p["frequency"]["total"] for p in review["pairs"]} == {scenario["precedent_set"]["total"] + 1}


def test_review_without_library_has_null_frequencies(capsys):
    assert main(["review", DRAFT, "--against", PRECEDENT, "--json", "-"]) == 0
    review = json.loads(capsys.readouterr().out)
    assert all(d["frequency"] is None for d in review["deviations"])


def test_library_subcommands(library_copy, tmp_path, capsys, backend):
    assert main(["library", "build", str(library_copy), *backend.build_args(library_copy)]) == 0
    out, err = capsys.readouterr()
    assert "12 agreements indexed (1 read, 12 unchanged, 0 removed, 1 skipped)" in out
    assert "skipped zz-broken.docx" in err
    target = backend.target(library_copy)

    assert main(["library", "stats", target]) == 0
    assert "12 agreements" in capsys.readouterr().out
    assert main(["library", "stats", target, "--json", "-"]) == 0
    assert json.loads(capsys.readouterr().out)["documents"] == 12
    assert main(["library", "stats", target, "--variants", "payment"]) == 0
    assert "04-pellbrook-analytical.docx 9.2" in capsys.readouterr().out

    assert main(["library", "label", target, "--document", "04-pellbrook-analytical.docx",
                 "--provision", "9.2", "--position", "not-acceptable"]) == 0
    out, err = capsys.readouterr()  # a former name is taken, with a one-line notice
    assert "labelled refuse" in out and err.count("\n") == 1 and 'former name of the stance "refuse"' in err
    assert main(["library", "label", target, "--document", "04-pellbrook-analytical.docx",
                 "--provision", "9.2", "--position", "Can-Live-With"]) == 0
    out, err = capsys.readouterr()
    assert "labelled can live with" in out and err == ""
    assert main(["library", "label", target, "--document", "04-pellbrook-analytical.docx",
                 "--provision", "9.2", "--position", "preferable"]) == 2
    assert "position must be one of: house wording, can live with, last concession, refuse" in capsys.readouterr().err
    assert main(["library", "label", target, "--document", "04-pellbrook-analytical.docx",
                 "--provision", "9.2", "--position", "refuse"]) == 0
    assert "labelled refuse" in capsys.readouterr().out

    labels = tmp_path / "labels.csv"
    with open(labels, "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerows([["document", "provision", "label"],
                     ["01-quenby-astrel-diagnostics.docx", "9.2", "30 days"],
                     ["04-pellbrook-analytical.docx", "9.2", "60 days"]])
    assert main(["library", "calibrate", target, "--labels", str(labels), "--cutoffs", "0.1,0.2,0.9"]) == 0
    assert "suggested cut-off: 0.20" in capsys.readouterr().out

    assert main(["library", "patterns", target, "--against", PRECEDENT, "--workers", "1",
                 "--json", "-"]) == 0
    patterns = json.loads(capsys.readouterr().out)
    assert patterns["total"] == 12 and patterns["clause_types"]


def test_errors_are_one_line_with_status_2(tmp_path, capsys):
    assert main(["library", "stats", str(tmp_path)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "no precedent-set index" in err
    assert main(["library", "build", str(tmp_path / "missing")]) == 2
    assert "not a folder" in capsys.readouterr().err
    assert main(["library", "calibrate", str(tmp_path), "--cutoffs", "a,b"]) == 2
    assert main(["review", DRAFT, "--against", PRECEDENT, "--library", str(tmp_path / "none")]) == 2
    assert "does not exist" in capsys.readouterr().err


def test_a_read_only_precedent_set_folder_says_what_to_do(tmp_path, monkeypatch, capsys):
    """The index folder cannot be created (simulated: the suite may run as root, who can
    write anywhere): one line that names the folder and offers no option 'review' lacks."""
    import errno
    import os
    from pathlib import Path

    folder = tmp_path / "set"
    shutil.copytree(DEMO / "precedent_set", folder, ignore=shutil.ignore_patterns(".counterdraft"))
    real_mkdir = Path.mkdir

    def refuse(self, *args, **kwargs):
        if self.name == ".counterdraft":
            raise PermissionError(errno.EACCES, os.strerror(errno.EACCES), str(self))
        return real_mkdir(self, *args, **kwargs)

    monkeypatch.setattr(Path, "mkdir", refuse)
    assert main(["review", DRAFT, "--against", PRECEDENT, "--library", str(folder)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and str(folder / ".counterdraft") in err
    assert "must be writable" in err and "--db" not in err


def test_a_damaged_index_is_rebuilt_by_build_and_review(tmp_path, sqlite_demo_set, capsys, scenario):
    """Garbage bytes in place of the index: both commands set it aside, rebuild it from the
    agreements and say so in one line on stderr; the results are those of a sound index."""
    library_copy = shutil.copytree(sqlite_demo_set, tmp_path / "set")
    data = (library_copy / "03-saltreach-water-services.docx").read_bytes()
    (library_copy / "zz-broken.docx").write_bytes(data[:2000])
    db = library_copy / ".counterdraft" / "library.sqlite"
    db.write_bytes(bytes(range(256)) * 64)
    assert main(["library", "build", str(library_copy)]) == 0
    out, err = capsys.readouterr()
    assert "12 agreements indexed (13 read, 0 unchanged, 0 removed, 1 skipped)" in out
    notes = [line for line in err.splitlines() if line.startswith("counterdraft: note: ")]
    assert len(notes) == 1 and "rebuilt from the agreements" in notes[0]
    assert "file is not a database" in notes[0]  # SQLite's message for SQLITE_NOTADB

    db.write_bytes(b"\x00garbage" * 1000)
    assert main(["review", DRAFT, "--against", PRECEDENT, "--library", str(library_copy), "--json", "-"]) == 0
    out, err = capsys.readouterr()
    assert "rebuilt from the agreements" in err
    review = json.loads(out)
    _validator().validate(review)
    total = scenario["precedent_set"]["total"]
    assert all(p["frequency"] is not None and p["frequency"]["total"] == total for p in review["pairs"])
    assert len(list(db.parent.glob("library.sqlite.damaged-*"))) == 2
