"""The body of an OpenDocument text as :class:`core.model.Block` objects: one per paragraph
(``text:p``) or heading (``text:h``), in reading order, table cells included.

ISO/IEC 26300 (ODF 1.2 Part 1; ODF 1.3 Part 3), what is read:

* **text** (§6.1): character content with white space collapsed as §6.1.2 says, ``text:s``
  (spaces, ``text:c`` of them), ``text:tab`` ("\\t"), ``text:line-break`` ("\\n"); spans,
  links, fields and ruby bases for their displayed text; footnotes and endnotes
  (``text:note``), comments (``office:annotation``), frames and text boxes (``draw:*``),
  bookmarks and change marks are not part of the paragraph's text;
* **lists** (§5.3, §16.30): the level of a paragraph is the depth of its ``text:list``
  elements; the first paragraph of a ``text:list-item`` gets the item's label, from the list
  style of the outermost list (its ``text:style-name``, or the list style of the first
  paragraph's style); ``text:start-value`` of an item restarts the count,
  ``text:list-header`` items have no label; a list continues the numbering of the list with
  the ``xml:id`` its ``text:continue-list`` names, or with ``text:continue-numbering="true"``
  of the previous list of the same style; any other list starts again;
* **headings** (§5.1.2): ``text:outline-level`` is the block's outline level; outside a list
  a heading is numbered by the outline style (``text:outline-style``) unless
  ``text:is-list-header`` is true; ``text:restart-numbering`` with ``text:start-value``
  restarts the count;
* **emphasis**: bold, underlined or capitals from the paragraph's and spans' styles
  (:mod:`.styles`) give ``lead``, ``emphasised`` and ``all_caps`` by the .docx reader's rule;
* **tracked changes** (§5.5): the body holds inserted text and not deleted text, so reading
  it is reading the changes as accepted (a warning says how many).

Cost: one pass over the body, O(size of content.xml).
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field

from lxml import etree

from ..docx.blocks import MAX_PARAGRAPHS, paragraph_emphasis
from ..errors import CounterdraftError
from ..lazyre import compile_pattern
from ..model import Block
from .namespaces import DRAW, OFFICE, TABLE, TEXT, XML, q
from .numbering import MAX_START, ListCounter
from .package import open_odt_package
from .styles import Emphasis, StyleSheet

__all__ = ["blocks_from_content", "read_odt_blocks"]

_P, _H = q(TEXT, "p"), q(TEXT, "h")
_LIST, _ITEM, _HEADER = q(TEXT, "list"), q(TEXT, "list-item"), q(TEXT, "list-header")
_SPAN, _A, _S, _TAB, _BR = q(TEXT, "span"), q(TEXT, "a"), q(TEXT, "s"), q(TEXT, "tab"), q(TEXT, "line-break")
_SKIPPED_TEXT = {q(TEXT, n) for n in (
    "note", "bookmark", "bookmark-start", "bookmark-end", "reference-mark", "reference-mark-start",
    "reference-mark-end", "change", "change-start", "change-end", "soft-page-break", "toc-mark",
    "toc-mark-start", "toc-mark-end", "alphabetical-index-mark", "alphabetical-index-mark-start",
    "alphabetical-index-mark-end", "user-index-mark", "user-index-mark-start", "user-index-mark-end",
    "tracked-changes", "sequence-decls", "variable-decls", "user-field-decls", "ruby-text")}
_SKIPPED = _SKIPPED_TEXT | {q(OFFICE, "annotation"), q(OFFICE, "annotation-end"), q(OFFICE, "forms")}
_INDEXES = {q(TEXT, n) for n in ("table-of-content", "alphabetical-index", "illustration-index",
                                 "table-index", "object-index", "user-index", "bibliography")}
_WS_RE = compile_pattern(r"[ \t\r\n]+")
#: Nesting deeper than this (tables in tables in lists ...) is not walked further.
MAX_DEPTH = 64


@dataclass(slots=True)
class _Piece:
    text: str
    emph: bool
    caps: bool


@dataclass(slots=True)
class _Walker:
    sheet: StyleSheet
    source: str
    blocks: list[Block] = field(default_factory=list)
    by_id: dict[str, ListCounter] = field(default_factory=dict)
    last_by_style: dict[str, ListCounter] = field(default_factory=dict)
    lists: int = 0
    outline: ListCounter | None = None
    comments: int = 0

    # -- text ----------------------------------------------------------------------------

    def _inline(self, el: etree._Element, emph: Emphasis, out: list[_Piece]) -> None:
        def add(text: str, *, literal: bool = False) -> None:
            if not text:
                return
            if not literal:
                text = _WS_RE.sub(" ", text)
                if text.startswith(" ") and (not out or out[-1].text.endswith((" ", "\t", "\n"))):
                    text = text[1:]
                if not text:
                    return
            out.append(_Piece(text, emph.emphasised, bool(emph.caps)))

        add(el.text or "")
        for child in el:
            tag = child.tag
            if not isinstance(tag, str):  # comments, processing instructions
                add(child.tail or "")
                continue
            if tag == q(OFFICE, "annotation"):
                self.comments += 1
            if tag in _SKIPPED or tag.startswith(f"{{{DRAW}}}"):
                pass
            elif tag == _S:
                n = child.get(q(TEXT, "c"), "1")
                add(" " * (int(n) if n.isdigit() and int(n) < 1000 else 1), literal=True)
            elif tag == _TAB:
                add("\t", literal=True)
            elif tag == _BR:
                add("\n", literal=True)
            elif tag == _SPAN:
                inner = self.sheet.emphasis("text", child.get(q(TEXT, "style-name"))).over(emph)
                self._inline(child, inner, out)
            else:  # links, fields, ruby bases, meta: their displayed text
                self._inline(child, emph, out)
            add(child.tail or "")

    # -- paragraphs ----------------------------------------------------------------------

    def paragraph(self, el: etree._Element, *, in_table: bool, label: str | None = None,
                  list_level: int | None = None, list_id: str | None = None,
                  bullet: bool = False) -> None:
        if len(self.blocks) >= MAX_PARAGRAPHS:
            raise CounterdraftError(f"the document has more than {MAX_PARAGRAPHS} paragraphs; "
                                    "this is not an agreement Counterdraft can review", path=self.source)
        style = el.get(q(TEXT, "style-name"))
        base = self.sheet.emphasis("paragraph", style)
        pieces: list[_Piece] = []
        self._inline(el, base, pieces)
        text = "".join(p.text for p in pieces)
        stripped = text.rstrip()
        lead, emphasised, all_caps = paragraph_emphasis(
            stripped, pieces, [p.emph for p in pieces], [p.caps for p in pieces])
        outline = None
        if el.tag == _H:
            level = el.get(q(TEXT, "outline-level"), "1")
            outline = int(level) if level.isdigit() and 1 <= int(level) <= 10 else 1
            if label is None and list_level is None:
                label, list_level, list_id = self._heading_label(el, outline)
        else:
            outline = self.sheet.outline_level_of(style)
        self.blocks.append(Block(
            index=len(self.blocks), text=stripped, label=label, list_level=list_level,
            list_id=list_id, bullet=bullet, style=self.sheet.display_name(style),
            outline_level=outline, lead=lead, emphasised=emphasised, all_caps=all_caps,
            in_table=in_table))

    def _heading_label(self, el: etree._Element, level: int) -> tuple[str | None, int | None, str | None]:
        if not self.sheet.outline or el.get(q(TEXT, "is-list-header")) == "true":
            return None, None, None
        st = self.sheet.outline.get(level)
        if st is None or (not st.num_format and not st.prefix and not st.suffix):
            return None, None, None
        if self.outline is None:
            self.outline = ListCounter(self.sheet.outline, "outline")
        start = None
        if el.get(q(TEXT, "restart-numbering")) == "true":
            start = _start_value(el.get(q(TEXT, "start-value")))
        label = self.outline.advance(level, start=start)
        return (label or None), level - 1, "outline"

    # -- lists ---------------------------------------------------------------------------

    def _counter(self, el: etree._Element) -> ListCounter:
        style = el.get(q(TEXT, "style-name")) or self._first_paragraph_list_style(el) or ""
        counter = None
        continued = el.get(q(TEXT, "continue-list"))
        if continued:
            counter = self.by_id.get(continued)
        elif el.get(q(TEXT, "continue-numbering")) == "true":
            counter = self.last_by_style.get(style)
        if counter is None:
            self.lists += 1
            counter = ListCounter(self.sheet.list_styles.get(style, {}), f"list{self.lists}")
        xml_id = el.get(q(XML, "id"))
        if xml_id:
            self.by_id[xml_id] = counter
        self.last_by_style[style] = counter
        return counter

    def _first_paragraph_list_style(self, el: etree._Element) -> str | None:
        for p in el.iter(_P, _H):
            return self.sheet.list_style_of(p.get(q(TEXT, "style-name")))
        return None

    def list(self, el: etree._Element, counter: ListCounter | None, level: int, *, in_table: bool,
             depth: int) -> None:
        if counter is None:
            counter = self._counter(el)
        for item in el:
            if item.tag not in (_ITEM, _HEADER):
                continue
            numbered = item.tag == _ITEM
            start = _start_value(item.get(q(TEXT, "start-value"))) if numbered else None
            first = True
            for child in item:
                if child.tag in (_P, _H):
                    label = None
                    bullet = False
                    if numbered and first:
                        label = counter.advance(level, start=start) or None
                        bullet = counter.style(level).bullet is not None
                        if bullet:  # as the .docx reader: a bullet item has no label
                            label = None
                    listed = label is not None or bullet
                    self.paragraph(child, in_table=in_table, label=label,
                                   list_level=level - 1 if listed else None,
                                   list_id=counter.list_id if listed else None, bullet=bullet)
                    first = False
                elif child.tag == _LIST:
                    self.list(child, counter, level + 1, in_table=in_table, depth=depth + 1)
                else:
                    self.body(child, in_table=in_table, depth=depth + 1)

    # -- body ----------------------------------------------------------------------------

    def body(self, el: etree._Element, *, in_table: bool, depth: int = 0) -> None:
        """Walk one body element (a paragraph, list, table, section ...)."""
        if depth > MAX_DEPTH:
            return
        tag = el.tag
        if not isinstance(tag, str):
            return
        if tag in (_P, _H):
            self.paragraph(el, in_table=in_table)
        elif tag == _LIST:
            self.list(el, None, 1, in_table=in_table, depth=depth)
        elif tag == q(TABLE, "table"):
            for row in el.iter(q(TABLE, "table-row")):
                for cell in row:
                    if cell.tag == q(TABLE, "table-cell"):
                        for child in cell:
                            self.body(child, in_table=True, depth=depth + 1)
        elif tag in _INDEXES:
            body = el.find(q(TEXT, "index-body"))
            if body is not None:
                for child in body:
                    self.body(child, in_table=in_table, depth=depth + 1)
        elif tag in _SKIPPED or tag.startswith(f"{{{DRAW}}}"):
            return
        else:  # sections and other containers
            for child in el:
                self.body(child, in_table=in_table, depth=depth + 1)


def _start_value(value: str | None) -> int | None:
    if value is None or not value.strip().isdigit():
        return None
    n = int(value)
    return n if n <= MAX_START else None


def blocks_from_content(content: etree._Element, styles: etree._Element | None, *,
                        source: str, tracked_changes: int = 0) -> tuple[tuple[Block, ...], tuple[str, ...]]:
    """Blocks and warnings from parsed content.xml and styles.xml."""
    walker = _Walker(StyleSheet(content, styles), source)
    text = content.find(f"{q(OFFICE, 'body')}/{q(OFFICE, 'text')}")
    if text is not None:
        for child in text:
            walker.body(child, in_table=False)
    warnings: list[str] = []
    if tracked_changes:
        noun = "tracked change" if tracked_changes == 1 else "tracked changes"
        warnings.append(f"{tracked_changes} {noun} read as accepted")
    if walker.comments:
        warnings.append(f"{walker.comments} comment(s) in the file not shown")
    return tuple(walker.blocks), tuple(warnings)


def read_odt_blocks(path: str | os.PathLike[str]) -> tuple[tuple[Block, ...], tuple[str, ...]]:
    """Read the .odt at *path* into blocks and warnings, after the checks of
    :func:`core.odf.package.open_odt_package`."""
    package = open_odt_package(path)
    return blocks_from_content(package.content, package.styles, source=package.path,
                               tracked_changes=package.tracked_changes)
