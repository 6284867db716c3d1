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
from array import array
from re import _compiler, _parser  # type: ignore[attr-defined]
from typing import Any

__all__ = ["LazyPattern", "compile_pattern", "lazy_compile", "save_programs"]

#: One pattern's compiled program as kept: (flags, code as 32-bit words, groups - 1, group
#: index, index group), ``_sre.compile``'s arguments (the code as bytes: a file of lists of
#: numbers took 70 ms to read back, one of bytes under one).
_Program = tuple[int, bytes, int, dict[str, int], tuple[str | None, ...]]
_CODE_TYPE = "I"

#: Where the programs are kept: beside this package's compiled modules.
STORE_PATH = os.path.join(os.path.dirname(os.path.abspath(__file__)), "__pycache__",
                          f"patterns.{sys.implementation.cache_tag}.{_sre.MAGIC}.bin")
#: Programs kept at most: the program's own patterns are a few hundred; patterns of other
#: rule files (the severity rules' phrase lists) add a few each.  Beyond it, those this
#: process did not use are dropped.
MAX_PROGRAMS = 1000


class _Store:
    """The programs read from :data:`STORE_PATH` (read on the first compile) and those
    computed in this process (written at exit)."""

    def __init__(self, path: str) -> None:
        self.path = path
        self.programs: dict[tuple[str, int], _Program] | None = None
        self.used: set[tuple[str, int]] = set()
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
        merged = {**self._read(), **self.programs}
        if len(merged) > MAX_PROGRAMS:
            merged = {k: v for k, v in merged.items() if k in self.used}
        part = f"{self.path}.{os.getpid()}.part"
        try:
            os.makedirs(os.path.dirname(self.path), exist_ok=True)
            with open(part, "wb") as f:
                marshal.dump(merged, f)
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
    code = array(_CODE_TYPE, _compiler._code(parsed, flags)).tobytes()
    groupindex = {str(name): int(i) for name, i in parsed.state.groupdict.items()}
    indexgroup: list[str | None] = [None] * parsed.state.groups
    for name, i in groupindex.items():
        indexgroup[i] = name
    return int(flags | parsed.state.flags), code, int(parsed.state.groups) - 1, groupindex, tuple(indexgroup)


def _built(pattern: str, prog: _Program) -> re.Pattern[str]:
    flags, code, groups, groupindex, indexgroup = prog
    compiled: re.Pattern[str] = _sre.compile(pattern, flags, array(_CODE_TYPE, code).tolist(), groups,
                                             groupindex, indexgroup)
    return compiled


def compile_pattern(pattern: str, flags: int = 0) -> re.Pattern[str]:
    """``re.compile(pattern, flags)`` for a fixed pattern of the program, built from the
    program kept for it (see the module's notes) when there is one."""
    flags = int(flags)
    if flags & re.DEBUG or array(_CODE_TYPE).itemsize != 4:
        return re.compile(pattern, flags)
    programs = _STORE.load()
    key = (pattern, flags)
    _STORE.used.add(key)
    prog = programs.get(key)
    if prog is not None:
        try:
            return _built(pattern, prog)
        except (TypeError, ValueError, RuntimeError):
            pass
    try:
        prog = _program(pattern, flags)
        compiled = _built(pattern, prog)
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
