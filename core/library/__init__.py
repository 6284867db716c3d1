"""The precedent set: the firm's past agreements, indexed for "how common is this wording".

Modules: :mod:`.normalise` (tokens, term normalisation, shingles), :mod:`.clausetypes`
(clause typing), :mod:`.index` (the index and its build), :mod:`.store` (where it is kept: the
storage protocol, SQLite and PostgreSQL behind it; all SQL lives there), :mod:`.variants` (wording
variants by hierarchical clustering), :mod:`.vocab` (the Word2Vec vocabulary model),
:mod:`.frequency` (frequency figures and ranking in a review), :mod:`.slots` (the wording
variants of one provision's slot, for the desktop app), :mod:`.patterns` (negotiation
patterns), :mod:`.calibrate` (choosing the clustering cut-off), :mod:`.bucketcache` (each clause
type's frequency cache, one file per type, updated in place by an incremental build).

Every file the library writes holds confidential client text: it lives in the library's
``.counterdraft`` folder (mode 0o700) with mode 0o600, and no provision text is logged.  A
shared store keeps the same text on the firm's own PostgreSQL server, and nowhere else.

The names below are the entry points; importing this package loads no heavy module (scipy
loads when first used; gensim only to train the vocabulary model during a build, never to
read it; scikit-learn not at all outside the tests, which use it as a reference).
"""

from __future__ import annotations

from typing import Any

__all__ = [
    "Library",
    "apply_frequency",
    "build_library",
    "clause_type_function",
    "open_library",
    "provision_slot",
    "slot_variants",
]

_LAZY = {
    "Library": "index",
    "build_library": "index",
    "open_library": "index",
    "apply_frequency": "frequency",
    "clause_type_function": "frequency",
    "provision_slot": "frequency",
    "slot_variants": "slots",
}


def __getattr__(name: str) -> Any:
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(name)
    from importlib import import_module

    return getattr(import_module(f"{__name__}.{module}"), name)
