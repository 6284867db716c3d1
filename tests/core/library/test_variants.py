"""Wording variants: Jaccard distances and hierarchical clustering.

Outside references:
* ``scipy.spatial.distance.jaccard`` / ``dice`` on boolean vectors (the definition of the
  Jaccard and Sorensen-Dice dissimilarities) and ``scipy.spatial.distance.pdist``;
* ``scipy.cluster.hierarchy.linkage`` + ``fcluster`` and scikit-learn's
  ``AgglomerativeClustering(metric="precomputed", linkage=..., distance_threshold=...)`` on
  the same precomputed distance matrix: the partitions must be equal (up to label names);
* real texts from outside the project: the sentences of the Apache-2.0, GPL-3.0 and MPL-2.0
  license texts of the PyPI package licensedcode-data.
"""

from __future__ import annotations

import re

import numpy as np
import pytest
from scipy.cluster.hierarchy import fcluster, linkage
from scipy.spatial.distance import dice, jaccard, pdist, squareform
from sklearn.cluster import AgglomerativeClustering

from core.library.normalise import match_tokens, shingle_hashes, shingle_set
from core.library.variants import (
    LINKAGES,
    RegroupTooLarge,
    VariantConfig,
    cluster_condensed,
    cluster_wordings,
    distances_from_counts,
    incidence_matrix,
    jaccard_distance,
    pairwise_distances,
    regroup,
    set_distance,
)
from tests.support.legal_texts import license_text


def _paragraphs() -> list[list[str]]:
    """Token lists of the license texts' sentences with at least 12 words (outside texts)."""
    out = []
    for name in ("apache-2.0", "gpl-3.0", "mpl-2.0"):
        for para in re.split(r"(?<=[.;:])\s+", license_text(name)):
            toks = match_tokens(para)
            if len(toks) >= 12:
                out.append(toks)
    return out


def _boolean(a: frozenset, b: frozenset) -> tuple[np.ndarray, np.ndarray]:
    universe = sorted(a | b)
    return (np.array([x in a for x in universe], dtype=bool), np.array([x in b for x in universe], dtype=bool))


def _partition(labels) -> set[frozenset[int]]:
    groups: dict[int, set[int]] = {}
    for i, lab in enumerate(np.asarray(labels).tolist()):
        groups.setdefault(lab, set()).add(i)
    return {frozenset(g) for g in groups.values()}


def test_jaccard_equals_scipy_on_boolean_vectors():
    paras = _paragraphs()
    assert len(paras) > 100
    rng = np.random.default_rng(7)
    pairs = [tuple(rng.choice(len(paras), 2, replace=False)) for _ in range(60)]
    # Near neighbours too: a paragraph and the same paragraph with one word changed.
    for i in range(0, 40, 4):
        edited = list(paras[i])
        edited[len(edited) // 2] = "changed"
        paras.append(edited)
        pairs.append((i, len(paras) - 1))
    for i, j in pairs:
        a, b = shingle_set(paras[i]), shingle_set(paras[j])
        u, v = _boolean(a, b)
        # Reference: scipy.spatial.distance.jaccard (Jaccard-Needham dissimilarity).
        assert jaccard_distance(a, b) == pytest.approx(jaccard(u, v), abs=1e-12)
        # The hashed form used by the index gives the same value.
        ha, hb = shingle_hashes(paras[i]), shingle_hashes(paras[j])
        assert set_distance(ha, hb) == pytest.approx(jaccard(u, v), abs=1e-12)
        # Reference: scipy.spatial.distance.dice for the alternative metric.
        assert set_distance(ha, hb, metric="dice") == pytest.approx(dice(u, v), abs=1e-12)


def test_empty_sets_are_at_distance_zero_like_scipy():
    u = np.zeros(3, dtype=bool)
    # scipy.spatial.distance.jaccard returns 0 for two all-False vectors (scipy >= 1.2).
    assert jaccard(u, u) == 0.0
    assert jaccard_distance(frozenset(), frozenset()) == 0.0
    assert set_distance(np.zeros(0, np.uint64), np.zeros(0, np.uint64)) == 0.0
    assert distances_from_counts(np.array([0]), np.array([0]), np.array([0]))[0] == 0.0


def test_pairwise_distances_equal_scipy_pdist():
    paras = _paragraphs()[:80]
    sets = [shingle_hashes(p) for p in paras]
    ours = pairwise_distances(sets)
    m, _ = incidence_matrix(sets)
    boolean = m.toarray().astype(bool)
    # Reference: scipy.spatial.distance.pdist(metric="jaccard") on the boolean incidence rows.
    ref = pdist(boolean, metric="jaccard")
    np.testing.assert_allclose(ours, ref, atol=1e-12)
    np.testing.assert_allclose(pairwise_distances(sets, metric="dice"), pdist(boolean, metric="dice"), atol=1e-12)


def _wordings_with_variants() -> list[np.ndarray]:
    """License sentences plus edited copies (1-3 words changed), so that clusters exist."""
    paras = _paragraphs()[:60]
    rng = np.random.default_rng(3)
    out = list(paras)
    for base in paras[:30]:
        for _ in range(int(rng.integers(1, 4))):
            edited = list(base)
            for _k in range(int(rng.integers(1, 4))):
                edited[int(rng.integers(len(edited)))] = f"w{int(rng.integers(10**6))}"
            out.append(edited)
    return [shingle_hashes(t) for t in out]


@pytest.mark.parametrize("method", LINKAGES)
@pytest.mark.parametrize("cutoff", [0.1537, 0.2513, 0.4481, 0.7129])
def test_clusters_equal_scipy_and_scikit_learn(method, cutoff):
    sets = _wordings_with_variants()
    condensed = pairwise_distances(sets)
    n = len(sets)
    # Merge heights exactly at the cut-off would make the two references disagree with each
    # other (<= versus <); the odd cut-offs avoid them.
    z = linkage(condensed, method=method)
    assert not np.any(np.isclose(z[:, 2], cutoff))
    ours = cluster_condensed(condensed, n, linkage=method, cutoff=cutoff)
    # Reference 1: scipy.cluster.hierarchy.linkage + fcluster(criterion="distance").
    ref_scipy = fcluster(z, t=cutoff, criterion="distance")
    # Reference 2: scikit-learn's AgglomerativeClustering on the precomputed matrix.
    ref_sklearn = AgglomerativeClustering(n_clusters=None, metric="precomputed", linkage=method,
                                          distance_threshold=cutoff).fit(squareform(condensed)).labels_
    assert _partition(ours) == _partition(ref_scipy)
    assert _partition(ours) == _partition(ref_sklearn)
    # The default wrapper gives the same partition.
    labels = cluster_wordings(sets, config=VariantConfig(linkage=method, cutoff=cutoff))
    assert _partition(labels) == _partition(ref_scipy)
    # Non-trivial: some clusters hold several wordings, and not everything is one cluster.
    assert 1 < len(set(ours.tolist())) < n


def test_labels_are_numbered_by_first_appearance():
    sets = _wordings_with_variants()
    labels = cluster_condensed(pairwise_distances(sets), len(sets), cutoff=0.3)
    seen: list[int] = []
    for lab in labels.tolist():
        if lab not in seen:
            seen.append(lab)
    assert seen == list(range(len(seen)))


def test_overflow_wordings_join_their_nearest_clustered_wording():
    sets = _wordings_with_variants()
    config = VariantConfig(cutoff=0.3, max_items=40)
    labels = cluster_wordings(sets, config=config)
    head = cluster_condensed(pairwise_distances(sets[:40]), 40, cutoff=0.3)
    assert _partition(labels[:40]) == _partition(head)
    for i in range(40, len(sets)):
        # Reference: brute force with scipy's jaccard on boolean vectors.
        d = []
        for j in range(40):
            m, _ = incidence_matrix([sets[i], sets[j]])
            u, v = m.toarray().astype(bool)
            d.append(jaccard(u, v))
        j = int(np.argmin(d))
        if d[j] <= 0.3:
            assert labels[i] == labels[j]
        else:
            assert labels[i] not in set(labels[:40].tolist())


def test_small_inputs_and_bad_config():
    assert cluster_wordings([]).size == 0
    assert cluster_wordings([shingle_hashes(["a", "b", "c"])]).tolist() == [0]
    with pytest.raises(ValueError):
        VariantConfig(linkage="ward")
    with pytest.raises(ValueError):
        VariantConfig(cutoff=1.5)
    with pytest.raises(ValueError):
        VariantConfig(metric="cosine")


def _regrouped(sets, keep: list[int], add: list[int], config: VariantConfig) -> np.ndarray:
    """Cluster ``sets[keep]`` in full, then add ``sets[add]`` with :func:`regroup`; labels of
    ``keep + add`` (in that order)."""
    old = cluster_wordings([sets[i] for i in keep], config=config)
    rows = keep + add
    m, _ = incidence_matrix([sets[i] for i in rows])
    sizes = np.array([sets[i].size for i in rows], dtype=np.int64)
    labels = np.concatenate([old, np.full(len(add), -1)])
    fresh = np.array([False] * len(keep) + [True] * len(add))
    return regroup(m.tocsr(), sizes, labels, fresh=fresh, config=config)


@pytest.mark.parametrize("method", LINKAGES)
def test_adding_wordings_by_regroup_equals_scipy_on_the_whole_set(method):
    sets = _wordings_with_variants()
    config = VariantConfig(linkage=method, cutoff=0.2513)
    rng = np.random.default_rng(7)
    for _ in range(5):
        order = rng.permutation(len(sets)).tolist()
        keep, add = order[:-6], order[-6:]
        ours = _regrouped(sets, keep, add, config)
        # Reference: scipy's linkage + fcluster on every wording at once.
        z = linkage(pairwise_distances([sets[i] for i in keep + add]), method=method)
        ref = fcluster(z, t=config.cutoff, criterion="distance")
        # Exact for single linkage (see regroup); on these texts, whose variants lie far
        # apart, also for average and complete linkage.
        assert _partition(ours) == _partition(ref)


@pytest.mark.parametrize("method", LINKAGES)
def test_removing_wordings_by_regroup_equals_scipy_on_what_is_left(method):
    sets = _wordings_with_variants()
    config = VariantConfig(linkage=method, cutoff=0.2513)
    full = cluster_wordings(sets, config=config)
    rng = np.random.default_rng(11)
    for _ in range(5):
        gone = set(rng.choice(len(sets), size=5, replace=False).tolist())
        left = [i for i in range(len(sets)) if i not in gone]
        m, _ = incidence_matrix([sets[i] for i in left])
        sizes = np.array([sets[i].size for i in left], dtype=np.int64)
        ours = regroup(m.tocsr(), sizes, full[left], fresh=np.zeros(len(left), bool),
                       broken=sorted({int(full[i]) for i in gone}), config=config)
        # Reference: scipy's linkage + fcluster on the wordings left.
        z = linkage(pairwise_distances([sets[i] for i in left]), method=method)
        assert _partition(ours) == _partition(fcluster(z, t=config.cutoff, criterion="distance"))


def test_regroup_keeps_untouched_labels_and_refuses_oversized_groups():
    sets = _wordings_with_variants()
    config = VariantConfig(cutoff=0.2513)
    keep, add = list(range(len(sets) - 1)), [len(sets) - 1]
    old = cluster_wordings([sets[i] for i in keep], config=config)
    ours = _regrouped(sets, keep, add, config)
    changed = {int(old[i]) for i in range(len(keep)) if ours[i] != old[i]}
    assert len(changed) <= 1  # only the variant the new wording joined, if any
    with pytest.raises(RegroupTooLarge):
        _regrouped(sets, keep[:5], list(range(5, len(sets))), VariantConfig(cutoff=0.99, max_items=3))
