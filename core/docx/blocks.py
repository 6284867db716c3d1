"""Paragraphs of a .docx as :class:`core.model.Block` objects, in reading order.

A walker of our own over the paragraph XML (python-docx's ``Paragraph.text`` skips text inside
``w:ins`` and ``w:moveTo``).  What a block's text holds (ECMA-376 Part 1 references):

* tracked changes read as accepted (§17.13.5): ``w:ins`` and ``w:moveTo`` content kept,
  ``w:del`` and ``w:moveFrom`` content dropped; a paragraph whose mark is deleted
  (``w:pPr/w:rPr/w:del`` or ``w:moveFrom``) is merged into the next paragraph: its block
  keeps an empty text (so block indices still match the XML paragraphs) and its words open
  the next block.  A warning gives the number of revisions found;
* field results (§17.16): ``w:fldSimple`` content, and for complex fields
  (``w:fldChar`` begin / separate / end, §17.16.18) the result between separate and end,
  never the instruction; nesting is followed;
* ``w:tab``/``w:ptab`` -> "\\t", ``w:br``/``w:cr`` -> "\\n", ``w:noBreakHyphen`` -> "-",
  ``w:softHyphen`` -> nothing, ``w:sym`` -> its character (§17.3.3);
* content of ``w:hyperlink``, ``w:smartTag``, ``w:customXml``, ``w:sdt`` (content controls),
  ``w:fldSimple``, ``w:dir``/``w:bdo`` and the base text of ``w:ruby``;
* hidden text (direct ``w:vanish``, §17.3.2.41) is not displayed, so it is left out.

Tables are read in reading order: each cell's paragraphs (nested tables too) with
``in_table=True``.  Headers, footers, footnotes, comments, text boxes and math are not blocks.
Empty paragraphs are blocks with text "" so block ``i`` is the ``i``-th paragraph of
:func:`iter_body_paragraphs`.

Heading features: the style name (styles.xml ``w:name``), the outline level (Heading N styles,
``w:outlineLvl`` through the style chain, "Title" -> 0), and from run formatting (bold,
underline, caps/small caps; direct, character style or paragraph style) ``lead``,
``emphasised`` and ``all_caps``.

Cost: one pass over the body, O(XML elements); no XPath per run.
"""

from __future__ import annotations

import os
import re
from collections import Counter
from dataclasses import dataclass
from typing import Iterator

from lxml import etree

from ..model import Block
from .numbering import ListCounter, NumberingDefinitions, parse_numbering
from .package import open_docx_package
from .styles import W_NS, RunFormat, StyleSheet, parse_styles, run_format_of

__all__ = [
    "TextPiece",
    "blocks_from_document",
    "iter_block_pieces",
    "iter_body_paragraphs",
    "paragraph_pieces",
    "read_docx_blocks",
]

_W = "{%s}" % W_NS
_MC = "{http://schemas.openxmlformats.org/markup-compatibility/2006}"
_VAL = _W + "val"

_BODY = _W + "body"
_DOCUMENT = _W + "document"
_P = _W + "p"
_R = _W + "r"
_T = _W + "t"
_PPR = _W + "pPr"
_RPR = _W + "rPr"
_TBL = _W + "tbl"
_TR = _W + "tr"
_TC = _W + "tc"
_TRPR = _W + "trPr"
_SDT = _W + "sdt"
_SDT_CONTENT = _W + "sdtContent"
_CUSTOM_XML = _W + "customXml"
_ALT_CHUNK = _W + "altChunk"
_INS = _W + "ins"
_DEL = _W + "del"
_MOVE_FROM = _W + "moveFrom"
_MOVE_TO = _W + "moveTo"
_RPR_CHANGE = _W + "rPrChange"
_PPR_CHANGE = _W + "pPrChange"
_FLD_CHAR = _W + "fldChar"
_FLD_CHAR_TYPE = _W + "fldCharType"
_RUBY = _W + "ruby"
_RUBY_BASE = _W + "rubyBase"
_TXBX_CONTENT = _W + "txbxContent"
_MC_FALLBACK = _MC + "Fallback"

#: Paragraph-level elements whose children are walked like the paragraph's own.
_TRANSPARENT = frozenset(
    _W + name for name in ("hyperlink", "smartTag", "customXml", "fldSimple", "dir", "bdo")
)
#: Run children that contribute fixed text (§17.3.3).
_FIXED_TEXT = {
    _W + "tab": "\t",
    _W + "ptab": "\t",
    _W + "br": "\n",
    _W + "cr": "\n",
    _W + "noBreakHyphen": "-",
    _W + "softHyphen": "",
}
_SYM = _W + "sym"


@dataclass(frozen=True, slots=True, eq=False)
class TextPiece:
    """Text contributed by one run child (w:t, w:tab, w:br, w:sym, ...), in document order.

    ``element`` is the source run (``w:r``); ``node`` the child that produced the text.
    """

    text: str
    element: etree._Element
    node: etree._Element | None = None


# --------------------------------------------------------------------------------------
# Reading order
# --------------------------------------------------------------------------------------


@dataclass(slots=True)
class _Tally:
    """Counts gathered while walking (tracked changes, content not read)."""

    revisions: Counter[str]
    alt_chunks: int = 0
    #: Complex fields still open at the end of the body (a damaged field hides what follows).
    open_fields: int = 0

    @classmethod
    def new(cls) -> "_Tally":
        return cls(Counter())


def _body_of(document_element: etree._Element) -> etree._Element:
    if document_element.tag == _DOCUMENT:
        body = document_element.find(_BODY)
        if body is None:
            raise ValueError("w:document has no w:body")
        return body
    return document_element


def _iter_paragraphs(document_element: etree._Element, tally: _Tally | None = None
                     ) -> Iterator[tuple[etree._Element, bool]]:
    """(w:p, in_table) in reading order; an explicit stack, so nesting costs no recursion."""
    stack: list[tuple[Iterator[etree._Element], int]] = [(iter(_body_of(document_element)), 0)]
    while stack:
        it, depth = stack[-1]
        child = next(it, None)
        if child is None:
            stack.pop()
            continue
        tag = child.tag
        if tag == _P:
            yield child, depth > 0
        elif tag == _TBL:
            stack.append((iter(child), depth + 1))
        elif tag == _TR:
            if tally is not None:
                trpr = child.find(_TRPR)
                if trpr is not None:
                    for rev in trpr:
                        if rev.tag in (_INS, _DEL):
                            tally.revisions[rev.tag] += 1
            stack.append((iter(child), depth))
        elif tag == _TC or tag == _CUSTOM_XML:
            stack.append((iter(child), depth))
        elif tag == _SDT:
            content = child.find(_SDT_CONTENT)
            if content is not None:
                stack.append((iter(content), depth))
        elif tag == _ALT_CHUNK and tally is not None:
            tally.alt_chunks += 1


def iter_body_paragraphs(document_element: etree._Element) -> Iterator[etree._Element]:
    """The body's ``w:p`` elements in reading order (table cells and nested tables included,
    content controls and custom XML opened), the same order as :func:`read_docx_blocks`.

    *document_element* is the ``w:document`` root or its ``w:body``.
    """
    for p, _ in _iter_paragraphs(document_element):
        yield p


# --------------------------------------------------------------------------------------
# The paragraph walker
# --------------------------------------------------------------------------------------

_EMPTY_FORMAT = RunFormat()


@dataclass(slots=True)
class _Walk:
    pieces: list[TextPiece]
    formats: list[RunFormat]  # the run format of each piece (direct rPr, not yet inherited)
    char_styles: list[str | None]
    mark_deleted: bool


def _walk_paragraph(p: etree._Element, fields: list[bool], tally: _Tally | None) -> _Walk:
    """Walk one paragraph.  *fields* is the open complex-field stack (True = in its result
    part), shared across paragraphs by the caller; text shows only when every open field is
    in its result part."""
    pieces: list[TextPiece] = []
    formats: list[RunFormat] = []
    char_styles: list[str | None] = []
    mark_deleted = False
    revisions = tally.revisions if tally is not None else None

    # (iterator over children, current run or None, run format, char style id)
    stack: list[tuple[Iterator[etree._Element], etree._Element | None, RunFormat, str | None]]
    stack = [(iter(p), None, _EMPTY_FORMAT, None)]
    while stack:
        it, run, fmt, cstyle = stack[-1]
        child = next(it, None)
        if child is None:
            stack.pop()
            continue
        tag = child.tag
        if run is None:
            # Paragraph-level content.
            if tag == _R:
                rpr = child.find(_RPR)
                rfmt = run_format_of(rpr)
                rstyle = None
                if rpr is not None:
                    rs = rpr.find(_W + "rStyle")
                    if rs is not None:
                        rstyle = rs.get(_VAL)
                    if revisions is not None and rpr.find(_RPR_CHANGE) is not None:
                        revisions[_RPR_CHANGE] += 1
                stack.append((iter(child), child, rfmt, rstyle))
            elif tag == _INS or tag == _MOVE_TO:
                if revisions is not None:
                    revisions[tag] += 1
                stack.append((iter(child), None, _EMPTY_FORMAT, None))
            elif tag == _DEL or tag == _MOVE_FROM:
                if revisions is not None:
                    revisions[tag] += 1
            elif tag in _TRANSPARENT:
                stack.append((iter(child), None, _EMPTY_FORMAT, None))
            elif tag == _SDT:
                content = child.find(_SDT_CONTENT)
                if content is not None:
                    stack.append((iter(content), None, _EMPTY_FORMAT, None))
            elif tag == _PPR:
                rpr = child.find(_RPR)
                if rpr is not None:
                    for mark in rpr:
                        mtag = mark.tag
                        if mtag == _DEL or mtag == _MOVE_FROM:
                            mark_deleted = True
                            if revisions is not None:
                                revisions[mtag] += 1
                        elif (mtag == _INS or mtag == _MOVE_TO) and revisions is not None:
                            revisions[mtag] += 1
                if revisions is not None and child.find(_PPR_CHANGE) is not None:
                    revisions[_PPR_CHANGE] += 1
            continue
        # Run content: text, fixed characters and symbols become pieces.
        if tag == _T:
            text = child.text
        elif tag in _FIXED_TEXT:
            text = _FIXED_TEXT[tag]
        elif tag == _SYM:
            text = _sym_text(child)
        else:
            if tag == _FLD_CHAR:
                kind = child.get(_FLD_CHAR_TYPE)
                if kind == "begin":
                    fields.append(False)
                elif kind == "separate":
                    if fields:
                        fields[-1] = True
                elif kind == "end":
                    if fields:
                        fields.pop()
            elif tag == _RUBY:
                base = child.find(_RUBY_BASE)
                if base is not None:
                    stack.append((iter(base), None, _EMPTY_FORMAT, None))
            continue
        if text and not fmt.hidden and all(fields):
            pieces.append(TextPiece(text, run, child))
            formats.append(fmt)
            char_styles.append(cstyle)
    return _Walk(pieces, formats, char_styles, mark_deleted)


def _sym_text(sym: etree._Element) -> str:
    """``w:sym/@w:char`` (§17.3.3.30) as a character.  Symbol-font codes in the private-use
    range F000-F0FF are kept as they are (mapping every symbol font is not worth it)."""
    code = sym.get(_W + "char")
    if not code:
        return ""
    try:
        value = int(code, 16)
    except ValueError:
        return ""
    if not 0 < value <= 0x10FFFF or 0xD800 <= value <= 0xDFFF:
        return ""
    return chr(value)


def paragraph_pieces(p: etree._Element) -> list[TextPiece]:
    """The text pieces of one ``w:p``, in order.

    ``"".join(piece.text for piece in paragraph_pieces(p)) == block.text`` for the block read
    from *p*, except in two rare cases where the text depends on neighbouring paragraphs: a
    paragraph whose mark is a tracked deletion (its words move into the next block) and a
    complex field whose instruction spans paragraphs.  :func:`iter_block_pieces` handles
    both and is exact for every block.
    """
    return _walk_paragraph(p, [], None).pieces


def iter_block_pieces(document_element: etree._Element
                      ) -> Iterator[tuple[etree._Element, list[TextPiece]]]:
    """(w:p, pieces) for every block in order; ``"".join(texts) == block.text`` always."""
    for p, _in_table, walk in _merged_walks(document_element, None):
        yield p, walk.pieces


def _merged_walks(document_element: etree._Element, tally: _Tally | None
                  ) -> Iterator[tuple[etree._Element, bool, _Walk]]:
    """Walk every paragraph, moving the words of a paragraph whose mark is deleted into the
    next paragraph (reading the deletion as accepted).  The last paragraph keeps its words
    when there is no next paragraph to merge into."""
    fields: list[bool] = []
    pending: tuple[etree._Element, bool, _Walk] | None = None
    carry: _Walk | None = None
    for p, in_table in _iter_paragraphs(document_element, tally):
        walk = _walk_paragraph(p, fields, tally)
        if carry is not None:
            walk = _Walk(carry.pieces + walk.pieces, carry.formats + walk.formats,
                         carry.char_styles + walk.char_styles, walk.mark_deleted)
            carry = None
        if pending is not None:
            yield pending
            pending = None
        if walk.mark_deleted:
            carry = walk
            pending = (p, in_table, _Walk([], [], [], True))
        else:
            yield p, in_table, walk
    if pending is not None:
        # Nothing follows: keep the words in the paragraph they came from.
        p, in_table, _ = pending
        yield p, in_table, carry if carry is not None else pending[2]
    if tally is not None:
        tally.open_fields = len(fields)


# --------------------------------------------------------------------------------------
# Heading features
# --------------------------------------------------------------------------------------

#: A literal label typed (in plain text) before an emphasised heading, as in
#: "7.2<tab>**Limitation of Liability.** The Supplier ...": the lead then starts with it.
#: Common practice in manually numbered drafts, no source.
_LITERAL_LABEL = re.compile(
    r"^\s*(?:"
    r"(?:article|section|clause|schedule|part|annex|appendix|exhibit)\s+[0-9a-z]{1,6}[.:]?"
    r"|\(?\d{1,3}(?:\.\d{1,3}){0,4}[.)]?"  # 7   7.   7.2   7.2.   (7)   7)
    r"|\((?:[a-z]{1,2}|[ivxlcdm]{1,6})\)"  # (a)   (iv)
    r"|(?:[a-z]{1,2}|[ivxlcdm]{1,6})[.)]"  # a.   a)   iv.
    r")\s*$",
    re.IGNORECASE,
)
#: Punctuation right after the emphasised words that still belongs to the heading
#: ("**Payment**. The Customer ..." -> lead "Payment.").
_TRAILING_PUNCT = re.compile(r"^[.:;\u2013\u2014-]+")


@dataclass(frozen=True, slots=True)
class _Emphasis:
    lead: str | None
    emphasised: bool
    all_caps: bool


def _emphasis(text: str, pieces: list[TextPiece], emph: list[bool], caps: list[bool]) -> _Emphasis:
    """Lead / emphasised / all-caps of a paragraph from its pieces.  O(pieces)."""
    n = len(pieces)
    # Skip a plain literal label before the first emphasised piece.
    start = 0
    offset = 0
    first_emph = next((i for i in range(n) if emph[i] and pieces[i].text.strip()), None)
    if first_emph is not None and first_emph > 0:
        prefix_len = sum(len(pieces[i].text) for i in range(first_emph))
        prefix = text[:prefix_len]
        if not prefix.strip() or (_LITERAL_LABEL.match(prefix) and "\n" not in prefix):
            start = first_emph
            offset = prefix_len
    # all_caps: every piece with letters is shown in capitals.
    letters = False
    all_caps = True
    for i in range(start, n):
        t = pieces[i].text
        if any(ch.isalpha() for ch in t):
            letters = True
            if not (caps[i] or t == t.upper()):
                all_caps = False
                break
    all_caps = all_caps and letters

    lead_end = None
    cont = None
    pos = offset
    for i in range(start, n):
        t = pieces[i].text
        if not t.strip():
            pos += len(t)
            continue
        if emph[i]:
            pos += len(t)
            lead_end = pos
        else:
            cont = pos
            break
    if lead_end is None:
        return _Emphasis(None, False, all_caps)
    if cont is None:
        return _Emphasis(None, True, all_caps)
    head = text[:lead_end]
    rest = text[lead_end:]
    if head and rest and head[-1].isalnum() and rest[0].isalnum():
        # Emphasis stops inside a word: not a run-in heading.
        return _Emphasis(None, False, all_caps)
    m = _TRAILING_PUNCT.match(rest)
    if m:
        lead_end += m.end()
    lead = text[:lead_end].rstrip()
    if not lead.strip() or not text[lead_end:].strip():
        return _Emphasis(None, not text[lead_end:].strip(), all_caps)
    return _Emphasis(lead, False, all_caps)


# --------------------------------------------------------------------------------------
# Blocks
# --------------------------------------------------------------------------------------


def _ppr_values(p: etree._Element) -> tuple[str | None, str | None, int | None, int | None]:
    """(pStyle, numId, ilvl, outlineLvl) set directly on the paragraph."""
    ppr = p.find(_PPR)
    if ppr is None:
        return None, None, None, None
    style = num_id = None
    ilvl = outline = None
    for child in ppr:
        tag = child.tag
        if tag == _W + "pStyle":
            style = child.get(_VAL)
        elif tag == _W + "numPr":
            for np_ in child:
                if np_.tag == _W + "numId":
                    num_id = np_.get(_VAL)
                elif np_.tag == _W + "ilvl":
                    try:
                        ilvl = int(np_.get(_VAL, ""))
                    except ValueError:
                        ilvl = None
        elif tag == _W + "outlineLvl":
            try:
                outline = int(child.get(_VAL, ""))
            except ValueError:
                outline = None
    return style, num_id, ilvl, outline


def _revision_warning(revisions: Counter[str]) -> str | None:
    ins = revisions[_INS]
    dels = revisions[_DEL]
    moves = revisions[_MOVE_FROM] + revisions[_MOVE_TO]
    fmt = revisions[_RPR_CHANGE] + revisions[_PPR_CHANGE]
    total = ins + dels + moves + fmt
    if not total:
        return None
    parts = []
    for count, one, many in ((ins, "insertion", "insertions"), (dels, "deletion", "deletions"),
                             (moves, "move mark", "move marks"),
                             (fmt, "formatting change", "formatting changes")):
        if count:
            parts.append(f"{count} {one if count == 1 else many}")
    noun = "tracked change" if total == 1 else "tracked changes"
    return f"{total} {noun} read as accepted ({', '.join(parts)})"


def _text_box_count(document_element: etree._Element) -> int:
    """Text boxes in the body (not counting the VML fallback copy of a DrawingML shape)."""
    count = 0
    for box in document_element.iter(_TXBX_CONTENT):
        parent = box.getparent()
        inside_fallback = False
        while parent is not None:
            if parent.tag == _MC_FALLBACK:
                inside_fallback = True
                break
            parent = parent.getparent()
        if not inside_fallback:
            count += 1
    return count


def blocks_from_document(
    document_element: etree._Element,
    *,
    styles: StyleSheet | None = None,
    numbering: NumberingDefinitions | None = None,
) -> tuple[tuple[Block, ...], tuple[str, ...]]:
    """Blocks and warnings from parsed parts (the pure core of :func:`read_docx_blocks`)."""
    sheet = styles if styles is not None else StyleSheet()
    defs = numbering if numbering is not None else NumberingDefinitions()
    counter = ListCounter(defs)
    tally = _Tally.new()
    blocks: list[Block] = []
    default_run = sheet.default_run
    for p, in_table, walk in _merged_walks(document_element, tally):
        style_id, num_id, ilvl, outline_raw = _ppr_values(p)
        style = sheet.paragraph_style(style_id)
        para_run = style.run.over(default_run) if style is not None else default_run
        pieces = walk.pieces
        text = "".join(piece.text for piece in pieces)

        emph: list[bool] = []
        caps: list[bool] = []
        for fmt, cstyle in zip(walk.formats, walk.char_styles):
            cdef = sheet.get(cstyle)
            full = fmt.over(cdef.run.over(para_run)) if cdef is not None else fmt.over(para_run)
            is_caps = bool(full.caps)
            emph.append(bool(full.bold) or bool(full.underline) or is_caps)
            caps.append(is_caps)
        features = _emphasis(text, pieces, emph, caps)

        label = None
        list_level = list_id = None
        bullet = False
        merged_away = walk.mark_deleted and not pieces
        if not merged_away:
            numpr = defs.paragraph_numbering(num_id=num_id, ilvl=ilvl, style=style)
            if numpr is not None:
                shown = counter.advance(*numpr)
                if shown is not None:
                    label = shown.text
                    bullet = shown.bullet
                    list_level = shown.ilvl
                    list_id = shown.list_id

        if outline_raw is not None:
            outline = outline_raw + 1 if 0 <= outline_raw <= 8 else None
        else:
            outline = style.outline_level if style is not None else None

        blocks.append(Block(
            index=len(blocks),
            text=text,
            label=label,
            list_level=list_level,
            list_id=list_id,
            bullet=bullet,
            style=style.name if style is not None else None,
            outline_level=outline,
            lead=features.lead,
            emphasised=features.emphasised,
            all_caps=features.all_caps,
            in_table=in_table,
        ))

    warnings: list[str] = []
    rev = _revision_warning(tally.revisions)
    if rev:
        warnings.append(rev)
    if tally.alt_chunks:
        warnings.append(f"{tally.alt_chunks} embedded document chunk(s) (w:altChunk) not read")
    if tally.open_fields:
        warnings.append("a field is never closed (w:fldChar end missing); text after it "
                        "may be missing")
    boxes = _text_box_count(document_element)
    if boxes:
        warnings.append(f"text in {boxes} text box(es) not read")
    return tuple(blocks), tuple(warnings)


def read_docx_blocks(path: str | os.PathLike[str]) -> tuple[tuple[Block, ...], tuple[str, ...]]:
    """Read the .docx at *path* into blocks (one per body paragraph, reading order) and
    warnings, after the safety checks of :func:`core.docx.package.open_docx_package`.

    Raises :class:`core.errors.CounterdraftError` for bad input.
    """
    package = open_docx_package(path)
    sheet = parse_styles(package.styles)
    defs = parse_numbering(package.numbering, styles=sheet)
    return blocks_from_document(package.document, styles=sheet, numbering=defs)

