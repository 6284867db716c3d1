"""Regular expressions compiled on first use.

Compiling a pattern costs from microseconds to tens of milliseconds (a long alternation with
case-insensitive word classes: about 20 ms here), and a module's patterns are all compiled
when it is imported, every time a command starts.  The reader's patterns (defined terms,
structure) are needed only when a file is parsed, not when the parsed-document cache
(:mod:`core.doccache`) serves it, and a few others only on rare paths: they are declared with
:func:`lazy_compile` and compiled by their first search.
"""

from __future__ import annotations

import re
from typing import Any

__all__ = ["LazyPattern", "lazy_compile"]


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
            got = self._compiled = re.compile(self._source, self._flags)
        return got

    def __getattr__(self, name: str) -> Any:
        return getattr(self.compiled(), name)


def lazy_compile(pattern: str, flags: int = 0) -> LazyPattern:
    """A pattern compiled by its first use (see :class:`LazyPattern`)."""
    return LazyPattern(pattern, flags)
