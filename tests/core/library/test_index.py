"""The precedent-set index: build, incremental rebuild, bad files, permissions, cancel.

Outside references:
* ``hashlib.sha256`` (FIPS 180-4) for the stored content hashes;
* SQLite's own ``PRAGMA integrity_check`` and POSIX file modes (``os.stat``) for the files;
  what was stored is read back by each database engine with its own driver (``sqlite3``,
  ``psycopg``), not through the store's code;
  SQLite's result codes (SQLITE_CORRUPT, https://www.sqlite.org/rescode.html) for damage;
* the ZIP file format via ``zipfile`` (a .docx is an OPC/ZIP package, ECMA-376 Part 2 section
  8): a truncated copy of a real .docx is a corrupt package.
"""

from __future__ import annotations

import hashlib
import os
import shutil
import sqlite3
import stat
import threading
from pathlib import Path

import pytest

import core.library.index as index_module
from core.errors import CounterdraftError
from core.library.index import (
    BUCKETS_DIRNAME,
    CACHE_FILENAME,
    DB_DIRNAME,
    DB_FILENAME,
    NEIGHBOURS_FILENAME,
    VOCAB_FILENAME,
    build_library,
    open_library,
    scan_files,
)

from .conftest import DEMO

SENTINEL = "Quillowby"  # a word that appears only inside the agreements' text


def agreement(n: int, *, days: int = 30, extra: str = "") -> str:
    """A small plain-text agreement with recognisable clauses."""
    return (f"SUPPLY AGREEMENT NUMBER {n}\n\n"
            f"This Agreement is made between {SENTINEL} Mills Limited (\"Supplier\") and Corrimar "
            f"Vendlowe Limited (\"Customer\").\n\n"
            "1. Definitions\n\n1.1 \"Goods\" means the goods described in the Order.\n\n"
            "2. Payment\n\n2.1 The Customer shall pay each invoice submitted by the Supplier within "
            f"{days} days of the date of the invoice.{extra}\n\n"
            "3. Limitation of Liability\n\n3.1 The Supplier's total liability shall not exceed the "
            "charges paid in the twelve months before the claim.\n\n"
            "4. Governing Law\n\n4.1 This Agreement is governed by the law of Ardence.\n")


def make_folder(root: Path) -> Path:
    root.mkdir()
    (root / "a.txt").write_text(agreement(1), encoding="utf-8")
    (root / "sub").mkdir()
    (root / "sub" / "b.md").write_text(agreement(2, days=60), encoding="utf-8")
    shutil.copy(DEMO / "precedent_set" / "01-quenby-astrel-diagnostics.docx", root / "sub" / "c.docx")
    good = (DEMO / "precedent_set" / "02-orrinwick-process-engineering.docx").read_bytes()
    (root / "truncated.docx").write_bytes(good[: len(good) // 3])
    (root / "noise.docx").write_bytes(bytes(range(256)) * 8)
    (root / "shopping.txt").write_text("Milk, eggs, flour and a new kettle for the office.\n", encoding="utf-8")
    (root / "empty.md").write_bytes(b"")
    (root / ".hidden").mkdir()
    (root / ".hidden" / "x.txt").write_text(agreement(9), encoding="utf-8")
    (root / "~$lock.docx").write_bytes(b"\x00" * 162)
    (root / "notes.pdf").write_bytes(b"%PDF-1.4")
    return root


def test_folder_with_bad_files_builds_reports_them_and_indexes_the_rest(tmp_path, backend):
    root = make_folder(tmp_path / "lib")
    seen: list[tuple[int, int, str]] = []
    report = backend.build(root, progress=lambda d, t, p: seen.append((d, t, p)))
    assert report.documents == 3 and report.read == 7 and not report.cancelled
    problems = {f.path: f.problem for f in report.failures}
    assert set(problems) == {"truncated.docx", "noise.docx", "shopping.txt", "empty.md"}
    assert problems["empty.md"] == "empty file"
    assert problems["shopping.txt"].startswith("not an agreement")
    # Hidden folders, Office lock files and other suffixes are not candidates at all.
    assert [d for d, _t, _p in seen] == list(range(1, 8)) and {t for _d, t, _p in seen} == {7}
    assert sorted(Path(p).name for p in scan_files(root)) == sorted(
        ["a.txt", "b.md", "c.docx", "truncated.docx", "noise.docx", "shopping.txt", "empty.md"])
    # Never the agreements' text in progress reports or failure reasons.
    assert not any(SENTINEL in p for _d, _t, p in seen)
    assert not any(SENTINEL in f.problem for f in report.failures)
    if backend.name == "sqlite":
        assert backend.query(root, "PRAGMA integrity_check")[0][0] == "ok"
    rows = dict(backend.query(root, "SELECT path, sha256 FROM documents"))
    assert set(rows) == {"a.txt", "sub/b.md", "sub/c.docx"}
    for rel, digest in rows.items():
        # Reference: hashlib.sha256 of the file's bytes.
        assert digest == hashlib.sha256((root / rel).read_bytes()).hexdigest()
    parties = backend.query(root, "SELECT parties FROM documents WHERE path = 'a.txt'")[0][0]
    assert "Corrimar Vendlowe Limited (Customer)" in parties
    assert backend.query(root, "SELECT COUNT(*) FROM terms")[0][0] >= 6
    with backend.open(root) as lib:
        assert lib.total == 3
        assert {f.path for f in lib.failures()} == set(problems)
        assert lib.documents_with("payment") == 3


def test_incremental_rebuild(tmp_path, backend):
    root = make_folder(tmp_path / "lib")
    backend.build(root)
    again = backend.build(root)
    assert (again.read, again.unchanged, again.removed) == (0, 7, 0)
    # Touched but unchanged: the stat differs, the hash does not -> not re-read.
    os.utime(root / "a.txt", ns=(1_000_000_000, 1_000_000_000))
    assert backend.build(root).read == 0
    # Changed content -> re-read; the new wording is in the index.
    (root / "a.txt").write_text(agreement(1, days=90), encoding="utf-8")
    changed = backend.build(root)
    assert (changed.read, changed.removed) == (1, 0)
    texts = [t for (t,) in backend.query(
        root, "SELECT p.text FROM provisions p JOIN documents d ON d.id = p.document_id WHERE d.path = 'a.txt'")]
    assert any("90 days" in t for t in texts) and not any("30 days" in t for t in texts)
    # Removed file -> dropped with its provisions and terms; a fixed failure becomes a document.
    count = "SELECT COUNT(*) FROM provisions"
    before = backend.query(root, count)[0][0]
    (root / "sub" / "b.md").unlink()
    (root / "empty.md").write_text(agreement(5), encoding="utf-8")
    after = backend.build(root)
    assert after.removed == 1 and after.read == 1 and after.documents == 3
    assert "empty.md" not in {f.path for f in after.failures}
    assert backend.query(root, "SELECT COUNT(*) FROM documents WHERE path = 'sub/b.md'")[0][0] == 0
    for table in ("provisions", "terms"):
        orphans = backend.query(root, f"SELECT COUNT(*) FROM {table} WHERE document_id NOT IN "
                                      "(SELECT id FROM documents)")[0][0]
        assert orphans == 0
    assert backend.query(root, count)[0][0] == before  # one agreement of the same shape in, one out


def test_index_files_are_private(tmp_path):
    root = make_folder(tmp_path / "lib")
    old = os.umask(0o022)
    try:
        build_library(root)
        (root / "a.txt").write_text(agreement(1, days=45), encoding="utf-8")
        build_library(root)
    finally:
        os.umask(old)
    folder = root / DB_DIRNAME
    # POSIX modes: the folder rwx for the owner only, every file rw for the owner only.
    assert stat.S_IMODE(folder.stat().st_mode) == 0o700
    names = {p.name for p in folder.iterdir()}
    assert {DB_FILENAME, BUCKETS_DIRNAME, NEIGHBOURS_FILENAME, VOCAB_FILENAME} <= names
    assert CACHE_FILENAME not in names  # the single cache file of earlier versions
    assert any((folder / BUCKETS_DIRNAME).iterdir())
    for p in folder.rglob("*"):
        expected = 0o700 if p.is_dir() else 0o600
        assert stat.S_IMODE(p.stat().st_mode) == expected, p.name
    # An index path of your choice is private too.
    other = tmp_path / "elsewhere"
    other.mkdir()
    build_library(root, db_path=other / "mine.sqlite", vocabulary=False)
    assert stat.S_IMODE((other / "mine.sqlite").stat().st_mode) == 0o600


def test_cancel_keeps_what_was_read_and_the_next_build_finishes(tmp_path, backend):
    root = make_folder(tmp_path / "lib")
    stop = threading.Event()
    report = backend.build(root, progress=lambda d, t, p: stop.set() if d >= 2 else None, cancel=stop)
    assert report.cancelled
    assert report.read < 7
    with backend.open(root) as lib:
        assert lib.stale
    done = backend.build(root)
    assert not done.cancelled and done.documents == 3
    with backend.open(root) as lib:
        assert not lib.stale
        assert lib.bucket("payment") is not None


def test_parallel_reading_gives_the_same_index(tmp_path, monkeypatch, backend):
    a = make_folder(tmp_path / "one")
    for i in range(4):
        (a / f"extra{i}.txt").write_text(agreement(10 + i, days=15 * (i + 1)), encoding="utf-8")
    b = tmp_path / "two"
    shutil.copytree(a, b)
    backend.build(a, workers=1, vocabulary=False)
    monkeypatch.setattr(index_module, "POOL_MIN_FILES", 2)
    backend.build(b, workers=2, vocabulary=False)

    def content(root: Path):
        return (sorted(backend.query(root, "SELECT d.path, p.pid, p.kind, p.number, p.heading, p.text, "
                                           "p.clause_type, p.norm_hash FROM provisions p "
                                           "JOIN documents d ON d.id = p.document_id")),
                sorted(backend.query(root, "SELECT path, problem FROM failures")))

    assert content(a) == content(b)


def test_labels_survive_a_rebuild_and_apply_to_every_member(tmp_path, backend):
    root = make_folder(tmp_path / "lib")
    (root / "a2.txt").write_text(agreement(3), encoding="utf-8")  # same payment wording as a.txt
    backend.build(root)
    with backend.open(root) as lib:
        vid = lib.variant_of("a.txt", "2.1")
        assert vid is not None and vid == lib.variant_of("a2.txt", "2.1")
        assert lib.label_variant(vid, "house wording") == 1  # one distinct wording, two documents
        info = [v for v in lib.variants(bucket="payment") if v.id == vid][0]
        assert info.position == "house wording" and info.documents == 2
        with pytest.raises(CounterdraftError):
            lib.label_variant(vid, "great")
        with pytest.raises(CounterdraftError):
            lib.label_variant(10**9, "house wording")
    (root / "a3.txt").write_text(agreement(4), encoding="utf-8")
    backend.build(root)  # the payment type is re-clustered with a new member
    with backend.open(root) as lib:
        vid = lib.variant_of("a3.txt", "2.1")
        info = [v for v in lib.variants(bucket="payment") if v.id == vid]
        assert [(v.position, v.documents) for v in info] == [("house wording", 3)]
        lib.label_variant(vid, None)
        assert [v.position for v in lib.variants(bucket="payment") if v.id == vid] == [None]


def test_an_index_with_the_former_stance_names_is_converted_when_opened(tmp_path):
    """An index written before the stances were renamed stores "preferred" ... "not
    acceptable"; opening it renames them in place (labels and variants), once, and a
    refresh keeps them."""
    from core.library.index import FORMER_POSITIONS, POSITIONS

    root = make_folder(tmp_path / "lib")
    build_library(root)
    with open_library(root, refresh=False) as lib:
        vid = lib.variant_of("a.txt", "2.1")
        lib.label_variant(vid, "last concession")
    db = root / DB_DIRNAME / DB_FILENAME
    with sqlite3.connect(db) as conn:  # what an index of the earlier version holds
        conn.execute("UPDATE labels SET position = 'fallback'")
        conn.execute("UPDATE variants SET position = 'fallback' WHERE position IS NOT NULL")
        conn.execute("DELETE FROM meta WHERE key = 'position_names'")
    conn.close()
    with open_library(root, refresh=False) as lib:
        assert lib.variant_positions() == {vid: "last concession"}
    with sqlite3.connect(db) as conn:
        assert conn.execute("SELECT DISTINCT position FROM labels").fetchall() == [("last concession",)]
    conn.close()
    build_library(root)
    with open_library(root) as lib:
        assert set(lib.variant_positions().values()) == {"last concession"}
    assert dict(zip(FORMER_POSITIONS.values(), POSITIONS)) == {p: p for p in POSITIONS}  # same order


def test_bad_arguments(tmp_path):
    with pytest.raises(CounterdraftError, match="not a folder"):
        build_library(tmp_path / "missing")
    with pytest.raises(CounterdraftError, match="no precedent-set index"):
        open_library(tmp_path, refresh=False)
    (tmp_path / "bad.sqlite").write_bytes(b"this is not a database" * 100)
    with pytest.raises(CounterdraftError, match="not a usable index"):
        open_library(tmp_path, db_path=tmp_path / "bad.sqlite", refresh=False)


def test_empty_folder_builds_an_empty_index(tmp_path, backend):
    report = backend.build(tmp_path)
    assert report.documents == 0 and report.files == 0
    with backend.open(tmp_path) as lib:
        assert lib.total == 0 and lib.bucket("payment") is None and lib.vocabulary is None


def _garbage(db: Path) -> None:
    db.write_bytes(bytes(range(256)) * 64)


def _truncated(db: Path) -> None:
    data = db.read_bytes()
    db.write_bytes(data[: len(data) // 2])


def _other_schema_version(db: Path) -> None:
    with sqlite3.connect(db) as conn:
        conn.execute("UPDATE meta SET value = '0' WHERE key = 'schema'")
    conn.close()


def _foreign_database(db: Path) -> None:
    db.unlink()
    conn = sqlite3.connect(db)
    conn.execute("CREATE TABLE recipes(name TEXT)")
    conn.commit()
    conn.close()


@pytest.mark.parametrize("damage", [_garbage, _truncated, _other_schema_version, _foreign_database],
                         ids=["garbage", "truncated", "other-version", "foreign"])
def test_an_unusable_index_is_moved_aside_and_rebuilt(tmp_path, damage):
    root = make_folder(tmp_path / "lib")
    first = build_library(root)
    assert first.rebuilt is None
    folder = root / DB_DIRNAME
    db = folder / DB_FILENAME
    damage(db)
    damaged = db.read_bytes()
    # Reading without a build reports it (one line, with the way out) and leaves it alone.
    with pytest.raises(CounterdraftError, match="not a usable index database .*'counterdraft library build'"):
        open_library(root, refresh=False)
    assert db.read_bytes() == damaged
    old = os.umask(0o022)
    try:
        report = build_library(root)
    finally:
        os.umask(old)
    assert report.rebuilt is not None and "\n" not in report.rebuilt
    assert "moved aside" in report.rebuilt and "rebuilt from the agreements" in report.rebuilt
    # The same index as the first build, from the agreements.
    assert (report.documents, report.read, report.unchanged) == (3, 7, 0)
    assert {f.path for f in report.failures} == {f.path for f in first.failures}
    # Reference: SQLite's own integrity check of the new file.
    with sqlite3.connect(db) as conn:
        assert conn.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
    conn.close()
    # The damaged file is kept, byte for byte, beside the new one; everything stays private
    # (POSIX modes: folder 0o700, files 0o600).
    aside = [p for p in folder.iterdir() if p.name.startswith(DB_FILENAME + ".damaged-")]
    assert len(aside) == 1 and aside[0].name in report.rebuilt
    assert aside[0].read_bytes() == damaged
    assert stat.S_IMODE(folder.stat().st_mode) == 0o700
    for p in folder.rglob("*"):
        assert stat.S_IMODE(p.stat().st_mode) == (0o700 if p.is_dir() else 0o600), p.name
    with open_library(root, refresh=False) as lib:
        assert lib.total == 3 and lib.documents_with("payment") == 3
    # The aside file is not a candidate file, and the next build finds nothing to do.
    again = build_library(root)
    assert again.rebuilt is None and (again.read, again.unchanged) == (0, 7)


def test_damage_found_during_the_build_also_rebuilds(tmp_path, monkeypatch):
    """A page damaged in the middle of the file is found only when the build reads it: SQLite
    then raises SQLITE_CORRUPT (the real error, taken from a truncated file)."""
    root = make_folder(tmp_path / "lib")
    build_library(root, vocabulary=False)
    broken = tmp_path / "broken.sqlite"
    data = (root / DB_DIRNAME / DB_FILENAME).read_bytes()
    broken.write_bytes(data[: len(data) // 2])
    corrupt: sqlite3.DatabaseError | None = None
    conn = sqlite3.connect(broken)
    try:
        conn.execute("SELECT COUNT(*) FROM documents").fetchone()
    except sqlite3.DatabaseError as err:
        corrupt = err
    finally:
        conn.close()
    assert corrupt is not None and corrupt.sqlite_errorname == "SQLITE_CORRUPT"
    real = index_module._update_files
    calls = []

    def update_files(*args, **kwargs):
        calls.append(1)
        if len(calls) == 1:
            raise corrupt
        return real(*args, **kwargs)

    monkeypatch.setattr(index_module, "_update_files", update_files)
    report = build_library(root, vocabulary=False)
    assert len(calls) == 2 and report.rebuilt and "database disk image is malformed" in report.rebuilt
    assert report.documents == 3 and report.read == 7


def test_other_database_errors_are_one_line_and_keep_the_file(tmp_path, monkeypatch):
    root = make_folder(tmp_path / "lib")
    build_library(root, vocabulary=False)
    db = root / DB_DIRNAME / DB_FILENAME
    before = db.read_bytes()

    def locked(*args, **kwargs):
        raise sqlite3.OperationalError("database is locked")

    monkeypatch.setattr(index_module, "_update_files", locked)
    with pytest.raises(CounterdraftError, match="cannot update the index .database is locked."):
        build_library(root, vocabulary=False)
    assert db.read_bytes() == before
    assert not [p for p in db.parent.iterdir() if ".damaged-" in p.name]
