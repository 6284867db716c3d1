"""Write a fresh .docx with real Word auto-numbering, heading styles and run-in headings.

The demo agreements, the test fixtures and the benchmarks are built with this module, so
that every numbered paragraph is numbered the way a word processor numbers it: the label is
*not* in the paragraph text but computed from ``word/numbering.xml`` (ECMA-376 Part 1,
§17.9).  The output is built on python-docx's default template, with the XML written by
lxml here (all .docx XML work stays in ``core.docx``).

Numbering model
---------------
Each list name used by the paragraphs gets one ``w:abstractNum`` (one ``w:lvl`` per level of
``lists[name]``: ``w:start`` 1, ``w:numFmt``, ``w:lvlText``, ``w:lvlJc`` and a hanging
indent) and one ``w:num`` instance pointing at it.  A paragraph with ``restart=True`` starts a
new ``w:num`` instance of the same abstract numbering whose ``w:lvlOverride`` elements carry a
``w:startOverride`` for every level (§17.9.27), so the list starts again from its first
value there; later paragraphs of that list keep using the new instance.  Every paragraph of a
list carries ``w:pPr/w:numPr`` with ``w:ilvl`` (its level) and ``w:numId`` (§17.9.18).

Determinism
-----------
The same input gives the same bytes: ids are assigned in order of first use, the core
properties carry fixed dates, and the zip entries have a fixed timestamp, order and
attributes.  Regenerated demo files therefore do not churn in version control.

Cost: linear in the number and length of paragraphs; the template's styles are pruned to
the ones the output uses so that a small agreement stays a small file.
"""

from __future__ import annotations

import datetime as _dt
import io
import re
import zipfile
import zlib
from collections.abc import Mapping, Sequence
from dataclasses import KW_ONLY, dataclass
from typing import Any

import docx
from docx.opc.constants import RELATIONSHIP_TYPE as RT
from lxml import etree

__all__ = [
    "ComposeParagraph",
    "DEFAULT_LISTS",
    "NUMBER_FORMATS",
    "compose_docx",
    "docx_from_blocks",
]

W_NS = "http://schemas.openxmlformats.org/wordprocessingml/2006/main"
XML_NS = "http://www.w3.org/XML/1998/namespace"


def _w(tag: str) -> str:
    return f"{{{W_NS}}}{tag}"


#: Number formats this writer accepts (a subset of ST_NumberFormat, ECMA-376 Part 1 §17.18.59).
NUMBER_FORMATS: frozenset[str] = frozenset({
    "decimal", "decimalZero", "lowerLetter", "upperLetter", "lowerRoman", "upperRoman",
    "bullet", "ordinal", "cardinalText", "ordinalText", "none",
})

#: The list used when the caller gives none: the usual English clause numbering
#: "1." / "1.1" / "(a)" / "(i)" (common practice, no source).
DEFAULT_LISTS: Mapping[str, tuple[tuple[str, str], ...]] = {
    "main": (("decimal", "%1."), ("decimal", "%1.%2"), ("lowerLetter", "(%3)"), ("lowerRoman", "(%4)")),
}

#: ECMA-376 allows levels 0..8 in one abstract numbering (§17.9.6, ST_DecimalNumber ilvl).
MAX_LEVELS = 9
#: Indent per list level and hanging indent for the label, in twentieths of a point
#: (720 twips = 0.5 inch, the indent Word's own multilevel lists use; from memory).
INDENT_STEP_TWIPS = 720
HANGING_TWIPS = 720
#: Styles kept from the template besides the ones the paragraphs use: the document defaults
#: Word expects to find (default paragraph font, normal table, no list).
_BASE_STYLE_IDS = ("Normal", "DefaultParagraphFont", "TableNormal", "NoList")
#: Parts of python-docx's default template that a composed agreement does not need; dropped
#: to keep the file small (thumbnail, custom XML, the Word 2010 duplicate of the styles).
_DROPPED_RELTYPES = frozenset({
    RT.THUMBNAIL,
    RT.CUSTOM_XML,
    "http://schemas.microsoft.com/office/2007/relationships/stylesWithEffects",
})
#: Fixed dates so that the same input always gives the same bytes.
_FIXED_DATE = _dt.datetime(2024, 1, 1, 9, 0, 0)
_ZIP_DATE = (1980, 1, 1, 0, 0, 0)
_LEVEL_REF = re.compile(r"%([1-9])")


@dataclass(frozen=True, slots=True)
class ComposeParagraph:
    """One paragraph to write.

    ``level`` is the 0-based list level (None: not numbered); ``list`` names the numbering
    it belongs to (a key of ``compose_docx(lists=...)``); ``style`` a paragraph style name of
    the template ("Title", "Heading 1".."Heading 3", ...); ``lead`` a run-in heading written
    in bold before ``text``, separated by one space; ``bold`` makes the whole paragraph bold;
    ``restart`` starts the list again from its first value at this paragraph; ``label`` shows
    this exact text as the paragraph's list label at ``level`` (a numbering instance of its
    own that overrides the level's text with it, ``w:lvlOverride``/``w:lvl``, §17.9.8), and
    ``bullet`` makes the paragraph a bullet item of its list.
    In ``text`` (and ``lead``), ``"\\t"`` is written as a tab and ``"\\n"`` as a line break.
    """

    text: str
    _: KW_ONLY
    level: int | None = None
    list: str = "main"
    style: str | None = None
    lead: str | None = None
    bold: bool = False
    restart: bool = False
    label: str | None = None
    bullet: bool = False


# --------------------------------------------------------------------------------------
# Numbering
# --------------------------------------------------------------------------------------


def _check_list(name: str, levels: Sequence[tuple[str, str]]) -> None:
    if not 1 <= len(levels) <= MAX_LEVELS:
        raise ValueError(f"list {name!r}: needs 1 to {MAX_LEVELS} levels, got {len(levels)}")
    for i, (fmt, text) in enumerate(levels):
        if fmt not in NUMBER_FORMATS:
            raise ValueError(f"list {name!r} level {i}: unknown number format {fmt!r}")
        for ref in _LEVEL_REF.findall(text):
            if int(ref) > i + 1:
                raise ValueError(f"list {name!r} level {i}: {text!r} refers to a deeper level")


class _Numbering:
    """Allocates abstract numberings and numbering instances in order of first use."""

    def __init__(self, lists: Mapping[str, Sequence[tuple[str, str]]]) -> None:
        self._lists = lists
        self._abstract: dict[str, int] = {}  # list name -> abstractNumId
        self._current: dict[str, int] = {}  # list name -> numId in use
        self._nums: list[tuple[int, int, bool]] = []  # (numId, abstractNumId, restarted)
        #: numId -> (level, label or None for a bullet) of a fixed-label instance
        self._fixed: dict[int, tuple[int, str | None]] = {}

    def num_id(self, name: str, level: int, *, restart: bool) -> int:
        if name not in self._lists:
            raise ValueError(f"unknown list {name!r}; pass it in compose_docx(lists=...)")
        depth = len(self._lists[name])
        if not 0 <= level < depth:
            raise ValueError(f"list {name!r} has levels 0..{depth - 1}, not {level}")
        if name not in self._abstract:
            self._abstract[name] = len(self._abstract)
        if restart or name not in self._current:
            num_id = len(self._nums) + 1  # numId 0 means "no numbering" (§17.9.18)
            self._nums.append((num_id, self._abstract[name], restart and name in self._current))
            self._current[name] = num_id
        return self._current[name]

    def fixed_num_id(self, name: str, level: int, label: str | None) -> int:
        """A numbering instance of list *name* whose *level* shows *label* (None: a bullet)."""
        base = self.num_id(name, level, restart=False)
        abstract_id = next(a for n, a, _r in self._nums if n == base)
        num_id = len(self._nums) + 1
        self._nums.append((num_id, abstract_id, False))
        self._fixed[num_id] = (level, label)
        return num_id

    def fill(self, root: etree._Element) -> None:
        """Replace the children of ``w:numbering`` with the lists used."""
        for child in list(root):
            root.remove(child)
        for name, abstract_id in self._abstract.items():
            root.append(self._abstract_num(name, abstract_id))
        for num_id, abstract_id, restarted in self._nums:
            num = etree.SubElement(root, _w("num"), {_w("numId"): str(num_id)})
            etree.SubElement(num, _w("abstractNumId"), {_w("val"): str(abstract_id)})
            if num_id in self._fixed:
                ilvl, label = self._fixed[num_id]
                over = etree.SubElement(num, _w("lvlOverride"), {_w("ilvl"): str(ilvl)})
                lvl = etree.SubElement(over, _w("lvl"), {_w("ilvl"): str(ilvl)})
                etree.SubElement(lvl, _w("start"), {_w("val"): "1"})
                etree.SubElement(lvl, _w("numFmt"), {_w("val"): "bullet" if label is None else "decimal"})
                etree.SubElement(lvl, _w("lvlText"), {_w("val"): "\u2022" if label is None else label})
                etree.SubElement(lvl, _w("lvlJc"), {_w("val"): "left"})
                ppr = etree.SubElement(lvl, _w("pPr"))
                etree.SubElement(ppr, _w("ind"), {_w("left"): str(INDENT_STEP_TWIPS * (ilvl + 1)),
                                                  _w("hanging"): str(HANGING_TWIPS)})
            if restarted:
                name = next(n for n, a in self._abstract.items() if a == abstract_id)
                for ilvl in range(len(self._lists[name])):
                    over = etree.SubElement(num, _w("lvlOverride"), {_w("ilvl"): str(ilvl)})
                    etree.SubElement(over, _w("startOverride"), {_w("val"): "1"})

    def _abstract_num(self, name: str, abstract_id: int) -> etree._Element:
        el = etree.Element(_w("abstractNum"), {_w("abstractNumId"): str(abstract_id)})
        nsid = zlib.crc32(name.encode("utf-8")) & 0xFFFFFFFF
        etree.SubElement(el, _w("nsid"), {_w("val"): f"{nsid:08X}"})
        etree.SubElement(el, _w("multiLevelType"), {_w("val"): "multilevel"})
        for ilvl, (fmt, text) in enumerate(self._lists[name]):
            lvl = etree.SubElement(el, _w("lvl"), {_w("ilvl"): str(ilvl)})
            # Child order of CT_Lvl (§17.9.6): start, numFmt, ..., lvlText, ..., lvlJc, pPr.
            etree.SubElement(lvl, _w("start"), {_w("val"): "1"})
            etree.SubElement(lvl, _w("numFmt"), {_w("val"): fmt})
            etree.SubElement(lvl, _w("lvlText"), {_w("val"): text})
            etree.SubElement(lvl, _w("lvlJc"), {_w("val"): "left"})
            ppr = etree.SubElement(lvl, _w("pPr"))
            etree.SubElement(ppr, _w("ind"), {
                _w("left"): str(INDENT_STEP_TWIPS * (ilvl + 1)),
                _w("hanging"): str(HANGING_TWIPS),
            })
        return el


# --------------------------------------------------------------------------------------
# Paragraphs
# --------------------------------------------------------------------------------------


def _append_runs(p: etree._Element, text: str, *, bold: bool) -> None:
    """Append one run holding *text*; tabs and line breaks become w:tab / w:br."""
    if not text:
        return
    r = etree.SubElement(p, _w("r"))
    if bold:
        rpr = etree.SubElement(r, _w("rPr"))
        etree.SubElement(rpr, _w("b"))
    for piece in re.split(r"([\t\n])", text):
        if piece == "\t":
            etree.SubElement(r, _w("tab"))
        elif piece == "\n":
            etree.SubElement(r, _w("br"))
        elif piece:
            t = etree.SubElement(r, _w("t"))
            t.text = piece
            if piece != piece.strip() or "  " in piece:
                t.set(f"{{{XML_NS}}}space", "preserve")


def _paragraph(para: ComposeParagraph, *, style_id: str | None, num_id: int | None) -> etree._Element:
    p = etree.Element(_w("p"))
    if style_id is not None or num_id is not None:
        ppr = etree.SubElement(p, _w("pPr"))
        # Child order of CT_PPrBase (§17.3.1.26): pStyle before numPr.
        if style_id is not None:
            etree.SubElement(ppr, _w("pStyle"), {_w("val"): style_id})
        if num_id is not None:
            numpr = etree.SubElement(ppr, _w("numPr"))
            etree.SubElement(numpr, _w("ilvl"), {_w("val"): str(para.level)})
            etree.SubElement(numpr, _w("numId"), {_w("val"): str(num_id)})
    if para.lead:
        _append_runs(p, para.lead, bold=True)
        _append_runs(p, " " + para.text if para.text else "", bold=para.bold)
    else:
        _append_runs(p, para.text, bold=para.bold)
    return p


# --------------------------------------------------------------------------------------
# Template clean-up and packaging
# --------------------------------------------------------------------------------------


def _prune_styles(styles_root: etree._Element, keep_ids: set[str]) -> None:
    """Keep the styles in *keep_ids* plus everything they are based on or linked to."""
    by_id = {s.get(_w("styleId")): s for s in styles_root.iter(_w("style"))}
    todo = [i for i in keep_ids if i in by_id]
    keep: set[str] = set()
    while todo:  # iterative closure over basedOn / link / next
        sid = todo.pop()
        if sid in keep:
            continue
        keep.add(sid)
        for tag in ("basedOn", "link", "next"):
            ref = by_id[sid].find(_w(tag))
            if ref is not None and ref.get(_w("val")) in by_id:
                todo.append(ref.get(_w("val")))
    for sid, el in by_id.items():
        if sid not in keep:
            styles_root.remove(el)
    latent = styles_root.find(_w("latentStyles"))
    if latent is not None:  # optional (§17.7.4.5); Word's defaults apply without it
        styles_root.remove(latent)


def _drop_unneeded_parts(document: docx.document.Document) -> None:
    package = document.part.package
    for rels in (package.rels, document.part.rels):
        for rid in [rid for rid, rel in rels.items() if rel.reltype in _DROPPED_RELTYPES]:
            del rels[rid]


def _deterministic_zip(data: bytes) -> bytes:
    """Rewrite the package with fixed timestamps and attributes, keeping the entry order."""
    out = io.BytesIO()
    with zipfile.ZipFile(io.BytesIO(data)) as src, zipfile.ZipFile(out, "w") as dst:
        for info in src.infolist():
            zi = zipfile.ZipInfo(info.filename, date_time=_ZIP_DATE)
            zi.compress_type = zipfile.ZIP_DEFLATED
            zi.create_system = 0
            zi.external_attr = 0
            dst.writestr(zi, src.read(info.filename))
    return out.getvalue()


def compose_docx(
    paragraphs: Sequence[ComposeParagraph],
    *,
    lists: Mapping[str, Sequence[tuple[str, str]]] | None = None,
) -> bytes:
    """The bytes of a .docx holding *paragraphs*, numbered with real Word auto-numbering.

    ``lists[name]`` gives, per level, ``(numFmt, lvlText)``, e.g. ``[("decimal", "%1."),
    ("decimal", "%1.%2"), ("lowerLetter", "(%3)")]``; :data:`DEFAULT_LISTS` supplies the
    ``"main"`` list unless *lists* redefines it.  Raises ValueError for an unknown list,
    level, number format or style (a programming error, not bad user input).
    """
    spec: dict[str, Sequence[tuple[str, str]]] = dict(DEFAULT_LISTS)
    if lists:
        spec.update(lists)
    for name, levels in spec.items():
        _check_list(name, levels)

    document = docx.Document()
    _drop_unneeded_parts(document)
    style_ids: dict[str, str] = {}
    for para in paragraphs:
        if para.style is not None and para.style not in style_ids:
            try:
                style_ids[para.style] = document.styles[para.style].style_id
            except KeyError:
                raise ValueError(f"unknown paragraph style {para.style!r}") from None
    for name in ("Title", "Heading 1", "Heading 2", "Heading 3"):
        style_ids.setdefault(name, document.styles[name].style_id)

    numbering = _Numbering(spec)
    body = document.element.body
    sect_pr = body.find(_w("sectPr"))
    for para in paragraphs:
        num_id = None
        if para.level is not None and (para.label is not None or para.bullet):
            num_id = numbering.fixed_num_id(para.list, para.level, None if para.bullet else para.label)
        elif para.level is not None:
            num_id = numbering.num_id(para.list, para.level, restart=para.restart)
        p = _paragraph(para, style_id=style_ids[para.style] if para.style else None, num_id=num_id)
        sect_pr.addprevious(p)
    numbering.fill(document.part.numbering_part.element)
    _prune_styles(document.styles.element, set(_BASE_STYLE_IDS) | set(style_ids.values()))

    props = document.core_properties
    props.author = "Counterdraft"
    props.comments = ""
    props.last_modified_by = "Counterdraft"
    props.revision = 1
    props.created = _FIXED_DATE
    props.modified = _FIXED_DATE
    buf = io.BytesIO()
    document.save(buf)
    return _deterministic_zip(buf.getvalue())


#: Paragraphs with these outline levels are written in the template's heading styles (the
#: .docx reader takes a heading style's outline level back from it).
_HEADING_STYLES = {1: "Heading 1", 2: "Heading 2", 3: "Heading 3"}
#: A label with a "%" before a digit would be read as a level reference (§17.9.11): such a
#: label is written with a fullwidth percent sign instead.
_PLACEHOLDER_LIKE = re.compile(r"%(?=\d)")


def docx_from_blocks(blocks: Sequence[Any]) -> bytes:
    """A .docx whose paragraphs read back as *blocks* (:class:`core.model.Block`): the same
    texts in the same order, each list label shown exactly as read (a fixed label, see
    :class:`ComposeParagraph`), bullets, bold paragraphs and bold run-in headings, and
    heading styles for outline levels 1-3.  The counter-draft of a draft that was not a
    .docx (a PDF, an .odt, a text file) is written on this file.  Table cells become plain
    paragraphs; other formatting is not kept."""
    names: dict[str, str] = {}
    paragraphs = []
    for b in blocks:
        level = None
        label = None
        name = "main"
        numbered = (b.label is not None or b.bullet) and b.list_level is not None
        if numbered:
            name = names.setdefault(b.list_id or "", f"list{len(names) + 1}")
            level = min(max(b.list_level, 0), MAX_LEVELS - 1)
            label = _PLACEHOLDER_LIKE.sub("\uff05", b.label) if b.label is not None else None
        text = b.text
        lead = None
        if b.lead and not b.emphasised and text.startswith(b.lead + " ") and len(text) > len(b.lead) + 1:
            lead, text = b.lead, text[len(b.lead) + 1:]
        paragraphs.append(ComposeParagraph(
            text, level=level, list=name, style=_HEADING_STYLES.get(b.outline_level or 0),
            lead=lead, bold=bool(b.emphasised), label=label, bullet=bool(b.bullet and numbered)))
    lists = {name: [("decimal", f"%{k + 1}.") for k in range(MAX_LEVELS)] for name in names.values()}
    return compose_docx(paragraphs, lists=lists)
