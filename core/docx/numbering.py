"""Rendered auto-number labels of a .docx, per ECMA-376 Part 1 §17.9 (Numbering).

``word/numbering.xml`` holds abstract numbering definitions (``w:abstractNum``: up to nine
``w:lvl`` levels, each with ``w:start``, ``w:numFmt``, ``w:lvlText``, ``w:lvlRestart``,
``w:isLgl``, ``w:pStyle``) and numbering instances (``w:num``) that point at one abstract
definition and may override levels (``w:lvlOverride`` with ``w:startOverride`` or a whole
``w:lvl``).  A paragraph is numbered by ``w:pPr/w:numPr`` (``w:numId``, ``w:ilvl``) or by its
paragraph style's ``w:numPr`` (§17.9.23 numbering via styles).

Counting model (checked against LibreOffice, the project's outside reference):

* counters are kept per abstract numbering definition, so several ``w:num`` that share one
  ``w:abstractNum`` continue one list (§17.9.15: numbering instances reference the abstract
  definition they share);
* the first time a ``w:num`` carrying ``w:startOverride`` is used, the overridden levels
  restart at the override value (§17.9.27), which is how a "restart numbering" is stored;
* using a level restarts every deeper level, unless ``w:lvlRestart`` says otherwise
  (§17.9.10: the level restarts after the given 1-based level; 0 = never restarts);
* a ``%N`` of a level not used yet shows that level's start value (§17.9.11 lvlText), and a
  paragraph deeper than any used so far starts its parent levels (LibreOffice shows "1.a" and
  then "2." when a list opens at its second level);
* ``w:isLgl`` (§17.9.4) shows the numbers of the higher levels in decimal;
* ``numId`` 0 removes numbering (§17.9.18); a bullet level (numFmt ``bullet`` or a picture
  bullet) has no label.

Cost: parsing is linear in numbering.xml; each numbered paragraph costs O(levels) = O(9).
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Mapping

from lxml import etree

from .styles import W_NS, StyleDef, StyleSheet, on_off

__all__ = [
    "MAX_LEVELS",
    "MAX_STYLE_LINK_HOPS",
    "AbstractNumDef",
    "LevelDef",
    "ListCounter",
    "NumDef",
    "NumberLabel",
    "NumberingDefinitions",
    "format_number",
    "parse_numbering",
]

_W = "{%s}" % W_NS
_VAL = _W + "val"

#: ECMA-376 Part 1 §17.9.6 (w:ilvl): levels 0..8.
MAX_LEVELS = 9

#: ``w:numStyleLink`` -> numbering style -> ``w:num`` -> ``w:abstractNum`` hops followed
#: before giving up (a legitimate link is one hop; this bounds cycles in hostile input).
MAX_STYLE_LINK_HOPS = 8

#: Largest number spelled out in words (cardinalText/ordinalText); larger values are shown in
#: decimal.  Contracts number clauses in the tens or hundreds at most.
MAX_WORDS_NUMBER = 999_999

#: Roman numerals are written with the standard seven letters up to 3999; above that the
#: value is shown in decimal (Word and LibreOffice extend differently; no document needs it).
MAX_ROMAN = 3999

_PLACEHOLDER = re.compile(r"%([1-9])")
#: Formats rendered as bullets (no number): ECMA-376 §17.18.59 ST_NumberFormat "bullet".
_BULLET_FORMATS = frozenset({"bullet"})


@dataclass(frozen=True, slots=True)
class LevelDef:
    """One ``w:lvl`` (§17.9.6)."""

    ilvl: int
    #: ST_NumberFormat (§17.18.59); "decimal" when absent.
    num_fmt: str = "decimal"
    #: ``w:lvlText/@w:val`` template such as ``"%1.%2."``; "" when absent.
    lvl_text: str = ""
    #: ``w:start`` (§17.9.25); 0 when absent, as the standard says.
    start: int = 0
    #: Raw ``w:lvlRestart`` value (1-based level; 0 = never), None when absent.
    restart: int | None = None
    is_lgl: bool = False
    #: ``w:pStyle``: the paragraph style this level is linked to (§17.9.23).
    style_id: str | None = None
    picture_bullet: bool = False

    @property
    def is_bullet(self) -> bool:
        return self.picture_bullet or self.num_fmt in _BULLET_FORMATS


@dataclass(frozen=True, slots=True)
class AbstractNumDef:
    abstract_id: str
    levels: Mapping[int, LevelDef]
    num_style_link: str | None = None
    style_link: str | None = None


@dataclass(frozen=True, slots=True)
class NumDef:
    num_id: str
    abstract_id: str
    start_overrides: Mapping[int, int] = field(default_factory=dict)
    level_overrides: Mapping[int, LevelDef] = field(default_factory=dict)


@dataclass(frozen=True, slots=True)
class NumberLabel:
    """What one numbered paragraph shows."""

    #: Rendered label, e.g. "7.2.", "(a)", "Article IV"; None for bullets or an empty label.
    text: str | None
    bullet: bool
    ilvl: int
    #: Identifier of the list: the (style-link resolved) abstract numbering id.
    list_id: str


def _int(value: str | None, default: int | None = None) -> int | None:
    if value is None:
        return default
    try:
        return int(value)
    except ValueError:
        return default


def _parse_level(el: etree._Element) -> LevelDef | None:
    ilvl = _int(el.get(_W + "ilvl"))
    if ilvl is None or not 0 <= ilvl < MAX_LEVELS:
        return None
    num_fmt = "decimal"
    lvl_text = ""
    start = 0
    restart = None
    is_lgl = False
    style_id = None
    picture = False
    for child in el:
        tag = child.tag
        if tag == _W + "start":
            start = _int(child.get(_VAL), 0) or 0
        elif tag == _W + "numFmt":
            num_fmt = child.get(_VAL) or "decimal"
        elif tag == _W + "lvlText":
            lvl_text = child.get(_VAL) or ""
        elif tag == _W + "lvlRestart":
            restart = _int(child.get(_VAL))
        elif tag == _W + "isLgl":
            is_lgl = bool(on_off(child))
        elif tag == _W + "pStyle":
            style_id = child.get(_VAL)
        elif tag == _W + "lvlPicBulletId":
            picture = True
    return LevelDef(ilvl, num_fmt, lvl_text, start, restart, is_lgl, style_id, picture)


@dataclass(frozen=True, slots=True)
class NumberingDefinitions:
    """Parsed numbering.xml, with ``w:numStyleLink`` already resolved."""

    abstracts: Mapping[str, AbstractNumDef] = field(default_factory=dict)
    nums: Mapping[str, NumDef] = field(default_factory=dict)
    #: numId -> id of the abstract definition that carries its levels (after style links).
    resolved_abstract: Mapping[str, str] = field(default_factory=dict)
    #: (abstract id, paragraph style id) -> level linked to that style by ``w:lvl/w:pStyle``.
    style_levels: Mapping[tuple[str, str], int] = field(default_factory=dict)

    def level(self, num_id: str, ilvl: int) -> LevelDef | None:
        """The effective level definition of *num_id* at *ilvl* (override first)."""
        num = self.nums.get(num_id)
        if num is None:
            return None
        over = num.level_overrides.get(ilvl)
        if over is not None:
            return over
        abstract = self.abstracts.get(self.resolved_abstract.get(num_id, ""))
        if abstract is None:
            return None
        return abstract.levels.get(ilvl)

    def start_of(self, num_id: str, ilvl: int) -> int:
        num = self.nums.get(num_id)
        if num is not None and ilvl in num.start_overrides:
            return num.start_overrides[ilvl]
        lvl = self.level(num_id, ilvl)
        return lvl.start if lvl is not None else 0

    def paragraph_numbering(
        self, *, num_id: str | None, ilvl: int | None, style: StyleDef | None
    ) -> tuple[str, int] | None:
        """(numId, ilvl) of a paragraph from its own ``w:numPr`` and its style's, or None.

        The paragraph's own values win; a style supplies what the paragraph leaves out
        (§17.9.23).  Without any ``w:ilvl`` the level linked to the paragraph style by
        ``w:lvl/w:pStyle`` is used, else level 0.  ``numId`` "0" means "not numbered".
        """
        nid = num_id if num_id is not None else (style.num_id if style is not None else None)
        if nid is None or nid == "0" or nid not in self.nums:
            return None
        level = ilvl
        if level is None and style is not None:
            level = style.ilvl
            if level is None:
                abstract_id = self.resolved_abstract.get(nid)
                if abstract_id is not None:
                    level = self.style_levels.get((abstract_id, style.style_id))
        if level is None:
            level = 0
        if not 0 <= level < MAX_LEVELS:
            return None
        return nid, level


def parse_numbering(root: etree._Element | None, *, styles: StyleSheet | None = None) -> NumberingDefinitions:
    """Parse the ``w:numbering`` element (None -> no numbering)."""
    if root is None:
        return NumberingDefinitions()
    abstracts: dict[str, AbstractNumDef] = {}
    nums: dict[str, NumDef] = {}
    for el in root:
        if el.tag == _W + "abstractNum":
            aid = el.get(_W + "abstractNumId")
            if aid is None or aid in abstracts:
                continue
            levels: dict[int, LevelDef] = {}
            num_style_link = style_link = None
            for child in el:
                if child.tag == _W + "lvl":
                    lvl = _parse_level(child)
                    if lvl is not None:
                        levels.setdefault(lvl.ilvl, lvl)
                elif child.tag == _W + "numStyleLink":
                    num_style_link = child.get(_VAL)
                elif child.tag == _W + "styleLink":
                    style_link = child.get(_VAL)
            abstracts[aid] = AbstractNumDef(aid, levels, num_style_link, style_link)
        elif el.tag == _W + "num":
            nid = el.get(_W + "numId")
            anum = el.find(_W + "abstractNumId")
            if nid is None or anum is None or anum.get(_VAL) is None or nid in nums:
                continue
            starts: dict[int, int] = {}
            overrides: dict[int, LevelDef] = {}
            for ov in el.iterfind(_W + "lvlOverride"):
                ilvl = _int(ov.get(_W + "ilvl"))
                if ilvl is None or not 0 <= ilvl < MAX_LEVELS:
                    continue
                so = ov.find(_W + "startOverride")
                if so is not None:
                    value = _int(so.get(_VAL))
                    if value is not None:
                        starts[ilvl] = value
                lvl_el = ov.find(_W + "lvl")
                if lvl_el is not None:
                    lvl = _parse_level(lvl_el)
                    if lvl is not None:
                        overrides[ilvl] = LevelDef(
                            ilvl, lvl.num_fmt, lvl.lvl_text, lvl.start, lvl.restart,
                            lvl.is_lgl, lvl.style_id, lvl.picture_bullet,
                        )
            nums[nid] = NumDef(nid, anum.get(_VAL) or "", starts, overrides)

    resolved: dict[str, str] = {}
    for nid, num in nums.items():
        resolved[nid] = _follow_style_link(num.abstract_id, abstracts, nums, styles)

    style_levels: dict[tuple[str, str], int] = {}
    for aid, abstract in abstracts.items():
        for lvl in abstract.levels.values():
            if lvl.style_id is not None:
                style_levels.setdefault((aid, lvl.style_id), lvl.ilvl)
    return NumberingDefinitions(abstracts, nums, resolved, style_levels)


def _follow_style_link(
    abstract_id: str,
    abstracts: Mapping[str, AbstractNumDef],
    nums: Mapping[str, NumDef],
    styles: StyleSheet | None,
) -> str:
    """Follow ``w:numStyleLink`` (§17.9.21) to the abstract definition holding the levels."""
    current = abstract_id
    for _ in range(MAX_STYLE_LINK_HOPS):
        abstract = abstracts.get(current)
        if abstract is None or abstract.num_style_link is None or styles is None:
            return current
        style = styles.get(abstract.num_style_link)
        if style is None or style.num_id is None or style.num_id not in nums:
            return current
        target = nums[style.num_id].abstract_id
        if target == current:
            return current
        current = target
    return current


# --------------------------------------------------------------------------------------
# Number formats (ECMA-376 Part 1 §17.18.59 ST_NumberFormat)
# --------------------------------------------------------------------------------------

_ROMAN = (
    (1000, "m"), (900, "cm"), (500, "d"), (400, "cd"), (100, "c"), (90, "xc"),
    (50, "l"), (40, "xl"), (10, "x"), (9, "ix"), (5, "v"), (4, "iv"), (1, "i"),
)

_ONES = (
    "zero", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine", "ten",
    "eleven", "twelve", "thirteen", "fourteen", "fifteen", "sixteen", "seventeen", "eighteen",
    "nineteen",
)
_TENS = ("", "", "twenty", "thirty", "forty", "fifty", "sixty", "seventy", "eighty", "ninety")
_ORDINAL_WORDS = {
    "one": "first", "two": "second", "three": "third", "five": "fifth", "eight": "eighth",
    "nine": "ninth", "twelve": "twelfth",
}


def _roman(n: int) -> str:
    out = []
    for value, letters in _ROMAN:
        while n >= value:
            out.append(letters)
            n -= value
    return "".join(out)


def _letters(n: int) -> str:
    """a..z, then aa..zz, aaa..., as Word and LibreOffice ("a, ..., z, aa, bb") show them."""
    repeat, index = divmod(n - 1, 26)
    return chr(ord("a") + index) * (repeat + 1)


def _words_below_thousand(n: int) -> str:
    hundreds, rest = divmod(n, 100)
    parts = []
    if hundreds:
        parts.append(f"{_ONES[hundreds]} hundred")
    if rest:
        if rest < 20:
            parts.append(_ONES[rest])
        else:
            tens, ones = divmod(rest, 10)
            parts.append(_TENS[tens] + (f"-{_ONES[ones]}" if ones else ""))
    return " ".join(parts)


def _cardinal_words(n: int) -> str:
    if n == 0:
        return _ONES[0]
    thousands, rest = divmod(n, 1000)
    parts = []
    if thousands:
        parts.append(f"{_words_below_thousand(thousands)} thousand")
    if rest:
        if thousands and rest < 100:
            parts.append("and")  # "one thousand and one", as LibreOffice spells it
        parts.append(_words_below_thousand(rest))
    return " ".join(parts)


def _ordinal_words(n: int) -> str:
    words = _cardinal_words(n)
    head, sep, last = words.rpartition(" ")
    prefix, dash, final = last.rpartition("-")
    if final in _ORDINAL_WORDS:
        final = _ORDINAL_WORDS[final]
    elif final.endswith("y"):
        final = final[:-1] + "ieth"
    else:
        final += "th"
    return head + sep + prefix + dash + final


def _ordinal_suffix(n: int) -> str:
    if 10 <= n % 100 <= 20:
        return f"{n}th"
    return f"{n}" + {1: "st", 2: "nd", 3: "rd"}.get(n % 10, "th")


def _capitalise(words: str) -> str:
    return words[:1].upper() + words[1:]


def format_number(value: int, num_fmt: str) -> str:
    """*value* rendered in ST_NumberFormat *num_fmt* (§17.18.59).

    Supported: decimal, decimalZero, lowerLetter, upperLetter, lowerRoman, upperRoman,
    ordinal, cardinalText, ordinalText (English), none.  Other formats (East Asian, Hebrew,
    Arabic, ...) are shown in decimal, which keeps the label's structure.
    """
    if num_fmt == "none" or num_fmt in _BULLET_FORMATS:
        return ""
    if num_fmt == "decimalZero":
        return f"{value:02d}" if 0 <= value < 10 else str(value)
    if value >= 1:
        if num_fmt == "lowerLetter":
            return _letters(value)
        if num_fmt == "upperLetter":
            return _letters(value).upper()
        if num_fmt == "lowerRoman" and value <= MAX_ROMAN:
            return _roman(value)
        if num_fmt == "upperRoman" and value <= MAX_ROMAN:
            return _roman(value).upper()
        if num_fmt == "ordinal":
            return _ordinal_suffix(value)
    if 0 <= value <= MAX_WORDS_NUMBER:
        if num_fmt == "cardinalText":
            return _capitalise(_cardinal_words(value))
        if num_fmt == "ordinalText" and value >= 1:
            return _capitalise(_ordinal_words(value))
    return str(value)


# --------------------------------------------------------------------------------------
# Counting
# --------------------------------------------------------------------------------------


def _restarts(level: LevelDef | None, ilvl_of_level: int, used_ilvl: int) -> bool:
    """Does using level *used_ilvl* restart the deeper level *ilvl_of_level*? (§17.9.10)"""
    if level is None or level.restart is None:
        return used_ilvl < ilvl_of_level
    if level.restart == 0:
        return False
    trigger = level.restart - 1  # 1-based in the XML
    if trigger >= ilvl_of_level:  # "a level ... higher than the current level is ignored"
        return used_ilvl < ilvl_of_level
    return used_ilvl <= trigger


class ListCounter:
    """Numbers paragraphs one after another in document order.

    Mutable by nature (it is the running state of a reading pass); create one per document
    read.  ``advance`` costs O(levels).
    """

    __slots__ = ("_defs", "_counts", "_started")

    def __init__(self, definitions: NumberingDefinitions) -> None:
        self._defs = definitions
        self._counts: dict[str, dict[int, int]] = {}
        self._started: set[str] = set()

    def advance(self, num_id: str, ilvl: int) -> NumberLabel | None:
        """Count one paragraph numbered (*num_id*, *ilvl*) and return what it shows."""
        defs = self._defs
        level = defs.level(num_id, ilvl)
        if level is None:
            return None
        abstract_id = defs.resolved_abstract.get(num_id, num_id)
        counts = self._counts.setdefault(abstract_id, {})
        if num_id not in self._started:
            self._started.add(num_id)
            num = defs.nums[num_id]
            for over in num.start_overrides:
                counts.pop(over, None)
        if ilvl in counts:
            counts[ilvl] += 1
        else:
            counts[ilvl] = defs.start_of(num_id, ilvl)
        for higher in range(ilvl):
            # A deeper level used before its parents: the parents take their start values
            # (LibreOffice shows "1.a" and then "2." for the next top-level paragraph).
            if higher not in counts:
                counts[higher] = defs.start_of(num_id, higher)
        for deeper in [k for k in counts if k > ilvl]:
            if _restarts(defs.level(num_id, deeper), deeper, ilvl):
                del counts[deeper]
        if level.is_bullet:
            return NumberLabel(text=None, bullet=True, ilvl=ilvl, list_id=abstract_id)

        def render(match: re.Match[str]) -> str:
            k = int(match.group(1)) - 1
            value = counts.get(k)
            if value is None:  # a %N of a deeper level than the paragraph's own
                value = defs.start_of(num_id, k)
            ref = level if k == ilvl else defs.level(num_id, k)
            fmt = ref.num_fmt if ref is not None else "decimal"
            if level.is_lgl and k < ilvl and fmt != "none":
                fmt = "decimal"
            return format_number(value, fmt)

        text = _PLACEHOLDER.sub(render, level.lvl_text)
        return NumberLabel(text=text if text.strip() else None, bullet=False, ilvl=ilvl,
                           list_id=abstract_id)
