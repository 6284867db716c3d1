"""The precedent set's index: a SQLite database of the firm's past agreements.

``build_library(root)`` reads every file of a format the readers registry admits to a precedent
set (``core.readers.PRECEDENT_SET_SUFFIXES``: .docx, .odt, .txt, .md; not .pdf, whose structure
is only inferred) under *root* (recursively; hidden
files and folders, Office lock files ``~$...`` and the index's own folder are skipped) into
``root/.counterdraft/library.sqlite`` (or a path of your choice):

* ``documents``: path (relative to the root, with "/"), SHA-256, size, modification time,
  title and parties when found;
* ``provisions``: kind, number, heading, level, text, clause type (and how it was found), its
  bucket, the normalised wording and its hash, and its variant (the ``shingles`` column is
  left empty: the bucket caches hold the shingles);
* ``terms``: the defined terms and their definitions;
* ``failures``: files that could not be read or are not agreements, with the problem;
* ``variants`` and ``labels``: wording variants per clause type and the reviewer's positions;
* ``dirty`` and ``bucket_state``: buckets to refresh, and each bucket's wordings at its last
  full clustering and the wordings added or removed since.

The build is incremental: a file whose size and modification time are unchanged is not
opened; a file whose stat changed is hashed and re-read only when its SHA-256 changed; files
that disappeared are dropped.  Unreadable files are listed and skipped; nothing aborts the
build.  After the files, the derived data is refreshed only where something changed:

* every bucket (clause type) holding a provision of a file read or dropped is marked dirty
  (table ``dirty``, in the same transaction as the change, so a cancelled or killed build
  leaves the marks for the next one); only marked buckets are refreshed;
* term aliases are learnt again from the stored terms (cheap); when they change, every
  document is normalised again and every bucket marked;
* only new documents are normalised;
* the neighbour classifier of unheaded clauses is refitted only when its examples (per type,
  the first ``MAX_EXAMPLES_PER_TYPE`` distinct typed wordings, documents taken in the order of
  their SHA-256) changed, and then types every unheaded clause again; otherwise it types only
  the new documents' (the same classifier gives the same answers, so the result is a full
  build's);
* each marked bucket's frequency cache (``buckets/<name>.npz``, :mod:`.bucketcache`) is made
  from its previous version and its new wordings, and its variants are updated by
  :func:`.variants.regroup` -- the variants a new wording lies within the cut-off of, and the
  variants that lost a wording, are clustered again on their own -- until the wordings added
  and removed since the bucket's last full clustering exceed ``CLUSTER_DRIFT`` of its
  wordings; a small bucket (``ALWAYS_FULL_WORDINGS``), a new one and a drifted one are
  clustered in full.  Regrouping is exact for single linkage; for average and complete
  linkage it can differ from a full clustering only where sub-groups of two variants lie
  within the cut-off of each other (see :func:`.variants.regroup`); a full build of the same
  files gives the same variants on the demo set and the test corpora
  (tests/core/library/test_incremental.py);
* the vocabulary model (``vocabulary.npz``) is retrained only when its training corpus has
  drifted (:func:`.vocab.vocabulary_drift`, ``vocab.RETRAIN_DRIFT``), in a worker process
  beside the clustering when the corpus is large; until then it is the model of the
  documents it was trained on.

The index is derived data: when its file is not a usable SQLite database of this schema
(damaged, truncated, not SQLite, another schema version), the build moves it aside to
``library.sqlite.damaged-<time>`` (mode 0o600, beside it; kept because it may hold the
reviewer's labels) and rebuilds it from the agreements; ``BuildReport.rebuilt`` says so in one
line.  Opening an index without a build (:class:`Library`) reports such a file as an error.

Confidentiality: the folder ``.counterdraft`` is created with mode 0o700 and every file in it
with mode 0o600 (SQLite gives its journal the database's mode); the build logs no contract text
(progress reports give file paths only, failure reasons never quote the file).

Cost: reading dominates a first build (the reader's cost per file; spread over ``workers``
processes).  The derived data of a first build costs O(provisions) for normalisation and
typing, O(n^2) per clause type for the variants of its n distinct wordings (bounded by
``MAX_CLUSTER_ITEMS``) and a vocabulary training bounded by ``vocab.MAX_TRAINING_WORDS``.
Adding, changing or removing one agreement costs its reading, one index-only scan and array
work linear in the size of the buckets it touches, one sparse product of its new wordings
with those buckets, and O(g^2) for each regrouped set of g wordings.
"""

from __future__ import annotations

import hashlib
import json
import multiprocessing
import os
import re
import sqlite3
import stat
import time
from collections import defaultdict
from collections.abc import Callable, Iterator, Mapping, Sequence
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any

import numpy as np

from ..errors import CounterdraftError
from ..fileio import atomic_write_bytes, exclusive, file_sha256, remove_orphaned_parts
from ..readers import PRECEDENT_SET_SUFFIXES
from .bucketcache import BucketArrays, assemble, compact, rows_of
from .clausetypes import NeighbourClassifier, Typing, classify_provisions, load_taxonomy
from .normalise import TermReplacer, _word_hash, canonical_role, fold, learn_aliases, match_tokens, shingle_hashes
from .variants import RegroupTooLarge, VariantConfig, cluster_wordings, regroup

__all__ = [
    "DB_DIRNAME",
    "DB_FILENAME",
    "MIN_AGREEMENT_TYPES",
    "POOL_MIN_FILES",
    "POSITIONS",
    "SUFFIXES",
    "BucketIndex",
    "BuildReport",
    "Cancel",
    "Failure",
    "Library",
    "Progress",
    "VariantInfo",
    "bucket_of",
    "build_library",
    "default_db_path",
    "normalised_wording",
    "open_library",
    "scan_files",
    "wording_shingles",
]

#: The formats a precedent set holds (the readers registry decides).
SUFFIXES: tuple[str, ...] = PRECEDENT_SET_SUFFIXES
DB_DIRNAME = ".counterdraft"
DB_FILENAME = "library.sqlite"
CACHE_FILENAME = "variants.npz"  # the frequency cache of earlier versions (one file), removed
BUCKETS_DIRNAME = "buckets"  # the frequency cache: one file per bucket (core.library.bucketcache)
NEIGHBOURS_FILENAME = "clausetypes.npz"
VOCAB_FILENAME = "vocabulary.npz"
SCHEMA_VERSION = "1"

#: A file is an agreement when at least this many distinct clause types are recognised in
#: it; a letter, a note or a README has none or one.  (Common practice, no source: even a
#: short agreement has definitions, a term or termination clause and a governing law.)
MIN_AGREEMENT_TYPES = 3

#: Below this many files to read, reading stays in this process: starting worker processes
#: (spawn, which is safe beside the desktop app's threads) costs about a second.
POOL_MIN_FILES = 16

#: Layout of the derived files (meta ``derived``): an index whose derived data has another
#: layout gets it all anew on its next build.
DERIVED_FORMAT = "2"

#: A bucket of at most this many distinct wordings is clustered in full whenever it changes:
#: its 80,000 distances and their linkage take milliseconds, and a full clustering is the
#: reference the incremental path approximates.
ALWAYS_FULL_WORDINGS = 400

#: Wordings added to or removed from a larger bucket are regrouped into its variants
#: (:func:`core.library.variants.regroup`) until the wordings added and removed since its
#: last full clustering exceed this share of the wordings it then had; the change after that
#: clusters it in full again.  A tenth: regrouping is exact for single linkage and, for
#: average and complete linkage, departs from a full clustering only when sub-groups of two
#: variants lie within the cut-off of each other (none on the demo set and the test
#: corpora), so the drift stays small, while one full clustering of a 3,000-wording bucket
#: costs seconds -- a tenth of the wordings is ~100 added agreements at 1,000.
CLUSTER_DRIFT = 0.10

#: A build trains the vocabulary model in a worker process, beside the clustering, when the
#: training corpus holds at least this many words (about 1.5 s of training): below that,
#: starting a process and importing gensim in it (about a second) costs more than it saves.
PARALLEL_TRAINING_MIN_WORDS = 200_000

#: The reviewer's positions on a variant, strongest first.
POSITIONS: tuple[str, ...] = ("preferred", "acceptable", "fallback", "not acceptable")

Progress = Callable[[int, int, str], None]
Cancel = Callable[[], bool]

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


@dataclass(frozen=True, slots=True)
class Failure:
    """A file under the library's root that is not indexed, and why (never quoting it)."""

    path: str
    problem: str


@dataclass(frozen=True, slots=True)
class BuildReport:
    root: str
    db_path: str
    files: int  # candidate files (.docx/.txt/.md) found under the root
    read: int  # files read this time (new or changed)
    unchanged: int
    removed: int
    documents: int  # agreements in the index after the build
    failures: tuple[Failure, ...]  # every file skipped, this build or an earlier one
    cancelled: bool = False
    seconds: float = 0.0
    #: A one-line note when the index file was not usable (damaged, truncated, another
    #: schema) and was moved aside and rebuilt from the agreements; else None.
    rebuilt: str | None = None


@dataclass(frozen=True, slots=True)
class VariantInfo:
    id: int
    bucket: str
    ordinal: int  # 1-based within its clause type, most common first
    wordings: int  # distinct normalised wordings
    provisions: int
    documents: int
    position: str | None
    sample_document: str | None
    sample_provision: str | None  # number, else heading, else provision id
    sample: int | None = None  # the sample's provision row id


def bucket_of(clause_type: str | None, kind: str) -> str:
    """Provisions are compared within a bucket: their clause type, or ``~kind`` if untyped."""
    return clause_type if clause_type else f"~{kind}"


def default_db_path(root: str | os.PathLike[str]) -> Path:
    return Path(root) / DB_DIRNAME / DB_FILENAME


#: Row ids per ``WHERE id IN (?, ...)`` query: SQLite allowed at most 999 bound parameters
#: per statement before version 3.32.0 (SQLITE_MAX_VARIABLE_NUMBER,
#: https://www.sqlite.org/limits.html), so batches of 500 stay well inside on any build.
_IN_BATCH = 500


def _id_batches(ids: Sequence[int]) -> Iterator[tuple[str, list[int]]]:
    """*ids* as ints without repeats (first order kept), in batches of at most
    :data:`_IN_BATCH`, each with its ``?,?,...`` placeholders for ``IN (...)``."""
    unique = list(dict.fromkeys(int(i) for i in ids))
    for start in range(0, len(unique), _IN_BATCH):
        chunk = unique[start:start + _IN_BATCH]
        yield ",".join("?" * len(chunk)), chunk


def _norm_hash(norm: str) -> str:
    return hashlib.blake2b(norm.encode("utf-8"), digest_size=16).hexdigest()


def normalised_wording(text: str, heading: str | None, *, terms: TermReplacer | None) -> list[str]:
    """The tokens by which wordings are compared: heading and text, terms normalised."""
    return match_tokens(f"{heading or ''}\n{text}", terms=terms)


# ----------------------------------------------------------------------------------------
# Private files
# ----------------------------------------------------------------------------------------


def _private_dir(path: Path) -> None:
    try:
        path.mkdir(mode=0o700, parents=False, exist_ok=True)
        os.chmod(path, 0o700)
    except OSError as err:
        # 'review --library' and the desktop app keep the index inside the folder; only the
        # 'counterdraft library' commands take another place (--db).
        raise CounterdraftError(f"cannot create the index folder ({err.strerror}): the precedent set's "
                                "index is kept inside its folder, so the folder must be writable; copy the "
                                "agreements to a folder you can write to", path=str(path)) from None


def _write_private(path: Path, data: bytes) -> None:
    """Atomic write with mode 0o600 (mkstemp already creates 0o600; chmod makes it explicit)."""
    atomic_write_bytes(path, data)
    os.chmod(path, 0o600)


#: SQLite's primary result codes for a file that is not a database or is damaged
#: (SQLITE_CORRUPT = 11, SQLITE_NOTADB = 26; https://www.sqlite.org/rescode.html).  Other
#: errors (locked, read-only, disk full) say nothing about the file and never set it aside.
_DAMAGE_CODES = frozenset({11, 26})


class _Unusable(Exception):
    """The index file is not a usable SQLite database of this schema (``problem`` says why)."""

    def __init__(self, problem: str) -> None:
        super().__init__(problem)
        self.problem = problem


def _is_damage(err: sqlite3.DatabaseError) -> bool:
    code = getattr(err, "sqlite_errorcode", None)
    return code is not None and (code & 0xFF) in _DAMAGE_CODES


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


def _check_schema(conn: sqlite3.Connection) -> None:
    """Raise :class:`_Unusable` unless the database is empty or an index of this schema.

    Reading the schema also makes SQLite check the file header: garbage gives SQLITE_NOTADB,
    a truncated file SQLITE_CORRUPT.  Cost: one read of the schema table, a few pragmas.
    """
    try:
        tables = {n for (n,) in conn.execute("SELECT name FROM sqlite_master WHERE type = 'table'")}
        if not tables:
            return  # a new, empty file
        if "meta" not in tables:
            raise _Unusable("not a Counterdraft index")
        version = _meta(conn, "schema")
        if version != SCHEMA_VERSION:
            raise _Unusable(f"made by another version of Counterdraft (schema {version})")
        for name, columns in _reference_columns().items():
            if name in tables and conn.execute(f"PRAGMA table_info({name})").fetchall() != columns:
                raise _Unusable(f"table {name} differs from this version's")
    except sqlite3.DatabaseError as err:
        if _is_damage(err):
            raise _Unusable(str(err)) from None
        raise


def _connect(db_path: Path, *, create: bool) -> sqlite3.Connection:
    """Open the index; raises :class:`_Unusable` when the file is not a usable index of this
    schema (damaged, truncated, another schema) and CounterdraftError for other problems."""
    if not db_path.exists():
        if not create:
            raise CounterdraftError("no precedent-set index here; build it with "
                                    "'counterdraft library build'", path=str(db_path))
        if not db_path.parent.is_dir():
            raise CounterdraftError("the folder for the index does not exist", path=str(db_path))
        try:
            fd = os.open(db_path, os.O_CREAT | os.O_RDWR, 0o600)
            os.close(fd)
        except OSError as err:
            raise CounterdraftError(f"cannot create the index ({err.strerror})", path=str(db_path)) from None
    try:
        os.chmod(db_path, 0o600)
    except OSError:
        pass
    conn = None
    try:
        # check_same_thread=False: the desktop app opens the index in a worker thread and reads
        # it from the GUI thread, one at a time.
        conn = sqlite3.connect(str(db_path), timeout=30.0, check_same_thread=False)
        _check_schema(conn)
        conn.execute("PRAGMA foreign_keys = ON")
        conn.execute("PRAGMA synchronous = NORMAL")
        conn.executescript(_SCHEMA)
        if _meta(conn, "schema") is None:
            _set_meta(conn, "schema", SCHEMA_VERSION)
            conn.commit()
    except _Unusable:
        if conn is not None:
            conn.close()
        raise
    except sqlite3.DatabaseError as err:
        if conn is not None:
            conn.close()
        if _is_damage(err):
            raise _Unusable(str(err)) from None
        raise CounterdraftError(f"cannot open the index ({err})", path=str(db_path)) from None
    return conn


def _set_aside(db_path: Path) -> Path:
    """Rename a damaged index (and any journal SQLite left beside it) to
    ``<name>.damaged-<local time>``, mode 0o600, and return the new path.  Kept, not deleted:
    it may hold the reviewer's labels, and a person may want to look at it."""
    stamp = time.strftime("%Y%m%d-%H%M%S")
    aside = db_path.with_name(f"{db_path.name}.damaged-{stamp}")
    n = 1
    while aside.exists():
        n += 1
        aside = db_path.with_name(f"{db_path.name}.damaged-{stamp}-{n}")
    try:
        os.replace(db_path, aside)
        os.chmod(aside, 0o600)
        for suffix in ("-journal", "-wal", "-shm"):
            side = db_path.with_name(db_path.name + suffix)
            if side.exists():
                os.replace(side, aside.with_name(aside.name + suffix))
                os.chmod(aside.with_name(aside.name + suffix), 0o600)
    except OSError as err:
        raise CounterdraftError(f"the index is damaged and cannot be moved aside ({err.strerror}); "
                                "delete it and build again", path=str(db_path)) from None
    return aside


def _meta(conn: sqlite3.Connection, key: str) -> str | None:
    row = conn.execute("SELECT value FROM meta WHERE key = ?", (key,)).fetchone()
    return None if row is None else row[0]


def _set_meta(conn: sqlite3.Connection, key: str, value: str) -> None:
    conn.execute("INSERT INTO meta(key, value) VALUES(?, ?) "
                 "ON CONFLICT(key) DO UPDATE SET value = excluded.value", (key, value))


# ----------------------------------------------------------------------------------------
# Scanning and reading files
# ----------------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class _FileStat:
    rel: str
    path: str
    size: int
    mtime_ns: int


def scan_files(root: str | os.PathLike[str], *, exclude: Sequence[str | os.PathLike[str]] = ()) -> list[str]:
    """Absolute paths of the candidate files under *root*, sorted (see the module docstring)."""
    return [f.path for f in _scan(Path(root), exclude=exclude)]


def _file_ids(paths: Sequence[str | os.PathLike[str]]) -> set[tuple[int, int]]:
    """(device, inode) of each existing file of *paths*: the same file under any name."""
    out = set()
    for p in paths:
        try:
            st = os.stat(p)
        except OSError:
            continue
        out.add((st.st_dev, st.st_ino))
    return out


def _scan(root: Path, *, exclude: Sequence[str | os.PathLike[str]] = ()) -> list[_FileStat]:
    excluded = _file_ids(exclude)  # compared by inode: no path resolution per file found
    out: list[_FileStat] = []
    stack = [root]
    while stack:  # iterative walk: no recursion on the folder depth
        folder = stack.pop()
        try:
            entries = sorted(os.scandir(folder), key=lambda e: e.name)
        except OSError:
            continue
        subdirs = []
        for e in entries:
            if e.name.startswith(".") or e.name.startswith("~$"):
                continue
            try:
                if e.is_dir(follow_symlinks=False):
                    subdirs.append(Path(e.path))
                    continue
                if not e.is_file() or not e.name.lower().endswith(SUFFIXES):
                    continue
                st = e.stat()
            except OSError:
                continue
            if not stat.S_ISREG(st.st_mode) or (st.st_dev, st.st_ino) in excluded:
                continue
            rel = Path(e.path).relative_to(root).as_posix()
            out.append(_FileStat(rel, e.path, st.st_size, st.st_mtime_ns))
        stack.extend(reversed(subdirs))
    out.sort(key=lambda f: f.rel)
    return out


@dataclass(frozen=True, slots=True)
class _Extract:
    sha256: str
    title: str | None
    parties: tuple[str, ...]
    # (pid, kind, number, heading, level, parent, text, clause_type, type_source)
    provisions: tuple[tuple[Any, ...], ...]
    # (term, definition, provision id, uses)
    terms: tuple[tuple[str, str, str, int], ...]


@dataclass(frozen=True, slots=True)
class _Problem:
    sha256: str | None
    problem: str


_PARTY_CUT_RE = re.compile(r"(?:\)|;|\bbetween\b|\band\b|\(\d+\)|\bBETWEEN\b|\bAND\b)", re.UNICODE)


def _party_names(doc) -> tuple[str, ...]:  # noqa: ANN001 - core.model.Document
    """"NAME (Term)" for each party label defined in the parties block, when found: the words
    before the label's parenthesis, after the previous party or "between", up to the first
    comma."""
    parties_ids = {p.id for p in doc.provisions if p.kind == "parties"}
    names = []
    for t in doc.terms:
        if t.provision not in parties_ids and not canonical_role(t.term):
            continue
        text = fold(t.definition)
        m = re.search(r"\((?:the |hereinafter )?[\"']" + re.escape(t.term) + r"[\"']", text)
        if not m:
            continue
        before = text[:m.start()]
        cuts = list(_PARTY_CUT_RE.finditer(before))
        if cuts:
            before = before[cuts[-1].end():]
        name = before.split(",")[0].strip(" \"'\n\t:")
        if name:
            names.append(f"{name[:120]} ({t.term})")
    return tuple(dict.fromkeys(names))


def _title_of(doc) -> str | None:  # noqa: ANN001
    for p in doc.provisions:
        if p.kind == "title":
            return (p.heading or p.text).strip()[:200] or None
    for b in doc.blocks:
        if b.text.strip():
            return b.text.strip()[:200]
    return None


def _extract(path: str) -> _Extract | _Problem:
    """Read one file (runs in a worker process).  Never raises."""
    digest: str | None = None
    try:
        digest = file_sha256(path)
        if os.path.getsize(path) == 0:
            return _Problem(digest, "empty file")
        from ..readers import read_document

        doc = read_document(path)
        typings: tuple[Typing, ...] = classify_provisions(doc)
        types = {t.clause_type for t in typings if t.clause_type}
        if not doc.provisions:
            return _Problem(digest, "no text found")
        if len(types) < MIN_AGREEMENT_TYPES:
            return _Problem(digest, f"not an agreement ({len(types)} recognisable clause "
                                    f"type{'s' if len(types) != 1 else ''}; at least "
                                    f"{MIN_AGREEMENT_TYPES} needed)")
        provisions = tuple(
            (p.id, p.kind, p.number, p.heading, p.level, p.parent, p.text, t.clause_type, t.source)
            for p, t in zip(doc.provisions, typings))
        terms = tuple((t.term, t.definition, t.provision, t.uses) for t in doc.terms)
        return _Extract(digest, _title_of(doc), _party_names(doc), provisions, terms)
    except CounterdraftError as err:
        return _Problem(digest, err.problem)
    except MemoryError:
        return _Problem(digest, "too large to read")
    except Exception as err:  # noqa: BLE001 - one bad file never aborts a build
        return _Problem(digest, f"unreadable ({type(err).__name__})")


def _cancelled(cancel: Cancel | Any | None) -> bool:
    if cancel is None:
        return False
    if hasattr(cancel, "is_set"):
        return bool(cancel.is_set())
    return bool(cancel())


def _read_many(paths: Sequence[str], *, workers: int) -> Iterator[_Extract | _Problem]:
    """Results in the order of *paths*."""
    if workers <= 1 or len(paths) < POOL_MIN_FILES:
        for p in paths:
            yield _extract(p)
        return
    ctx = multiprocessing.get_context("spawn")
    with ProcessPoolExecutor(max_workers=workers, mp_context=ctx) as pool:
        try:
            yield from pool.map(_extract, paths, chunksize=4)
        finally:
            pool.shutdown(wait=True, cancel_futures=True)


# ----------------------------------------------------------------------------------------
# Build
# ----------------------------------------------------------------------------------------


def build_library(root: str | os.PathLike[str], *, db_path: str | os.PathLike[str] | None = None,
                  progress: Progress | None = None, cancel: Cancel | Any | None = None,
                  workers: int = 2, config: VariantConfig | None = None,
                  vocabulary: bool = True, exclude: Sequence[str | os.PathLike[str]] = ()) -> BuildReport:
    """Build or refresh the index of the agreements under *root*; see the module docstring.

    *progress* is called as ``progress(done, total, relative_path)`` once per candidate file;
    *cancel* is a callable returning True (or a ``threading.Event``) to stop between files:
    what was read so far is kept and the next build finishes the job.  *config* sets the
    variant clustering (stored; a change re-clusters).  *vocabulary* False skips training the
    vocabulary model.  Files in *exclude* are not indexed.
    """
    root_p = Path(root)
    if not root_p.is_dir():
        raise CounterdraftError("not a folder", path=str(root))
    if db_path is None:
        _private_dir(root_p / DB_DIRNAME)
        db = root_p / DB_DIRNAME / DB_FILENAME
    else:
        db = Path(db_path)
    # One builder at a time per index: SQLite keeps the rows consistent, the lock keeps the
    # derived files (clause types, variants, vocabulary) from being computed from two states.
    with exclusive(db):
        remove_orphaned_parts(db.parent)
        return _build_locked(root_p, db, progress=progress, cancel=cancel, workers=workers,
                             config=config, vocabulary=vocabulary, exclude=exclude)


def _build_locked(root_p: Path, db: Path, *, progress: Progress | None, cancel: Cancel | Any | None,
                  workers: int, config: VariantConfig | None, vocabulary: bool,
                  exclude: Sequence[str | os.PathLike[str]]) -> BuildReport:
    started = time.perf_counter()
    rebuilt: str | None = None
    while True:
        try:
            conn = _connect(db, create=True)
            try:
                report = _build_into(conn, root_p, db, progress=progress, cancel=cancel, workers=workers,
                                     config=config, vocabulary=vocabulary, exclude=exclude,
                                     fresh=rebuilt is not None)
            finally:
                conn.close()
        except (_Unusable, sqlite3.DatabaseError) as err:
            if isinstance(err, sqlite3.DatabaseError) and not _is_damage(err):
                raise CounterdraftError(f"cannot update the index ({err})", path=str(db)) from None
            problem = err.problem if isinstance(err, _Unusable) else str(err)
            if rebuilt is not None:  # a fresh file failed too: not the old file's fault
                raise CounterdraftError(f"cannot rebuild the index ({problem})", path=str(db)) from None
            aside = _set_aside(db)
            rebuilt = (f"the index was not usable ({problem}); it was moved aside to {aside.name} "
                       "and rebuilt from the agreements")
            continue
        break
    return replace(report, rebuilt=rebuilt, seconds=round(time.perf_counter() - started, 3))


def _build_into(conn: sqlite3.Connection, root_p: Path, db: Path, *, progress: Progress | None,
                cancel: Cancel | Any | None, workers: int, config: VariantConfig | None, vocabulary: bool,
                exclude: Sequence[str | os.PathLike[str]], fresh: bool) -> BuildReport:
    """The body of :func:`build_library` on an open index (*fresh*: it replaces a damaged one,
    so the derived files beside it are rewritten even if the folder holds no agreement)."""
    if fresh:
        _set_meta(conn, "stale", "1")
        conn.commit()
    if config is not None:
        old = _meta(conn, "variant_config")
        new = json.dumps([config.metric, config.linkage, config.cutoff, config.max_items])
        if old != new:
            _set_meta(conn, "variant_config", new)
            conn.execute("DELETE FROM bucket_state")
            conn.execute("INSERT OR IGNORE INTO dirty(bucket) SELECT DISTINCT bucket FROM provisions")
            _set_meta(conn, "stale", "1")
    files = _scan(root_p, exclude=[*exclude, db])
    report = _update_files(conn, files, progress=progress, cancel=cancel, workers=workers)
    changed = (report.read > 0 or report.removed > 0 or _meta(conn, "stale") == "1"
               or _meta(conn, "derived") != DERIVED_FORMAT)
    cancelled = report.cancelled
    if changed and not cancelled:
        _set_meta(conn, "stale", "1")
        conn.commit()
        cancelled = not _refresh_derived(conn, db.parent, cancel=cancel, vocabulary=vocabulary)
        if not cancelled:
            _set_meta(conn, "stale", "0")
            _set_meta(conn, "generation", str(int(_meta(conn, "generation") or 0) + 1))
            conn.commit()
    elif changed:
        _set_meta(conn, "stale", "1")
        conn.commit()
    _set_meta(conn, "root", str(root_p.resolve()))
    conn.commit()
    documents = conn.execute("SELECT COUNT(*) FROM documents").fetchone()[0]
    failures = tuple(Failure(p, m) for p, m in
                     conn.execute("SELECT path, problem FROM failures ORDER BY path"))
    return BuildReport(str(root_p), str(db), report.files, report.read, report.unchanged,
                       report.removed, documents, failures, cancelled)


def _update_files(conn: sqlite3.Connection, files: Sequence[_FileStat], *, progress: Progress | None,
                  cancel: Cancel | Any | None, workers: int) -> BuildReport:
    known = {p: (i, h, s, m) for i, p, h, s, m in
             conn.execute("SELECT id, path, sha256, size, mtime_ns FROM documents")}
    failed = {p: (h, s, m) for p, h, s, m in
              conn.execute("SELECT path, sha256, size, mtime_ns FROM failures")}
    on_disk = {f.rel for f in files}
    removed = 0
    for path, (doc_id, *_rest) in known.items():
        if path not in on_disk:
            _mark_dirty(conn, doc_id)
            conn.execute("DELETE FROM documents WHERE id = ?", (doc_id,))
            removed += 1
    for path in failed:
        if path not in on_disk:
            conn.execute("DELETE FROM failures WHERE path = ?", (path,))
    conn.commit()

    total = len(files)
    done = 0
    unchanged = 0
    to_read: list[_FileStat] = []
    for f in files:
        if _cancelled(cancel):
            return BuildReport("", "", total, 0, unchanged, removed, 0, (), True)
        prev = known.get(f.rel)
        prev_fail = failed.get(f.rel)
        if prev is not None and (prev[2], prev[3]) == (f.size, f.mtime_ns):
            same = True
        elif prev_fail is not None and (prev_fail[1], prev_fail[2]) == (f.size, f.mtime_ns):
            same = True
        elif prev is not None or (prev_fail is not None and prev_fail[0]):
            try:
                digest = file_sha256(f.path)
            except OSError:
                digest = None
            same = digest is not None and digest == (prev[1] if prev is not None else prev_fail[0])
            if same:
                table = "documents" if prev is not None else "failures"
                conn.execute(f"UPDATE {table} SET size = ?, mtime_ns = ? WHERE path = ?",
                             (f.size, f.mtime_ns, f.rel))
        else:
            same = False
        if same:
            unchanged += 1
            done += 1
            if progress is not None:
                progress(done, total, f.rel)
        else:
            to_read.append(f)
    conn.commit()

    read = 0
    cancelled = False
    results = _read_many([f.path for f in to_read], workers=workers)
    try:
        for f, res in zip(to_read, results):
            _store(conn, f, res)
            read += 1
            done += 1
            if read % 50 == 0:
                conn.commit()
            if progress is not None:
                progress(done, total, f.rel)
            if _cancelled(cancel):
                cancelled = True
                break
    finally:
        close = getattr(results, "close", None)
        if close is not None:
            close()
        conn.commit()
    return BuildReport("", "", total, read, unchanged, removed, 0, (), cancelled)


def _store(conn: sqlite3.Connection, f: _FileStat, res: _Extract | _Problem) -> None:
    previous = conn.execute("SELECT id FROM documents WHERE path = ?", (f.rel,)).fetchone()
    if previous is not None:
        _mark_dirty(conn, previous[0])
    conn.execute("DELETE FROM documents WHERE path = ?", (f.rel,))
    conn.execute("DELETE FROM failures WHERE path = ?", (f.rel,))
    if isinstance(res, _Problem):
        conn.execute("INSERT INTO failures(path, sha256, size, mtime_ns, problem) VALUES(?,?,?,?,?)",
                     (f.rel, res.sha256, f.size, f.mtime_ns, res.problem))
        return
    cur = conn.execute(
        "INSERT INTO documents(path, sha256, size, mtime_ns, title, parties, provisions) "
        "VALUES(?,?,?,?,?,?,?)",
        (f.rel, res.sha256, f.size, f.mtime_ns, res.title, json.dumps(list(res.parties)),
         len(res.provisions)))
    doc_id = cur.lastrowid
    conn.executemany(
        "INSERT INTO provisions(document_id, ordinal, pid, kind, number, heading, level, parent, "
        "text, clause_type, type_source, bucket) VALUES(?,?,?,?,?,?,?,?,?,?,?,?)",
        [(doc_id, i, pid, kind, number, heading, level, parent, text, ctype, source,
          bucket_of(ctype, kind))
         for i, (pid, kind, number, heading, level, parent, text, ctype, source)
         in enumerate(res.provisions)])
    conn.executemany("INSERT INTO terms(document_id, term, definition, provision, uses) VALUES(?,?,?,?,?)",
                     [(doc_id, *t) for t in res.terms])
    _mark_dirty(conn, doc_id)


# ----------------------------------------------------------------------------------------
# Derived data
# ----------------------------------------------------------------------------------------


def _doc_replacer(terms: Sequence[str], aliases: Mapping[str, str]) -> TermReplacer:
    names = {}
    for t in terms:
        name = aliases.get(t, t)
        names[t] = canonical_role(name) or name
    return TermReplacer(names)


def _refresh_derived(conn: sqlite3.Connection, folder: Path, *, cancel: Cancel | Any | None,
                     vocabulary: bool) -> bool:
    """Refresh what is computed from the documents, only where something changed (the module
    docstring).  False when cancelled: what is done is kept, the rest stays marked."""
    _upgrade_derived(conn, folder)
    aliases = _refresh_aliases(conn)
    normalised = _normalise_pending(conn, aliases, cancel=cancel)
    if normalised is None or _cancelled(cancel):
        return False
    _retype_by_neighbours(conn, folder, normalised)
    conn.commit()
    if _cancelled(cancel):
        return False
    training = _start_vocabulary(conn, folder, aliases) if vocabulary else None
    try:
        done = _refresh_variants(conn, folder, cancel=cancel)
    except BaseException:
        if training is not None:
            training.stop()
        raise
    if training is not None:
        if done:
            training.finish(conn)
        else:
            training.stop()
    return done


def _upgrade_derived(conn: sqlite3.Connection, folder: Path) -> None:
    """An index whose derived files have an earlier layout (or none) gets all of them anew."""
    if _meta(conn, "derived") == DERIVED_FORMAT:
        return
    conn.execute("DELETE FROM bucket_state")
    conn.execute("INSERT OR IGNORE INTO dirty(bucket) SELECT DISTINCT bucket FROM provisions")
    conn.execute("DELETE FROM meta WHERE key IN ('neighbour_examples', 'vocabulary')")
    try:
        os.unlink(folder / CACHE_FILENAME)  # the earlier single frequency cache
    except FileNotFoundError:
        pass
    _set_meta(conn, "derived", DERIVED_FORMAT)
    conn.commit()


def _mark_dirty(conn: sqlite3.Connection, document_id: int) -> None:
    """The buckets of a document's provisions need their variants and cache refreshed."""
    conn.execute("INSERT OR IGNORE INTO dirty(bucket) SELECT DISTINCT bucket FROM provisions "
                 "WHERE document_id = ?", (document_id,))


def _refresh_aliases(conn: sqlite3.Connection) -> dict[str, str]:
    """Aliases between the documents' defined terms; when they change, every document is
    normalised again and every bucket refreshed."""
    aliases = learn_aliases(conn.execute("SELECT document_id, term, definition FROM terms"))
    encoded = json.dumps(aliases, sort_keys=True)
    if _meta(conn, "aliases") != encoded:
        conn.execute("UPDATE documents SET normalised = 0")
        conn.execute("INSERT OR IGNORE INTO dirty(bucket) SELECT DISTINCT bucket FROM provisions")
        _set_meta(conn, "aliases", encoded)
    return aliases


def _normalise_pending(conn: sqlite3.Connection, aliases: Mapping[str, str], *,
                       cancel: Cancel | Any | None) -> list[int] | None:
    """Normalised wordings of the documents not yet normalised; their ids, or None when
    cancelled."""
    todo = [r[0] for r in conn.execute("SELECT id FROM documents WHERE normalised = 0 ORDER BY id")]
    for n, doc_id in enumerate(todo):
        if n % 25 == 0 and _cancelled(cancel):
            conn.commit()
            return None
        terms = [r[0] for r in conn.execute("SELECT term FROM terms WHERE document_id = ?", (doc_id,))]
        replacer = _doc_replacer(terms, aliases)
        rows = []
        for pid, heading, text in conn.execute(
                "SELECT id, heading, text FROM provisions WHERE document_id = ?", (doc_id,)):
            norm = " ".join(normalised_wording(text, heading, terms=replacer))
            rows.append((norm, _norm_hash(norm), pid))
        # Shingles are not stored (the column stays NULL): the bucket caches hold them, made
        # once per distinct wording from its normalised text (wording_shingles).
        conn.executemany("UPDATE provisions SET norm = ?, norm_hash = ?, shingles = NULL WHERE id = ?", rows)
        conn.execute("UPDATE documents SET normalised = 1 WHERE id = ?", (doc_id,))
    conn.commit()
    return todo


def _neighbour_examples(conn: sqlite3.Connection) -> tuple[list[tuple[str, str]], str]:
    """The neighbour classifier's examples and their fingerprint: per clause type, the first
    MAX_EXAMPLES_PER_TYPE distinct wordings typed by heading or parent, documents taken in the
    order of their content hashes (SHA-256) and each document's provisions in order.  That
    order is a fixed pseudo-random sample of the library, unrelated to file names, and once a
    type has its examples, an agreement added, changed or removed further down the order
    leaves them as they are -- the classifier need not be refitted, nor its types redone."""
    from .clausetypes import MAX_EXAMPLES_PER_TYPE

    chosen: dict[str, dict[str, int]] = defaultdict(dict)
    # Index-only on provisions (provisions_typed); a document's row ids follow its order.
    for tid, h, pid in conn.execute(
            "SELECT p.clause_type, p.norm_hash, p.id FROM provisions p JOIN documents d ON d.id = p.document_id "
            "WHERE p.type_source IN ('heading', 'parent') AND p.clause_type IS NOT NULL AND p.norm_hash != ? "
            "ORDER BY d.sha256, d.path, p.id", (_norm_hash(""),)):
        per_type = chosen[tid]
        if len(per_type) < MAX_EXAMPLES_PER_TYPE and h not in per_type:
            per_type[h] = pid
    norms = {}
    for q, chunk in _id_batches([pid for per_type in chosen.values() for pid in per_type.values()]):
        norms.update(conn.execute(f"SELECT id, norm FROM provisions WHERE id IN ({q})", chunk))
    digest = hashlib.blake2b(digest_size=16)
    examples: list[tuple[str, str]] = []
    for tid in sorted(chosen):
        for h in sorted(chosen[tid]):
            examples.append((norms[chosen[tid][h]], tid))
            digest.update(f"{tid}:{h}\n".encode())
    return examples, digest.hexdigest()


def _retype_by_neighbours(conn: sqlite3.Connection, folder: Path, normalised: Sequence[int]) -> None:
    """Type unheaded provisions by their library neighbours.  The classifier is refitted only
    when its examples changed; then every neighbour-typed provision is typed again, else only
    those of the documents just normalised (the same classifier gives the same types)."""
    examples, fingerprint = _neighbour_examples(conn)
    path = folder / NEIGHBOURS_FILENAME
    sql = "SELECT id, kind, norm, clause_type, bucket FROM provisions WHERE type_source IN ('neighbour', 'none')"
    if _meta(conn, "neighbour_examples") == fingerprint and path.exists():
        clf = NeighbourClassifier.from_npz_bytes(path.read_bytes())
        rows = [r for q, chunk in _id_batches(normalised)
                for r in conn.execute(f"{sql} AND document_id IN ({q})", chunk)]
    else:
        clf = NeighbourClassifier.fit(examples, taxonomy=load_taxonomy())
        _write_private(path, clf.to_npz_bytes())
        _set_meta(conn, "neighbour_examples", fingerprint)
        rows = conn.execute(sql).fetchall()
    if not rows:
        return
    preds = clf.predict([r[2] or "" for r in rows])
    updates = [(tid, "neighbour" if tid else "none", bucket_of(tid, kind), pid, old_bucket)
               for (pid, kind, _norm, old, old_bucket), (tid, _s) in zip(rows, preds) if tid != old]
    conn.executemany("INSERT OR IGNORE INTO dirty(bucket) VALUES(?)",
                     [(b,) for u in updates for b in (u[2], u[4])])
    conn.executemany("UPDATE provisions SET clause_type = ?, type_source = ?, bucket = ? WHERE id = ?",
                     [u[:4] for u in updates])


def _variant_config(conn: sqlite3.Connection) -> VariantConfig:
    raw = _meta(conn, "variant_config")
    if raw is None:
        return VariantConfig()
    metric, linkage, cutoff, max_items = json.loads(raw)
    return VariantConfig(metric=metric, linkage=linkage, cutoff=float(cutoff), max_items=int(max_items))


def _bucket_rows(conn: sqlite3.Connection, bucket: str) -> list[tuple[str, int, bytes, str, int]]:
    """(norm_hash, provisions, shingles, norm, sample provision id) per distinct wording,
    most frequent first, then by hash."""
    return conn.execute(
        "SELECT norm_hash, COUNT(*) AS n, shingles, norm, MIN(id) FROM provisions WHERE bucket = ? "
        "GROUP BY norm_hash ORDER BY n DESC, norm_hash", (bucket,)).fetchall()


def _str_batches(values: Sequence[str]) -> Iterator[tuple[str, list[str]]]:
    for start in range(0, len(values), _IN_BATCH):
        chunk = list(values[start:start + _IN_BATCH])
        yield ",".join("?" * len(chunk)), chunk


@dataclass(frozen=True, slots=True)
class _Wordings:
    """A bucket's distinct wordings in its order (most provisions first, then by hash)."""

    hashes: list[str]
    count: np.ndarray
    sample: np.ndarray  # per wording, its provision in the first document by path
    docptr: np.ndarray  # the documents using wording i: docs[docptr[i]:docptr[i + 1]], ascending
    docs: np.ndarray


def _document_ranks(conn: sqlite3.Connection) -> tuple[np.ndarray, np.ndarray]:
    """(document ids sorted, each one's rank by path) for :func:`_bucket_wordings`."""
    ids = np.array([i for (i,) in conn.execute("SELECT id FROM documents ORDER BY path")], dtype=np.int64)
    order = np.argsort(ids)
    return ids[order], order.astype(np.int64)


def _bucket_wordings(conn: sqlite3.Connection, bucket: str,
                     ranks: tuple[np.ndarray, np.ndarray]) -> _Wordings:
    """Two index-only passes over the bucket's provisions in the order of index
    ``provisions_wording`` (the wordings with their counts, then every provision's document,
    position and id), then array work.  The sample of a wording is its provision in the
    document first by path (first by position there): what a full build, which stores the
    documents in path order, finds as the lowest row id."""
    groups = conn.execute("SELECT norm_hash, COUNT(*) FROM provisions WHERE bucket = ? GROUP BY norm_hash "
                          "ORDER BY norm_hash", (bucket,)).fetchall()
    if not groups:
        return _Wordings([], np.zeros(0, np.int32), np.zeros(0, np.int64), np.zeros(1, np.int64),
                         np.zeros(0, np.int64))
    places = np.array(conn.execute("SELECT document_id, ordinal, id FROM provisions WHERE bucket = ? "
                                   "ORDER BY norm_hash, document_id, ordinal", (bucket,)).fetchall(), dtype=np.int64)
    count = np.array([g[1] for g in groups], dtype=np.int64)
    inv = np.repeat(np.arange(count.size), count)
    doc, ordinal, pid = places[:, 0], places[:, 1], places[:, 2]
    rank = ranks[1][np.searchsorted(ranks[0], doc)]
    by_place = np.lexsort((ordinal, rank, inv))
    sample = pid[by_place[np.r_[0, np.cumsum(count)[:-1]]]]
    new_pair = np.r_[True, (inv[1:] != inv[:-1]) | (doc[1:] != doc[:-1])]  # rows come sorted by (wording, document)
    docs, owner = doc[new_pair], inv[new_pair]
    cuts = np.searchsorted(owner, np.arange(count.size + 1))
    order = np.lexsort((np.arange(count.size), -count))  # most provisions first, then by hash
    docptr = np.r_[0, np.cumsum(np.diff(cuts)[order])].astype(np.int64)
    return _Wordings([groups[i][0] for i in order.tolist()], count[order].astype(np.int32), sample[order],
                     docptr, docs[_ragged(cuts, order)])


def _new_wording_sets(conn: sqlite3.Connection, bucket: str,
                      hashes: Sequence[str]) -> dict[str, tuple[np.ndarray, np.ndarray]]:
    """``{hash: (shingle hashes, word hashes)}`` of wordings the bucket's cache lacks."""
    out: dict[str, tuple[np.ndarray, np.ndarray]] = {}
    for q, chunk in _str_batches(hashes):
        for h, blob, norm in conn.execute(
                f"SELECT norm_hash, shingles, norm FROM provisions WHERE bucket = ? AND norm_hash IN ({q}) "
                "GROUP BY norm_hash", (bucket, *chunk)):
            tokens = (norm or "").split()
            words = np.unique(np.fromiter((_word_hash(w) for w in tokens), dtype=np.uint64, count=len(tokens)))
            out[h] = (wording_shingles(blob, norm), words)
    return out


def wording_shingles(blob: bytes | None, norm: str | None) -> np.ndarray:
    """A wording's shingle hashes: the stored ones (indexes of earlier versions), else made
    from its normalised text (its tokens joined by single spaces; no token holds a space)."""
    if blob is not None:
        return np.frombuffer(blob, dtype=np.uint64)
    return shingle_hashes((norm or "").split())


def _bucket_file(folder: Path, bucket: str) -> Path:
    name = hashlib.blake2b(bucket.encode("utf-8"), digest_size=12).hexdigest()
    return folder / BUCKETS_DIRNAME / f"{name}.npz"


def _read_bucket(path: Path) -> BucketArrays | None:
    try:
        return BucketArrays.from_npz_bytes(path.read_bytes())
    except (OSError, ValueError, KeyError, EOFError):  # missing or not a file this code wrote
        return None


def _refresh_variants(conn: sqlite3.Connection, folder: Path, *, cancel: Cancel | Any | None) -> bool:
    """Variants and frequency cache of every bucket marked dirty.  False when cancelled.

    A bucket's file is written before the transaction that clears its mark commits: after a
    crash between the two the bucket is still marked and its next refresh starts from the
    file, whose wordings are the current ones, so nothing is lost or counted twice."""
    config = _variant_config(conn)
    _private_dir(folder / BUCKETS_DIRNAME)
    ranks = _document_ranks(conn)
    # Set while a variants step runs: when found set, the last one stopped between writing a
    # cache file and committing, so this one reads the stored variants from the table.
    trusted = _meta(conn, "variants_running") != "1"
    _set_meta(conn, "variants_running", "1")
    conn.commit()
    try:
        for (bucket,) in conn.execute("SELECT bucket FROM dirty ORDER BY bucket").fetchall():
            if _cancelled(cancel):
                return False
            _refresh_bucket(conn, folder, bucket, config, ranks, trusted=trusted)
            conn.execute("DELETE FROM dirty WHERE bucket = ?", (bucket,))
        _set_meta(conn, "variants_running", "0")
    finally:
        conn.commit()
    return True


def _refresh_bucket(conn: sqlite3.Connection, folder: Path, bucket: str, config: VariantConfig,
                    ranks: tuple[np.ndarray, np.ndarray], *, trusted: bool) -> None:
    """One bucket's variants and cache from its previous cache and its changed wordings."""
    path = _bucket_file(folder, bucket)
    words = _bucket_wordings(conn, bucket, ranks)
    if not words.hashes:
        conn.execute("DELETE FROM variants WHERE bucket = ?", (bucket,))
        conn.execute("DELETE FROM bucket_state WHERE bucket = ?", (bucket,))
        try:
            os.unlink(path)
        except FileNotFoundError:
            pass
        return
    old = _read_bucket(path)
    take = rows_of(old.hashes if old is not None else np.zeros(0, "S32"), np.array(words.hashes, dtype="S32"))
    fresh = [words.hashes[i] for i in np.flatnonzero(take < 0).tolist()]
    arrays = assemble(old, hashes=words.hashes, count=words.count, sample=words.sample, docptr=words.docptr,
                      docs=words.docs, new_sets=_new_wording_sets(conn, bucket, fresh))
    gone = (old.rows if old is not None else 0) - (len(words.hashes) - len(fresh))
    state = conn.execute("SELECT clustered, drift FROM bucket_state WHERE bucket = ?", (bucket,)).fetchone()
    # A cache file is this index's own only when the index has a state for its bucket (a
    # rebuilt, upgraded or re-configured index has none): otherwise only its content-derived
    # arrays (wordings' shingles and words) are reused, never its variants.
    trusted = trusted and old is not None and state is not None
    labels, full = _cluster_bucket(conn, bucket, arrays, old if trusted else None, state, gone=gone, config=config)
    stored = _stored_figures(conn, bucket, old, trusted)
    variant = _write_variants(conn, bucket, arrays, labels, stored=stored, trusted=trusted)
    arrays = replace(arrays, variant=variant)
    _write_private(path, (compact(arrays) if full else arrays).to_npz_bytes())


def _cluster_bucket(conn: sqlite3.Connection, bucket: str, arrays: BucketArrays, old: BucketArrays | None,
                    state: tuple[int, int] | None, *, gone: int, config: VariantConfig) -> tuple[np.ndarray, bool]:
    """Per-wording labels (a kept variant's id, else a label no variant of the bucket has)
    and whether they come from a full clustering rather than from
    :func:`~.variants.regroup`.  Full when the bucket is new, small
    (ALWAYS_FULL_WORDINGS) or has drifted (CLUSTER_DRIFT)."""
    fresh = arrays.variant < 0
    changes = int(fresh.sum()) + gone
    labels: np.ndarray | None = None
    if old is not None and state is not None and arrays.rows > ALWAYS_FULL_WORDINGS \
            and state[1] + changes <= CLUSTER_DRIFT * state[0]:
        broken = np.unique(old.variant[rows_of(arrays.hashes, old.hashes) < 0]).tolist()
        try:
            labels = regroup(arrays.shingle_matrix(), arrays.sizes.astype(np.int64), arrays.variant,
                             fresh=fresh, broken=broken, config=config)
        except RegroupTooLarge:
            labels = None
    if labels is not None:
        conn.execute("UPDATE bucket_state SET drift = drift + ? WHERE bucket = ?", (changes, bucket))
        return labels, False
    labels = _keep_ids(cluster_wordings(arrays.shingle_sets(), config=config), arrays.variant)
    conn.execute("INSERT INTO bucket_state(bucket, clustered, drift) VALUES(?, ?, 0) ON CONFLICT(bucket) "
                 "DO UPDATE SET clustered = excluded.clustered, drift = 0", (bucket, arrays.rows))
    return labels, True


def _keep_ids(clusters: np.ndarray, previous: np.ndarray) -> np.ndarray:
    """Labels for a full clustering's *clusters* (0..k-1): a cluster whose wordings are all
    and only the current wordings of one earlier variant (*previous*: variant ids, -1 for
    new wordings) keeps that variant's id, so its provisions need no update; the others get
    -1, -2, ... (new variants)."""
    out = np.empty(clusters.size, dtype=np.int64)
    prev_sizes = dict(zip(*np.unique(previous, return_counts=True)))
    for k in range(int(clusters.max()) + 1 if clusters.size else 0):
        members = clusters == k
        ids = np.unique(previous[members])
        same = ids.size == 1 and ids[0] >= 0 and prev_sizes[ids[0]] == int(members.sum())
        out[members] = int(ids[0]) if same else -(k + 1)
    return out


_FIGURES = ("ordinal", "wordings", "provisions", "documents", "sample")  # the columns of table variants


def _variant_figures(arrays: BucketArrays, labels: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(distinct labels sorted, each row's index into them, per label the _FIGURES: ordinal --
    most provisions first, ties by first wording in the bucket's order -- wordings,
    provisions, documents and the sample of its first wording)."""
    uniq, inv = np.unique(labels, return_inverse=True)
    n = arrays.rows
    first = np.full(uniq.size, n, dtype=np.int64)
    np.minimum.at(first, inv, np.arange(n))
    provisions = np.bincount(inv, weights=arrays.count, minlength=uniq.size).astype(np.int64)
    row_of_doc = np.repeat(np.arange(n), np.diff(arrays.docptr))
    span = int(arrays.docs.max()) + 1 if arrays.docs.size else 1
    pairs = np.unique(inv[row_of_doc].astype(np.int64) * span + arrays.docs)
    documents = np.bincount(pairs // span, minlength=uniq.size)
    ordinal = np.empty(uniq.size, dtype=np.int64)
    ordinal[np.lexsort((first, -provisions))] = np.arange(1, uniq.size + 1)
    figures = np.column_stack([ordinal, np.bincount(inv, minlength=uniq.size), provisions, documents,
                               arrays.sample[first]]).astype(np.int64)
    return uniq, inv, figures


def _stored_figures(conn: sqlite3.Connection, bucket: str, old: BucketArrays | None,
                    trusted: bool) -> tuple[np.ndarray, np.ndarray]:
    """(variant ids sorted, their _FIGURES) as table variants holds them: computed from the
    bucket's previous cache when it is *trusted* (every variants step that wrote the cache
    committed the same figures), else read from the table."""
    if trusted and old is not None and old.rows and (old.variant >= 0).all():
        ids, _, figures = _variant_figures(old, old.variant)
        return ids, figures
    rows = conn.execute(f"SELECT id, {', '.join(_FIGURES)} FROM variants WHERE bucket = ? ORDER BY id",
                        (bucket,)).fetchall()
    table = np.array(rows, dtype=np.int64).reshape(len(rows), 1 + len(_FIGURES))
    return table[:, 0], table[:, 1:]


def _write_variants(conn: sqlite3.Connection, bucket: str, arrays: BucketArrays, labels: np.ndarray, *,
                    stored: tuple[np.ndarray, np.ndarray], trusted: bool) -> np.ndarray:
    """Store the bucket's variants -- a label that is a *stored* variant id keeps it, other
    labels become new variants; only changed rows are written -- and its provisions' variant
    ids; returns the variant id of every wording."""
    uniq, inv, figures = _variant_figures(arrays, labels)
    st_ids, st_figures = stored
    pos = np.minimum(np.searchsorted(st_ids, uniq), max(st_ids.size - 1, 0))
    kept = (st_ids[pos] == uniq) if st_ids.size else np.zeros(uniq.size, bool)
    changed = kept & (st_figures[pos] != figures).any(axis=1) if st_ids.size else kept
    conn.executemany(f"UPDATE variants SET {' = ?, '.join(_FIGURES)} = ? WHERE id = ?",
                     [(*figures[k].tolist(), int(uniq[k])) for k in np.flatnonzero(changed).tolist()])
    conn.executemany("DELETE FROM variants WHERE id = ?",
                     [(int(v),) for v in st_ids[~np.isin(st_ids, uniq[kept])].tolist()])
    ids = uniq.copy()
    for k in np.flatnonzero(~kept).tolist():
        ids[k] = conn.execute(f"INSERT INTO variants(bucket, {', '.join(_FIGURES)}) VALUES(?,?,?,?,?,?)",
                              (bucket, *figures[k].tolist())).lastrowid
    variant = ids[inv]
    unset = np.array([h.encode("ascii") for (h,) in conn.execute(
        "SELECT DISTINCT norm_hash FROM provisions WHERE bucket = ? AND variant_id IS NULL", (bucket,))], dtype="S32")
    todo = np.ones(arrays.rows, bool) if not trusted else \
        (variant != arrays.variant) | np.isin(arrays.hashes, unset)
    conn.executemany("UPDATE provisions SET variant_id = ? WHERE bucket = ? AND norm_hash = ? "
                     "AND (variant_id IS NULL OR variant_id != ?)",
                     [(int(variant[i]), bucket, arrays.hashes[i].decode("ascii"), int(variant[i]))
                      for i in np.flatnonzero(todo).tolist()])
    if conn.execute("SELECT 1 FROM labels WHERE bucket = ? LIMIT 1", (bucket,)).fetchone():
        for vid in set(ids.tolist()):
            _update_position(conn, vid)
    return variant


def _update_position(conn: sqlite3.Connection, variant_id: int) -> str | None:
    """A variant's position: the label most of its labelled wordings carry (ties: the most
    recent label)."""
    rows = conn.execute(
        "SELECT l.position, COUNT(*), MAX(l.seq) FROM labels l JOIN "
        "(SELECT DISTINCT bucket, norm_hash FROM provisions WHERE variant_id = ?) p "
        "ON l.bucket = p.bucket AND l.norm_hash = p.norm_hash GROUP BY l.position",
        (variant_id,)).fetchall()
    position = min(rows, key=lambda r: (-r[1], -r[2]))[0] if rows else None
    conn.execute("UPDATE variants SET position = ? WHERE id = ?", (position, variant_id))
    return position


# ----------------------------------------------------------------------------------------
# The vocabulary model
# ----------------------------------------------------------------------------------------


def _training_documents(conn: sqlite3.Connection,
                        fingerprints: list[str]) -> Iterator[tuple[list[str], list[tuple[str, str]]]]:
    """Documents in path order for :func:`~.vocab.training_sentences`; appends each one's
    fingerprint (path and SHA-256) to *fingerprints* as it is consumed."""
    for doc_id, path, sha in conn.execute("SELECT id, path, sha256 FROM documents ORDER BY path").fetchall():
        fingerprints.append(f"{path}\x00{sha}")
        terms = [t for (t,) in conn.execute("SELECT term FROM terms WHERE document_id = ?", (doc_id,))]
        yield terms, conn.execute("SELECT text, norm_hash FROM provisions WHERE document_id = ? "
                                  "ORDER BY ordinal", (doc_id,)).fetchall()


class _Training:
    """A vocabulary training decided by :func:`_start_vocabulary`: in a worker process (large
    corpus: it runs beside the clustering, on the other core) or here at :meth:`finish`."""

    def __init__(self, folder: Path, sentences: list[list[str]], state: dict[str, Any]) -> None:
        self.path = folder / VOCAB_FILENAME
        self.sentences = sentences
        self.state = state
        self._pool: Any = None
        self._job: Any = None
        if state["words"] >= PARALLEL_TRAINING_MIN_WORDS:
            from .vocab import train_model

            self._pool = multiprocessing.get_context("spawn").Pool(1)
            self._job = self._pool.apply_async(train_model, (sentences,))

    def finish(self, conn: sqlite3.Connection) -> None:
        from .vocab import train_model

        if self._job is not None:
            model = self._job.get()
            self.stop()
        else:
            model = train_model(self.sentences)
        if model is None:
            try:
                os.unlink(self.path)
            except FileNotFoundError:
                pass
        else:
            _write_private(self.path, model.to_npz_bytes())
        _set_meta(conn, "vocabulary", json.dumps(self.state))
        conn.commit()

    def stop(self) -> None:
        if self._pool is not None:
            self._pool.terminate()
            self._pool.join()
            self._pool = None


def _start_vocabulary(conn: sqlite3.Connection, folder: Path, aliases: Mapping[str, str]) -> _Training | None:
    """A :class:`_Training` when the model must be (re)trained (:func:`~.vocab.needs_training`:
    its corpus drifted), else None: the model on disk is the one this library gives."""
    from .vocab import (
        MAX_TRAINING_WORDS,
        needs_training,
        training_sentences,
        vocabulary_drift,
    )

    raw = _meta(conn, "vocabulary")
    state = json.loads(raw) if raw else None
    alias_key = hashlib.blake2b(json.dumps(aliases, sort_keys=True).encode(), digest_size=16).hexdigest()
    total = int(conn.execute("SELECT COUNT(*) FROM documents").fetchone()[0])
    if state is None or state.get("aliases") != alias_key:
        drift = 1.0
    else:
        trained = state["documents"]
        current = [f"{p}\x00{h}" for p, h in conn.execute(
            "SELECT path, sha256 FROM documents ORDER BY path LIMIT ?", (len(trained),))]
        drift = vocabulary_drift(trained=trained, current=current, exhausted=state["exhausted"], documents=total)
    if not needs_training(drift=drift, words=state["words"] if state else 0, has_model=state is not None):
        return None
    fingerprints: list[str] = []
    sentences, used, words = training_sentences(_training_documents(conn, fingerprints))
    new_state = {"documents": fingerprints[:used], "words": words, "exhausted": words < MAX_TRAINING_WORDS,
                 "aliases": alias_key}
    return _Training(folder, sentences, new_state)


# ----------------------------------------------------------------------------------------
# Reading the index
# ----------------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class BucketIndex:
    """One bucket's distinct wordings as sparse shingle and word incidence matrices."""

    name: str
    cols: np.ndarray  # sorted shingle hashes
    shingles: Any  # scipy.sparse.csr_matrix, rows = distinct wordings
    sizes: np.ndarray  # shingles per row
    wcols: np.ndarray
    words: Any  # csr_matrix of distinct words per row
    count: np.ndarray  # provisions per row
    sample: np.ndarray  # one provision id per row
    variant: np.ndarray  # variant id per row (-1 if none)
    docptr: np.ndarray
    docs: np.ndarray
    document_count: int = 0  # distinct documents with a provision in the bucket
    #: Column-major copies made when first needed (a review asks word questions of few buckets).
    _columns: dict[str, Any] = field(default_factory=dict, compare=False, repr=False)

    @property
    def rows(self) -> int:
        return int(self.sizes.size)

    def documents_of(self, row_mask: np.ndarray) -> set[int]:
        rows = np.flatnonzero(row_mask)
        return set(self.docs[_ragged(self.docptr, rows)].tolist())

    def all_documents(self) -> set[int]:
        return set(self.docs.tolist())

    def _by_column(self, key: str) -> Any:
        m = self._columns.get(key)
        if m is None:
            m = self._columns[key] = (self.shingles if key == "s" else self.words).tocsc()
        return m

    def intersections(self, hashes: np.ndarray) -> np.ndarray:
        """|row shingles & hashes| for every row (hashes: sorted unique uint64)."""
        return self._hits(self.cols, self._by_column("s"), hashes)

    def word_hits(self, hashes: np.ndarray) -> np.ndarray:
        return self._hits(self.wcols, self._by_column("w"), hashes)

    @staticmethod
    def _hits(cols: np.ndarray, matrix: Any, hashes: np.ndarray) -> np.ndarray:
        if hashes.size == 0 or cols.size == 0:
            return np.zeros(matrix.shape[0], dtype=np.int64)
        pos = np.searchsorted(cols, hashes)
        ok = pos < cols.size
        pos = pos[ok]
        pos = pos[cols[pos] == hashes[ok]]
        if pos.size == 0:
            return np.zeros(matrix.shape[0], dtype=np.int64)
        # The rows of the chosen columns of the CSC matrix, counted (no sparse slicing).
        return np.bincount(matrix.indices[_ragged(matrix.indptr, pos)], minlength=matrix.shape[0]).astype(np.int64)


def _ragged(indptr: np.ndarray, picks: np.ndarray) -> np.ndarray:
    """Positions ``indptr[p]:indptr[p + 1]`` for every p of *picks*, concatenated."""
    starts = indptr[picks].astype(np.int64)
    lengths = indptr[picks + 1].astype(np.int64) - starts
    total = int(lengths.sum())
    if total == 0:
        return np.zeros(0, dtype=np.int64)
    offsets = np.repeat(starts - np.cumsum(lengths) + lengths, lengths)
    return offsets + np.arange(total, dtype=np.int64)


class Library:
    """An open precedent-set index (read side, plus the reviewer's labels).

    Open with :func:`open_library`; close with :meth:`close` or a ``with`` block.  Use it
    from one thread at a time.
    """

    def __init__(self, db_path: str | os.PathLike[str], *, root: str | os.PathLike[str] | None = None) -> None:
        self.db_path = Path(db_path)
        try:
            self.conn = _connect(self.db_path, create=False)
        except _Unusable as err:
            raise CounterdraftError(f"not a usable index database ({err.problem}); 'counterdraft library "
                                    "build' sets it aside and rebuilds it", path=str(self.db_path)) from None
        stored_root = _meta(self.conn, "root")
        self.root = Path(root) if root is not None else (Path(stored_root) if stored_root else self.db_path.parent)
        self._buckets: dict[str, BucketIndex | None] = {}
        self._neighbours: NeighbourClassifier | None = None
        self._vocab: Any = None
        self._aliases: dict[str, str] | None = None
        #: The build report when :func:`open_library` refreshed the index, else None.
        self.report: BuildReport | None = None

    # -- context manager ------------------------------------------------------------------
    def __enter__(self) -> Library:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def close(self) -> None:
        self.conn.close()

    # -- facts ----------------------------------------------------------------------------
    @property
    def folder(self) -> Path:
        return self.db_path.parent

    @property
    def total(self) -> int:
        """Agreements in the index (readable files of the set's formats under the root)."""
        return int(self.conn.execute("SELECT COUNT(*) FROM documents").fetchone()[0])

    def documents(self) -> tuple[tuple[str, str], ...]:
        """(path relative to the root, SHA-256) of every agreement in the index."""
        return tuple((str(p), str(h)) for p, h in
                     self.conn.execute("SELECT path, sha256 FROM documents ORDER BY path"))

    @property
    def stale(self) -> bool:
        return _meta(self.conn, "stale") == "1"

    @property
    def config(self) -> VariantConfig:
        return _variant_config(self.conn)

    def failures(self) -> tuple[Failure, ...]:
        return tuple(Failure(p, m) for p, m in
                     self.conn.execute("SELECT path, problem FROM failures ORDER BY path"))

    def aliases(self) -> dict[str, str]:
        if self._aliases is None:
            raw = _meta(self.conn, "aliases")
            self._aliases = json.loads(raw) if raw else {}
        return self._aliases

    def neighbours(self) -> NeighbourClassifier | None:
        """The neighbour classifier fitted on the library (None before the first build)."""
        if self._neighbours is None:
            path = self.folder / NEIGHBOURS_FILENAME
            if path.exists():
                self._neighbours = NeighbourClassifier.from_npz_bytes(path.read_bytes())
        return self._neighbours

    @property
    def vocabulary(self):  # noqa: ANN201 - core.library.vocab.LibraryVocabulary | None
        """The library's vocabulary model (``VocabularyModel`` of the term mapper), or None."""
        if self._vocab is None:
            from .vocab import LibraryVocabulary

            path = self.folder / VOCAB_FILENAME
            self._vocab = LibraryVocabulary.load(path) if path.exists() else False
        return self._vocab or None

    def bucket_names(self) -> tuple[str, ...]:
        """The buckets (clause types, ``~kind``) that hold provisions, sorted."""
        return tuple(b for (b,) in self.conn.execute("SELECT bucket FROM bucket_state ORDER BY bucket"))

    def bucket(self, name: str) -> BucketIndex | None:
        """The frequency index of one bucket (clause type or ``~kind``), None if empty.  Read
        from the bucket's own cache file when first asked for (a review reads only the buckets
        its provisions fall in)."""
        if name in self._buckets:
            return self._buckets[name]
        a = _read_bucket(_bucket_file(self.folder, name))
        b = None
        if a is not None and a.rows:
            b = BucketIndex(name, a.cols, a.shingle_matrix(), a.sizes, a.wcols, a.word_matrix(),
                            a.count, a.sample, a.variant, a.docptr, a.docs, int(np.unique(a.docs).size))
        self._buckets[name] = b
        return b

    def documents_with(self, bucket: str) -> int:
        b = self.bucket(bucket)
        return 0 if b is None else b.document_count

    def document_paths(self, ids: Sequence[int]) -> dict[int, str]:
        out: dict[int, str] = {}
        for q, chunk in _id_batches(ids):
            out.update(self.conn.execute(f"SELECT id, path FROM documents WHERE id IN ({q})", chunk))
        return out

    def provision_refs(self, ids: Sequence[int]) -> dict[int, tuple[str, str]]:
        """``{provision row id: (document path, provision number/heading/id)}``."""
        out: dict[int, tuple[str, str]] = {}
        for q, chunk in _id_batches(ids):
            for pid, path, number, heading, local in self.conn.execute(
                    f"SELECT p.id, d.path, p.number, p.heading, p.pid FROM provisions p "
                    f"JOIN documents d ON d.id = p.document_id WHERE p.id IN ({q})", chunk):
                out[pid] = (path, number or heading or local)
        return out

    def _column(self, column: str, ids: Sequence[int]) -> dict[int, str]:
        out: dict[int, str] = {}
        for q, chunk in _id_batches(ids):
            out.update(self.conn.execute(f"SELECT id, {column} FROM provisions WHERE id IN ({q})", chunk))
        return out

    def norms(self, ids: Sequence[int]) -> dict[int, str]:
        """Normalised wordings of provision rows *ids*."""
        return self._column("norm", ids)

    def texts(self, ids: Sequence[int]) -> dict[int, str]:
        """Provision texts of provision rows *ids* (for display only; never logged)."""
        return self._column("text", ids)

    def term_replacer(self, provision_id: int) -> TermReplacer:
        """The term normaliser of the document holding provision row *provision_id*: its
        defined terms read through the library's aliases, as the index normalised it."""
        row = self.conn.execute("SELECT document_id FROM provisions WHERE id = ?", (int(provision_id),)).fetchone()
        terms = [] if row is None else [t for (t,) in self.conn.execute(
            "SELECT term FROM terms WHERE document_id = ?", (row[0],))]
        return _doc_replacer(terms, self.aliases())

    def variant_positions(self) -> dict[int, str]:
        return {v: p for v, p in self.conn.execute("SELECT id, position FROM variants WHERE position IS NOT NULL")}

    # -- variants and labels --------------------------------------------------------------
    def variants(self, *, bucket: str | None = None) -> list[VariantInfo]:
        sql = ("SELECT v.id, v.bucket, v.ordinal, v.wordings, v.provisions, v.documents, v.position, "
               "d.path, p.number, p.heading, p.pid, v.sample FROM variants v LEFT JOIN provisions p ON p.id = v.sample "
               "LEFT JOIN documents d ON d.id = p.document_id")
        args: tuple[Any, ...] = ()
        if bucket is not None:
            sql += " WHERE v.bucket = ?"
            args = (bucket,)
        sql += " ORDER BY v.bucket, v.ordinal"
        return [VariantInfo(vid, b, o, w, n, d, pos, path, number or heading or pid, sample)
                for vid, b, o, w, n, d, pos, path, number, heading, pid, sample
                in self.conn.execute(sql, args)]

    def variant_of(self, document: str, provision: str) -> int | None:
        """The variant of *provision* (number, heading or provision id) in *document* (path
        relative to the root)."""
        row = self.conn.execute(
            "SELECT p.variant_id FROM provisions p JOIN documents d ON d.id = p.document_id "
            "WHERE d.path = ? AND (p.number = ? OR p.pid = ? OR lower(p.heading) = lower(?)) "
            "ORDER BY p.ordinal LIMIT 1", (document, provision, provision, provision)).fetchone()
        return None if row is None else row[0]

    def label_variant(self, variant_id: int, position: str | None) -> int:
        """Give every wording of variant *variant_id* the reviewer's *position* (one of
        :data:`POSITIONS`; None removes the label).  Returns the number of wordings labelled."""
        if position is not None and position not in POSITIONS:
            raise CounterdraftError(f"position must be one of: {', '.join(POSITIONS)}")
        row = self.conn.execute("SELECT bucket FROM variants WHERE id = ?", (variant_id,)).fetchone()
        if row is None:
            raise CounterdraftError(f"no variant {variant_id} in the index (see 'counterdraft library stats')",
                                    path=str(self.db_path))
        bucket = row[0]
        hashes = [h for (h,) in self.conn.execute(
            "SELECT DISTINCT norm_hash FROM provisions WHERE variant_id = ?", (variant_id,))]
        if position is None:
            self.conn.executemany("DELETE FROM labels WHERE bucket = ? AND norm_hash = ?",
                                  [(bucket, h) for h in hashes])
        else:
            seq = int(self.conn.execute("SELECT COALESCE(MAX(seq), 0) FROM labels").fetchone()[0]) + 1
            self.conn.executemany(
                "INSERT INTO labels(bucket, norm_hash, position, seq) VALUES(?,?,?,?) "
                "ON CONFLICT(bucket, norm_hash) DO UPDATE SET position = excluded.position, seq = excluded.seq",
                [(bucket, h, position, seq) for h in hashes])
        _update_position(self.conn, variant_id)
        self.conn.commit()
        return len(hashes)


def open_library(root: str | os.PathLike[str] | None = None, *, db_path: str | os.PathLike[str] | None = None,
                 refresh: bool = True, progress: Progress | None = None, cancel: Cancel | Any | None = None,
                 workers: int = 2, exclude: Sequence[str | os.PathLike[str]] = ()) -> Library:
    """Open the index of the precedent set in *root* (default index path
    ``root/.counterdraft/library.sqlite``, or *db_path*), building or refreshing it first
    when *refresh* (then ``library.report`` holds the :class:`BuildReport`)."""
    if root is None and db_path is None:
        raise CounterdraftError("give the precedent-set folder or the index path")
    report = None
    if refresh:
        if root is None:
            raise CounterdraftError("refreshing the index needs the precedent-set folder")
        report = build_library(root, db_path=db_path, progress=progress, cancel=cancel, workers=workers,
                               exclude=exclude)
    db = Path(db_path) if db_path is not None else default_db_path(root)  # type: ignore[arg-type]
    lib = Library(db, root=root)
    lib.report = report
    return lib
