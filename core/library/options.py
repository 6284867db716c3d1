"""The choices the precedent-set commands offer, in a module that imports nothing, so that
the command line can list them without loading the index or the clustering (numpy)."""

from __future__ import annotations

__all__ = ["LINKAGES", "METRICS", "POSITIONS"]

#: The reviewer's positions on a variant, strongest first.
POSITIONS: tuple[str, ...] = ("preferred", "acceptable", "fallback", "not acceptable")
#: Distances between the shingle sets of two wordings (:mod:`.variants`).
METRICS: tuple[str, ...] = ("jaccard", "dice")
#: Linkages both scipy and scikit-learn offer on a precomputed distance matrix.
LINKAGES: tuple[str, ...] = ("average", "complete", "single")
