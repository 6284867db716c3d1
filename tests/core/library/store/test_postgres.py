"""The shared store on PostgreSQL: same answers as SQLite, many users at once, security,
schema versions, errors.

Outside references:
* SQLite (the default store) for every answer: the same agreements built into both give the
  same rows, ids, variants, frequency caches, figures, positions and patterns;
* PostgreSQL's own documentation for the client's behaviour relied on: libpq reads passwords
  from ``PGPASSWORD`` and the password file (``PGPASSFILE``), passes ``sslmode`` through, and
  its URI form ("Connection URIs"); advisory locks and REPEATABLE READ snapshots;
* ``psql`` (PostgreSQL's own client) runs the README's least-privilege setup as written;
* a sequential build of the same files is the reference for concurrent builds.
"""

from __future__ import annotations

import json
import os
import re
import shutil
import subprocess
import sys
import threading
from pathlib import Path

import pytest

from core.cli import main
from core.library.commands import review_options
from core.library.frequency import apply_frequency
from core.library.index import Library, build_library, open_library, read_bucket
from core.library.patterns import negotiation_patterns
from core.library.stats import library_stats, stats_to_dict
from core.library.store import shown_address
from core.reader import read_document
from core.review import run_review
from tests.support.pgserver import find_binaries

from ..conftest import DEMO, ROOT

SET = DEMO / "precedent_set"
DRAFT, PRECEDENT = DEMO / "draft.docx", DEMO / "precedent.docx"


def _answers(lib: Library, *, patterns: bool = True) -> dict:
    """Every answer the precedent set gives, ids included (negotiation patterns: one review
    per agreement, when *patterns*)."""
    draft, prec = read_document(str(DRAFT)), read_document(str(PRECEDENT))
    review = apply_frequency(run_review(draft, prec, **review_options(lib)), lib)
    stats = stats_to_dict(library_stats(lib))
    stats.pop("index"), stats.pop("root")  # where it is kept, not what it holds
    caches = {}
    for name in lib.bucket_names():
        a = read_bucket(lib.store, name)
        caches[name] = tuple(getattr(a, f).tobytes() for f in ("hashes", "cols", "indptr", "indices", "wcols",
                                                                "windptr", "windices", "count", "sample",
                                                                "variant", "docptr", "docs"))
    return {"rows": lib.store.provision_rows(), "variants": lib.variants(), "positions": lib.variant_positions(),
            "stats": stats, "labels": lib.labels(), "caches": caches, "failures": lib.failures(),
            "aliases": lib.aliases(), "frequencies": [(d.id, d.rank, d.severity, d.frequency, d.reasons)
                                                     for d in review.deviations],
            "pairs": [p.frequency for p in review.pairs],
            "patterns": negotiation_patterns(lib, prec) if patterns else None}


def _steps(folder: Path) -> list:
    """A first build without two agreements, then one added, one changed, one removed."""
    gone = ("07-caddow-fenn-biosciences.docx", "12-merrow-vance-pharmaceuticals.docx")
    return [lambda: [(folder / n).unlink() for n in gone],
            lambda: shutil.copy(SET / "07-caddow-fenn-biosciences.docx", folder),
            lambda: (folder / "03-saltreach-water-services.docx").write_bytes(DRAFT.read_bytes()),
            lambda: (folder / "11-hollin-vree-energy.docx").unlink()]


def test_both_backends_give_the_same_answers_build_after_build(tmp_path, pg_server):
    """The same folder's history built into SQLite and into PostgreSQL: after each build
    every answer is the same, ids included (both give a new row the next id)."""
    folder = shutil.copytree(SET, tmp_path / "set", ignore=shutil.ignore_patterns(".counterdraft"))
    address = pg_server.url(pg_server.create_database("same"))
    steps = _steps(folder)
    for n, step in enumerate(steps):
        step()
        lite, pg = build_library(folder), build_library(folder, store=address)
        assert (lite.read, lite.removed, lite.documents) == (pg.read, pg.removed, pg.documents)
        if n == 0:
            for store in (None, address):
                with open_library(folder, store=store, refresh=False) as lib:
                    lib.label_variant(lib.variant_of("05-vantry-and-loame-manufacturing.docx", "7.1"), "house wording")
        with open_library(folder, refresh=False) as a, open_library(folder, store=address, refresh=False) as b:
            last = n == len(steps) - 1
            want, got = _answers(a, patterns=last), _answers(b, patterns=last)
        for key in want:
            assert got[key] == want[key], (n, key)


def test_two_builders_and_a_reviewer_at_once_equal_a_sequential_build(tmp_path, pg_server):
    """Two 'library build' processes on one store while a reviewer reads it: one builder
    does the work, the other waits for the writer lock and finds nothing left to do; every
    review sees the store before the builds or after them, never half-way; the end state is a
    sequential build's."""
    folder = shutil.copytree(SET, tmp_path / "set", ignore=shutil.ignore_patterns(".counterdraft"))
    later = sorted(p.name for p in folder.glob("*.docx"))[-4:]
    aside = tmp_path / "aside"
    aside.mkdir()
    for name in later:
        shutil.move(folder / name, aside / name)
    address = pg_server.url(pg_server.create_database("busy"))
    build_library(folder, store=address)  # the store as it was: 8 agreements
    # The reference: the same history built sequentially into a fresh store.
    ref_folder = shutil.copytree(folder, tmp_path / "ref")
    reference = pg_server.url(pg_server.create_database("sequential"))
    build_library(ref_folder, store=reference)
    with Library(reference) as lib:
        before = _review_figures(lib)
    for name in later:
        shutil.copy(aside / name, folder / name)
        shutil.copy(aside / name, ref_folder / name)
    build_library(ref_folder, store=reference)
    with Library(reference) as lib:
        after = _review_figures(lib)
    assert before != after

    seen: list[tuple] = []
    done = threading.Event()

    def reviewer() -> None:
        while not done.is_set():
            with Library(address) as lib:
                seen.append(_review_figures(lib))

    thread = threading.Thread(target=reviewer)
    thread.start()
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    cmd = [sys.executable, "-m", "core.cli", "library", "build", str(folder), "--store", address, "--workers", "1"]
    try:
        builders = [subprocess.Popen(cmd, env=env, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
                    for _ in range(2)]
        outputs = [b.communicate(timeout=300) for b in builders]
    finally:
        done.set()
        thread.join(timeout=300)
    assert [b.returncode for b in builders] == [0, 0], outputs
    reads = sorted(int(re.search(r"\((\d+) read", out).group(1)) for out, _err in outputs)
    assert reads == [0, 4]  # the derived step ran once
    assert seen and all(s in (before, after) for s in seen)
    with Library(address) as lib:
        assert _review_figures(lib) == after
    with Library(address) as got, Library(reference) as want:
        a, b = _answers(got), _answers(want)
    for key in b:
        assert a[key] == b[key], key


def _review_figures(lib: Library) -> tuple:
    draft, prec = read_document(str(DRAFT)), read_document(str(PRECEDENT))
    review = apply_frequency(run_review(draft, prec, **review_options(lib)), lib)
    return lib.total, tuple((d.id, d.severity, d.frequency) for d in review.deviations)


def test_patterns_are_reviewed_from_the_store_without_the_folder(tmp_path, pg_server):
    """A reviewer on another machine has the store, not the builder's folder: the store's
    copies of the agreements give the same patterns."""
    folder = tmp_path / "set"
    folder.mkdir()
    for name in sorted(p.name for p in SET.glob("*.docx"))[:5]:
        shutil.copy(SET / name, folder)
    address = pg_server.url(pg_server.create_database("patterns"))
    build_library(folder, store=address, vocabulary=False)
    prec = read_document(str(PRECEDENT))
    with Library(address) as lib:
        want = negotiation_patterns(lib, prec)
    shutil.rmtree(folder)
    with Library(address) as lib:
        assert negotiation_patterns(lib, prec) == want
        assert sum(m.count for g in want for m in g.moves) > 0


def _one_line(err: str) -> str:
    lines = err.splitlines()
    assert len(lines) == 1 and "Traceback" not in err, err
    return lines[0]


@pytest.fixture(scope="module")
def password_store(pg_server, tmp_path_factory):
    """A built store and a role that logs in with a password over TCP (scram-sha-256)."""
    folder = shutil.copytree(SET, tmp_path_factory.mktemp("pw") / "set", ignore=shutil.ignore_patterns(".counterdraft"))
    name = pg_server.create_database("creds")
    build_library(folder, store=pg_server.url(name), vocabulary=False)
    pg_server.admin("CREATE ROLE cd_pw LOGIN SUPERUSER PASSWORD 'right-horse-battery'")
    return pg_server.url(name, user="cd_pw", tcp=True)


def test_credentials_come_from_libpq_and_are_never_shown(password_store, tmp_path, monkeypatch, capsys):
    monkeypatch.delenv("PGPASSFILE", raising=False)
    monkeypatch.setenv("PGPASSFILE", str(tmp_path / "none"))
    # Wrong password from the environment (PGPASSWORD): one line, exit 2, the password not echoed.
    monkeypatch.setenv("PGPASSWORD", "wrong-staple")
    assert main(["library", "stats", password_store]) == 2
    line = _one_line(capsys.readouterr().err)
    assert "password authentication failed" in line and "wrong-staple" not in line
    # The right one from the password file (mode 0600): the same command works.
    monkeypatch.delenv("PGPASSWORD")
    host, port = re.search(r"@([\d.]+):(\d+)/", password_store).groups()
    pgpass = tmp_path / "pgpass"
    pgpass.write_text(f"{host}:{port}:*:cd_pw:right-horse-battery\n", encoding="utf-8")
    pgpass.chmod(0o600)
    monkeypatch.setenv("PGPASSFILE", str(pgpass))
    assert main(["library", "stats", password_store]) == 0
    assert "12 agreements" in capsys.readouterr().out
    # A review file records the address, never a password.
    saved = tmp_path / "review.json"
    assert main(["review", str(DRAFT), "--against", str(PRECEDENT), "--library", password_store,
                 "--save", str(saved)]) == 0
    capsys.readouterr()
    text = saved.read_text(encoding="utf-8")
    assert json.loads(text)["library"]["absolute_path"] == password_store and "right-horse" not in text
    assert main(["decide", str(saved), "1", "accept"]) == 0  # reopened with the recorded store
    capsys.readouterr()
    # A password written into the address is refused before any connection, and not shown.
    leaky = password_store.replace("cd_pw@", "cd_pw:right-horse-battery@")
    assert main(["library", "stats", leaky]) == 2
    line = _one_line(capsys.readouterr().err)
    assert ".pgpass" in line and "right-horse" not in line


def test_tls_settings_are_passed_through(password_store, capsys):
    """sslmode=require against this server (no TLS configured): libpq refuses, one line."""
    assert main(["library", "stats", password_store + "?sslmode=require"]) == 2
    assert "SSL" in _one_line(capsys.readouterr().err)


def test_an_unreachable_server_is_one_line_and_status_2(capsys):
    import socket

    with socket.socket() as s:  # a port nobody listens on
        s.bind(("127.0.0.1", 0))
        port = s.getsockname()[1]
    address = f"postgresql://nobody@127.0.0.1:{port}/precedents"
    assert main(["review", str(DRAFT), "--against", str(PRECEDENT), "--library", address]) == 2
    line = _one_line(capsys.readouterr().err)
    assert f"{address}: cannot connect to the store" in line


def test_addresses_are_shown_without_passwords():
    assert shown_address("postgresql://ana:s3cret@db:5432/p?sslmode=require") == "postgresql://ana@db:5432/p?sslmode=require"
    assert shown_address("postgres://db/p?password=s3cret&application_name=x") == "postgres://db/p?application_name=x"
    assert shown_address("/tmp/library.sqlite") == "/tmp/library.sqlite"


def test_the_schema_is_made_on_first_use_and_a_newer_one_is_refused(tmp_path, pg_server, monkeypatch, capsys):
    name = pg_server.create_database("versions")
    address = pg_server.url(name)
    # A reader of an empty database: nothing to read yet, one line, status 2.
    assert main(["library", "stats", address]) == 2
    assert "no precedent set in this store yet" in _one_line(capsys.readouterr().err)
    (tmp_path / "set").mkdir()
    shutil.copy(SET / "01-quenby-astrel-diagnostics.docx", tmp_path / "set")
    build_library(tmp_path / "set", store=address, vocabulary=False)
    # A later version's migration runs once, however many open the store at the same moment.
    import core.library.store.postgres as pgmod

    monkeypatch.setattr(pgmod, "MIGRATIONS", (*pgmod.MIGRATIONS, (2, "CREATE TABLE later(x INTEGER);"
                                                                      "INSERT INTO later VALUES (1);")))
    monkeypatch.setattr(pgmod, "SCHEMA_VERSION", 2)
    errors: list[BaseException] = []

    def open_it() -> None:
        try:
            Library(address).close()
        except BaseException as err:
            errors.append(err)

    threads = [threading.Thread(target=open_it) for _ in range(3)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert errors == []
    assert pg_server.admin("SELECT count(*) FROM later", database=name) == [(1,)]
    assert pg_server.admin("SELECT value FROM meta WHERE key = 'schema'", database=name) == [("2",)]
    monkeypatch.undo()
    # This program (schema 1) refuses the store a newer one made.
    assert main(["library", "stats", address]) == 2
    line = _one_line(capsys.readouterr().err)
    assert "newer version of Counterdraft (schema 2; this version knows 1)" in line


def test_the_readmes_least_privilege_roles(tmp_path, pg_server, capsys):
    """The README's setup, run by psql as written: the build role builds and labels, the read
    role reviews and reads but cannot change the store."""
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    block = re.search(r"<!-- counterdraft:roles\.sql.*?-->\n```sql\n(.*?)```", readme, re.S).group(1)
    script = tmp_path / "roles.sql"
    script.write_text(block, encoding="utf-8")
    psql = shutil.which("psql") or str(find_binaries() / "psql")
    done = subprocess.run([psql, "-X", "-q", "-v", "ON_ERROR_STOP=1", "-d", pg_server.url(), "-f", str(script)],
                          capture_output=True, text=True, timeout=60)
    assert done.returncode == 0, done.stderr
    build = pg_server.url("precedents", user="counterdraft_build")
    read = pg_server.url("precedents", user="counterdraft_read")
    folder = shutil.copytree(SET, tmp_path / "set", ignore=shutil.ignore_patterns(".counterdraft"))
    assert main(["library", "build", str(folder), "--store", build]) == 0
    assert main(["library", "label", build, "--document", "04-pellbrook-analytical.docx", "--provision", "9.2",
                 "--position", "house wording"]) == 0
    capsys.readouterr()
    assert main(["library", "stats", read]) == 0
    assert "12 agreements" in capsys.readouterr().out
    assert main(["review", str(DRAFT), "--against", str(PRECEDENT), "--library", read, "--json", "-"]) == 0
    assert any(d["frequency"] for d in json.loads(capsys.readouterr().out)["deviations"])
    # The read role may not change anything: building, labelling -- one line each, status 2.
    (folder / "01-quenby-astrel-diagnostics.docx").unlink()
    assert main(["library", "build", str(folder), "--store", read]) == 2
    assert "may not change" in _one_line(capsys.readouterr().err)
    assert main(["library", "label", read, "--variant", "1", "--position", "none"]) == 2
    assert "may not change" in _one_line(capsys.readouterr().err)


def test_a_build_from_another_folder_does_not_empty_a_shared_store(tmp_path, pg_server, capsys):
    address = pg_server.url(pg_server.create_database("guard"))
    bank = shutil.copytree(SET, tmp_path / "bank", ignore=shutil.ignore_patterns(".counterdraft"))
    build_library(bank, store=address, vocabulary=False)
    mine = tmp_path / "mine"
    mine.mkdir()
    shutil.copy(SET / "01-quenby-astrel-diagnostics.docx", mine)
    assert main(["library", "build", str(mine), "--store", address]) == 2
    line = _one_line(capsys.readouterr().err)
    assert "another folder" in line and "--replace" in line
    with Library(address) as lib:
        assert lib.total == 12
    # The same bank seen under another path (another machine's mount) drops nothing: allowed.
    moved = shutil.copytree(bank, tmp_path / "mounted-elsewhere")
    assert build_library(moved, store=address, vocabulary=False).documents == 12
    assert main(["library", "build", str(mine), "--store", address, "--replace"]) == 0
    with Library(address) as lib:
        assert lib.total == 1
