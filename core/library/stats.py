"""A summary of the precedent set: documents, provisions per clause type, variants.

Used by ``counterdraft library stats``.  Counts only; the variant listing names a sample
provision by document and number, never quoting it.  Cost: a few grouped queries of the store.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from .clausetypes import load_taxonomy
from .index import Failure, Library, VariantInfo

__all__ = ["LibraryStats", "TypeStats", "format_stats", "format_variants", "library_stats", "stats_to_dict"]


@dataclass(frozen=True, slots=True)
class TypeStats:
    bucket: str  # clause type id, or "~kind" for untyped provisions
    title: str
    provisions: int
    documents: int
    variants: int
    labelled: int  # variants with a position


@dataclass(frozen=True, slots=True)
class LibraryStats:
    root: str
    index: str
    documents: int
    provisions: int
    terms: int
    failures: tuple[Failure, ...]
    types: tuple[TypeStats, ...]  # clause types first (taxonomy order), then untyped buckets


def library_stats(library: Library) -> LibraryStats:
    tax = load_taxonomy()
    store = library.store
    counts = store.type_counts()
    variants = store.variant_counts()
    order = {t: i for i, t in enumerate(tax.ids)}
    buckets = sorted(counts, key=lambda b: (b.startswith("~"), order.get(b, 99), b))
    types = tuple(
        TypeStats(b, tax.label(b) if not b.startswith("~") else f"untyped ({b[1:]})", counts[b][0], counts[b][1],
                  variants.get(b, (0, 0))[0], variants.get(b, (0, 0))[1])
        for b in buckets)
    return LibraryStats(
        str(library.root or ""), library.address, library.total, store.provision_count(), store.term_count(),
        library.failures(), types)


def stats_to_dict(stats: LibraryStats) -> dict[str, Any]:
    """JSON object ``counterdraft.library-stats/1``."""
    return {
        "schema": "counterdraft.library-stats/1", "root": stats.root, "index": stats.index,
        "documents": stats.documents, "provisions": stats.provisions, "terms": stats.terms,
        "skipped": [{"path": f.path, "problem": f.problem} for f in stats.failures],
        "clause_types": [{"clause_type": t.bucket, "title": t.title, "provisions": t.provisions,
                          "documents": t.documents, "variants": t.variants, "labelled": t.labelled}
                         for t in stats.types],
    }


def format_stats(stats: LibraryStats, *, width: int = 100) -> str:
    lines = [
        f"Precedent set: {stats.root}",
        f"Index: {stats.index}",
        f"{stats.documents} agreement{'s' * (stats.documents != 1)}, {stats.provisions} provisions, "
        f"{stats.terms} defined terms; {len(stats.failures)} file{'s' * (len(stats.failures) != 1)} skipped",
    ]
    for f in stats.failures:
        lines.append(f"  skipped {f.path}: {f.problem}"[:width])
    lines.append("")
    name_w = max([len(t.title) for t in stats.types] + [11])
    name_w = min(name_w, width - 44)
    lines.append(f"{'Clause type':<{name_w}}  {'provisions':>10}  {'documents':>9}  {'variants':>8}  {'labelled':>8}")
    for t in stats.types:
        lines.append(f"{t.title[:name_w]:<{name_w}}  {t.provisions:>10}  {t.documents:>9}  "
                     f"{t.variants:>8}  {t.labelled:>8}")
    return "\n".join(lines)


def format_variants(variants: list[VariantInfo], *, total: int, width: int = 100) -> str:
    """One line per variant: id (for ``library label``), documents, wordings, position and a
    sample provision."""
    if not variants:
        return "No variants of that clause type in the index."
    lines = [f"{'id':>6}  {'variant':>7}  {'documents':>9}  {'wordings':>8}  {'position':<14}  sample"]
    for v in variants:
        sample = f"{v.sample_document} {v.sample_provision}" if v.sample_document else ""
        lines.append(f"{v.id:>6}  {v.ordinal:>7}  {v.documents:>4} of {total:<3}  {v.wordings:>8}  "
                     f"{(v.position or '-'):<14}  {sample}"[:width])
    return "\n".join(lines)
