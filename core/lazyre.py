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

* :class:`CaselessPattern` matches a pattern of lower-case words in any letter case several
  times faster than ``re.IGNORECASE`` where it can: in the lower-cased text.
"""

from __future__ import annotations

import _sre  # type: ignore[import-not-found]
import re
from array import array
from collections.abc import Callable, Iterator
from re import _compiler, _parser  # type: ignore[attr-defined]
from typing import Any

from .kept import KeptStore, kept_store

__all__ = ["CaselessPattern", "LazyPattern", "compile_pattern", "lazy_compile"]

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


#: Characters that Python's re, ignoring case, matches with an ASCII letter although
#: lower-casing them gives no ASCII letter: the dotless i and the long s.  (The capital I with
#: a dot above lower-cases into two characters, which :class:`CaselessPattern` checks too.)
_CASE_FIXES = "\u0131\u017f"


class CaselessPattern:
    """Stands for ``re.compile(source, re.IGNORECASE)`` for a *source* whose letters are all
    lower-case ASCII (words of the program's rules, a document's names folded): searched in
    the lower-cased text, several times faster, wherever the two find the same -- where
    lower-casing keeps every character in place and the text holds none of the letters that
    re, ignoring case, matches with an ASCII one lower-casing does not give (see
    _CASE_FIXES) -- and ignoring case in the text itself elsewhere.  A match's offsets are
    the text's; its text is lower-cased on the fast path.  A *source* with other letters is
    always searched ignoring case.  *compile* is :func:`compile_pattern` for a fixed pattern,
    ``re.compile`` for one built from a document's words."""

    __slots__ = ("_any_case", "_compile", "_lower", "source")

    def __init__(self, source: str, *, compile: Callable[[str, int], re.Pattern[str]] = compile_pattern) -> None:
        self.source = source
        self._compile = compile
        lower_ascii = all(c.islower() and c.isascii() for c in source if c.isalpha())
        self._lower = compile(source, 0) if lower_ascii else None
        self._any_case: re.Pattern[str] | None = None

    def finditer(self, text: str) -> Iterator[re.Match[str]]:
        lower = self._lower
        if lower is not None:
            low = text.lower()
            if len(low) == len(text) and not any(c in text for c in _CASE_FIXES):
                return lower.finditer(low)
        if self._any_case is None:
            self._any_case = self._compile(self.source, re.IGNORECASE)
        return self._any_case.finditer(text)
