"""The maximum-weight assignment (core.review.assignment), checked against scipy.

Reference: ``scipy.optimize.linear_sum_assignment(weights, maximize=True)``.  Several
assignments can reach the same optimum, so the checks compare the total weight (to 1e-9) and
that the result is an assignment: ``min(rows, columns)`` pairs, no row or column twice.
Each of the three ways of solving (plain Python, numpy, scipy) is forced in turn by
changing the size thresholds.
"""

from __future__ import annotations

import sys

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import linear_sum_assignment

from core.review import assignment
from core.review.assignment import max_weight_assignment

#: threshold settings (VECTOR_CELLS, SCIPY_CELLS) forcing each way of solving
WAYS = {"plain": (10**12, 10**12), "numpy": (0, 10**12), "scipy": (0, 0)}

matrices = st.integers(1, 9).flatmap(lambda n: st.integers(1, 9).flatmap(
    lambda m: st.lists(st.lists(st.one_of(st.just(0.0), st.floats(0.0, 5.0), st.integers(0, 3).map(float)),
                                min_size=m, max_size=m), min_size=n, max_size=n)))


def _check(weights: list[list[float]]) -> None:
    pairs = max_weight_assignment(weights)
    n, m = len(weights), len(weights[0])
    assert len(pairs) == min(n, m)
    assert len({r for r, _ in pairs}) == len({c for _, c in pairs}) == len(pairs)
    assert pairs == sorted(pairs)
    got = sum(weights[r][c] for r, c in pairs)
    r, c = linear_sum_assignment(np.asarray(weights), maximize=True)
    assert abs(got - float(np.asarray(weights)[r, c].sum())) < 1e-9


@pytest.mark.parametrize("way", sorted(WAYS))
@settings(max_examples=150, deadline=None)
@given(weights=matrices)
def test_total_weight_equals_scipy(way: str, weights: list[list[float]]) -> None:
    vector, big = WAYS[way]
    saved = assignment.VECTOR_CELLS, assignment.SCIPY_CELLS
    assignment.VECTOR_CELLS, assignment.SCIPY_CELLS = vector, big
    try:
        _check(weights)
    finally:
        assignment.VECTOR_CELLS, assignment.SCIPY_CELLS = saved


@pytest.mark.parametrize("n, m", [(40, 40), (60, 45), (30, 80), (160, 160)])
def test_larger_sparse_problems_equal_scipy(n: int, m: int) -> None:
    """Near-diagonal weights with a few random others, as alignment components look; the
    160 x 160 one crosses VECTOR_CELLS with the default thresholds."""
    rng = np.random.default_rng(n * 1000 + m)
    w = rng.random((n, m)) * 0.5 * (rng.random((n, m)) < 0.05)
    k = min(n, m)
    w[np.arange(k), (np.arange(k) + rng.integers(-2, 3, k)) % m] += 0.6
    _check(w.tolist())


def test_empty_and_single() -> None:
    assert max_weight_assignment([]) == []
    assert max_weight_assignment([[]]) == []
    assert max_weight_assignment([[0.0]]) == [(0, 0)]


def test_small_problems_import_neither_numpy_nor_scipy() -> None:
    """The point of the module: a review of a short document pays no import of scipy."""
    import subprocess

    code = ("import sys\nfrom core.review.assignment import max_weight_assignment\n"
            "max_weight_assignment([[1.0, 2.0, 0.0], [3.0, 0.0, 1.0], [0.0, 1.0, 1.0]])\n"
            "print(sorted(m for m in ('numpy', 'scipy') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"
