"""Sparse matrices of the precedent set.

:data:`SparseMatrix` names a ``scipy.sparse`` CSR (or CSC) matrix: the build works with them.
scipy ships no type information on the package index the project uses (pyproject's mypy
overrides), so the name only documents which values are sparse matrices; their methods are
scipy's, unchecked.

A review reads the index without importing ``scipy.sparse`` (loading it costs about a tenth
of a second, as much as the rest of the library's work on a review): :class:`Csr` holds a
matrix as plain numpy arrays in compressed sparse row form, with the few operations a review
needs, each done with numpy alone and giving scipy's results exactly (same sums in the same
order; tests/core/library/test_sparse.py compares them with scipy's).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, TypeAlias

import numpy as np

__all__ = ["Csr", "SparseMatrix", "column_hits", "ragged", "unique_sorted"]

#: A ``scipy.sparse`` matrix (``csr_matrix`` unless a function says otherwise).
SparseMatrix: TypeAlias = Any


#: Products :meth:`Csr.dot` works on at a time (some 40 MB of arrays): a review's few hundred
#: queries make well under it; a build types thousands of clauses a chunk at a time.
DOT_BLOCK = 1 << 20


def _pointers(rows: np.ndarray, count: int) -> np.ndarray:
    """Row pointers of entries whose rows are *rows* (ascending), for *count* rows."""
    indptr = np.zeros(count + 1, dtype=np.int64)
    np.cumsum(np.bincount(rows, minlength=count), out=indptr[1:])
    return indptr


@dataclass(frozen=True, slots=True)
class Csr:
    """A sparse matrix in compressed sparse row form: row ``i`` holds the entries
    ``data[indptr[i]:indptr[i + 1]]`` in the columns ``indices[indptr[i]:indptr[i + 1]]``."""

    indptr: np.ndarray
    indices: np.ndarray
    data: np.ndarray
    shape: tuple[int, int]

    @classmethod
    def from_entries(cls, rows: np.ndarray, cols: np.ndarray, data: np.ndarray, shape: tuple[int, int]) -> Csr:
        """The matrix of distinct entries ``(rows[k], cols[k]) = data[k]`` given in row-major
        order (rows ascending, then columns), as scipy's ``csr_matrix((data, (rows, cols)))``
        stores them."""
        indices = np.asarray(cols).astype(_index_dtype(shape[1], rows.size))
        indptr = _pointers(np.asarray(rows, dtype=np.int64), shape[0]).astype(indices.dtype)
        return cls(indptr, indices, np.asarray(data), (int(shape[0]), int(shape[1])))

    @classmethod
    def empty(cls, columns: int) -> Csr:
        """A matrix of no rows and *columns* columns."""
        return cls(np.zeros(1, dtype=np.int32), np.zeros(0, dtype=np.int32), np.zeros(0), (0, int(columns)))

    @property
    def nnz(self) -> int:
        return int(self.indices.size)

    def toarray(self) -> np.ndarray:
        """The dense matrix."""
        out = np.zeros(self.shape, dtype=self.data.dtype)
        out[np.repeat(np.arange(self.shape[0]), np.diff(self.indptr)), self.indices] = self.data
        return out

    def transpose(self) -> Csr:
        """The transpose, rows of each column kept in ascending order (scipy's ``tocsc``
        arrays read as the transpose's CSR).  A stable sort of the column indices: meant for
        matrices of up to about a million entries."""
        order = np.argsort(self.indices, kind="stable")
        rows = np.repeat(np.arange(self.shape[0], dtype=np.int64), np.diff(self.indptr))
        cols = self.indices[order].astype(np.int64)
        return Csr.from_entries(cols, rows[order], self.data[order], (self.shape[1], self.shape[0]))

    def dot(self, other: Csr) -> np.ndarray:
        """The dense product ``self @ other``.  Each cell sums its products in the order of
        this row's entries, starting from zero, as scipy's sparse product does, so the
        figures are bit for bit scipy's.  Memory: about 40 bytes per product in flight, at
        most ``DOT_BLOCK`` products at a time (rows are taken in blocks)."""
        n_rows, n_out = self.shape[0], other.shape[1]
        out = np.zeros((n_rows, n_out))
        if n_rows == 0 or n_out == 0 or self.nnz == 0:
            return out
        # Products each row makes, and blocks of whole rows making at most DOT_BLOCK of them.
        made = np.diff(other.indptr).astype(np.int64)[self.indices]
        per_row = np.add.reduceat(np.concatenate([made, [0]]), self.indptr[:-1].astype(np.int64))
        per_row[np.diff(self.indptr) == 0] = 0
        first = 0
        while first < n_rows:
            last = first + max(1, int(np.searchsorted(np.cumsum(per_row[first:]), DOT_BLOCK, side="right")))
            self._dot_rows(other, first, min(last, n_rows), out)
            first = last
        return out

    def _dot_rows(self, other: Csr, first: int, last: int, out: np.ndarray) -> None:
        """Rows *first*..*last* (excluded) of ``self @ other`` into *out*."""
        lo, hi = int(self.indptr[first]), int(self.indptr[last])
        cols = self.indices[lo:hi]
        # Every entry (i, k) of this matrix meets every entry (k, j) of *other*: those
        # products, in this matrix's entry order, summed per cell (i, j) by bincount, which
        # adds in the order given.  In place where possible: these arrays are the cost.
        starts = other.indptr[cols].astype(np.int64)
        lengths = other.indptr[cols + 1].astype(np.int64) - starts
        ends = np.cumsum(lengths)
        if ends.size == 0 or ends[-1] == 0:
            return
        n_out = out.shape[1]
        picks = np.arange(int(ends[-1]), dtype=np.int64)
        picks += np.repeat(starts - (ends - lengths), lengths)
        rows = np.repeat(np.arange(0, (last - first) * n_out, n_out, dtype=np.int64),
                         np.diff(self.indptr[first:last + 1]))
        cells = np.repeat(rows, lengths)
        cells += other.indices[picks]
        weights = np.repeat(self.data[lo:hi].astype(np.float64, copy=False), lengths)
        weights *= other.data[picks]
        out[first:last] = np.bincount(cells, weights=weights, minlength=(last - first) * n_out).reshape(-1, n_out)


def _index_dtype(columns: int, entries: int) -> type[np.integer[Any]]:
    """int32 where it holds every index, as scipy chooses."""
    return np.int32 if max(columns, entries) <= np.iinfo(np.int32).max else np.int64


def ragged(indptr: np.ndarray, picks: np.ndarray) -> np.ndarray:
    """Positions ``indptr[p]:indptr[p + 1]`` for every p of *picks*, concatenated."""
    starts = indptr[picks].astype(np.int64)
    lengths = indptr[picks + 1].astype(np.int64) - starts
    total = int(lengths.sum())
    if total == 0:
        return np.zeros(0, dtype=np.int64)
    offsets = np.repeat(starts - np.cumsum(lengths) + lengths, lengths)
    return offsets + np.arange(total, dtype=np.int64)


def column_hits(indptr: np.ndarray, indices: np.ndarray, picks: np.ndarray, rows: int) -> np.ndarray:
    """For a 0/1 matrix of *rows* rows given by columns (CSC: column ``c`` holds the rows
    ``indices[indptr[c]:indptr[c + 1]]``): how many of the columns *picks* (distinct) each row
    has, i.e. the product of the matrix with the 0/1 vector of *picks*."""
    if picks.size == 0:
        return np.zeros(rows, dtype=np.int64)
    # One slice per picked column, joined: cheaper than building every position first.
    starts, ends = indptr[picks].tolist(), indptr[picks + 1].tolist()
    taken = np.concatenate([indices[s:e] for s, e in zip(starts, ends)])
    return np.bincount(taken, minlength=rows).astype(np.int64, copy=False)


def unique_sorted(values: np.ndarray) -> np.ndarray:
    """``np.unique(values)`` of a 1-d array, by a sort.  numpy's own asks ``numpy.ma`` first,
    whose import (about a hundredth of a second) a review otherwise never needs."""
    a = np.sort(values, kind="stable")
    if a.size == 0:
        return a
    keep = np.empty(a.size, dtype=bool)
    keep[0] = True
    np.not_equal(a[1:], a[:-1], out=keep[1:])
    out: np.ndarray = a[keep]
    return out
