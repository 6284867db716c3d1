"""The choices the precedent-set commands offer, in a module that imports only the model's
names, so that the command line can list them without loading the index or the clustering
(numpy)."""

from __future__ import annotations

from ..model import FORMER_STANCES, STANCES

__all__ = ["FORMER_POSITIONS", "LINKAGES", "METRICS", "POSITIONS"]

#: The firm's stance on a wording variant, most favoured first (our own names): the wording
#: the firm itself drafts with; one it can live with; one it concedes only as a last resort;
#: one it refuses.
POSITIONS = STANCES
#: The names an index or a review file written by an earlier version used, and the stance
#: each now reads as (an index is converted in place when it is opened).
FORMER_POSITIONS = FORMER_STANCES
#: Distances between the shingle sets of two wordings (:mod:`.variants`).
METRICS: tuple[str, ...] = ("jaccard", "dice")
#: Linkages both scipy and scikit-learn offer on a precomputed distance matrix.
LINKAGES: tuple[str, ...] = ("average", "complete", "single")
