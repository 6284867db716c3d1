"""Shared fixtures: the demo precedent set (demo_agreements/precedent_set), indexed once per
backend, and the backends themselves.

Every test that takes ``backend`` (or a fixture built on it: ``demo_set``, ``demo_library``)
runs twice: on the SQLite file inside the folder (the default) and on a PostgreSQL database of
a throwaway server this session starts (tests/support/pgserver.py) -- the same questions, the
same expected answers.
"""

from __future__ import annotations

import itertools
import json
import shutil
from pathlib import Path

import pytest

from tests.support.pgserver import PostgresServer

ROOT = Path(__file__).resolve().parents[3]
DEMO = ROOT / "demo_agreements"
BACKENDS = ("sqlite", "postgresql")


class Backend:
    """Where a test's precedent sets are kept.  ``store(folder)`` is the store address of a
    folder (None: the folder's own SQLite index), ``target(folder)`` what the commands take
    for it (the folder, or the store's address)."""

    name = "sqlite"

    def store(self, folder: Path) -> str | None:
        return None

    def target(self, folder: Path) -> str:
        return str(folder)

    def build_args(self, folder: Path) -> list[str]:
        """What 'library build DIR' takes after DIR to index into this backend."""
        return []

    def build(self, folder: Path, **kwargs):
        from core.library.index import build_library

        return build_library(folder, store=self.store(folder), **kwargs)

    def open(self, folder: Path, **kwargs):
        from core.library.index import open_library

        kwargs.setdefault("refresh", False)
        return open_library(folder, store=self.store(folder), **kwargs)

    def copy(self, source: Path, target: Path) -> Path:
        """A copy of the folder *source* and of its store (labels written to the copy stay there)."""
        shutil.copytree(source, target)
        return target

    def query(self, folder: Path, sql: str) -> list[tuple]:
        """The rows of *sql* (plain SQL both engines read) on the folder's store, run by the
        database engine itself with its own driver: what was stored, seen without the
        store's code."""
        import sqlite3

        from core.library.index import default_db_path

        conn = sqlite3.connect(default_db_path(folder))
        try:
            return conn.execute(sql).fetchall()
        finally:
            conn.close()

    def __repr__(self) -> str:
        return self.name


class PostgresBackend(Backend):
    """One database of the session's server per folder, made when first asked for."""

    name = "postgresql"
    _count = itertools.count(1)

    def __init__(self, server: PostgresServer) -> None:
        self.server = server
        self.databases: dict[Path, str] = {}

    def database(self, folder: Path) -> str:
        key = Path(folder).resolve()
        if key not in self.databases:
            self.databases[key] = self.server.create_database(f"lib{next(self._count)}")
        return self.databases[key]

    def store(self, folder: Path) -> str:
        return self.server.url(self.database(folder))

    def target(self, folder: Path) -> str:
        return self.store(folder)

    def build_args(self, folder: Path) -> list[str]:
        return ["--store", self.store(folder)]

    def query(self, folder: Path, sql: str) -> list[tuple]:
        import psycopg

        with psycopg.connect(self.store(folder)) as conn:
            return conn.execute(sql).fetchall()

    def copy(self, source: Path, target: Path) -> Path:
        """The database copied by the server (CREATE DATABASE ... TEMPLATE); while another
        test holds the source open (the server refuses then), a fresh build of the copied
        folder, which gives the same store (a build is deterministic)."""
        import psycopg

        shutil.copytree(source, target, ignore=shutil.ignore_patterns(".counterdraft"))
        try:
            name = self.server.create_database("copy", template=self.database(source))
        except psycopg.errors.ObjectInUse:
            self.build(target)
            return target
        self.databases[Path(target).resolve()] = name
        return target


@pytest.fixture(scope="session", params=BACKENDS)
def backend(request) -> Backend:
    if request.param == "postgresql":
        return PostgresBackend(request.getfixturevalue("pg_server"))
    return Backend()


@pytest.fixture(scope="session")
def scenario() -> dict:
    """The demo generator's record (demo_agreements/scenario.json)."""
    return json.loads((DEMO / "scenario.json").read_text(encoding="utf-8"))


@pytest.fixture(scope="session")
def demo_sets(tmp_path_factory, scenario):
    """``get(backend)``: a copy of the demo precedent set, indexed on *backend* once per
    session (the copy keeps the repository clean).  A local ``.counterdraft`` index left in
    the demo folder (``make demo``) is not copied: the index is always built fresh here."""
    made: dict[str, Path] = {}

    def get(backend: Backend) -> Path:
        if backend.name not in made:
            folder = tmp_path_factory.mktemp(f"demo-set-{backend.name}") / "precedent_set"
            shutil.copytree(DEMO / scenario["precedent_set"]["folder"], folder,
                            ignore=shutil.ignore_patterns(".counterdraft"))
            report = backend.build(folder)
            assert report.failures == ()
            assert report.read == scenario["precedent_set"]["total"] and report.unchanged == 0
            made[backend.name] = folder
        return made[backend.name]

    return get


@pytest.fixture(scope="session")
def demo_set(demo_sets, backend) -> Path:
    """The demo precedent set indexed on each backend in turn."""
    return demo_sets(backend)


@pytest.fixture(scope="session")
def sqlite_demo_set(demo_sets) -> Path:
    """The demo precedent set with its SQLite index in the folder (tests of that file)."""
    return demo_sets(Backend())


@pytest.fixture()
def demo_library(demo_set, backend):
    lib = backend.open(demo_set)
    yield lib
    lib.close()


def find_departure(review, dep: dict):
    """The substantive deviation of *review* that is the demo generator's departure *dep*
    (an entry of ``scenario.json``'s ``departures``): same change, provision numbers and words."""
    dn = {p.id: p for p in review.draft.provisions}
    pn = {p.id: p for p in review.precedent.provisions}
    hits = []
    for v in review.deviations:
        if v.category != "substantive" or v.change != dep["change"]:
            continue
        if dep["precedent_number"] is not None and (
                v.precedent_provision is None or pn[v.precedent_provision].number != dep["precedent_number"]):
            continue
        if dep["draft_number"] is not None and (
                v.draft_provision is None or dn[v.draft_provision].number != dep["draft_number"]):
            continue
        if dep["draft_words"] and dep["draft_words"] not in v.draft_text:
            continue
        if dep["precedent_words"] and dep["precedent_words"] not in v.precedent_text:
            continue
        hits.append(v)
    assert len(hits) == 1, (dep["id"], hits)
    return hits[0]
