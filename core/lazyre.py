"""Regular expressions compiled on first use, and compiled once per installation.

Compiling a pattern costs from microseconds to tens of milliseconds (a long alternation with
case-insensitive word classes: about 20 ms here), and a module's patterns are all compiled
when it is imported, every time a command starts: about 40 ms of a 250 ms review of two
short agreements went to compiling the program's own patterns.

* :func:`compile_pattern` stands for ``re.compile`` for the program's fixed patterns.  The
  regular-expression engine's program for each pattern (what ``re`` computes, in Python,
  from the pattern's text) is kept (:mod:`core.kept`) in a file named after the interpreter
  and the engine's version (``_sre.MAGIC``).  A later process builds each pattern from its
  program directly; anything unexpected in the file, and any pattern it does not hold,
  falls back to ``re.compile``.
* :func:`lazy_compile` declares a pattern needed only on some paths (the reader's, which the
  parsed-document cache skips, and rare ones): compiled by its first search.

Patterns built from a document's own words (its defined terms) are compiled with
``re.compile``: they change with every document.
"""

from __future__ import annotations

import _sre  # type: ignore[import-not-found]
import re
from array import array
from re import _compiler, _parser  # type: ignore[attr-defined]
from typing import Any

from .kept import KeptStore, kept_store

__all__ = ["LazyPattern", "compile_pattern", "lazy_compile"]

#: One pattern's compiled program as kept: (flags, code as 32-bit words, groups - 1, group
#: index, index group), ``_sre.compile``'s arguments (the code as bytes: a file of lists of
#: numbers took 70 ms to read back, one of bytes under one).
_Program = tuple[int, bytes, int, dict[str, int], tuple[str | None, ...]]
_CODE_TYPE = "I"

#: Programs kept at most: the program's own patterns are a few hundred; patterns of other
#: rule files (the severity rules' phrase lists) add a few each.
MAX_PROGRAMS = 1000


def _store() -> KeptStore:
    """The kept programs of this interpreter's pattern engine (its version in the name)."""
    return kept_store(f"patterns.{_sre.MAGIC}", limit=MAX_PROGRAMS)


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
    store = _store()
    key = (pattern, flags)
    prog = store.get(key)
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
    store.put(key, prog)
    return compiled


#: The methods a lazy pattern holds as its own once compiled: a call then costs no lookup
#: through ``__getattr__`` (reading 600 licence texts called it 344,000 times).
_METHODS = ("findall", "finditer", "fullmatch", "match", "search", "split", "sub", "subn")


class LazyPattern:
    """Stands for ``re.compile(pattern, flags)``: every attribute (``search``, ``finditer``,
    ``pattern``, ...) is the compiled pattern's, compiled on the first access."""

    __slots__ = ("_compiled", "_flags", "_source", *_METHODS)

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
        compiled = self.compiled()
        for method in _METHODS:  # found directly from now on
            object.__setattr__(self, method, getattr(compiled, method))
        return getattr(compiled, name)


def lazy_compile(pattern: str, flags: int = 0) -> LazyPattern:
    """A pattern compiled by its first use (see :class:`LazyPattern`)."""
    return LazyPattern(pattern, flags)
