"""The frequency cache of one bucket (clause type): its distinct wordings as arrays.

One file per bucket (``.counterdraft/buckets/<name>.npz``) holds, for every distinct
normalised wording of the bucket (rows ordered most frequent first, then by wording hash):
its hash, its shingle and word hash sets as 0/1 incidence matrices over sorted hash columns,
its provision count, a sample provision, its variant and the documents using it.  No text.
The build works on the matrices by rows (CSR, :class:`BucketArrays`); the file keeps them by
columns (CSC), the form a review asks its questions in ("which wordings hold these
shingles?", :class:`BucketColumns`), so that a review reads them as they are, without
``scipy.sparse`` (one form only: the index stays as large as before).  :func:`assemble`
makes the next version of a bucket's arrays from the previous one and the wordings that are
new, moving whole rows (no re-hashing of known wordings), so a build that adds one agreement
rewrites only the buckets that agreement touches, in time linear in their size.

Cost: :func:`assemble` is O(nnz) array work (row selection, column remapping) plus
O(new wordings' words) hashing; :func:`compact` (dropping hash columns no row uses) sorts the
used columns once; writing and reading a file for the build turns the matrices round (O(nnz)).
"""

from __future__ import annotations

import io
import mmap
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, replace
from typing import overload

import numpy as np

from .npzview import stored_arrays
from .sparse import Csr, SparseMatrix
from .variants import incidence_matrix

__all__ = ["BucketArrays", "BucketColumns", "assemble", "cache_head", "compact", "npz_bytes", "rows_of"]

#: The arrays kept as they are held (everything but the incidence matrices).
_PLAIN = ("hashes", "cols", "sizes", "wcols", "count", "sample", "variant", "docptr", "docs")
#: The incidence matrices by columns: shingles (``c``) and words (``wc``).
_COLUMNS = ("cindptr", "cindices", "wcindptr", "wcindices")
#: The same by rows, as caches written before the columns were kept hold them.
_ROWS = ("indptr", "indices", "windptr", "windices")


@dataclass(frozen=True, slots=True)
class BucketArrays:
    """One bucket's distinct wordings (see the module docstring); rows align across fields."""

    hashes: np.ndarray  # "S32": the wordings' hex hashes
    cols: np.ndarray  # sorted shingle hashes (uint64)
    indptr: np.ndarray  # CSR rows over cols
    indices: np.ndarray
    sizes: np.ndarray  # shingles per row (int32)
    wcols: np.ndarray  # sorted word hashes
    windptr: np.ndarray
    windices: np.ndarray
    count: np.ndarray  # provisions per row (int32)
    sample: np.ndarray  # one provision row id per row (int64)
    variant: np.ndarray  # variant id per row (int64, -1 if none)
    docptr: np.ndarray  # documents of row i: docs[docptr[i]:docptr[i + 1]]
    docs: np.ndarray

    @property
    def rows(self) -> int:
        return int(self.hashes.size)

    def shingle_matrix(self) -> SparseMatrix:
        return _csr(self.indptr, self.indices, self.rows, self.cols.size)

    def word_matrix(self) -> SparseMatrix:
        return _csr(self.windptr, self.windices, self.rows, self.wcols.size)

    def shingle_sets(self) -> Sequence[np.ndarray]:
        """Each row's shingle hashes, made when asked for (a slice gives a list), so that a
        bucket of 100,000 wordings is not copied into as many arrays at once."""
        return _RowSets(self.cols, self.indptr, self.indices)

    def file_arrays(self) -> dict[str, np.ndarray]:
        """The arrays of the cache file, by name: the plain ones and the incidence matrices
        by columns (module docstring); :func:`npz_bytes` writes them."""
        cindptr, cindices = _turned(self.indptr, self.indices, (self.rows, self.cols.size), by_rows=True)
        wcindptr, wcindices = _turned(self.windptr, self.windices, (self.rows, self.wcols.size), by_rows=True)
        return {**{f: getattr(self, f) for f in _PLAIN}, "cindptr": cindptr, "cindices": cindices,
                "wcindptr": wcindptr, "wcindices": wcindices}

    def to_npz_bytes(self) -> bytes:
        """The cache file."""
        return npz_bytes(self.file_arrays())

    @classmethod
    def from_npz_bytes(cls, data: bytes | mmap.mmap) -> BucketArrays:
        with np.load(io.BytesIO(data), allow_pickle=False) as a:
            plain = {f: a[f] for f in _PLAIN}
            if "cindptr" not in a.files:  # written before the columns were kept
                return cls(**plain, **{f: a[f] for f in _ROWS})
            rows = int(plain["hashes"].size)
            indptr, indices = _turned(a["cindptr"], a["cindices"], (rows, int(plain["cols"].size)), by_rows=False)
            windptr, windices = _turned(a["wcindptr"], a["wcindices"], (rows, int(plain["wcols"].size)),
                                        by_rows=False)
        return cls(**plain, indptr=indptr, indices=indices, windptr=windptr, windices=windices)


def cache_head(data: bytes | mmap.mmap) -> tuple[np.ndarray, np.ndarray]:
    """The wordings' hashes and variants of a bucket's cache file, those two arrays only
    read; what :meth:`BucketArrays.from_npz_bytes` raises for a damaged file."""
    with np.load(io.BytesIO(data), allow_pickle=False) as a:
        return a["hashes"], a["variant"]


def npz_bytes(arrays: Mapping[str, np.ndarray]) -> bytes:
    """The cache file holding *arrays* (:meth:`BucketArrays.file_arrays`, possibly with other
    values of the same shapes)."""
    buf = io.BytesIO()
    np.savez(buf, allow_pickle=False, **arrays)
    return buf.getvalue()


def _turned(indptr: np.ndarray, indices: np.ndarray, shape: tuple[int, int], *,
            by_rows: bool) -> tuple[np.ndarray, np.ndarray]:
    """A 0/1 matrix of *shape* given by rows (*by_rows*) or by columns, the other way round:
    (pointers as int64, indices as int32), each line's indices ascending (scipy's conversion,
    for the build; one-byte values, as only the pattern matters)."""
    from scipy.sparse import csc_matrix, csr_matrix

    ones = np.ones(indices.size, dtype=np.int8)
    m = (csr_matrix((ones, indices, indptr), shape=shape).tocsc() if by_rows
         else csc_matrix((ones, indices, indptr), shape=shape).tocsr())
    return m.indptr.astype(np.int64, copy=False), m.indices.astype(np.int32, copy=False)


@dataclass(frozen=True, slots=True)
class BucketColumns:
    """What a review reads of a bucket's cache: the incidence matrices by columns (column
    ``c`` of the shingles holds the rows ``cindices[cindptr[c]:cindptr[c + 1]]``) and the
    rows' figures (see :class:`BucketArrays`).  Read without ``scipy.sparse``."""

    cols: np.ndarray
    cindptr: np.ndarray
    cindices: np.ndarray
    sizes: np.ndarray
    wcols: np.ndarray
    wcindptr: np.ndarray
    wcindices: np.ndarray
    count: np.ndarray
    sample: np.ndarray
    variant: np.ndarray
    docptr: np.ndarray
    docs: np.ndarray

    @property
    def rows(self) -> int:
        return int(self.sizes.size)

    @classmethod
    def from_npz_bytes(cls, data: bytes | mmap.mmap) -> BucketColumns:
        """The arrays read in place from *data* (read-only views: no copy), as the build
        wrote them."""
        fields = ("cols", "sizes", "wcols", "count", "sample", "variant", "docptr", "docs")
        found = stored_arrays(data, (*fields, *_COLUMNS))
        if found is not None:
            return cls(**found)
        with np.load(io.BytesIO(data), allow_pickle=False) as a:
            plain = {f: a[f] for f in fields}
            if "cindptr" in a.files:
                return cls(**plain, **{f: a[f] for f in _COLUMNS})
            # A cache written before the columns were kept (its next build rewrites it).
            cindptr, cindices = _by_columns(a["indptr"], a["indices"], int(plain["cols"].size))
            wcindptr, wcindices = _by_columns(a["windptr"], a["windices"], int(plain["wcols"].size))
        return cls(**plain, cindptr=cindptr, cindices=cindices, wcindptr=wcindptr, wcindices=wcindices)


def _by_columns(indptr: np.ndarray, indices: np.ndarray, cols: int) -> tuple[np.ndarray, np.ndarray]:
    """(column pointers, row indices) of a 0/1 matrix given by rows, with numpy alone."""
    t = Csr(indptr, indices, np.ones(indices.size, dtype=np.int32), (int(indptr.size - 1), cols)).transpose()
    return t.indptr.astype(np.int64), t.indices.astype(np.int32)


class _RowSets(Sequence[np.ndarray]):
    """The rows of a CSR incidence matrix as hash arrays, made on access."""

    def __init__(self, cols: np.ndarray, indptr: np.ndarray, indices: np.ndarray) -> None:
        self._cols, self._indptr, self._indices = cols, indptr, indices

    def __len__(self) -> int:
        return int(self._indptr.size - 1)

    def _row(self, i: int) -> np.ndarray:
        row: np.ndarray = self._cols[self._indices[self._indptr[i]:self._indptr[i + 1]]]
        return row

    @overload
    def __getitem__(self, key: int) -> np.ndarray: ...
    @overload
    def __getitem__(self, key: slice) -> list[np.ndarray]: ...

    def __getitem__(self, key: int | slice) -> np.ndarray | list[np.ndarray]:
        if isinstance(key, slice):
            return [self._row(i) for i in range(*key.indices(len(self)))]
        if key < 0:
            key += len(self)
        if not 0 <= key < len(self):
            raise IndexError(key)
        return self._row(key)


def _csr(indptr: np.ndarray, indices: np.ndarray, rows: int, cols: int) -> SparseMatrix:
    from scipy.sparse import csr_matrix

    return csr_matrix((np.ones(indices.size, dtype=np.int32), indices, indptr), shape=(rows, cols))


def _merge(cols: np.ndarray, matrix: SparseMatrix | None, take: np.ndarray,
           new_sets: Sequence[np.ndarray]) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(columns, indptr, indices) of rows that are old rows ``take[i] >= 0`` or, in order, the
    sets of *new_sets* (``take[i] < 0``)."""
    from scipy.sparse import vstack

    if not (take >= 0).any():  # no old row (a new bucket, a first build): build directly, in order
        m, merged = incidence_matrix(list(new_sets))
        return merged, m.indptr.astype(np.int64), m.indices.astype(np.int32)
    flat = np.unique(np.concatenate(list(new_sets))) if new_sets else np.zeros(0, np.uint64)
    pos = np.searchsorted(cols, flat)
    known = (pos < cols.size) & (cols[np.minimum(pos, max(cols.size - 1, 0))] == flat) if cols.size \
        else np.zeros(flat.size, bool)
    missing = flat[~known]
    merged = np.insert(cols, np.searchsorted(cols, missing), missing)
    old_rows = take[take >= 0]
    sub = matrix[old_rows] if matrix is not None else _csr(np.zeros(1, np.int64), np.zeros(0, np.int32), 0, 0)
    sub = _csr(sub.indptr.astype(np.int64), (np.arange(cols.size) + np.searchsorted(missing, cols))[sub.indices],
               old_rows.size, merged.size)
    new_m, _ = incidence_matrix(list(new_sets), columns=merged)
    stacked = vstack([sub, new_m.tocsr()], format="csr")
    order = np.empty(take.size, dtype=np.int64)
    order[take >= 0] = np.arange(old_rows.size)
    order[take < 0] = old_rows.size + np.arange(int((take < 0).sum()))
    out = stacked[order]
    out.sort_indices()
    return merged, out.indptr.astype(np.int64), out.indices.astype(np.int32)


def assemble(old: BucketArrays | None, *, hashes: Sequence[str], count: np.ndarray, sample: np.ndarray,
             docptr: np.ndarray, docs: np.ndarray, new_sets: Mapping[str, tuple[np.ndarray, np.ndarray]],
             variant: np.ndarray | None = None) -> BucketArrays:
    """The arrays of a bucket whose wordings are now *hashes* (in the bucket's order), moving
    known wordings' rows from *old* and taking the others' ``(shingle hashes, word hashes)``
    from *new_sets*.  *variant* defaults to the old rows' variants (-1 for new rows)."""
    key = np.array(list(hashes), dtype="S32") if len(hashes) else np.zeros(0, "S32")
    take = rows_of(old.hashes if old is not None else np.zeros(0, "S32"), key)
    fresh = [hashes[i] for i in np.flatnonzero(take < 0).tolist()]
    empty = np.zeros(0, np.uint64)
    oc, om = (old.cols, old.shingle_matrix()) if old is not None else (empty, None)
    ow, owm = (old.wcols, old.word_matrix()) if old is not None else (empty, None)
    cols, indptr, indices = _merge(oc, om, take, [new_sets[h][0] for h in fresh])
    wcols, windptr, windices = _merge(ow, owm, take, [new_sets[h][1] for h in fresh])
    sizes = np.diff(indptr).astype(np.int32)
    if variant is None:
        variant = np.full(take.size, -1, dtype=np.int64)
        if old is not None and old.rows:
            variant[take >= 0] = old.variant[take[take >= 0]]
    return BucketArrays(key, cols, indptr, indices, sizes, wcols, windptr, windices,
                        np.asarray(count, dtype=np.int32), np.asarray(sample, dtype=np.int64),
                        np.asarray(variant, dtype=np.int64), np.asarray(docptr, dtype=np.int64),
                        np.asarray(docs, dtype=np.int64))


def rows_of(known: np.ndarray, wanted: np.ndarray) -> np.ndarray:
    """For each hash of *wanted*, its row in *known* ("S32" arrays, any order), or -1."""
    if known.size == 0:
        return np.full(wanted.size, -1, dtype=np.int64)
    sorter = np.argsort(known)
    pos = np.minimum(np.searchsorted(known, wanted, sorter=sorter), known.size - 1)
    rows = sorter[pos]
    return np.where(known[rows] == wanted, rows, -1).astype(np.int64)


def _compact_columns(cols: np.ndarray, indices: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    used = np.unique(indices)
    return cols[used], np.searchsorted(used, indices).astype(np.int32)


def compact(arrays: BucketArrays) -> BucketArrays:
    """The same rows without the hash columns no row uses any more (after removals)."""
    cols, indices = _compact_columns(arrays.cols, arrays.indices)
    wcols, windices = _compact_columns(arrays.wcols, arrays.windices)
    return replace(arrays, cols=cols, indices=indices, wcols=wcols, windices=windices)
