"""A precedent set a team shares, on a PostgreSQL server (psycopg 3).

Addressed as ``postgresql://USER@HOST:PORT/DATABASE`` (or ``postgres://``; libpq's URI form,
https://www.postgresql.org/docs/current/libpq-connect.html#LIBPQ-CONNSTRING-URIS, with its
query parameters such as ``?sslmode=verify-full`` or ``?service=NAME`` passed through
untouched).

Credentials come only from libpq's own sources -- the password file (``~/.pgpass``), a
connection service file, the environment (``PGPASSWORD``, ``PGSERVICE`` ...) or a client
certificate: an address that holds a password is refused before any connection, so that a
password never lands in a review file, a log, a shell history or an error message.  Every
address shown (:func:`shown_address`) has any password taken out all the same.

Tables (schema version :data:`SCHEMA_VERSION`, in the connection's ``search_path``): those
of the SQLite index, with text compared by code point (``COLLATE "C"``, SQLite's order;
``provisions`` moves its long text out of line, ``toast_tuple_target = 128``, so that the
build's updates of a provision's wording and variant copy a short row), plus
``blobs`` (the derived data SQLite keeps as files: frequency caches, the clause-type
classifier, the vocabulary model) and ``sources`` (each agreement's file, by SHA-256, so that
negotiation patterns can review the agreements from any machine).  The schema is created and
migrated on first use (:data:`MIGRATIONS`, under a transaction-level advisory lock, so two
first users do it once); a store whose schema is newer than this program is refused.

Many users at once:

* writers (a build, a label) take a session-level advisory lock (:meth:`PostgresStore.lock`):
  one at a time per database, so each derived step (clause typing, variants, vocabulary) runs
  once on one state; a second builder waits, then finds the work done;
* a build is one READ COMMITTED transaction (``checkpoint`` does nothing here): the readers
  see the precedent set as it was before the build or after it, never half-way; a build
  that is cancelled commits what it read (the set is then marked stale, as on SQLite); one
  that fails or is killed leaves the store as it was;
* readers (reviews, stats, patterns) run in one REPEATABLE READ, READ ONLY transaction per
  open store: every answer of one review comes from one consistent state, and they never
  wait for a writer.
"""

from __future__ import annotations

import hashlib
import os
from collections.abc import Iterable, Iterator, Sequence
from contextlib import contextmanager
from pathlib import Path
from typing import Any
from urllib.parse import parse_qsl, urlencode, urlsplit, urlunsplit

import psycopg
from psycopg import IsolationLevel

from ...errors import CounterdraftError
from .sql import Cursor, Row, SQLStore

__all__ = ["MIGRATIONS", "SCHEMA_VERSION", "PostgresStore", "shown_address"]

#: Seconds to wait for the server when the address and environment set no
#: ``connect_timeout``: an unreachable host gives one line after this, not a hang of
#: minutes (TCP's own retries).  Ten seconds: a server across a VPN answers in well under one.
CONNECT_TIMEOUT_S = 10

#: Advisory lock keys (two int4 keys: a class for Counterdraft -- "CDrf" in ASCII -- and the
#: lock's number).  Advisory locks are per database, so each store has its own.
_LOCK_CLASS = 0x43447266
_WRITER_LOCK = 1
_MIGRATION_LOCK = 2

_SCHEMA_1 = """
CREATE TABLE meta(key TEXT COLLATE "C" PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE documents(
    id BIGINT PRIMARY KEY, path TEXT COLLATE "C" NOT NULL UNIQUE, sha256 TEXT COLLATE "C" NOT NULL,
    size BIGINT NOT NULL, mtime_ns BIGINT NOT NULL, title TEXT,
    parties TEXT NOT NULL DEFAULT '[]', provisions INTEGER NOT NULL,
    normalised INTEGER NOT NULL DEFAULT 0);
CREATE INDEX documents_sha256 ON documents(sha256, path);
CREATE TABLE provisions(
    id BIGINT PRIMARY KEY,
    document_id BIGINT NOT NULL REFERENCES documents(id) ON DELETE CASCADE,
    ordinal INTEGER NOT NULL, pid TEXT COLLATE "C" NOT NULL, kind TEXT COLLATE "C" NOT NULL,
    number TEXT COLLATE "C", heading TEXT COLLATE "C", level INTEGER NOT NULL, parent TEXT COLLATE "C",
    text TEXT NOT NULL, clause_type TEXT COLLATE "C", type_source TEXT COLLATE "C" NOT NULL,
    bucket TEXT COLLATE "C" NOT NULL, norm TEXT COLLATE "C", norm_hash TEXT COLLATE "C", variant_id BIGINT)
    WITH (toast_tuple_target = 128);
CREATE INDEX provisions_document ON provisions(document_id);
CREATE INDEX provisions_wording ON provisions(bucket, norm_hash, document_id, ordinal, variant_id);
CREATE INDEX provisions_typed ON provisions(type_source, clause_type, norm_hash, document_id);
CREATE INDEX provisions_variant ON provisions(variant_id);
CREATE TABLE terms(
    id BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
    document_id BIGINT NOT NULL REFERENCES documents(id) ON DELETE CASCADE,
    term TEXT COLLATE "C" NOT NULL, definition TEXT NOT NULL, provision TEXT COLLATE "C", uses INTEGER NOT NULL);
CREATE INDEX terms_document ON terms(document_id);
CREATE TABLE failures(
    path TEXT COLLATE "C" PRIMARY KEY, sha256 TEXT COLLATE "C", size BIGINT NOT NULL, mtime_ns BIGINT NOT NULL,
    problem TEXT NOT NULL);
CREATE TABLE variants(
    id BIGINT PRIMARY KEY, bucket TEXT COLLATE "C" NOT NULL, ordinal INTEGER NOT NULL,
    wordings INTEGER NOT NULL, provisions INTEGER NOT NULL, documents INTEGER NOT NULL,
    sample BIGINT, position TEXT COLLATE "C");
CREATE INDEX variants_bucket ON variants(bucket, ordinal);
CREATE TABLE labels(
    bucket TEXT COLLATE "C" NOT NULL, norm_hash TEXT COLLATE "C" NOT NULL, position TEXT COLLATE "C" NOT NULL,
    seq INTEGER NOT NULL, PRIMARY KEY(bucket, norm_hash));
CREATE TABLE dirty(bucket TEXT COLLATE "C" PRIMARY KEY);
CREATE TABLE bucket_state(bucket TEXT COLLATE "C" PRIMARY KEY, clustered INTEGER NOT NULL, drift INTEGER NOT NULL);
CREATE TABLE blobs(name TEXT COLLATE "C" PRIMARY KEY, data BYTEA NOT NULL);
CREATE TABLE sources(sha256 TEXT COLLATE "C" PRIMARY KEY, data BYTEA NOT NULL);
"""

#: (version, SQL taking a store from the previous version to it), in order.  A new version
#: appends a step; a step is never changed once released.
MIGRATIONS: tuple[tuple[int, str], ...] = ((1, _SCHEMA_1),)
SCHEMA_VERSION = MIGRATIONS[-1][0]


def shown_address(address: str) -> str:
    """*address* without any password (in its user part or its query), for showing."""
    try:
        parts = urlsplit(address)
        netloc = parts.netloc
        if "@" in netloc:
            user, _, hosts = netloc.rpartition("@")
            netloc = f"{user.split(':', 1)[0]}@{hosts}"
        query = urlencode([(k, v) for k, v in parse_qsl(parts.query, keep_blank_values=True)
                           if k.lower() != "password"], safe="/:,")
        return urlunsplit((parts.scheme, netloc, parts.path, query, parts.fragment))
    except ValueError:
        return address.split("://", 1)[0] + "://(address not shown)"


def _first_line(err: BaseException) -> str:
    """The first non-empty line of a libpq or server message, secrets taken out."""
    text = str(err)
    for secret in (os.environ.get("PGPASSWORD"),):
        if secret:
            text = text.replace(secret, "***")
    lines = [ln.strip() for ln in text.splitlines() if ln.strip()]
    return lines[0] if lines else type(err).__name__


class PostgresStore(SQLStore):
    """A precedent set in the PostgreSQL database at *url* (module docstring)."""

    _TERM_ORDER = "id"
    _LOWER_PARAM = 'lower(CAST(? AS TEXT) COLLATE "C")'

    def __init__(self, url: str) -> None:
        self.address = shown_address(url)
        self._writer = False
        self.conn: psycopg.Connection[Any] = self._connect(url)

    # -- connecting -----------------------------------------------------------------------------
    def _connect(self, url: str) -> psycopg.Connection[Any]:
        from psycopg.conninfo import conninfo_to_dict

        try:
            given = conninfo_to_dict(url)
        except psycopg.Error as err:
            raise CounterdraftError(f"not a PostgreSQL address ({_first_line(err)})", path=self.address) from None
        if given.get("password"):
            raise CounterdraftError("the address holds a password: keep it in ~/.pgpass, a service file or "
                                    "PGPASSWORD instead (see the README)", path=self.address)
        extra: dict[str, Any] = {}
        if "connect_timeout" not in given and not os.environ.get("PGCONNECT_TIMEOUT"):
            extra["connect_timeout"] = CONNECT_TIMEOUT_S
        if "application_name" not in given and not os.environ.get("PGAPPNAME"):
            extra["application_name"] = "counterdraft"
        try:
            return psycopg.connect(url, autocommit=False, **extra)
        except psycopg.Error as err:
            raise CounterdraftError(f"cannot connect to the store ({_first_line(err)})", path=self.address) from None

    def _failed(self, err: psycopg.Error) -> CounterdraftError:
        line = _first_line(err)
        if isinstance(err, psycopg.errors.InsufficientPrivilege):
            return CounterdraftError(f"the store refused ({line}): this role may not change the precedent set; "
                                     "use a role that may (see the README)", path=self.address)
        if isinstance(err, psycopg.OperationalError) and self.conn.closed:
            return CounterdraftError(f"lost the connection to the store ({line})", path=self.address)
        return CounterdraftError(f"store error ({line})", path=self.address)

    # -- dialect --------------------------------------------------------------------------------
    def _cursor(self, sql: str, params: Sequence[Any] = ()) -> Cursor:
        try:
            return self.conn.execute(sql.replace("?", "%s"), tuple(params) if params else None)
        except psycopg.Error as err:
            raise self._failed(err) from None

    def _many(self, sql: str, rows: Iterable[Sequence[Any]]) -> None:
        batch = list(rows)
        if not batch:
            return
        try:
            with self.conn.cursor() as cur:
                cur.executemany(sql.replace("?", "%s"), batch)
        except psycopg.Error as err:
            raise self._failed(err) from None

    def _in(self, sql: str, values: Sequence[Any], *before: Any) -> Iterator[Row]:
        if not values:
            return iter(())
        return iter(self._cursor(sql.replace("{in}", "= ANY(?)"), (*before, list(dict.fromkeys(values)))).fetchall())

    # -- schema ---------------------------------------------------------------------------------
    def _schema_version(self) -> int:
        if not self._one("SELECT to_regclass('meta') IS NOT NULL"):
            return 0
        value = self.meta("schema")
        return int(value) if value and value.isdigit() else 0

    def open(self, *, create: bool) -> None:
        version = self._schema_version()
        self.commit()
        if version > SCHEMA_VERSION:
            raise CounterdraftError(f"the store was made by a newer version of Counterdraft (schema {version}; "
                                    f"this version knows {SCHEMA_VERSION}): upgrade Counterdraft to use it",
                                    path=self.address)
        if version < SCHEMA_VERSION:
            if version == 0 and not create:
                raise CounterdraftError("no precedent set in this store yet: build one with "
                                        "'counterdraft library build DIR --store ADDRESS'", path=self.address)
            self._migrate()
        self._writer = create
        self._set_mode(write=create)

    def _migrate(self) -> None:
        """Apply the missing :data:`MIGRATIONS` in one transaction, once however many open
        the store at the same moment (the lock; the version read again under it)."""
        try:
            self._cursor("SELECT pg_advisory_xact_lock(?, ?)", (_LOCK_CLASS, _MIGRATION_LOCK))
            version = self._schema_version()
            for step, sql in MIGRATIONS:
                if step > version:
                    self.conn.execute(sql)
            self.set_meta("schema", str(SCHEMA_VERSION))
            self.conn.commit()
        except psycopg.Error as err:
            self.conn.rollback()
            if isinstance(err, psycopg.errors.InsufficientPrivilege):
                raise CounterdraftError(f"the store's tables need creating or upgrading to schema {SCHEMA_VERSION} "
                                        "and this role may not: run 'counterdraft library build' once with a role "
                                        "that may (see the README)", path=self.address) from None
            raise self._failed(err) from None
        except BaseException:
            self.conn.rollback()
            raise

    def _set_mode(self, *, write: bool) -> None:
        self.conn.isolation_level = IsolationLevel.READ_COMMITTED if write else IsolationLevel.REPEATABLE_READ
        self.conn.read_only = not write

    # -- transactions and locks -----------------------------------------------------------------
    @contextmanager
    def lock(self) -> Iterator[None]:
        self._cursor("SELECT pg_advisory_lock(?, ?)", (_LOCK_CLASS, _WRITER_LOCK))
        self.commit()  # the work under the lock starts a transaction of its own
        try:
            yield
        finally:
            if not self.conn.closed:
                try:
                    self.conn.rollback()  # nothing committed is lost; a failed write is undone
                    self.conn.execute("SELECT pg_advisory_unlock(%s, %s)", (_LOCK_CLASS, _WRITER_LOCK))
                    self.conn.commit()
                except psycopg.Error:
                    pass  # the connection is gone: the server released the lock with the session

    @contextmanager
    def write(self) -> Iterator[None]:
        try:
            self.conn.rollback()  # a reader's snapshot ends here
        except psycopg.Error as err:
            raise self._failed(err) from None
        self._set_mode(write=True)
        try:
            with self.lock():
                yield
                self.commit()
        finally:
            if not self.conn.closed:
                self.conn.rollback()
                self._set_mode(write=self._writer)

    def checkpoint(self) -> None:
        """Nothing: a build is one transaction on a shared store (module docstring)."""

    def commit(self) -> None:
        try:
            self.conn.commit()
        except psycopg.Error as err:
            raise self._failed(err) from None

    def close(self) -> None:
        self.conn.close()  # an open transaction is rolled back by the server

    def damage(self, err: BaseException) -> str | None:
        return None  # a server database is never set aside by a client

    def describe_error(self, err: BaseException) -> str | None:
        return _first_line(err) if isinstance(err, psycopg.Error) else None

    def start_over(self, problem: str) -> str:
        raise CounterdraftError(f"the store is not usable ({problem})", path=self.address)

    # -- files and derived data -----------------------------------------------------------------
    def _keep_source(self, sha256: str, source: Path) -> None:
        try:
            data = source.read_bytes()
        except OSError:
            return
        if hashlib.sha256(data).hexdigest() == sha256:  # else it changed since: the next build reads it again
            self._cursor("INSERT INTO sources(sha256, data) VALUES(?, ?) ON CONFLICT DO NOTHING", (sha256, data))

    def _drop_source(self, sha256: str) -> None:
        self._cursor("DELETE FROM sources WHERE sha256 = ? AND NOT EXISTS "
                     "(SELECT 1 FROM documents WHERE sha256 = ?)", (sha256, sha256))

    def source_bytes(self, path: str) -> bytes | None:
        data = self._one("SELECT s.data FROM sources s JOIN documents d ON d.sha256 = s.sha256 WHERE d.path = ?",
                         (path,))
        return None if data is None else bytes(data)

    def read_blob(self, name: str) -> bytes | None:
        data = self._one("SELECT data FROM blobs WHERE name = ?", (name,))
        return None if data is None else bytes(data)

    def write_blob(self, name: str, data: bytes) -> None:
        self._cursor("INSERT INTO blobs(name, data) VALUES(?, ?) ON CONFLICT(name) DO UPDATE SET data = excluded.data",
                     (name, data))

    def delete_blob(self, name: str) -> None:
        self._cursor("DELETE FROM blobs WHERE name = ?", (name,))

    def size_bytes(self) -> int:
        return int(self._one("SELECT pg_database_size(current_database())"))
