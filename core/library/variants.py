"""Wording variants: agglomerative clustering of one clause type's provisions.

Each provision is a set of word shingles of its normalised text (:mod:`.normalise`).  The
distance between two provisions is the Jaccard distance of their shingle sets (or the
Sorensen-Dice distance), and the variants of a clause type are the flat clusters of a
hierarchical clustering (``scipy.cluster.hierarchy.linkage`` + ``fcluster``) cut at a distance.

Defaults (see :class:`VariantConfig`):

* metric ``"jaccard"`` on 3-word shingles: 1 - |A & B| / |A | B|;
* linkage ``"average"`` (UPGMA): a wording joins a variant when it is close to the variant's
  wordings on average, so one odd intermediate text cannot chain two variants together (as
  single linkage would) and one outlier does not split a variant (as complete linkage would);
* cut-off 0.2: one or two words changed in a 40-word clause stay in the variant (distance
  ~0.15 per changed word), a re-worded clause does not.  ``counterdraft library calibrate``
  measures the choice on labelled provisions.

Identical normalised wordings are clustered once (a variant is a set of distinct wordings; how
many agreements use each is counted separately), so the cost depends on the number of distinct
wordings n of one type: O(n^2) memory and time for the distance matrix and the linkage.  Above
``max_items`` distinct wordings, the first ``max_items`` (by frequency) are clustered and each
other wording joins the variant of its nearest clustered wording when within the cut-off, else
starts its own variant (O(n * max_items)).
"""

from __future__ import annotations

from collections.abc import Sequence
from collections.abc import Set as AbstractSet
from dataclasses import dataclass

import numpy as np

from .options import LINKAGES, METRICS
from .sparse import SparseMatrix

__all__ = [
    "DEFAULT_CUTOFF",
    "DEFAULT_LINKAGE",
    "DEFAULT_METRIC",
    "INCIDENCE_CHUNK",
    "LINKAGES",
    "MAX_CLUSTER_ITEMS",
    "METRICS",
    "RegroupTooLarge",
    "VariantConfig",
    "cluster_condensed",
    "cluster_wordings",
    "distances_from_counts",
    "incidence_matrix",
    "jaccard_distance",
    "matrix_distances",
    "pairwise_distances",
    "regroup",
    "set_distance",
]

DEFAULT_METRIC = "jaccard"
DEFAULT_LINKAGE = "average"
#: See the module docstring; measured on the demo precedent set, where variants of one clause
#: differ by whole phrases (distance >= 0.3) and cosmetic noise vanishes in normalisation.
DEFAULT_CUTOFF = 0.2
#: Distinct wordings of one clause type clustered exactly (see the module docstring); 3,000
#: keeps the condensed distance matrix below 40 MB.
MAX_CLUSTER_ITEMS = 3000


#: Wordings beyond ``max_items`` compared with the clustered ones per sparse product (bounds
#: memory to OVERFLOW_BATCH x max_items counts).
OVERFLOW_BATCH = 256
#: Rows of the distance matrix computed per sparse product: 256 x 3,000 counts are 3 MB,
#: where the whole square matrix and its index arrays took some 150 MB at MAX_CLUSTER_ITEMS.
DISTANCE_BLOCK = 256


@dataclass(frozen=True, slots=True)
class VariantConfig:
    metric: str = DEFAULT_METRIC
    linkage: str = DEFAULT_LINKAGE
    cutoff: float = DEFAULT_CUTOFF
    max_items: int = MAX_CLUSTER_ITEMS

    def __post_init__(self) -> None:
        if self.metric not in METRICS:
            raise ValueError(f"metric must be one of {', '.join(METRICS)}")
        if self.linkage not in LINKAGES:
            raise ValueError(f"linkage must be one of {', '.join(LINKAGES)}")
        if not 0.0 <= self.cutoff <= 1.0:
            raise ValueError("cut-off must be between 0 and 1")
        if self.max_items < 2:
            raise ValueError("max_items must be at least 2")


def jaccard_distance(a: AbstractSet[object], b: AbstractSet[object]) -> float:
    """1 - |a & b| / |a | b|; 0.0 for two empty sets (as scipy's ``jaccard`` on all-False
    vectors)."""
    union = len(a | b)
    return 0.0 if union == 0 else 1.0 - len(a & b) / union


def distances_from_counts(inter: np.ndarray, size_a: np.ndarray, size_b: np.ndarray, *,
                          metric: str = DEFAULT_METRIC) -> np.ndarray:
    """Element-wise distances from intersection sizes and the two sets' sizes (two empty sets
    are at distance 0)."""
    inter = inter.astype(np.float64)
    total = size_a.astype(np.float64) + size_b.astype(np.float64)
    with np.errstate(divide="ignore", invalid="ignore"):
        if metric == "jaccard":
            union = total - inter
            d = np.where(union > 0, 1.0 - inter / np.where(union > 0, union, 1.0), 0.0)
        else:  # dice
            d = np.where(total > 0, 1.0 - 2.0 * inter / np.where(total > 0, total, 1.0), 0.0)
    return np.clip(d, 0.0, 1.0)


def set_distance(a: np.ndarray, b: np.ndarray, *, metric: str = DEFAULT_METRIC) -> float:
    """The distance of two sorted unique hash arrays (as made by ``shingle_hashes``)."""
    inter = np.intersect1d(a, b, assume_unique=True).size
    return float(distances_from_counts(np.array([inter]), np.array([a.size]), np.array([b.size]),
                                       metric=metric)[0])


#: Hashes located per step when an incidence matrix is built: bounds the temporary 64-bit
#: positions to 8 MB however many wordings a bucket holds.
INCIDENCE_CHUNK = 1 << 20


def incidence_matrix(sets: Sequence[np.ndarray], *,
                     columns: np.ndarray | None = None) -> tuple[SparseMatrix, np.ndarray]:
    """(CSR matrix rows x columns of 0/1 int32, sorted column hashes) for hash arrays *sets*.

    With *columns* given, hashes not among them are dropped (the caller keeps the row sizes).
    Built directly in CSR form (a row's hashes, sorted and unique as :func:`shingle_hashes`
    makes them, give sorted indices); memory about 16 bytes per hash besides the result."""
    from scipy.sparse import csr_matrix

    lengths = np.fromiter((s.size for s in sets), dtype=np.int64, count=len(sets))
    flat = np.concatenate(list(sets)) if len(sets) else np.zeros(0, dtype=np.uint64)
    if columns is None:
        columns = np.unique(flat)
    indices = np.empty(flat.size, dtype=np.int32)
    keep = np.ones(flat.size, dtype=bool)
    for start in range(0, flat.size, INCIDENCE_CHUNK):
        part = flat[start:start + INCIDENCE_CHUNK]
        pos = np.searchsorted(columns, part)
        if columns.size:
            found = columns[np.minimum(pos, columns.size - 1)] == part
        else:
            found = np.zeros(part.size, dtype=bool)
        keep[start:start + part.size] = found
        indices[start:start + part.size] = np.where(found, pos, 0)
    if not keep.all():
        lengths = np.bincount(np.repeat(np.arange(len(sets)), lengths)[keep], minlength=len(sets))
        indices = indices[keep]
    indptr = np.concatenate([[0], np.cumsum(lengths)]).astype(np.int64)
    m = csr_matrix((np.ones(indices.size, dtype=np.int32), indices, indptr), shape=(len(sets), columns.size))
    return m, columns


def pairwise_distances(sets: Sequence[np.ndarray], *, metric: str = DEFAULT_METRIC) -> np.ndarray:
    """Condensed distance vector (``scipy.spatial.distance.squareform`` order) between all
    pairs of hash sets: one sparse product for the intersections, O(n^2) memory."""
    n = len(sets)
    if n < 2:
        return np.zeros(0, dtype=np.float64)
    m, _ = incidence_matrix(sets)
    sizes = np.fromiter((s.size for s in sets), dtype=np.int64, count=n)
    return matrix_distances(m, sizes, metric=metric)


def matrix_distances(matrix: SparseMatrix, sizes: np.ndarray, *, metric: str = DEFAULT_METRIC) -> np.ndarray:
    """:func:`pairwise_distances` of the rows of a 0/1 incidence matrix (CSR) whose rows hold
    *sizes* hashes each (columns may have been dropped, sizes are the true set sizes)."""
    n = matrix.shape[0]
    if n < 2:
        return np.zeros(0, dtype=np.float64)
    out = np.empty(n * (n - 1) // 2, dtype=np.float64)
    mt = matrix.T.tocsc()
    sizes = np.asarray(sizes, dtype=np.int64)
    pos = 0
    for start in range(0, n - 1, DISTANCE_BLOCK):  # a block of rows at a time: O(n) memory besides the result
        stop = min(start + DISTANCE_BLOCK, n - 1)
        inter = (matrix[start:stop] @ mt).toarray()
        rows = np.arange(start, stop)
        upper = np.arange(n)[None, :] > rows[:, None]  # row-major: the condensed order
        size_a = np.broadcast_to(sizes[rows][:, None], upper.shape)[upper]
        size_b = np.broadcast_to(sizes[None, :], upper.shape)[upper]
        block = distances_from_counts(inter[upper], size_a, size_b, metric=metric)
        out[pos:pos + block.size] = block
        pos += block.size
    return out


def cluster_condensed(condensed: np.ndarray, n: int, *, linkage: str = DEFAULT_LINKAGE,
                      cutoff: float = DEFAULT_CUTOFF) -> np.ndarray:
    """Flat cluster labels 0..k-1 (numbered by first appearance) of *n* items from a condensed
    distance vector: ``scipy.cluster.hierarchy.linkage(method=linkage)`` then ``fcluster``
    with ``criterion="distance"`` at *cutoff* (items merge while the merge distance is at most
    *cutoff*)."""
    from scipy.cluster.hierarchy import fcluster
    from scipy.cluster.hierarchy import linkage as scipy_linkage

    if linkage not in LINKAGES:
        raise ValueError(f"linkage must be one of {', '.join(LINKAGES)}")
    if n == 0:
        return np.zeros(0, dtype=np.int64)
    if n == 1:
        return np.zeros(1, dtype=np.int64)
    z = scipy_linkage(condensed, method=linkage)
    raw = fcluster(z, t=cutoff, criterion="distance")
    return _renumber(raw)


def _renumber(raw: np.ndarray) -> np.ndarray:
    mapping: dict[int, int] = {}
    out = np.empty(raw.size, dtype=np.int64)
    for i, r in enumerate(raw.tolist()):
        out[i] = mapping.setdefault(r, len(mapping))
    return out


def cluster_wordings(sets: Sequence[np.ndarray], *, config: VariantConfig = VariantConfig()) -> np.ndarray:
    """Variant labels 0..k-1 for distinct wordings given as shingle-hash arrays, in the order
    given (put the most frequent wordings first: they are the ones clustered exactly when
    there are more than ``config.max_items``)."""
    n = len(sets)
    head = min(n, config.max_items)
    labels = np.empty(n, dtype=np.int64)
    labels[:head] = cluster_condensed(pairwise_distances(sets[:head], metric=config.metric), head,
                                      linkage=config.linkage, cutoff=config.cutoff)
    if n > head:
        m, cols = incidence_matrix(sets[:head])
        mt = m.T.tocsr()
        sizes = np.fromiter((s.size for s in sets[:head]), dtype=np.int64, count=head)
        next_label = int(labels[:head].max()) + 1 if head else 0
        for start in range(head, n, OVERFLOW_BATCH):
            batch = sets[start:start + OVERFLOW_BATCH]
            q, _ = incidence_matrix(batch, columns=cols)
            inter = (q @ mt).toarray()
            for k, s in enumerate(batch):
                d = distances_from_counts(inter[k], sizes, np.full(head, s.size), metric=config.metric)
                j = int(np.argmin(d))
                if d[j] <= config.cutoff:
                    labels[start + k] = labels[j]
                else:
                    labels[start + k] = next_label
                    next_label += 1
    return labels


class RegroupTooLarge(Exception):
    """A group to re-cluster holds more than ``config.max_items`` wordings: cluster in full."""


def regroup(matrix: SparseMatrix, sizes: np.ndarray, labels: np.ndarray, *, fresh: np.ndarray,
            broken: Sequence[int] = (), config: VariantConfig = VariantConfig()) -> np.ndarray:
    """Variant labels after wordings were added (*fresh*) or removed, re-clustering only the
    variants the change can touch, with the clustering's own linkage and cut-off.

    *matrix*: 0/1 incidence (CSR) of every current wording's shingles, one row each, in the
    bucket's order; *sizes* their set sizes; *labels*: each wording's variant (any
    non-negative ints; ignored where *fresh*); *broken*: variants that lost a wording.  A
    fresh wording touches every variant with a member within the cut-off of it, and every
    fresh wording within the cut-off of it (transitively); each group of touched variants,
    fresh wordings and broken variants is clustered again on its own by
    :func:`cluster_wordings` (rows in the bucket's order).  Other wordings keep their labels;
    a re-clustered group's clusters keep the label of an old variant they equal, else get new
    labels above every label in use.

    Exactness: a variant none of whose members lies within the cut-off of a fresh wording
    cannot be merged with it under single, average or complete linkage (every linkage
    distance to the fresh wording exceeds the cut-off), so for single linkage the result is
    the full clustering's partition.  For average and complete linkage it can differ from a
    full clustering when a sub-group of a touched variant lies within the cut-off of a
    sub-group of an untouched one, which a full clustering would have joined first had the
    fresh wording not been there; the index bounds that drift by clustering a bucket in full
    after enough changes.  Raises :class:`RegroupTooLarge` when a group holds more than
    ``config.max_items`` wordings.  Cost: one sparse product of the fresh rows with all rows,
    then O(g^2) per group of g wordings.
    """
    labels = np.asarray(labels, dtype=np.int64).copy()
    fresh = np.asarray(fresh, dtype=bool)
    new_rows = np.flatnonzero(fresh)
    groups = _touched_groups(matrix, sizes, labels, new_rows, fresh, {int(b) for b in broken}, config)
    if not groups:
        return labels
    next_label = max([int(labels[~fresh].max()) if (~fresh).any() else -1, *(int(b) for b in broken)]) + 1
    old_members = {lab: set(np.flatnonzero((labels == lab) & ~fresh).tolist())
                   for g in groups for lab in g[0]}
    for group_labels, group_new in groups:
        rows = sorted({r for lab in group_labels for r in old_members[lab]} | group_new)
        if len(rows) > config.max_items:
            raise RegroupTooLarge(f"{len(rows)} wordings")
        idx = np.array(rows, dtype=np.int64)
        local = cluster_condensed(matrix_distances(matrix[idx], sizes[idx], metric=config.metric),
                                  idx.size, linkage=config.linkage, cutoff=config.cutoff)
        for k in range(int(local.max()) + 1 if local.size else 0):
            members = idx[local == k]
            same = [lab for lab in group_labels if old_members[lab] == set(members.tolist())]
            if same:
                labels[members] = same[0]
            else:
                labels[members] = next_label
                next_label += 1
    return labels


def _touched_groups(matrix: SparseMatrix, sizes: np.ndarray, labels: np.ndarray, new_rows: np.ndarray,
                    fresh: np.ndarray, broken: set[int],
                    config: VariantConfig) -> list[tuple[set[int], set[int]]]:
    """Groups ``(old labels, fresh rows)`` linked by fresh wordings within the cut-off (union
    -find over labels and fresh rows), plus each broken label on its own if not linked."""
    parent: dict[tuple[str, int], tuple[str, int]] = {}

    def find(x: tuple[str, int]) -> tuple[str, int]:
        parent.setdefault(x, x)
        while parent[x] != x:
            parent[x] = parent[parent[x]]
            x = parent[x]
        return x

    def union(a: tuple[str, int], b: tuple[str, int]) -> None:
        parent[find(a)] = find(b)

    for start in range(0, new_rows.size, OVERFLOW_BATCH):
        batch = new_rows[start:start + OVERFLOW_BATCH]
        inter = (matrix[batch] @ matrix.T).toarray()
        for k, r in enumerate(batch.tolist()):
            d = distances_from_counts(inter[k], sizes, np.full(sizes.size, sizes[r]), metric=config.metric)
            find(("n", r))
            for j in np.flatnonzero(d <= config.cutoff).tolist():
                union(("n", r), ("n", j) if fresh[j] else ("l", int(labels[j])))
    for lab in broken:
        find(("l", lab))
    groups: dict[tuple[str, int], tuple[set[int], set[int]]] = {}
    for node in list(parent):
        labs, rows = groups.setdefault(find(node), (set(), set()))
        (rows if node[0] == "n" else labs).add(node[1])
    return list(groups.values())
