"""Choosing the variant cut-off from a few labelled provisions.

The reviewer labels a few provisions of the precedent set (any labels: positions such as
"house wording" / "refuse", or names such as "30 days" / "60 days").  For each candidate
cut-off, the clause types of the labelled provisions are clustered exactly as
:mod:`.variants` does, and :func:`calibrate` counts

* ``clusters``: variants of those clause types at that cut-off, and
* ``mixed``: variants holding labelled provisions with different labels.

The aim is the fewest clusters with no mixed one: a reviewer then labels one sample per
variant.  :func:`suggest_cutoff` returns the largest such cut-off.

Labels come from a CSV file (:func:`read_labels`: columns ``document,provision,label``,
document paths relative to the library's folder, provision by number, heading or id) or, by
default, from the positions already stored in the index.

Cost: per clause type, one O(n^2) distance matrix for its n distinct wordings and one linkage
per cut-off.
"""

from __future__ import annotations

import csv
from collections import defaultdict
from collections.abc import Sequence
from dataclasses import dataclass

from ..errors import CounterdraftError
from .index import Library, wording_shingles
from .variants import LINKAGES, METRICS, cluster_condensed, pairwise_distances

__all__ = [
    "DEFAULT_CUTOFFS",
    "CalibrationRow",
    "Labelled",
    "calibrate",
    "format_calibration",
    "read_labels",
    "stored_labels",
    "suggest_cutoff",
]

#: Cut-offs tried by default: 0.05 to 0.6 in steps of 0.05 (Jaccard distances of 3-word
#: shingle sets; above 0.6 different clauses of one type start to merge).
DEFAULT_CUTOFFS: tuple[float, ...] = tuple(round(0.05 * i, 2) for i in range(1, 13))


@dataclass(frozen=True, slots=True)
class Labelled:
    document: str
    provision: str
    label: str


@dataclass(frozen=True, slots=True)
class CalibrationRow:
    cutoff: float
    clusters: int
    mixed: int
    labelled_clusters: int  # clusters holding at least one labelled provision


def read_labels(path: str) -> list[Labelled]:
    """Labelled provisions from a CSV file with a header ``document,provision,label``."""
    try:
        with open(path, newline="", encoding="utf-8-sig") as fh:
            rows = list(csv.DictReader(fh))
    except OSError as err:
        raise CounterdraftError(f"cannot read the labels file ({err.strerror})", path=path) from None
    except (csv.Error, UnicodeDecodeError) as err:
        raise CounterdraftError(f"not a CSV file ({err})", path=path) from None
    out = []
    for i, row in enumerate(rows, 2):
        try:
            doc, prov, label = ((row[k] or "").strip() for k in ("document", "provision", "label"))
        except KeyError:
            raise CounterdraftError("the header must be: document,provision,label", path=path) from None
        if not (doc and prov and label):
            raise CounterdraftError(f"line {i}: document, provision and label are all needed", path=path)
        out.append(Labelled(doc, prov, label))
    if not out:
        raise CounterdraftError("no labelled provisions in the file", path=path)
    return out


def stored_labels(library: Library) -> list[tuple[str, str, str]]:
    """(bucket, normalised-wording hash, position) of every wording labelled in the index."""
    return library.labels()


def _resolve(library: Library, items: Sequence[Labelled]) -> list[tuple[str, str, str]]:
    out = []
    for it in items:
        row = library.wording_of(it.document, it.provision)
        if row is None:
            raise CounterdraftError(f"provision {it.provision!r} of {it.document!r} is not in the index",
                                    path=library.address)
        out.append((row[0], row[1], it.label))
    return out


def calibrate(library: Library, labelled: Sequence[Labelled] | None = None, *,
              cutoffs: Sequence[float] = DEFAULT_CUTOFFS, linkage: str | None = None,
              metric: str | None = None) -> tuple[CalibrationRow, ...]:
    """Clusters and mixed clusters per cut-off (module docstring).  Without *labelled*, the
    positions stored in the index are the labels."""
    config = library.config
    linkage = linkage or config.linkage
    metric = metric or config.metric
    if linkage not in LINKAGES or metric not in METRICS:
        raise CounterdraftError(f"linkage must be one of {', '.join(LINKAGES)}; metric one of {', '.join(METRICS)}")
    triples = _resolve(library, labelled) if labelled is not None else stored_labels(library)
    if not triples:
        raise CounterdraftError("no labelled provisions: give a labels file or label variants first")
    by_bucket: dict[str, dict[str, set[str]]] = defaultdict(lambda: defaultdict(set))
    for bucket, h, label in triples:
        by_bucket[bucket][h].add(label)
    prepared = []
    for bucket in sorted(by_bucket):
        rows = library.store.bucket_rows(bucket)
        sets = [wording_shingles(r[2], r[3]) for r in rows]
        if len(sets) > config.max_items:
            raise CounterdraftError(f"clause type {bucket} has {len(sets)} distinct wordings; calibration "
                                    f"clusters at most {config.max_items}")
        labels_of_row = [by_bucket[bucket].get(r[0], set()) for r in rows]
        prepared.append((pairwise_distances(sets, metric=metric), len(sets), labels_of_row))
    out = []
    for cut in cutoffs:
        clusters = mixed = labelled_clusters = 0
        for condensed, n, labels_of_row in prepared:
            assign = cluster_condensed(condensed, n, linkage=linkage, cutoff=float(cut))
            members: dict[int, set[str]] = defaultdict(set)
            for row, lab in enumerate(assign.tolist()):
                members[lab] |= labels_of_row[row]
            clusters += len(set(assign.tolist()))
            labelled_clusters += sum(1 for s in members.values() if s)
            mixed += sum(1 for s in members.values() if len(s) > 1)
        out.append(CalibrationRow(float(cut), clusters, mixed, labelled_clusters))
    return tuple(out)


def suggest_cutoff(rows: Sequence[CalibrationRow]) -> float | None:
    """The cut-off with the fewest clusters and no mixed cluster (the largest such)."""
    clean = [r for r in rows if r.mixed == 0]
    if not clean:
        return None
    best = min(clean, key=lambda r: (r.clusters, -r.cutoff))
    return best.cutoff


def format_calibration(rows: Sequence[CalibrationRow]) -> str:
    lines = [f"{'cut-off':>8}  {'clusters':>8}  {'mixed':>6}  {'labelled':>8}"]
    for r in rows:
        lines.append(f"{r.cutoff:>8.2f}  {r.clusters:>8}  {r.mixed:>6}  {r.labelled_clusters:>8}")
    best = suggest_cutoff(rows)
    lines.append("")
    lines.append("suggested cut-off: " + (f"{best:.2f} (fewest clusters with none mixed)" if best is not None
                                          else "none: every cut-off mixes labels"))
    return "\n".join(lines)
