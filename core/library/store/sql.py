"""The SQL both backends share: every statement of the precedent set, written once.

:class:`SQLStore` implements the data methods of
:class:`~core.library.store.base.PrecedentStore` in the SQL that SQLite (3.35 and later)
and PostgreSQL (12 and later) both accept -- ``?`` parameters (the PostgreSQL backend turns
them into ``%s``), ``INSERT ... ON CONFLICT``, no bare columns beside an aggregate.  A
backend supplies the connection, the lifecycle, derived blobs and three small dialect
points: :meth:`_in` (a column against a list of values), :attr:`_SHINGLES` (the column
earlier SQLite indexes stored shingles in) and :meth:`_cursor` (with :meth:`_many`).

Text is compared and sorted by code point on both backends (SQLite's default; the
PostgreSQL tables declare ``COLLATE "C"``), so that documents "in path order" and buckets
"by name" are the same everywhere.
"""

from __future__ import annotations

import json
from collections.abc import Iterable, Iterator, Mapping, Sequence
from pathlib import Path
from typing import Any, Literal, Protocol

from .base import (
    VARIANT_FIGURES,
    DocumentState,
    FailureState,
    IndexRow,
    ProvisionRow,
    TermRow,
    UntypedRow,
    VariantRow,
)

__all__ = ["Cursor", "Row", "SQLStore"]

#: One row as a DB-API driver gives it; its columns are those of the SELECT, whose types the
#: schema fixes and each method states.
Row = tuple[Any, ...]


class Cursor(Protocol):
    """The part of a DB-API cursor (``sqlite3.Cursor``, ``psycopg.Cursor``) the SQL reads."""

    def fetchone(self) -> Row | None: ...
    def fetchall(self) -> list[Row]: ...
    def __iter__(self) -> Iterator[Row]: ...

_PROVISION_COLUMNS = ("id, document_id, ordinal, pid, kind, number, heading, level, parent, text, clause_type, "
                      "type_source, bucket")


class SQLStore:
    """The shared SQL (module docstring).  Subclasses set :attr:`address` and supply the
    dialect methods."""

    address: str
    #: The expression giving a wording's stored shingles in a GROUP BY norm_hash query.
    _SHINGLES = "NULL"
    #: The column that keeps defined terms in the order they were stored (SQLite's rowid).
    _TERM_ORDER = "id"
    #: lower() of a text parameter, ASCII letters only (SQLite's lower()).
    _LOWER_PARAM = "lower(?)"

    # -- dialect ------------------------------------------------------------------------------
    def _cursor(self, sql: str, params: Sequence[Any] = ()) -> Cursor:
        """Run one statement; the cursor (iterable, ``fetchone``, ``fetchall``)."""
        raise NotImplementedError

    def _many(self, sql: str, rows: Iterable[Sequence[Any]]) -> None:
        raise NotImplementedError

    def _in(self, sql: str, values: Sequence[Any], *before: Any) -> Iterator[Row]:
        """Rows of *sql*, whose ``{in}`` marks "column IN the *values*" (parameters *before*
        come first)."""
        raise NotImplementedError

    def _one(self, sql: str, params: Sequence[Any] = ()) -> Any:
        """The first column of the first row (None for no row)."""
        row = self._cursor(sql, params).fetchone()
        return None if row is None else row[0]

    def _text(self, sql: str, params: Sequence[Any] = ()) -> str | None:
        """:meth:`_one` of a text column."""
        value = self._one(sql, params)
        return None if value is None else str(value)

    def _next_id(self, table: str) -> int:
        """One more than the largest id of *table* (SQLite's own rule for a new row)."""
        return int(self._one(f"SELECT COALESCE(MAX(id), 0) + 1 FROM {table}"))

    # -- meta -----------------------------------------------------------------------------------
    def meta(self, key: str) -> str | None:
        return self._text("SELECT value FROM meta WHERE key = ?", (key,))

    def set_meta(self, key: str, value: str) -> None:
        self._cursor("INSERT INTO meta(key, value) VALUES(?, ?) "
                     "ON CONFLICT(key) DO UPDATE SET value = excluded.value", (key, value))

    def delete_meta(self, *keys: str) -> None:
        self._many("DELETE FROM meta WHERE key = ?", [(k,) for k in keys])

    # -- documents ------------------------------------------------------------------------------
    def file_states(self) -> tuple[dict[str, DocumentState], dict[str, FailureState]]:
        known = {p: (i, h, s, m) for i, p, h, s, m in
                 self._cursor("SELECT id, path, sha256, size, mtime_ns FROM documents")}
        failed = {p: (h, s, m) for p, h, s, m in self._cursor("SELECT path, sha256, size, mtime_ns FROM failures")}
        return known, failed

    def _mark_document_dirty(self, document_id: int) -> None:
        self._cursor("INSERT INTO dirty(bucket) SELECT DISTINCT bucket FROM provisions WHERE document_id = ? "
                     "ON CONFLICT DO NOTHING", (document_id,))

    def _drop_source(self, sha256: str) -> None:
        """A server store forgets the file of a document gone (when no other has it)."""

    def _forget(self, path: str) -> None:
        row = self._cursor("SELECT id, sha256 FROM documents WHERE path = ?", (path,)).fetchone()
        if row is not None:
            self._mark_document_dirty(row[0])
            self._cursor("DELETE FROM documents WHERE id = ?", (row[0],))
            self._drop_source(row[1])

    def remove_document(self, path: str) -> None:
        self._forget(path)

    def remove_failure(self, path: str) -> None:
        self._cursor("DELETE FROM failures WHERE path = ?", (path,))

    def update_stat(self, path: str, *, size: int, mtime_ns: int) -> None:
        for table in ("documents", "failures"):
            self._cursor(f"UPDATE {table} SET size = ?, mtime_ns = ? WHERE path = ?", (size, mtime_ns, path))

    def put_failure(self, path: str, *, sha256: str | None, size: int, mtime_ns: int, problem: str) -> None:
        self._forget(path)
        self.remove_failure(path)
        self._cursor("INSERT INTO failures(path, sha256, size, mtime_ns, problem) VALUES(?,?,?,?,?)",
                     (path, sha256, size, mtime_ns, problem))

    def _keep_source(self, sha256: str, source: Path) -> None:
        """A server store keeps the file read (patterns review it from anywhere)."""

    def put_document(self, path: str, *, sha256: str, size: int, mtime_ns: int, title: str | None,
                     parties: Sequence[str], provisions: Sequence[ProvisionRow], terms: Sequence[TermRow],
                     source: Path) -> None:
        self._forget(path)
        self.remove_failure(path)
        doc_id = self._next_id("documents")
        first = self._next_id("provisions")
        self._cursor("INSERT INTO documents(id, path, sha256, size, mtime_ns, title, parties, provisions) "
                     "VALUES(?,?,?,?,?,?,?,?)",
                     (doc_id, path, sha256, size, mtime_ns, title, json.dumps(list(parties)), len(provisions)))
        self._many(f"INSERT INTO provisions({_PROVISION_COLUMNS}) VALUES(?,?,?,?,?,?,?,?,?,?,?,?,?)",
                   [(first + i, doc_id, i, *row) for i, row in enumerate(provisions)])
        self._many("INSERT INTO terms(document_id, term, definition, provision, uses) VALUES(?,?,?,?,?)",
                   [(doc_id, *t) for t in terms])
        self._mark_document_dirty(doc_id)
        self._keep_source(sha256, source)

    def document_count(self) -> int:
        return int(self._one("SELECT COUNT(*) FROM documents"))

    def failures(self) -> list[tuple[str, str]]:
        return [(p, m) for p, m in self._cursor("SELECT path, problem FROM failures ORDER BY path")]

    def paths(self, *, sha256: str | None = None) -> list[str]:
        if sha256 is None:
            return [p for (p,) in self._cursor("SELECT path FROM documents ORDER BY path")]
        return [p for (p,) in self._cursor("SELECT path FROM documents WHERE sha256 = ? ORDER BY path", (sha256,))]

    def source_bytes(self, path: str) -> bytes | None:
        return None

    # -- normalising and typing -----------------------------------------------------------------
    def all_terms(self) -> list[tuple[int, str, str]]:
        return [tuple(r) for r in self._cursor(
            f"SELECT document_id, term, definition FROM terms ORDER BY {self._TERM_ORDER}")]

    def renormalise_all(self) -> None:
        self._cursor("UPDATE documents SET normalised = 0")

    def unnormalised_documents(self) -> list[int]:
        return [r[0] for r in self._cursor("SELECT id FROM documents WHERE normalised = 0 ORDER BY id")]

    def document_terms(self, document_id: int) -> list[str]:
        return [t for (t,) in self._cursor(
            f"SELECT term FROM terms WHERE document_id = ? ORDER BY {self._TERM_ORDER}", (document_id,))]

    def document_wordings(self, document_id: int) -> list[tuple[int, str | None, str]]:
        return [tuple(r) for r in self._cursor(
            "SELECT id, heading, text FROM provisions WHERE document_id = ?", (document_id,))]

    def set_norms(self, document_id: int, rows: Sequence[tuple[str, str, int]]) -> None:
        extra = f", {self._SHINGLES} = NULL" if self._SHINGLES != "NULL" else ""
        self._many(f"UPDATE provisions SET norm = ?, norm_hash = ?{extra} WHERE id = ?", rows)
        self._cursor("UPDATE documents SET normalised = 1 WHERE id = ?", (document_id,))

    def typed_examples(self, *, exclude_hash: str) -> Iterator[tuple[str, str, int, int]]:
        # Index-only on provisions (provisions_typed); a document's row ids follow its order.
        yield from self._cursor(
            "SELECT p.clause_type, p.norm_hash, p.id, p.document_id FROM provisions p "
            "JOIN documents d ON d.id = p.document_id "
            "WHERE p.type_source IN ('heading', 'parent') AND p.clause_type IS NOT NULL AND p.norm_hash != ? "
            "ORDER BY d.sha256, d.path, p.id", (exclude_hash,)).fetchall()

    def typed_examples_within(self, *, exclude_hash: str,
                              limits: Mapping[str, Sequence[int]]) -> list[tuple[str, str, int, int]]:
        # Each query reads index provisions_typed only (its range of one clause type, or
        # every range but those of *limits*).
        typed = ("SELECT clause_type, norm_hash, id, document_id FROM provisions "
                 "WHERE type_source IN ('heading', 'parent') AND norm_hash != ? AND ")
        rows: list[tuple[str, str, int, int]] = []
        for clause_type, documents in sorted(limits.items()):
            rows.extend(self._in(typed + "clause_type = ? AND document_id {in}", [int(d) for d in documents],
                                 exclude_hash, clause_type))
        others = f" AND clause_type NOT IN ({', '.join('?' * len(limits))})" if limits else ""
        rows.extend(self._cursor(typed + "clause_type IS NOT NULL" + others, (exclude_hash, *sorted(limits))))
        return rows

    def provision_column(self, column: Literal["norm", "text"], ids: Sequence[int]) -> dict[int, str]:
        if column not in ("norm", "text"):
            raise ValueError(column)
        return dict(self._in(f"SELECT id, {column} FROM provisions WHERE id {{in}}", [int(i) for i in ids]))

    def untyped_provisions(self, document_ids: Sequence[int] | None = None) -> list[UntypedRow]:
        sql = "SELECT id, kind, norm, clause_type, bucket FROM provisions WHERE type_source IN ('neighbour', 'none')"
        if document_ids is None:
            return [tuple(r) for r in self._cursor(sql)]
        return [tuple(r) for r in self._in(sql + " AND document_id {in}", [int(i) for i in document_ids])]

    def retype(self, updates: Sequence[tuple[str | None, str, str, int, str]]) -> None:
        self.mark_dirty(b for u in updates for b in (u[2], u[4]))
        self._many("UPDATE provisions SET clause_type = ?, type_source = ?, bucket = ? WHERE id = ?",
                   [u[:4] for u in updates])

    # -- buckets and variants ---------------------------------------------------------------------
    def mark_dirty(self, buckets: Iterable[str] | None = None) -> None:
        if buckets is None:
            # "WHERE true": SQLite reads "FROM t ON CONFLICT" as a join without it.
            self._cursor("INSERT INTO dirty(bucket) SELECT DISTINCT bucket FROM provisions WHERE true "
                         "ON CONFLICT DO NOTHING")
        else:
            self._many("INSERT INTO dirty(bucket) VALUES(?) ON CONFLICT DO NOTHING",
                       [(b,) for b in dict.fromkeys(buckets)])

    def dirty_buckets(self) -> list[str]:
        return [b for (b,) in self._cursor("SELECT bucket FROM dirty ORDER BY bucket")]

    def clear_dirty(self, bucket: str) -> None:
        self._cursor("DELETE FROM dirty WHERE bucket = ?", (bucket,))

    def forget_bucket_states(self) -> None:
        self._cursor("DELETE FROM bucket_state")

    def bucket_state(self, bucket: str) -> tuple[int, int] | None:
        row = self._cursor("SELECT clustered, drift FROM bucket_state WHERE bucket = ?", (bucket,)).fetchone()
        return None if row is None else (int(row[0]), int(row[1]))

    def add_drift(self, bucket: str, changes: int) -> None:
        self._cursor("UPDATE bucket_state SET drift = drift + ? WHERE bucket = ?", (int(changes), bucket))

    def set_clustered(self, bucket: str, wordings: int) -> None:
        self._cursor("INSERT INTO bucket_state(bucket, clustered, drift) VALUES(?, ?, 0) ON CONFLICT(bucket) "
                     "DO UPDATE SET clustered = excluded.clustered, drift = 0", (bucket, int(wordings)))

    def drop_bucket(self, bucket: str) -> None:
        self._cursor("DELETE FROM variants WHERE bucket = ?", (bucket,))
        self._cursor("DELETE FROM bucket_state WHERE bucket = ?", (bucket,))

    def wording_counts(self, bucket: str) -> list[tuple[str, int]]:
        return [(h, int(n)) for h, n in self._cursor(
            "SELECT norm_hash, COUNT(*) FROM provisions WHERE bucket = ? GROUP BY norm_hash ORDER BY norm_hash",
            (bucket,))]

    def wording_places(self, bucket: str) -> list[tuple[int, int, int]]:
        return self._cursor("SELECT document_id, ordinal, id FROM provisions WHERE bucket = ? "
                            "ORDER BY norm_hash, document_id, ordinal", (bucket,)).fetchall()

    def wording_texts(self, bucket: str, hashes: Sequence[str]) -> Iterator[tuple[str, bytes | None, str | None]]:
        yield from self._in(f"SELECT norm_hash, {self._SHINGLES}, MIN(norm) FROM provisions "
                            "WHERE bucket = ? AND norm_hash {in} GROUP BY norm_hash", list(hashes), bucket)

    def bucket_rows(self, bucket: str) -> list[tuple[str, int, bytes | None, str | None, int]]:
        return [(h, int(n), s, norm, int(i)) for h, n, s, norm, i in self._cursor(
            f"SELECT norm_hash, COUNT(*) AS n, {self._SHINGLES}, MIN(norm), MIN(id) FROM provisions "
            "WHERE bucket = ? GROUP BY norm_hash ORDER BY n DESC, norm_hash", (bucket,))]

    def variant_figures(self, bucket: str) -> list[tuple[int, ...]]:
        return [tuple(int(x) for x in r) for r in self._cursor(
            f"SELECT id, {', '.join(VARIANT_FIGURES)} FROM variants WHERE bucket = ? ORDER BY id", (bucket,))]

    def update_variants(self, rows: Sequence[tuple[int, ...]]) -> None:
        self._many(f"UPDATE variants SET {' = ?, '.join(VARIANT_FIGURES)} = ? WHERE id = ?", rows)

    def shift_ordinals(self, bucket: str, runs: Sequence[tuple[int, int, int]]) -> None:
        # One statement per run, in the order given (variants_bucket finds the range).
        for first, last, step in runs:
            self._cursor("UPDATE variants SET ordinal = ordinal + ? WHERE bucket = ? AND ordinal BETWEEN ? AND ?",
                         (int(step), bucket, int(first), int(last)))

    def delete_variants(self, ids: Sequence[int]) -> None:
        self._many("DELETE FROM variants WHERE id = ?", [(int(v),) for v in ids])

    def add_variant(self, bucket: str, figures: Sequence[int]) -> int:
        vid = self._next_id("variants")
        self._cursor(f"INSERT INTO variants(id, bucket, {', '.join(VARIANT_FIGURES)}) VALUES(?,?,?,?,?,?,?)",
                     (vid, bucket, *(int(x) for x in figures)))
        return vid

    def unassigned_wordings(self, bucket: str) -> list[str]:
        return [h for (h,) in self._cursor(
            "SELECT DISTINCT norm_hash FROM provisions WHERE bucket = ? AND variant_id IS NULL", (bucket,))]

    def assign_variants(self, bucket: str, rows: Sequence[tuple[int, str]]) -> None:
        self._many("UPDATE provisions SET variant_id = ? WHERE bucket = ? AND norm_hash = ? "
                   "AND (variant_id IS NULL OR variant_id != ?)",
                   [(int(v), bucket, h, int(v)) for v, h in rows])

    def has_labels(self, bucket: str) -> bool:
        return self._cursor("SELECT 1 FROM labels WHERE bucket = ? LIMIT 1", (bucket,)).fetchone() is not None

    def update_position(self, variant_id: int) -> str | None:
        rows = self._cursor(
            "SELECT l.position, COUNT(*), MAX(l.seq) FROM labels l JOIN "
            "(SELECT DISTINCT bucket, norm_hash FROM provisions WHERE variant_id = ?) p "
            "ON l.bucket = p.bucket AND l.norm_hash = p.norm_hash GROUP BY l.position",
            (int(variant_id),)).fetchall()
        position = min(rows, key=lambda r: (-r[1], -r[2]))[0] if rows else None
        self._cursor("UPDATE variants SET position = ? WHERE id = ?", (position, int(variant_id)))
        return position

    def documents_by_hash(self) -> list[tuple[int, str, str]]:
        return self._cursor("SELECT id, sha256, path FROM documents ORDER BY sha256, path").fetchall()

    # -- the vocabulary's corpus ------------------------------------------------------------------
    def documents_by_path(self, limit: int | None = None) -> list[tuple[int, str, str]]:
        sql = "SELECT id, path, sha256 FROM documents ORDER BY path"
        if limit is None:
            return self._cursor(sql).fetchall()
        return self._cursor(sql + " LIMIT ?", (int(limit),)).fetchall()

    def document_texts(self, document_id: int) -> list[tuple[str, str | None]]:
        return self._cursor("SELECT text, norm_hash FROM provisions WHERE document_id = ? ORDER BY ordinal",
                            (document_id,)).fetchall()

    # -- reading ------------------------------------------------------------------------------------
    def bucket_names(self) -> tuple[str, ...]:
        return tuple(b for (b,) in self._cursor("SELECT bucket FROM bucket_state ORDER BY bucket"))

    def document_paths(self, ids: Sequence[int]) -> dict[int, str]:
        return dict(self._in("SELECT id, path FROM documents WHERE id {in}", [int(i) for i in ids]))

    def provision_refs(self, ids: Sequence[int]) -> dict[int, tuple[str, str | None, str | None, str]]:
        return {pid: (path, number, heading, local) for pid, path, number, heading, local in self._in(
            "SELECT p.id, d.path, p.number, p.heading, p.pid FROM provisions p "
            "JOIN documents d ON d.id = p.document_id WHERE p.id {in}", [int(i) for i in ids])}

    def terms_beside(self, provision_id: int) -> list[str]:
        return [t for (t,) in self._cursor(
            "SELECT t.term FROM terms t JOIN provisions p ON p.document_id = t.document_id WHERE p.id = ? "
            f"ORDER BY t.{self._TERM_ORDER}",
            (int(provision_id),))]

    def variant_positions(self) -> dict[int, str]:
        return dict(self._cursor("SELECT id, position FROM variants WHERE position IS NOT NULL").fetchall())

    def variant_rows(self, bucket: str | None = None) -> list[VariantRow]:
        sql = ("SELECT v.id, v.bucket, v.ordinal, v.wordings, v.provisions, v.documents, v.position, "
               "d.path, p.number, p.heading, p.pid, v.sample FROM variants v LEFT JOIN provisions p ON p.id = v.sample "
               "LEFT JOIN documents d ON d.id = p.document_id")
        args: tuple[Any, ...] = ()
        if bucket is not None:
            sql += " WHERE v.bucket = ?"
            args = (bucket,)
        return self._cursor(sql + " ORDER BY v.bucket, v.ordinal", args).fetchall()

    def find_provision(self, document: str, provision: str) -> tuple[int | None, str, str | None] | None:
        row = self._cursor(
            "SELECT p.variant_id, p.bucket, p.norm_hash FROM provisions p JOIN documents d ON d.id = p.document_id "
            f"WHERE d.path = ? AND (p.number = ? OR p.pid = ? OR lower(p.heading) = {self._LOWER_PARAM}) "
            "ORDER BY p.ordinal LIMIT 1", (document, provision, provision, provision)).fetchone()
        return None if row is None else (row[0], row[1], row[2])

    def variant_bucket(self, variant_id: int) -> str | None:
        return self._text("SELECT bucket FROM variants WHERE id = ?", (int(variant_id),))

    def variant_wordings(self, variant_id: int) -> list[str]:
        return [h for (h,) in self._cursor(
            "SELECT DISTINCT norm_hash FROM provisions WHERE variant_id = ?", (int(variant_id),))]

    def set_labels(self, bucket: str, hashes: Sequence[str], position: str | None) -> None:
        if position is None:
            self._many("DELETE FROM labels WHERE bucket = ? AND norm_hash = ?", [(bucket, h) for h in hashes])
            return
        seq = int(self._one("SELECT COALESCE(MAX(seq), 0) FROM labels")) + 1
        self._many("INSERT INTO labels(bucket, norm_hash, position, seq) VALUES(?,?,?,?) "
                   "ON CONFLICT(bucket, norm_hash) DO UPDATE SET position = excluded.position, seq = excluded.seq",
                   [(bucket, h, position, seq) for h in hashes])

    def labels(self) -> list[tuple[str, str, str]]:
        return self._cursor("SELECT bucket, norm_hash, position FROM labels ORDER BY bucket, norm_hash").fetchall()

    def type_counts(self) -> dict[str, tuple[int, int]]:
        return {b: (int(n), int(d)) for b, n, d in self._cursor(
            "SELECT bucket, COUNT(*), COUNT(DISTINCT document_id) FROM provisions GROUP BY bucket")}

    def variant_counts(self) -> dict[str, tuple[int, int]]:
        return {b: (int(n), int(lab)) for b, n, lab in self._cursor(
            "SELECT bucket, COUNT(*), COUNT(position) FROM variants GROUP BY bucket")}

    def provision_count(self) -> int:
        return int(self._one("SELECT COUNT(*) FROM provisions"))

    def term_count(self) -> int:
        return int(self._one("SELECT COUNT(*) FROM terms"))

    def provision_rows(self) -> list[IndexRow]:
        return [tuple(r) for r in self._cursor(
            "SELECT p.id, p.document_id, d.path, p.pid, p.clause_type, p.type_source, p.bucket, p.norm_hash, "
            "p.variant_id FROM provisions p JOIN documents d ON d.id = p.document_id ORDER BY d.path, p.ordinal")]

    def documents_defining(self, names: Sequence[str]) -> int:
        names = sorted(set(names))
        if not names:
            return 0
        if len(names) == 1:
            return int(self._one("SELECT COUNT(DISTINCT document_id) FROM terms WHERE term = ?", names))
        return len({d for (d,) in self._in("SELECT DISTINCT document_id FROM terms WHERE term {in}", names)})
