"""The style sheet of a .docx (``word/styles.xml``, ECMA-376 Part 1 §17.7), reduced to what the
reader needs: style names, the ``w:basedOn`` chain, numbering carried by paragraph styles,
outline levels and the run properties used to spot headings (bold, underline, capitals).

Inheritance follows ECMA-376 Part 1 §17.7.2 (style hierarchy): a style inherits every property
it does not set from its ``w:basedOn`` parent.  The toggle properties (bold, caps; §17.7.3) are
simplified to "the nearest style that sets the property wins", which is what Word shows for
the style chains real documents use.

Cost: parsing is O(number of styles x chain depth); chains are cut at
:data:`MAX_STYLE_CHAIN` so a cyclic or absurdly deep ``w:basedOn`` chain cannot loop.
"""

from __future__ import annotations

import re
from collections.abc import Mapping
from dataclasses import dataclass, field

from lxml import etree

from ..lazyre import lazy_compile

__all__ = [
    "MAX_STYLE_CHAIN",
    "W_NS",
    "EMPTY_RUN_FORMAT",
    "RunFormat",
    "StyleDef",
    "StyleSheet",
    "on_off",
    "parse_styles",
    "run_format_of",
    "ui_style_name",
]

W_NS = "http://schemas.openxmlformats.org/wordprocessingml/2006/main"
_W = f"{{{W_NS}}}"
_VAL = _W + "val"
#: The run properties read (names built once: a document has a run format per run).
_B, _U, _CAPS, _SMALL_CAPS, _VANISH, _LANG = (_W + n for n in ("b", "u", "caps", "smallCaps", "vanish", "lang"))

#: Longest ``w:basedOn`` chain followed.  Word's own style galleries rarely go beyond 5-6
#: levels; 32 leaves ample room while bounding the walk on hostile input.
MAX_STYLE_CHAIN = 32

#: Built-in style names Word stores in lower case in styles.xml (w:name="heading 1") while
#: its user interface shows them capitalised ("Heading 1"); ECMA-376 Part 1 §17.7.4.9 lists
#: the latent/built-in names.  We report the name as the user sees it.
_LOWERCASE_BUILTINS = lazy_compile(
    r"^(heading [1-9]|toc [1-9]|index [1-9]|title|subtitle|caption|normal|header|footer|"
    r"footnote text|endnote text|annotation text|body text( [23])?|body text indent( [23])?|"
    r"list( [2-5])?|list bullet( [2-5])?|list number( [2-5])?|list continue( [2-5])?|"
    r"table of figures|envelope address|signature|salutation|date|closing|plain text)$"
)

_FALSE_VALUES = frozenset({"0", "false", "off", "none"})


def on_off(el: etree._Element | None) -> bool | None:
    """Value of an ST_OnOff property element (ECMA-376 Part 1 §17.17.4): absent -> None,
    present without ``w:val`` -> True, ``w:val`` "0"/"false"/"off" -> False."""
    if el is None:
        return None
    val = el.get(_VAL)
    return val is None or val.lower() not in _FALSE_VALUES


def _underline(el: etree._Element | None) -> bool | None:
    """``w:u`` (§17.3.2.40): underlined unless ``w:val="none"``."""
    if el is None:
        return None
    val = el.get(_VAL)
    return val is None or val != "none"


def ui_style_name(name: str) -> str:
    """The style name as Word's user interface shows it ("heading 1" -> "Heading 1")."""
    if name and name[0].islower() and _LOWERCASE_BUILTINS.match(name):
        return name[0].upper() + name[1:]
    return name


@dataclass(frozen=True, slots=True)
class RunFormat:
    """The run properties used for heading detection; None means "not set here"."""

    bold: bool | None = None
    underline: bool | None = None
    caps: bool | None = None  # w:caps or w:smallCaps
    hidden: bool | None = None  # w:vanish
    #: ``w:lang/@w:val`` (§17.3.2.20), the language of Latin text, e.g. "fr-FR".
    lang: str | None = None

    def over(self, base: RunFormat) -> RunFormat:
        """These properties where set, else *base*'s (one of the two itself when the other
        sets nothing: most runs and styles set nothing)."""
        if base is EMPTY_RUN_FORMAT:
            return self
        if self is EMPTY_RUN_FORMAT:
            return base
        return RunFormat(
            bold=self.bold if self.bold is not None else base.bold,
            underline=self.underline if self.underline is not None else base.underline,
            caps=self.caps if self.caps is not None else base.caps,
            hidden=self.hidden if self.hidden is not None else base.hidden,
            lang=self.lang if self.lang is not None else base.lang,
        )


#: The run format that sets nothing (what an absent ``w:rPr`` reads as).
EMPTY_RUN_FORMAT = _EMPTY_FORMAT = RunFormat()


def run_format_of(rpr: etree._Element | None) -> RunFormat:
    """Read bold/underline/caps/hidden/language from a ``w:rPr`` element (§17.3.2)."""
    if rpr is None:
        return _EMPTY_FORMAT
    bold = underline = caps = hidden = None
    lang: str | None = None
    for child in rpr:
        tag = child.tag
        if tag == _B:
            bold = on_off(child)
        elif tag == _U:
            underline = _underline(child)
        elif tag in (_CAPS, _SMALL_CAPS):
            v = on_off(child)
            caps = v if caps is None else (caps or bool(v))
        elif tag == _VANISH:
            hidden = on_off(child)
        elif tag == _LANG:
            lang = child.get(_VAL) or None
    if bold is None and underline is None and caps is None and hidden is None and lang is None:
        return _EMPTY_FORMAT
    return RunFormat(bold=bold, underline=underline, caps=caps, hidden=hidden, lang=lang)


@dataclass(frozen=True, slots=True)
class StyleDef:
    """One ``w:style`` with its inherited values already resolved along ``w:basedOn``."""

    style_id: str
    kind: str  # w:type: paragraph | character | table | numbering
    name: str | None
    based_on: str | None
    #: ``w:pPr/w:numPr/w:numId`` (nearest in the chain), as the string in the XML.
    num_id: str | None = None
    #: ``w:pPr/w:numPr/w:ilvl`` (nearest in the chain).
    ilvl: int | None = None
    #: Outline level 1..9 ("Heading 1" -> 1), 0 for the Title style, None for body text.
    outline_level: int | None = None
    #: Run properties of the style (``w:rPr``), resolved along the chain.
    run: RunFormat = field(default=_EMPTY_FORMAT)


@dataclass(frozen=True, slots=True)
class StyleSheet:
    styles: Mapping[str, StyleDef] = field(default_factory=dict)
    default_paragraph_style: str | None = None
    #: ``w:docDefaults/w:rPrDefault`` (§17.7.5.5).
    default_run: RunFormat = field(default=_EMPTY_FORMAT)

    def get(self, style_id: str | None) -> StyleDef | None:
        if style_id is None:
            return None
        return self.styles.get(style_id)

    def paragraph_style(self, style_id: str | None) -> StyleDef | None:
        """The paragraph's style, or the default paragraph style when it names none."""
        found = self.styles.get(style_id) if style_id is not None else None
        if found is None and self.default_paragraph_style is not None:
            found = self.styles.get(self.default_paragraph_style)
        return found


_HEADING_NAME = lazy_compile(r"^heading ([1-9])$", re.IGNORECASE)


@dataclass(slots=True)
class _RawStyle:
    style_id: str
    kind: str
    name: str | None
    based_on: str | None
    num_id: str | None
    ilvl: int | None
    outline_lvl: int | None  # raw w:outlineLvl 0..9
    run: RunFormat


def _int(value: str | None) -> int | None:
    if value is None:
        return None
    try:
        return int(value)
    except ValueError:
        return None


def _raw_style(el: etree._Element) -> _RawStyle | None:
    sid = el.get(_W + "styleId")
    if sid is None:
        return None
    name = based_on = num_id = None
    ilvl = outline = None
    run = _EMPTY_FORMAT
    for child in el:
        tag = child.tag
        if tag == _W + "name":
            name = child.get(_VAL)
        elif tag == _W + "basedOn":
            based_on = child.get(_VAL)
        elif tag == _W + "pPr":
            for pp in child:
                if pp.tag == _W + "numPr":
                    for np_ in pp:
                        if np_.tag == _W + "numId":
                            num_id = np_.get(_VAL)
                        elif np_.tag == _W + "ilvl":
                            ilvl = _int(np_.get(_VAL))
                elif pp.tag == _W + "outlineLvl":
                    outline = _int(pp.get(_VAL))
        elif tag == _W + "rPr":
            run = run_format_of(child)
    return _RawStyle(sid, el.get(_W + "type", "paragraph"), name, based_on, num_id, ilvl, outline, run)


def _outline_from(raw: _RawStyle) -> int | None | bool:
    """Outline level this style itself states: int, None (= explicitly body text), or False
    (= says nothing, look further up the chain)."""
    if raw.name is not None:
        if raw.name.lower() == "title":
            return 0
        m = _HEADING_NAME.match(raw.name)
        if m:
            return int(m.group(1))
    if raw.outline_lvl is not None:
        # w:outlineLvl is 0-based; 9 means body text (§17.3.1.20).
        return raw.outline_lvl + 1 if 0 <= raw.outline_lvl <= 8 else None
    return False


def _raw_styles(root: etree._Element) -> tuple[dict[str, _RawStyle], str | None, RunFormat]:
    """(styles by id as written, first one wins; the default paragraph style; the document's
    default run format) from the ``w:styles`` element."""
    raws: dict[str, _RawStyle] = {}
    default_para: str | None = None
    default_run = _EMPTY_FORMAT
    for el in root:
        if el.tag == _W + "style":
            raw = _raw_style(el)
            if raw is None:
                continue
            raws.setdefault(raw.style_id, raw)
            if (raw.kind == "paragraph" and default_para is None
                    and el.get(_W + "default") in ("1", "true", "on")):
                default_para = raw.style_id
        elif el.tag == _W + "docDefaults":
            rpr = el.find(f"{_W}rPrDefault/{_W}rPr")
            default_run = run_format_of(rpr)
    return raws, default_para, default_run


def _resolve_style(raw: _RawStyle, raws: dict[str, _RawStyle]) -> StyleDef:
    """*raw* with what it inherits through its ``w:basedOn`` chain (nearest first, at most
    :data:`MAX_STYLE_CHAIN` long, a loop cut where it closes)."""
    chain: list[_RawStyle] = []
    seen: set[str] = set()
    cur: _RawStyle | None = raw
    while cur is not None and cur.style_id not in seen and len(chain) < MAX_STYLE_CHAIN:
        chain.append(cur)
        seen.add(cur.style_id)
        cur = raws.get(cur.based_on) if cur.based_on else None
    num_id = next((c.num_id for c in chain if c.num_id is not None), None)
    ilvl = next((c.ilvl for c in chain if c.ilvl is not None), None)
    outline: int | None = None
    for c in chain:
        o = _outline_from(c)
        if o is not False:
            outline = o
            break
    run = _EMPTY_FORMAT
    for c in reversed(chain):
        run = c.run.over(run)
    return StyleDef(
        style_id=raw.style_id,
        kind=raw.kind,
        name=ui_style_name(raw.name) if raw.name else None,
        based_on=raw.based_on,
        num_id=num_id,
        ilvl=ilvl,
        outline_level=outline,
        run=run,
    )


def parse_styles(root: etree._Element | None) -> StyleSheet:
    """Build a :class:`StyleSheet` from the ``w:styles`` element (None -> empty sheet)."""
    if root is None:
        return StyleSheet()
    raws, default_para, default_run = _raw_styles(root)
    resolved = {sid: _resolve_style(raw, raws) for sid, raw in raws.items()}
    return StyleSheet(styles=resolved, default_paragraph_style=default_para, default_run=default_run)
