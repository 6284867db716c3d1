"""Where the precedent set is kept: the storage interface and its two backends.

* :class:`~.base.PrecedentStore` -- the protocol: every question asked of the stored
  precedent set, in the domain's words, in five small groups (lifecycle and transactions,
  documents, wordings, derived data, reading).  No SQL lives outside this package (a test
  greps ``core/`` for it).
* :mod:`.sqlite` -- the default: one person's SQLite file in ``PAST_AGREEMENTS/.counterdraft``.
* :mod:`.postgres` -- a team's shared PostgreSQL database, addressed as
  ``postgresql://USER@HOST:PORT/DATABASE``.

:func:`open_store` picks the backend from the address.  Importing this package loads neither
``sqlite3`` nor ``psycopg``.
"""

from __future__ import annotations

import os
from pathlib import Path

from .base import VARIANT_FIGURES, PrecedentStore, StoreDamaged

__all__ = [
    "VARIANT_FIGURES",
    "PrecedentStore",
    "StoreDamaged",
    "is_server_address",
    "open_store",
    "shown_address",
]

_SCHEMES = ("postgresql://", "postgres://")


def is_server_address(address: object) -> bool:
    """True for a PostgreSQL address (``postgresql://...`` or ``postgres://...``)."""
    return isinstance(address, str) and address.strip().lower().startswith(_SCHEMES)


def shown_address(address: str | os.PathLike[str]) -> str:
    """*address* as it may be shown or recorded: a path as it is, a server address without
    any password."""
    if is_server_address(address):
        from .postgres import shown_address as strip

        return strip(str(address).strip())
    return str(address)


def open_store(address: str | os.PathLike[str], *, private_folder: bool = False) -> PrecedentStore:
    """The store at *address* -- a PostgreSQL address, else the path of a SQLite index
    (*private_folder*: its folder is the index's own, created with mode 0o700).  Not yet
    opened: call ``open(create=...)``.  A server that cannot be reached or refuses the
    credentials raises :class:`~core.errors.CounterdraftError` (one line, no password)."""
    if is_server_address(address):
        from .postgres import PostgresStore

        return PostgresStore(str(address).strip())
    from .sqlite import SQLiteStore

    return SQLiteStore(Path(address), private_folder=private_folder)
