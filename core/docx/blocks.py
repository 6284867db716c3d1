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
from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from typing import Any

from lxml import etree

from ..errors import CounterdraftError
from ..lazyre import lazy_compile
from ..model import Block
from .compat import MC_NS, alternate_branch
from .numbering import (
    ListCounter,
    NumberingDefinitions,
    decimal_number,
    parse_numbering,
)
from .package import open_docx_package
from .styles import EMPTY_RUN_FORMAT, W_NS, RunFormat, StyleSheet, parse_styles, run_format_of

__all__ = [
    "TextPiece",
    "paragraph_emphasis",
    "blocks_from_document",
    "iter_block_pieces",
    "iter_body_paragraphs",
    "paragraph_pieces",
    "read_docx_blocks",
]

_W = f"{{{W_NS}}}"
_MC = f"{{{MC_NS}}}"
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
_ALTERNATE = _MC + "AlternateContent"

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
_RSTYLE = _W + "rStyle"
_PSTYLE = _W + "pStyle"
_NUMPR = _W + "numPr"
_NUMID = _W + "numId"
_ILVL = _W + "ilvl"
_OUTLINE_LVL = _W + "outlineLvl"


def _first_child(element: etree._Element, tag: str) -> etree._Element | None:
    """``element.find(tag)`` for a plain tag name: its first child element named *tag*.  A
    loop over the children costs a quarter of lxml's path search (about 0.5 us against 2
    on the test machine), and the reader asks for a few children of every paragraph."""
    for child in element:
        if child.tag == tag:
            return child
    return None


@dataclass(frozen=True, slots=True, eq=False)
class TextPiece:
    """Text contributed by one run child (w:t, w:tab, w:br, w:sym, ...), in document order.

    ``element`` is the source run (``w:r``); ``node`` the child that produced the text.
    """

    text: str
    element: etree._Element
    node: etree._Element | None = None


# --------------------------------------------------------------------------------------
# Bounds
# --------------------------------------------------------------------------------------

#: Most paragraphs read from one document.  A 100-page agreement has about 1,500; a
#: 1,000-page one 20,000 or so.  More than this is no agreement a reviewer reads, and the
#: review's cost grows with it, so the file is refused in one line.
MAX_PARAGRAPHS = 200_000

#: Most runs (``w:r``) read from one document: a heavily formatted 100-page agreement has
#: some 30,000; ten runs a paragraph on average at the paragraph limit.
MAX_RUNS = 2_000_000


# --------------------------------------------------------------------------------------
# Reading order
# --------------------------------------------------------------------------------------


@dataclass(slots=True)
class _Tally:
    """Counts gathered while walking (tracked changes, content not read, bounds)."""

    revisions: Counter[str]
    source: str | None = None
    alt_chunks: int = 0
    #: Complex fields still open at the end of the body (a damaged field hides what follows).
    open_fields: int = 0
    bodies: int = 0
    paragraphs: int = 0
    runs: int = 0

    @classmethod
    def new(cls, source: str | None = None) -> _Tally:
        return cls(Counter(), source)

    def paragraph(self) -> None:
        self.paragraphs += 1
        if self.paragraphs > MAX_PARAGRAPHS:
            raise CounterdraftError(f"refused: the document has more than {MAX_PARAGRAPHS} "
                                    "paragraphs (the limit)", path=self.source)

    def run(self) -> None:
        self.runs += 1
        if self.runs > MAX_RUNS:
            raise CounterdraftError(f"refused: the document has more than {MAX_RUNS} runs of "
                                    "text (w:r, the limit)", path=self.source)


def _bodies(document_element: etree._Element) -> list[etree._Element]:
    """Every ``w:body`` of a ``w:document`` in order (ECMA-376 allows one; a second one,
    which LibreOffice shows, is read too), or ``[element]`` for a body given directly."""
    if document_element.tag == _DOCUMENT:
        return [child for child in document_element if child.tag == _BODY]
    return [document_element]


def _iter_paragraphs(document_element: etree._Element, tally: _Tally | None = None
                     ) -> Iterator[tuple[etree._Element, bool]]:
    """(w:p, in_table) in reading order; an explicit stack, so nesting costs no recursion."""
    bodies = _bodies(document_element)
    if tally is not None:
        tally.bodies = len(bodies)
    stack: list[tuple[Iterator[etree._Element], int]] = [(iter(b), 0) for b in reversed(bodies)]
    while stack:
        it, depth = stack[-1]
        child = next(it, None)
        if child is None:
            stack.pop()
            continue
        tag = child.tag
        if tag == _P:
            if tally is not None:
                tally.paragraph()
            yield child, depth > 0
        elif tag == _TBL:
            stack.append((iter(child), depth + 1))
        elif tag == _TR:
            if tally is not None:
                _count_row_revisions(child, tally)
            stack.append((iter(child), depth))
        elif tag in (_TC, _CUSTOM_XML):
            stack.append((iter(child), depth))
        elif tag == _SDT:
            content = child.find(_SDT_CONTENT)
            if content is not None:
                stack.append((iter(content), depth))
        elif tag == _ALTERNATE:
            branch = alternate_branch(child)
            if branch is not None:
                stack.append((iter(branch), depth))
        elif tag == _ALT_CHUNK and tally is not None:
            tally.alt_chunks += 1


def _count_row_revisions(row: etree._Element, tally: _Tally) -> None:
    trpr = row.find(_TRPR)
    if trpr is not None:
        for rev in trpr:
            if rev.tag in (_INS, _DEL):
                tally.revisions[rev.tag] += 1


def iter_body_paragraphs(document_element: etree._Element) -> Iterator[etree._Element]:
    """The body's ``w:p`` elements in reading order (table cells and nested tables included,
    content controls, custom XML and markup-compatibility choices opened), the same order as
    :func:`read_docx_blocks`.

    *document_element* is the ``w:document`` root or its ``w:body``.
    """
    for p, _ in _iter_paragraphs(document_element):
        yield p


# --------------------------------------------------------------------------------------
# The paragraph walker
# --------------------------------------------------------------------------------------

_EMPTY_FORMAT = EMPTY_RUN_FORMAT


@dataclass(slots=True)
class _Walk:
    pieces: list[TextPiece]
    formats: list[RunFormat]  # the run format of each piece (direct rPr, not yet inherited)
    char_styles: list[str | None]
    mark_deleted: bool


#: One level of the walker's stack: (children, current run or None, run format, char style).
_Frame = tuple[Iterator[etree._Element], "etree._Element | None", RunFormat, "str | None"]


class _ParagraphWalker:
    """Walks one paragraph's content.  *fields* is the open complex-field stack (True = in
    its result part), shared across paragraphs by the caller; text shows only when every
    open field is in its result part."""

    __slots__ = ("fields", "revisions", "stack", "tally", "walk")

    def __init__(self, fields: list[bool], tally: _Tally | None) -> None:
        self.fields = fields
        self.tally = tally
        self.revisions = tally.revisions if tally is not None else None

    def __call__(self, p: etree._Element) -> _Walk:
        self.walk = _Walk([], [], [], False)
        self.stack: list[_Frame] = [(iter(p), None, _EMPTY_FORMAT, None)]
        stack = self.stack
        while stack:
            it, run, fmt, cstyle = stack[-1]
            child = next(it, None)
            if child is None:
                stack.pop()
            elif run is None:
                self._paragraph_content(child)
            else:
                self._run_content(child, run, fmt, cstyle)
        return self.walk

    def _count(self, tag: str) -> None:
        if self.revisions is not None:
            self.revisions[tag] += 1

    def _open(self, element: etree._Element | None) -> None:
        if element is not None:
            self.stack.append((iter(element), None, _EMPTY_FORMAT, None))

    def _paragraph_content(self, child: etree._Element) -> None:
        tag = child.tag
        if tag == _R:
            self._enter_run(child)
        elif tag in (_INS, _MOVE_TO):
            self._count(tag)
            self._open(child)
        elif tag in (_DEL, _MOVE_FROM):
            self._count(tag)
        elif tag in _TRANSPARENT:
            self._open(child)
        elif tag == _SDT:
            self._open(child.find(_SDT_CONTENT))
        elif tag == _ALTERNATE:
            self._open(alternate_branch(child))
        elif tag == _PPR:
            self._paragraph_mark(child)

    def _enter_run(self, run: etree._Element) -> None:
        if self.tally is not None:
            self.tally.run()
        rpr = _first_child(run, _RPR)
        rstyle = None
        if rpr is not None:
            rs = changed = None
            for child in rpr:  # the first w:rStyle, and whether a w:rPrChange is there
                tag = child.tag
                if tag == _RSTYLE and rs is None:
                    rs = child
                elif tag == _RPR_CHANGE:
                    changed = child
            if rs is not None:
                rstyle = rs.get(_VAL)
            if changed is not None:
                self._count(_RPR_CHANGE)
        self.stack.append((iter(run), run, run_format_of(rpr), rstyle))

    def _paragraph_mark(self, ppr: etree._Element) -> None:
        rpr = _first_child(ppr, _RPR)
        if rpr is not None:
            for mark in rpr:
                mtag = mark.tag
                if mtag in (_DEL, _MOVE_FROM):
                    self.walk.mark_deleted = True
                    self._count(mtag)
                elif mtag in (_INS, _MOVE_TO):
                    self._count(mtag)
        if self.revisions is not None and _first_child(ppr, _PPR_CHANGE) is not None:
            self._count(_PPR_CHANGE)

    def _run_content(self, child: etree._Element, run: etree._Element, fmt: RunFormat,
                     cstyle: str | None) -> None:
        """Text, fixed characters and symbols become pieces; field characters move the field
        stack; ruby bases and markup-compatibility branches are opened."""
        tag = child.tag
        if tag == _T:
            text = child.text
        elif tag in _FIXED_TEXT:
            text = _FIXED_TEXT[tag]
        elif tag == _SYM:
            text = _sym_text(child)
        else:
            if tag == _FLD_CHAR:
                self._field_char(child.get(_FLD_CHAR_TYPE))
            elif tag == _RUBY:
                self._open(child.find(_RUBY_BASE))
            elif tag == _ALTERNATE:
                branch = alternate_branch(child)
                if branch is not None:
                    self.stack.append((iter(branch), run, fmt, cstyle))
            return
        if text and not fmt.hidden and all(self.fields):
            walk = self.walk
            walk.pieces.append(TextPiece(text, run, child))
            walk.formats.append(fmt)
            walk.char_styles.append(cstyle)

    def _field_char(self, kind: str | None) -> None:
        fields = self.fields
        if kind == "begin":
            fields.append(False)
        elif kind == "separate":
            if fields:
                fields[-1] = True
        elif kind == "end" and fields:
            fields.pop()


def _walk_paragraph(p: etree._Element, fields: list[bool], tally: _Tally | None) -> _Walk:
    return _ParagraphWalker(fields, tally)(p)


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
_LITERAL_LABEL = lazy_compile(
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
_TRAILING_PUNCT = lazy_compile(r"^[.:;\u2013\u2014-]+")


@dataclass(frozen=True, slots=True)
class _Emphasis:
    lead: str | None
    emphasised: bool
    all_caps: bool


def _label_skip(text: str, pieces: list[TextPiece], emph: list[bool]) -> tuple[int, int]:
    """(first piece, its offset in *text*) after a plain literal label, or only blanks,
    before the first emphasised piece; (0, 0) when there is none to skip."""
    first_emph = next((i for i in range(len(pieces)) if emph[i] and pieces[i].text.strip()), None)
    if first_emph is None or first_emph == 0:
        return 0, 0
    prefix_len = sum(len(pieces[i].text) for i in range(first_emph))
    prefix = text[:prefix_len]
    if not prefix.strip() or (_LITERAL_LABEL.match(prefix) and "\n" not in prefix):
        return first_emph, prefix_len
    return 0, 0


def _all_caps(pieces: list[TextPiece], caps: list[bool], start: int) -> bool:
    """True when some piece from *start* on has letters and every such piece shows in capitals."""
    letters = False
    for i in range(start, len(pieces)):
        t = pieces[i].text
        if any(ch.isalpha() for ch in t):
            letters = True
            if not (caps[i] or t == t.upper()):
                return False
    return letters


def _emphasis_run(pieces: list[TextPiece], emph: list[bool], start: int,
                  offset: int) -> tuple[int | None, int | None]:
    """(end of the emphasised run from piece *start*, where the plain text after it starts),
    as offsets in the paragraph's text; None for a part that is not there."""
    lead_end = None
    pos = offset
    for i in range(start, len(pieces)):
        t = pieces[i].text
        if not t.strip():
            pos += len(t)
            continue
        if not emph[i]:
            return lead_end, pos
        pos += len(t)
        lead_end = pos
    return lead_end, None


def _emphasis(text: str, pieces: list[TextPiece], emph: list[bool], caps: list[bool]) -> _Emphasis:
    """Lead / emphasised / all-caps of a paragraph from its pieces.  O(pieces)."""
    # Skip a plain literal label before the first emphasised piece.
    start, offset = _label_skip(text, pieces, emph)
    # all_caps: every piece with letters is shown in capitals.
    all_caps = _all_caps(pieces, caps, start)
    lead_end, cont = _emphasis_run(pieces, emph, start, offset)
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


def paragraph_emphasis(text: str, pieces: Sequence[Any], emph: list[bool], caps: list[bool]
                       ) -> tuple[str | None, bool, bool]:
    """(lead, emphasised, all_caps) of a paragraph whose *text* is the concatenation of the
    ``.text`` of *pieces*, each emphasised (bold, underlined, capitals) or not: the rule the
    .docx reader applies to its runs, for another reader's runs (the .odt reader)."""
    found = _emphasis(text, list(pieces), emph, caps)
    return found.lead, found.emphasised, found.all_caps


# --------------------------------------------------------------------------------------
# Blocks
# --------------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class _ParagraphProps:
    """What ``w:pPr`` sets directly: style, numbering, outline level, paragraph-mark run
    properties (their language is the paragraph's, for the number formats that spell)."""

    style_id: str | None = None
    num_id: str | None = None
    ilvl: int | None = None
    outline: int | None = None
    mark: RunFormat = _EMPTY_FORMAT


def _ppr_values(p: etree._Element) -> _ParagraphProps:
    ppr = _first_child(p, _PPR)
    if ppr is None:
        return _ParagraphProps()
    style = num_id = None
    ilvl = outline = None
    mark = _EMPTY_FORMAT
    for child in ppr:
        tag = child.tag
        if tag == _PSTYLE:
            style = child.get(_VAL)
        elif tag == _NUMPR:
            for np_ in child:
                if np_.tag == _NUMID:
                    num_id = np_.get(_VAL)
                elif np_.tag == _ILVL:
                    ilvl = decimal_number(np_.get(_VAL))
        elif tag == _OUTLINE_LVL:
            outline = decimal_number(child.get(_VAL))
        elif tag == _RPR:
            mark = run_format_of(child)
    return _ParagraphProps(style, num_id, ilvl, outline, mark)


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


def _warnings(tally: _Tally, document_element: etree._Element) -> tuple[str, ...]:
    warnings: list[str] = []
    rev = _revision_warning(tally.revisions)
    if rev:
        warnings.append(rev)
    if tally.bodies > 1:
        warnings.append(f"the document has {tally.bodies} bodies (w:body; ECMA-376 allows one): "
                        "all are read, in order")
    if tally.alt_chunks:
        warnings.append(f"{tally.alt_chunks} embedded document chunk(s) (w:altChunk) not read")
    if tally.open_fields:
        warnings.append("a field is never closed (w:fldChar end missing); text after it "
                        "may be missing")
    boxes = _text_box_count(document_element)
    if boxes:
        warnings.append(f"text in {boxes} text box(es) not read")
    return tuple(warnings)


class _BlockMaker:
    """Turns walked paragraphs into blocks: style, heading features, numbering label."""

    __slots__ = ("counter", "defs", "sheet")

    def __init__(self, sheet: StyleSheet, defs: NumberingDefinitions) -> None:
        self.sheet = sheet
        self.defs = defs
        self.counter = ListCounter(defs)

    def __call__(self, index: int, p: etree._Element, in_table: bool, walk: _Walk) -> Block:
        props = _ppr_values(p)
        style = self.sheet.paragraph_style(props.style_id)
        default_run = self.sheet.default_run
        para_run = style.run.over(default_run) if style is not None else default_run
        text = "".join(piece.text for piece in walk.pieces)
        features = self._emphasis(text, walk, para_run)
        shown = None
        if not (walk.mark_deleted and not walk.pieces):  # a paragraph merged away
            numpr = self.defs.paragraph_numbering(num_id=props.num_id, ilvl=props.ilvl,
                                                  style=style)
            if numpr is not None:
                shown = self.counter.advance(*numpr, lang=props.mark.over(para_run).lang)
        if props.outline is not None:
            outline = props.outline + 1 if 0 <= props.outline <= 8 else None
        else:
            outline = style.outline_level if style is not None else None
        return Block(
            index=index,
            text=text,
            label=shown.text if shown is not None else None,
            list_level=shown.ilvl if shown is not None else None,
            list_id=shown.list_id if shown is not None else None,
            bullet=shown.bullet if shown is not None else False,
            style=style.name if style is not None else None,
            outline_level=outline,
            lead=features.lead,
            emphasised=features.emphasised,
            all_caps=features.all_caps,
            in_table=in_table,
        )

    def _emphasis(self, text: str, walk: _Walk, para_run: RunFormat) -> _Emphasis:
        emph: list[bool] = []
        caps: list[bool] = []
        for fmt, cstyle in zip(walk.formats, walk.char_styles):
            cdef = self.sheet.get(cstyle)
            full = fmt.over(cdef.run.over(para_run)) if cdef is not None else fmt.over(para_run)
            is_caps = bool(full.caps)
            emph.append(bool(full.bold) or bool(full.underline) or is_caps)
            caps.append(is_caps)
        return _emphasis(text, walk.pieces, emph, caps)


def blocks_from_document(
    document_element: etree._Element,
    *,
    styles: StyleSheet | None = None,
    numbering: NumberingDefinitions | None = None,
    source: str | None = None,
) -> tuple[tuple[Block, ...], tuple[str, ...]]:
    """Blocks and warnings from parsed parts (the pure core of :func:`read_docx_blocks`).

    *source* names the file in the :class:`~core.errors.CounterdraftError` raised beyond
    :data:`MAX_PARAGRAPHS` or :data:`MAX_RUNS`.  A ``w:document`` without a ``w:body`` has
    no blocks (:func:`core.docx.package.open_docx_package` refuses such a file).
    """
    make = _BlockMaker(styles if styles is not None else StyleSheet(),
                       numbering if numbering is not None else NumberingDefinitions())
    tally = _Tally.new(source)
    blocks = [make(i, p, in_table, walk)
              for i, (p, in_table, walk) in enumerate(_merged_walks(document_element, tally))]
    return tuple(blocks), _warnings(tally, document_element)


def read_docx_blocks(path: str | os.PathLike[str]) -> tuple[tuple[Block, ...], tuple[str, ...]]:
    """Read the .docx at *path* into blocks (one per body paragraph, reading order) and
    warnings, after the safety checks of :func:`core.docx.package.open_docx_package`.

    Raises :class:`core.errors.CounterdraftError` for bad input, and for a document beyond
    the bounds of :mod:`core.docx.numbering` or of this module (one line naming the file).
    """
    package = open_docx_package(path)
    sheet = parse_styles(package.styles)
    defs = parse_numbering(package.numbering, styles=sheet, source=package.path)
    return blocks_from_document(package.document, styles=sheet, numbering=defs,
                                source=package.path)
