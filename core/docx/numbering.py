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
  bullet) has no label;
* number formats are rendered by :mod:`core.docx.numformats` (every ST_NumberFormat value),
  in the paragraph's language for the text formats; ``w:numFmt`` inside
  ``mc:AlternateContent`` (a Word 2010 custom format) is read from the branch a consumer
  takes (:mod:`core.docx.compat`).

Bounds.  Every number read here is an ST_DecimalNumber (§17.18.10, an XML Schema integer):
it is parsed strictly (optional sign and ASCII digits; anything else counts as absent, and
an integer longer than :data:`MAX_NUMBER_DIGITS` digits is never converted), then checked
against a practical limit before use: a level number outside 0-8 makes the level unusable
(§17.9.3 allows nine levels); a ``w:start`` or ``w:startOverride`` outside
0..:data:`MAX_LIST_START`, more than :data:`MAX_NUMBERING_ENTRIES` definitions or a level
text longer than :data:`MAX_LEVEL_TEXT_CHARS` is refused with a
:class:`~core.errors.CounterdraftError` naming the file and the limit.

Cost: parsing is linear in numbering.xml; each numbered paragraph costs O(levels) = O(9)
plus the length of its label (:mod:`core.docx.numformats` never loops up to the value).
"""

from __future__ import annotations

import re
from collections.abc import Mapping
from dataclasses import dataclass, field

from lxml import etree

from ..errors import CounterdraftError
from ..lazyre import lazy_compile
from .compat import MC_NS, alternate_branch
from .numformats import BULLET_FORMATS, format_number
from .styles import W_NS, StyleDef, StyleSheet, on_off

__all__ = [
    "MAX_LEVELS",
    "MAX_LEVEL_TEXT_CHARS",
    "MAX_LIST_START",
    "MAX_NUMBERING_ENTRIES",
    "MAX_NUMBER_DIGITS",
    "MAX_STYLE_LINK_HOPS",
    "AbstractNumDef",
    "LevelDef",
    "ListCounter",
    "NumDef",
    "NumberLabel",
    "NumberingDefinitions",
    "canonical_id",
    "decimal_number",
    "format_number",
    "parse_numbering",
]

_W = f"{{{W_NS}}}"
_VAL = _W + "val"
_ALTERNATE = f"{{{MC_NS}}}AlternateContent"

#: ECMA-376 Part 1 §17.9.6 (w:ilvl): levels 0..8.
MAX_LEVELS = 9

#: ``w:numStyleLink`` -> numbering style -> ``w:num`` -> ``w:abstractNum`` hops followed
#: before giving up (a legitimate link is one hop; this bounds cycles in hostile input).
MAX_STYLE_LINK_HOPS = 8

#: Largest ``w:start`` / ``w:startOverride`` accepted.  LibreOffice 7.4 keeps start values up
#: to 32767 and no further (checked: 65535 shows as 32768, 99999 as 1), and no agreement
#: numbers a list from higher; beyond it the file is refused rather than given a label
#: thousands of characters long ("AAAA...", computed by arithmetic all the same).
MAX_LIST_START = 32_767

#: Digits of an ST_DecimalNumber converted exactly: enough for any 64-bit value.  A longer
#: integer (10^30) is read as +/-10^19, beyond every limit here, without converting it.
MAX_NUMBER_DIGITS = 19

#: Most ``w:abstractNum`` plus ``w:num`` elements in one numbering part.  Word writes one
#: ``w:num`` per list and real agreements hold tens to a few thousand; a part with more is
#: refused rather than indexed.
MAX_NUMBERING_ENTRIES = 100_000

#: Longest ``w:lvlText`` accepted.  A level text is a label pattern such as "Article %1." or
#: "%1.%2.%3"; Word's dialog takes short patterns, and a long one would be copied into every
#: numbered paragraph's label.
MAX_LEVEL_TEXT_CHARS = 1_000

_PLACEHOLDER = lazy_compile(r"%([1-9])")
_DECIMAL_NUMBER = lazy_compile(r"([+-]?)0*([0-9]+)")
_HUGE = 10 ** MAX_NUMBER_DIGITS


def decimal_number(value: str | None) -> int | None:
    """An ST_DecimalNumber attribute value as an int (ECMA-376 Part 1 §17.18.10: an XML
    Schema integer, white space collapsed), or None when absent or not such a number.

    Stricter than ``int()``: no underscores, no non-ASCII digits.  An integer of more than
    :data:`MAX_NUMBER_DIGITS` digits reads as +/-10^19 (beyond every limit) unconverted.

    >>> decimal_number(" +7 "), decimal_number("1_000"), decimal_number("٣")
    (7, None, None)
    """
    if value is None:
        return None
    m = _DECIMAL_NUMBER.fullmatch(value.strip(" \t\r\n"))
    if m is None:
        return None
    sign, digits = m.groups()
    number = int(digits) if len(digits) <= MAX_NUMBER_DIGITS else _HUGE
    return -number if sign == "-" else number


def canonical_id(value: str | None) -> str | None:
    """A ``w:numId`` / ``w:abstractNumId`` as a key: the decimal number it states ("007" and
    "7" are the same list), or None when it is not an ST_DecimalNumber."""
    number = decimal_number(value)
    return None if number is None else str(number)


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
    #: ``w:numFmt/@w:format`` of a ``custom`` format ("001, 002, 003, ..."), else None.
    custom_format: str | None = None

    @property
    def is_bullet(self) -> bool:
        return self.picture_bullet or self.num_fmt in BULLET_FORMATS


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


def _start_value(el: etree._Element, source: str | None) -> int:
    """``w:start`` / ``w:startOverride`` checked against :data:`MAX_LIST_START`."""
    raw = el.get(_VAL)
    value = decimal_number(raw)
    if value is None:
        return 0  # absent or not a number: §17.9.25's default
    if not 0 <= value <= MAX_LIST_START:
        shown = raw.strip() if raw is not None and len(raw) <= 40 else f"{raw[:20]}..."
        raise CounterdraftError(
            f"refused: a list in word/numbering.xml starts at {shown} (w:{etree.QName(el).localname}); "
            f"the limit is 0 to {MAX_LIST_START}", path=source)
    return value


def _level_children(el: etree._Element) -> list[etree._Element]:
    """The children of a ``w:lvl``, with ``mc:AlternateContent`` replaced by the branch a
    consumer takes (ECMA-376 Part 3 §10.2)."""
    out: list[etree._Element] = []
    for child in el:
        if child.tag == _ALTERNATE:
            branch = alternate_branch(child)
            if branch is not None:
                out.extend(branch)
        else:
            out.append(child)
    return out


def _parse_level(el: etree._Element, source: str | None) -> LevelDef | None:
    ilvl = decimal_number(el.get(_W + "ilvl"))
    if ilvl is None or not 0 <= ilvl < MAX_LEVELS:
        return None
    values: dict[str, object] = {}
    for child in _level_children(el):
        tag = child.tag
        if tag == _W + "start":
            values["start"] = _start_value(child, source)
        elif tag == _W + "numFmt":
            values["num_fmt"] = child.get(_VAL) or "decimal"
            values["custom_format"] = child.get(_W + "format")
        elif tag == _W + "lvlText":
            text = child.get(_VAL) or ""
            if len(text) > MAX_LEVEL_TEXT_CHARS:
                raise CounterdraftError(
                    f"refused: a list level text in word/numbering.xml is {len(text)} characters "
                    f"long; the limit is {MAX_LEVEL_TEXT_CHARS}", path=source)
            values["lvl_text"] = text
        elif tag == _W + "lvlRestart":
            values["restart"] = decimal_number(child.get(_VAL))
        elif tag == _W + "isLgl":
            values["is_lgl"] = bool(on_off(child))
        elif tag == _W + "pStyle":
            values["style_id"] = child.get(_VAL)
        elif tag == _W + "lvlPicBulletId":
            values["picture_bullet"] = True
    return LevelDef(ilvl, **values)  # type: ignore[arg-type]


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
        raw = num_id if num_id is not None else (style.num_id if style is not None else None)
        nid = canonical_id(raw)
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


def parse_numbering(root: etree._Element | None, *, styles: StyleSheet | None = None,
                    source: str | None = None) -> NumberingDefinitions:
    """Parse the ``w:numbering`` element (None -> no numbering).

    *source* names the file in the :class:`~core.errors.CounterdraftError` raised when a
    value is beyond a limit (see the module's "Bounds").
    """
    if root is None:
        return NumberingDefinitions()
    entries = sum(1 for el in root if el.tag in (_W + "abstractNum", _W + "num"))
    if entries > MAX_NUMBERING_ENTRIES:
        raise CounterdraftError(
            f"refused: word/numbering.xml defines {entries} lists; the limit is "
            f"{MAX_NUMBERING_ENTRIES}", path=source)
    abstracts: dict[str, AbstractNumDef] = {}
    nums: dict[str, NumDef] = {}
    for el in root:
        if el.tag == _W + "abstractNum":
            abstract = _parse_abstract(el, source)
            if abstract is not None:
                abstracts.setdefault(abstract.abstract_id, abstract)
        elif el.tag == _W + "num":
            num = _parse_num(el, source)
            if num is not None:
                nums.setdefault(num.num_id, num)

    resolved = {nid: _follow_style_link(num.abstract_id, abstracts, nums, styles)
                for nid, num in nums.items()}
    style_levels: dict[tuple[str, str], int] = {}
    for aid, abstract in abstracts.items():
        for lvl in abstract.levels.values():
            if lvl.style_id is not None:
                style_levels.setdefault((aid, lvl.style_id), lvl.ilvl)
    return NumberingDefinitions(abstracts, nums, resolved, style_levels)


def _parse_abstract(el: etree._Element, source: str | None) -> AbstractNumDef | None:
    aid = canonical_id(el.get(_W + "abstractNumId"))
    if aid is None:
        return None
    levels: dict[int, LevelDef] = {}
    num_style_link = style_link = None
    for child in el:
        if child.tag == _W + "lvl":
            lvl = _parse_level(child, source)
            if lvl is not None:
                levels.setdefault(lvl.ilvl, lvl)
        elif child.tag == _W + "numStyleLink":
            num_style_link = child.get(_VAL)
        elif child.tag == _W + "styleLink":
            style_link = child.get(_VAL)
    return AbstractNumDef(aid, levels, num_style_link, style_link)


def _parse_num(el: etree._Element, source: str | None) -> NumDef | None:
    nid = canonical_id(el.get(_W + "numId"))
    anum = el.find(_W + "abstractNumId")
    aid = canonical_id(anum.get(_VAL)) if anum is not None else None
    if nid is None or aid is None:
        return None
    starts: dict[int, int] = {}
    overrides: dict[int, LevelDef] = {}
    for ov in el.iterfind(_W + "lvlOverride"):
        ilvl = decimal_number(ov.get(_W + "ilvl"))
        if ilvl is None or not 0 <= ilvl < MAX_LEVELS:
            continue
        so = ov.find(_W + "startOverride")
        if so is not None and decimal_number(so.get(_VAL)) is not None:
            starts[ilvl] = _start_value(so, source)
        lvl_el = ov.find(_W + "lvl")
        if lvl_el is not None:
            lvl = _parse_level(lvl_el, source)
            if lvl is not None:
                # The override applies at the level it names, whatever its own w:ilvl says.
                overrides[ilvl] = LevelDef(
                    ilvl, lvl.num_fmt, lvl.lvl_text, lvl.start, lvl.restart, lvl.is_lgl,
                    lvl.style_id, lvl.picture_bullet, lvl.custom_format)
    return NumDef(nid, aid, starts, overrides)


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
        num_id = canonical_id(style.num_id) if style is not None else None
        if num_id is None or num_id not in nums:
            return current
        target = nums[num_id].abstract_id
        if target == current:
            return current
        current = target
    return current


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

    __slots__ = ("_counts", "_defs", "_started")

    def __init__(self, definitions: NumberingDefinitions) -> None:
        self._defs = definitions
        self._counts: dict[str, dict[int, int]] = {}
        self._started: set[str] = set()

    def advance(self, num_id: str, ilvl: int, *, lang: str | None = None) -> NumberLabel | None:
        """Count one paragraph numbered (*num_id*, *ilvl*) and return what it shows; *lang*
        is the paragraph's language (``w:lang``), which the text formats follow."""
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
            custom = ref.custom_format if ref is not None else None
            return format_number(value, fmt, lang=lang, custom=custom)

        text = _PLACEHOLDER.sub(render, level.lvl_text)
        return NumberLabel(text=text if text.strip() else None, bullet=False, ilvl=ilvl,
                           list_id=abstract_id)
