"""Maximum-weight assignment (the linear assignment problem) without scipy's import cost.

:func:`max_weight_assignment` returns, for a rectangular weight matrix, ``min(rows,
columns)`` (row, column) pairs, no row or column twice, whose total weight is the largest
possible: what ``scipy.optimize.linear_sum_assignment(weights, maximize=True)`` returns (the
tests compare the totals with scipy's on random matrices).  The review solves small problems
(the provisions of one connected component of the alignment's candidate graph, the terms
only one document defines), where importing scipy (about 0.3 s) would cost far more than
solving them.

Algorithm: shortest augmenting paths with row and column potentials (Kuhn's Hungarian method
in the form of Jonker and Volgenant, "A shortest augmenting path algorithm for dense and
sparse linear assignment problems", Computing 38, 1987; the formulation follows the
well-known O(n^2 m) textbook version).  As in Jonker and Volgenant's initialisation, each
row's potential starts at its smallest cost (row reduction) and each row takes its cheapest
column when no earlier row took it; every other row is then added by a Dijkstra search on
the reduced costs until it reaches a free column.  Small problems run in
plain Python; from :data:`VECTOR_CELLS` cells the inner loop over the columns runs on numpy
arrays (imported then), and from :data:`SCIPY_CELLS` cells scipy's solver takes over.

Timing: O(n^2 m) for n <= m in the worst case; a search usually stops after a few columns
when the best columns of the rows differ, as they do for provisions of two versions of a
document, so O(n m) in practice.
"""

from __future__ import annotations

from collections.abc import Sequence

__all__ = ["SCIPY_CELLS", "VECTOR_CELLS", "max_weight_assignment"]

#: From this many cells (rows x columns) the search runs on numpy arrays: below it, a
#: column scan in plain Python is as fast, without numpy's import (measured on this 2-core
#: machine: 150 x 150 near-diagonal problems take about 20 ms either way).
VECTOR_CELLS = 150 * 150
#: From this many cells scipy's compiled solver is imported and used: a 500 x 500 problem
#: takes about 0.25 s here in numpy, as long as importing scipy.optimize, and the numpy
#: search grows faster (a 1,000 x 1,000 problem: 0.65 s, against 0.04 s in scipy).  Only
#: alignments of two long, unrelated documents get such large connected components.
SCIPY_CELLS = 500 * 500


def max_weight_assignment(weights: Sequence[Sequence[float]]) -> list[tuple[int, int]]:
    """(row, column) pairs of a maximum-weight assignment of *weights* (a list of rows, or a
    2-D numpy array), in row order; ``min(rows, columns)`` pairs, zero-weight ones included
    (a caller that treats 0 as "no edge" drops them).

    >>> max_weight_assignment([[1, 2], [3, 1]])
    [(0, 1), (1, 0)]
    >>> max_weight_assignment([[5, 1, 4]])
    [(0, 0)]
    """
    rows = [list(map(float, r)) for r in weights]
    n = len(rows)
    m = len(rows[0]) if n else 0
    if n == 0 or m == 0:
        return []
    if n * m >= SCIPY_CELLS:
        from scipy.optimize import linear_sum_assignment

        r, c = linear_sum_assignment(rows, maximize=True)
        return sorted(zip(r.tolist(), c.tolist()))
    transposed = n > m
    if transposed:
        rows = [list(col) for col in zip(*rows)]
        n, m = m, n
    # maximise w  <=>  minimise (top - w) >= 0
    top = max(max(r) for r in rows)
    cost = [[top - x for x in r] for r in rows]
    assigned = _solve_vector(cost, n, m) if n * m >= VECTOR_CELLS else _solve_plain(cost, n, m)
    pairs = [(assigned[j] - 1, j - 1) for j in range(1, m + 1) if assigned[j]]
    if transposed:
        pairs = [(c, r) for r, c in pairs]
    return sorted(pairs)


def _solve_plain(cost: list[list[float]], n: int, m: int) -> list[int]:
    """Minimum-cost assignment of n <= m rows; entry j (1..m) of the result is the row
    (1..n) given column j, 0 when none (index 0 is the search's virtual column)."""
    inf = float("inf")
    u = [0.0] * (n + 1)
    v = [0.0] * (m + 1)
    owner = [0] * (m + 1)  # owner[j]: the row holding column j (1-based; 0 none)
    way = [0] * (m + 1)
    pending = []
    for i in range(1, n + 1):  # row reduction, and each row's cheapest free column
        row = cost[i - 1]
        low = min(row)
        u[i] = low
        j = row.index(low) + 1
        if owner[j]:
            pending.append(i)
        else:
            owner[j] = i
    for i in pending:
        owner[0] = i
        j0 = 0
        minv = [inf] * (m + 1)
        used = [False] * (m + 1)
        while True:
            used[j0] = True
            i0 = owner[j0]
            row = cost[i0 - 1]
            ui = u[i0]
            delta = inf
            j1 = 0
            for j in range(1, m + 1):
                if not used[j]:
                    cur = row[j - 1] - ui - v[j]
                    if cur < minv[j]:
                        minv[j] = cur
                        way[j] = j0
                    if minv[j] < delta:
                        delta = minv[j]
                        j1 = j
            for j in range(m + 1):
                if used[j]:
                    u[owner[j]] += delta
                    v[j] -= delta
                else:
                    minv[j] -= delta
            j0 = j1
            if owner[j0] == 0:
                break
        while j0:
            j1 = way[j0]
            owner[j0] = owner[j1]
            j0 = j1
    return owner


def _solve_vector(cost: list[list[float]], n: int, m: int) -> list[int]:
    """:func:`_solve_plain` with the scan over the columns on numpy arrays."""
    import numpy as np

    c = np.zeros((n + 1, m + 1))
    c[1:, 1:] = np.asarray(cost, dtype=np.float64)
    u = np.zeros(n + 1)
    u[1:] = c[1:, 1:].min(axis=1)
    v = np.zeros(m + 1)
    owner = np.zeros(m + 1, dtype=np.int64)
    way = np.zeros(m + 1, dtype=np.int64)
    pending = []
    for i, j in enumerate(c[1:, 1:].argmin(axis=1).tolist(), start=1):
        if owner[j + 1]:
            pending.append(i)
        else:
            owner[j + 1] = i
    for i in pending:
        owner[0] = i
        j0 = 0
        minv = np.full(m + 1, np.inf)
        used = np.zeros(m + 1, dtype=bool)
        while True:
            used[j0] = True
            i0 = owner[j0]
            free = ~used
            free[0] = False
            cur = c[i0] - u[i0] - v
            better = free & (cur < minv)
            minv[better] = cur[better]
            way[better] = j0
            masked = np.where(free, minv, np.inf)
            j1 = int(np.argmin(masked))
            delta = masked[j1]
            u[owner[used]] += delta
            v[used] -= delta
            minv[~used] -= delta
            j0 = j1
            if owner[j0] == 0:
                break
        while j0:
            j1 = int(way[j0])
            owner[j0] = owner[j1]
            j0 = j1
    return owner.tolist()
