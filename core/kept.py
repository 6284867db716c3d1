"""What a command computes the same way every time it starts, kept once per installation.

A short review spends most of its time starting: about 45 ms compiling the methods
``dataclasses`` writes for the program's record types (it generates each ``__init__``,
``__eq__``, ``__repr__`` ... as source text and compiles it, in every process), and about
40 ms compiling the program's regular expressions (:mod:`core.lazyre`).  Both results depend
only on their text and on the interpreter, so they are kept in files beside the compiled
modules (``core/__pycache__``), the way Python keeps bytecode there:

* a file per interpreter (its cache tag in the name), read on first need;
* written at exit when the process computed anything new, merged with what another process
  wrote meanwhile, atomically (a part file renamed over the file);
* never written when ``sys.dont_write_bytecode`` is set (``PYTHONDONTWRITEBYTECODE``), nor
  when the folder cannot be written; anything unreadable in it counts as absent.

Dataclass methods: :func:`keep_dataclass_methods` gives the ``dataclasses`` module an
``exec`` of its own that compiles each generated source text once and keeps the code object
(``marshal``).  The code is what ``exec`` would compile from the same text, so the classes
are the same; :func:`dataclass_methods_kept` says whether the hook is in place.
"""

from __future__ import annotations

import atexit
import builtins
import dataclasses
import marshal
import os
import sys
from collections.abc import Hashable
from types import CodeType
from typing import Any

__all__ = ["KeptStore", "dataclass_methods_kept", "keep_dataclass_methods", "kept_store", "save_kept"]

_FOLDER = os.path.join(os.path.dirname(os.path.abspath(__file__)), "__pycache__")


class KeptStore:
    """Values computed from their key (marshal-able both), read from *path* on first use and
    written back at exit.  At most *limit* entries are written: beyond it, those this process
    did not use are dropped."""

    def __init__(self, path: str, *, limit: int) -> None:
        self.path = path
        self.limit = limit
        self.values: dict[Any, Any] | None = None
        self.used: set[Hashable] = set()
        self.added = 0

    def _read(self) -> dict[Any, Any]:
        try:
            with open(self.path, "rb") as f:
                data = marshal.load(f)
        except (OSError, EOFError, ValueError, TypeError):
            return {}
        return data if isinstance(data, dict) else {}

    def get(self, key: Hashable) -> Any:
        """The value kept for *key*, or None."""
        if self.values is None:
            self.values = self._read()
        self.used.add(key)
        return self.values.get(key)

    def put(self, key: Hashable, value: Any) -> None:
        if self.values is None:
            self.values = self._read()
        self.values[key] = value
        self.used.add(key)
        self.added += 1

    def save(self) -> None:
        """Write the values when this process added any (and bytecode may be written), with
        those another process wrote meanwhile."""
        if not self.added or self.values is None or sys.dont_write_bytecode:
            return
        merged = {**self._read(), **self.values}
        if len(merged) > self.limit:
            merged = {k: v for k, v in merged.items() if k in self.used}
        part = f"{self.path}.{os.getpid()}.part"
        try:
            os.makedirs(os.path.dirname(self.path), exist_ok=True)
            with open(part, "wb") as f:
                marshal.dump(merged, f)
            os.replace(part, self.path)
            self.added = 0
        except (OSError, ValueError):
            try:
                os.unlink(part)
            except OSError:
                pass


_STORES: dict[str, KeptStore] = {}


def kept_store(name: str, *, limit: int) -> KeptStore:
    """The store *name* of this interpreter (one per name and process)."""
    store = _STORES.get(name)
    if store is None:
        path = os.path.join(_FOLDER, f"{name}.{sys.implementation.cache_tag}.bin")
        store = _STORES[name] = KeptStore(path, limit=limit)
    return store


def save_kept() -> None:
    """Write every store (at exit; a forked child, which leaves without running exit
    handlers, calls it itself)."""
    for store in _STORES.values():
        store.save()


atexit.register(save_kept)

# ------------------------------------------------------------------------------------------
# dataclass methods
# ------------------------------------------------------------------------------------------

#: Generated methods kept at most: the program's record types have about 500; other
#: libraries' add theirs.
MAX_METHODS = 4000


def _method_code(source: str) -> CodeType:
    """The code ``exec(source)`` runs, compiled once per installation.  Compiled without
    the caller's ``__future__`` flags, as ``dataclasses`` (which has none) compiles it."""
    store = kept_store("dataclass-methods", limit=MAX_METHODS)
    data = store.get(source)
    if isinstance(data, bytes):
        try:
            code = marshal.loads(data)
            if isinstance(code, CodeType):
                return code
        except (EOFError, ValueError, TypeError):
            pass
    code = compile(source, "<string>", "exec", dont_inherit=True)
    store.put(source, marshal.dumps(code))
    return code


def _exec(source: Any, globals: Any = None, locals: Any = None, /) -> None:
    """``exec`` for ``dataclasses``: source text compiled through :func:`_method_code`."""
    if type(source) is str:
        source = _method_code(source)
    builtins.exec(source, globals, locals)


def keep_dataclass_methods() -> None:
    """Give ``dataclasses`` the :func:`_exec` above (see the module's notes)."""
    dataclasses.exec = _exec  # type: ignore[attr-defined]


def dataclass_methods_kept() -> bool:
    return getattr(dataclasses, "exec", None) is _exec
