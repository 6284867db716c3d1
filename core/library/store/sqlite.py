"""The embedded store of one person: a SQLite file beside the derived files.

By default the index lives in the precedent set's own folder,
``PAST_AGREEMENTS/.counterdraft/library.sqlite``; the derived data (frequency caches, the
clause-type classifier, the vocabulary model) are files beside it, each written atomically.

The index is derived data: a file that is not a usable SQLite database of this schema
(damaged, truncated, not SQLite, another schema version) is reported by
:meth:`SQLiteStore.open` (:class:`~.base.StoreDamaged`), and a build moves it aside to
``library.sqlite.damaged-<time>`` (mode 0o600, beside it; kept because it may hold the
reviewer's labels) and starts over (:meth:`SQLiteStore.start_over`).

Confidentiality: the folder ``.counterdraft`` is created with mode 0o700 and every file in it
with mode 0o600 (SQLite gives its journal the database's mode).

Writers: one at a time, through an exclusive lock on the index's folder (``lock``); SQLite
keeps the rows consistent, the lock keeps the derived files from being computed from two
states.  A build commits as it goes (``checkpoint``): a cancelled or killed build keeps what
it read.
"""

from __future__ import annotations

import mmap
import os
import sqlite3
import time
from collections.abc import Iterable, Iterator, Sequence
from contextlib import contextmanager
from pathlib import Path
from typing import Any

from ...errors import CounterdraftError
from ...fileio import atomic_write_bytes, exclusive, remove_orphaned_parts
from ..options import FORMER_POSITIONS
from .base import StoreDamaged
from .sql import Cursor, Row, SQLStore

__all__ = ["SCHEMA_VERSION", "SQLiteStore", "private_dir"]

SCHEMA_VERSION = "1"

_SCHEMA = """
CREATE TABLE IF NOT EXISTS meta(key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE IF NOT EXISTS documents(
    id INTEGER PRIMARY KEY, path TEXT NOT NULL UNIQUE, sha256 TEXT NOT NULL,
    size INTEGER NOT NULL, mtime_ns INTEGER NOT NULL, title TEXT,
    parties TEXT NOT NULL DEFAULT '[]', provisions INTEGER NOT NULL,
    normalised INTEGER NOT NULL DEFAULT 0);
CREATE TABLE IF NOT EXISTS provisions(
    id INTEGER PRIMARY KEY,
    document_id INTEGER NOT NULL REFERENCES documents(id) ON DELETE CASCADE,
    ordinal INTEGER NOT NULL, pid TEXT NOT NULL, kind TEXT NOT NULL, number TEXT, heading TEXT,
    level INTEGER NOT NULL, parent TEXT, text TEXT NOT NULL,
    clause_type TEXT, type_source TEXT NOT NULL, bucket TEXT NOT NULL,
    norm TEXT, norm_hash TEXT, shingles BLOB, variant_id INTEGER);
CREATE INDEX IF NOT EXISTS provisions_document ON provisions(document_id);
CREATE INDEX IF NOT EXISTS provisions_wording ON provisions(bucket, norm_hash, document_id, ordinal, variant_id);
CREATE INDEX IF NOT EXISTS provisions_typed ON provisions(type_source, clause_type, norm_hash, document_id);
CREATE TABLE IF NOT EXISTS terms(
    document_id INTEGER NOT NULL REFERENCES documents(id) ON DELETE CASCADE,
    term TEXT NOT NULL, definition TEXT NOT NULL, provision TEXT, uses INTEGER NOT NULL);
CREATE INDEX IF NOT EXISTS terms_document ON terms(document_id);
CREATE TABLE IF NOT EXISTS failures(
    path TEXT PRIMARY KEY, sha256 TEXT, size INTEGER NOT NULL, mtime_ns INTEGER NOT NULL,
    problem TEXT NOT NULL);
CREATE TABLE IF NOT EXISTS variants(
    id INTEGER PRIMARY KEY, bucket TEXT NOT NULL, ordinal INTEGER NOT NULL,
    wordings INTEGER NOT NULL, provisions INTEGER NOT NULL, documents INTEGER NOT NULL,
    sample INTEGER, position TEXT);
CREATE INDEX IF NOT EXISTS variants_bucket ON variants(bucket, ordinal);
CREATE TABLE IF NOT EXISTS labels(
    bucket TEXT NOT NULL, norm_hash TEXT NOT NULL, position TEXT NOT NULL, seq INTEGER NOT NULL,
    PRIMARY KEY(bucket, norm_hash));
CREATE TABLE IF NOT EXISTS buckets(bucket TEXT PRIMARY KEY, fingerprint TEXT NOT NULL);
CREATE TABLE IF NOT EXISTS dirty(bucket TEXT PRIMARY KEY);
CREATE TABLE IF NOT EXISTS bucket_state(
    bucket TEXT PRIMARY KEY, clustered INTEGER NOT NULL, drift INTEGER NOT NULL);
"""

#: Row ids per ``WHERE id IN (?, ...)`` query: SQLite allowed at most 999 bound parameters
#: per statement before version 3.32.0 (SQLITE_MAX_VARIABLE_NUMBER,
#: https://www.sqlite.org/limits.html), so batches of 500 stay well inside on any build.
IN_BATCH = 500
#: Meta key recording that the stances of an index carry the names of :data:`POSITIONS`
#: (:mod:`..options`).
_POSITION_NAMES_KEY = "position_names"

#: SQLite's primary result codes for a file that is not a database or is damaged
#: (SQLITE_CORRUPT = 11, SQLITE_NOTADB = 26; https://www.sqlite.org/rescode.html).  Other
#: errors (locked, read-only, disk full) say nothing about the file and never set it aside.
_DAMAGE_CODES = frozenset({11, 26})


def private_dir(path: Path) -> None:
    """Create *path* (one level) with mode 0o700, or say in one line why it cannot be."""
    try:
        path.mkdir(mode=0o700, parents=False, exist_ok=True)
        os.chmod(path, 0o700)
    except OSError as err:
        # 'review --library' and the desktop app keep the index inside the folder; only the
        # 'counterdraft library' commands take another place (--store).
        raise CounterdraftError(f"cannot create the index folder ({err.strerror}): the precedent set's "
                                "index is kept inside its folder, so the folder must be writable; copy the "
                                "agreements to a folder you can write to", path=str(path)) from None


def _is_damage(err: BaseException) -> bool:
    code = getattr(err, "sqlite_errorcode", None)
    return isinstance(err, sqlite3.DatabaseError) and code is not None and (code & 0xFF) in _DAMAGE_CODES


_REFERENCE_COLUMNS: dict[str, list[tuple[Any, ...]]] = {}


def _reference_columns() -> dict[str, list[tuple[Any, ...]]]:
    """``PRAGMA table_info`` of every table of :data:`_SCHEMA`, from an in-memory database."""
    if not _REFERENCE_COLUMNS:
        mem = sqlite3.connect(":memory:")
        try:
            mem.executescript(_SCHEMA)
            names = [n for (n,) in mem.execute("SELECT name FROM sqlite_master WHERE type = 'table'")]
            _REFERENCE_COLUMNS.update({n: mem.execute(f"PRAGMA table_info({n})").fetchall() for n in names})
        finally:
            mem.close()
    return _REFERENCE_COLUMNS


class SQLiteStore(SQLStore):
    """A precedent set in the SQLite file *path* (derived files beside it)."""

    _SHINGLES = "shingles"
    _TERM_ORDER = "rowid"

    def __init__(self, path: str | os.PathLike[str], *, private_folder: bool = False) -> None:
        self.path = Path(path)
        self.address = str(self.path)
        self.folder = self.path.parent
        self._private_folder = private_folder
        self.conn: sqlite3.Connection | None = None

    @property
    def _db(self) -> sqlite3.Connection:
        """The connection of the open store."""
        if self.conn is None:
            raise RuntimeError(f"the index {self.address} is not open")
        return self.conn

    # -- dialect --------------------------------------------------------------------------------
    def _cursor(self, sql: str, params: Sequence[Any] = ()) -> Cursor:
        return self._db.execute(sql, params)

    def _many(self, sql: str, rows: Iterable[Sequence[Any]]) -> None:
        self._db.executemany(sql, rows)

    def _in(self, sql: str, values: Sequence[Any], *before: Any) -> Iterator[Row]:
        unique = list(dict.fromkeys(values))
        for start in range(0, len(unique), IN_BATCH):
            chunk = unique[start:start + IN_BATCH]
            yield from self._db.execute(sql.replace("{in}", f"IN ({','.join('?' * len(chunk))})"),
                                         (*before, *chunk))

    # -- lifecycle ------------------------------------------------------------------------------
    def open(self, *, create: bool) -> None:
        if self.conn is not None:
            return
        if create and self._private_folder:
            private_dir(self.folder)
        if not self.path.exists():
            if not create:
                raise CounterdraftError("no precedent-set index here; build it with "
                                        "'counterdraft library build'", path=str(self.path))
            if not self.folder.is_dir():
                raise CounterdraftError("the folder for the index does not exist", path=str(self.path))
            try:
                os.close(os.open(self.path, os.O_CREAT | os.O_RDWR, 0o600))
            except OSError as err:
                raise CounterdraftError(f"cannot create the index ({err.strerror})", path=str(self.path)) from None
        try:
            os.chmod(self.path, 0o600)
        except OSError:
            pass
        try:
            self._connect()
        except StoreDamaged as err:
            if not create:
                raise CounterdraftError(f"not a usable index database ({err.problem}); 'counterdraft library "
                                        "build' sets it aside and rebuilds it", path=str(self.path)) from None
            raise

    def _connect(self) -> None:
        conn = None
        try:
            # check_same_thread=False: the desktop app opens the index in a worker thread and
            # reads it from the GUI thread, one at a time.
            conn = sqlite3.connect(str(self.path), timeout=30.0, check_same_thread=False)
            self.conn = conn
            self._check_schema()
            conn.execute("PRAGMA foreign_keys = ON")
            conn.execute("PRAGMA synchronous = NORMAL")
            conn.executescript(_SCHEMA)
            if self.meta("schema") is None:
                self.set_meta("schema", SCHEMA_VERSION)
                conn.commit()
            self._migrate_positions()
        except StoreDamaged:
            self.close()
            raise
        except sqlite3.DatabaseError as err:
            self.close()
            if _is_damage(err):
                raise StoreDamaged(str(err)) from None
            raise CounterdraftError(f"cannot open the index ({err})", path=str(self.path)) from None

    def _migrate_positions(self) -> None:
        """Rename the stances an index written by an earlier version stores
        (:data:`FORMER_POSITIONS`) to their names of :data:`POSITIONS`, once: the labels and
        the variants' positions.  O(labels + variants) the first time, one meta read after.
        (A PostgreSQL store never held the former names.)"""
        if self.meta(_POSITION_NAMES_KEY) == "2":
            return
        with self._db as conn:
            for old, new in FORMER_POSITIONS.items():
                conn.execute("UPDATE labels SET position = ? WHERE position = ?", (new, old))
                conn.execute("UPDATE variants SET position = ? WHERE position = ?", (new, old))
            self.set_meta(_POSITION_NAMES_KEY, "2")

    def _check_schema(self) -> None:
        """Raise :class:`StoreDamaged` unless the database is empty or an index of this schema.

        Reading the schema also makes SQLite check the file header: garbage gives
        SQLITE_NOTADB, a truncated file SQLITE_CORRUPT.  Cost: one read of the schema table,
        a few pragmas."""
        conn = self._db
        try:
            tables = {n for (n,) in conn.execute("SELECT name FROM sqlite_master WHERE type = 'table'")}
            if not tables:
                return  # a new, empty file
            if "meta" not in tables:
                raise StoreDamaged("not a Counterdraft index")
            version = self.meta("schema")
            if version != SCHEMA_VERSION:
                raise StoreDamaged(f"made by another version of Counterdraft (schema {version})")
            for name, columns in _reference_columns().items():
                if name in tables and conn.execute(f"PRAGMA table_info({name})").fetchall() != columns:
                    raise StoreDamaged(f"table {name} differs from this version's")
        except sqlite3.DatabaseError as err:
            if _is_damage(err):
                raise StoreDamaged(str(err)) from None
            raise

    @contextmanager
    def lock(self) -> Iterator[None]:
        if self._private_folder:
            private_dir(self.folder)
        with exclusive(self.path):
            remove_orphaned_parts(self.folder)
            yield

    @contextmanager
    def write(self) -> Iterator[None]:
        with self.lock():
            try:
                yield
                self._db.commit()
            except BaseException:
                self._db.rollback()
                raise

    def checkpoint(self) -> None:
        self._db.commit()

    def commit(self) -> None:
        self._db.commit()

    def close(self) -> None:
        if self.conn is not None:
            self.conn.close()
            self.conn = None

    def damage(self, err: BaseException) -> str | None:
        if isinstance(err, StoreDamaged):
            return err.problem
        return str(err) if _is_damage(err) else None

    def describe_error(self, err: BaseException) -> str | None:
        return str(err) if isinstance(err, sqlite3.DatabaseError) else None

    def start_over(self, problem: str) -> str:
        """Rename the damaged index (and any journal SQLite left beside it) to
        ``<name>.damaged-<local time>``, mode 0o600; the next :meth:`open` makes a new one."""
        self.close()
        path = self.path
        stamp = time.strftime("%Y%m%d-%H%M%S")
        aside = path.with_name(f"{path.name}.damaged-{stamp}")
        n = 1
        while aside.exists():
            n += 1
            aside = path.with_name(f"{path.name}.damaged-{stamp}-{n}")
        try:
            os.replace(path, aside)
            os.chmod(aside, 0o600)
            for suffix in ("-journal", "-wal", "-shm"):
                side = path.with_name(path.name + suffix)
                if side.exists():
                    os.replace(side, aside.with_name(aside.name + suffix))
                    os.chmod(aside.with_name(aside.name + suffix), 0o600)
        except OSError as err:
            raise CounterdraftError(f"the index is damaged and cannot be moved aside ({err.strerror}); "
                                    "delete it and build again", path=str(path)) from None
        return (f"the index was not usable ({problem}); it was moved aside to {aside.name} "
                "and rebuilt from the agreements")

    # -- derived files --------------------------------------------------------------------------
    def _blob_path(self, name: str) -> Path:
        return self.folder.joinpath(*name.split("/"))

    def read_blob(self, name: str) -> bytes | None:
        try:
            return self._blob_path(name).read_bytes()
        except OSError:
            return None

    def view_blob(self, name: str) -> bytes | mmap.mmap | None:
        """The blob's file mapped read-only, for reading only (POSIX: a build replaces the
        file, the mapping keeps the one read; elsewhere a mapped file could not be replaced,
        so it is read).  Not part of the store protocol: a store without it is read with
        :meth:`read_blob` (core.library.index.view_blob)."""
        if os.name != "posix":
            return self.read_blob(name)
        try:
            with open(self._blob_path(name), "rb") as fh:
                if os.fstat(fh.fileno()).st_size == 0:
                    return b""
                return mmap.mmap(fh.fileno(), 0, access=mmap.ACCESS_READ)
        except (OSError, ValueError):
            return self.read_blob(name)

    def write_blob(self, name: str, data: bytes) -> None:
        """Atomic write with mode 0o600 (mkstemp already creates 0o600; chmod makes it
        explicit), in sub-folders of mode 0o700."""
        path = self._blob_path(name)
        if path.parent != self.folder and not path.parent.is_dir():
            private_dir(path.parent)
        atomic_write_bytes(path, data)
        os.chmod(path, 0o600)

    def delete_blob(self, name: str) -> None:
        try:
            os.unlink(self._blob_path(name))
        except FileNotFoundError:
            pass

    def size_bytes(self) -> int:
        """The index file and every derived file beside it (its folder, when it has its own)."""
        if self._private_folder:
            return sum(p.stat().st_size for p in self.folder.rglob("*") if p.is_file())
        return self.path.stat().st_size if self.path.exists() else 0
