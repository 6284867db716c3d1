"""The precedent set's index: the firm's past agreements, kept in a store.

``build_library(root)`` reads every file of a format the readers registry admits to a precedent
set (``core.readers.PRECEDENT_SET_SUFFIXES``: .docx, .odt, .txt, .md; not .pdf, whose structure
is only inferred) under *root* (recursively; hidden files and folders, Office lock files
``~$...`` and the index's own folder are skipped) into a store (:mod:`.store`): by default the
SQLite file ``root/.counterdraft/library.sqlite`` (or a path of your choice), or a PostgreSQL
database a team shares (``store="postgresql://USER@HOST:PORT/DB"``).  What it keeps:

* ``documents``: path (relative to the root, with "/"), SHA-256, size, modification time,
  title and parties when found;
* ``provisions``: kind, number, heading, level, text, clause type (and how it was found), its
  bucket, the normalised wording and its hash, and its variant;
* ``terms``: the defined terms and their definitions;
* ``failures``: files that could not be read or are not agreements, with the problem;
* ``variants`` and ``labels``: wording variants per clause type and the reviewer's positions;
* ``dirty`` and ``bucket_state``: buckets to refresh, and each bucket's wordings at its last
  full clustering and the wordings added or removed since;
* derived blobs: each bucket's frequency cache, the clause-type classifier, the vocabulary
  model (files beside a SQLite index; rows of a server store).

This module computes; the store keeps (no SQL here).  The build is incremental: a file whose
size and modification time are unchanged is not opened; a file whose stat changed is hashed
and re-read only when its SHA-256 changed; files that disappeared are dropped.  Unreadable
files are listed and skipped; nothing aborts the build.  After the files, the derived data is
refreshed only where something changed:

* every bucket (clause type) holding a provision of a file read or dropped is marked dirty
  (in the same transaction as the change, so a cancelled or killed build leaves the marks
  for the next one); only marked buckets are refreshed;
* term aliases are learnt again from the stored terms (cheap); when they change, every
  document is normalised again and every bucket marked;
* only new documents are normalised;
* the neighbour classifier of unheaded clauses is refitted only when its examples (per type,
  the first ``MAX_EXAMPLES_PER_TYPE`` distinct typed wordings, documents taken in the order of
  their SHA-256; a type that has them all is read only up to the document that completed
  them) changed, and then types every unheaded clause again; otherwise it types only the new
  documents' (the same classifier gives the same answers, so the result is a full build's);
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
  (tests/core/library/test_incremental.py).  The arrays of a bucket with a cache are computed
  in a helper thread while the next buckets are read and the previous one written
  (:func:`_bucket_plans`);
* the vocabulary model (``vocabulary.npz``) is retrained only when its training corpus has
  drifted (:func:`.vocab.vocabulary_drift`, ``vocab.RETRAIN_DRIFT``), in a worker process
  beside the clustering when the corpus is large; until then it is the model of the
  documents it was trained on.

The SQLite index is derived data: when its file is not a usable SQLite database of this
schema (damaged, truncated, not SQLite, another schema version), the build moves it aside and
rebuilds it from the agreements (:mod:`.store.sqlite`); ``BuildReport.rebuilt`` says so in
one line.  Opening an index without a build (:class:`Library`) reports such a file as an
error.

Confidentiality: a SQLite index's folder ``.counterdraft`` is created with mode 0o700 and
every file in it with mode 0o600; a server store's credentials never leave libpq's own
sources (:mod:`.store.postgres`).  The build logs no contract text (progress reports give file
paths only, failure reasons never quote the file).

Cost: reading dominates a first build (the reader's cost per file; spread over ``workers``
processes).  The derived data of a first build costs O(provisions) for normalisation and
typing, O(n^2) per clause type for the variants of its n distinct wordings (bounded by
``MAX_CLUSTER_ITEMS``) and a vocabulary training bounded by ``vocab.MAX_TRAINING_WORDS``.
Adding, changing or removing one agreement costs its reading, one index-only scan and array
work linear in the size of the buckets it touches, one sparse product of its new wordings
with those buckets, and O(g^2) for each regrouped set of g wordings.
"""

from __future__ import annotations

import bisect
import hashlib
import json
import mmap
import os
import re
import stat
import tempfile
import time
from collections import defaultdict, deque
from collections.abc import Callable, Generator, Iterable, Iterator, Mapping, Sequence
from contextlib import contextmanager
from dataclasses import dataclass, replace
from functools import partial
from pathlib import Path, PurePosixPath
from typing import TYPE_CHECKING, Any, Literal, Protocol, TypeVar, runtime_checkable

import numpy as np

from ..errors import CounterdraftError
from ..fileio import file_sha256
from ..model import Document
from ..parallel import parallel_on
from ..readers import PRECEDENT_SET_SUFFIXES
from .bucketcache import BucketArrays, BucketColumns, assemble, cache_head, compact, npz_bytes, rows_of
from .clausetypes import NeighbourClassifier, Typing, classify_provisions, load_taxonomy
from .normalise import TermReplacer, _word_hash, canonical_role, fold, learn_aliases, match_tokens, shingle_hashes
from .options import FORMER_POSITIONS, POSITIONS
from .sparse import column_hits, ragged, unique_sorted
from .store import VARIANT_FIGURES, PrecedentStore, is_server_address, open_store
from .store.base import DocumentState, FailureState
from .variants import RegroupTooLarge, VariantConfig, cluster_wordings, regroup

if TYPE_CHECKING:  # imported when first used: loading it is not free
    from .vocab import LibraryVocabulary

__all__ = [
    "position_name",
    "DB_DIRNAME",
    "DB_FILENAME",
    "MIN_AGREEMENT_TYPES",
    "POOL_MIN_FILES",
    "FORMER_POSITIONS",
    "POSITIONS",
    "SUFFIXES",
    "BucketIndex",
    "BuildReport",
    "Cancel",
    "CancelFlag",
    "Failure",
    "Library",
    "Progress",
    "VariantInfo",
    "bucket_of",
    "bucket_blob",
    "build_library",
    "default_db_path",
    "normalised_wording",
    "open_library",
    "read_bucket",
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

#: A file is an agreement when at least this many distinct clause types are recognised in
#: it; a letter, a note or a README has none or one.  (Common practice, no source: even a
#: short agreement has definitions, a term or termination clause and a governing law.)
MIN_AGREEMENT_TYPES = 3

#: Below this many files to read, reading stays in this process: starting worker processes
#: (spawn, which is safe beside the desktop app's threads) costs about a second.
POOL_MIN_FILES = 16

#: Layout of the derived files (meta ``derived``): an index whose derived data has another
#: layout gets it all anew on its next build.  3: the bucket caches keep their incidence
#: matrices by columns (:mod:`.bucketcache`).
DERIVED_FORMAT = "3"

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



def position_name(given: str) -> tuple[str, str | None]:
    """The stance *given* names -- one of :data:`POSITIONS` in any letter case, hyphens for
    spaces ("can-live-with"), or a former name -- and a one-line notice when it was a former
    name.  Raises :class:`CounterdraftError` for anything else."""
    key = " ".join(given.replace("-", " ").split()).casefold()
    if key in POSITIONS:
        return key, None
    if key in FORMER_POSITIONS:
        new = FORMER_POSITIONS[key]
        return new, f'"{given}" is a former name of the stance "{new}"; recorded as "{new}"'
    raise CounterdraftError(f"position must be one of: {', '.join(POSITIONS)} (or none)")


Progress = Callable[[int, int, str], None]
#: Told what a build is doing once the files are read ("grouping wording variants"), for a
#: progress bar: those steps have no count.
Stage = Callable[[str], None]
Cancel = Callable[[], bool]


@runtime_checkable
class CancelFlag(Protocol):
    """A flag set to cancel a build (``threading.Event``), taken where a :data:`Cancel` is."""

    def is_set(self) -> bool: ...



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

def _norm_hash(norm: str) -> str:
    return hashlib.blake2b(norm.encode("utf-8"), digest_size=16).hexdigest()


def normalised_wording(text: str, heading: str | None, *, terms: TermReplacer | None) -> list[str]:
    """The tokens by which wordings are compared: heading and text, terms normalised."""
    return match_tokens(f"{heading or ''}\n{text}", terms=terms)


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
    # (folder, its path relative to the root with a final "/"): a file's relative path is
    # its folder's and its name, without parsing a path per file.
    stack: list[tuple[str | Path, str]] = [(root, "")]
    while stack:  # iterative walk: no recursion on the folder depth
        folder, prefix = stack.pop()
        try:
            entries = sorted(os.scandir(folder), key=lambda e: e.name)
        except OSError:
            continue
        subdirs: list[tuple[str | Path, str]] = []
        for e in entries:
            if e.name.startswith(".") or e.name.startswith("~$"):
                continue
            try:
                if e.is_dir(follow_symlinks=False):
                    subdirs.append((e.path, f"{prefix}{e.name}/"))
                    continue
                if not e.is_file() or not e.name.lower().endswith(SUFFIXES):
                    continue
                st = e.stat()
            except OSError:
                continue
            if not stat.S_ISREG(st.st_mode) or (st.st_dev, st.st_ino) in excluded:
                continue
            out.append(_FileStat(prefix + e.name, e.path, st.st_size, st.st_mtime_ns))
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


def _party_names(doc: Document) -> tuple[str, ...]:
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


def _title_of(doc: Document) -> str | None:
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
    except Exception as err:
        return _Problem(digest, f"unreadable ({type(err).__name__})")


def _cancelled(cancel: Cancel | CancelFlag | None) -> bool:
    if cancel is None:
        return False
    # What isinstance(cancel, CancelFlag) checks, without the protocol check's cost (it is
    # asked once per file, and a no-change build of 1,000 files takes a few hundredths).
    is_set = getattr(cancel, "is_set", None)
    if is_set is not None:
        return bool(is_set())
    return bool(cancel())  # type: ignore[operator]


def _read_many(paths: Sequence[str], *, workers: int) -> Iterator[_Extract | _Problem]:
    """Results in the order of *paths*."""
    if workers <= 1 or len(paths) < POOL_MIN_FILES:
        for p in paths:
            yield _extract(p)
        return
    import multiprocessing  # here: a review, which reads no file, does not load them
    from concurrent.futures import ProcessPoolExecutor

    ctx = multiprocessing.get_context("spawn")
    with ProcessPoolExecutor(max_workers=workers, mp_context=ctx) as pool:
        try:
            yield from pool.map(_extract, paths, chunksize=4)
        finally:
            pool.shutdown(wait=True, cancel_futures=True)


# ----------------------------------------------------------------------------------------
# Build
# ----------------------------------------------------------------------------------------


def _open_target(root_p: Path | None, address: str | os.PathLike[str] | None) -> PrecedentStore:
    """The store a build or a reader uses: *address* (a file path or a server address), by
    default the folder's own SQLite index ``root/.counterdraft/library.sqlite``."""
    if address is None:
        if root_p is None:
            raise CounterdraftError("give the precedent-set folder or the index path")
        return open_store(default_db_path(root_p), private_folder=True)
    return open_store(address)


def build_library(root: str | os.PathLike[str], *, store: str | os.PathLike[str] | None = None,
                  db_path: str | os.PathLike[str] | None = None,
                  progress: Progress | None = None, cancel: Cancel | CancelFlag | None = None,
                  workers: int = 2, config: VariantConfig | None = None,
                  vocabulary: bool = True, exclude: Sequence[str | os.PathLike[str]] = (),
                  replace_root: bool = False, stage: Stage | None = None) -> BuildReport:
    """Build or refresh the index of the agreements under *root*; see the module docstring.

    *store* is where the index is kept: a SQLite file path or a PostgreSQL address
    (``postgresql://USER@HOST:PORT/DB``); by default ``root/.counterdraft/library.sqlite``
    (*db_path* is the same as a file path).  *progress* is called as
    ``progress(done, total, relative_path)`` once per candidate file, *stage* with a few
    words as each later step starts (those that run: nothing when no file changed); *cancel* is a callable
    returning True (or a ``threading.Event``) to stop between files: what was read so far is
    kept and the next build finishes the job.  *config* sets the variant clustering (stored;
    a change re-clusters).  *vocabulary* False skips training the vocabulary model.  Files
    in *exclude* are not indexed.  A shared store built from another folder would drop that
    folder's agreements: the build refuses unless *replace_root*.
    """
    root_p = Path(root)
    if not root_p.is_dir():
        raise CounterdraftError("not a folder", path=str(root))
    target = _open_target(root_p, store if store is not None else db_path)
    try:
        # One builder at a time per index: the store keeps the rows consistent, the lock
        # keeps the derived data (clause types, variants, vocabulary) from being computed
        # from two states.
        with target.lock():
            return _build_locked(target, root_p, progress=progress, cancel=cancel, workers=workers,
                                 config=config, vocabulary=vocabulary, exclude=exclude, replace_root=replace_root,
                                 stage=stage)
    finally:
        target.close()


def _build_locked(store: PrecedentStore, root_p: Path, *, progress: Progress | None, cancel: Cancel | CancelFlag | None,
                  workers: int, config: VariantConfig | None, vocabulary: bool,
                  exclude: Sequence[str | os.PathLike[str]], replace_root: bool,
                  stage: Stage | None = None) -> BuildReport:
    started = time.perf_counter()
    rebuilt: str | None = None
    while True:
        try:
            store.open(create=True)
            report = _build_into(store, root_p, progress=progress, cancel=cancel, workers=workers,
                                 config=config, vocabulary=vocabulary, exclude=exclude,
                                 fresh=rebuilt is not None, replace_root=replace_root, stage=stage)
        except CounterdraftError:
            raise
        except Exception as err:
            problem = store.damage(err)
            if problem is None:
                message = store.describe_error(err)
                if message is None:
                    raise
                raise CounterdraftError(f"cannot update the index ({message})", path=store.address) from None
            if rebuilt is not None:  # a fresh store failed too: not the old one's fault
                raise CounterdraftError(f"cannot rebuild the index ({problem})", path=store.address) from None
            rebuilt = store.start_over(problem)
            continue
        break
    return replace(report, rebuilt=rebuilt, seconds=round(time.perf_counter() - started, 3))


def _check_root(store: PrecedentStore, root_p: Path, files: Sequence[_FileStat], *, replace_root: bool) -> None:
    """A store that holds another folder's agreements is not emptied by a build from this
    one (a shared store's whole set would go), unless asked."""
    stored = store.meta("root")
    here = str(root_p.resolve())
    if replace_root or stored is None or stored == here or not is_server_address(store.address):
        return
    on_disk = {f.rel for f in files}
    gone = sum(1 for p in store.paths() if p not in on_disk)
    if gone:
        raise CounterdraftError(f"the store holds the precedent set of another folder ({stored}); building it from "
                                f"this one would drop {gone} of its agreements: build from that folder, or pass "
                                "--replace to make the store hold this folder's agreements instead",
                                path=store.address)


def _build_into(store: PrecedentStore, root_p: Path, *, progress: Progress | None,
                cancel: Cancel | CancelFlag | None, workers: int, config: VariantConfig | None, vocabulary: bool,
                exclude: Sequence[str | os.PathLike[str]], fresh: bool, replace_root: bool,
                stage: Stage | None = None) -> BuildReport:
    """The body of :func:`build_library` on an open store (*fresh*: it replaces a damaged
    one, so the derived data is rewritten even if the folder holds no agreement)."""
    if fresh:
        store.set_meta("stale", "1")
        store.checkpoint()
    if config is not None:
        old = store.meta("variant_config")
        new = json.dumps([config.metric, config.linkage, config.cutoff, config.max_items])
        if old != new:
            store.set_meta("variant_config", new)
            store.forget_bucket_states()
            store.mark_dirty()
            store.set_meta("stale", "1")
    own = [] if is_server_address(store.address) else [store.address]  # the index file itself
    files = _scan(root_p, exclude=[*exclude, *own])
    _check_root(store, root_p, files, replace_root=replace_root)
    report = _update_files(store, files, progress=progress, cancel=cancel, workers=workers)
    changed = (report.read > 0 or report.removed > 0 or store.meta("stale") == "1"
               or store.meta("derived") != DERIVED_FORMAT)
    cancelled = report.cancelled
    if changed and not cancelled:
        store.set_meta("stale", "1")
        store.checkpoint()
        cancelled = not _refresh_derived(store, cancel=cancel, vocabulary=vocabulary,
                                         stage=stage or (lambda _what: None))
        if not cancelled:
            store.set_meta("stale", "0")
            store.set_meta("generation", str(int(store.meta("generation") or 0) + 1))
            store.checkpoint()
    elif changed:
        store.set_meta("stale", "1")
        store.checkpoint()
    store.set_meta("root", str(root_p.resolve()))
    documents = store.document_count()
    failures = tuple(Failure(p, m) for p, m in store.failures())
    store.commit()
    return BuildReport(str(root_p), store.address, report.files, report.read, report.unchanged,
                       report.removed, documents, failures, cancelled)


def _drop_gone(store: PrecedentStore, on_disk: set[str], known: Mapping[str, DocumentState],
               failed: Mapping[str, FailureState]) -> int:
    """Forget the documents and failures no longer on disk; the number of documents removed."""
    removed = 0
    for path in known:
        if path not in on_disk:
            store.remove_document(path)
            removed += 1
    for path in failed:
        if path not in on_disk:
            store.remove_failure(path)
    store.checkpoint()
    return removed


def _unchanged(store: PrecedentStore, f: _FileStat, prev: DocumentState | None, prev_fail: FailureState | None) -> bool:
    """Whether *f* is the file stored (or recorded as unreadable) before: the same size and
    modification time, or else the same SHA-256 (then its new stat is stored)."""
    stamp = (f.size, f.mtime_ns)
    if (prev is not None and (prev[2], prev[3]) == stamp
            or prev_fail is not None and (prev_fail[1], prev_fail[2]) == stamp):
        return True
    known_digest = prev[1] if prev is not None else prev_fail[0] if prev_fail is not None else None
    if not known_digest:
        return False
    try:
        digest = file_sha256(f.path)
    except OSError:
        return False
    if digest != known_digest:
        return False
    store.update_stat(f.rel, size=f.size, mtime_ns=f.mtime_ns)
    return True


def _update_files(store: PrecedentStore, files: Sequence[_FileStat], *, progress: Progress | None,
                  cancel: Cancel | CancelFlag | None, workers: int) -> BuildReport:
    known, failed = store.file_states()
    removed = _drop_gone(store, {f.rel for f in files}, known, failed)

    total = len(files)
    done = 0
    unchanged = 0
    to_read: list[_FileStat] = []
    for f in files:
        if _cancelled(cancel):
            return BuildReport("", "", total, 0, unchanged, removed, 0, (), True)
        if _unchanged(store, f, known.get(f.rel), failed.get(f.rel)):
            unchanged += 1
            done += 1
            if progress is not None:
                progress(done, total, f.rel)
        else:
            to_read.append(f)
    store.checkpoint()

    read = 0
    cancelled = False
    results = _read_many([f.path for f in to_read], workers=workers)
    try:
        for f, res in zip(to_read, results):
            _store(store, f, res)
            read += 1
            done += 1
            if read % 50 == 0:
                store.checkpoint()
            if progress is not None:
                progress(done, total, f.rel)
            if _cancelled(cancel):
                cancelled = True
                break
    finally:
        close = getattr(results, "close", None)
        if close is not None:
            close()
        store.checkpoint()
    return BuildReport("", "", total, read, unchanged, removed, 0, (), cancelled)


def _store(store: PrecedentStore, f: _FileStat, res: _Extract | _Problem) -> None:
    if isinstance(res, _Problem):
        store.put_failure(f.rel, sha256=res.sha256, size=f.size, mtime_ns=f.mtime_ns, problem=res.problem)
        return
    rows = [(pid, kind, number, heading, level, parent, text, ctype, source, bucket_of(ctype, kind))
            for pid, kind, number, heading, level, parent, text, ctype, source in res.provisions]
    store.put_document(f.rel, sha256=res.sha256, size=f.size, mtime_ns=f.mtime_ns, title=res.title,
                       parties=res.parties, provisions=rows, terms=res.terms, source=Path(f.path))


# ----------------------------------------------------------------------------------------
# Derived data
# ----------------------------------------------------------------------------------------


def _doc_replacer(terms: Sequence[str], aliases: Mapping[str, str]) -> TermReplacer:
    names = {}
    for t in terms:
        name = aliases.get(t, t)
        names[t] = canonical_role(name) or name
    return TermReplacer(names)


def _write_blob(store: PrecedentStore, name: str, data: bytes) -> None:
    """Every derived blob (frequency caches, classifier, vocabulary) is written here."""
    store.write_blob(name, data)


def _refresh_derived(store: PrecedentStore, *, cancel: Cancel | CancelFlag | None, vocabulary: bool,
                     stage: Stage) -> bool:
    """Refresh what is computed from the documents, only where something changed (the module
    docstring).  False when cancelled: what is done is kept, the rest stays marked."""
    _upgrade_derived(store)
    stage("normalising the wordings")
    aliases = _refresh_aliases(store)
    normalised = _normalise_pending(store, aliases, cancel=cancel)
    if normalised is None or _cancelled(cancel):
        return False
    stage("typing the clauses")
    _retype_by_neighbours(store, normalised)
    store.checkpoint()
    if _cancelled(cancel):
        return False
    training = _start_vocabulary(store, aliases) if vocabulary else None
    stage("grouping the wording variants")
    try:
        done = _refresh_variants(store, cancel=cancel)
    except BaseException:
        if training is not None:
            training.stop()
        raise
    if training is not None:
        if done:
            stage("training the vocabulary model")
            training.finish(store)
        else:
            training.stop()
    return done


def _upgrade_derived(store: PrecedentStore) -> None:
    """An index whose derived data has an earlier layout (or none) gets all of it anew."""
    if store.meta("derived") == DERIVED_FORMAT:
        return
    store.forget_bucket_states()
    store.mark_dirty()
    store.delete_meta("neighbour_examples", EXAMPLE_CUTOFFS_KEY, "vocabulary")
    store.delete_blob(CACHE_FILENAME)  # the earlier single frequency cache
    store.set_meta("derived", DERIVED_FORMAT)
    store.checkpoint()


def _refresh_aliases(store: PrecedentStore) -> dict[str, str]:
    """Aliases between the documents' defined terms; when they change, every document is
    normalised again and every bucket refreshed."""
    aliases = learn_aliases(store.all_terms())
    encoded = json.dumps(aliases, sort_keys=True)
    if store.meta("aliases") != encoded:
        store.renormalise_all()
        store.mark_dirty()
        store.set_meta("aliases", encoded)
    return aliases


def _normalise_pending(store: PrecedentStore, aliases: Mapping[str, str], *,
                       cancel: Cancel | CancelFlag | None) -> list[int] | None:
    """Normalised wordings of the documents not yet normalised; their ids, or None when
    cancelled."""
    todo = store.unnormalised_documents()
    for n, doc_id in enumerate(todo):
        if n % 25 == 0 and _cancelled(cancel):
            store.checkpoint()
            return None
        replacer = _doc_replacer(store.document_terms(doc_id), aliases)
        rows = []
        for pid, heading, text in store.document_wordings(doc_id):
            norm = " ".join(normalised_wording(text, heading, terms=replacer))
            rows.append((norm, _norm_hash(norm), pid))
        # Shingles are not stored: the bucket caches hold them, made once per distinct
        # wording from its normalised text (wording_shingles).
        store.set_norms(doc_id, rows)
    store.checkpoint()
    return todo


#: Meta key of the neighbour examples' cut-offs: per clause type whose examples are complete,
#: the (SHA-256, path) of the document that completed them (:func:`_neighbour_examples`).
EXAMPLE_CUTOFFS_KEY = "neighbour_cutoffs"

_Chosen = dict[str, dict[str, int]]


def _neighbour_examples(store: PrecedentStore) -> tuple[list[tuple[str, int]], str]:
    """The neighbour classifier's examples ``(clause type, provision id)`` and their
    fingerprint (their types and wording hashes): per clause type, the first
    MAX_EXAMPLES_PER_TYPE distinct wordings typed by heading or parent, documents taken in the
    order of their content hashes (SHA-256) and each document's provisions in order.  That
    order is a fixed pseudo-random sample of the library, unrelated to file names, and once a
    type has its examples, an agreement added, changed or removed further down the order
    leaves them as they are -- the classifier need not be refitted, nor its types redone.

    So a type whose examples were complete is read only up to the document that completed
    them (its cut-off, kept in the meta ``EXAMPLE_CUTOFFS_KEY``), the other types in full:
    when every such type is still complete within its cut-off, those are the examples a scan
    of every typed provision finds (the first ones in the same order); else that scan is
    made.  Cost: the typed provisions of the documents before the cut-offs and of the
    incomplete types, instead of all of them."""
    documents = store.documents_by_hash()
    rank = {doc_id: n for n, (doc_id, _sha, _path) in enumerate(documents)}
    picked = _examples_before_cutoffs(store, documents, rank)
    if picked is None:
        picked = _pick_examples(store.typed_examples(exclude_hash=_norm_hash("")), rank)
    chosen, completed = picked
    cutoffs = json.dumps({tid: list(documents[n][1:]) for tid, n in sorted(completed.items())})
    if store.meta(EXAMPLE_CUTOFFS_KEY) != cutoffs:
        store.set_meta(EXAMPLE_CUTOFFS_KEY, cutoffs)
    digest = hashlib.blake2b(digest_size=16)
    examples: list[tuple[str, int]] = []
    for tid in sorted(chosen):
        for h in sorted(chosen[tid]):
            examples.append((tid, chosen[tid][h]))
            digest.update(f"{tid}:{h}\n".encode())
    return examples, digest.hexdigest()


def _example_texts(store: PrecedentStore, examples: Sequence[tuple[str, int]]) -> list[tuple[str, str]]:
    """``(normalised wording, clause type)`` of the examples ``(clause type, provision id)``
    of :func:`_neighbour_examples`: read only when the classifier is fitted again."""
    norms = store.provision_column("norm", [pid for _tid, pid in examples])
    return [(norms[pid], tid) for tid, pid in examples]


def _pick_examples(rows: Iterable[tuple[str, str, int, int]],
                   rank: Mapping[int, int]) -> tuple[_Chosen, dict[str, int]]:
    """From typed provisions ``(clause type, wording hash, provision id, document id)`` in
    the examples' order: per type, its first MAX_EXAMPLES_PER_TYPE distinct wordings (each
    with its first provision), and for each type that has that many, the rank of the
    document that completed them."""
    from .clausetypes import MAX_EXAMPLES_PER_TYPE

    chosen: _Chosen = defaultdict(dict)
    completed: dict[str, int] = {}
    for tid, h, pid, doc_id in rows:
        per_type = chosen[tid]
        if len(per_type) < MAX_EXAMPLES_PER_TYPE and h not in per_type:
            per_type[h] = pid
            if len(per_type) == MAX_EXAMPLES_PER_TYPE:
                completed[tid] = rank[doc_id]
    return chosen, completed


def _examples_before_cutoffs(store: PrecedentStore, documents: Sequence[tuple[int, str, str]],
                             rank: Mapping[int, int]) -> tuple[_Chosen, dict[str, int]] | None:
    """:func:`_pick_examples` of the typed provisions up to each complete type's stored
    cut-off (every provision of the other types), or None when there are no cut-offs or a
    type is no longer complete within its own (a document before it was changed or removed)."""
    raw = store.meta(EXAMPLE_CUTOFFS_KEY)
    if not raw:
        return None
    keys = [(sha, path) for _id, sha, path in documents]
    limits = {tid: [doc_id for doc_id, _sha, _path in documents[:bisect.bisect_right(keys, (sha, path))]]
              for tid, (sha, path) in json.loads(raw).items()}
    rows = store.typed_examples_within(exclude_hash=_norm_hash(""), limits=limits)
    rows.sort(key=lambda r: (rank[r[3]], r[2]))
    chosen, completed = _pick_examples(rows, rank)
    return (chosen, completed) if completed.keys() >= limits.keys() else None


def _retype_by_neighbours(store: PrecedentStore, normalised: Sequence[int]) -> None:
    """Type unheaded provisions by their library neighbours.  The classifier is refitted only
    when its examples changed; then every neighbour-typed provision is typed again, else only
    those of the documents just normalised (the same classifier gives the same types)."""
    examples, fingerprint = _neighbour_examples(store)
    stored = store.read_blob(NEIGHBOURS_FILENAME) if store.meta("neighbour_examples") == fingerprint else None
    if stored is not None:
        clf = NeighbourClassifier.from_npz_bytes(stored)
        rows = store.untyped_provisions(normalised)
    else:
        clf = NeighbourClassifier.fit(_example_texts(store, examples), taxonomy=load_taxonomy())
        _write_blob(store, NEIGHBOURS_FILENAME, clf.to_npz_bytes())
        store.set_meta("neighbour_examples", fingerprint)
        rows = store.untyped_provisions()
    if not rows:
        return
    preds = clf.predict([r[2] or "" for r in rows])
    store.retype([(tid, "neighbour" if tid else "none", bucket_of(tid, kind), pid, old_bucket)
                  for (pid, kind, _norm, old, old_bucket), (tid, _s) in zip(rows, preds) if tid != old])


def _variant_config(store: PrecedentStore) -> VariantConfig:
    raw = store.meta("variant_config")
    if raw is None:
        return VariantConfig()
    metric, linkage, cutoff, max_items = json.loads(raw)
    return VariantConfig(metric=metric, linkage=linkage, cutoff=float(cutoff), max_items=int(max_items))


@dataclass(frozen=True, slots=True)
class _Wordings:
    """A bucket's distinct wordings in its order (most provisions first, then by hash)."""

    hashes: list[str]
    count: np.ndarray
    sample: np.ndarray  # per wording, its provision in the first document by path
    docptr: np.ndarray  # the documents using wording i: docs[docptr[i]:docptr[i + 1]], ascending
    docs: np.ndarray


def _document_ranks(store: PrecedentStore) -> tuple[np.ndarray, np.ndarray]:
    """(document ids sorted, each one's rank by path) for :func:`_bucket_wordings`."""
    ids = np.array([i for i, _p, _h in store.documents_by_path()], dtype=np.int64)
    order = np.argsort(ids)
    return ids[order], order.astype(np.int64)


def _bucket_wordings(store: PrecedentStore, bucket: str, ranks: tuple[np.ndarray, np.ndarray]) -> _Wordings:
    """Two index-only passes over the bucket's provisions in the order of index
    ``provisions_wording`` (the wordings with their counts, then every provision's document,
    position and id), then array work.  The sample of a wording is its provision in the
    document first by path (first by position there): what a full build, which stores the
    documents in path order, finds as the lowest row id."""
    groups = store.wording_counts(bucket)
    if not groups:
        return _Wordings([], np.zeros(0, np.int32), np.zeros(0, np.int64), np.zeros(1, np.int64),
                         np.zeros(0, np.int64))
    places = np.array(store.wording_places(bucket), dtype=np.int64).reshape(-1, 3)
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
                     docptr, docs[ragged(cuts, order)])


def _new_wording_sets(store: PrecedentStore, bucket: str,
                      hashes: Sequence[str]) -> dict[str, tuple[np.ndarray, np.ndarray]]:
    """``{hash: (shingle hashes, word hashes)}`` of wordings the bucket's cache lacks."""
    out: dict[str, tuple[np.ndarray, np.ndarray]] = {}
    for h, blob, norm in store.wording_texts(bucket, hashes):
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


def bucket_blob(bucket: str) -> str:
    """The name of a bucket's frequency cache among the store's derived data."""
    name = hashlib.blake2b(bucket.encode("utf-8"), digest_size=12).hexdigest()
    return f"{BUCKETS_DIRNAME}/{name}.npz"


def read_bucket(store: PrecedentStore, bucket: str) -> BucketArrays | None:
    """A bucket's frequency cache, None when missing or not one this code wrote."""
    return _read_cache(store.read_blob(bucket_blob(bucket)), BucketArrays.from_npz_bytes)


def _read_bucket_columns(store: PrecedentStore, bucket: str) -> BucketColumns | None:
    """What a review reads of a bucket's cache (:class:`~.bucketcache.BucketColumns`, read
    in place from the mapped file), None when missing or not one this code wrote."""
    return _read_cache(view_blob(store, bucket_blob(bucket)), BucketColumns.from_npz_bytes)


def view_blob(store: PrecedentStore, name: str) -> bytes | mmap.mmap | None:
    """A derived blob to read only: the SQLite store's file mapped into memory
    (``SQLiteStore.view_blob``: nothing copied, pages read as used), another store's bytes."""
    view = getattr(store, "view_blob", None)
    return view(name) if view is not None else store.read_blob(name)


_Cache = TypeVar("_Cache")


#: What reading a damaged cache file raises (numpy's and zipfile's errors).
_DAMAGED = (OSError, ValueError, KeyError, EOFError)


def _read_cache(data: bytes | mmap.mmap | None, load: Callable[[bytes | mmap.mmap], _Cache]) -> _Cache | None:
    if data is None:
        return None
    try:
        return load(data)
    except _DAMAGED:
        return None


def _refresh_variants(store: PrecedentStore, *, cancel: Cancel | CancelFlag | None) -> bool:
    """Variants and frequency cache of every bucket marked dirty.  False when cancelled.

    A bucket's cache is written before the transaction that clears its mark commits: after a
    crash between the two the bucket is still marked and its next refresh starts from the
    cache, whose wordings are the current ones, so nothing is lost or counted twice.  The
    buckets are written one after the other in the order of their names, each after what it
    reads was read and computed (:func:`_bucket_plans`), so a bucket's writes never come
    before an earlier bucket's."""
    config = _variant_config(store)
    ranks = _document_ranks(store)
    # Set while a variants step runs: when found set, the last one stopped between writing a
    # cache and committing, so this one reads the stored variants from the table.
    trusted = store.meta("variants_running") != "1"
    store.set_meta("variants_running", "1")
    store.checkpoint()
    try:
        plans = _bucket_plans(store.dirty_buckets(), partial(_read_bucket_input, store, ranks=ranks, trusted=trusted),
                              config)
        try:
            while not _cancelled(cancel):
                plan = next(plans, None)
                if plan is None:
                    store.set_meta("variants_running", "0")
                    return True
                _write_bucket(store, plan)
                store.clear_dirty(plan.bucket)
            return False
        finally:
            plans.close()
    finally:
        store.checkpoint()


#: Buckets read ahead of the one being written (:func:`_bucket_plans`): the helper thread
#: computes one while this one writes the previous and reads the next ones.  Two: this
#: thread's reading and writing is the longer share (measured on the benchmark's
#: one-agreement updates, 2 cores, best of 5 interleaved: an addition 0.374 s with one bucket
#: read ahead, 0.368 s with two, 0.357 s with three -- the last two within this machine's
#: noise), and every bucket read ahead is held in memory.
READ_AHEAD_BUCKETS = 2


def _bucket_plans(buckets: Sequence[str], read: Callable[..., _BucketInput],
                  config: VariantConfig) -> Generator[_BucketPlan, None, None]:
    """The :class:`_BucketPlan` of each of *buckets*, in their order.  Each is computed
    (:func:`_compute_bucket`, array work that mostly runs outside Python's global lock: numpy,
    scipy's sparse routines) in a helper thread while this one reads the next buckets
    (READ_AHEAD_BUCKETS) and the caller writes the previous one (SQLite and the file system,
    also outside the lock), so the two processor cores share the work with nothing copied
    between them.  Only this thread uses the store's connection.  A bucket clustered in full
    (with no cache of its own -- a new one, every bucket of a first build -- or drifted) and
    larger than ALWAYS_FULL_WORDINGS is computed here, in turn: the helper thread's own
    allocations beside a full clustering raised a first build's peak memory by 56 MB
    (280 MB -> 336 MB on the 1,000-agreement set), for no gain in time, the clustering being
    most of the work.  All in this thread when steps beside each other are
    switched off (:data:`core.parallel.PARALLEL_ENV`).

    Cost: up to READ_AHEAD_BUCKETS + 2 buckets held at once (read, computed, written)."""
    if not parallel_on():
        for bucket in buckets:
            yield _plan(bucket, _compute_bucket(read(bucket), config), read, config)
        return
    from concurrent.futures import Future, ThreadPoolExecutor

    with ThreadPoolExecutor(max_workers=1, thread_name_prefix="counterdraft-variants") as pool:
        pending: deque[tuple[str, Future[_BucketPlan | None]]] = deque()

        def finished(keep: int) -> Iterator[_BucketPlan]:
            while len(pending) > keep:
                done, computing = pending.popleft()
                yield _plan(done, computing.result(), read, config)

        try:
            for bucket in buckets:
                given = read(bucket)
                if not given.regroup and given.wordings > ALWAYS_FULL_WORDINGS:  # in turn (see above)
                    yield from finished(0)
                    yield _plan(bucket, _compute_bucket(given, config), read, config)
                    continue
                pending.append((bucket, pool.submit(_compute_bucket, given, config)))
                yield from finished(READ_AHEAD_BUCKETS)
            yield from finished(0)
        finally:
            pool.shutdown(wait=True, cancel_futures=True)


def _plan(bucket: str, computed: _BucketPlan | None, read: Callable[..., _BucketInput],
          config: VariantConfig) -> _BucketPlan:
    """*computed*, or when the bucket's cache turned out damaged (:func:`_compute_bucket`
    gave None), the plan made without it, as for a bucket with no cache."""
    if computed is not None:
        return computed
    plan = _compute_bucket(read(bucket, cache=False), config)
    assert plan is not None  # no cache, none damaged
    return plan


@dataclass(frozen=True, slots=True)
class _BucketInput:
    """What one bucket's refresh reads from the store; :func:`_compute_bucket` needs nothing
    else."""

    bucket: str
    words: _Wordings
    old: bytes | None  # the previous cache file (read by _compute_bucket)
    new_sets: dict[str, tuple[np.ndarray, np.ndarray]]  # the wordings it lacks (_new_wording_sets)
    changes: int  # wordings added and removed since the previous cache
    #: Whether its variants are regrouped (:func:`~.variants.regroup`) rather than clustered
    #: in full: when its cache is *trusted*, it has more than ALWAYS_FULL_WORDINGS wordings
    #: and has not drifted (CLUSTER_DRIFT).
    regroup: bool
    state: tuple[int, int] | None
    #: Whether *old* is this index's own (its variants are the stored ones).
    trusted: bool
    stored_rows: list[tuple[int, ...]] | None  # the variants' stored figures, when *old* cannot give them
    unassigned: list[str]  # wordings with a provision that has no variant (when *trusted*)

    @property
    def wordings(self) -> int:
        return len(self.words.hashes)


def _read_bucket_input(store: PrecedentStore, bucket: str, *, ranks: tuple[np.ndarray, np.ndarray],
                       trusted: bool, cache: bool = True) -> _BucketInput:
    """Read what the refresh of *bucket* needs (the previous cache unless not *cache*, its
    wordings now, the texts of the new ones, its state, the stored figures when the cache
    cannot give them).  Of the cache only the wordings' hashes and variants are read here;
    :func:`_compute_bucket` reads the rest (in the helper thread)."""
    words = _bucket_wordings(store, bucket, ranks)
    if not words.hashes:
        return _BucketInput(bucket, words, None, {}, 0, False, None, False, None, [])
    old = store.read_blob(bucket_blob(bucket)) if cache else None
    head = _read_cache(old, cache_head)
    old = old if head is not None else None
    known = head[0] if head is not None else np.zeros(0, "S32")
    take = rows_of(known, np.array(words.hashes, dtype="S32"))
    fresh = [words.hashes[i] for i in np.flatnonzero(take < 0).tolist()]
    changes = len(fresh) + known.size - (len(words.hashes) - len(fresh))
    state = store.bucket_state(bucket)
    # A cache is this index's own only when the index has a state for its bucket (a
    # rebuilt, upgraded or re-configured index has none): otherwise only its content-derived
    # arrays (wordings' shingles and words) are reused, never its variants.
    trusted = trusted and old is not None and state is not None
    by_regroup = trusted and state is not None and len(words.hashes) > ALWAYS_FULL_WORDINGS \
        and state[1] + changes <= CLUSTER_DRIFT * state[0]
    stored_rows = None if head is not None and _figures_in_cache(head[1], trusted) \
        else store.variant_figures(bucket)
    unassigned = store.unassigned_wordings(bucket) if trusted else []
    return _BucketInput(bucket, words, old, _new_wording_sets(store, bucket, fresh), changes, by_regroup, state,
                        trusted, stored_rows, unassigned)


@dataclass(frozen=True, slots=True)
class _BucketPlan:
    """What one bucket's refresh writes (:func:`_write_bucket`), computed from its
    :class:`_BucketInput` alone."""

    bucket: str
    #: The cache file's arrays (:meth:`~.bucketcache.BucketArrays.file_arrays`) with each
    #: wording's previous variant (-1: none); None when the bucket has no wording left.
    file: dict[str, np.ndarray] | None
    full: bool  # clustered in full (else regrouped)
    changes: int  # wordings added and removed since the previous cache
    labels: tuple[np.ndarray, np.ndarray, np.ndarray]  # _variant_figures of the new labels
    stored: tuple[np.ndarray, np.ndarray]  # _stored_figures
    trusted: bool
    unassigned: list[str]


def _compute_bucket(given: _BucketInput, config: VariantConfig) -> _BucketPlan | None:
    """One bucket's variants and cache from its previous cache and its changed wordings
    (pure: it runs in a helper thread, :func:`_bucket_plans`); None when the previous cache
    turns out damaged (what :func:`read_bucket` takes for no cache: the bucket is then read
    again without it)."""
    words = given.words
    empty = np.zeros(0, np.int64)
    if not words.hashes:
        return _BucketPlan(given.bucket, None, True, 0, (empty, empty, empty), (empty, empty), False, [])
    try:
        old = BucketArrays.from_npz_bytes(given.old) if given.old is not None else None
    except _DAMAGED:
        return None
    arrays = assemble(old, hashes=words.hashes, count=words.count, sample=words.sample, docptr=words.docptr,
                      docs=words.docs, new_sets=given.new_sets)
    labels, full = _cluster_bucket(arrays, old if given.regroup else None, config=config)
    stored = _stored_figures(old, given.trusted, given.stored_rows)
    return _BucketPlan(given.bucket, (compact(arrays) if full else arrays).file_arrays(), full, given.changes,
                       _variant_figures(arrays, labels), stored, given.trusted, given.unassigned)


def _write_bucket(store: PrecedentStore, plan: _BucketPlan) -> None:
    """Store what :func:`_compute_bucket` computed for one bucket: its clustering state, its
    variants (:func:`_write_variants`), then its cache."""
    if plan.file is None:
        store.drop_bucket(plan.bucket)
        store.delete_blob(bucket_blob(plan.bucket))
        return
    if plan.full:
        store.set_clustered(plan.bucket, int(plan.file["hashes"].size))
    else:
        store.add_drift(plan.bucket, plan.changes)
    variant = _write_variants(store, plan)
    _write_blob(store, bucket_blob(plan.bucket), npz_bytes({**plan.file, "variant": variant}))


def _cluster_bucket(arrays: BucketArrays, old: BucketArrays | None, *,
                    config: VariantConfig) -> tuple[np.ndarray, bool]:
    """Per-wording labels (a kept variant's id, else a label no variant of the bucket has)
    and whether they come from a full clustering rather than from :func:`~.variants.regroup`,
    which regroups the variants of *old* when given (:attr:`_BucketInput.regroup`: the bucket
    is not new, not small -- ALWAYS_FULL_WORDINGS -- and has not drifted -- CLUSTER_DRIFT)."""
    if old is not None:
        fresh = arrays.variant < 0
        broken = np.unique(old.variant[rows_of(arrays.hashes, old.hashes) < 0]).tolist()
        try:
            return regroup(arrays.shingle_matrix(), arrays.sizes.astype(np.int64), arrays.variant,
                           fresh=fresh, broken=broken, config=config), False
        except RegroupTooLarge:
            pass
    return _keep_ids(cluster_wordings(arrays.shingle_sets(), config=config), arrays.variant), True


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


def _variant_figures(arrays: BucketArrays, labels: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(distinct labels sorted, each row's index into them, per label the VARIANT_FIGURES:
    ordinal -- most provisions first, ties by first wording in the bucket's order --
    wordings, provisions, documents and the sample of its first wording)."""
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


def _figures_in_cache(variant: np.ndarray, trusted: bool) -> bool:
    """Whether the stored variants' figures can be computed from the bucket's previous cache
    (*variant*: its wordings' variants): when it is *trusted* (every variants step that wrote
    the cache committed the same figures) and every wording in it has a variant."""
    return trusted and bool(variant.size) and bool((variant >= 0).all())


def _stored_figures(old: BucketArrays | None, trusted: bool,
                    rows: Sequence[tuple[int, ...]] | None) -> tuple[np.ndarray, np.ndarray]:
    """(variant ids sorted, their VARIANT_FIGURES) as the store holds them: computed from
    the bucket's previous cache when it can give them (:func:`_figures_in_cache`), else the
    store's *rows*."""
    if old is not None and _figures_in_cache(old.variant, trusted):
        ids, _, figures = _variant_figures(old, old.variant)
        return ids, figures
    rows = rows or []
    table = np.array(rows, dtype=np.int64).reshape(len(rows), 1 + len(VARIANT_FIGURES))
    return table[:, 0], table[:, 1:]


#: Variants whose ordinals all move by one step (nothing else of them changing), next to
#: each other in the order of their ordinals, are updated by one statement for their range
#: of ordinals rather than one per variant, when there are at least this many of them: one
#: wording added to a bucket or taken from it moves the ordinal of every variant after its
#: own (16,000 of the 20,000 variants on the benchmark's one-agreement updates), and a
#: statement per variant costs about twice the range's time per variant (SQLite: 47 ms
#: against 26 ms for 11,000); below a few dozen rows the difference is lost in the
#: statements' own cost.
MIN_SHIFT_RUN = 64


def _ordinal_runs(before: np.ndarray, after: np.ndarray,
                  changed: np.ndarray) -> tuple[list[tuple[int, int, int]], np.ndarray]:
    """Ranges of ordinals ``(first, last, step)`` for :meth:`~.store.base.Derived.shift_ordinals`
    and which variants they update, from the figures *before* and *after* of every variant of
    a bucket that is kept (rows aligned; *changed*: those whose figures differ).  A run is MIN_SHIFT_RUN or
    more variants, consecutive by ordinal before, whose ordinals move by one step and nothing
    else changes; its range then holds no other variant of the bucket, since a bucket's
    ordinals are distinct (1 to its number of variants; variants deleted afterwards, whose
    ordinals lie in the gaps, may be moved too).  Only runs moving one way, given in an order
    in which no range catches a variant an earlier one moved (down from the top for steps
    up): the variants stay distinct by ordinal all along."""
    none: list[tuple[int, int, int]] = []
    step = np.where(changed & (before[:, 1:] == after[:, 1:]).all(axis=1), after[:, 0] - before[:, 0], 0)
    moving = np.flatnonzero(step != 0)
    if moving.size < MIN_SHIFT_RUN or np.unique(before[:, 0]).size != before.shape[0]:
        return none, np.zeros(before.shape[0], bool)
    by_ordinal = np.argsort(before[:, 0], kind="stable")
    line = step[by_ordinal]
    # A run: equal non-zero steps on consecutive variants in ordinal order (kept variants
    # only; a deleted variant between them breaks nothing, its ordinal lies in the gap).
    cuts = np.flatnonzero(np.r_[True, line[1:] != line[:-1], True])
    runs = [(a, b) for a, b in zip(cuts[:-1].tolist(), cuts[1:].tolist())
            if line[a] != 0 and b - a >= MIN_SHIFT_RUN]
    if not runs:
        return none, np.zeros(before.shape[0], bool)
    up = max(runs, key=lambda r: r[1] - r[0])
    sign = int(np.sign(line[up[0]]))
    runs = sorted((r for r in runs if np.sign(line[r[0]]) == sign), reverse=sign > 0)
    shifted = np.zeros(before.shape[0], bool)
    out = []
    for a, b in runs:
        shifted[by_ordinal[a:b]] = True
        out.append((int(before[by_ordinal[a], 0]), int(before[by_ordinal[b - 1], 0]), int(line[a])))
    return out, shifted


def _write_variants(store: PrecedentStore, plan: _BucketPlan) -> np.ndarray:
    """Store the bucket's variants -- a label that is a stored variant id keeps it, other
    labels become new variants; only changed rows are written -- and its provisions' variant
    ids; returns the variant id of every wording."""
    assert plan.file is not None
    bucket, hashes, previous = plan.bucket, plan.file["hashes"], plan.file["variant"]
    uniq, inv, figures = plan.labels
    st_ids, st_figures = plan.stored
    pos = np.minimum(np.searchsorted(st_ids, uniq), max(st_ids.size - 1, 0))
    kept = (st_ids[pos] == uniq) if st_ids.size else np.zeros(uniq.size, bool)
    changed = kept & (st_figures[pos] != figures).any(axis=1) if st_ids.size else kept
    shifted = np.zeros(uniq.size, bool)
    held = np.flatnonzero(kept)
    runs, shifted[held] = _ordinal_runs(st_figures[pos[held]], figures[held], changed[held])
    store.shift_ordinals(bucket, runs)
    store.update_variants([(*figures[k].tolist(), int(uniq[k]))
                           for k in np.flatnonzero(changed & ~shifted).tolist()])
    store.delete_variants(st_ids[~np.isin(st_ids, uniq[kept])].tolist())
    ids = uniq.copy()
    for k in np.flatnonzero(~kept).tolist():
        ids[k] = store.add_variant(bucket, figures[k].tolist())
    variant: np.ndarray = ids[inv]
    unset = np.array([h.encode("ascii") for h in plan.unassigned], dtype="S32")
    todo = np.ones(hashes.size, bool) if not plan.trusted else (variant != previous) | np.isin(hashes, unset)
    store.assign_variants(bucket, [(int(variant[i]), hashes[i].decode("ascii"))
                                   for i in np.flatnonzero(todo).tolist()])
    if store.has_labels(bucket):
        for vid in set(ids.tolist()):
            store.update_position(vid)
    return variant


# ----------------------------------------------------------------------------------------
# The vocabulary model
# ----------------------------------------------------------------------------------------


def _training_documents(store: PrecedentStore,
                        fingerprints: list[str]) -> Iterator[tuple[list[str], list[tuple[str, str | None]]]]:
    """Documents in path order for :func:`~.vocab.training_sentences`; appends each one's
    fingerprint (path and SHA-256) to *fingerprints* as it is consumed."""
    for doc_id, path, sha in store.documents_by_path():
        fingerprints.append(f"{path}\x00{sha}")
        yield store.document_terms(doc_id), store.document_texts(doc_id)


class _Training:
    """A vocabulary training decided by :func:`_start_vocabulary`: in a worker process (large
    corpus: it runs beside the clustering, on the other core) or here at :meth:`finish`."""

    def __init__(self, sentences: list[list[str]], state: dict[str, Any]) -> None:
        self.sentences = sentences
        self.state = state
        self._pool: Any = None
        self._job: Any = None
        if state["words"] >= PARALLEL_TRAINING_MIN_WORDS:
            import multiprocessing

            from .vocab import train_model

            self._pool = multiprocessing.get_context("spawn").Pool(1)
            self._job = self._pool.apply_async(train_model, (sentences,))

    def finish(self, store: PrecedentStore) -> None:
        from .vocab import train_model

        if self._job is not None:
            model = self._job.get()
            self.stop()
        else:
            model = train_model(self.sentences)
        if model is None:
            store.delete_blob(VOCAB_FILENAME)
        else:
            _write_blob(store, VOCAB_FILENAME, model.to_npz_bytes())
        store.set_meta("vocabulary", json.dumps(self.state))
        store.checkpoint()

    def stop(self) -> None:
        if self._pool is not None:
            self._pool.terminate()
            self._pool.join()
            self._pool = None


def _start_vocabulary(store: PrecedentStore, aliases: Mapping[str, str]) -> _Training | None:
    """A :class:`_Training` when the model must be (re)trained (:func:`~.vocab.needs_training`:
    its corpus drifted), else None: the model stored is the one this library gives."""
    from .vocab import (
        MAX_TRAINING_WORDS,
        needs_training,
        training_sentences,
        vocabulary_drift,
    )

    raw = store.meta("vocabulary")
    state = json.loads(raw) if raw else None
    alias_key = hashlib.blake2b(json.dumps(aliases, sort_keys=True).encode(), digest_size=16).hexdigest()
    total = store.document_count()
    if state is None or state.get("aliases") != alias_key:
        drift = 1.0
    else:
        trained = state["documents"]
        current = [f"{p}\x00{h}" for _i, p, h in store.documents_by_path(len(trained))]
        drift = vocabulary_drift(trained=trained, current=current, exhausted=state["exhausted"], documents=total)
    if not needs_training(drift=drift, words=state["words"] if state else 0, has_model=state is not None):
        return None
    fingerprints: list[str] = []
    sentences, used, words = training_sentences(_training_documents(store, fingerprints))
    new_state = {"documents": fingerprints[:used], "words": words, "exhausted": words < MAX_TRAINING_WORDS,
                 "aliases": alias_key}
    return _Training(sentences, new_state)


# ----------------------------------------------------------------------------------------
# Reading the index
# ----------------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class BucketIndex:
    """One bucket's distinct wordings: which rows hold each shingle and each word (the
    incidence matrices by columns, :class:`~.bucketcache.BucketColumns`), and the rows'
    figures."""

    name: str
    cols: np.ndarray  # sorted shingle hashes
    cindptr: np.ndarray  # rows holding shingle cols[c]: cindices[cindptr[c]:cindptr[c + 1]]
    cindices: np.ndarray
    sizes: np.ndarray  # shingles per row
    wcols: np.ndarray  # sorted word hashes, with their rows as for the shingles
    wcindptr: np.ndarray
    wcindices: np.ndarray
    count: np.ndarray  # provisions per row
    sample: np.ndarray  # one provision id per row
    variant: np.ndarray  # variant id per row (-1 if none)
    docptr: np.ndarray
    docs: np.ndarray
    document_count: int = 0  # distinct documents with a provision in the bucket

    @property
    def rows(self) -> int:
        return int(self.sizes.size)

    def documents_of(self, row_mask: np.ndarray) -> set[int]:
        rows = np.flatnonzero(row_mask)
        return set(self.docs[ragged(self.docptr, rows)].tolist())

    def all_documents(self) -> set[int]:
        return set(self.docs.tolist())

    def intersections(self, hashes: np.ndarray) -> np.ndarray:
        """|row shingles & hashes| for every row (hashes: sorted unique uint64)."""
        return column_hits(self.cindptr, self.cindices, _columns_of(self.cols, hashes), self.rows)

    def word_hits(self, hashes: np.ndarray) -> np.ndarray:
        return column_hits(self.wcindptr, self.wcindices, _columns_of(self.wcols, hashes), self.rows)


def _columns_of(cols: np.ndarray, hashes: np.ndarray) -> np.ndarray:
    """The positions in *cols* (sorted) of those *hashes* it holds."""
    if hashes.size == 0 or cols.size == 0:
        return np.zeros(0, dtype=np.int64)
    pos = np.searchsorted(cols, hashes)
    ok = pos < cols.size
    pos = pos[ok]
    found: np.ndarray = pos[cols[pos] == hashes[ok]]
    return found


class Library:
    """An open precedent set (read side, plus the reviewer's labels).

    Open with :func:`open_library`; close with :meth:`close` or a ``with`` block.  Use it
    from one thread at a time.  *address* is where the index is kept: a SQLite file path or
    a PostgreSQL address (``postgresql://...``); a server store is read in one consistent
    snapshot while open (:mod:`.store.postgres`).
    """

    def __init__(self, address: str | os.PathLike[str], *, root: str | os.PathLike[str] | None = None) -> None:
        self.store: PrecedentStore = open_store(address)
        try:
            self.store.open(create=False)
        except BaseException:
            self.store.close()
            raise
        self.address = self.store.address
        stored_root = self.store.meta("root")
        if root is not None:
            self.root: Path | None = Path(root)
        elif stored_root:
            self.root = Path(stored_root)
        else:
            self.root = None if is_server_address(address) else Path(address).parent
        self._buckets: dict[str, BucketIndex | None] = {}
        self._neighbours: NeighbourClassifier | None = None
        self._vocab: LibraryVocabulary | Literal[False] | None = None
        self._aliases: dict[str, str] | None = None
        #: The build report when :func:`open_library` refreshed the index, else None.
        self.report: BuildReport | None = None

    # -- context manager ------------------------------------------------------------------
    def __enter__(self) -> Library:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def close(self) -> None:
        self.store.close()

    # -- facts ----------------------------------------------------------------------------
    @property
    def total(self) -> int:
        """Agreements in the index (readable files of the set's formats under the root)."""
        return self.store.document_count()

    def documents(self) -> tuple[tuple[str, str], ...]:
        """(path relative to the root, SHA-256) of every agreement in the index."""
        return tuple((str(p), str(h)) for _id, p, h in self.store.documents_by_path())

    @property
    def stale(self) -> bool:
        return self.store.meta("stale") == "1"

    @property
    def config(self) -> VariantConfig:
        return _variant_config(self.store)

    def failures(self) -> tuple[Failure, ...]:
        return tuple(Failure(p, m) for p, m in self.store.failures())

    def paths(self, *, sha256: str | None = None) -> list[str]:
        """The agreements' paths (relative to the root), sorted; those with content *sha256*
        only, when given."""
        return self.store.paths(sha256=sha256)

    @contextmanager
    def agreement_file(self, path: str) -> Iterator[str]:
        """A local file holding the agreement stored at *path*: the store's copy (a shared
        store keeps them, in a private temporary folder removed afterwards), else the file
        under the root."""
        data = self.store.source_bytes(path)
        if data is None:
            if self.root is None:
                raise CounterdraftError("the store keeps no copy of this agreement", path=path)
            yield str(self.root / path)
            return
        with tempfile.TemporaryDirectory(prefix="counterdraft-") as folder:  # mode 0o700
            local = Path(folder) / PurePosixPath(path).name
            fd = os.open(local, os.O_CREAT | os.O_WRONLY | os.O_EXCL, 0o600)
            with os.fdopen(fd, "wb") as fh:
                fh.write(data)
            yield str(local)

    def aliases(self) -> dict[str, str]:
        if self._aliases is None:
            raw = self.store.meta("aliases")
            self._aliases = json.loads(raw) if raw else {}
        return self._aliases

    def neighbours(self) -> NeighbourClassifier | None:
        """The neighbour classifier fitted on the library (None before the first build)."""
        if self._neighbours is None:
            data = view_blob(self.store, NEIGHBOURS_FILENAME)
            if data is not None:
                self._neighbours = NeighbourClassifier.from_npz_bytes(data)
        return self._neighbours

    @property
    def vocabulary(self) -> LibraryVocabulary | None:
        """The library's vocabulary model (``VocabularyModel`` of the term mapper), or None."""
        if self._vocab is None:
            from .vocab import LibraryVocabulary

            data = self.store.read_blob(VOCAB_FILENAME)
            self._vocab = LibraryVocabulary.from_npz_bytes(data) if data is not None else False
        return self._vocab or None

    def bucket_names(self) -> tuple[str, ...]:
        """The buckets (clause types, ``~kind``) that hold provisions, sorted."""
        return self.store.bucket_names()

    def bucket(self, name: str) -> BucketIndex | None:
        """The frequency index of one bucket (clause type or ``~kind``), None if empty.  Read
        from the bucket's own cache when first asked for (a review reads only the buckets
        its provisions fall in)."""
        if name in self._buckets:
            return self._buckets[name]
        a = _read_bucket_columns(self.store, name)
        b = None
        if a is not None and a.rows:
            b = BucketIndex(name, a.cols, a.cindptr, a.cindices, a.sizes, a.wcols, a.wcindptr, a.wcindices,
                            a.count, a.sample, a.variant, a.docptr, a.docs, int(unique_sorted(a.docs).size))
        self._buckets[name] = b
        return b

    def documents_with(self, bucket: str) -> int:
        b = self.bucket(bucket)
        return 0 if b is None else b.document_count

    def documents_defining(self, names: Sequence[str]) -> int:
        """Agreements defining at least one of the terms *names*."""
        return self.store.documents_defining(names)

    def document_paths(self, ids: Sequence[int]) -> dict[int, str]:
        return self.store.document_paths(ids)

    def provision_refs(self, ids: Sequence[int]) -> dict[int, tuple[str, str]]:
        """``{provision row id: (document path, provision number/heading/id)}``."""
        return {pid: (path, number or heading or local)
                for pid, (path, number, heading, local) in self.store.provision_refs(ids).items()}

    def norms(self, ids: Sequence[int]) -> dict[int, str]:
        """Normalised wordings of provision rows *ids*."""
        return self.store.provision_column("norm", ids)

    def texts(self, ids: Sequence[int]) -> dict[int, str]:
        """Provision texts of provision rows *ids* (for display only; never logged)."""
        return self.store.provision_column("text", ids)

    def term_replacer(self, provision_id: int) -> TermReplacer:
        """The term normaliser of the document holding provision row *provision_id*: its
        defined terms read through the library's aliases, as the index normalised it."""
        return _doc_replacer(self.store.terms_beside(int(provision_id)), self.aliases())

    def variant_positions(self) -> dict[int, str]:
        return self.store.variant_positions()

    # -- variants and labels --------------------------------------------------------------
    def variants(self, *, bucket: str | None = None) -> list[VariantInfo]:
        return [VariantInfo(vid, b, o, w, n, d, pos, path, number or heading or pid, sample)
                for vid, b, o, w, n, d, pos, path, number, heading, pid, sample
                in self.store.variant_rows(bucket)]

    def variant_of(self, document: str, provision: str) -> int | None:
        """The variant of *provision* (number, heading or provision id) in *document* (path
        relative to the root)."""
        found = self.store.find_provision(document, provision)
        return None if found is None else found[0]

    def wording_of(self, document: str, provision: str) -> tuple[str, str] | None:
        """(bucket, wording hash) of *provision* in *document*, None if not in the index."""
        found = self.store.find_provision(document, provision)
        return None if found is None else (found[1], found[2])  # type: ignore[return-value]

    def labels(self) -> list[tuple[str, str, str]]:
        """(bucket, wording hash, position) of every wording labelled, sorted."""
        return self.store.labels()

    def label_variant(self, variant_id: int, position: str | None) -> int:
        """Give every wording of variant *variant_id* the reviewer's *position* (one of
        :data:`POSITIONS`; None removes the label).  Returns the number of wordings labelled."""
        if position is not None:
            position = position_name(position)[0]
        with self.store.write():
            bucket = self.store.variant_bucket(variant_id)
            if bucket is None:
                raise CounterdraftError(f"no variant {variant_id} in the index (see 'counterdraft library stats')",
                                        path=self.address)
            hashes = self.store.variant_wordings(variant_id)
            self.store.set_labels(bucket, hashes, position)
            self.store.update_position(variant_id)
        return len(hashes)


def open_library(root: str | os.PathLike[str] | None = None, *, store: str | os.PathLike[str] | None = None,
                 db_path: str | os.PathLike[str] | None = None, refresh: bool = True,
                 progress: Progress | None = None, cancel: Cancel | CancelFlag | None = None,
                 workers: int = 2, exclude: Sequence[str | os.PathLike[str]] = (),
                 stage: Stage | None = None) -> Library:
    """Open the precedent set of the folder *root*, kept in *store* (a SQLite file path or a
    PostgreSQL address; *db_path* is the same as a file path; by default
    ``root/.counterdraft/library.sqlite``), building or refreshing it from the folder first
    when *refresh* (then ``library.report`` holds the :class:`BuildReport`; *progress* and
    *stage* as for :func:`build_library`).  A server store opened without its folder is read
    as it is."""
    address = store if store is not None else db_path
    if root is None and address is None:
        raise CounterdraftError("give the precedent-set folder or the index path")
    report = None
    if refresh:
        if root is None:
            raise CounterdraftError("refreshing the index needs the precedent-set folder")
        report = build_library(root, store=address, progress=progress, cancel=cancel, workers=workers,
                               exclude=exclude, stage=stage)
    lib = Library(address if address is not None else default_db_path(root), root=root)  # type: ignore[arg-type]
    lib.report = report
    return lib
