"""Styles of an OpenDocument text, resolved the way ODF inherits them (ISO/IEC 26300, ODF 1.2
Part 1 §16.1-16.2): an automatic style (``office:automatic-styles`` of content.xml) or a
common style (``office:styles`` of styles.xml) takes what it does not set from its
``style:parent-style-name``, and last from the family's ``style:default-style``.

What the reader needs of them: for text, bold (``fo:font-weight`` bold or 600 and more),
underline (``style:text-underline-style`` other than none) and capitals
(``fo:text-transform`` uppercase, ``fo:font-variant`` small-caps); for paragraphs, the same
plus the display name, the list style (``style:list-style-name``) and the outline level
(``style:default-outline-level``).  List styles (``text:list-style``) and the outline style
(``text:outline-style``) are parsed by :mod:`.numbering`.
"""

from __future__ import annotations

from dataclasses import dataclass

from lxml import etree

from .namespaces import FO, OFFICE, STYLE, TEXT, q
from .numbering import LevelStyle, parse_list_style

__all__ = ["Emphasis", "StyleSheet"]

#: Inheritance chains longer than this are cut (a loop of parent names, or a hostile file).
MAX_PARENT_DEPTH = 32
#: ``fo:font-weight`` values at or above this are bold (CSS numeric weights: 700 is bold,
#: 600 semi-bold, which word processors show as bold; common practice, no source).
BOLD_WEIGHT = 600


@dataclass(frozen=True, slots=True)
class Emphasis:
    bold: bool | None = None
    underline: bool | None = None
    caps: bool | None = None

    def over(self, base: Emphasis) -> Emphasis:
        """These properties, falling back on *base* where unset."""
        return Emphasis(self.bold if self.bold is not None else base.bold,
                        self.underline if self.underline is not None else base.underline,
                        self.caps if self.caps is not None else base.caps)

    @property
    def emphasised(self) -> bool:
        return bool(self.bold) or bool(self.underline) or bool(self.caps)


def _emphasis_of(style: etree._Element) -> Emphasis:
    props = style.find(q(STYLE, "text-properties"))
    if props is None:
        return Emphasis()
    bold = None
    weight = props.get(q(FO, "font-weight"))
    if weight is not None:
        bold = weight == "bold" or (weight.isdigit() and int(weight) >= BOLD_WEIGHT)
    underline = None
    line = props.get(q(STYLE, "text-underline-style"))
    if line is not None:
        underline = line != "none"
    caps = None
    transform = props.get(q(FO, "text-transform"))
    variant = props.get(q(FO, "font-variant"))
    if transform is not None or variant is not None:
        caps = transform == "uppercase" or variant == "small-caps"
    return Emphasis(bold, underline, caps)


class StyleSheet:
    """The styles of one document (content.xml's automatic styles and styles.xml)."""

    def __init__(self, content: etree._Element, styles: etree._Element | None) -> None:
        self._styles: dict[tuple[str, str], etree._Element] = {}
        self._defaults: dict[str, etree._Element] = {}
        self.list_styles: dict[str, dict[int, LevelStyle]] = {}
        self.outline: dict[int, LevelStyle] = {}
        for root in (styles, content):  # content.xml's automatic styles last: they win
            if root is None:
                continue
            for section in ("styles", "automatic-styles"):
                holder = root.find(q(OFFICE, section))
                if holder is None:
                    continue
                for el in holder:
                    if el.tag == q(STYLE, "style"):
                        name = el.get(q(STYLE, "name"))
                        family = el.get(q(STYLE, "family"), "")
                        if name:
                            self._styles[(family, name)] = el
                    elif el.tag == q(STYLE, "default-style"):
                        self._defaults[el.get(q(STYLE, "family"), "")] = el
                    elif el.tag == q(TEXT, "list-style"):
                        name = el.get(q(STYLE, "name"))
                        if name:
                            self.list_styles[name] = parse_list_style(el)
                    elif el.tag == q(TEXT, "outline-style"):
                        self.outline = parse_list_style(el)
        self._emphasis_cache: dict[tuple[str, str], Emphasis] = {}

    def _chain(self, family: str, name: str | None) -> list[etree._Element]:
        out: list[etree._Element] = []
        seen: set[str] = set()
        while name and name not in seen and len(out) < MAX_PARENT_DEPTH:
            seen.add(name)
            el = self._styles.get((family, name))
            if el is None:
                break
            out.append(el)
            name = el.get(q(STYLE, "parent-style-name"))
        default = self._defaults.get(family)
        if default is not None:
            out.append(default)
        return out

    def emphasis(self, family: str, name: str | None) -> Emphasis:
        """The text emphasis a style of *family* ("paragraph", "text") gives."""
        key = (family, name or "")
        got = self._emphasis_cache.get(key)
        if got is None:
            got = Emphasis()
            for el in self._chain(family, name):
                got = got.over(_emphasis_of(el))
            self._emphasis_cache[key] = got
        return got

    def _first(self, name: str | None, attr: str) -> str | None:
        for el in self._chain("paragraph", name):
            value: str | None = el.get(attr)
            if value is not None:
                return value
        return None

    def display_name(self, name: str | None) -> str | None:
        """The paragraph style's name as the user sees it (the nearest common style)."""
        for el in self._chain("paragraph", name):
            if el.getparent() is not None and el.getparent().tag == q(OFFICE, "styles") \
                    and el.tag == q(STYLE, "style"):
                shown: str | None = el.get(q(STYLE, "display-name")) or el.get(q(STYLE, "name"))
                return shown
        return None

    def list_style_of(self, name: str | None) -> str | None:
        """The list style a paragraph style names (``style:list-style-name``), inherited."""
        return self._first(name, q(STYLE, "list-style-name"))

    def outline_level_of(self, name: str | None) -> int | None:
        value = self._first(name, q(STYLE, "default-outline-level"))
        return int(value) if value and value.isdigit() and 1 <= int(value) <= 10 else None
