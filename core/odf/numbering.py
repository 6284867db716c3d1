"""List labels of an OpenDocument text: list styles, counters and number formats.

ISO/IEC 26300 (ODF 1.2 Part 1 §16.30-16.32, §19.*; ODF 1.3 Part 3 the same sections):

* a list style (``text:list-style``) has one level style per level (``text:level`` 1..10):
  ``text:list-level-style-number`` with ``style:num-format``, ``style:num-prefix``,
  ``style:num-suffix``, ``text:display-levels`` (how many levels' numbers the label shows,
  "1.2.3") and ``text:start-value``; ``text:list-level-style-bullet`` with ``text:bullet-char``;
* the outline style (``text:outline-style``) numbers headings (``text:h``) by their
  ``text:outline-level`` the same way;
* number formats (``style:num-format``, §19.500 ``style:num-format``; the tokens of XSL
  ``xsl:number``): "1" decimal, "a"/"A" letters, "i"/"I" roman numerals, "" no number.
  Letters go a..z, aa, ab, ... unless ``style:num-letter-sync`` is true (a..z, aa, bb, ...).
  Other formats (LibreOffice's own, e.g. "①, ②, ③") are shown in decimal, which keeps the
  label's structure ("3.4" stays "3.4").

:class:`ListCounter` keeps the counters of one list (a ``text:list`` and the lists that
continue it) and makes each numbered item's label.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

from lxml import etree

from ..docx.numformats import format_number
from .namespaces import STYLE, TEXT, q

__all__ = ["LevelStyle", "ListCounter", "MAX_LEVEL", "MAX_START", "format_value", "parse_list_style"]

#: ODF list styles define levels 1..10 (``text:level``, §19.840).
MAX_LEVEL = 10
#: Largest start value accepted: the bound the .docx reader uses (ECMA-376's 32,767), far
#: beyond any real list; a larger value is read as 1.
MAX_START = 32_767

_ROMAN_MAX = 3999


@dataclass(frozen=True, slots=True)
class LevelStyle:
    """One level of a list style (or of the outline style)."""

    num_format: str = "1"
    prefix: str = ""
    suffix: str = ""
    display_levels: int = 1
    start: int = 1
    bullet: str | None = None  # the bullet character of a bullet level
    letter_sync: bool = False


def _int(value: str | None, default: int, *, low: int, high: int) -> int:
    try:
        n = int(value) if value is not None else default
    except ValueError:
        return default
    return n if low <= n <= high else default


def parse_level(el: etree._Element) -> LevelStyle:
    """A ``text:list-level-style-*`` or ``text:outline-level-style`` element."""
    if el.tag == q(TEXT, "list-level-style-bullet"):
        return LevelStyle(num_format="", bullet=el.get(q(TEXT, "bullet-char"), "\u2022") or "\u2022")
    if el.tag == q(TEXT, "list-level-style-image"):
        return LevelStyle(num_format="", bullet="\u2022")
    return LevelStyle(
        num_format=el.get(q(STYLE, "num-format"), "1") if el.get(q(STYLE, "num-format")) is not None else "",
        prefix=el.get(q(STYLE, "num-prefix"), ""),
        suffix=el.get(q(STYLE, "num-suffix"), ""),
        display_levels=_int(el.get(q(TEXT, "display-levels")), 1, low=1, high=MAX_LEVEL),
        start=_int(el.get(q(TEXT, "start-value")), 1, low=0, high=MAX_START),
        letter_sync=el.get(q(STYLE, "num-letter-sync")) == "true",
    )


def parse_list_style(el: etree._Element) -> dict[int, LevelStyle]:
    """Level number (1-based) -> its style, from a ``text:list-style`` or
    ``text:outline-style`` element."""
    out: dict[int, LevelStyle] = {}
    for child in el:
        if not isinstance(child.tag, str):
            continue
        level = _int(child.get(q(TEXT, "level")), 0, low=1, high=MAX_LEVEL)
        if level:
            out[level] = parse_level(child)
    return out


def _letters(value: int, upper: bool, sync: bool) -> str:
    if sync:
        return format_number(value, "upperLetter" if upper else "lowerLetter")
    out = ""
    n = value
    while n > 0:
        n, r = divmod(n - 1, 26)
        out = chr(ord("A" if upper else "a") + r) + out
    return out


def format_value(value: int, num_format: str, *, letter_sync: bool = False) -> str:
    """*value* in ODF ``style:num-format`` *num_format* (see the module docstring)."""
    if num_format == "":
        return ""
    if value < 1:
        return str(value)
    if num_format == "1":
        return str(value)
    if num_format in ("a", "A"):
        return _letters(value, num_format == "A", letter_sync)
    if num_format in ("i", "I") and value <= _ROMAN_MAX:
        return format_number(value, "lowerRoman" if num_format == "i" else "upperRoman")
    return str(value)


@dataclass(slots=True)
class ListCounter:
    """The counters of one list (and of the lists that continue its numbering)."""

    levels: Mapping[int, LevelStyle]
    list_id: str
    values: dict[int, int] = field(default_factory=dict)

    def style(self, level: int) -> LevelStyle:
        return self.levels.get(level, LevelStyle())

    def advance(self, level: int, *, start: int | None = None) -> str:
        """Number the next item at *level* (1-based): its label.  *start* restarts the
        level at that value (``text:start-value`` of the item)."""
        st = self.style(level)
        if st.bullet is not None:
            return st.bullet
        if start is not None:
            self.values[level] = start
        else:
            self.values[level] = self.values.get(level, st.start - 1) + 1
        for deeper in [k for k in self.values if k > level]:
            del self.values[deeper]
        for higher in range(1, level):
            # A level used before its parents: they count as used at their start values, so
            # the next item up is the second ("1.1" then "2."), as LibreOffice counts.
            if higher not in self.values:
                self.values[higher] = self.style(higher).start
        first = max(1, level - st.display_levels + 1)
        parts = []
        for k in range(first, level + 1):
            ks = self.style(k)
            value = self.values.get(k, ks.start)
            shown = format_value(value, ks.num_format, letter_sync=ks.letter_sync)
            if shown:
                parts.append(shown)
        if not parts and not st.num_format:
            return (st.prefix + st.suffix).strip()
        return st.prefix + ".".join(parts) + st.suffix
