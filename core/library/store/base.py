"""What the precedent set asks of its storage: the :class:`PrecedentStore` protocol.

The index (:mod:`core.library.index`) computes; a store keeps.  Every question the index, the
reviews and the ``library`` commands ask of the stored precedent set is one method here, in
the words of the domain (a document, its provisions, a bucket's wordings, a variant, a
label, a derived blob); no caller writes SQL.  Two implementations share one body of SQL
(:mod:`.sql`): the embedded SQLite file of one person (:mod:`.sqlite`) and a PostgreSQL
server a team shares (:mod:`.postgres`).

Row ids are the store's: a document, provision or variant added gets one more than the
largest id in its table (what SQLite does by itself), so two backends fed the same changes
give the same ids.

Writing: one writer at a time per store (:meth:`PrecedentStore.lock`); a build calls
:meth:`~PrecedentStore.checkpoint` where progress may be kept if it stops (SQLite commits
there; a server store keeps the whole build in one transaction, so that its readers see the
precedent set as it was before the build or after it, never half-way) and
:meth:`~PrecedentStore.commit` at its end.  A short change outside a build (a label) runs in
:meth:`~PrecedentStore.write`.
"""

from __future__ import annotations

from collections.abc import Iterable, Iterator, Mapping, Sequence
from contextlib import AbstractContextManager
from pathlib import Path
from typing import Literal, Protocol

__all__ = [
    "VARIANT_FIGURES",
    "Derived",
    "DocumentState",
    "Documents",
    "FailureState",
    "Lifecycle",
    "PrecedentStore",
    "Reading",
    "Wordings",
    "ProvisionRow",
    "StoreDamaged",
    "IndexRow",
    "TermRow",
    "UntypedRow",
    "VariantRow",
]

#: The figures a variant row keeps, in this order (see :func:`core.library.index._variant_figures`).
VARIANT_FIGURES: tuple[str, ...] = ("ordinal", "wordings", "provisions", "documents", "sample")

#: (id, sha256, size, mtime_ns) of a stored document, by path.
DocumentState = tuple[int, str, int, int]
#: (sha256 or None, size, mtime_ns) of a file recorded as unreadable, by path.
FailureState = tuple[str | None, int, int]
#: (pid, kind, number, heading, level, parent, text, clause_type, type_source, bucket)
ProvisionRow = tuple[str, str, str | None, str | None, int, str | None, str, str | None, str, str]
#: (term, definition, provision id, uses)
TermRow = tuple[str, str, str | None, int]
#: (row id, kind, norm, clause type, bucket) of a provision typed by its neighbours or not at all.
UntypedRow = tuple[int, str, str | None, str | None, str]
#: (id, bucket, ordinal, wordings, provisions, documents, position, sample path, number,
#: heading, pid, sample id) of a variant; the sample's columns are None when it is gone.
VariantRow = tuple[int, str, int, int, int, int, str | None, str | None, str | None, str | None, str | None,
                   int | None]
#: (row id, document id, document path, provision id, clause type, type source, bucket,
#: wording hash, variant id) of a provision.
IndexRow = tuple[int, int, str, str, str | None, str, str, str | None, int | None]


class StoreDamaged(Exception):
    """The store is not usable as it is (a damaged or foreign SQLite file); ``problem`` says
    why.  A build sets it aside and starts over (:meth:`PrecedentStore.start_over`)."""

    def __init__(self, problem: str) -> None:
        super().__init__(problem)
        self.problem = problem


class Lifecycle(Protocol):
    """Opening, transactions, the writer lock, damage."""

    #: Where the store is, as shown to people: a file path, or a server address without
    #: any password.  Reopening it gives the same store.
    address: str

    def open(self, *, create: bool) -> None:
        """Make the store ready: create it (*create*) or check it; raises
        :class:`StoreDamaged` or :class:`~core.errors.CounterdraftError`."""
    def lock(self) -> AbstractContextManager[None]:
        """Hold the store's writer lock (one build or label at a time; readers never wait)."""
    def write(self) -> AbstractContextManager[None]:
        """A short change under the writer lock, committed at the end."""
    def checkpoint(self) -> None:
        """Keep the progress of a long write if the backend keeps partial progress."""
    def commit(self) -> None:
        """End the current write transaction."""
    def close(self) -> None: ...
    def damage(self, err: BaseException) -> str | None:
        """The problem when *err* says the store itself is damaged, else None."""
    def describe_error(self, err: BaseException) -> str | None:
        """One line for a storage error *err* (None when *err* is not one)."""
    def start_over(self, problem: str) -> str:
        """Set a damaged store aside, start an empty one; a one-line note saying so."""

    def size_bytes(self) -> int:
        """Bytes the store takes (its files, or its database)."""


class Documents(Protocol):
    """Settings, and the documents themselves: add, replace, remove, list."""

    def meta(self, key: str) -> str | None: ...
    def set_meta(self, key: str, value: str) -> None: ...
    def delete_meta(self, *keys: str) -> None: ...

    def file_states(self) -> tuple[dict[str, DocumentState], dict[str, FailureState]]:
        """Every stored document and every recorded failure, by path."""
    def remove_document(self, path: str) -> None:
        """Drop a document with its provisions and terms (its buckets marked dirty)."""
    def remove_failure(self, path: str) -> None: ...
    def update_stat(self, path: str, *, size: int, mtime_ns: int) -> None:
        """A file whose content is unchanged got a new size or modification time."""
    def put_document(self, path: str, *, sha256: str, size: int, mtime_ns: int, title: str | None,
                     parties: Sequence[str], provisions: Sequence[ProvisionRow], terms: Sequence[TermRow],
                     source: Path) -> None:
        """Add or replace the document at *path* (its old and new buckets marked dirty);
        *source* is the file read, which a server store keeps for reviews elsewhere."""
    def put_failure(self, path: str, *, sha256: str | None, size: int, mtime_ns: int, problem: str) -> None:
        """Record *path* as unreadable, replacing any document stored at it."""
    def document_count(self) -> int: ...
    def failures(self) -> list[tuple[str, str]]:
        """(path, problem) of every unreadable file, by path."""
    def paths(self, *, sha256: str | None = None) -> list[str]:
        """Document paths, sorted (only those with content *sha256* when given)."""
    def source_bytes(self, path: str) -> bytes | None:
        """The file of the document at *path* when the store keeps files, else None."""



class Wordings(Protocol):
    """What a build computes from the documents first: normalised wordings, clause types."""

    def all_terms(self) -> list[tuple[int, str, str]]:
        """(document id, term, definition) of every defined term."""
    def renormalise_all(self) -> None:
        """Mark every document to be normalised again."""
    def unnormalised_documents(self) -> list[int]: ...
    def document_terms(self, document_id: int) -> list[str]: ...
    def document_wordings(self, document_id: int) -> list[tuple[int, str | None, str]]:
        """(provision id, heading, text) of a document's provisions."""
    def set_norms(self, document_id: int, rows: Sequence[tuple[str, str, int]]) -> None:
        """Store (normalised wording, its hash, provision id) rows; the document is normalised."""
    def typed_examples(self, *, exclude_hash: str) -> Iterator[tuple[str, str, int, int]]:
        """(clause type, wording hash, provision id, document id) of provisions typed by
        heading or parent, documents in the order of their SHA-256 (then path), provisions
        in order."""
    def typed_examples_within(self, *, exclude_hash: str,
                              limits: Mapping[str, Sequence[int]]) -> list[tuple[str, str, int, int]]:
        """The rows of :meth:`typed_examples` (in no order) of each clause type of *limits*
        in its documents only, and every row of the other types."""
    def documents_by_hash(self) -> list[tuple[int, str, str]]:
        """(id, sha256, path), by SHA-256 then path."""
    def provision_column(self, column: Literal["norm", "text"], ids: Sequence[int]) -> dict[int, str]: ...
    def untyped_provisions(self, document_ids: Sequence[int] | None = None) -> list[UntypedRow]:
        """(id, kind, norm, clause type, bucket) of provisions typed by neighbours or not at
        all (of *document_ids* only, when given)."""
    def retype(self, updates: Sequence[tuple[str | None, str, str, int, str]]) -> None:
        """Apply (clause type, type source, bucket, provision id, old bucket) updates; both
        buckets marked dirty."""



class Derived(Protocol):
    """What a build computes and keeps from the wordings: buckets, variants, the vocabulary's
    corpus, derived blobs (frequency caches, models)."""

    def mark_dirty(self, buckets: Iterable[str] | None = None) -> None:
        """Mark *buckets* (every bucket holding a provision when None) to be refreshed."""
    def dirty_buckets(self) -> list[str]: ...
    def clear_dirty(self, bucket: str) -> None: ...
    def forget_bucket_states(self) -> None:
        """Every bucket is clustered in full at its next refresh."""
    def bucket_state(self, bucket: str) -> tuple[int, int] | None:
        """(wordings at the last full clustering, wordings changed since), or None."""
    def add_drift(self, bucket: str, changes: int) -> None: ...
    def set_clustered(self, bucket: str, wordings: int) -> None: ...
    def drop_bucket(self, bucket: str) -> None:
        """A bucket left without provisions: its variants and state go."""
    def wording_counts(self, bucket: str) -> list[tuple[str, int]]:
        """(wording hash, provisions) of a bucket, by hash."""
    def wording_places(self, bucket: str) -> list[tuple[int, int, int]]:
        """(document id, ordinal, provision id) of a bucket's provisions, by wording hash,
        document id and ordinal."""
    def wording_texts(self, bucket: str, hashes: Sequence[str]) -> Iterator[tuple[str, bytes | None, str | None]]:
        """(hash, stored shingles of earlier versions or None, normalised wording)."""
    def bucket_rows(self, bucket: str) -> list[tuple[str, int, bytes | None, str | None, int]]:
        """(hash, provisions, stored shingles, wording, lowest provision id) per distinct
        wording, most provisions first, then by hash."""
    def variant_figures(self, bucket: str) -> list[tuple[int, ...]]:
        """(id, *VARIANT_FIGURES) of a bucket's variants, by id."""
    def update_variants(self, rows: Sequence[tuple[int, ...]]) -> None:
        """(*VARIANT_FIGURES, id) rows."""
    def shift_ordinals(self, bucket: str, runs: Sequence[tuple[int, int, int]]) -> None:
        """For each ``(first, last, step)`` in turn: the bucket's variants whose ordinal lies
        between *first* and *last* (both included) move by *step*."""
    def delete_variants(self, ids: Sequence[int]) -> None: ...
    def add_variant(self, bucket: str, figures: Sequence[int]) -> int: ...
    def unassigned_wordings(self, bucket: str) -> list[str]:
        """Hashes of the bucket's wordings with a provision that has no variant."""
    def assign_variants(self, bucket: str, rows: Sequence[tuple[int, str]]) -> None:
        """(variant id, wording hash): every provision of the wording gets the variant."""
    def has_labels(self, bucket: str) -> bool: ...
    def update_position(self, variant_id: int) -> str | None:
        """A variant's position: the label most of its labelled wordings carry (ties: the
        most recent label)."""

    def document_texts(self, document_id: int) -> list[tuple[str, str | None]]:
        """(text, wording hash) of a document's provisions, in order."""

    def read_blob(self, name: str) -> bytes | None: ...
    def write_blob(self, name: str, data: bytes) -> None: ...
    def delete_blob(self, name: str) -> None: ...


class Reading(Protocol):
    """What reviews, stats, calibration and labels ask: variants and counts, positions."""

    def documents_by_path(self, limit: int | None = None) -> list[tuple[int, str, str]]:
        """(id, path, sha256), by path (the first *limit*): the agreements, and the
        vocabulary's corpus."""
    def bucket_names(self) -> tuple[str, ...]: ...
    def document_paths(self, ids: Sequence[int]) -> dict[int, str]: ...
    def provision_refs(self, ids: Sequence[int]) -> dict[int, tuple[str, str | None, str | None, str]]:
        """(document path, number, heading, provision id) by provision row id."""
    def terms_beside(self, provision_id: int) -> list[str]:
        """The defined terms of the document holding a provision."""
    def variant_positions(self) -> dict[int, str]: ...
    def variant_rows(self, bucket: str | None = None) -> list[VariantRow]:
        """The variants (:data:`VariantRow`) by bucket and ordinal."""
    def find_provision(self, document: str, provision: str) -> tuple[int | None, str, str | None] | None:
        """(variant id, bucket, wording hash) of a provision named by number, id or heading."""
    def variant_bucket(self, variant_id: int) -> str | None: ...
    def variant_wordings(self, variant_id: int) -> list[str]: ...
    def set_labels(self, bucket: str, hashes: Sequence[str], position: str | None) -> None: ...
    def labels(self) -> list[tuple[str, str, str]]:
        """(bucket, wording hash, position), sorted."""
    def type_counts(self) -> dict[str, tuple[int, int]]:
        """Provisions and documents per bucket."""
    def variant_counts(self) -> dict[str, tuple[int, int]]:
        """Variants and labelled variants per bucket."""
    def provision_count(self) -> int: ...
    def term_count(self) -> int: ...
    def documents_defining(self, names: Sequence[str]) -> int:
        """Documents defining at least one of *names*."""
    def provision_rows(self) -> list[IndexRow]:
        """Every provision (:data:`IndexRow`), by path and order: the whole index, to compare
        two stores."""


class PrecedentStore(Lifecycle, Documents, Wordings, Derived, Reading, Protocol):
    """The stored precedent set (see the module docstring): five small protocols in one."""
