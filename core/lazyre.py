"""Regular expressions compiled on first use, and compiled once per installation.

Compiling a pattern costs from microseconds to tens of milliseconds (a long alternation with
case-insensitive word classes: about 20 ms here), and a module's patterns are all compiled
when it is imported, every time a command starts: about 40 ms of a 250 ms review of two
short agreements went to compiling the program's own patterns.

* :func:`compile_pattern` stands for ``re.compile`` for the program's fixed patterns.  The
  regular-expression engine's program for each pattern (what ``re`` computes, in Python,
  from the pattern's text) is kept in a file beside the compiled modules
  (``core/__pycache__``), written as Python writes its bytecode there: not when
  ``sys.dont_write_bytecode`` is set (``PYTHONDONTWRITEBYTECODE``), nowhere when the folder
  cannot be written.  A later process builds each pattern from its program directly.  The
  file is named after the interpreter and the engine's version (``_sre.MAGIC``); anything
  unexpected in it, and any pattern it does not hold, falls back to ``re.compile``.
* :func:`lazy_compile` declares a pattern needed only on some paths (the reader's, which the
  parsed-document cache skips, and rare ones): compiled by its first search.

Patterns built from a document's own words (its defined terms) are compiled with
``re.compile``: they change with every document.
"""

from __future__ import annotations

import _sre  # type: ignore[import-not-found]
import atexit
import marshal
import os
import re
import sys
from re import _compiler, _parser  # type: ignore[attr-defined]
from typing import Any

__all__ = ["LazyPattern", "compile_pattern", "lazy_compile", "save_programs"]

#: One pattern's compiled program: (flags, code, groups - 1, group index, index group) as
#: ``_sre.compile`` takes them.
_Program = tuple[int, list[int], int, dict[str, int], tuple[str | None, ...]]

#: Where the programs are kept: beside this package's compiled modules.
STORE_PATH = os.path.join(os.path.dirname(os.path.abspath(__file__)), "__pycache__",
                          f"patterns.{sys.implementation.cache_tag}.{_sre.MAGIC}.bin")


class _Store:
    """The programs read from :data:`STORE_PATH` (read on the first compile) and those
    computed in this process (written at exit)."""

    def __init__(self, path: str) -> None:
        self.path = path
        self.programs: dict[tuple[str, int], _Program] | None = None
        self.added = 0

    def _read(self) -> dict[tuple[str, int], _Program]:
        try:
            with open(self.path, "rb") as f:
                data = marshal.load(f)
        except (OSError, EOFError, ValueError, TypeError):
            return {}
        return data if isinstance(data, dict) else {}

    def load(self) -> dict[tuple[str, int], _Program]:
        if self.programs is None:
            self.programs = self._read()
        return self.programs

    def save(self) -> None:
        """Write the programs when this process added any (and bytecode may be written),
        with those another process wrote meanwhile."""
        if not self.added or self.programs is None or sys.dont_write_bytecode:
            return
        part = f"{self.path}.{os.getpid()}.part"
        try:
            os.makedirs(os.path.dirname(self.path), exist_ok=True)
            with open(part, "wb") as f:
                marshal.dump({**self._read(), **self.programs}, f)
            os.replace(part, self.path)
            self.added = 0
        except OSError:
            try:
                os.unlink(part)
            except OSError:
                pass


_STORE = _Store(STORE_PATH)
atexit.register(_STORE.save)


def save_programs() -> None:
    """Write the programs this process computed (at exit; a forked child, which leaves
    without running exit handlers, calls it itself)."""
    _STORE.save()


def _program(pattern: str, flags: int) -> _Program:
    """What ``re.compile`` computes for *pattern* before it hands it to the engine (the
    steps of ``re._compiler.compile``)."""
    parsed = _parser.parse(pattern, flags)
    code = _compiler._code(parsed, flags)
    groupindex = {str(name): int(i) for name, i in parsed.state.groupdict.items()}
    indexgroup: list[str | None] = [None] * parsed.state.groups
    for name, i in groupindex.items():
        indexgroup[i] = name
    # plain ints: the opcodes are int subclasses, which marshal does not write
    return (int(flags | parsed.state.flags), [int(c) for c in code], int(parsed.state.groups) - 1, groupindex,
            tuple(indexgroup))


def compile_pattern(pattern: str, flags: int = 0) -> re.Pattern[str]:
    """``re.compile(pattern, flags)`` for a fixed pattern of the program, built from the
    program kept for it (see the module's notes) when there is one."""
    flags = int(flags)
    if flags & re.DEBUG:
        return re.compile(pattern, flags)
    programs = _STORE.load()
    key = (pattern, flags)
    prog = programs.get(key)
    if prog is not None:
        try:
            compiled: re.Pattern[str] = _sre.compile(pattern, *prog)
            return compiled
        except (TypeError, ValueError, RuntimeError):
            pass
    try:
        prog = _program(pattern, flags)
        compiled = _sre.compile(pattern, *prog)
    except re.error:
        raise
    except Exception:  # an interpreter whose internals differ: the public way
        return re.compile(pattern, flags)
    programs[key] = prog
    _STORE.added += 1
    return compiled


class LazyPattern:
    """Stands for ``re.compile(pattern, flags)``: every attribute (``search``, ``finditer``,
    ``pattern``, ...) is the compiled pattern's, compiled on the first access."""

    __slots__ = ("_compiled", "_flags", "_source")

    def __init__(self, pattern: str, flags: int = 0) -> None:
        self._source = pattern
        self._flags = flags
        self._compiled: re.Pattern[str] | None = None

    def compiled(self) -> re.Pattern[str]:
        """The compiled pattern."""
        got = self._compiled
        if got is None:
            got = self._compiled = compile_pattern(self._source, self._flags)
        return got

    def __getattr__(self, name: str) -> Any:
        return getattr(self.compiled(), name)


def lazy_compile(pattern: str, flags: int = 0) -> LazyPattern:
    """A pattern compiled by its first use (see :class:`LazyPattern`)."""
    return LazyPattern(pattern, flags)
