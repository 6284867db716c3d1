"""The name of the sparse matrices the precedent set works with.

:data:`SparseMatrix` is a ``scipy.sparse`` CSR (or CSC) matrix.  scipy ships no type
information on the package index the project uses (pyproject's mypy overrides), so the name
only documents which values are sparse matrices; their methods are scipy's, unchecked.
"""

from __future__ import annotations

from typing import Any, TypeAlias

__all__ = ["SparseMatrix"]

#: A ``scipy.sparse`` matrix (``csr_matrix`` unless a function says otherwise).
SparseMatrix: TypeAlias = Any
