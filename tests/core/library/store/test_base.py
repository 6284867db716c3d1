"""Both backends implement the whole storage protocol, with its signatures.

Reference: Python's own ``inspect.signature`` of the protocol's methods and of each backend's.
"""

from __future__ import annotations

import inspect

import pytest

from core.library.store.base import Derived, Documents, Lifecycle, PrecedentStore, Reading, Wordings
from core.library.store.postgres import PostgresStore
from core.library.store.sqlite import SQLiteStore

GROUPS = (Lifecycle, Documents, Wordings, Derived, Reading)
METHODS = sorted(n for g in GROUPS for n, v in vars(g).items() if callable(v) and not n.startswith("_"))


def test_the_protocol_is_small_and_covers_the_issue():
    # add/replace/remove a document, variants and counts, derived data, transactions, locks
    for name in ("put_document", "remove_document", "variant_rows", "type_counts", "read_blob", "write_blob",
                 "commit", "write", "lock"):
        assert name in METHODS
    assert all(len([n for n in vars(g) if callable(vars(g)[n]) and not n.startswith("_")]) <= 25 for g in GROUPS)


@pytest.mark.parametrize("backend", [SQLiteStore, PostgresStore], ids=["sqlite", "postgresql"])
def test_every_protocol_method_is_implemented_with_its_signature(backend):
    for name in METHODS:
        mine = getattr(backend, name)
        assert not getattr(mine, "__isabstractmethod__", False), name
        want = [(p.name, p.kind) for p in inspect.signature(getattr(PrecedentStore, name)).parameters.values()]
        assert callable(getattr(PrecedentStore, name))
        got = [(p.name, p.kind) for p in inspect.signature(mine).parameters.values()]
        assert got == want, name
        assert mine is not getattr(PrecedentStore, name), name
