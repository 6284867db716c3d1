"""Write a fresh .docx holding paragraphs with tracked changes and plain tables.

Used for the comparison redline (paragraphs whose runs are inserted, deleted or moved, as
ECMA-376 Part 1 §17.13.5 describes) and for the issues list (a real Word table, §17.4).

Tables (§17.4) span the page's text width (``w:tblW``, §17.4.64, in twips: the page width of
``w:pgSz`` less the left and right ``w:pgMar``), with a fixed layout (``w:tblLayout``,
§17.4.53; the algorithm in ST_TblLayout, §17.18.87) so that a word processor keeps the column
widths of the ``w:tblGrid`` (§17.4.49) instead of fitting columns to their contents; the
header row repeats on every page (``w:tblHeader``, §17.4.50) and no row breaks across a page
(``w:cantSplit``, §17.4.6).  Section numbers as in ISO/IEC 29500-1.
The package is the minimum a word processor needs (ECMA-376 Part 2, Open Packaging
Conventions: ``[Content_Types].xml``, the package relationships, the main document part)
plus a style sheet, settings and the core and custom file properties (the custom property
``Caution`` carries :data:`core.CAUTION`).

Determinism: the same input gives the same bytes (fixed zip timestamps and entry order).

Cost: linear in the total text written.
"""

from __future__ import annotations

import io
import re
import zipfile
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, replace
from typing import Literal
from xml.sax.saxutils import escape

from lxml import etree

from .revisions import W_NS, IdAllocator, RevisionKind, RevisionStamp, make_runs, mark_paragraph, part_bytes, w, wrap

__all__ = [
    "GROUP_FILL",
    "HEADER_FILL",
    "Cell",
    "Para",
    "Run",
    "Table",
    "build_docx",
    "text_width_twips",
    "custom_properties_xml",
    "CUSTOM_PROPERTIES_CT",
    "CUSTOM_PROPERTIES_REL",
]

RunMark = Literal["", "ins", "del", "moveFrom", "moveTo"]

#: Content type and relationship type of the custom file properties part (ECMA-376 Part 1
#: §15.2.12.2; schema in §22.3 "Custom Properties").
CUSTOM_PROPERTIES_CT = "application/vnd.openxmlformats-officedocument.custom-properties+xml"
CUSTOM_PROPERTIES_REL = (
    "http://schemas.openxmlformats.org/officeDocument/2006/relationships/custom-properties"
)
_CUSTOM_NS = "http://schemas.openxmlformats.org/officeDocument/2006/custom-properties"
_VT_NS = "http://schemas.openxmlformats.org/officeDocument/2006/docPropsVTypes"
#: The format id every custom property carries (ECMA-376 Part 1 §22.3.2.2, fixed GUID).
_CUSTOM_FMTID = "{D5CDD505-2E9C-101B-9397-08002B2CF9AE}"

_ZIP_DATE = (1980, 1, 1, 0, 0, 0)
#: A4 in twips (210 x 297 mm; ECMA-376 Part 1 §17.6.13 measures w:pgSz in twentieths of a
#: point): the short and the long side.
_A4_SHORT_TWIPS, _A4_LONG_TWIPS = 11906, 16838
#: Left and right (and top and bottom) page margin in twips: 2.5 cm, Word's A4 default (from
#: memory).  The text width is the page width less both margins: 9070 twips (16.0 cm) upright,
#: 14002 twips (24.7 cm) landscape.
_MARGIN_TWIPS = 1418
#: Fill of a table's header row (the cell shading w:shd): a pale grey-green of our own palette,
#: light enough for black bold text to print legibly in greyscale.
HEADER_FILL = "DDE6E2"
#: Fill of the rows from ``Table.divider_before`` on (a set-off group, e.g. informational rows).
GROUP_FILL = "F3F5F4"


def text_width_twips(*, landscape: bool = False) -> int:
    """The text width of the pages :func:`build_docx` writes: A4 less both side margins."""
    return (_A4_LONG_TWIPS if landscape else _A4_SHORT_TWIPS) - 2 * _MARGIN_TWIPS


@dataclass(frozen=True, slots=True)
class Run:
    """Text of one run; ``mark`` says whether it is inserted, deleted or moved."""

    text: str
    mark: RunMark = ""
    bold: bool = False
    italic: bool = False


@dataclass(frozen=True, slots=True)
class Para:
    """A paragraph.  ``mark`` tracks its paragraph mark (``"del"`` with all runs deleted
    removes the whole paragraph on acceptance); ``move`` names the move a moveFrom/moveTo
    paragraph belongs to, so its range markers pair up (§17.13.5.23 - §17.13.5.28)."""

    runs: tuple[Run, ...]
    style: str | None = None
    mark: RunMark = ""
    move: str | None = None


#: One table cell: plain text, or runs (e.g. some words in bold).  A ``"\n"`` starts a new
#: paragraph of the cell.
Cell = str | tuple[Run, ...]


@dataclass(frozen=True, slots=True)
class Table:
    """A table across the page's text width whose first row is a header row repeated on each
    page (``w:tblHeader``); no row breaks across pages (``w:cantSplit``)."""

    header: tuple[str, ...]
    rows: tuple[tuple[Cell, ...], ...]
    #: Relative column widths (any positive numbers), scaled to the text width; equal widths
    #: when empty.
    widths: tuple[float, ...] = ()
    #: Index (into ``rows``) of the first row of a set-off group at the end of the table: a
    #: heavier rule above it and a light fill; None for none.
    divider_before: int | None = None


Element = Para | Table


_STYLES = (
    '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
    f'<w:styles xmlns:w="{W_NS}">\n'
    '<w:docDefaults><w:rPrDefault><w:rPr>'
    '<w:rFonts w:ascii="Liberation Serif" w:hAnsi="Liberation Serif" w:cs="Liberation Serif"'
    ' w:eastAsia="Liberation Serif"/><w:sz w:val="22"/><w:szCs w:val="22"/><w:lang w:val="en-GB"/>'
    '</w:rPr></w:rPrDefault>\n'
    '<w:pPrDefault><w:pPr><w:spacing w:after="120" w:line="264" w:lineRule="auto"/></w:pPr>'
    '</w:pPrDefault></w:docDefaults>\n'
    '<w:style w:type="paragraph" w:default="1" w:styleId="Normal"><w:name w:val="Normal"/><w:qFormat/>'
    '</w:style>\n'
    '<w:style w:type="paragraph" w:styleId="Title"><w:name w:val="Title"/><w:basedOn w:val="Normal"/>'
    '<w:next w:val="Normal"/><w:qFormat/><w:pPr><w:spacing w:after="240"/><w:outlineLvl w:val="0"/>'
    '</w:pPr><w:rPr><w:b/><w:sz w:val="32"/><w:szCs w:val="32"/></w:rPr></w:style>\n'
    '<w:style w:type="paragraph" w:styleId="Heading1"><w:name w:val="heading 1"/>'
    '<w:basedOn w:val="Normal"/><w:next w:val="Normal"/><w:qFormat/><w:pPr><w:keepNext/>'
    '<w:spacing w:before="240" w:after="120"/><w:outlineLvl w:val="0"/></w:pPr><w:rPr><w:b/>'
    '<w:sz w:val="26"/><w:szCs w:val="26"/></w:rPr></w:style>\n'
    '<w:style w:type="paragraph" w:styleId="Caution"><w:name w:val="Caution"/><w:basedOn w:val="Normal"/>'
    '<w:qFormat/><w:pPr><w:pBdr><w:top w:val="single" w:sz="4" w:space="4" w:color="auto"/>'
    '<w:bottom w:val="single" w:sz="4" w:space="4" w:color="auto"/></w:pBdr><w:spacing w:after="240"/>'
    '</w:pPr><w:rPr><w:i/><w:sz w:val="20"/><w:szCs w:val="20"/></w:rPr></w:style>\n'
    '<w:style w:type="paragraph" w:styleId="TableText"><w:name w:val="Table Text"/>'
    '<w:basedOn w:val="Normal"/><w:qFormat/><w:pPr>'
    '<w:spacing w:before="20" w:after="20" w:line="240" w:lineRule="auto"/></w:pPr><w:rPr>'
    '<w:sz w:val="18"/><w:szCs w:val="18"/></w:rPr></w:style>\n'
    '<w:style w:type="paragraph" w:styleId="TableNote"><w:name w:val="Table Note"/>'
    '<w:basedOn w:val="Normal"/><w:qFormat/><w:pPr>'
    '<w:spacing w:before="60" w:after="60" w:line="240" w:lineRule="auto"/></w:pPr><w:rPr>'
    '<w:sz w:val="18"/><w:szCs w:val="18"/></w:rPr></w:style>\n'
    '<w:style w:type="character" w:default="1" w:styleId="DefaultParagraphFont">'
    '<w:name w:val="Default Paragraph Font"/><w:uiPriority w:val="1"/><w:semiHidden/></w:style>\n'
    '<w:style w:type="table" w:default="1" w:styleId="TableNormal"><w:name w:val="Normal Table"/>'
    '<w:semiHidden/><w:tblPr><w:tblInd w:w="0" w:type="dxa"/><w:tblCellMar><w:top w:w="0" w:type="dxa"/>'
    '<w:left w:w="108" w:type="dxa"/><w:bottom w:w="0" w:type="dxa"/><w:right w:w="108" w:type="dxa"/>'
    '</w:tblCellMar></w:tblPr></w:style>\n'
    '<w:style w:type="table" w:styleId="TableGrid"><w:name w:val="Table Grid"/>'
    '<w:basedOn w:val="TableNormal"/><w:tblPr><w:tblBorders>'
    '<w:top w:val="single" w:sz="4" w:space="0" w:color="auto"/>'
    '<w:left w:val="single" w:sz="4" w:space="0" w:color="auto"/>'
    '<w:bottom w:val="single" w:sz="4" w:space="0" w:color="auto"/>'
    '<w:right w:val="single" w:sz="4" w:space="0" w:color="auto"/>'
    '<w:insideH w:val="single" w:sz="4" w:space="0" w:color="auto"/>'
    '<w:insideV w:val="single" w:sz="4" w:space="0" w:color="auto"/></w:tblBorders></w:tblPr></w:style>\n'
    '</w:styles>'
)

_SETTINGS = (
    '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
    f'<w:settings xmlns:w="{W_NS}"><w:defaultTabStop w:val="720"/>'
    '<w:characterSpacingControl w:val="doNotCompress"/><w:compat>'
    '<w:compatSetting w:name="compatibilityMode" w:uri="http://schemas.microsoft.com/office/word"'
    ' w:val="15"/></w:compat></w:settings>'
)

_CONTENT_TYPES = (
    '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
    '<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">'
    '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>'
    '<Default Extension="xml" ContentType="application/xml"/><Override PartName="/word/document.xml"'
    ' ContentType="application/vnd.openxmlformats-officedocument.wordprocessingml.document.main+xml"/>'
    '<Override PartName="/word/styles.xml"'
    ' ContentType="application/vnd.openxmlformats-officedocument.wordprocessingml.styles+xml"/>'
    '<Override PartName="/word/settings.xml"'
    ' ContentType="application/vnd.openxmlformats-officedocument.wordprocessingml.settings+xml"/>'
    '<Override PartName="/docProps/core.xml"'
    ' ContentType="application/vnd.openxmlformats-package.core-properties+xml"/>'
    f'<Override PartName="/docProps/custom.xml" ContentType="{CUSTOM_PROPERTIES_CT}"/></Types>'
)

_PACKAGE_RELS = (
    '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
    '<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">'
    '<Relationship Id="rId1"'
    ' Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument"'
    ' Target="word/document.xml"/><Relationship Id="rId2"'
    ' Type="http://schemas.openxmlformats.org/package/2006/relationships/metadata/core-properties"'
    ' Target="docProps/core.xml"/>'
    f'<Relationship Id="rId3" Type="{CUSTOM_PROPERTIES_REL}" Target="docProps/custom.xml"/>'
    '</Relationships>'
)

_DOCUMENT_RELS = (
    '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
    '<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">'
    '<Relationship Id="rId1"'
    ' Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/styles"'
    ' Target="styles.xml"/><Relationship Id="rId2"'
    ' Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/settings"'
    ' Target="settings.xml"/></Relationships>'
)


def custom_properties_xml(properties: Mapping[str, str], *, existing: bytes | None = None) -> bytes:
    """``docProps/custom.xml`` with string *properties* added (replacing same-named ones)."""
    if existing is not None:
        root = etree.fromstring(existing, parser=etree.XMLParser(resolve_entities=False, no_network=True))
    else:
        root = etree.Element(f"{{{_CUSTOM_NS}}}Properties", nsmap={None: _CUSTOM_NS, "vt": _VT_NS})
    pids = [int(p.get("pid")) for p in root if (p.get("pid") or "").isdigit()]
    next_pid = max(pids + [1]) + 1  # pid 0 and 1 are reserved (§22.3.2.2)
    for name, value in properties.items():
        for old in [p for p in root if p.get("name") == name]:
            root.remove(old)
        prop = etree.SubElement(root, f"{{{_CUSTOM_NS}}}property")
        prop.set("fmtid", _CUSTOM_FMTID)
        prop.set("pid", str(next_pid))
        prop.set("name", name)
        next_pid += 1
        etree.SubElement(prop, f"{{{_VT_NS}}}lpwstr").text = value
    return part_bytes(root)


def _core_properties(title: str, created: str) -> bytes:
    return (
        '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
        '<cp:coreProperties xmlns:cp="http://schemas.openxmlformats.org/package/2006/metadata/core-properties" '
        'xmlns:dc="http://purl.org/dc/elements/1.1/" xmlns:dcterms="http://purl.org/dc/terms/" '
        'xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance">'
        f"<dc:title>{escape(title)}</dc:title><dc:creator>Counterdraft</dc:creator>"
        f'<dcterms:created xsi:type="dcterms:W3CDTF">{escape(created)}</dcterms:created>'
        "</cp:coreProperties>"
    ).encode()


def _run_properties(run: Run) -> etree._Element | None:
    """``w:rPr`` with ``w:b``/``w:i`` (ECMA-376 Part 1 §17.3.2, run properties) for a bold or
    italic run; None for a plain one."""
    if not (run.bold or run.italic):
        return None
    rpr = etree.Element(w("rPr"))
    if run.bold:
        etree.SubElement(rpr, w("b"))
    if run.italic:
        etree.SubElement(rpr, w("i"))
    return rpr


def _paragraph(para: Para, *, stamp: RevisionStamp, ids: IdAllocator,
               moves: dict[str, list[etree._Element]]) -> etree._Element:
    p = etree.Element(w("p"))
    if para.style:
        ppr = etree.SubElement(p, w("pPr"))
        etree.SubElement(ppr, w("pStyle")).set(w("val"), para.style)
    group: list[Run] = []

    def flush() -> None:
        if not group:
            return
        mark = group[0].mark
        runs = []
        for r in group:
            runs.extend(make_runs(r.text, _run_properties(r), deleted=mark in ("del", "moveFrom")))
        if mark:
            p.append(wrap(mark, runs, stamp=stamp, ids=ids))
        else:
            p.extend(runs)
        group.clear()

    for run in para.runs:
        if group and run.mark != group[0].mark:
            flush()
        group.append(run)
    flush()
    if para.mark:
        mark_paragraph(p, _paragraph_mark_kind(para, para.mark), stamp=stamp, ids=ids)
    if para.mark in ("moveFrom", "moveTo") and para.move:
        moves.setdefault(f"{para.mark}:{para.move}", []).append(p)
    return p


def _starts_with_insertion(para: Para) -> bool:
    return para.mark == "ins" or (bool(para.runs) and para.runs[0].mark == "ins")


def _separate_insertions(body: Sequence[Element]) -> list[Element]:
    """Keep an insertion at the end of a paragraph from touching one at the start of the next.

    LibreOffice 7.4 (checked on this machine type) joins two insertions by the same author
    that meet across an untracked paragraph mark into one change, and rejecting it then
    removes the paragraph mark too: "A x" + "y B" (x and y inserted) becomes "AB".  Both are
    valid ECMA-376 markup; we write an equivalent form it handles: the earlier paragraph ends
    with a deletion instead.  Either a final "deleted D, inserted X" becomes "inserted X,
    deleted D", or the last word t before the final insertion X is written as "inserted t X,
    deleted t".  Accepting or rejecting gives the same text as before.
    """
    out = list(body)
    for i in range(len(out) - 1):
        cur, nxt = out[i], out[i + 1]
        if not (isinstance(cur, Para) and isinstance(nxt, Para)):
            continue
        if cur.mark or not cur.runs or cur.runs[-1].mark != "ins":
            continue
        if not _starts_with_insertion(nxt):
            continue
        runs = list(cur.runs)
        k = len(runs)
        while k > 0 and runs[k - 1].mark == "ins":
            k -= 1
        inserted = "".join(r.text for r in runs[k:])
        if k > 0 and runs[k - 1].mark == "del":
            out[i] = replace(cur, runs=tuple(runs[:k - 1]) + (Run(inserted, "ins"), runs[k - 1]))
            continue
        if k > 0 and runs[k - 1].mark == "":
            plain = runs[k - 1].text
            m = re.search(r"\S+\s*$", plain) or re.search(r".$", plain, re.DOTALL)
            if m is not None:
                head, tail = plain[: m.start()], plain[m.start():]
                last = runs[k - 1]
                new_runs = tuple(runs[:k - 1]) + ((Run(head, "", last.bold, last.italic),) if head else ())
                out[i] = replace(cur, runs=new_runs + (Run(tail + inserted, "ins"), Run(tail, "del")))
    return out


def _paragraph_mark_kind(para: Para, mark: RevisionKind) -> RevisionKind:
    """The revision to put on the paragraph mark of *para*, marked *mark*.

    A moved paragraph ending in words inserted (or deleted) on top of the move gets the
    insertion (deletion) on its mark: LibreOffice 7.4 (checked on this machine type) leaves an
    empty paragraph behind on Reject All when a ``w:moveTo`` mark follows an inserted run,
    while the ``w:ins`` mark is rejected cleanly.  Either is valid ECMA-376 markup.
    """
    last = para.runs[-1].mark if para.runs else ""
    if mark == "moveTo" and last == "ins":
        return "ins"
    if mark == "moveFrom" and last == "del":
        return "del"
    return mark


def _add_move_ranges(moves: dict[str, list[etree._Element]], *, stamp: RevisionStamp,
                     ids: IdAllocator) -> None:
    """Range markers around each move's paragraphs: the start before the first run of the
    first paragraph, the end after the last run of the last one (§17.13.5.23 - .28)."""
    for key, paras in moves.items():
        kind, name = key.split(":", 1)
        # One range per run of consecutive paragraphs; all of a move's ranges share its name.
        runs: list[list[etree._Element]] = []
        for p in paras:
            if runs and runs[-1][-1].getnext() is p:
                runs[-1].append(p)
            else:
                runs.append([p])
        for group in runs:
            rid = str(ids.next())
            start = etree.Element(w(f"{kind}RangeStart"))
            start.set(w("id"), rid)
            start.set(w("name"), name)
            start.set(w("author"), stamp.author)
            start.set(w("date"), stamp.date)
            end = etree.Element(w(f"{kind}RangeEnd"))
            end.set(w("id"), rid)
            first, last = group[0], group[-1]
            ppr = first.find(w("pPr"))
            if ppr is not None:
                ppr.addnext(start)
            else:
                first.insert(0, start)
            last.append(end)


def _column_twips(widths: Sequence[float], text_width: int) -> list[int]:
    """Whole-twip column widths in the proportions of *widths* that add up to *text_width*
    exactly (the rounding remainder goes to the widest column)."""
    total = sum(widths)
    if total <= 0 or any(x <= 0 for x in widths):
        raise ValueError("column widths must be positive")
    twips = [max(1, int(text_width * x / total)) for x in widths]
    twips[twips.index(max(twips))] += text_width - sum(twips)
    return twips


def _cell_paragraphs(value: Cell, *, header: bool) -> list[list[Run]]:
    """The runs of each paragraph of a cell (split at ``"\n"``)."""
    runs = (Run(value, bold=header),) if isinstance(value, str) else value
    paras: list[list[Run]] = [[]]
    for run in runs:
        for k, piece in enumerate(run.text.split("\n")):
            if k:
                paras.append([])
            if piece:
                paras[-1].append(Run(piece, bold=run.bold or header, italic=run.italic))
    return paras


def _border(parent: etree._Element, side: str, size: int) -> None:
    el = etree.SubElement(parent, w(side))
    el.set(w("val"), "single")
    el.set(w("sz"), str(size))  # eighths of a point
    el.set(w("space"), "0")
    el.set(w("color"), "auto")


def _shade(tcpr: etree._Element, fill: str) -> None:
    shd = etree.SubElement(tcpr, w("shd"))
    shd.set(w("val"), "clear")
    shd.set(w("color"), "auto")
    shd.set(w("fill"), fill)


def _table(table: Table, *, text_width: int) -> etree._Element:
    ncols = len(table.header)
    widths = table.widths or tuple(1.0 for _ in range(ncols))
    if len(widths) != ncols:
        raise ValueError("one width per column")
    twips = _column_twips(widths, text_width)
    tbl = etree.Element(w("tbl"))
    tblpr = etree.SubElement(tbl, w("tblPr"))
    etree.SubElement(tblpr, w("tblStyle")).set(w("val"), "TableGrid")
    tw = etree.SubElement(tblpr, w("tblW"))
    tw.set(w("w"), str(sum(twips)))
    tw.set(w("type"), "dxa")
    etree.SubElement(tblpr, w("tblLayout")).set(w("type"), "fixed")
    grid = etree.SubElement(tbl, w("tblGrid"))
    for x in twips:
        etree.SubElement(grid, w("gridCol")).set(w("w"), str(x))
    for r, values in enumerate((table.header, *table.rows)):
        if len(values) != ncols:
            raise ValueError("every row needs one value per column")
        header = r == 0
        grouped = table.divider_before is not None and r - 1 >= table.divider_before
        tr = etree.SubElement(tbl, w("tr"))
        trpr = etree.SubElement(tr, w("trPr"))
        etree.SubElement(trpr, w("cantSplit"))
        if header:
            etree.SubElement(trpr, w("tblHeader"))
        for c, value in enumerate(values):
            tc = etree.SubElement(tr, w("tc"))
            tcpr = etree.SubElement(tc, w("tcPr"))
            tcw = etree.SubElement(tcpr, w("tcW"))
            tcw.set(w("w"), str(twips[c]))
            tcw.set(w("type"), "dxa")
            if grouped and r - 1 == table.divider_before:
                _border(etree.SubElement(tcpr, w("tcBorders")), "top", 12)
            if header:
                _shade(tcpr, HEADER_FILL)
            elif grouped:
                _shade(tcpr, GROUP_FILL)
            for runs in _cell_paragraphs(value, header=header):
                p = etree.SubElement(tc, w("p"))
                ppr = etree.SubElement(p, w("pPr"))
                etree.SubElement(ppr, w("pStyle")).set(w("val"), "TableText")
                for run in runs:
                    p.extend(make_runs(run.text, _run_properties(run)))
    return tbl


def build_docx(body: Sequence[Element], *, stamp: RevisionStamp, title: str,
               properties: Mapping[str, str] | None = None, landscape: bool = False) -> bytes:
    """The bytes of a new .docx whose body is *body* (paragraphs and tables, in order).

    Revisions carry *stamp*; *properties* become custom file properties (strings).
    """
    ids = IdAllocator(1)
    moves: dict[str, list[etree._Element]] = {}
    doc = etree.Element(w("document"), nsmap={"w": W_NS})
    bod = etree.SubElement(doc, w("body"))
    for el in _separate_insertions(body):
        if isinstance(el, Para):
            bod.append(_paragraph(el, stamp=stamp, ids=ids, moves=moves))
        else:
            bod.append(_table(el, text_width=text_width_twips(landscape=landscape)))
            # Word needs a paragraph between two tables; one after a table is customary.
            bod.append(etree.Element(w("p")))
    _add_move_ranges(moves, stamp=stamp, ids=ids)
    sect = etree.SubElement(bod, w("sectPr"))
    pg = etree.SubElement(sect, w("pgSz"))
    # A4, ECMA-376 Part 1 §17.6.13 units; landscape swaps the sides.
    pg.set(w("w"), str(_A4_LONG_TWIPS if landscape else _A4_SHORT_TWIPS))
    pg.set(w("h"), str(_A4_SHORT_TWIPS if landscape else _A4_LONG_TWIPS))
    if landscape:
        pg.set(w("orient"), "landscape")
    mar = etree.SubElement(sect, w("pgMar"))
    margin = str(_MARGIN_TWIPS)
    for side, value in (("top", margin), ("right", margin), ("bottom", margin), ("left", margin),
                        ("header", "709"), ("footer", "709"), ("gutter", "0")):
        mar.set(w(side), value)
    document_xml = part_bytes(doc)
    parts: list[tuple[str, bytes]] = [
        ("[Content_Types].xml", _CONTENT_TYPES.encode("utf-8")),
        ("_rels/.rels", _PACKAGE_RELS.encode("utf-8")),
        ("docProps/core.xml", _core_properties(title, stamp.date)),
        ("docProps/custom.xml", custom_properties_xml(dict(properties or {}))),
        ("word/document.xml", document_xml),
        ("word/_rels/document.xml.rels", _DOCUMENT_RELS.encode("utf-8")),
        ("word/styles.xml", _STYLES.encode("utf-8")),
        ("word/settings.xml", _SETTINGS.encode("utf-8")),
    ]
    buf = io.BytesIO()
    with zipfile.ZipFile(buf, "w") as zf:
        for name, data in parts:
            info = zipfile.ZipInfo(name, date_time=_ZIP_DATE)
            info.compress_type = zipfile.ZIP_DEFLATED
            info.external_attr = 0o644 << 16
            zf.writestr(info, data)
    return buf.getvalue()

